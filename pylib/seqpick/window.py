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
  sum a^n/(n n!) = 1), and x_k >= x_1 > 1.5.

The triple and its two exact moves
----------------------------------
For n >= 1 and M ~ Poisson(mu) let

    s_n = E[1/(n+M)],  z_n = E[(H_{n+M-1} - H_{n-1})/(n+M)],  y_n = E[H_{n+M-1} - H_{n-1}],

so S_n = n s_n, V_n = n z_n (the chance that "offer to the next
best-so-far" wins with n seen) and g(n, mu) = n (s_n - z_n).  Two moves are
exact (derived here):

* count (fixed mu; Poisson identity E[M f(M)] = mu E[f(M+1)]):
  mu s_{n+1} = 1 - n s_n,  y_{n+1} = y_n - (1 - n s_n)/n,  mu z_{n+1} = y_{n+1} - n z_n;
* time (fixed n; M + D ~ Poisson(mu + delta) for D ~ Poisson(delta)):
  s_n(mu + delta) = sum_d pi_d s_{n+d},  z_n(mu + delta) = sum_d pi_d (z_{n+d} + h_d s_{n+d}),
  y_n(mu + delta) = sum_d pi_d (y_{n+d} + h_d),
  with pi_d = Poisson(d; delta) and h_d = H_{n+d-1} - H_{n-1}.

Thresholds by a chain of moves: from the triple at (k, x_k), count moves give
it at (k+1 .. k+24, x_k), and x_{k+1} = x_k + delta solves g(k+1, x_k + delta) = 0 by
Newton's method on the time move, which also gives the triple at
(k+1, x_{k+1}).  delta is about e - 1 < 1.75, so 23 Poisson terms leave out
less than 3e-18 of each sum.  An error in s or z of a carried triple is
multiplied by at most e^-delta (mu/(mu - delta))^n < 0.81 through the count
move and the Poisson weights together (negative binomial series), one in y by
1, so errors do not grow along a chain; they add up like a random walk over
its at most 384 steps.  The arrival numbers come in segments of 128 (of 384
from k = 16384 on), each started by one direct Poisson sum (tails below
1e-18) and a Newton solve from a point checked to lie below the root; a
segment is computed as far as needed and later extended with the same data,
so x_k depends on k only.  Every root
is accepted when its Newton step is below 2e-15 x_k; the values agree with
brentq on an independent scipy sum and with direct root finding to about
1e-15 relative (tests).

Exact performance of a threshold rule: activation sums
-------------------------------------------------------
Start from "k0 seen, mu0 expected to come, nobody hired" (k0 = 0, mu0 = L T
for the plan) and let X_i = min(x_i, mu0).  Once the count k and the
remaining mu satisfy mu <= x_{k+1}, the next arrival is active and so is every
later one (x increases with the count, mu decreases), so from that moment,
the *activation* with count k at remaining mu, the rule is "offer to the next
best-so-far", worth V_k(mu) = k z_k(mu) (psi(mu) = E[1/M; M >= 1] for k = 0),
with hire chance 1 - k s_k(mu) and expected interviews k (1 + y_k(mu)) (derived
here from the fixed-n chances of Gilbert & Mosteller 1966).  Activation
happens exactly once: with count k at the boundary mu = X_{k+1} (chance
Pois(k-k0; mu0 - X_{k+1})), or at the arrival that makes the count k while
X_k < mu <= X_{k+1} (density Pois(k-1-k0; mu0 - mu)).  Hence

    P(win) = sum_{k>=k0} Pois(k-k0; mu0 - X_{k+1}) V_k(X_{k+1})
             + sum_{k>k0} int_{X_k}^{X_{k+1}} Pois(k-1-k0; mu0 - mu) V_k(mu) dmu,

and the same with the hire and interview values.  The boundary value comes
from the triple at (k+1, x_{k+1}) by one count step back; in the integral,
mu = x_k + t and V_k(x_k + t) = sum_d Pois(d; t) F_d (time move), so it equals
sum_d J_d F_d with c = k-1-k0, alpha = mu0 - x_k, delta = X_{k+1} - x_k and

    J_d = int_0^delta Pois(c; alpha - t) Pois(d; t) dt
        = Pois(c+d+1; alpha) P(Bin(c+d+1, delta/alpha) >= d+1),

computed by the recurrence (integration by parts)

    alpha J_{d-1} = (c+1+d) J_d + (c+1) Pois(c+1; alpha - delta) Pois(d; delta)

run downwards, which adds positive terms only; it is
used when (c + 1 + d)/alpha <= 1.2, so that a start error grows by at most 1.2
per step; otherwise the binomial form (its tail summed from the end, all
terms positive).  Only activation counts whose chance can matter are summed:
activation with count <= k_a needs at most k_a - k0 new arrivals by
mu0 - X_{k_a+1}, with count >= k_b at least k_b - k0 by mu0 - X_{k_b}; Chernoff
bounds on these two Poisson tails (each below 1e-17, checked with the exact
thresholds) fix the band of counts, about 4 sqrt(mu0) wide.  Per count the
Poisson(t) terms stop where the rest is below 1e-20.

Error bound (win and hire, absolute; interviews, relative): left-out counts
below 2e-17, left-out Poisson terms below 1e-20 per count (at most ~1300
counts), direct-sum tails below 2e-18; the rest is rounding: the triples
carry a relative error of about 1e-15, each per-count sum has at most 25
positive terms, so the total is below 1e-14.  Measured: within 1e-15 of a
40-digit evaluation of the same sums; the win chance within 1e-15 of the
summation over the total count n used before (whose hire chance was off by
up to 3e-14).  The tests check against an independent order-statistics
formula (1e-12), the continuous-time DP and simulation.

Clock-only rules
----------------
"First best-so-far after share x of the window" wins with chance
x E[L_{M-1}(1-x)] + e^{-x Lambda} psi((1-x) Lambda), L_j(q) = sum_{n<=j} q^n/n
(the max quality seen before time xT has P(1 - U > v) = e^{-x Lambda v}).  With
the generating function sum_n t^n P(M <= n) = e^{-Lambda (1-t)}/(1-t) the series
integrates in closed form, E[L_{M-1}(q)] = Ein(Lambda) - Ein(x Lambda)
- e^{-x Lambda} psi((1-x) Lambda), so (derived here)

    P(win) = x (Ein(Lambda) - Ein(x Lambda)) + (1 - x) e^{-x Lambda} psi((1-x) Lambda),
    P(no hire) = x + (1 - x) e^{-Lambda},
    E[interviews] = x Lambda (1 + Ein(Lambda) - Ein(x Lambda))
                    + e^{-x Lambda} (1 - e^{-(1-x) Lambda}),

with Ein(z) = int_0^z (1-e^-s)/s ds = gamma + ln z + E1(z).  The first tends to
-x ln x as Lambda grows; the psi term is left out when below 1e-22.

The curve (``SolveResult.curve``) lists this exact chance for x = i/1000,
i = 0..999: ``skips[i] = i`` means the share i/1000 (not a number of
candidates), ``limit`` is -x ln x.  psi is needed on the grid only while
x Lambda < 51, and comes from the time move
psi(b + h) = e^-h psi(b) + sum_{d>=1} Pois(d; h) E[1/(d + M)], M ~ Poisson(b).

Complexity: per arrival number O(1) (a count move of 23 steps and usually
one time move of 23 terms), plus one direct sum of about 18 sqrt(x_k) terms
per segment (128 arrival numbers, 384 from k = 16384 on); a solve covers the
band, about 4 sqrt(L T) arrival numbers (all of 1 .. 0.58 L T for the time
table when L T <= 3000), so it is O(sqrt(L T)) moves plus at most about
L T / 2 direct terms (O(L T), but C-level sums: about a third of a solve at
L T = 9e4 with an empty cache), and the curve O(1) per point plus
O(sqrt(L T)).  Memory O(band).  Advice from a
state: the same sums, O(sqrt(mu0)).  Measured times:
build_scripts/bench_window_odds.py.

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
Chernoff, H. (1952). A measure of asymptotic efficiency for tests of a
hypothesis based on the sum of observations. *Ann. Math. Statist.* 23,
493-507 (the tail bounds for the Poisson and binomial windows and the band).
Loader, C. (2000). Fast and accurate computation of binomial probabilities
(the saddle-point form used by ``dpois``/``dbinom``).
Abramowitz, M. & Stegun, I. A. (1964). *Handbook of Mathematical Functions*,
5.1.11 and 5.1.22 (E1), 6.3.18 (harmonic numbers).
"""

from __future__ import annotations

import datetime as _dt
import math
from bisect import bisect_left
from dataclasses import dataclass
from functools import lru_cache
from itertools import accumulate, repeat
from math import fsum
from operator import add, mul, sub, truediv
from typing import Any

from .advise import Advice, SearchState
from .errors import ScenarioError
from .harmonic import tail
from .prior import _bd0, _stirlerr  # Loader (2000) saddle-point pieces, shared
from .results import (Curve, Limit, Outcome, Policy, RuleResult, SolveResult)
from .scenario import CompareRule, Scenario, WindowPool

__all__ = ["solve_window", "advise_window", "threshold", "threshold_time",
           "stay_best_chance", "rule_value", "clock_rule", "skip_rule", "XSTAR",
           "MONTH_DAYS", "CURVE_POINTS"]

#: A month, for ``pool.unit = "month"``: 30.4375 days (365.25 / 12).
MONTH_DAYS = 30.4375
CURVE_POINTS = 1000
_TAIL = 1e-18
_E1M = math.e - 1.0
_UNIT_SECONDS = {"minute": 60.0, "hour": 3600.0, "day": 86400.0, "week": 604800.0,
                 "month": MONTH_DAYS * 86400.0}
_MONTHS = ("January", "February", "March", "April", "May", "June", "July", "August",
           "September", "October", "November", "December")

EULER_GAMMA = 0.57721566490153286060651209008240243
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
# harmonic tails
# --------------------------------------------------------------------------

def _hdiff(a: int, b: int) -> float:
    """H_b - H_a for integers a, b >= 0 (either order), full precision.  O(1)."""
    if b >= a:
        return tail(a + 1, b)
    return -tail(b + 1, a)


def _tails(n: int, lo: int, count: int) -> list[float]:
    """H_{n+m-1} - H_{n-1} for m = lo .. lo+count-1 (n >= 1).

    Running sums of 1/j, restarted from :func:`seqpick.harmonic.tail` every
    256 terms, so each value has relative error below 256 units in the last
    place (about 3e-14; typically 1e-15).  O(count).
    """
    out: list[float] = []
    for first in range(0, count, 256):
        m = lo + first
        part = min(256, count - first)
        out.extend(accumulate(map(truediv, repeat(1.0), range(n + m, n + m + part - 1)),
                              initial=tail(n, n + m - 1)))
    return out


# --------------------------------------------------------------------------
# the triple (s, z, y) and its two exact moves
# --------------------------------------------------------------------------

#: Poisson(delta) terms kept in a time move: the rest is below 3e-18 for delta <= 1.75
#: (every chain step) and below 5e-17 for delta <= 2 (segment starts).
_D = 22
#: Tails of the Poisson windows of the direct sums.
_DIRECT_TAIL = 1e-18


def _direct_triple(n: int, mu: float) -> tuple[float, float, float]:
    """(s_n, z_n, y_n) at mu by direct summation over the Poisson(mu) window.

    s_n = E[1/(n+M)], z_n = E[(H_{n+M-1} - H_{n-1})/(n+M)],
    y_n = E[H_{n+M-1} - H_{n-1}], M ~ Poisson(mu), n >= 1 (module docstring).
    Left-out Poisson tails below 2e-18 (each term is at most 1 + ln(1 + M/n)); the
    weights are normalised to sum 1 at the end.  O(sqrt(mu)).
    """
    if mu <= 0.0:
        return 1.0 / n, 0.0, 0.0
    a_lo, a_hi = chernoff_halfwidths(mu, _DIRECT_TAIL)
    lo = max(0, int(math.ceil(mu - a_lo)))
    hi = int(math.floor(mu + a_hi)) + 1
    mode = min(max(int(mu), lo), hi)
    p0 = dpois(mode, mu)
    p = list(accumulate(map(truediv, range(mode, lo, -1), repeat(mu)), mul, initial=p0))
    p.reverse()
    p.pop()
    p.extend(accumulate(map(truediv, repeat(mu), range(mode + 1, hi + 1)), mul, initial=p0))
    cnt = len(p)
    t = _tails(n, lo, cnt)
    pinv = list(map(truediv, p, range(n + lo, n + lo + cnt)))
    norm = 1.0 / fsum(p)
    return (fsum(pinv) * norm, fsum(map(mul, pinv, t)) * norm, fsum(map(mul, p, t)) * norm)


def _g_direct(k: int, mu: float) -> tuple[float, float]:
    """(g(k, mu), d g / d mu) by direct summation; the fallback root finder's
    evaluation (d/dmu E[c(M)] = E[c(M+1) - c(M)]).  O(sqrt(mu))."""
    lo, p = pois_window(mu, _DIRECT_TAIL)
    cnt = len(p)
    t = _tails(k, lo, cnt + 1)
    c = list(map(mul, map(truediv, repeat(float(k)), range(k + lo, k + lo + cnt + 1)),
                 map(sub, repeat(1.0), t)))
    val = fsum(map(mul, p, c))
    return val, fsum(map(mul, p, c[1:])) - val


def _forward_uv(n: int, mu: float, s: float, z: float, y: float,
                steps: int) -> tuple[list[float], list[float], list[float]]:
    """The count move, in the form the time move uses: s_{n+d}, z_{n+d} + h_d s_{n+d}
    and y_{n+d} + h_d for d = 0 .. steps at a fixed mu > 0, h_d = H_{n+d-1} - H_{n-1}.

    mu s_{j+1} = 1 - j s_j,  y_{j+1} = y_j - (1 - j s_j)/j,
    mu z_{j+1} = y_{j+1} - j z_j  (Poisson identity E[M f(M)] = mu E[f(M+1)]).
    An error in the start values reaches n + d multiplied by prod_{j=n}^{n+d-1} (j/mu)
    (large where n + d > mu), but the time move weighs the value at n + d by
    Poisson(d; delta), and sum_d Poisson(d; delta) prod_{j=n}^{n+d-1} (j/mu)
    = e^-delta (mu/(mu-delta))^n (negative binomial series), below 0.81 for every
    chain and value move made here (mu = x_n, delta = x_{n+1} - x_n) and below 0.92
    at the segment starts (checked for n < 3000 and 30000 <= n < 34000; it tends to
    e^(2-e) = 0.49 for large n).  That is for s and z; an error in y is carried
    with weight 1 (y_{j+1} - y_j depends on s only).  O(steps).
    """
    ss = [s]
    us = [z]
    vs = [y]
    sa, ua, va = ss.append, us.append, vs.append
    imu = 1.0 / mu
    h = 0.0
    for j in range(n, n + steps):
        iv = 1.0 / j
        r = 1.0 - j * s
        s = r * imu
        y -= r * iv
        z = (y - j * z) * imu
        h += iv
        sa(s)
        ua(z + h * s)
        va(y + h)
    return ss, us, vs


def _pd(delta: float, count: int) -> list[float]:
    """Poisson(delta) probabilities of 0 .. count (delta <= 2, no underflow).  O(count)."""
    return list(accumulate(map(truediv, repeat(delta), range(1, count + 1)), mul,
                           initial=math.exp(-delta)))


def _root_move(k: int, mu: float, s: float, z: float, y: float, off: int, delta: float,
               slope: float | None = None) -> tuple | None:
    """x_b and the triple at (b, x_b) for b = k + off (off 0 or 1), from the
    triple at (k, mu) with mu < x_b, by Newton's method on the time move
    delta = x_b - mu starting from the guess ``delta``.

    With pi = Poisson(delta) and the base-b lists S_d = s_{b+d},
    U_d = z_{b+d} + h_d s_{b+d}, V_d = y_{b+d} + h_d (h_d = H_{b+d-1} - H_{b-1},
    from :func:`_forward_uv`), the time move gives the triple
    (sum pi S, sum pi U, sum pi V) at (b, mu + delta), so
    g(b, mu + delta) / b = sum_d pi_d (S_d - U_d) comes with it, and its delta-derivative
    is sum_d pi_d ((S-U)_{d+1} - (S-U)_d).  An iterate is accepted when the
    Newton step from it is below 2e-15 x_b (its error is then below that: the
    slope changes by a relative O(step/x_b) over the step).  ``slope`` (the
    previous root's, for b >= 64, where consecutive slopes differ by a few per
    cent) saves the derivative when the guess is accepted at once: then the
    accepted |g / slope| is at most half the tolerance; otherwise the exact
    slope is used.  Returns (x_b, s, z, y, Newton step, slope, S, U, V, pi)
    (the last four, the base-b lists at mu and the final Poisson(delta)
    weights, are reused by :func:`_value_terms`), or None if the iteration
    leaves 0 < delta <= 2 (the caller then falls back to direct root finding).
    O(1) time moves of _D terms each.
    """
    if off:
        r = 1.0 - k * s
        s = r / mu
        y -= r / k
        z = (y - k * z) / mu
    b = k + off
    ss, us, vs = _forward_uv(b, mu, s, z, y, _D + 1)
    for _ in range(40):
        if not 0.0 < delta <= 2.0:
            return None
        tol = 2e-15 * (mu + delta)
        p = _pd(delta, _D)
        a1 = fsum(map(mul, p, ss))
        au = fsum(map(mul, p, us))
        gval = a1 - au
        if slope is not None and abs(gval) <= 0.5 * tol * -slope:
            break
        slope = fsum(map(mul, p, ss[1:])) - fsum(map(mul, p, us[1:])) - gval
        if not slope < 0.0:
            return None
        step = -gval / slope
        if abs(step) <= tol:
            break
        delta += step
    else:
        return None
    return (mu + delta, a1, au, fsum(map(mul, p, vs)), -gval / slope, slope, ss, us, vs, p)


def _direct_root(k: int) -> float:
    """x_k by safeguarded Newton on direct evaluations of g (bisection inside a
    sign-change bracket [1.5, (e-1) k + 1], widened if needed).  The fallback of
    the chain and an independent check in the tests.  O(sqrt(k)) per step."""
    lo, hi = 1.5, _E1M * k + 1.0
    while _g_direct(k, hi)[0] >= 0.0:
        lo, hi = hi, hi * 1.5
    x = 0.5 * (lo + hi) if k < 4 else _E1M * k + 0.09
    for _ in range(200):
        val, slope = _g_direct(k, x)
        if val > 0.0:
            lo = x
        elif val < 0.0:
            hi = x
        else:
            return x
        nx = x - val / slope if slope < 0.0 else 0.5 * (lo + hi)
        if not lo < nx < hi:
            nx = 0.5 * (lo + hi)
        if abs(nx - x) <= 2e-15 * x or hi - lo <= 4e-16 * x:
            return nx
        x = nx
    return x


# --------------------------------------------------------------------------
# the thresholds x_k: chains of exact moves, in fixed segments
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

#: Arrival numbers per chain segment (each starts from a direct sum of about
#: 18 sqrt(x_k) terms): 128 below _SEG_SWITCH, then 384 (the best length grows
#: like sqrt(k): a longer segment costs fewer starts, a shorter one less waste).
_SEG = 128
_SEG_SWITCH = 16384
_SEG_LONG = 384


def _seg_of(k: int) -> int:
    """The segment holding arrival number k."""
    if k < _SEG_SWITCH:
        return k // _SEG
    return _SEG_SWITCH // _SEG + (k - _SEG_SWITCH) // _SEG_LONG


def _seg_range(j: int) -> tuple[int, int]:
    """First and last arrival number of segment j."""
    if j < _SEG_SWITCH // _SEG:
        return max(1, j * _SEG), (j + 1) * _SEG - 1
    a = _SEG_SWITCH + (j - _SEG_SWITCH // _SEG) * _SEG_LONG
    return a, a + _SEG_LONG - 1
#: k -> (x_k, s_k, z_k, y_k): the threshold and the triple at (k, x_k).
_STATES: dict[int, tuple[float, float, float, float]] = {}
_STATES_MAX = 60_000              # about 15 MB; a solve needs at most a few thousand


def _segment_start(a: int) -> tuple[float, float, float, float, float]:
    """x_a and its triple: one direct sum at mu_b below x_a (checked: g > 0
    there, so mu_b < x_a by the single sign change), then the root by time
    moves; direct root finding if that fails.  (x, s, z, y, Newton step)."""
    mu_b = 1.5 if a == 1 else _E1M * a - 0.42
    s, z, y = _direct_triple(a, mu_b)
    if s - z > 0.0:
        out = _root_move(a, mu_b, s, z, y, 0, _E1M * a + (0.41 if a == 1 else 0.09) - mu_b)
        if out is not None:
            return out[:5]
    x = _direct_root(a)
    return (x,) + _direct_triple(a, x) + (0.0,)


#: segment j -> (last k computed, last four Newton-refined roots, carried slope)
_CHAINS: dict[int, tuple[int, list[float], float | None]] = {}


def _segment(j: int, upto: int, visit=None) -> None:
    """Extend segment j of _STATES through k = upto (at most its last k).

    Segment j covers :func:`_seg_range` (j): a chain of root moves
    from the segment start, each guessed by extrapolating the last
    Newton-refined differences (quadratic in the differences below k = 1024,
    guess error O(k^-6); linear above, error O(k^-4), which amplifies the
    rounding of the values less), so one Newton evaluation usually accepts it.
    A chain is extended from where it stopped with the same data, so every
    value is the same however far and in what order it was asked for.
    ``visit(k, step_result)`` is called after each root move from k (for the
    value sums of :func:`rule_value`, which reuse its lists).
    """
    a, last = _seg_range(j)
    upto = min(upto, last)
    chain = _CHAINS.get(j)
    if chain is None or a not in _STATES:
        x, s, z, y, step = _segment_start(a)
        _STATES[a] = (x, s, z, y)
        chain = (a, [x + step], None)
    k, xs, slope = chain
    if k >= upto:
        return
    x, s, z, y = _STATES[k]
    for k in range(k, upto):
        if len(xs) >= 4 and k < 1024:
            guess = 3.0 * (xs[-1] - xs[-2]) - 3.0 * (xs[-2] - xs[-3]) + xs[-3] - xs[-4]
        elif len(xs) >= 3:
            guess = 2.0 * (xs[-1] - xs[-2]) - (xs[-2] - xs[-3])
        elif len(xs) == 2:
            guess = xs[-1] - xs[-2]
        else:
            guess = _E1M if k > 1 else 1.57
        guess += xs[-1] - x
        nxt = _root_move(k, x, s, z, y, 1, guess, slope if k >= 64 else None)
        if nxt is None:
            x, s, z, y, step = _segment_start(k + 1)
            slope = None
        else:
            x, s, z, y, step, slope = nxt[:6]
        _STATES[k + 1] = (x, s, z, y)
        if visit is not None and nxt is not None:
            visit(k, nxt)
        xs.append(x + step)
        if len(xs) > 4:
            del xs[0]
    _CHAINS[j] = (upto, xs, slope)


def _ensure(k1: int, k2: int, visit=None) -> None:
    """Make sure _STATES holds every k in [k1, k2] (k1 >= 1); the caches are
    emptied first if they would grow beyond _STATES_MAX entries.  ``visit``:
    see :func:`_segment`."""
    if len(_STATES) + (k2 - k1 + 2 * _SEG_LONG) > _STATES_MAX:
        _STATES.clear()
        _CHAINS.clear()
    for j in range(_seg_of(k1), _seg_of(k2) + 1):
        if min(k2, _seg_range(j)[1]) not in _STATES:
            _segment(j, k2, visit)


def _clear_caches() -> None:
    """Forget every cached threshold and triple (for benchmarks and tests)."""
    _STATES.clear()
    _CHAINS.clear()
    _PSI_X1.clear()


def _state(k: int) -> tuple[float, float, float, float]:
    st = _STATES.get(k)
    if st is None:
        _ensure(k, k)
        st = _STATES[k]
    return st


def threshold(k: int) -> float:
    """x_k: offer to the k-th arrival, if best so far, iff mu = L (T - t) <= x_k.

    The root of g(k, mu) = 0 (module docstring); x_k depends on k only.  The
    values come in segments of 128 arrival numbers (384 from k = 16384 on): the
    first root from one
    direct sum, each next one x_{k+1} = x_k + delta by Newton's method on exact
    time moves of the triple at (k, x_k) (no interpolation).  Every root is
    accepted when the Newton step is below 2e-15 x_k; with the rounding of the
    sums (the triple is carried with relative error about 1e-15, and the moves
    contract it) x_k is within 1e-14 x_k of the exact root (tested against
    brentq and direct root finding).  A segment is the same whatever asked
    for it, so every caller gets identical values.  O(1) per value after the
    segment start, which is O(sqrt(k)); results are cached.
    """
    if k < 1:
        raise ValueError("threshold(k) needs k >= 1")
    return _state(k)[0]


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
    band: tuple[int, int]      # arrival numbers whose cutoff can matter (to 1e-17)
    full_from: int             # from this index on every arrival is active (to 1e-17)


#: Each left-out side of the band of activation counts has chance below this.
_BAND_TAIL = 1e-17


def _log_pois_le(m: int, lam: float) -> float:
    """Chernoff: log of a bound on P(Poisson(lam) <= m) (0 if m >= lam)."""
    if m >= lam:
        return 0.0
    if m < 0:
        return -math.inf
    if m == 0:
        return -lam
    return -lam + m + m * math.log(lam / m)


def _log_pois_ge(m: int, lam: float) -> float:
    """Chernoff: log of a bound on P(Poisson(lam) >= m) (0 if m <= lam)."""
    if m <= lam:
        return 0.0
    if lam <= 0.0:
        return -math.inf
    return -lam + m - m * math.log(m / lam)


def _binom_upper(m: int, n: int, q: float) -> float:
    """P(Bin(n, q) >= m), summing the smaller tail from its accurate end term
    (terms fall at least geometrically away from the mode).  O(sqrt(n q))."""
    if m <= 0:
        return 1.0
    if m > n or q <= 0.0:
        return 0.0
    if q >= 1.0:
        return 1.0
    c = q / (1.0 - q)
    if m >= (n + 1) * q:
        t = dbinom(m, n, q)
        tot = 0.0
        j = m
        while t > 0.0:
            tot += t
            if j >= n or t <= 1e-20 * tot:
                break
            t *= (n - j) * c / (j + 1)
            j += 1
        return min(1.0, tot)
    t = dbinom(m - 1, n, q)
    tot = 0.0
    j = m - 1
    while t > 0.0:
        tot += t
        if j <= 0 or t <= 1e-20 * tot:
            break
        t *= j / ((n - j + 1) * c)
        j -= 1
    return max(0.0, 1.0 - tot)


_PSI_X1: list[float] = []


def _dtail_table(delta: float, count: int) -> list[float]:
    """log of sum_{d > D} P(Poisson(delta) >= d+1) for D = 0 .. count (upper
    bounds for every smaller delta)."""
    p = [math.exp(-delta)]
    for d in range(1, count + 60):
        p.append(p[-1] * delta / d)
    ge = list(accumulate(reversed(p)))[::-1]          # ge[j] = P(X >= j)
    out = []
    for big_d in range(count + 1):
        out.append(math.log(fsum(ge[big_d + 2:]) * (1.0 + 1e-9)))
    return out


#: Time moves span delta < e - 1 < 1.75; terms past D add at most e^_DTAIL[D] times
#: the largest Poisson weight of the move (see rule_value).
_DTAIL = _dtail_table(1.75, _D)
_DTAIL_NEG = [-v for v in _DTAIL]          # increasing, for bisect
#: Left-out terms per activation count below e^_LOG_TERM_TAIL.
_LOG_TERM_TAIL = math.log(1e-20)


def _first_value(k: int, mu: float) -> tuple[float, float, float]:
    """(win, hire, interviews) of "offer to the next best-so-far" with k seen and
    mu expected: V_k = k z_k, 1 - k s_k, k (1 + y_k); for k = 0 the first
    arrival: psi(mu), 1 - e^-mu twice.  O(sqrt(mu))."""
    if k == 0:
        h = -math.expm1(-mu)
        return _psi(mu), h, h
    s, z, y = _direct_triple(k, mu)
    return k * z, 1.0 - k * s, k * (1.0 + y)


def _band(k0: int, mu0: float) -> tuple[int, int]:
    """Activation counts k0+1 .. k_hi outside which the chance is negligible.

    Activation with count k needs at most k - k0 new arrivals by the time mu0 - X_{k+1}
    and at least k - k0 by mu0 - X_k (X_i = min(x_i, mu0)), so counts below k_lo and
    above k_hi have chance below the Chernoff bounds checked here (each
    <= _BAND_TAIL).  The search uses (e-1) k + 0.09 for x_k and a 10 times
    smaller tail; the final ends are then checked with the exact thresholds.
    """
    big = math.log(_BAND_TAIL)
    approx = lambda i: min(mu0, _E1M * i + 0.09)           # noqa: E731
    exact = lambda i: min(mu0, threshold(i))               # noqa: E731

    def low_ok(ka: int, xf) -> bool:   # P(count <= ka) small
        return _log_pois_le(ka - k0, mu0 - xf(ka + 1)) <= lim

    def high_ok(kb: int, xf) -> bool:  # P(count >= kb) small
        return _log_pois_ge(kb - k0, mu0 - xf(kb)) <= lim

    top = k0 + 2 + int((mu0 + 1.0) / _E1M)     # beyond the clip point of approx
    lim = big - math.log(10.0)
    # largest ka in [k0, top] with low_ok (true-then-false); k0 - 1 if none
    if not low_ok(k0, approx):
        ka = k0 - 1
    else:
        a, b = k0, top
        while b - a > 1:
            mid = (a + b) // 2
            if low_ok(mid, approx):
                a = mid
            else:
                b = mid
        ka = a
    # smallest kb in [k0 + 1, top] with high_ok (false-then-true)
    a, b = k0, top
    while b - a > 1:
        mid = (a + b) // 2
        if high_ok(mid, approx):
            b = mid
        else:
            a = mid
    kb = b
    lim = big
    while ka >= k0 and not low_ok(ka, exact):
        ka -= 1
    while not high_ok(kb, exact):
        kb += 1
    return max(k0 + 1, ka + 1), kb - 1


def _value_terms(k: int, k0: int, mu0: float, xk: float, s: float, z: float, y: float,
                 move: tuple | None) -> tuple[float, float, float]:
    """(win, hire, interviews) contributions of activation with count k (module
    docstring: the boundary term at x_{k+1} and the integral over [x_k, X_{k+1}]).

    ``move``: the root move from k that made x_{k+1} (its base-(k+1) lists at
    x_k and Poisson weights are reused), or None (count move from the triple).
    Poisson(t) terms beyond nd are left out when below 1e-20 in all.  O(nd).
    """
    c = k - 1 - k0
    alpha = mu0 - xk
    xn, s1, z1, y1 = _STATES[k + 1]
    clipped = xn >= mu0
    delta = alpha if clipped else xn - xk
    p0 = dpois(c + 1, alpha)
    if p0 <= 0.0:
        return 0.0, 0.0, 0.0
    # terms d > nd: below e^delta Pois(c; alpha) e^_DTAIL[nd] (module docstring)
    nd = min(_D, bisect_left(_DTAIL_NEG, math.log(p0 * (c + 1) / alpha) + delta
                             - _LOG_TERM_TAIL))
    # J_d = int_0^delta Pois(c; alpha - t) Pois(d; t) dt, d = 0 .. nd
    pb = 0.0
    if clipped:                                          # J_d = Pois(c+d+1; alpha)
        jw = list(accumulate(map(truediv, repeat(alpha), range(c + 2, c + nd + 2)), mul,
                             initial=p0))
    else:
        q = delta / alpha
        lq = math.log1p(-q)
        pb = p0 * math.exp(delta + (c + 1) * lq)          # Pois(c+1; alpha - delta)
        top = nd + 4
        if c + 1 + top <= 1.2 * alpha:
            # backward: alpha J_{d-1} = (c+1+d) J_d + (c+1) Pois(c+1; alpha-delta) Pois(d; delta)
            if move is not None:
                pd = move[9]
                if len(pd) <= top:
                    pd = list(pd)
                    while len(pd) <= top:
                        pd.append(pd[-1] * delta / len(pd))
            else:
                pd = _pd(delta, top)
            cpb = (c + 1) * pb
            jd = 0.0
            jw = [0.0] * (nd + 1)
            for d in range(top, 0, -1):
                jd = ((c + 1 + d) * jd + cpb * pd[d]) / alpha
                if d <= nd + 1:
                    jw[d - 1] = jd
        else:
            # J_d = Pois(c+d+1; alpha) T_d, T_d = P(Bin(c+d+1, q) >= d+1)
            pj = list(accumulate(map(truediv, repeat(alpha), range(c + 2, c + nd + 2)), mul,
                                 initial=p0))
            dt = nd + 30
            b = list(accumulate(map(mul, repeat(q), map(truediv, range(c + 1, c + dt + 1),
                                                          range(1, dt + 1))),
                                mul, initial=math.exp(c * lq)))
            nt = c + dt + 1
            if (dt + 1) * math.log(math.e * nt * q / (dt + 1)) < -50.0:
                t_end = 0.0          # Chernoff: P(Bin(nt, q) >= dt+1) < e^-50
            else:
                t_end = _binom_upper(dt + 1, nt, q)
            suf = list(accumulate(reversed(b[1:]), initial=0.0))
            suf.reverse()            # suf[d] = sum_{d' = d+1}^{dt} b_d'
            omq = 1.0 - q
            jw = list(map(mul, pj, map(add, repeat(t_end), map(mul, repeat(omq), suf))))
    # sums of at most 25 positive terms: relative error below 3e-15 each
    sj = sum(jw)
    if move is None:
        ss, us, vs = _forward_uv(k, xk, s, z, y, nd)
        js = sum(map(mul, jw, ss))
        ju = sum(map(mul, jw, us))
        jv = sum(map(mul, jw, vs))
    else:
        # base-k values from the base-(k+1) lists: S_d = S'_{d-1}, U_d = U'_{d-1} + S'_{d-1}/k,
        # V_d = V'_{d-1} + 1/k (d >= 1), and (s, z, y) at d = 0
        ss, us, vs = move[6], move[7], move[8]
        j1 = jw[1:]
        js1 = sum(map(mul, j1, ss))
        js = jw[0] * s + js1
        ju = jw[0] * z + sum(map(mul, j1, us)) + js1 / k
        jv = jw[0] * y + sum(map(mul, j1, vs)) + (sj - jw[0]) / k
    win = k * ju
    hire = sj - k * js
    ints = k * (sj + jv)
    if pb > 0.0:
        # activation at the boundary mu = x_{k+1} with count k: Pois(c+1; alpha-delta)
        stay = 1.0 - xn * s1
        win += pb * (y1 - xn * z1)
        hire += pb * (1.0 - stay)
        ints += pb * k * (1.0 + y1 + (1.0 - stay) / k)
    return win, hire, ints


def rule_value(k0: int, mu0: float) -> RuleValue:
    """Exact chance of winning, of hiring, and expected interviews (counting the
    k0 already seen) of the optimal rule from "k0 seen, mu0 expected to come,
    nobody hired, the k0-th not taken".  See the module docstring (activation
    sums).  O(sqrt(mu0)) time moves plus O(sqrt(mu0)) direct terms.
    """
    if mu0 <= 0.0:
        return RuleValue(0.0, 0.0, float(k0), (k0 + 1, k0 + 1), k0 + 1)
    win_t: list[float] = []
    hire_t: list[float] = []
    int_t: list[float] = []
    # activation at once (no arrival before mu0 - x_{k0+1}): chance e^-(mu0 - x_{k0+1});
    # x_k < (e-1) k + 0.5, so it is below e^-75 unless mu0 is smaller than this
    if mu0 < _E1M * (k0 + 1) + 75.5:
        x_first = threshold(k0 + 1)
        if x_first >= mu0:      # the next best-so-far gets an offer whatever its time
            w, h, i = _first_value(k0, mu0)
            return RuleValue(min(1.0, max(0.0, w)), min(1.0, max(0.0, h)), i,
                             (k0 + 1, k0 + 1), k0 + 1)
        wt = math.exp(-(mu0 - x_first))
        if k0 == 0:
            if not _PSI_X1:
                _PSI_X1.append(_psi(x_first))
            h = -math.expm1(-x_first)
            v, hh, ii = _PSI_X1[0], h, h
        else:
            _, s1, z1, y1 = _state(k0 + 1)
            stay = 1.0 - x_first * s1
            v, hh, ii = y1 - x_first * z1, 1.0 - stay, k0 * (1.0 + y1 + (1.0 - stay) / k0)
        win_t.append(wt * v)
        hire_t.append(wt * hh)
        int_t.append(wt * ii)
    k_lo, k_hi = _band(k0, mu0)
    terms: dict[int, tuple[float, float, float]] = {}

    def visit(k: int, move: tuple) -> None:      # value sums from a fresh chain step
        if k_lo <= k <= k_hi:
            xk, s, z, y = _STATES[k]
            if xk < mu0:
                terms[k] = _value_terms(k, k0, mu0, xk, s, z, y, move)

    _ensure(k_lo, k_hi + 1, visit)
    for k in range(k_lo, k_hi + 1):
        got = terms.get(k)
        if got is None:
            xk, s, z, y = _STATES[k]
            if xk >= mu0:
                break
            got = _value_terms(k, k0, mu0, xk, s, z, y, None)
        win_t.append(got[0])
        hire_t.append(got[1])
        int_t.append(got[2])
    win = min(1.0, max(0.0, fsum(win_t)))
    hire = min(1.0, max(0.0, fsum(hire_t)))
    return RuleValue(win, hire, fsum(int_t), (k_lo, k_hi + 1), k_hi + 1)


# --------------------------------------------------------------------------
# clock-only and skip rules (closed forms)
# --------------------------------------------------------------------------

def _psi(b: float) -> float:
    """psi(b) = E[1/M; M >= 1], M ~ Poisson(b): first arrival is the best.

    For b <= 30 the power series e^-b sum_{m>=1} b^m / (m m!) over its first
    b + 10 sqrt(b) + 30 terms (the rest is below 1e-30), else the Poisson window
    (tails below 1e-18 each).  O(sqrt(b)).
    """
    if b <= 0.0:
        return 0.0
    if b <= 30.0:
        top = int(b + 10.0 * math.sqrt(b) + 30.0)
        terms = accumulate(map(truediv, repeat(b), range(2, top + 1)), mul, initial=b)
        return math.exp(-b) * fsum(map(truediv, terms, range(1, top + 1)))
    lo, p = pois_window(b, _TAIL)
    m0 = max(lo, 1)
    return fsum(map(truediv, p[m0 - lo:], range(m0, lo + len(p))))


def _psi_grid(lam: float, count: int) -> list[float]:
    """psi(lam - i h) for i = 0 .. count-1, h = lam / CURVE_POINTS.

    From the smallest argument up by the exact time move
    psi(b + h) = e^-h psi(b) + sum_{d>=1} Poisson(d; h) s_d(b), with
    s_1 = (1 - e^-b)/b and b s_{d+1} = 1 - d s_d (s_d = E[1/(d + M)]; stable for
    d < b/2), Poisson(h) terms up to a tail below 1e-20; each step shrinks
    earlier errors by e^-h.  Direct sums where b < max(40, 2 d_max) or h > 50.
    O(count) after one direct sum.
    """
    h = lam / CURVE_POINTS
    out = [0.0] * count
    i = count - 1
    if h <= 50.0 and count > 1:
        pd = [math.exp(-h)]
        while pd[-1] > 1e-21 or len(pd) <= h + 1:
            pd.append(pd[-1] * h / len(pd))
        nd = len(pd) - 1
        floor_b = max(40.0, 2.0 * nd)
    else:
        floor_b = math.inf
    while i >= 0 and lam - i * h < floor_b:
        out[i] = _psi(lam - i * h)
        i -= 1
    if i < 0:
        return out
    out[i] = _psi(lam - i * h)
    eh = pd[0]
    while i > 0:
        b = lam - i * h
        sd = -math.expm1(-b) / b
        acc = pd[1] * sd
        for d in range(1, nd):
            sd = (1.0 - d * sd) / b
            acc += pd[d + 1] * sd
        out[i - 1] = eh * out[i] + acc
        i -= 1
    return out


@dataclass
class ClockValue:
    win: float
    none: float
    interviews: float


def _ein_diff(x: float, lam: float, ein_lam: float, e1_lam: float) -> float:
    """Ein(lam) - Ein(x lam) for 0 < x < 1 (= -ln x + E1(lam) - E1(x lam));
    E1(x lam) < 4e-24 is left out when x lam > 50.  O(1)."""
    a = x * lam
    if a > 50.0:
        return -math.log(x) + e1_lam
    if a > 1.0:
        return -math.log(x) + e1_lam - e1(a)
    return ein_lam - ein(a)


def _clock_win(x: float, lam: float, ein_lam: float, e1_lam: float) -> float:
    """P(win) of the clock rule: x (Ein(lam) - Ein(x lam)) + (1-x) e^{-x lam} psi((1-x) lam)
    (module docstring); the second term is left out when below 1e-22 (psi(b) <= min(1, 2/b))."""
    a = x * lam
    b = lam - a
    win = x * _ein_diff(x, lam, ein_lam, e1_lam) if x > 0.0 else 0.0
    ea = math.exp(-a)
    if ea * min(1.0, 2.0 / b if b > 0.0 else 1.0) > 1e-22:
        win += (1.0 - x) * ea * _psi(b)
    return min(1.0, max(0.0, win))


def clock_rule(x: float, lam: float) -> ClockValue:
    """Exact performance of "first best-so-far after share x of the window"
    with Lambda = L T expected arrivals (closed forms in the module docstring).
    O(1) unless x * Lambda < 52, then O(sqrt(Lambda))."""
    if not 0.0 <= x < 1.0:
        raise ValueError("share must be in [0, 1)")
    a = x * lam
    b = lam - a
    ein_lam = ein(lam)
    e1_lam = e1(lam) if lam > 0.0 else math.inf
    win = _clock_win(x, lam, ein_lam, e1_lam)
    none = x + (1.0 - x) * math.exp(-lam)
    if a <= 0.0:
        intv = -math.expm1(-lam)
    else:
        intv = a * (1.0 + _ein_diff(x, lam, ein_lam, e1_lam)) + math.exp(-a) * (-math.expm1(-b))
    return ClockValue(win, min(1.0, none), intv)


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
    refinement of the best grid point on the exact chance).  O(1) per point
    unless x L T < 52; O(sqrt(L T)) for those (at most 52000 / (L T) + 1 points)."""
    ein_lam = ein(lam)
    e1_lam = e1(lam)
    win = lambda x: _clock_win(x, lam, ein_lam, e1_lam)      # noqa: E731
    xs = [i / CURVE_POINTS for i in range(CURVE_POINTS)]
    # e^-a psi(b) <= min(1, 2/b) e^-a matters (> 1e-22) only while a = x lam < 51
    n_psi = min(CURVE_POINTS, int(51.0 * CURVE_POINTS / lam) + 1) if lam > 0.0 else 0
    psis = _psi_grid(lam, n_psi)
    curve = []
    for i, x in enumerate(xs):
        a = x * lam
        v = x * _ein_diff(x, lam, ein_lam, e1_lam) if i else 0.0
        if i < n_psi:
            v += (1.0 - x) * math.exp(-a) * psis[i]
        curve.append(min(1.0, max(0.0, v)))
    ib = max(range(CURVE_POINTS), key=curve.__getitem__)
    a = xs[ib - 1] if ib > 0 else 0.0
    b = xs[ib + 1] if ib + 1 < CURVE_POINTS else 1.0 - 1e-12
    gr = (math.sqrt(5.0) - 1.0) / 2.0
    c, d = b - gr * (b - a), a + gr * (b - a)
    fc, fd = win(c), win(d)
    for _ in range(60):
        if b - a < 1e-10:
            break
        if fc >= fd:
            b, d, fd = d, c, fc
            c = b - gr * (b - a)
            fc = win(c)
        else:
            a, c, fc = c, d, fd
            d = a + gr * (b - a)
            fd = win(d)
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
               "number (Cowan & Zabczyk 1978; Bruss 1987) by exact moves of Poisson "
               "expectations, exact value summed over the count at which the rule becomes "
               "active, O(sqrt(L*T)) moves")


def _ordinal(k: int) -> str:
    suf = "th" if 10 <= k % 100 <= 20 else {1: "st", 2: "nd", 3: "rd"}.get(k % 10, "th")
    return f"{k:,}{suf}"


def advise_window(s: Scenario, state: SearchState) -> Advice:
    """Offer or pass for the newest arrival of a live window search.

    From the newest entry's time t, its relative rank and the number seen k:
    ``offer_value`` = S_k(mu), mu = L (T - t) (chance it stays best),
    ``pass_value`` = exact chance of winning by passing and continuing
    optimally from (t, k) (:func:`rule_value`, activation sums).  The decision
    follows the optimal rule (best so far and mu <= x_k), which is the same as
    offer_value >= pass_value (monotone case).  O(sqrt(mu)) moves plus about
    mu / 2 direct terms (the segment starts of the thresholds in the band, cached).
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
