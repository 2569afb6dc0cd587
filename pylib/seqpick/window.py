"""Candidates arriving at random times over a window (Poisson arrivals).

Model
-----
Pool ``{"window": T, "arrivals_per_unit": L}``: candidates arrive as a
Poisson process of rate L on [0, T], so the number N is Poisson(L T) and,
given N, the arrival times are iid uniform on [0, T].  Only relative ranks
are seen, with the arrival time of each candidate.  Goal: hire the overall
best (an empty window or no hire is a failure).  Time is measured below in
"expected arrivals": with Lambda = L T, a time t is y = L t and the
remaining expected arrivals are mu = L (T - t).

The optimal rule depends on the time *and* on the count
----------------------------------------------------------
When the k-th arrival is best so far and mu more arrivals are expected, the
chance that it stays best is ``S_k(mu) = E[k / (k + M)]`` with
M ~ Poisson(mu) (given M = m later arrivals the best of k + m is among the
first k with chance k/(k+m)).  This grows with k: having seen more
candidates makes the current best better, so the count matters and the rule
is *not* a pure time threshold.  The chance of winning by passing and taking
the next best-so-far is ``E[(k/(k+M)) (H_{k+M-1} - H_{k-1})]`` (exactly one
later best-so-far).  Their difference is

    g(k, mu) = sum_m P(M = m) c_m(k),  c_m(k) = k/(k+m) * (1 - sum_{i=k}^{k+m-1} 1/i).

* For fixed k, c_m(k) changes sign once (+ then -) in m, so
  e^mu g(k, mu) = sum_m c_m mu^m / m! has exactly one positive root x_k, and
  g >= 0 iff mu <= x_k (Descartes' rule for power series).
* x_k is nondecreasing in k.  Write the current best's quality as u (its
  posterior is Beta(k, 1)); given u, the later arrivals above it are
  Poisson(mu (1-u)) and g(k, mu) = E[phi(mu B_k)] with B_k = 1 - u ~ Beta(1, k)
  and phi(a) = e^-a (1 - sum_{n>=1} a^n / (n n!)), which changes sign once
  (+ then -).  The Beta(1, k+1) density over the Beta(1, k) density is
  decreasing, so (single-crossing / monotone likelihood ratio argument,
  Karlin 1968) g(k, mu) >= 0 implies g(k+1, mu) >= 0.
* Hence the set "best so far with mu <= x_k" is closed: the next best-so-far
  comes later (smaller mu) with a larger count (larger x).  This is the
  monotone case of optimal stopping (Chow, Robbins & Siegmund 1971), so the
  one-step look-ahead rule is optimal:

      **offer to the k-th arrival iff it is best so far and L (T - t) <= x_k**,

  i.e. iff t >= t*_k = T - x_k / L.  x_1 = 2.1198..., x_2 = 3.6925...,
  x_k = (e - 1) k + 0.089 + O(1/k); as L T grows the rule tends to "first
  best-so-far after T/e" and the chance to 1/e (Cowan & Zabczyk 1978;
  Bruss 1987).  phi changes sign at XSTAR = 0.8044 (the root of
  sum a^n/(n n!) = 1), and x_k >= x_1 > 1.5.  Each x_k is found by a safeguarded Newton iteration on
  g (bisection inside a sign-change bracket); it depends on k only, so the
  values are cached across calls.

Exact performance of a threshold rule
-------------------------------------
Arrival i is "active" if it comes at or after t*_i.  Because t*_i is
nonincreasing in i and arrival times increase, once an arrival is active all
later ones are, and the rule is "take the first best-so-far from index J on"
with J the first active index.  J depends on the arrival times only, so it is
independent of the ranks, and P(J <= i | N = n) = P(Bin(n, v_i) <= i - 1) with
v_i = t*_i / T.  Given J = i and N = n the rule wins with the classic chance
w(i, n) = ((i-1)/n) (H_{n-1} - H_{i-2}) (w(1, n) = 1/n).  Summation by parts
gives

    P(win | n) = sum_{i<=n} G_i(n) (1 - H_{n-1} + H_{i-1}) / n,   G_i(n) = P(J <= i | n),
    P(hire | n) = sum_i G_i(n) / n,
    E[interviews | n] = n - sum_i G_i(n) (H_{n-1} - H_{i-1}),

mixed over n ~ Poisson(L T).  G_i(n) is 0 or 1 to within 1e-18 outside a band
of about 3 sqrt(L T) indices (Hoeffding bounds decide the band rigorously),
and each G_i(n) row comes from the exact binomial recurrence in n.  The same
formulas with a start state (k seen, mu left) give the value of passing in
:func:`advise_window`.

Truncation: Poisson weights are kept on a window whose two tails are each
below 1e-18 (Chernoff bounds); terms with G below 1e-18 (or above
1 - 1e-18) are treated as 0 (or 1).  Every left-out piece is at most 1e-18
times a factor below 20, so the total truncation error is below 1e-15; the
rest is floating-point rounding (about 1e-15).

Clock-only rules
----------------
"First best-so-far after share x of the window" has the closed form (the
max quality seen before time xT has P(1 - U > v) = e^{-x Lambda v})

    P(win) = x * sum_{n>=1} (1-x)^n / n * P(Poisson(Lambda) > n) + e^{-x Lambda} psi((1-x) Lambda),
    P(no hire) = x + (1 - x) e^{-Lambda},
    E[interviews] = x Lambda (1 + Ein(Lambda) - Ein(x Lambda)) + e^{-x Lambda} (1 - e^{-(1-x) Lambda}),

with psi(b) = E[1/M; M >= 1], M ~ Poisson(b), and Ein(z) = int_0^z (1-e^-s)/s ds
(derived here; the first tends to -x ln x as Lambda grows).  The series
collapses to -ln x up to a term below 1e-18 unless x Lambda < 45, when it is
summed exactly.

The curve (``SolveResult.curve``) lists this exact chance for x = i/1000,
i = 0..999: ``skips[i] = i`` means the share i/1000 (not a number of
candidates), ``limit`` is -x ln x.

Complexity: thresholds O(sqrt(k)) each (cached; from k = 2048 on solved at
every 8th k and interpolated in between, error < 1e-10); a solve is O(L T)
time (a band of about 6 sqrt(L T) arrival numbers times a window of about
18 sqrt(L T) counts) and O(sqrt(L T)) memory; each curve point is O(1)
unless x L T < 45, then O(L T).  Measured times: build_scripts/bench_window_odds.py.

What is refused (ScenarioError): goals other than best, more than one
opening, must_hire (with a time window the last candidate cannot be
recognised), offers that can be declined, a cost per candidate, and
compare rules on scores.

References
----------
Cowan, R. & Zabczyk, J. (1978). An optimal selection problem associated with
the Poisson process. *Theory Probab. Appl.* 23, 584-592.
Bruss, F. T. (1984). A unified approach to a class of best choice problems
with an unknown number of options. *Ann. Probab.* 12, 882-889 (the 1/e-law).
Bruss, F. T. (1987). On an optimal selection problem of Cowan and Zabczyk.
*J. Appl. Probab.* 24.
Chow, Y. S., Robbins, H. & Siegmund, D. (1971). *Great Expectations: The
Theory of Optimal Stopping*. Houghton Mifflin (the monotone case).
Karlin, S. (1968). *Total Positivity*, Vol. 1. Stanford University Press
(sign changes under a totally positive kernel).
Gilbert, J. P. & Mosteller, F. (1966). Recognizing the maximum of a sequence.
*J. Amer. Statist. Assoc.* 61, 35-73 (the fixed-n chance w(i, n)).
Hoeffding, W. (1963). Probability inequalities for sums of bounded random
variables. *J. Amer. Statist. Assoc.* 58, 13-30.
Loader, C. (2000). Fast and accurate computation of binomial probabilities
(the saddle-point form used by ``dpois``/``dbinom``).
Abramowitz, M. & Stegun, I. A. (1964). *Handbook of Mathematical Functions*,
5.1.11 and 5.1.22 (E1), 6.3.18 (harmonic numbers).
"""

from __future__ import annotations

import datetime as _dt
import math
from dataclasses import dataclass
from functools import lru_cache
from itertools import accumulate
from math import fsum
from itertools import repeat
from operator import add, mul, sub, truediv
from typing import Any

from .advise import Advice, SearchState
from .errors import ScenarioError
from .harmonic import harmonic, tail
from .results import (Curve, Limit, Outcome, Policy, RuleResult, SolveResult)
from .scenario import CompareRule, Scenario, WindowPool

__all__ = ["solve_window", "advise_window", "threshold", "threshold_time",
           "stay_best_chance", "rule_value", "clock_rule", "skip_rule", "XSTAR",
           "MONTH_DAYS", "CURVE_POINTS"]

#: A month, for ``pool.unit = "month"``: 30.4375 days (365.25 / 12).
MONTH_DAYS = 30.4375
CURVE_POINTS = 1000
_TAIL = 1e-18
#: Hoeffding: P(|Bin(m, v) - m v| >= d) one side <= exp(-2 d^2 / m) <= 1e-18 iff d >= _HC sqrt(m)
_HC = math.sqrt(math.log(1.0 / _TAIL) / 2.0)
_E1M = math.e - 1.0
_UNIT_SECONDS = {"minute": 60.0, "hour": 3600.0, "day": 86400.0, "week": 604800.0,
                 "month": MONTH_DAYS * 86400.0}
_MONTHS = ("January", "February", "March", "April", "May", "June", "July", "August",
           "September", "October", "November", "December")

EULER_GAMMA = 0.57721566490153286060651209008240243
_LN_SQRT_2PI = 0.5 * math.log(2.0 * math.pi)
_SMALL = [math.lgamma(n + 1.0) - (n + 0.5) * math.log(n) + n - _LN_SQRT_2PI
          if n > 0 else 0.0 for n in range(16)]


def _stirlerr(n: int) -> float:
    """log(n!) - [(n + 1/2) log n - n + log sqrt(2 pi)] for integer n >= 1."""
    if n < 16:
        return _SMALL[n]
    x = 1.0 / n
    x2 = x * x
    return x * (1.0 / 12 - x2 * (1.0 / 360 - x2 * (1.0 / 1260 - x2 * (
        1.0 / 1680 - x2 * (1.0 / 1188)))))


def _bd0(x: float, m: float) -> float:
    """x log(x/m) + m - x, accurate also when x is close to m (Loader 2000)."""
    if abs(x - m) < 0.1 * (x + m):
        v = (x - m) / (x + m)
        s = (x - m) * v
        ej = 2.0 * x * v
        v2 = v * v
        for j in range(1, 1000):
            ej *= v2
            s1 = s + ej / (2 * j + 1)
            if s1 == s:
                return s1
            s = s1
        return s
    return x * math.log(x / m) + m - x


def dpois(x: int, mu: float) -> float:
    """P(M = x) for M ~ Poisson(mu), full relative precision.  O(1)."""
    if mu <= 0.0:
        return 1.0 if x == 0 else 0.0
    if x < 0:
        return 0.0
    if x == 0:
        return math.exp(-mu)
    return math.exp(-_stirlerr(x) - _bd0(x, mu)) / math.sqrt(2.0 * math.pi * x)


def dbinom(x: int, n: int, p: float) -> float:
    """P(B = x) for B ~ Binomial(n, p), full relative precision.  O(1)."""
    if x < 0 or x > n:
        return 0.0
    if p <= 0.0:
        return 1.0 if x == 0 else 0.0
    if p >= 1.0:
        return 1.0 if x == n else 0.0
    q = 1.0 - p
    if x == 0:
        return math.exp(n * math.log1p(-p))
    if x == n:
        return math.exp(n * math.log(p))
    lc = (_stirlerr(n) - _stirlerr(x) - _stirlerr(n - x)
          - _bd0(x, n * p) - _bd0(n - x, n * q))
    return math.exp(lc) * math.sqrt(n / (2.0 * math.pi * x * (n - x)))


def chernoff_halfwidths(mu: float, tail: float) -> tuple[float, float]:
    """(a_lo, a_hi) with P(M <= mu - a_lo) <= tail and P(M >= mu + a_hi) <= tail.

    Chernoff bounds for the Poisson law: P(M <= mu - a) <= exp(-a^2 / (2 mu))
    and P(M >= mu + a) <= exp(-a^2 / (2 (mu + a/3))).
    """
    big_l = math.log(1.0 / tail)
    a_lo = math.sqrt(2.0 * big_l * mu)
    a_hi = big_l / 3.0 + math.sqrt(big_l * big_l / 9.0 + 2.0 * big_l * mu)
    return a_lo, a_hi


def pois_window(mu: float, tail: float = 1e-18) -> tuple[int, list[float]]:
    """Poisson(mu) weights on a window ``lo .. lo + len - 1``.

    Each of the two left-out tails has mass below ``tail`` (Chernoff bounds),
    so the weights sum to 1 within ``2 * tail``; they are renormalised to sum
    to 1 exactly (up to rounding), which removes the common relative error of
    the anchor value.  The anchor (the mode) comes from :func:`dpois`; the
    other weights from the exact ratios p(m+1)/p(m) = mu/(m+1).  O(sqrt(mu)).
    """
    if mu <= 0.0:
        return 0, [1.0]
    a_lo, a_hi = chernoff_halfwidths(mu, tail)
    lo = max(0, int(math.ceil(mu - a_lo)))
    hi = int(math.floor(mu + a_hi)) + 1
    mode = min(max(int(mu), lo), hi)
    p0 = dpois(mode, mu)
    up = list(accumulate(map(truediv, repeat(mu), range(mode + 1, hi + 1)), mul, initial=p0))
    down = list(accumulate(map(truediv, range(mode, lo, -1), repeat(mu)), mul, initial=p0))
    down.reverse()
    down.pop()
    down.extend(up)
    inv = 1.0 / fsum(down)
    return lo, list(map(mul, down, repeat(inv)))


@lru_cache(maxsize=32)
def _pois_window_cached(mu: float, tail: float) -> tuple[int, tuple[float, ...]]:
    lo, w = pois_window(mu, tail)
    return lo, tuple(w)


def e1(z: float) -> float:
    """Exponential integral E1(z) = int_z^inf e^-t / t dt for z > 0.  O(1)."""
    if z <= 0.0:
        raise ValueError("e1 needs z > 0")
    if z <= 1.0:
        # A&S 5.1.11: E1(z) = -gamma - ln z - sum_{n>=1} (-z)^n / (n n!)
        s = 0.0
        term = 1.0
        for n in range(1, 200):
            term *= -z / n
            add = term / n
            s += add
            if abs(add) <= 1e-18 * abs(s):
                break
        return -EULER_GAMMA - math.log(z) - s
    # A&S 5.1.22 continued fraction, modified Lentz (Numerical Recipes 6.3).
    tiny = 1e-300
    b = z + 1.0
    c = 1.0 / tiny
    d = 1.0 / b
    h = d
    i = 1
    while i < 10_000:
        an = -float(i * i)
        b += 2.0
        d = 1.0 / (an * d + b)
        c = b + an / c
        delta = c * d
        h *= delta
        if abs(delta - 1.0) < 1e-16:
            break
        i += 1
    return h * math.exp(-z)


def ein(z: float) -> float:
    """Ein(z) = int_0^z (1 - e^-t)/t dt = gamma + ln z + E1(z), z >= 0.  O(1)."""
    if z <= 0.0:
        return 0.0
    if z <= 1.0:
        s = 0.0
        term = 1.0
        for n in range(1, 200):
            term *= -z / n
            add = -term / n
            s += add
            if abs(add) <= 1e-18 * abs(s):
                break
        return s
    return EULER_GAMMA + math.log(z) + e1(z)


# --------------------------------------------------------------------------
# harmonic numbers for the threshold equation
# --------------------------------------------------------------------------

_H: list[float] = [0.0]


def _hlist(upto: int) -> list[float]:
    """H_0..H_upto (each within one unit in the last place), extended on demand."""
    n = len(_H)
    if upto >= n:
        _H.extend(harmonic(j) for j in range(n, upto + 1))
    return _H


def _hdiff(a: int, b: int) -> float:
    """H_b - H_a for integers a, b >= 0 (either order), full precision.  O(1)."""
    if b >= a:
        return tail(a + 1, b)
    return -tail(b + 1, a)


# --------------------------------------------------------------------------
# the thresholds x_k
# --------------------------------------------------------------------------

def _ein_star(x: float) -> tuple[float, float]:
    """(sum_{n>=1} x^n / (n n!) - 1, its derivative (e^x - 1)/x)."""
    s = 0.0
    term = 1.0
    for n in range(1, 400):
        term *= x / n
        add = term / n
        s += add
        if add <= 1e-17 * s:
            break
    return s - 1.0, math.expm1(x) / x


def _solve_xstar() -> float:
    lo, hi = 0.5, 1.0
    x = 0.8
    for _ in range(100):
        f, d = _ein_star(x)
        if f > 0:
            hi = x
        else:
            lo = x
        nx = x - f / d
        if not lo < nx < hi:
            nx = 0.5 * (lo + hi)
        if abs(nx - x) <= 1e-16 * x:
            return nx
        x = nx
    return x


#: Root of sum_{n>=1} x^n / (n n!) = 1 (about 0.8044): phi(a) >= 0 iff a <= XSTAR
#: (the sign change used in the monotonicity proof of the module docstring).
XSTAR = _solve_xstar()

_XCACHE: dict[int, float] = {}
_XCACHE_MAX = 2_000_000


def _g(k: int, mu: float) -> tuple[float, float]:
    """(g(k, mu), d g / d mu): stop value minus one-step look-ahead value.

    d/dmu E[c(M)] = E[c(M+1) - c(M)] for M ~ Poisson(mu).  O(sqrt(mu)); the
    sums are plain float sums and the Poisson tails left out are below 1e-13
    (|c_m| <= 1): the root only needs about 1e-10 relative, since the chance
    of winning is flat (to second order) around the optimal threshold.
    """
    lo, p = pois_window(mu, 1e-13)
    top = k + lo + len(p)
    h = _hlist(top)
    a = 1.0 + h[k - 1]
    # c_m = k/(k+m) * (a - H_{k+m-1}), m = lo .. lo+len(p)
    c = list(map(mul, map(truediv, repeat(float(k)), range(k + lo, top + 1)),
                 map(sub, repeat(a), h[k + lo - 1: top])))
    val = sum(map(mul, p, c))
    ahead = sum(map(mul, p, c[1:]))
    return val, ahead - val


def _newton(k: int, x: float, lo: float, hi: float, maxit: int = 80) -> float:
    """Safeguarded Newton for g(k, .) = 0 with g(lo) > 0 > g(hi)."""
    for _ in range(maxit):
        val, slope = _g(k, x)
        if val > 0:
            lo = x
        elif val < 0:
            hi = x
        else:
            return x
        nx = x - val / slope if slope < 0 else 0.5 * (lo + hi)
        if not lo < nx < hi:
            nx = 0.5 * (lo + hi)
        if abs(nx - x) <= 1e-12 * x or hi - lo <= 1e-12 * x:
            return nx
        x = nx
    return x


_INTERP_FROM = 2048
_STEP = 8


def threshold(k: int) -> float:
    """x_k: offer to the k-th arrival, if best so far, iff mu = L (T - t) <= x_k.

    The root of g(k, mu) = 0 (module docstring); x_k depends on k only.
    Safeguarded Newton with a bisection fallback inside [1.5, (e-1) k + 1]
    (g > 0 at 1.5 < x_1, g < 0 at the right end, widened if needed).
    O(sqrt(k)) per iteration; results are cached.  For k >= 2048 the root is
    solved at every 8th k and the others come from cubic interpolation of the
    four nearest solved values: x_k is smooth ((e-1) k + 0.089 + 0.28/k + ...),
    so the interpolation error is below 1e-10 (tested); the chance of winning
    is flat to second order around the optimal thresholds, so this changes it
    by less than 1e-18, and every part of the engine uses the same values.
    """
    if k < 1:
        raise ValueError("threshold(k) needs k >= 1")
    x = _XCACHE.get(k)
    if x is not None:
        return x
    if k >= _INTERP_FROM and k % _STEP:
        a1 = k - k % _STEP
        nodes = (a1 - _STEP, a1, a1 + _STEP, a1 + 2 * _STEP)
        ys = [threshold(a) for a in nodes]
        x = 0.0
        for i, (ai, yi) in enumerate(zip(nodes, ys)):
            li = 1.0
            for j, aj in enumerate(nodes):
                if j != i:
                    li *= (k - aj) / (ai - aj)
            x += li * yi
    else:
        x = _exact_threshold(k)
    if len(_XCACHE) < _XCACHE_MAX:
        _XCACHE[k] = x
    return x


def _exact_threshold(k: int) -> float:
    """The root of g(k, .) by Newton from a neighbour's value, else from a bracket."""
    step = _STEP if k >= _INTERP_FROM else 1
    prev1, prev2 = _XCACHE.get(k - step), _XCACHE.get(k - 2 * step)
    x = None
    if prev1 is not None:
        guess = 2.0 * prev1 - prev2 if prev2 is not None else prev1 + _E1M * step
        x = _warm(k, guess)
    if x is None:
        lo = 1.5
        hi = _E1M * k + 1.0
        while _g(k, hi)[0] >= 0:
            lo, hi = hi, hi * 1.5
        x = _newton(k, 0.5 * (lo + hi) if k < 4 else _E1M * k + 0.09, lo, hi)
    return x


def _warm(k: int, guess: float) -> float | None:
    """A few Newton steps from a good guess; None if they do not settle."""
    x = guess
    for _ in range(4):
        val, slope = _g(k, x)
        if not slope < 0:
            return None
        step = -val / slope
        x += step
        if abs(step) <= 1e-9 * x:
            return x
    return None


def threshold_time(k: int, pool: WindowPool) -> float:
    """t*_k = max(0, T - x_k / L): the earliest time the k-th arrival gets an offer."""
    return max(0.0, pool.window - threshold(k) / pool.arrivals_per_unit)


def stay_best_chance(k: int, mu: float) -> float:
    """S_k(mu) = E[k / (k + M)], M ~ Poisson(mu): the chance that a best-so-far
    k-th arrival stays best when mu more arrivals are expected.  O(sqrt(mu))."""
    if mu <= 0.0:
        return 1.0
    lo, p = pois_window(mu)
    return min(1.0, fsum(k / (k + m) * q for m, q in zip(range(lo, lo + len(p)), p)))


# --------------------------------------------------------------------------
# exact value of the optimal threshold rule from a state (k0 seen, mu0 left)
# --------------------------------------------------------------------------

@dataclass
class RuleValue:
    """Performance of the optimal rule from a state, and where it acts."""

    win: float
    hire: float
    interviews: float
    band: tuple[int, int]      # indices i_lo .. i_hi-1 computed explicitly
    full_from: int             # from this index on every arrival is active (to 1e-18)


def _binom_cdf(x: int, n: int, v: float) -> float:
    """P(Bin(n, v) <= x), summing the smaller tail from its accurate end term.

    The tail is summed over 12 standard deviations + 40 terms past its end
    term (the terms fall faster than a Normal tail beyond the mean, so the
    rest is below 1e-22 of the sum).  O(sqrt(n)).
    """
    if x < 0:
        return 0.0
    if x >= n:
        return 1.0
    if v <= 0.0:
        return 1.0
    mean = n * v
    span = int(12.0 * math.sqrt(mean * (1.0 - v)) + 40.0)
    if x < mean:
        b = dbinom(x, n, v)
        cnt = min(x, span)
        c = (1.0 - v) / v
        ratios = map(mul, repeat(c), map(truediv, range(x, x - cnt, -1),
                                           range(n - x + 1, n - x + 1 + cnt)))
        return min(1.0, fsum(accumulate(ratios, mul, initial=b)))
    b = dbinom(x + 1, n, v)
    cnt = min(n - x - 1, span)
    c = v / (1.0 - v)
    ratios = map(mul, repeat(c), map(truediv, range(n - x - 1, n - x - 1 - cnt, -1),
                                       range(x + 2, x + 2 + cnt)))
    return max(0.0, 1.0 - fsum(accumulate(ratios, mul, initial=b)))


def rule_value(k0: int, mu0: float) -> RuleValue:
    """Exact chance of winning, of hiring, and expected interviews (counting the
    k0 already seen) of the optimal rule from "k0 seen, mu0 expected to come,
    nobody hired, the k0-th not taken".  See the module docstring.  O(mu0).
    """
    if mu0 <= 0.0:
        return RuleValue(0.0, 0.0, float(k0), (k0 + 1, k0 + 1), k0 + 1)
    lo, pt = _pois_window_cached(mu0, _TAIL)
    p = list(pt)
    hi = lo + len(p) - 1
    c2 = _HC * _HC

    def v_of(i: int) -> float:
        return max(0.0, 1.0 - threshold(i) / mu0)

    def negligible(i: int) -> bool:          # G_i(m) <= 1e-18 for every window m >= j
        j = i - k0
        m = max(lo, j)
        d = m * v_of(i) - (j - 1)
        return d > 0 and d * d >= c2 * m

    def full(i: int) -> bool:                # G_i(m) >= 1 - 1e-18 for every window m
        j = i - k0
        v = v_of(i)
        if v == 0.0:
            return True
        d = j - hi * v
        return d > 0 and d * d >= c2 * hi

    first, last = k0 + 1, k0 + max(hi, 1)
    # smallest i with not negligible(i) (negligible is true-then-false in i)
    if not negligible(first):
        i_lo = first
    elif negligible(last):
        i_lo = last + 1
    else:
        a, b = first, last
        while b - a > 1:
            mid = (a + b) // 2
            if negligible(mid):
                a = mid
            else:
                b = mid
        i_lo = b
    # smallest i >= i_lo with full(i) (false-then-true)
    if i_lo > last:
        i_hi = last + 1
    elif full(i_lo):
        i_hi = i_lo
    elif not full(last):
        i_hi = last + 1
    else:
        a, b = i_lo, last
        while b - a > 1:
            mid = (a + b) // 2
            if full(mid):
                b = mid
            else:
                a = mid
        i_hi = b

    base = i_lo - 1
    ns = [k0 + m for m in range(lo, hi + 1)]
    dvals = [_hdiff(base, n - 1) if n >= 1 else 0.0 for n in ns]
    inv = [1.0 / n if n > 0 else 0.0 for n in ns]
    p1 = [q * r for q, r in zip(p, inv)]
    p2 = [a * d for a, d in zip(p1, dvals)]
    p3 = [q * d for q, d in zip(p, dvals)]
    c1 = list(accumulate(p1, initial=0.0))
    c2s = list(accumulate(p2, initial=0.0))
    c3 = list(accumulate(p3, initial=0.0))
    c4 = list(accumulate(p, initial=0.0))
    win_t: list[float] = []
    hire_t: list[float] = []
    int_t: list[float] = [fsum(q * n for q, n in zip(p, ns))]

    for i in range(i_lo, min(i_hi, last + 1)):
        j = i - k0
        v = v_of(i)
        e_i = _hdiff(base, i - 1)
        m_first = max(lo, j)
        if m_first > hi:
            break
        # Hoeffding sub-window: G = 1 for m <= m_a, G = 0 for m >= m_b (to 1e-18)
        sa = (-_HC + math.sqrt(c2 + 4.0 * v * j)) / (2.0 * v)
        m_a = int(math.floor(sa * sa))
        sb = (_HC + math.sqrt(c2 + 4.0 * v * max(j - 1, 0))) / (2.0 * v)
        m_b = int(math.ceil(sb * sb))
        s1 = s2 = s3 = s4 = 0.0
        ones_end = min(m_a, hi)
        if ones_end >= m_first:
            ta, tb = m_first - lo, ones_end - lo + 1
            s1 += c1[tb] - c1[ta]
            s2 += c2s[tb] - c2s[ta]
            s3 += c3[tb] - c3[ta]
            s4 += c4[tb] - c4[ta]
        ms = max(m_first, m_a + 1)
        me = min(hi, m_b - 1)
        if me >= ms:
            g0 = _binom_cdf(j - 1, ms, v)
            b0 = dbinom(j - 1, ms, v)
            # b(m+1) = b(m) (1-v)(m+1)/(m+2-j);  G(m+1) = G(m) - v b(m)
            ratios = map(mul, repeat(1.0 - v),
                         map(truediv, range(ms + 1, me + 1), range(ms + 2 - j, me + 2 - j)))
            bs = accumulate(ratios, mul, initial=b0)
            rows = list(accumulate(map(mul, repeat(-v), bs), add, initial=g0))
            rows.pop()
            if rows[-1] < 0.0:
                rows = [r if r > 0.0 else 0.0 for r in rows]
            ta, tb = ms - lo, me - lo + 1
            s1 += sum(map(mul, rows, p1[ta:tb]))
            s2 += sum(map(mul, rows, p2[ta:tb]))
            s3 += sum(map(mul, rows, p3[ta:tb]))
            s4 += sum(map(mul, rows, p[ta:tb]))
        win_t.append((1.0 + e_i) * s1 - s2)
        hire_t.append(s1)
        int_t.append(-(s3 - e_i * s4))

    a = i_hi
    if a <= last:
        for q, n in zip(p, ns):
            if n < a:
                continue
            w = 1.0 / n if a == 1 else (a - 1) / n * _hdiff(a - 2, n - 1)
            win_t.append(q * w)
            hire_t.append(q * (n - a + 1) / n)
            int_t.append(-q * (n - a - (a - 1) * _hdiff(a - 1, n - 1)))
    win = min(1.0, max(0.0, fsum(win_t)))
    hire = min(1.0, max(0.0, fsum(hire_t)))
    return RuleValue(win, hire, fsum(int_t), (i_lo, i_hi), i_hi)


# --------------------------------------------------------------------------
# clock-only and skip rules (closed forms)
# --------------------------------------------------------------------------

def _psi(b: float) -> float:
    """psi(b) = E[1/M; M >= 1], M ~ Poisson(b): first arrival is the best.  O(sqrt(b))."""
    if b <= 0.0:
        return 0.0
    lo, p = pois_window(b, _TAIL)
    m0 = max(lo, 1)
    return fsum(map(truediv, p[m0 - lo:], range(m0, lo + len(p))))


@dataclass
class ClockValue:
    win: float
    none: float
    interviews: float


def clock_rule(x: float, lam: float) -> ClockValue:
    """Exact performance of "first best-so-far after share x of the window"
    with Lambda = L T expected arrivals (closed forms in the module docstring).
    O(1) unless x * Lambda < 45, then O(Lambda)."""
    if not 0.0 <= x < 1.0:
        raise ValueError("share must be in [0, 1)")
    a = x * lam
    b = lam - a
    ea = math.exp(-a)
    first = ea * _psi(b) if ea > 1e-30 else 0.0
    if x == 0.0:
        win = first
    else:
        lo, p = _pois_window_cached(lam, _TAIL)
        mlo = max(lo, 1)
        q = 1.0 - x
        lq = math.log1p(-x)
        if mlo * -lq + math.log(mlo) > math.log(1.0 / _TAIL) + 5:
            series = -math.log(x)          # E[L_{M-1}(q)] = -ln x - (tail < 1e-18)
        else:
            # E[L_{M-1}(q)] with L_j = sum_{n=1}^{j} q^n / n, summed exactly
            hi = lo + len(p) - 1
            qn = accumulate(repeat(q, hi), mul)                   # q^1 .. q^hi
            lj = list(accumulate(map(truediv, qn, range(1, hi + 1)), initial=0.0))
            m0 = max(lo, 2)
            series = fsum(map(mul, p[m0 - lo:], lj[m0 - 1:hi]))
        win = x * series + first
    none = x + (1.0 - x) * math.exp(-lam)
    if a <= 0.0:
        intv = -math.expm1(-lam)
    else:
        if a > 1.0:
            diff = -math.log(x) + e1(lam) - e1(a)
        else:
            diff = ein(lam) - ein(a)
        intv = a * (1.0 + diff) + ea * (-math.expm1(-b))
    return ClockValue(min(1.0, max(0.0, win)), min(1.0, none), intv)


def skip_rule(r: int, lam: float) -> ClockValue:
    """Exact performance of "pass on the first r arrivals, then take the first
    best-so-far" under N ~ Poisson(Lambda).  O(sqrt(Lambda))."""
    lo, p = _pois_window_cached(lam, _TAIL)
    win_t, none_t, int_t = [], [], []
    below = 0.0
    for n, q in zip(range(lo, lo + len(p)), p):
        if n <= r:
            below += q
            int_t.append(q * n)
            continue
        if r == 0:
            win_t.append(q / n)
            int_t.append(q)
        else:
            win_t.append(q * r / n * _hdiff(r - 1, n - 1))
            none_t.append(q * r / n)
            int_t.append(q * (r + 1 + r * _hdiff(r, n - 1)))
    none_t.append(below)
    return ClockValue(min(1.0, max(0.0, fsum(win_t))), min(1.0, fsum(none_t)), fsum(int_t))


# --------------------------------------------------------------------------
# scenario checks and clock words
# --------------------------------------------------------------------------

def _check_supported(s: Scenario) -> WindowPool:
    pool = s.pool
    assert isinstance(pool, WindowPool)
    if s.goal.type != "best":
        raise ScenarioError("goal.type", f"got {s.goal.type!r}; with a time window only goal "
                            "\"best\" (hire the overall best) is supported")
    if s.openings != 1:
        raise ScenarioError("openings", f"got {s.openings}; with a time window only one "
                            "opening is supported")
    if s.must_hire:
        raise ScenarioError("must_hire", "with a time window the last candidate cannot be "
                            "recognised (nobody knows who will be last); set must_hire to "
                            "false")
    if s.accept_probability != 1.0:
        raise ScenarioError("accept_probability", f"got {s.accept_probability:g}; with a time "
                            "window offers must always be accepted (1)")
    if s.cost_per_candidate != 0.0:
        raise ScenarioError("cost_per_candidate", f"got {s.cost_per_candidate:g}; with a time "
                            "window a cost per candidate is not supported (use 0)")
    return pool


def _start(pool: WindowPool) -> _dt.datetime | None:
    if pool.start is None:
        return None
    try:
        return _dt.datetime.fromisoformat(pool.start)
    except ValueError:
        raise ScenarioError("pool.start", f"got {pool.start!r}; expected an ISO 8601 "
                            "date-time such as \"2026-03-02T09:00\"") from None


def _clock(pool: WindowPool, t: float) -> str:
    """Time t (window units from the start) in words: a date and clock time when
    ``start`` and ``unit`` are given (a month is 30.4375 days), else units."""
    start = _start(pool)
    unit = pool.unit
    if start is not None and unit is not None:
        when = start + _dt.timedelta(seconds=t * _UNIT_SECONDS[unit])
        secs = unit == "minute" and pool.window <= 120
        if not secs:
            when = (when + _dt.timedelta(seconds=30)).replace(second=0, microsecond=0)
        end = start + _dt.timedelta(seconds=pool.window * _UNIT_SECONDS[unit])
        text = f"{when.day} {_MONTHS[when.month - 1]}"
        if end.year != start.year:
            text += f" {when.year}"
        return text + " " + when.strftime("%H:%M:%S" if secs else "%H:%M")
    if unit is not None:
        return f"{t:.3g} {unit}{'' if t == 1 else 's'} into the window"
    return f"time {t:.4g} (of {pool.window:g})"


def _pct(x: float) -> str:
    return f"{100.0 * x:.1f}%"


# --------------------------------------------------------------------------
# results
# --------------------------------------------------------------------------

def _result(name: str, description: str, rule: dict[str, Any], win: float, none: float,
            interviews: float) -> RuleResult:
    win = min(1.0, max(0.0, win))
    none = min(1.0 - win, max(0.0, none))
    other = max(0.0, 1.0 - win - none)
    return RuleResult(
        name=name, description=description, rule=rule, success_probability=win,
        expected_rank=None, expected_score=None, expected_interviews=interviews,
        p_no_hire=none, outcome=Outcome(best=win, other=other, none=none, forced_last=0.0),
        top=None, rank_distribution=None, expected_hires=1.0 - none, expected_cost=0.0)


def _best_clock(lam: float) -> tuple[float, ClockValue, list[float]]:
    """The curve on x = i/1000 and the best clock-only cutoff (golden section
    refinement of the best grid point on the exact chance)."""
    xs = [i / CURVE_POINTS for i in range(CURVE_POINTS)]
    curve = [clock_rule(x, lam).win for x in xs]
    ib = max(range(CURVE_POINTS), key=curve.__getitem__)
    a = xs[ib - 1] if ib > 0 else 0.0
    b = xs[ib + 1] if ib + 1 < CURVE_POINTS else 1.0 - 1e-12
    gr = (math.sqrt(5.0) - 1.0) / 2.0
    c, d = b - gr * (b - a), a + gr * (b - a)
    fc, fd = clock_rule(c, lam).win, clock_rule(d, lam).win
    for _ in range(60):
        if b - a < 1e-10:
            break
        if fc >= fd:
            b, d, fd = d, c, fc
            c = b - gr * (b - a)
            fc = clock_rule(c, lam).win
        else:
            a, c, fc = c, d, fd
            d = a + gr * (b - a)
            fd = clock_rule(d, lam).win
    x = 0.5 * (a + b)
    best = clock_rule(x, lam)
    if curve[ib] > best.win:
        x, best = xs[ib], clock_rule(xs[ib], lam)
    return x, best, curve


def _compare(s: Scenario, pool: WindowPool, rule: CompareRule, i: int) -> RuleResult:
    lam = pool.mean_size
    if rule.kind == "start_share":
        x = rule.value
        v = clock_rule(x, lam)
        when = _clock(pool, x * pool.window)
        return _result(f"start at {x:.4g} of the window", f"After {when}, make an offer to "
                       "the first candidate better than everyone before.",
                       {"start_share": x}, v.win, v.none, v.interviews)
    if rule.kind in ("skip", "skip_share"):
        if rule.kind == "skip":
            r = int(rule.value)
            name = f"skip {r:,}"
            desc_head = f"Pass on the first {r:,}"
            raw: dict[str, Any] = {"skip": r}
        else:
            r = int(math.floor(rule.value * lam))
            name = f"skip {rule.value * 100:.4g}%"
            desc_head = (f"Pass on the first {rule.value * 100:.4g}% of the expected "
                         f"{lam:,.4g} arrivals (the first {r:,})")
            raw = {"skip_share": rule.value}
        v = skip_rule(r, lam)
        desc = ("Make an offer to the first candidate." if r == 0 else
                desc_head + ", then make an offer to the first candidate better than "
                "everyone before.")
        return _result(name, desc, raw, v.win, v.none, v.interviews)
    raise ScenarioError(f"compare.{i}.{rule.kind}", "this rule needs scores; with a time "
                        "window use start_share, skip or skip_share")


def _table_range(rv: RuleValue, lam: float) -> tuple[int, int]:
    k_lo, k_hi = rv.band
    k_hi = max(k_hi, k_lo)
    if lam <= 3000:
        k_lo = 1
        while k_hi < 2000 and threshold(k_hi) < lam:
            k_hi += 1
    return k_lo, k_hi


def solve_window(s: Scenario) -> SolveResult:
    """Optimal rule and exact performance for a time-window pool (module docstring)."""
    pool = _check_supported(s)
    _start(pool)
    lam = pool.mean_size
    T, L = pool.window, pool.arrivals_per_unit
    compare = [_compare(s, pool, c, i) for i, c in enumerate(s.compare)]
    rv = rule_value(0, lam)
    k_lo, k_hi = _table_range(rv, lam)
    table = {str(k): threshold_time(k, pool) for k in range(k_lo, k_hi + 1)}
    x_best, clock_best, curve_vals = _best_clock(lam)
    xs = [i / CURVE_POINTS for i in range(CURVE_POINTS)]
    curve = Curve(skips=list(range(CURVE_POINTS)), success=curve_vals,
                  limit=[-x * math.log(x) if x > 0 else 0.0 for x in xs], complete=False)
    opt = _result("optimal", "", {"optimal": True}, rv.win, 1.0 - rv.hire, rv.interviews)

    always = threshold(1) >= lam
    if always:
        words = ("Make an offer to the first candidate who arrives: so few are expected "
                 f"(about {lam:.3g}) that waiting does not pay.")
    else:
        # the arrival number that is on pace when its own cutoff comes
        k_pace = None
        for k in range(max(1, k_lo), k_hi + 1):
            if threshold_time(k, pool) <= k / L:
                k_pace = k
                break
        examples = []
        if k_pace is not None:
            step = max(1, int(round(math.sqrt(lam) / 2)))
            for k in (k_pace - step, k_pace, k_pace + step):
                if k >= 1 and str(k) in table:
                    examples.append(f"the {_ordinal(k)} from {_clock(pool, table[str(k)])}")
        words = ("Make an offer to the first candidate who is better than everyone before "
                 "and arrives late enough for the number seen so far: the k-th arrival "
                 "qualifies once at most x_k more are expected (x_k is about 1.72 k; see the "
                 "time table)")
        words += (" — for example " + ", ".join(examples) + ". " if examples else ". ")
        words += (f"Simple version: after {_clock(pool, x_best * T)}, make an offer to the "
                  f"first candidate better than everyone before ({_pct(clock_best.win)} "
                  f"against {_pct(rv.win)} for the full rule).")
    policy = Policy(thresholds=[], groups=[], words=words, skip=None,
                    start_share=x_best, start_time=x_best * T, interval=True,
                    time_thresholds=table)
    opt.description = words
    notes = [
        "The optimal rule uses the clock and the count: the k-th arrival gets an offer if "
        "it is best so far and at most x_k more arrivals are expected (x_1 = "
        f"{threshold(1):.4f}, x_2 = {threshold(2):.4f}, x_k = 1.718 k + 0.089 for large k). "
        "policy.time_thresholds gives, for each arrival number k (keys), the earliest time "
        "in window units at which it gets an offer; arrival numbers above the last key get "
        "one at any time they are best so far"
        + (f", those below the first key only after {_clock(pool, table[str(k_lo)])}."
           if k_lo > 1 else "."),
        "policy.start_share / start_time: the best rule that looks at the clock only "
        f"(first best-so-far after share {x_best:.4f} of the window): {_pct(clock_best.win)}.",
        f"Expected arrivals: {lam:,.6g}. Chance of an empty window: {math.exp(-lam):.3g}.",
        "curve: skips[i] = i means the share i/1000 of the window (not a number of "
        "candidates); success is the exact chance of \"first best-so-far after that share\", "
        "limit is -x ln x (large expected counts).",
        "The rank of the hire is not computed for time windows (top, rank_distribution "
        "and expected_rank are null).",
    ]
    limits = [
        Limit("success_probability", 1.0 / math.e,
              "1/e as L*T grows: Cowan & Zabczyk 1978; Bruss 1984 (1/e-law)"),
        Limit("start_share", 1.0 / math.e, "first best-so-far after T/e: Bruss 1984"),
        Limit("threshold_ratio", _E1M, "x_k / k -> e - 1 as k grows (derived in "
              "seqpick.window)"),
    ]
    return SolveResult.from_rule(
        scenario=s.to_dict(), goal="best", policy=policy, optimal=opt, compare=compare,
        curve=curve, limits=limits, notes=notes,
        method="Poisson arrivals over a window: monotone-case thresholds x_k per arrival "
               "number (Cowan & Zabczyk 1978; Bruss 1987), exact value by summation by parts "
               "over the Poisson count, O(L*T)")


def _ordinal(k: int) -> str:
    suf = "th" if 10 <= k % 100 <= 20 else {1: "st", 2: "nd", 3: "rd"}.get(k % 10, "th")
    return f"{k:,}{suf}"


def advise_window(s: Scenario, state: SearchState) -> Advice:
    """Offer or pass for the newest arrival of a live window search.

    From the newest entry's time t, its relative rank and the number seen k:
    ``offer_value`` = S_k(mu), mu = L (T - t) (chance it stays best),
    ``pass_value`` = exact chance of winning by passing and continuing
    optimally from (t, k).  The decision follows the optimal rule
    (best so far and mu <= x_k), which is the same as offer_value >=
    pass_value (monotone case).  O(mu).
    """
    pool = _check_supported(s)
    k = state.stage
    newest = state.newest
    t = newest.time if newest.time is not None else 0.0
    mu = max(0.0, pool.arrivals_per_unit * (pool.window - t))
    best_so_far = newest.relative_rank == 1
    xk = threshold(k)
    active = mu <= xk
    offer_value = stay_best_chance(k, mu) if best_so_far else 0.0
    pass_value = rule_value(k, mu).win
    decision = "offer" if best_so_far and active else "pass"
    when = _clock(pool, t)
    more = f"about {mu:.3g} more expected"
    if not best_so_far:
        reason = (f"Ranked {newest.relative_rank} so far at {when}, so cannot be the best "
                  f"overall — pass ({_pct(pass_value)} chance of winning later).")
    elif decision == "offer":
        reason = (f"Best so far at {when} with {more}: offer — {_pct(offer_value)} if you "
                  f"offer now vs {_pct(pass_value)} if you wait.")
    else:
        reason = (f"Best so far at {when}, but with {more} it is too early for the "
                  f"{_ordinal(k)} arrival (offers from {_clock(pool, threshold_time(k, pool))}):"
                  f" pass — {_pct(offer_value)} if you offer now vs {_pct(pass_value)} if you "
                  "wait.")
    notes = [f"Offer to the {_ordinal(k)} arrival, if best so far, once at most {xk:.4g} "
             "more are expected."]
    return Advice(decision=decision, reason=reason, stage=k, openings_left=state.openings_left,
                  value_kind="success_probability", offer_value=offer_value,
                  pass_value=pass_value, threshold=1 if active else 0,
                  plan_decision=decision, notes=notes)
