"""Exact optimal rules when each candidate's score comes from a known distribution.

Model ("full information")
--------------------------
N candidates (a fixed number) arrive one at a time; candidate i has score X_i,
independent draws from a known continuous distribution F
(:mod:`seqpick.distributions`).  After seeing a candidate you make an offer or
pass, for good.  An offer is accepted with chance p, independently (a
candidate who declines is gone: Smith 1975).  With ``must_hire`` the last
candidate is offered the job if nobody has been hired (a *forced* offer).

Everything about ranks depends only on the quantiles U_i = F(X_i), which are
uniform on (0, 1) whatever F is; so the rules below are computed in quantile
space and turned into the user's units with F^-1 at the end.

Goal ``best``: hire the overall best (Gilbert & Mosteller 1966, section 3)
-----------------------------------------------------------------------
Only a candidate better than everyone before can be the overall best.  Such a
candidate with quantile u, with k candidates still to come, is the overall
best with chance u^k.  With current maximum m and k to come, the rule "offer
to every later best-so-far" wins with chance

    R_k(m) = sum_{y=1}^{k} C(k,y) m^(k-y) (1-m)^y rho_y,
    rho_y  = p * prod_{t=2}^{y} (t - p)/t          (rho_y = 1/y when p = 1),

because y ~ Bin(k, 1-m) later candidates beat m, their records come in a
random order, and the search wins iff every record offered before the last
one declines and the last one accepts: E[(1-p)^(r-1) p] over the number r of
records of a random permutation of y, whose generating function is
prod_{t=1}^{y} (s + t - 1)/t.

*Decision numbers.*  Let b_k be the root of u^k = R_k(u), i.e. (z = 1/u - 1)

    sum_{y=1}^{k} C(k,y) z^y rho_y = 1.                                  (GM)

For p = 1 this is Gilbert & Mosteller's equation: with
sum_{y=1}^{k} C(k,y) z^y / y = sum_{j=1}^{k} ((1+z)^j - 1)/j (both sides
vanish at z = 0 and have the derivative ((1+z)^k - 1)/z), it reads

    sum_{j=1}^{k} (b^-j - 1)/j = 1.

Claim: the optimal rule offers to a best-so-far with quantile u at a stage
with k candidates to come iff u >= b_k (b_0 = 0).  Proof.  The left side of
(GM) increases in z and, term by term, in k; so b_k increases in k: the bars
fall over the stages.  (1) For m >= b_{k-1} the optimal value with maximum m
and k to come is R_k(m): by induction on k, a later record w > m >= b_{k-1}
meets w^(k') >= R_(k')(w) for its own k' <= k-1 (b_{k'} <= b_{k-1} <= w and
R_(k')(w)/w^(k') falls in w), so offering to it is optimal, which is the rule
that defines R_k.  (2) At a record u: offering is worth p u^k + (1-p) V,
passing V, with V the optimal value from maximum u; so offer iff u^k >= V.
If u >= b_k >= b_{k-1}, V = R_k(u) <= u^k by (1).  If u < b_k, V >= R_k(u)
> u^k since "offer to every later record" is one possible continuation.
(This is the one-stage look-ahead argument for a monotone problem: Chow,
Robbins & Siegmund 1971.)  b_k is found by Newton's method on (GM) in z,
started from the extrapolated k z_k (which tends to c = 0.80435..., the root
of int_0^c (e^t - 1)/t dt = 1); each evaluation sums the series up to the
binomial cut-off below (about 19 terms): O(1) per k, O(N) for all bars.

*Exact performance* of any rule "offer to a best-so-far with quantile >=
a_i at stage i" with non-increasing bars a_1 >= ... >= a_N (the optimal
rule and the skip rules, whose bars are 1 then 0).  Let tau be the first
stage j with M_j >= a_j (M_j the running maximum).  Because the bars fall,
tau > j-1 iff M_{j-1} < a_{j-1}, and after tau every record is offered
(its value exceeds M_tau >= a_tau >= later bars).  Either the record at tau
itself crosses its bar ("A": density min(u, a_{j-1})^(j-1) du for the
first offer at stage j with quantile u >= a_j), or the bar drops below the
current maximum m (M_{j-1} = m in [a_j, a_{j-1}), U_j < m: density
(j-1) m^(j-1) dm, "B"), after which the first offer goes to the first later
candidate above m.  Every quantity is then an expectation of a polynomial
in the beta basis C(K,y) u^(K-y) (1-u)^y (K = candidates after the stage),
and the integrals reduce to binomial tails by

    int_x^1 C(K,y) u^(K-y) (1-u)^y du = P(Bin(K+1, 1-x) >= y+1)/(K+1),
    int_c^d u^(j-1) C(K,y) u^(K-y) (1-u)^y du
        = C(K,y)/(N C(N-1,y)) [P(Bin(N,1-c) >= y+1) - P(Bin(N,1-d) >= y+1)]

(the total degree j-1+K = N-1 is the same at every stage).  For the
optimal bars the number of later candidates above a bar is about
Bin(K, 0.8/K), so the beta index y is cut where the binomial terms fall below
1e-19 of the largest (Y = 19): O(N x 19) for the chance of success, the
chance of no hire, the interviews, the outcome split and the rank
distribution.  (Narrow stage intervals -- u^(N-1) changes by less than e^0.5
across -- use 3- or 6-point Gauss-Legendre on the small binomial kernel instead
of the two tails of Bin(N, .); that is exact to rounding and much cheaper.)
The rank:
the first offer has J ~ (the number of later candidates above it) better
candidates; if it declines, the later records form the chain "next record is
uniform among the ones above the current", and P(hire has rank a | J) =
p [J = a-1] + (1-p) h(J+1, a) with h(b, a) = p/(b-1) prod_{x=a+1}^{b-1}
(x-p)/(x-1) = alpha_a beta_b (a product of a function of a and one of b),
so all ranks cost O(max J).  The forced last candidate is reached with no
hire and is not a record: P = E[M_{N-1}; reached], exact in the same basis.
Its rank is uniform on 2..N when p = 1 (then nobody was offered: given the
maximum M, the others are uniform below M) and for rules that look at ranks
only; with declines under score bars the candidates below a declined offer
are conditioned by the bars, so the rank table is None in that one case.

*Expected score of the hire* (p = 1): with psi(u) = E[X; U > u],

    E[X; hire] = sum_j [ a_j^(j-1) psi(a_j)
                 + (j-1) int_{a_j}^{a_{j-1}} psi(u) u^(j-2) (1-u^(N-j+1))/(1-u) du ],

(integration by parts of the A and B parts; only psi, which is bounded and
continuous, is needed); a forced last candidate adds
G psi(0) - sum_m int_0^{a_m} psi u^(N-2) du, G the chance of reaching it.
These are smooth integrals over each stage's interval, done by 3- or
6-point Gauss-Legendre on pieces where the integrand changes by less than
e^0.5 (error below 1e-16 relative per piece; normal scores are integrated in
z = Phi^-1(u), which is smooth out to the tails; sample scores are split at
the kinks of psi).  This is a numerical integration, converged to rounding,
not a closed form; the tests check it against scipy to 1e-13.  With
declines the hire's score needs order statistics of the later candidates for
every first offer, which has no closed form for normal or sample scores:
``expected_score`` is then None for goal best (the optimal rule), and for the
skip rules it is given for uniform scores only (rank-based rules:
E[U | rank a] = (N+1-a)/(N+1)).

Goal ``score``: the largest expected score (Moser 1956; Gilbert & Mosteller 1966)
-------------------------------------------------------------------------
With V_k the value of a search with k candidates to come (no hire yet),
V_0 = 0 (a search with no hire scores 0, in the user's units) and

    V_k = -c + V_{k-1} + p E[(X - V_{k-1})^+],

the rule offers at a stage with k candidates to come iff the score is at
least V_k (offering gives p X + (1-p) V_k, passing V_k).  With ``must_hire``
(the default for goal score) the last stage takes anyone: V_1 = -c + p E[X].
Several openings m (the sum of the hired scores, the multiple-choice version
of Moser's problem; Derman, Lieberman & Ross 1972 "sequential stochastic
assignment", from memory): V_{k,r} = -c + V_{k-1,r} + p E[(X - D)^+],
D = V_{k-1,r} - V_{k-1,r-1}, V_{.,0} = V_{0,.} = 0; the bar is D; with
must_hire the stages where every remaining candidate is needed take anyone.
O(N m).  The chance that the hire is the overall best (one opening) is a
piecewise polynomial integral with no short form: it is computed exactly
(Gauss-Legendre on the pieces between bars, Horner over the stages,
O(N^2)) for N <= :data:`SCORE_BEST_MAX`, else None; the rank distribution of
the goal-score rule is not computed (None).

Compared rules
--------------
``score_at_least s``: each candidate clears with chance q = 1 - F(s)
independently; the hire is the first clearing candidate who accepts, uniform
among the K ~ Bin(N, q) who clear (their order is independent of their
ranks): P(rank a) = E[(1 - (1-p)^K)/K; K >= a], E[X | hire] = psi(F(s))/q.
``skip r`` / ``skip_share``: the bars 1 (stages <= r) then 0, through the
same exact machinery as the optimal goal-best rule.  ``start_share`` needs a
time window and is refused.

Not supported (ScenarioError): uncertain pool sizes (``pool``), goals top
and rank with scores (``goal.type``), several openings for goal best
(``openings``: after a hire the bars for fewer openings can lie above the
current maximum, so the one-step argument above fails and the exact rule
needs a two-dimensional backward induction), and a cost per candidate for
goal best (``cost_per_candidate``: with a cost the exact rule may end the
search by an offer to someone who is not the best so far, which again needs
the state (stage, current maximum) in full).

Definitions of the outputs
--------------------------
``success_probability``: P(the hire is the overall best), counting a forced
hire.  ``outcome.best``: P(a regular offer hired the overall best);
``forced_last``: P(the hire came from a forced offer), whatever the rank;
for goal score the forced offers are those at the stages where the rule takes
anyone.  ``expected_score``: E[score of the hire | someone is hired] (with
several openings, the expected *total* score of the hires given at least one
hire); ``p_no_hire`` is reported separately.  ``expected_interviews``
counts the hire.  ``rank_distribution`` / ``top``: ranks 1..min(N, 200) of
the hire (the best hire with several openings).

Complexity (N candidates, m openings): goal best O(N x 19) plus about 3 N
quadrature nodes for the expected score; goal score O(N m), plus O(N^2) for
the chance of the best when N <= SCORE_BEST_MAX; each compared rule O(N).

References
----------
Gilbert, J. P. & Mosteller, F. (1966). Recognizing the maximum of a sequence.
*J. Amer. Statist. Assoc.* 61, 35-73.
Moser, L. (1956). On a problem of Cayley. *Scripta Math.* 22, 289-292.
Smith, M. H. (1975). A secretary problem with uncertain employment.
*J. Appl. Probab.* 12, 620-624.
Chow, Y. S., Robbins, H. & Siegmund, D. (1971). *Great Expectations: The
Theory of Optimal Stopping.* Houghton Mifflin (monotone problems and the
one-stage look-ahead rule).
Samuels, S. M. (1991). Secretary problems. In *Handbook of Sequential
Analysis* (B. K. Ghosh & P. K. Sen, eds.), 381-405. Dekker (the limit
0.580164 of the full-information best-choice problem; from memory).
Berezovsky, B. A. & Gnedin, A. V. (1984). *The Best Choice Problem.* Nauka,
Moscow (same limit; from memory).
Derman, C., Lieberman, G. J. & Ross, S. M. (1972). A sequential stochastic
assignment problem. *Management Science* 18, 349-355 (from memory).
Abramowitz, M. & Stegun, I. A. (1964). *Handbook of Mathematical Functions*,
6.6.4 and 26.5.24 (incomplete beta function and binomial tails).
"""

from __future__ import annotations

import bisect
import math
from array import array
from dataclasses import dataclass
from itertools import accumulate, repeat
from operator import add, mul
from typing import Callable, Sequence

from .advise import Advice, SearchState
from .distributions import (Normal, Sample, ScoreDistribution, Uniform, from_scores,
                            norm_cdf, norm_pdf, norm_ppf, norm_sf)
from .errors import ScenarioError
from .results import (TOP_COUNTS, TOP_SHARES, Limit, Outcome, Policy, RankDistribution,
                      RuleResult, SolveResult, group_thresholds)
from .scenario import FixedPool, Scenario

__all__ = [
    "RANK_HEAD",
    "SCORE_BEST_MAX",
    "OPENINGS_WORK_MAX",
    "FULL_INFO_LIMIT",
    "decision_numbers",
    "best_bars",
    "score_bars",
    "solve_fullinfo",
    "advise_fullinfo",
]

#: Ranks 1..RANK_HEAD are listed one by one in the rank distribution.
RANK_HEAD = 200
#: Largest pool for which the goal-score rule's chance of hiring the best is computed.
SCORE_BEST_MAX = 300
#: Largest (pool size) x (openings) solved for goal score with several openings.
OPENINGS_WORK_MAX = 2_000_000
#: Limit of the full-information best-choice success probability (p = 1), computed in
#: the tests by quadrature of the limiting formula; Samuels (1991) gives 0.580164.
FULL_INFO_LIMIT = 0.5801642239
_TOL = 1e-19          # binomial mass left out of a window
_NEG = 1e-17          # quadrature truncation (relative)


def _clamp(x: float) -> float:
    return 0.0 if x < 0.0 else 1.0 if x > 1.0 else x


def _pow(x: float, e: int) -> float:
    """x**e for 0 <= x <= 1 and an integer e >= 0 (0**0 = 1)."""
    if e == 0:
        return 1.0
    if x <= 0.0:
        return 0.0
    return math.exp(e * math.log(x)) if x < 1.0 else 1.0


# --------------------------------------------------------------------------
# Gauss-Legendre nodes (computed once by Newton's method on P_g)
# --------------------------------------------------------------------------

def _gauss_legendre(g: int) -> tuple[tuple[float, ...], tuple[float, ...]]:
    xs, ws = [], []
    for i in range(1, g + 1):
        x = math.cos(math.pi * (i - 0.25) / (g + 0.5))
        for _ in range(100):
            p0, p1 = 1.0, x
            for k in range(2, g + 1):
                p0, p1 = p1, ((2 * k - 1) * x * p1 - (k - 1) * p0) / k
            dp = g * (x * p1 - p0) / (x * x - 1.0)
            dx = p1 / dp
            x -= dx
            if abs(dx) < 1e-16:
                break
        p0, p1 = 1.0, x
        for k in range(2, g + 1):
            p0, p1 = p1, ((2 * k - 1) * x * p1 - (k - 1) * p0) / k
        dp = g * (x * p1 - p0) / (x * x - 1.0)
        xs.append(x)
        ws.append(2.0 / ((1.0 - x * x) * dp * dp))
    return tuple(xs), tuple(ws)


_GLX, _GLW = _gauss_legendre(6)
_GL3X, _GL3W = _gauss_legendre(3)


# --------------------------------------------------------------------------
# binomial windows and tails
# --------------------------------------------------------------------------

def _binom_window(N: int, q: float, qc: float) -> tuple[int, list[float]]:
    """(lo, pmf): the pmf of Bin(N, q) on lo..lo+len-1, where everything left
    out is below 1e-19 of the largest term; normalised to sum to 1 (the ratios
    are exact to rounding, the normalisation fixes the scale).  ``qc`` = 1 - q
    given separately so that tiny q or 1 - q keep their precision."""
    if N <= 0 or q <= 0.0:
        return 0, [1.0]
    if qc <= 0.0:
        return N, [1.0]
    r = q / qc
    mode = int((N + 1) * q)
    mode = min(max(mode, 0), N)
    up = [1.0]
    v = 1.0
    s = mode
    while s < N:
        v *= (N - s) / (s + 1) * r
        s += 1
        if v < _TOL:
            break
        up.append(v)
    down = []
    v = 1.0
    s = mode
    while s > 0:
        v *= s / ((N - s + 1) * r)
        s -= 1
        if v < _TOL:
            break
        down.append(v)
    down.reverse()
    pmf = down + up
    tot = math.fsum(pmf)
    return mode - len(down), [x / tot for x in pmf]


def _tails(N: int, q: float, qc: float, Y: int) -> tuple[list[float], list[float]]:
    """(up, low): up[y] = P(Bin(N,q) >= y+1), low[y] = P(Bin(N,q) <= y), y = 0..Y,
    each summed from its own end (no cancellation)."""
    if N <= 0 or q <= 0.0:
        return [0.0] * (Y + 1), [1.0] * (Y + 1)
    if qc <= 0.0:
        return ([1.0 if y < N else 0.0 for y in range(Y + 1)],
                [0.0 if y < N else 1.0 for y in range(Y + 1)])
    mean = N * q
    if mean - 12.0 * math.sqrt(mean * qc) - 45.0 > Y:
        return [1.0] * (Y + 1), [0.0] * (Y + 1)
    lo, pmf = _binom_window(N, q, qc)
    hi = lo + len(pmf) - 1
    up = [0.0] * (Y + 1)
    low = [0.0] * (Y + 1)
    # upper tails from the top
    acc = 0.0
    top_cum = [0.0] * (len(pmf) + 1)   # top_cum[i] = sum pmf[i:]
    for i in range(len(pmf) - 1, -1, -1):
        acc += pmf[i]
        top_cum[i] = acc
    acc = 0.0
    bot_cum = [0.0] * len(pmf)         # bot_cum[i] = sum pmf[:i+1]
    for i, v in enumerate(pmf):
        acc += v
        bot_cum[i] = acc
    for y in range(Y + 1):
        if y < lo:
            up[y] = 1.0
            low[y] = 0.0
        elif y >= hi:
            up[y] = 0.0
            low[y] = 1.0
        else:
            up[y] = top_cum[y + 1 - lo]
            low[y] = bot_cum[y - lo]
    return up, low


def _pmf_vec(N: int, q: float, qc: float, Y: int) -> list[float]:
    """P(Bin(N, q) = y) for y = 0..Y."""
    out = [0.0] * (Y + 1)
    lo, pmf = _binom_window(N, q, qc)
    for i, v in enumerate(pmf):
        y = lo + i
        if y > Y:
            break
        out[y] = v
    return out


# --------------------------------------------------------------------------
# decline coefficients
# --------------------------------------------------------------------------

class _Coef:
    """rho_y (win chance with y later candidates above, offering every record),
    pi_y (chance that every record among y declines), Pi_y = sum pi, alpha/beta of
    the record chain; all grown on demand."""

    def __init__(self, p: float) -> None:
        self.p = p
        self.rho = [0.0, p]
        self.pi = [1.0]
        self.Pi = [1.0]
        self.alpha = [0.0, p]      # alpha[a], a >= 1
        self.beta = [0.0, 0.0, 1.0]  # beta[b], b >= 2

    def grow(self, n: int) -> None:
        p = self.p
        rho, pi, Pi, al, be = self.rho, self.pi, self.Pi, self.alpha, self.beta
        while len(rho) <= n:
            y = len(rho)
            rho.append(rho[-1] * (y - p) / y)
        while len(pi) <= n:
            y = len(pi)
            pi.append(pi[-1] * (y - p) / y)
            Pi.append(Pi[-1] + pi[-1])
        while len(al) <= n + 1:
            a = len(al) - 1
            al.append(al[-1] * a / (a + 1.0 - p))
        while len(be) <= n + 2:
            b = len(be) - 1
            be.append(be[-1] * (b - p) / b)


# --------------------------------------------------------------------------
# goal best: decision numbers
# --------------------------------------------------------------------------

_YCUT: dict[int, int] = {}


def _ycut(K: int, q: float) -> int:
    """A cut-off Y for Bin(K, q): every y > Y has P(Bin = y) below 1e-19 of the
    largest probability.  For mean <= 30 this uses C(K,y) q^y (1-q)^(K-y) <=
    mu'^y / y! x (1-q)^K with mu' = K q/(1-q) (a Poisson-shaped bound, memoised on
    mu' rounded up to 1e-3); above, mean + 10 sd + 45."""
    if K <= 0 or q <= 0.0:
        return 0
    if q >= 1.0:
        return K
    mu = K * q
    if mu > 30.0:
        return min(K, int(mu + 10.0 * math.sqrt(mu * (1.0 - q)) + 45.0))
    key = int(mu / (1.0 - q) * 1000.0) + 1
    y = _YCUT.get(key)
    if y is None:
        m = key / 1000.0
        t = 1.0
        tmax = 1.0
        y = 0
        while True:
            y += 1
            t *= m / y
            if t > tmax:
                tmax = t
            if y > m and t < 1e-19 * tmax:
                break
        y -= 1
        _YCUT[key] = y
    return min(K, y)


def _gm_eval(k: int, z: float, rho: list[float], Y: int) -> tuple[float, float]:
    """h(z) = sum_{y=1}^{Y} C(k,y) z^y rho_y - 1 and h'(z); Y is a cut-off beyond
    which the terms are below 1e-19 of the largest."""
    s = 0.0
    ds = 0.0
    t = 1.0
    for y in range(1, Y + 1):
        t *= (k - y + 1) / y * z
        term = t * rho[y]
        s += term
        ds += term * y
    return s - 1.0, ds / z


def decision_numbers(n: int, p: float = 1.0) -> tuple[list[float], list[float]]:
    """(b, bc): b[k] = the decision number with k candidates to come, k = 0..n-1
    (b[0] = 0), bc[k] = 1 - b[k] kept separately for precision.

    Newton's method on (GM) in z = 1/b - 1, started from the linear
    extrapolation of k z_k (which tends to 0.8043... for p = 1).  The function
    is smooth in w = k z, so Newton converges quadratically: once a step is
    below 1e-8 of z the next error is below 1e-16 and the iteration stops.
    O(1) per k, O(N) in all."""
    co = _Coef(p)
    co.grow(80)
    m = max(n, 1)
    b = [0.0] * m
    bc = [1.0] * m
    w1 = w2 = 0.0      # k z_k for the last two k
    for k in range(1, n):
        if k == 1:
            z = 1.0 / p
        else:
            w = 2.0 * w1 - w2 if k >= 3 else w1
            z = max(w, 0.5 * w1) / k
            for _ in range(80):
                Y = _ycut(k, z / (1.0 + z))
                if Y + 2 > len(co.rho):
                    co.grow(Y + 40)
                h, dh = _gm_eval(k, z, co.rho, Y)
                step = h / dh
                z_new = z - step
                if z_new <= 0.0:
                    z_new = 0.5 * z
                small = abs(z_new - z) <= 1e-8 * z
                z = z_new
                if small:
                    break
        b[k] = 1.0 / (1.0 + z)
        bc[k] = z / (1.0 + z)
        w2, w1 = w1, k * z
    return b, bc


def best_bars(n: int, p: float = 1.0) -> tuple[list[float], list[float]]:
    """Bars per stage in quantile space: a[t], ac[t] = 1 - a[t] for t = 0..n
    (a[0] = 1 is a sentinel; stage t has k = n - t candidates to come)."""
    b, bc = decision_numbers(n, p)
    a = [1.0] + [b[n - t] for t in range(1, n + 1)]
    ac = [0.0] + [bc[n - t] for t in range(1, n + 1)]
    return a, ac


# --------------------------------------------------------------------------
# goal best: exact evaluation of record rules with non-increasing bars
# --------------------------------------------------------------------------

@dataclass
class _R2:
    win: float                 # P(regular hire of the overall best)
    none_reg: float            # P(no regular hire)
    seen: float                # E[number seen] (a forced hire changes nothing here)
    piJ: list[float]           # distribution of J over first offers
    forced_mass: float         # P(reach the last stage, last not a record)


def _binoms(K: int, Y: int) -> list[float]:
    """C(K, y) for y = 0..Y as floats."""
    return list(accumulate([(K - y + 1) / y for y in range(1, Y + 1)], mul, initial=1.0))


def _upper_tails(N: int, q: float, qc: float, Y: int) -> list[float]:
    """P(Bin(N, q) >= y+1) for y = 0..Y (sums from the top, no cancellation)."""
    if N <= 0 or q <= 0.0:
        return [0.0] * (Y + 1)
    if N * q > 30.0 or qc <= 0.0:
        return _tails(N, q, qc, Y)[0]
    T = _ycut(N, q)
    lead = math.exp(N * math.log1p(-q))
    pmf = list(map(mul, _binoms(N, T),
                   accumulate(repeat(q / qc, T), mul, initial=lead)))
    suf = list(accumulate(reversed(pmf)))
    suf.reverse()                       # suf[s] = P(Bin >= s), s = 0..T
    up = suf[1:Y + 2]
    if len(up) < Y + 1:
        up.extend([0.0] * (Y + 1 - len(up)))
    return up


def _cell_kernel(N0: int, K: int, e: int, lo: float, loc: float, hi: float, hic: float,
                 Y: int) -> list[float]:
    """C[y] = int_lo^hi u^e C(K,y) u^(K-y) (1-u)^y du, y = 0..Y (e + K = N0 - 1).

    Narrow intervals (u^(N0-1) and (1-u)^Y change by less than e^0.5 across):
    Gauss-Legendre with 3 nodes (change below e^0.01) or 6 on the binomial
    kernel -- error below 1e-16 relative.  Wide intervals: the exact difference
    of two binomial tails (module docstring)."""
    w = hi - lo
    lam = (N0 - 1) * w / (2.0 * lo) if lo > 0.0 else math.inf
    lam2 = (Y * w / (2.0 * hic) if hic > 0.0 else math.inf) if Y > 0 else 0.0
    lm = lam if lam > lam2 else lam2
    if lm <= 0.5 and K * hic <= 30.0:
        xs, ws = (_GL3X, _GL3W) if lm <= 0.01 else (_GLX, _GLW)
        mid = 0.5 * (lo + hi)
        midc = 0.5 * (loc + hic)
        half = 0.5 * w
        E = N0 - 1
        S = [0.0] * (Y + 1)
        for x, gw in zip(xs, ws):
            u = mid + half * x
            uc = midc - half * x
            v0 = gw * half * math.exp(E * math.log1p(-uc))
            S = list(map(add, S, accumulate(repeat(uc / u, Y), mul, initial=v0)))
        return list(map(mul, S, _binoms(K, Y)))
    C = [0.0] * (Y + 1)
    up_lo, low_lo = _tails(N0, loc, lo, Y)
    up_hi, low_hi = _tails(N0, hic, hi, Y)
    wt = 1.0 / N0
    for y in range(Y + 1):
        ul = up_lo[y]
        d = (ul - up_hi[y]) if ul < 0.5 else (low_hi[y] - low_lo[y])
        C[y] = wt * d if d > 0.0 else 0.0
        if N0 - 1 - y > 0:
            wt *= (K - y) / (N0 - 1 - y)
        else:
            wt = 0.0
    return C


def _vadd(acc: list[float], vec: list[float], w: float = 1.0) -> None:
    """acc[:len(vec)] += w * vec (C-speed)."""
    lv = len(vec)
    if len(acc) < lv:
        acc.extend([0.0] * (lv - len(acc)))
    if w == 1.0:
        acc[:lv] = map(add, acc[:lv], vec)
    else:
        acc[:lv] = map(add, acc[:lv], map(mul, vec, repeat(w, lv)))


def _dot(x: Sequence[float], y: Sequence[float]) -> float:
    return sum(map(mul, x, y))


def _r2_core(n: int, a: Sequence[float], ac: Sequence[float], p: float, *,
             i0: int = 0, m0: float = 0.0, m0c: float = 1.0, win_only: bool = False,
             forced: bool = True, co: _Coef | None = None) -> _R2:
    """Exact evaluation (see the module docstring); a, ac indexed 0..n with
    a[0] = 1.  With (i0, m0): start after stage i0 with maximum m0 < a[i0+1]
    (the advice case; then only ``win`` is meaningful).  O(N x Y), Y about 19
    for the optimal bars.

    Per stage t (K = n - t later candidates) the A-part vector V[y] (first offer
    at t with y later candidates above it) and the B-part vector Bw[y] (the bar
    drops below the maximum at t, y later candidates above that maximum) are
    summed into SV and SC; the functionals of the module docstring are dot
    products of these sums with fixed coefficient vectors, except the few
    whose coefficients depend on K (interviews, forced last), which are
    accumulated per stage."""
    co = co or _Coef(p)
    co.grow(64)
    N0 = n - i0
    decl = p < 1.0
    full = not win_only
    SV: list[float] = []
    SC: list[float] = []
    sum_v = sum_c = 0.0          # total A / B mass
    sum_kv = sum_kc = 0.0        # sum K * mass
    kal_v = kal_c = 0.0          # sum K * (alpha . vector)
    gam_v = gam_c = 0.0          # sum (gamma . vector) / K, K >= 1
    last_v0 = last_c0 = 0.0      # y = 0 entries of the last stage (K = 0)
    al: list[float] = []
    gam: list[float] = []

    def coef(L: int) -> None:
        nonlocal al, gam
        if len(al) >= L:
            return
        co.grow(L + 2)
        pi, Pi = co.pi, co.Pi
        al = [1.0] + [Pi[y] / (y + 1.0) for y in range(1, L)]
        gam = [0.0] + [y * pi[y] - (y - 1) * pi[y - 1] for y in range(1, L)]

    coef(64)
    point_done = m0 <= 0.0
    for t in range(i0 + 1, n + 1):
        K = n - t
        e = t - 1 - i0
        if a[t] > m0:
            lo, loc = a[t], ac[t]
        else:
            lo, loc = m0, m0c
        hi, hic = a[t - 1], ac[t - 1]
        tail_f = _pow(hi, e) if (hi > m0 and hic > 0.0) else 0.0
        if not lo < hi and tail_f <= 0.0 and (point_done or a[t] > m0):
            if full and forced and K == 0:
                last_v0 = last_c0 = 0.0
            continue            # nothing can happen at this stage
        Y = _ycut(K, loc)
        if lo < hi:
            C: list[float] | None = _cell_kernel(N0, K, e, lo, loc, hi, hic, Y)
            V = C[:]  # type: ignore[index]
        else:
            C = None
            V = [0.0] * (Y + 1)
        if tail_f > 0.0:
            f = tail_f
            if f > 0.0:
                g = f / (K + 1)
                V = list(map(add, V, map(mul, _upper_tails(K + 1, hic, hi, Y),
                                         repeat(g, Y + 1))))
        Bw = C
        bw = float(e)
        if not point_done and a[t] <= m0:
            # advice only: the bar drops below the starting maximum at this stage
            point_done = True
            mass = _pow(m0, t - i0)
            if mass > 0.0:
                pm = _pmf_vec(K, m0c, m0, Y)
                Bw = [(e * C[y] if C is not None else 0.0) + mass * pm[y]
                      for y in range(Y + 1)]
                bw = 1.0
        if Bw is not None and bw > 0.0:
            if bw != 1.0:
                Bw = list(map(mul, Bw, repeat(bw, len(Bw))))
        else:
            Bw = None
        _vadd(SV, V)
        if Bw is not None:
            _vadd(SC, Bw)
        if not full:
            continue
        if Y + 2 > len(al):
            coef(2 * Y + 8)
        sv = sum(V)
        sum_v += sv
        sum_kv += K * sv
        if decl:
            kal_v += K * _dot(V, al)
        if Bw is not None:
            sc = sum(Bw)
            sum_c += sc
            sum_kc += K * sc
            kal_c += K * _dot(Bw, al)
        if forced:
            if K >= 1:
                gam_v += _dot(V, gam) / K
                if Bw is not None:
                    gam_c += _dot(Bw, gam) / K
            else:
                last_v0 = V[0]
                last_c0 = Bw[0] if Bw is not None else 0.0
    L = max(len(SV), len(SC), 1)
    co.grow(L + 2)
    rho, pi, Pi = co.rho, co.pi, co.Pi
    for v in (SV, SC):
        if len(v) < L:
            v.extend([0.0] * (L - len(v)))
    win = p * SV[0] + (1.0 - p) * math.fsum(map(mul, SV[1:], rho[1:L])) \
        + math.fsum(map(mul, SC[1:], rho[1:L]))
    if win_only:
        return _R2(_clamp(win), 0.0, 0.0, [], 0.0)
    coef(L)
    p_inf = _pow(a[n], N0) if a[n] > m0 else 0.0
    none_reg = p_inf + (1.0 - p) * math.fsum(map(mul, SV, pi[:L])) \
        + math.fsum(map(mul, SC, pi[:L]))
    # E_extra(x, K) = sum_y B_K(y) (K alpha_y + beta_y): later candidates seen after a
    # declined offer (or after a crossing) while every record is offered
    be = [0.0] + [Pi[y - 1] - y * Pi[y] / (y + 1.0) for y in range(1, L)]
    extra_a = (kal_v + math.fsum(map(mul, SV, be))) if decl else 0.0
    seen = N0 * p_inf + N0 * sum_v - sum_kv + (1.0 - p) * extra_a \
        + N0 * sum_c - sum_kc + kal_c + math.fsum(map(mul, SC, be))
    piJ = [0.0] * L
    acc = 0.0
    for y in range(L - 1, -1, -1):
        piJ[y] = SV[y] + acc
        if y >= 1:
            acc += SC[y] / y
    # P(reach the last stage and the last is not a record) = E[M_{n-1}; reach n]:
    # nobody crossed a bar (M_{n-1} < a_{n-1}), or the first offer / the crossing came
    # at a stage <= n-1 and every later record up to n-1 declined.  With J' later
    # candidates above the first offer u, M_{n-1} = max(u, their max) and
    # E[M 1{all decline}] = sum_J' B_{K-1}(J') pi_J' (u + (1-u) J'/(J'+1)), which in
    # the degree-K basis has the coefficients pi_y - (y pi_y - (y-1) pi_{y-1})/K.
    fm = 0.0
    if forced and n >= 2 and i0 == 0:
        case1 = (n - 1) * _pow(a[n - 1], n) / n if a[n - 1] > 0.0 else 0.0
        sa = math.fsum(map(mul, SV, pi[:L])) - last_v0 - gam_v
        sb = math.fsum(map(mul, SC, pi[:L])) - last_c0 - gam_c
        fm = case1 + (1.0 - p) * sa + sb
    return _R2(win=_clamp(win), none_reg=_clamp(none_reg), seen=seen, piJ=piJ,
               forced_mass=_clamp(fm))


def _r2_win_from(n: int, a: Sequence[float], ac: Sequence[float], p: float, i0: int,
                 m0: float, m0c: float) -> float:
    """P(win) from "stage i0 done, maximum m0, no hire", continuing optimally
    (i.e. with the bars a) -- used by the advice.  O((N - i0) x Y)."""
    k = n - i0
    if k <= 0:
        return 0.0
    co = _Coef(p)
    if m0 >= a[i0 + 1]:
        # every later record is offered: R_k(m0)
        Y = _ycut(k, m0c)
        co.grow(Y + 2)
        pm = _pmf_vec(k, m0c, m0, Y)
        return _clamp(math.fsum(pm[y] * co.rho[y] for y in range(1, Y + 1)))
    return _r2_core(n, a, ac, p, i0=i0, m0=m0, m0c=m0c, win_only=True, co=co).win


# --------------------------------------------------------------------------
# quadrature of psi-integrals (expected score of the hire)
# --------------------------------------------------------------------------

def dist_q(u: float, uc: float) -> float:
    """Phi^-1(u) using whichever of u, 1-u is smaller (precision near 1)."""
    if u <= 0.0:
        return -math.inf
    if uc <= 0.0:
        return math.inf
    if u < 0.5:
        return norm_ppf(u)
    return -norm_ppf(uc)


class _PsiQuad:
    """int_c^d psi(u) g(u, 1-u) du for one distribution, g ~ u^P x smooth.

    Pieces from the top down, each so short that the integrand changes by less
    than e^0.5 across it (u^P, and for normal scores the Gaussian factor), so
    6-point Gauss-Legendre is exact to rounding (3 points when the change is
    below e^0.01); stops once ``bound(h)`` (a bound on |int_0^h|) is below 1e-17
    of the total.  Normal scores are integrated in z = Phi^-1(u), where psi =
    mean Q(z) + sd phi(z) needs no inverse; sample scores are split at the kinks
    of psi; uniform psi is a quadratic."""

    def __init__(self, dist: ScoreDistribution) -> None:
        self.dist = dist
        self.normal = isinstance(dist, Normal)
        self.kinks = dist.kinks if isinstance(dist, Sample) else ()
        if isinstance(dist, Normal):
            self.mu, self.sd = dist.mu, dist.sd

    def psi_z(self, z: float) -> tuple[float, float, float, float]:
        """(u, 1-u, psi, phi(z))."""
        ph = norm_pdf(z)
        if z < 0.0:
            u = norm_cdf(z)
            uc = 1.0 - u
        else:
            uc = norm_sf(z)
            u = 1.0 - uc
        return u, uc, self.mu * uc + self.sd * ph, ph

    def integrate(self, c: float, cc: float, zc: float, d: float, dc: float, zd: float,
                  g: Callable[[float, float], float], P: float,
                  bound: Callable[[float], float]) -> float:
        if not d > c:
            return 0.0
        total = 0.0
        if self.normal:
            zc = max(zc, -38.5)
            zd = min(zd, 9.5)
            h = zd
            while h > zc:
                ph = norm_pdf(h)
                Ph = norm_cdf(h)
                step = 0.5 / max(1.0, abs(h))
                if P > 0.0 and ph > 0.0:
                    step = min(step, Ph / (P * ph))
                lo = max(zc, h - step)
                lam = 0.5 * (h - lo) * max(1.0, abs(h), P * ph / max(Ph, 1e-300))
                xs, ws = (_GL3X, _GL3W) if lam <= 0.01 else (_GLX, _GLW)
                mid = 0.5 * (lo + h)
                half = 0.5 * (h - lo)
                s = 0.0
                for x, w in zip(xs, ws):
                    u, uc, ps, phz = self.psi_z(mid + half * x)
                    s += w * ps * g(u, uc) * phz
                total += s * half
                h = lo
                if h > zc and bound(norm_cdf(h)) <= _NEG * abs(total) + 1e-300:
                    break
            return total
        psi = self.dist.tail_mean
        kinks = self.kinks
        h, hc = d, dc
        while h > c:
            step = h / (P + 2.0)
            lo = max(c, h - step)
            if kinks:
                j = bisect.bisect_left(kinks, h) - 1
                if j >= 0 and kinks[j] > lo:
                    lo = kinks[j]
            loc = cc if lo == c else (1.0 - lo if lo < 0.5 else hc + (h - lo))
            lam = 0.5 * (h - lo) * (P + 1.0) / max(lo, 1e-300)
            xs, ws = (_GL3X, _GL3W) if lam <= 0.01 else (_GLX, _GLW)
            mid = 0.5 * (lo + h)
            midc = 0.5 * (loc + hc)
            half = 0.5 * (h - lo)
            s = 0.0
            for x, w in zip(xs, ws):
                u = mid + half * x
                uc = midc - half * x
                s += w * psi(u) * g(u, uc)
            total += s * half
            h, hc = lo, loc
            if h > c and bound(h) <= _NEG * abs(total) + 1e-300:
                break
        return total


def _geom(u: float, uc: float, m: int) -> float:
    """(1 - u^m)/(1 - u) = 1 + u + ... + u^(m-1)."""
    if m <= 0:
        return 0.0
    if uc <= 0.0:
        return float(m)
    if u <= 0.0:
        return 1.0
    return -math.expm1(m * math.log1p(-uc)) / uc if uc < 0.5 else (1.0 - u ** m) / uc


def _bar_z(dist: ScoreDistribution, a: Sequence[float], ac: Sequence[float]) -> list[float]:
    if not isinstance(dist, Normal):
        return [0.0] * len(a)
    return [dist_q(u, uc) for u, uc in zip(a, ac)]


def _r2_scores(n: int, a: Sequence[float], ac: Sequence[float], dist: ScoreDistribution,
               must: bool, zs: Sequence[float] | None = None) -> tuple[float, float]:
    """(E[X; regular hire], E[X; forced hire]) for a record rule with p = 1:

        E[X; regular] = sum_t [a_t^(t-1) psi(a_t)
                        + (t-1) int_{a_t}^{a_{t-1}} psi u^(t-2) (1-u^(n-t+1))/(1-u) du]
        E[X; forced]  = G psi(0) - sum_{t>=2} (t-1) int_{a_t}^{a_{t-1}} psi u^(n-2) du
                        - (n-1) int_0^{a_n} psi u^(n-2) du,
        G = (1/(n-1)) sum_{m<n} a_m^(n-1)   (the chance of reaching the last stage).

    A stage whose interval is one quadrature piece (almost all of them for the
    optimal bars) is done inline with both integrands on the same nodes;
    wider intervals go through :class:`_PsiQuad`.  O(N) nodes."""
    Q = _PsiQuad(dist)
    zs = zs if zs is not None else _bar_z(dist, a, ac)
    normal = Q.normal
    kinks = Q.kinks
    psi = dist.tail_mean
    B = dist.abs_mean_bound() + 1e-300

    def psi_at(t: int) -> float:
        if a[t] <= 0.0:
            return dist.mean
        if normal:
            return Q.psi_z(zs[t])[2]
        return psi(a[t])

    total = psi_at(1) if a[1] > 0.0 else dist.mean
    forced_int = 0.0
    P = float(max(n - 2, 0))
    for t in range(2, n + 1):
        lo, hi = a[t], a[t - 1]
        if lo > 0.0:
            total += _pow(lo, t - 1) * psi_at(t)
        if not hi > lo:
            continue
        K = n - t
        e = t - 2
        one = False
        if normal:
            zl, zh = zs[t], zs[t - 1]
            if zl > -38.0 and zh < 9.0:
                ph = norm_pdf(zh)
                Ph = norm_cdf(zh)
                step = 0.5 / max(1.0, abs(zh))
                if P > 0.0:
                    step = min(step, Ph / (P * ph))
                one = zh - zl <= step
                lam = 0.5 * (zh - zl) * max(1.0, abs(zh), P * ph / max(Ph, 1e-300))
        else:
            one = lo > 0.0 and hi - lo <= hi / (P + 2.0) and not (
                kinks and bisect.bisect_left(kinks, hi) != bisect.bisect_right(kinks, lo))
            lam = 0.5 * (hi - lo) * (P + 1.0) / lo if lo > 0.0 else math.inf
        if one:
            xs, ws = (_GL3X, _GL3W) if lam <= 0.01 else (_GLX, _GLW)
            s1 = s2 = 0.0
            if normal:
                mid = 0.5 * (zl + zh)
                half = 0.5 * (zh - zl)
                for x, w in zip(xs, ws):
                    u, uc, ps, phz = Q.psi_z(mid + half * x)
                    lu = math.log1p(-uc) if uc < 0.5 else math.log(u)
                    f = w * ps * phz
                    s1 += f * math.exp(e * lu) * (-math.expm1((K + 1) * lu) / uc)
                    s2 += f * math.exp((n - 2) * lu)
            else:
                mid = 0.5 * (lo + hi)
                midc = 0.5 * (ac[t] + ac[t - 1])
                half = 0.5 * (hi - lo)
                for x, w in zip(xs, ws):
                    u = mid + half * x
                    uc = midc - half * x
                    lu = math.log1p(-uc) if uc < 0.5 else math.log(u)
                    f = w * psi(u)
                    s1 += f * math.exp(e * lu) * (-math.expm1((K + 1) * lu) / uc)
                    s2 += f * math.exp((n - 2) * lu)
            total += (t - 1) * s1 * half
            forced_int += (t - 1) * s2 * half
            continue

        def g1(u: float, uc: float, e: int = e, m: int = K + 1) -> float:
            return _pow(u, e) * _geom(u, uc, m)

        def b1(h: float, e: int = e, K: int = K) -> float:
            return B * (K + 1) * _pow(h, e + 1) / (e + 1)

        # effective power of g1 on this interval: e + (growth of the geometric sum)
        uc_hi = ac[t - 1]
        P1 = e + (min(K, 1.0 / uc_hi) if uc_hi > 0.0 else K)
        total += (t - 1) * Q.integrate(lo, ac[t], zs[t], hi, ac[t - 1], zs[t - 1], g1, P1, b1)
        if must:
            def g2(u: float, uc: float) -> float:
                return _pow(u, n - 2)

            def b2(h: float) -> float:
                return B * _pow(h, n - 1) / (n - 1)

            forced_int += (t - 1) * Q.integrate(lo, ac[t], zs[t], hi, ac[t - 1], zs[t - 1],
                                                g2, P, b2)
    forced = 0.0
    if must and n >= 2:
        if a[n] > 0.0:
            forced_int += (n - 1) * Q.integrate(
                0.0, 1.0, -math.inf, a[n], ac[n], zs[n], lambda u, uc: _pow(u, n - 2), P,
                lambda h: B * _pow(h, n - 1) / (n - 1))
        g1_ = math.fsum(_pow(a[m], n - 1) for m in range(1, n)) / (n - 1)
        forced = g1_ * dist.mean - forced_int
    return total, forced


# --------------------------------------------------------------------------
# rank tables
# --------------------------------------------------------------------------

@dataclass
class _Ranks:
    head: list[float]            # P(rank = a), a = 1..H (H = min(n, RANK_HEAD))
    le: Callable[[int], float]   # P(rank <= m), 0 <= m <= n
    mean_mass: float             # sum_a a P(rank = a)


def _ranks_from_parts(n: int, reg: list[float], forced_head: list[float],
                      forced_tail: float) -> _Ranks:
    """reg[a-1] = P(regular hire, rank a) (a = 1..len(reg) <= n); forced_head[a-1]
    the forced part for a = 1..len(forced_head), constant ``forced_tail`` for
    len(forced_head) < a <= n."""
    H = min(n, RANK_HEAD)
    A = len(forced_head)
    head = [0.0] * H
    for i in range(min(H, len(reg))):
        head[i] += reg[i]
    for i in range(H):
        head[i] += forced_head[i] if i < A else forced_tail
    cum_reg = [0.0]
    for v in reg:
        cum_reg.append(cum_reg[-1] + v)
    cum_f = [0.0]
    for v in forced_head:
        cum_f.append(cum_f[-1] + v)

    def le(m: int) -> float:
        m = max(0, min(m, n))
        r = cum_reg[min(m, len(reg))]
        f = cum_f[min(m, A)] + max(0, m - A) * forced_tail
        return _clamp(r + f)

    mean = math.fsum((i + 1) * v for i, v in enumerate(reg))
    mean += math.fsum((i + 1) * v for i, v in enumerate(forced_head))
    if n > A and forced_tail > 0.0:
        mean += forced_tail * (n * (n + 1) / 2.0 - A * (A + 1) / 2.0)
    return _Ranks(head=[_clamp(v) for v in head], le=le, mean_mass=mean)


def _r2_ranks(n: int, core: _R2, p: float, must: bool, co: _Coef,
              rank_based: bool) -> _Ranks | None:
    """Rank of the hire.  A forced last candidate has rank uniform on 2..N when the
    rule looks at ranks only, or when p = 1 (then it is reached only when nobody
    was offered, and given the maximum M the others are uniform below M).  With
    declines under value bars the candidates below a declined offer are
    conditioned by the bars, so the forced rank has no short form: None."""
    piJ = core.piJ
    L = len(piJ)
    co.grow(L + 2)
    al, be = co.alpha, co.beta
    # S_a = sum_{J >= a} pi(J) beta_{J+1}
    S = [0.0] * (L + 1)
    acc = 0.0
    for J in range(L - 1, -1, -1):
        acc += piJ[J] * be[J + 1] if J >= 1 else 0.0
        S[J] = acc
    R = min(n, L + 1)
    reg = [0.0] * R
    for a_ in range(1, R + 1):
        v = p * (piJ[a_ - 1] if a_ - 1 < L else 0.0)
        if p < 1.0 and a_ < L:
            v += (1.0 - p) * al[a_] * S[a_]
        reg[a_ - 1] = v
    if not must or n < 2:
        return _ranks_from_parts(n, reg, [], 0.0)
    if p < 1.0 and not rank_based:
        return None
    each = p * core.forced_mass / (n - 1)
    return _ranks_from_parts(n, reg, [0.0], each)


def _share_cut(n: int, sh: float) -> int:
    return max(1, int(math.floor(sh * n)))


def _top_table(n: int, rk: _Ranks) -> dict[str, float]:
    top = {str(m): rk.le(min(m, n)) for m in TOP_COUNTS}
    for sh in TOP_SHARES:
        top[f"{round(sh * 100)}%"] = rk.le(_share_cut(n, sh))
    return top


# --------------------------------------------------------------------------
# performance records
# --------------------------------------------------------------------------

@dataclass
class _Perf:
    success: float | None       # P(hire is the overall best), incl. forced
    best_reg: float | None      # P(regular hire of the overall best)
    none: float
    forced: float
    seen: float
    hires: float
    score_sum: float | None     # E[total score of the hires] (no hire counts 0)
    ranks: _Ranks | None
    objective: float            # what the rule optimises (incl. cost)


def _result(n: int, name: str, description: str, rule: dict, pf: _Perf,
            cost: float) -> RuleResult:
    none = _clamp(pf.none)
    forced = _clamp(pf.forced)
    if pf.best_reg is None:
        best = other = math.nan
    else:
        best = _clamp(pf.best_reg)
        other = max(0.0, 1.0 - best - forced - none)
    hire = 1.0 - none
    score = pf.score_sum / hire if (pf.score_sum is not None and hire > 1e-300) else None
    rk = pf.ranks
    if rk is not None:
        listed = math.fsum(rk.head)
        dist = RankDistribution(probabilities=rk.head, rest=max(0.0, 1.0 - none - listed),
                                none=none)
        top = _top_table(n, rk)
        exp_rank = rk.mean_mass / hire if hire > 1e-300 else None
    else:
        dist = None
        top = None
        exp_rank = None
    return RuleResult(
        name=name, description=description, rule=rule,
        success_probability=None if pf.success is None else _clamp(pf.success),
        expected_rank=exp_rank, expected_score=score, expected_interviews=pf.seen,
        p_no_hire=none, outcome=Outcome(best=best, other=other, none=none, forced_last=forced),
        top=top, rank_distribution=dist, expected_hires=pf.hires,
        expected_cost=cost * pf.seen)


def _eval_record_rule(n: int, a: Sequence[float], ac: Sequence[float], p: float,
                      must: bool, dist: ScoreDistribution, *, rank_based: bool,
                      zs: Sequence[float] | None = None) -> _Perf:
    """Goal-best style rule (offer to a best-so-far above the bar)."""
    co = _Coef(p)
    core = _r2_core(n, a, ac, p, forced=must, co=co)
    forced = p * core.forced_mass if (must and n >= 2) else 0.0
    none = core.none_reg - forced
    ranks = _r2_ranks(n, core, p, must, co, rank_based)
    score: float | None = None
    if p == 1.0:
        reg, fs = _r2_scores(n, a, ac, dist, must, zs)
        score = reg + (fs if must else 0.0)
    elif rank_based and isinstance(dist, Uniform) and ranks is not None:
        # E[U | rank a] = (n + 1 - a)/(n + 1) for rules that look at ranks only
        mass = math.fsum(ranks.head[i] * (n - i) for i in range(len(ranks.head)))
        H = len(ranks.head)
        # ranks beyond the head: regular part (skip rules list all ranks) + forced tail
        extra = 0.0
        for m in range(H + 1, n + 1):
            pa = ranks.le(m) - ranks.le(m - 1)
            extra += pa * (n + 1 - m)
        eu = (mass + extra) / (n + 1)
        score = dist.low * (1.0 - none) + dist.width * eu
    return _Perf(success=core.win, best_reg=core.win, none=_clamp(none), forced=forced,
                 seen=core.seen, hires=_clamp(1.0 - none), score_sum=score, ranks=ranks,
                 objective=core.win)


def _skip_bars(n: int, r: int) -> tuple[list[float], list[float]]:
    a = [1.0] * (r + 1) + [0.0] * (n - r)
    ac = [0.0] * (r + 1) + [1.0] * (n - r)
    return a, ac


# --------------------------------------------------------------------------
# rules that take any candidate above a bar
# --------------------------------------------------------------------------

def _eval_constant(n: int, s: float, p: float, must: bool, dist: ScoreDistribution,
                   goal: str, cost: float) -> _Perf:
    """"score_at_least s" (see the module docstring).  O(N)."""
    b = dist.cdf(s)              # chance a candidate is below the bar
    q = 1.0 - b
    if isinstance(dist, Normal):
        z = (s - dist.mu) / dist.sd
        q = norm_sf(z)
        b = norm_cdf(z)
    keep = 1.0 - p * q           # chance a candidate does not end the search
    # regular hires
    reach_last = keep ** (n - 1) if n >= 1 else 1.0
    none_reg = keep ** n
    seen = float(n) if keep >= 1.0 else (1.0 - keep ** n) / (1.0 - keep)
    psi_b = _partial_above(dist, s) if q > 0.0 else 0.0
    # rank of a regular hire: K ~ Bin(n, q) clear, the hire is uniform among them
    reg = [0.0] * n
    if q > 0.0:
        lo, pmf = _binom_window(n, q, b)
        acc = 0.0
        vals = {}
        for i in range(len(pmf) - 1, -1, -1):
            k = lo + i
            if k >= 1:
                acc += pmf[i] * (-math.expm1(k * math.log1p(-p)) if p < 1.0 else 1.0) / k
            vals[k] = acc
        # P(rank = a) = sum_{k >= a} ...  = acc at the largest k >= a inside the window
        top_k = lo + len(pmf) - 1
        for a_ in range(1, n + 1):
            if a_ > top_k:
                break
            reg[a_ - 1] = vals[max(a_, lo)]
        while reg and reg[-1] == 0.0:
            reg.pop()
    best_reg = reg[0] if reg else 0.0
    score = p * psi_b * (1.0 - none_reg) / (p * q) if q > 0.0 else 0.0
    forced = 0.0
    fh: list[float] = []
    f_best = 0.0
    if must and n >= 1 and b > 0.0:
        forced = p * reach_last * b
        # forced rank: 1 + D + uniform{0..n-1-D}, D ~ declined-above earlier
        # weight of D = d: C(n-1,d) ((1-p) q)^d b^(n-1-d) * b
        if n == 1:
            fh = [forced]
        else:
            x = (1.0 - p) * q
            tot = x + b
            w = [0.0] * n
            if x > 0.0:
                lo, pmf = _binom_window(n - 1, x / tot, b / tot)
                scale = b * tot ** (n - 1)
                for i, v in enumerate(pmf):
                    w[lo + i] = v * scale
            else:
                w[0] = b * b ** (n - 1)
            fh = [0.0] * n
            acc = 0.0
            for a_ in range(1, n + 1):
                d = a_ - 1
                acc += w[d] / (n - d)
                fh[a_ - 1] = p * acc
        f_best = fh[0]
        score += p * reach_last * (dist.mean - psi_b) if b > 0.0 else 0.0
    none = none_reg - forced
    if not must:
        ranks = _ranks_from_parts(n, reg, [], 0.0)
    else:
        ranks = _ranks_from_parts(n, reg, fh, 0.0)
    success = best_reg + f_best
    obj = success - cost * seen if goal == "best" else score - cost * seen
    return _Perf(success=success, best_reg=best_reg, none=_clamp(none), forced=forced,
                 seen=seen, hires=_clamp(1.0 - none), score_sum=score, ranks=ranks,
                 objective=obj)


# --------------------------------------------------------------------------
# goal score: Moser's recursion (one or several openings)
# --------------------------------------------------------------------------

@dataclass
class _ScorePlan:
    n: int
    m: int
    bars: list[array]          # bars[r][k]: bar with r openings left, k to come after
    forced: list[array]        # forced[r][k]: 1 if the stage takes anyone
    value: float               # V_{n,m}


def score_bars(n: int, m: int, p: float, c: float, must: bool,
               dist: ScoreDistribution) -> _ScorePlan:
    """Moser's recursion with declines, cost and m openings.  O(N m)."""
    bars = [array("d", [0.0] * n) for _ in range(m + 1)]
    forced = [array("b", [0] * n) for _ in range(m + 1)]
    V = [0.0] * (m + 1)           # V[r] = V_{k, r} for the current k (to come)
    mean = dist.mean
    for k in range(0, n):
        # stage with k candidates after it; compute V_{k+1, r} from V_{k, .}
        newV = [0.0] * (m + 1)
        for r in range(1, m + 1):
            if must and k < r:
                forced[r][k] = 1
                bars[r][k] = -math.inf
                newV[r] = -c + p * (mean + V[r - 1]) + (1.0 - p) * V[r]
            else:
                D = V[r] - V[r - 1]
                bars[r][k] = D
                newV[r] = -c + V[r] + p * dist.excess(D)
        V = newV
    return _ScorePlan(n=n, m=m, bars=bars, forced=forced, value=V[m])


def _score_values_at(n: int, m: int, p: float, c: float, must: bool,
                     dist: ScoreDistribution, k_target: int) -> list[float]:
    """V_{k_target, r} for r = 0..m (value with k_target candidates to come)."""
    V = [0.0] * (m + 1)
    mean = dist.mean
    for k in range(0, k_target):
        newV = [0.0] * (m + 1)
        for r in range(1, m + 1):
            if must and k < r:
                newV[r] = -c + p * (mean + V[r - 1]) + (1.0 - p) * V[r]
            else:
                D = V[r] - V[r - 1]
                newV[r] = -c + V[r] + p * dist.excess(D)
        V = newV
    return V


def _partial_above(dist: ScoreDistribution, x: float) -> float:
    """E[X; X > x], from x directly (keeps precision for a bar deep in the upper
    tail of a normal)."""
    if x == -math.inf:
        return dist.mean
    if isinstance(dist, Normal):
        z = (x - dist.mu) / dist.sd
        return dist.mu * norm_sf(z) + dist.sd * norm_pdf(z)
    return dist.tail_mean(dist.cdf(x))


def _bar_quantile(dist: ScoreDistribution, x: float) -> tuple[float, float]:
    """(F(x), 1 - F(x)) with precision in the upper tail."""
    if x == -math.inf:
        return 0.0, 1.0
    if isinstance(dist, Normal):
        z = (x - dist.mu) / dist.sd
        return norm_cdf(z), norm_sf(z)
    u = dist.cdf(x)
    return u, 1.0 - u


def _eval_score_plan(plan: _ScorePlan, p: float, c: float, dist: ScoreDistribution,
                     want_best: bool) -> _Perf:
    """Forward evaluation of the goal-score rule.  O(N m)."""
    n, m = plan.n, plan.m
    # prob[r][f]: chance of meeting the stage with r openings left, f = 1 if a forced
    # hire happened already
    prob = [[0.0, 0.0] for _ in range(m + 1)]
    prob[m][0] = 1.0
    score = 0.0
    seen = 0.0
    hires = 0.0
    for i in range(1, n + 1):
        k = n - i
        new = [[0.0, 0.0] for _ in range(m + 1)]
        new[0] = prob[0][:]
        for r in range(1, m + 1):
            pr0, pr1 = prob[r]
            tot = pr0 + pr1
            if tot <= 0.0:
                continue
            seen += tot
            fz = plan.forced[r][k]
            if fz:
                bq, bqc = 0.0, 1.0
            else:
                bq, bqc = _bar_quantile(dist, plan.bars[r][k])
            hp = p * bqc
            hires += tot * hp
            score += tot * p * (_partial_above(dist, -math.inf if fz else plan.bars[r][k])
                                if bqc > 0.0 else 0.0)
            stay = 1.0 - hp
            if fz:
                new[r - 1][1] += tot * hp
            else:
                new[r - 1][0] += pr0 * hp
                new[r - 1][1] += pr1 * hp
            new[r][0] += pr0 * stay
            new[r][1] += pr1 * stay
        prob = new
    none = prob[m][0] + prob[m][1]
    forced_any = sum(prob[r][1] for r in range(m + 1))
    success = best_reg = None
    if want_best and m == 1 and n <= SCORE_BEST_MAX:
        bars_u = [0.0 if plan.forced[1][n - i] else _bar_quantile(dist, plan.bars[1][n - i])[0]
                  for i in range(1, n + 1)]
        tot_best, last_best = _r1_best(n, bars_u, p)
        success = tot_best
        best_reg = tot_best - (last_best if plan.forced[1][0] else 0.0)
    return _Perf(success=success, best_reg=best_reg, none=_clamp(none),
                 forced=_clamp(forced_any), seen=seen, hires=hires, score_sum=score,
                 ranks=None, objective=score - c * seen)


def _r1_best(n: int, bars: Sequence[float], p: float) -> tuple[float, float]:
    """(P(hire is the overall best), the part from stage n) for "offer to anyone with
    quantile >= bars[i-1] at stage i".  The integrand sum_i [a_i <= u] prod_{j<i}
    (u - p (u - a_j)^+) u^(n-i) is a polynomial of degree n-1 between consecutive
    bars; Gauss-Legendre on pieces where u^(n-1) changes by less than e^0.5,
    Horner over the stages at each node.  O(N^2)."""
    pts = sorted(set([0.0, 1.0] + [min(max(x, 0.0), 1.0) for x in bars]))
    tot = 0.0
    last = 0.0
    P = max(1, n - 1)
    for ci in range(len(pts) - 1, 0, -1):
        c0, d0 = pts[ci - 1], pts[ci]
        h = d0
        while h > c0:
            step = h / (P + 2.0)
            lo = max(c0, h - step)
            mid = 0.5 * (lo + h)
            half = 0.5 * (h - lo)
            s_t = 0.0
            s_l = 0.0
            for x, w in zip(_GLX, _GLW):
                u = mid + half * x
                # Horner from the last stage back
                pw = 1.0
                acc = 1.0 if bars[n - 1] <= u else 0.0
                accn = acc
                for i in range(n - 1, 0, -1):
                    pw *= u
                    aj = bars[i - 1]
                    hj = u - p * (u - aj) if u > aj else u
                    acc = (pw if aj <= u else 0.0) + hj * acc
                    accn = hj * accn
                s_t += w * acc
                s_l += w * accn
            tot += s_t * half
            last += s_l * half
            h = lo
            if h > c0 and _pow(h, n) <= 1e-17 * tot:
                break
        if tot > 0 and _pow(c0, n) <= 1e-17 * tot:
            break
    return _clamp(p * tot), _clamp(p * last)


# --------------------------------------------------------------------------
# validation of combinations
# --------------------------------------------------------------------------

def _check(s: Scenario) -> int:
    if not isinstance(s.pool, FixedPool):
        raise ScenarioError("pool", "scores with an uncertain pool size is not supported; "
                                    "give a fixed pool size (pool.size)")
    n = s.pool.size
    if n > 100_000:
        raise ScenarioError("pool.size", f"got {n:,}; with scores the pool can have at most "
                                         "100,000 candidates")
    g = s.goal.type
    if g not in ("best", "score"):
        raise ScenarioError("goal.type", f"got {g!r}; with scores the goals are \"best\" "
                                         "(hire the overall best) and \"score\" (largest "
                                         "expected score)")
    if g == "best" and s.openings > 1:
        raise ScenarioError("openings", f"got {s.openings}; with scores and goal \"best\" "
                                        "only one opening is supported (use goal \"score\" "
                                        "for several)")
    if g == "best" and s.cost_per_candidate > 0.0:
        raise ScenarioError("cost_per_candidate",
                            f"got {s.cost_per_candidate:g}; with scores and goal \"best\" a "
                            "cost per candidate is not supported (the exact rule would "
                            "have to weigh ending the search by an offer to someone who is "
                            "not the best so far); use 0, or goal \"score\" with the cost in "
                            "score units")
    if g == "score" and n * s.openings > OPENINGS_WORK_MAX:
        raise ScenarioError("openings", f"got {s.openings}; pool size x openings may be at "
                                        f"most {OPENINGS_WORK_MAX:,} "
                                        f"({n:,} x {s.openings} is too many)")
    for i, c in enumerate(s.compare):
        if c.kind == "start_share":
            raise ScenarioError(f"compare.{i}.start_share", "this rule needs a time window "
                                "(pool.window); with scores use skip, skip_share or "
                                "score_at_least")
    return n


# --------------------------------------------------------------------------
# words
# --------------------------------------------------------------------------

def _decimals(dist: ScoreDistribution) -> int:
    if isinstance(dist, Uniform):
        scale = dist.width
    elif isinstance(dist, Normal):
        scale = dist.sd
    else:
        lo, hi = dist.support
        scale = (hi - lo) / 4.0
    if not scale > 0:
        return 2
    return int(min(6, max(0, 2 - math.floor(math.log10(scale)))))


def _fmt(x: float, dec: int) -> str:
    return f"{x:,.{dec}f}"


def _words_best(n: int, bars: list[float | None], dec: int, must: bool, p: float) -> str:
    if n == 1:
        w = "Make an offer to the only candidate."
        return w
    first = bars[0]
    last_reg = bars[n - 2] if n >= 2 else None
    w = ("Make an offer to a candidate who beats everyone so far and scores at least "
         f"{_fmt(first, dec)} at stage 1")
    if n >= 3 and last_reg is not None:
        w += f"; the bar falls to {_fmt(last_reg, dec)} by stage {n - 1:,}"
    w += "; at the last stage, to anyone who beats everyone so far."
    if p < 1.0:
        w += " If an offer is declined, keep going with the same bars."
    if must:
        w += " If nobody has been hired by the last candidate, take the last one."
    return w


def _words_score(n: int, plan: _ScorePlan, dec: int, must: bool, p: float) -> str:
    m = plan.m
    b = plan.bars[m]
    fz = plan.forced[m]
    reg = [b[n - i] for i in range(1, n + 1) if not fz[n - i]]
    what = "a candidate" if m == 1 else "each candidate"
    if not reg:
        w = "Make an offer to every candidate (each one is needed)."
        return w
    w = f"Make an offer to {what} who scores at least {_fmt(reg[0], dec)} at stage 1"
    if len(reg) >= 2:
        w += f"; the bar falls to {_fmt(reg[-1], dec)} by stage {len(reg):,}"
    if must:
        if m == 1:
            w += "; at the last stage take anyone (a hire is required)"
        else:
            w += "; near the end, when every remaining candidate is needed to fill the " \
                 "openings, take anyone"
    else:
        w += " (a search that ends with no hire scores 0)"
    w += "."
    if m > 1:
        w += (f" The bars shown are for {m} openings still open; each hire lowers the "
              "number of openings and raises the bar.")
    if p < 1.0:
        w += " If an offer is declined, keep going with the same bars."
    return w


# --------------------------------------------------------------------------
# solve
# --------------------------------------------------------------------------

def _compare(s: Scenario, n: int, dist: ScoreDistribution, goal: str) -> list[RuleResult]:
    out = []
    p = s.accept_probability
    must = s.must_hire
    c = s.cost_per_candidate
    for i, rule in enumerate(s.compare):
        if rule.kind in ("skip", "skip_share"):
            if rule.kind == "skip":
                r = int(rule.value)
                if r > n - 1:
                    raise ScenarioError(f"compare.{i}.skip", f"got {r:,}; expected a whole "
                                        f"number from 0 to {n - 1:,} (pool size minus one)")
                name = f"skip {r:,}"
                rd = {"skip": r}
                lead = f"Pass on the first {r:,}" if r else ""
            else:
                r = min(n - 1, int(math.floor(rule.value * n)))
                pct = f"{rule.value * 100:.4g}%"
                name = f"skip {pct}"
                rd = {"skip_share": rule.value}
                lead = f"Skip {pct} of the pool (the first {r:,})"
            target = ("each candidate better than everyone before until one accepts"
                      if p < 1.0 else "the first candidate better than everyone before")
            desc = (f"{lead}, then make an offer to {target}." if r
                    else f"Make an offer to {target} (starting with the first candidate).")
            if must:
                desc += " If nobody has been hired by the last candidate, take the last one."
            a, ac = _skip_bars(n, r)
            pf = _eval_record_rule(n, a, ac, p, must, dist, rank_based=True)
            if goal == "score":
                pf.objective = (pf.score_sum if pf.score_sum is not None else math.nan) \
                    - c * pf.seen
            out.append(_result(n, name, desc, rd, pf, c))
        elif rule.kind == "score_at_least":
            v = rule.value
            dec = _decimals(dist)
            desc = f"Make an offer to the first candidate who scores at least {_fmt(v, dec)}"
            desc += " (if one declines, the next one who does)." if p < 1.0 else "."
            if must:
                desc += " If nobody has been hired by the last candidate, take the last one."
            pf = _eval_constant(n, v, p, must, dist, goal, c)
            out.append(_result(n, f"score at least {_fmt(v, dec)}", desc,
                               {"score_at_least": v}, pf, c))
        else:  # pragma: no cover - _check refuses start_share
            raise ScenarioError(f"compare.{i}.{rule.kind}", "not supported with scores")
    return out


def solve_fullinfo(s: Scenario) -> SolveResult:
    """Solve a scenario with scores (see the module docstring)."""
    n = _check(s)
    assert s.scores is not None
    dist = from_scores(s.scores)
    p = s.accept_probability
    must = s.must_hire
    c = s.cost_per_candidate
    goal = s.goal.type
    dec = _decimals(dist)
    notes: list[str] = [
        f"Assumes every candidate's score is an independent draw from a known "
        f"distribution ({dist.describe()}) and that you see the score before deciding.",
    ]
    warnings: list[str] = []
    if dist.warning:
        warnings.append(dist.warning)
    limits: list[Limit] = []
    if goal == "best":
        a, ac = best_bars(n, p)
        zs = _bar_z(dist, a, ac)
        pf = _eval_record_rule(n, a, ac, p, must, dist, rank_based=False, zs=zs)
        score_thr: list[float | None] = []
        for t in range(1, n + 1):
            if a[t] <= 0.0:
                score_thr.append(None)
            elif isinstance(dist, Normal):
                score_thr.append(dist.mu + dist.sd * zs[t])
            else:
                score_thr.append(dist.quantile(a[t]))
        words = _words_best(n, score_thr, dec, must, p)
        thresholds = [1] * n
        policy = Policy(thresholds=thresholds, groups=group_thresholds(thresholds),
                        words=words, skip=None, score_thresholds=score_thr, interval=True)
        if p == 1.0:
            limits.append(Limit("success_probability", FULL_INFO_LIMIT,
                                "full-information best choice, large N: 0.580164 "
                                "(Gilbert & Mosteller 1966; Samuels 1991)"))
        else:
            notes.append("With declines the bars solve sum_y C(k,y) z^y rho_y = 1 "
                         "(z = 1/bar - 1), the full-information form of Smith (1975).")
        if pf.score_sum is None:
            notes.append("The expected score of the hire is not computed when offers can be "
                         "declined (no exact short form for these scores).")
        if pf.ranks is None:
            notes.append("The rank table is not computed when offers can be declined and the "
                         "last candidate must be taken (the forced hire's rank has no exact "
                         "short form here).")
        method = ("full-information best choice (Gilbert & Mosteller 1966): decision "
                  "numbers by Newton's method O(N), exact performance in the binomial "
                  "basis O(N x 19), expected score by Gauss-Legendre O(N)")
        name = "optimal"
    else:
        m = s.openings
        plan = score_bars(n, m, p, c, must, dist)
        pf = _eval_score_plan(plan, p, c, dist, want_best=True)
        score_thr = []
        for i in range(1, n + 1):
            k = n - i
            score_thr.append(None if plan.forced[m][k] else float(plan.bars[m][k]))
        by_open = None
        if m > 1:
            by_open = {str(r): [None if plan.forced[r][n - i] else float(plan.bars[r][n - i])
                                for i in range(1, n + 1)] for r in range(1, m + 1)}
        thresholds = [n] * n
        policy = Policy(thresholds=thresholds, groups=group_thresholds(thresholds),
                        words=_words_score(n, plan, dec, must, p), skip=None,
                        score_thresholds=score_thr, interval=True,
                        thresholds_by_openings_left=({str(r): [n] * n
                                                      for r in range(1, m + 1)}
                                                     if m > 1 else None))
        if by_open is not None:
            policy.score_thresholds_by_openings_left = by_open
        notes.append("Relative-rank thresholds are N at every stage: any candidate whose "
                     "score clears the bar can be hired, whatever their rank so far.")
        if not must:
            notes.append("A search that ends with no hire scores 0 (in the units of the "
                         "scores).")
        if m > 1:
            notes.append("With several openings the rule maximises the expected total score "
                         "of the hires; expected_score is that total given at least one "
                         "hire.")
        if pf.success is None:
            if m > 1:
                notes.append("The chance of hiring the overall best and the rank of the "
                             "hires are not computed with several openings.")
            else:
                notes.append(f"The chance that the hire is the overall best is computed "
                             f"exactly for pools up to {SCORE_BEST_MAX:,}; it is left out "
                             f"here.")
        notes.append("The rank distribution of the goal-score rule is not computed.")
        if isinstance(dist, Uniform) and m == 1 and p == 1.0 and c == 0.0 and n >= 2:
            approx = dist.low + dist.width * (1.0 - 2.0 / (n + math.log(n) + 1.767))
            limits.append(Limit("expected_score", approx,
                                "uniform scores, large N: low + (high - low)(1 - 2/(N + "
                                "ln N + 1.767)) (Gilbert & Mosteller 1966; an asymptotic "
                                "approximation, within 2e-8 of the exact value at N = "
                                "1,000)"))
        method = ("full-information expected score (Moser 1956): backward recursion "
                  f"O(N m), forward evaluation O(N m)"
                  + (", chance of the best O(N^2)" if pf.success is not None else ""))
        name = "optimal"
    if c > 0.0:
        notes.append("Values subtract the cost of every candidate seen, including the hire.")
    optimal = _result(n, name, "The optimal rule: " + policy.words, {"optimal": True}, pf, c)
    compare = _compare(s, n, dist, goal)
    return SolveResult.from_rule(scenario=s.to_dict(), goal=goal, policy=policy,
                                 optimal=optimal, compare=compare, curve=None, limits=limits,
                                 notes=notes, warnings=warnings, method=method)


def _q_user(dist: ScoreDistribution, u: float, uc: float) -> float:
    if isinstance(dist, Normal):
        return dist.mu + dist.sd * dist_q(u, uc)
    return dist.quantile(u)


# --------------------------------------------------------------------------
# advice
# --------------------------------------------------------------------------

def advise_fullinfo(s: Scenario, state: SearchState) -> Advice:
    """The optimal decision for the newest candidate from the actual state.

    Goal best: only the stage and the best score so far matter; offering to a
    best-so-far with quantile u is worth p u^k + (1-p) W and passing W, where W
    is the exact chance of success from "maximum u after this stage" under the
    optimal bars (computed by the same machinery, O((N - i) x 17)).  Goal
    score: the values V_{k,r} of Moser's recursion, O(N m)."""
    n = _check(s)
    assert s.scores is not None
    dist = from_scores(s.scores)
    p = s.accept_probability
    must = s.must_hire
    c = s.cost_per_candidate
    i = state.stage
    k = n - i
    r = state.openings_left
    x = state.newest.score
    assert x is not None
    dec = _decimals(dist)
    notes: list[str] = []
    if dist.warning:
        notes.append(dist.warning)
    seen_txt = f"stage {i:,} of {n:,}"
    xs = _fmt(x, dec)
    if s.goal.type == "best":
        a, ac = best_bars(n, p)
        before = state.best_score_before
        is_rec = before is None or x > before
        bar_u = a[i]
        bar = None if bar_u <= 0.0 else _q_user(dist, bar_u, ac[i])
        u, uc = _bar_quantile(dist, x)
        forced = must and i == n
        if is_rec:
            wv = _r2_win_from(n, a, ac, p, i, u, uc)
            payoff = _pow(u, k) if k > 0 else 1.0
            if isinstance(dist, Normal) and k > 0:
                payoff = math.exp(k * math.log1p(-uc)) if uc < 1.0 else 0.0
            offer_v = p * payoff + (1.0 - p) * wv
            pass_v = wv
            plan_offer = (u >= bar_u) or i == n
        else:
            mu, muc = _bar_quantile(dist, before)  # type: ignore[arg-type]
            wv = _r2_win_from(n, a, ac, p, i, mu, muc)
            offer_v = (1.0 - p) * wv
            pass_v = wv
            plan_offer = False
        decision = "offer" if (plan_offer or forced) else "pass"
        cmp_txt = (f"{offer_v:.1%} chance this is the best if you offer vs {pass_v:.1%} if "
                   "you pass")
        bar_txt = (f"today's bar of {_fmt(bar, dec)}" if bar is not None
                   else "today's bar (any best so far)")
        if not is_rec:
            if forced:
                reason = (f"score {xs} at {seen_txt} does not beat the best so far "
                          f"({_fmt(before, dec)}), but this is the last candidate and a "
                          "hire is required: offer.")
            else:
                reason = (f"score {xs} at {seen_txt} does not beat the best so far "
                          f"({_fmt(before, dec)}), so this cannot be the overall best: "
                          f"pass ({cmp_txt}).")
        elif decision == "offer":
            reason = (f"score {xs} at {seen_txt} beats everyone so far and clears "
                      f"{bar_txt}: offer — {cmp_txt}.")
        else:
            reason = (f"score {xs} at {seen_txt} beats everyone so far but is below "
                      f"{bar_txt}: pass — {cmp_txt}.")
        return Advice(decision=decision, reason=reason, stage=i, openings_left=r,
                      value_kind="success_probability", offer_value=_clamp(offer_v),
                      pass_value=_clamp(pass_v), threshold=1, score_threshold=bar,
                      plan_decision="offer" if (plan_offer or forced) else "pass",
                      notes=notes)
    # goal score
    m = s.openings
    V = _score_values_at(n, m, p, c, must, dist, k)
    forced = must and k < r
    bar = None if forced else V[r] - V[r - 1]
    offer_v = p * (x + V[r - 1]) + (1.0 - p) * V[r]
    pass_v = V[r]
    plan_offer = forced or (bar is not None and x >= bar)
    decision = "offer" if plan_offer else "pass"
    cmp_txt = (f"expected {'net ' if c > 0 else ''}score from here {_fmt(offer_v, dec)} if "
               f"you offer vs {_fmt(pass_v, dec)} if you pass")
    if forced:
        reason = (f"score {xs} at {seen_txt}: every remaining candidate is needed for a "
                  f"hire, so offer — {cmp_txt}.")
    elif plan_offer:
        reason = (f"score {xs} at {seen_txt} clears today's bar of {_fmt(bar, dec)}: "
                  f"offer — {cmp_txt}.")
    else:
        reason = (f"score {xs} at {seen_txt} is below today's bar of {_fmt(bar, dec)}: "
                  f"pass — {cmp_txt}.")
    if c > 0:
        notes.append("Values subtract the cost of the candidates still to come.")
    if m > 1:
        notes.append("Values are expected totals of the scores still to be hired.")
    return Advice(decision=decision, reason=reason, stage=i, openings_left=r,
                  value_kind="expected_score", offer_value=offer_v, pass_value=pass_v,
                  threshold=n, score_threshold=bar, plan_decision=decision, notes=notes)
