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
Robbins & Siegmund 1971.)  With w = k z_k and eps = 1/k, (GM) reads
sum_y rho_y w^y/y! prod_{i<y} (1 - i eps) = 1, whose root w(eps) is analytic
near eps = 0 (w(0) = c = 0.80435... for p = 1, the root of
int_0^c (e^t - 1)/t dt = 1).  b_k is found by Newton's method for k < 24
(24 max(1, w(0)) with declines) and, from there on, from the Taylor
polynomial of w(eps) (degree <= 12, coefficients by Cauchy's integral on a
circle, checked against Newton at two k; :func:`_w_taylor`), exact to
rounding: O(1) per k, about 10 list passes for all N bars.

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
of the two tails of Bin(N, .); that is exact to rounding and much cheaper.  The
width of such an interval is taken from the complements 1 - a, which keep
their relative precision near 1.)  For the optimal bars the stage sums are
not formed stage by stage: the contribution of the stage with K later
candidates is an analytic function of a real K, and the Euler-Maclaurin
summation formula in Gregory's form (the integral over K by Gauss-Legendre,
plus end corrections from differences of exact stage values) gives the sum
over K >= 24 from about 100 stage evaluations, exact to rounding (see the
block comment before :func:`_em_points`); the last stages (K < 24; for N
below about 2,000, K below an L >= sqrt(10 w N) chosen from the size of the
first left-out end correction, about 100 to 190 stages) and the first one are
summed directly, and N below about 200 (more with small p) stage by stage.  The skip rules have a single stage whose
kernel falls like (K/(N-1))^y, so it is cut where that is below e^-52.
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
not a closed form; the tests check it against scipy to 1e-13.  For the
optimal bars the same summation formula sums the stages (in u for every
distribution; sample scores only from the stage where the bars clear the top
kink of psi, the stages below directly).  With
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
O(N m), one evaluation of P(X > D), E[X; X > D] and E[(X - D)^+] together
per stage and opening (:meth:`ScoreDistribution.upper_parts`), which the
forward evaluation reuses (for one opening the chance of reaching each stage
is a running product).  The chance that the hire is the overall best (one
opening) is sum_i int_{a_i}^1 prod_{j<i} (u - p (u - a_j)^+) u^(N-i) du, a
piecewise polynomial integral with no short form: it is computed exactly
(Gauss-Legendre on the pieces between bars, Horner over the stages, O(N^2))
for N <= :data:`SCORE_BEST_MAX`.  For larger N, and for several openings
(where the best hire's rank needs the joint law of the hires), it is not
computed: ``success_probability`` is None and ``outcome.best`` /
``outcome.other`` are NaN (null in JSON; their sum 1 - none - forced_last is
known, the split is not).  An O(N) exact form would need the product over
earlier stages inside the integral handled like the stage sums of goal best;
not done.  The rank distribution of the goal-score rule is not computed
(None).

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

Complexity (N candidates, m openings): goal best O(N) list passes for the
bars and the score thresholds (about 10, plus one erfc and one exp per stage
for normal scores, :func:`_upper_z_chain`), and about 130 stage evaluations of
O(19) each for every output including the expected score (O(N x 19) when N
< 200); goal score O(N m), plus O(N^2) for the chance of the best when N <=
SCORE_BEST_MAX; each compared rule O(N) (a skip rule: one stage of O(N) plus
a kernel of about 50/log(1/share) terms).

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
6.6.4 and 26.5.24 (incomplete beta function and binomial tails), 23.1.30
(the Euler-Maclaurin summation formula).
Hildebrand, F. B. (1956). *Introduction to Numerical Analysis.* McGraw-Hill,
section 5.9 (Gregory's formula: the end corrections in differences; from
memory).
Trefethen, L. N. & Weideman, J. A. C. (2014). The exponentially convergent
trapezoidal rule. *SIAM Review* 56, 385-458 (the error exp(-2 pi d) for
functions analytic in a strip; from memory).
Lyness, J. N. & Moler, C. B. (1967). Numerical differentiation of analytic
functions. *SIAM J. Numer. Anal.* 4, 202-210 (Taylor coefficients from
Cauchy's integral by the trapezoid rule; from memory).
"""

from __future__ import annotations

import bisect
import math
from array import array
from dataclasses import dataclass
from itertools import accumulate, compress, repeat
from operator import add, lt, mul, sub, truediv
from typing import Callable, Sequence

from .advise import Advice, SearchState
from .distributions import (Normal, Sample, ScoreDistribution, Uniform, from_scores,
                            norm_cdf, norm_pdf, norm_ppf, norm_sf)
from .errors import ScenarioError
from .results import (TOP_COUNTS, TOP_SHARES, Limit, Outcome, Policy, RankDistribution,
                      RuleResult, SolveResult, StageGroup)
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


def _zero_one(a: Sequence[float]) -> bool:
    """All bars are 0 or 1 (C-speed counts)."""
    return a.count(1.0) + a.count(0.0) == len(a)  # type: ignore[attr-defined]


def _live_stages(a: Sequence[float], ac: Sequence[float], t0: int, n: int) -> list[int]:
    """The stages t in t0..n where something can happen under non-increasing bars:
    the bar falls (a[t] < a[t-1]) or the previous bar is strictly inside (0, 1).
    Bars of only 0 and 1 (the skip rules) are recognised by counting (C-speed):
    then the only such stage is the one where the bar drops."""
    seg = a[t0 - 1:n + 1]
    ones = seg.count(1.0)
    if ones + seg.count(0.0) == len(seg):
        drop = t0 - 1 + ones        # a[t0-1 .. drop-1] are 1, a[drop ..] are 0
        return [drop] if t0 <= drop <= n else []
    rng = range(t0, n + 1)
    return sorted(set(compress(rng, map(lt, a[t0:n + 1], a[t0 - 1:n])))
                  | {t for t, c in zip(rng, ac[t0 - 1:n]) if 0.0 < c < 1.0})


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
        """Extend every list past index n (running products by accumulate)."""
        p = self.p
        rho, pi, Pi, al, be = self.rho, self.pi, self.Pi, self.alpha, self.beta
        if len(rho) <= n:
            y0 = len(rho)
            rho.extend(accumulate([(y - p) / y for y in range(y0, n + 1)], mul,
                                  initial=rho[-1]))
            del rho[y0]     # the initial value is already there
        if len(pi) <= n:
            y0 = len(pi)
            new = list(accumulate([(y - p) / y for y in range(y0, n + 1)], mul,
                                  initial=pi[-1]))[1:]
            pi.extend(new)
            Pi.extend(list(accumulate(new, add, initial=Pi[-1]))[1:])
        if len(al) <= n + 1:
            a0 = len(al) - 1
            al.extend(accumulate([a / (a + 1.0 - p) for a in range(a0, n + 1)], mul,
                                 initial=al[-1]))
            del al[a0 + 1]
        if len(be) <= n + 2:
            b0 = len(be) - 1
            be.extend(accumulate([(b - p) / b for b in range(b0, n + 2)], mul,
                                 initial=be[-1]))
            del be[b0 + 1]


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


# The decision numbers in the variable eps = 1/k: with w = k z, C(k,y) z^y =
# w^y/y! prod_{i<y} (1 - i eps), so (GM) reads
#
#     Phi(w, eps) = sum_{y>=1} rho_y w^y/y! prod_{i=1}^{y-1} (1 - i eps) = 1,      (GMe)
#
# a series that stops at y = k for eps = 1/k and is analytic in eps near 0 for
# any eps (the products are polynomials in eps; the terms fall like w^y/y!).  Its
# root w(eps) is analytic near eps = 0 (implicit function theorem: dPhi/dw > 0),
# with the singularities at |eps| of order 1/w(0) or more.

_W_DEG = 12          # Taylor degree kept: (eps/R)^13 < 1e-18 for k >= kmin
_W_NODES = 32        # points on the Cauchy circle
_W_CACHE: dict[float, tuple[list[float], int]] = {}


def _w_series(w: complex | float, eps: complex | float, rho: list[float]
              ) -> tuple[complex | float, complex | float]:
    """Phi(w, eps) - 1 and dPhi/dw, summed until the terms fall below 1e-22 of the
    sum (and past the largest term)."""
    t = w
    s = t * rho[1]
    ds = rho[1]
    mag = abs(w)
    y = 1
    while True:
        y += 1
        t = t * w * (1.0 - (y - 1) * eps) / y
        term = t * rho[y]
        s += term
        ds += term * y / w
        if y > mag + 3.0 and abs(term) <= 1e-22 * abs(s):
            return s - 1.0, ds
        if y + 2 >= len(rho):
            raise ArithmeticError("series of the decision numbers did not converge")


def _w_solve(eps: complex | float, rho: list[float], w0: complex | float
             ) -> complex | float:
    """The root w(eps) of (GMe) by Newton's method from w0 (quadratic convergence;
    stops when a step is below 1e-15 of w, after which the error is below 1e-30)."""
    w = w0
    for _ in range(100):
        h, dh = _w_series(w, eps, rho)
        step = h / dh
        w = w - step
        if abs(step) <= 1e-15 * abs(w):
            h, dh = _w_series(w, eps, rho)
            return w - h / dh
    raise ArithmeticError("Newton's method for a decision number did not converge")


def _w_taylor(p: float) -> tuple[list[float], int]:
    """(a, kmin): the Taylor coefficients a_0..a_12 of w(eps) at eps = 0 and the
    smallest k from which they are used.  Cauchy's integral on the circle |eps| = r,
    r = 1/(4 max(1, w_0)), by the trapezoid rule on 32 points (aliasing error
    (r/R)^32 < 1e-19 for the radius of convergence R > 4r; conjugate symmetry
    halves the work), each point solved by Newton from its neighbour.  Used for
    k >= kmin = 24 max(1, w_0), where (eps/R)^13 < 1e-18 and the rounding of a_j,
    about 1e-16 r^-j, is damped by (eps/r)^j <= 6^-j.  Checked against the exact
    root at eps = 1/kmin and 1/(2 kmin); if either differs by more than 2e-15
    (relative) the caller falls back to Newton for every k.  Cached per p."""
    hit = _W_CACHE.get(p)
    if hit is not None:
        return hit
    co = _Coef(p)
    co.grow(400)
    rho = co.rho
    w0 = float(_w_solve(0.0, rho, math.log1p(1.0 / p)))
    big = max(1.0, w0)
    r = 0.25 / big
    M = _W_NODES
    vals: list[complex] = []
    w: complex = complex(w0)
    for j in range(M // 2 + 1):
        e = r * complex(math.cos(2.0 * math.pi * j / M), math.sin(2.0 * math.pi * j / M))
        w = complex(_w_solve(e, rho, w))
        vals.append(w)
    full = vals + [v.conjugate() for v in reversed(vals[1:M // 2])]
    coef = []
    for k in range(_W_DEG + 1):
        s = 0.0
        for j, v in enumerate(full):
            ang = -2.0 * math.pi * j * k / M
            s += v.real * math.cos(ang) - v.imag * math.sin(ang)
        coef.append(s / M / r ** k)
    kmin = int(math.ceil(24.0 * big))
    ok = True
    for k in (kmin, 2 * kmin):
        ex = float(_w_solve(1.0 / k, rho, w0))
        ap = _horner(coef, 1.0 / k)
        if abs(ap - ex) > 2e-15 * ex:
            ok = False
    out = (coef, kmin if ok else 1 << 60)
    _W_CACHE[p] = out
    return out


def _horner(c: Sequence[float], x: float) -> float:
    s = 0.0
    for v in reversed(c):
        s = s * x + v
    return s


def decision_numbers(n: int, p: float = 1.0) -> tuple[list[float], list[float]]:
    """(b, bc): b[k] = the decision number with k candidates to come, k = 0..n-1
    (b[0] = 0), bc[k] = 1 - b[k] kept separately for precision.

    With w = k z_k (z = 1/b - 1), (GM) is (GMe) at eps = 1/k.  For k below
    kmin (24 when p = 1) each root is found by Newton's method on (GMe) from
    the previous one; from kmin on, w is the Taylor polynomial of the analytic
    root w(eps) (see :func:`_w_taylor`; error below 1e-17 relative), evaluated
    for all k at once: z = w/k = eps (a_0 + a_1 eps + ...), b = 1/(1 + z),
    1 - b = z/(1 + z).  O(1) per k, O(N) in all (about 10 list passes)."""
    bd, bcd = _bars_desc(n, p)
    return bd[::-1], bcd[::-1]


def _bars_desc(n: int, p: float) -> tuple[list[float], list[float]]:
    """The decision numbers for k = n-1 down to 0 (stage order: stage t has
    k = n - t), see :func:`decision_numbers`.  The Taylor polynomial is cut, in
    ranges [k/8, k] from the top, to the fewest terms whose tail
    sum_{i>d} |a_i| k^-i is below 1e-19 a_0 at the bottom of the range."""
    if n <= 1:
        return [0.0], [1.0]
    coef, kmin = _w_taylor(p)
    co = _Coef(p)
    co.grow(400)
    w = _horner(coef, 0.0)
    top = min(n, kmin)
    small_b = [0.0] * top
    small_bc = [1.0] * top
    for k in range(1, top):
        w = float(_w_solve(1.0 / k, co.rho, w if k > 1 else 1.0 / p))
        small_b[k] = k / (k + w)
        small_bc[k] = w / (k + w)
    small_b.reverse()
    small_bc.reverse()
    bd: list[float] = []
    bcd: list[float] = []
    hi = n - 1
    while hi >= kmin:
        lo_k = max(kmin, (hi + 1) // 8)
        d = len(coef) - 1
        while d > 0 and sum(abs(c) * float(lo_k) ** -i for i, c in enumerate(coef)
                            if i >= d) <= 1e-19 * abs(coef[0]):
            d -= 1
        eps = list(map(truediv, repeat(1.0), range(hi, lo_k - 1, -1)))
        if d == 0:
            acc = [coef[0]] * len(eps)
        else:
            acc = list(map(add, map(mul, eps, repeat(coef[d])), repeat(coef[d - 1])))
            for c in reversed(coef[:d - 1]):
                acc = list(map(add, map(mul, acc, eps), repeat(c)))
        z = list(map(mul, acc, eps))                 # z = w/k
        bk = list(map(truediv, repeat(1.0), map(add, z, repeat(1.0))))
        bd.extend(bk)
        bcd.extend(map(mul, z, bk))
        hi = lo_k - 1
    bd.extend(small_b)
    bcd.extend(small_bc)
    return bd, bcd


def _decision_numbers_newton(n: int, p: float = 1.0) -> tuple[list[float], list[float]]:
    """The decision numbers one k at a time (the reference for
    :func:`decision_numbers`, kept for the tests): (b, bc) as there.

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
    bd, bcd = _bars_desc(n, p)
    return [1.0] + bd, [0.0] + bcd


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
    # the width from the complements when they are small: 1 - u carries full
    # relative precision near 1, a difference of two numbers near 1 does not
    w = (loc - hic) if loc < 0.5 else (hi - lo)
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
    up_lo, low_lo = _tails(N0, loc, lo, Y)
    up_hi, low_hi = _tails(N0, hic, hi, Y)
    # wt_y = C(K,y)/(N0 C(N0-1,y)) = (1/N0) prod_{i<y} (K - i)/(N0 - 1 - i)
    m = min(Y, N0 - 1)
    wts = list(accumulate([(K - y) / (N0 - 1 - y) for y in range(m)], mul,
                          initial=1.0 / N0)) + [0.0] * (Y - m)
    d = [(ul - uh) if ul < 0.5 else (lh - ll)
         for ul, uh, lh, ll in zip(up_lo, up_hi, low_hi, low_lo)]
    return [w * x if x > 0.0 else 0.0 for w, x in zip(wts, d)]


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


class _Acc:
    """Sums over stages of the A-part vectors V and the cell kernels C (the
    B-part is (t-1) C), plain, times K and divided by K (K >= 1), plus the y = 0
    entries of the last stage (K = 0)."""

    __slots__ = ("SV", "SC", "SKV", "SKC", "SGV", "SGC", "last_v0", "last_c0")

    def __init__(self) -> None:
        self.SV: list[float] = []
        self.SC: list[float] = []
        self.SKV: list[float] = []
        self.SKC: list[float] = []
        self.SGV: list[float] = []
        self.SGC: list[float] = []
        self.last_v0 = 0.0
        self.last_c0 = 0.0

    def add(self, K: float, V: list[float], Bw: list[float] | None, w: float = 1.0) -> None:
        _vadd(self.SV, V, w)
        _vadd(self.SKV, V, w * K)
        if K >= 1.0:
            _vadd(self.SGV, V, w / K)
        if Bw is not None:
            _vadd(self.SC, Bw, w)
            _vadd(self.SKC, Bw, w * K)
            if K >= 1.0:
                _vadd(self.SGC, Bw, w / K)
        if K == 0:
            self.last_v0 += w * V[0]
            self.last_c0 += w * (Bw[0] if Bw is not None else 0.0)


def _stage(n: int, K: float, lo: float, loc: float, hi: float, hic: float, Y: int,
           m0: float = 0.0) -> tuple[list[float], list[float] | None]:
    """(V, C) for the stage with K candidates after it (t = n - K, e = t - 1) and the
    bar interval [lo, hi] (1 - lo = loc, 1 - hi = hic): C[y] = int_lo^hi u^e B_K(y)
    du (None if empty), V = C + hi^e int_hi^1 B_K(y) du.  K may be any real >= 0
    (the formulas are analytic in K; used by the summation formula)."""
    e = n - 1 - K
    tail_f = _pow(hi, e) if (hi > m0 and hic > 0.0) else 0.0
    if lo < hi:
        C: list[float] | None = _cell_kernel(n, K, e, lo, loc, hi, hic, Y)
        V = C[:]  # type: ignore[index]
    else:
        C = None
        V = [0.0] * (Y + 1)
    if tail_f > 0.0:
        g = tail_f / (K + 1)
        V = list(map(add, V, map(mul, _upper_tails(K + 1, hic, hi, Y), repeat(g, Y + 1))))
    return V, C


def _r2_core(n: int, a: Sequence[float], ac: Sequence[float], p: float, *,
             i0: int = 0, m0: float = 0.0, m0c: float = 1.0, win_only: bool = False,
             forced: bool = True, co: _Coef | None = None) -> _R2:
    """Exact evaluation (see the module docstring); a, ac indexed 0..n with
    a[0] = 1.  With (i0, m0): start after stage i0 with maximum m0 < a[i0+1]
    (the advice case; then only ``win`` is meaningful).  O(N x Y), Y about 19
    for the optimal bars; stages where nothing can happen (equal bars of 0 or
    1, as in the skip rules) are passed over in bulk.

    Per stage t (K = n - t later candidates) the A-part vector V[y] (first offer
    at t with y later candidates above it) and the B-part vector Bw[y] (the bar
    drops below the maximum at t, y later candidates above that maximum) are
    summed (:class:`_Acc`); the functionals of the module docstring are dot
    products of these sums with fixed coefficient vectors (:func:`_r2_finish`)."""
    co = co or _Coef(p)
    co.grow(64)
    N0 = n - i0
    acc = _Acc()
    point_done = m0 <= 0.0
    # stages that can matter: a bar interval of positive length, or a tail above
    # the previous bar (a[t-1] < 1), or the stage where the bar drops below m0
    rng = range(i0 + 1, n + 1)
    if point_done:
        ts = _live_stages(a, ac, i0 + 1, n)
    else:
        ts = list(rng)
    for t in ts:
        K = n - t
        e = t - 1 - i0
        if a[t] > m0:
            lo, loc = a[t], ac[t]
        else:
            lo, loc = m0, m0c
        hi, hic = a[t - 1], ac[t - 1]
        tail_f = _pow(hi, e) if (hi > m0 and hic > 0.0) else 0.0
        if not lo < hi and tail_f <= 0.0 and (point_done or a[t] > m0):
            continue            # nothing can happen at this stage
        Y = _ycut(K, loc)
        if 0 < K < N0 - 1 and Y > 64:
            # C[y] <= int_0^1 u^e B_K(y) du = C(K,y)/(N0 C(N0-1,y)) <= (K/(N0-1))^y/N0:
            # cut where that is below exp(-52) (skip rules: the one wide stage)
            Y = min(Y, int(52.0 / math.log((N0 - 1.0) / K)) + 16)
        V, C = _stage(N0, K, lo, loc, hi, hic, Y, m0) if lo < hi or tail_f > 0.0 \
            else ([0.0] * (Y + 1), None)
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
        if win_only:
            _vadd(acc.SV, V)
            if Bw is not None:
                _vadd(acc.SC, Bw)
        else:
            acc.add(K, V, Bw)
    return _r2_finish(n, a, p, acc, i0=i0, m0=m0, win_only=win_only, forced=forced, co=co)


def _r2_finish(n: int, a: Sequence[float], p: float, acc: _Acc, *, i0: int = 0,
               m0: float = 0.0, win_only: bool = False, forced: bool = True,
               co: _Coef) -> _R2:
    """The outputs of :func:`_r2_core` from the stage sums."""
    N0 = n - i0
    SV, SC = acc.SV, acc.SC
    L = max(len(SV), len(SC), 1)
    co.grow(L + 2)
    rho, pi, Pi = co.rho, co.pi, co.Pi
    for v in (SV, SC, acc.SKV, acc.SKC, acc.SGV, acc.SGC):
        if len(v) < L:
            v.extend([0.0] * (L - len(v)))
    win = p * SV[0] + (1.0 - p) * math.fsum(map(mul, SV[1:], rho[1:L])) \
        + math.fsum(map(mul, SC[1:], rho[1:L]))
    if win_only:
        return _R2(_clamp(win), 0.0, 0.0, [], 0.0)
    al = [1.0] + list(map(truediv, Pi[1:L], range(2, L + 1)))
    gam = [0.0] + list(map(sub, map(mul, range(1, L), pi[1:L]),
                           map(mul, range(0, L - 1), pi[0:L - 1])))
    decl = p < 1.0
    sum_v, sum_c = math.fsum(SV), math.fsum(SC)
    sum_kv, sum_kc = math.fsum(acc.SKV), math.fsum(acc.SKC)
    kal_v = _dot(acc.SKV, al) if decl else 0.0
    kal_c = _dot(acc.SKC, al)
    p_inf = _pow(a[n], N0) if a[n] > m0 else 0.0
    none_reg = p_inf + (1.0 - p) * math.fsum(map(mul, SV, pi[:L])) \
        + math.fsum(map(mul, SC, pi[:L]))
    # E_extra(x, K) = sum_y B_K(y) (K alpha_y + beta_y): later candidates seen after a
    # declined offer (or after a crossing) while every record is offered
    be = [0.0] + list(map(sub, Pi[0:L - 1],
                          map(truediv, map(mul, range(1, L), Pi[1:L]), range(2, L + 1))))
    extra_a = (kal_v + math.fsum(map(mul, SV, be))) if decl else 0.0
    seen = N0 * p_inf + N0 * sum_v - sum_kv + (1.0 - p) * extra_a \
        + N0 * sum_c - sum_kc + kal_c + math.fsum(map(mul, SC, be))
    # piJ[y] = SV[y] + sum_{y' > y} SC[y']/y'
    suf = list(accumulate(reversed(list(map(truediv, SC[1:L], range(1, L))))))
    suf.reverse()
    piJ = list(map(add, SV[:L], suf + [0.0]))
    # P(reach the last stage and the last is not a record) = E[M_{n-1}; reach n]:
    # nobody crossed a bar (M_{n-1} < a_{n-1}), or the first offer / the crossing came
    # at a stage <= n-1 and every later record up to n-1 declined.  With J' later
    # candidates above the first offer u, M_{n-1} = max(u, their max) and
    # E[M 1{all decline}] = sum_J' B_{K-1}(J') pi_J' (u + (1-u) J'/(J'+1)), which in
    # the degree-K basis has the coefficients pi_y - (y pi_y - (y-1) pi_{y-1})/K.
    fm = 0.0
    if forced and n >= 2 and i0 == 0:
        gam_v = _dot(acc.SGV, gam)
        gam_c = _dot(acc.SGC, gam)
        case1 = (n - 1) * _pow(a[n - 1], n) / n if a[n - 1] > 0.0 else 0.0
        sa = math.fsum(map(mul, SV, pi[:L])) - acc.last_v0 - gam_v
        sb = math.fsum(map(mul, SC, pi[:L])) - acc.last_c0 - gam_c
        fm = case1 + (1.0 - p) * sa + sb
    return _R2(win=_clamp(win), none_reg=_clamp(none_reg), seen=seen, piJ=piJ,
               forced_mass=_clamp(fm))


# --------------------------------------------------------------------------
# goal best: sums over the stages of the optimal rule by the Euler-Maclaurin
# (Gregory) summation formula
# --------------------------------------------------------------------------
#
# For the optimal bars a_t = b_{n-t}, the contribution f(K) of the stage with K
# candidates after it (the vectors V, C of :func:`_stage` and their products
# with K and 1/K) is an analytic function of a real K: the bars are b(K) =
# K/(K + w(1/K)) with w analytic (:func:`_w_taylor`), C(K, y) is a polynomial in
# K, and u^(n-1-K), the binomial kernels and the tails are analytic in K.  So
#
#     sum_{K=A}^{B} f(K) = int_A^B f(K) dK + f(A)/2 + f(B)/2
#                          + sum_k g_k (nabla^k f(B) + (-1)^k Delta^k f(A)),
#
# Gregory's form of the Euler-Maclaurin formula (g = 1/12, 1/24, 19/720, ...;
# e.g. Hildebrand, *Introduction to Numerical Analysis*, 1956, section 5.9,
# from memory; q = 6 differences are kept).  Its remainder (the
# Poisson-summation terms of the trapezoid rule) is of order exp(-2 pi d) for f
# analytic in a strip |Im K| < d (Trefethen & Weideman 2014); here d is of order
# K >= 24, so it is far below rounding.  The differences at B = n - 2 fall like
# n^-k (f changes on the scale of n there).  At the lower end either the stage
# mass, about exp(-w (n-1-A)/A), is below exp(-52) of the total (long pools:
# the terms at A are left out and the integral stops where the mass is that
# small), or A >= sqrt(10 w n), where f changes by less than e^0.1 per unit K
# and the differences at A fall like 0.11^k (:func:`_em_points`).  The
# integral is done by Gauss-Legendre on geometric pieces.  About 100 stage
# evaluations replace n; the first stage and the stages K < A are summed
# directly (exact bars).  The tests compare with the direct sum to 1e-13.
# Requirement for the exactness: every stage value must be smooth in K to
# rounding, which is why interval widths are computed from the complements
# (:func:`_cell_kernel`) -- a width taken as the difference of two numbers near 1
# carries a relative error of 1e-16/width (1e-8 at K = 10^4).

_GREGORY = (1.0 / 12, 1.0 / 24, 19.0 / 720, 3.0 / 160, 863.0 / 60480, 275.0 / 24192,
            33953.0 / 3628800)
_GL16X, _GL16W = _gauss_legendre(16)
_EM_AMIN = 24


def _gregory_weights(q: int) -> list[float]:
    """c_j, j = 0..q: f(B)/2 + sum_{k<=q} g_k nabla^k f(B) = sum_j c_j f(B - j)."""
    c = [0.0] * (q + 1)
    c[0] = 0.5
    for k in range(1, q + 1):
        g = _GREGORY[k - 1]
        for j in range(k + 1):
            c[j] += g * (-1) ** j * math.comb(k, j)
    return c


_GREG6 = _gregory_weights(6)


def _em_points(n: int, p: float, k_req: int = 0
               ) -> tuple[int, list[tuple[float, float]], bool] | None:
    """(L, [(K, weight)], lower) for int_L^{n-2} f(K) dK, or None for small n
    (then the direct sum is used).  The stages K < L are summed directly;
    ``lower`` says whether the Gregory terms at K = L are needed.

    The stage mass falls like exp(-w (n-1-K)/K) towards small K.  If it is below
    exp(-52) at K_cut = w (n-1)/(52 + w) >= max(24, k_req) + 8, the integral
    stops at K_cut and L = max(24, kmin) (no terms at L: everything below K_cut
    is negligible).  Else L >= max(k_req, sqrt(10 w n)), where f changes by
    less than e^0.1 from one K to the next, so Gregory's differences at L fall
    like 0.11^k or faster; L is raised until the first term left out (g_7 =
    0.0095 times the 7th difference, about (e^(w n/L^2) - 1)^7 f(L)) is below
    1e-17.  [L', n-2] is cut into pieces [K/3, K] from the top, each by
    16-point Gauss-Legendre in K: the nearest singularity of f is at K = 0 (f is
    smooth on the scale of K), two half-lengths from the middle of a piece, so
    the error is of order (2 + sqrt 3)^-32 ~ 1e-18 of the piece."""
    coef, kmin = _w_taylor(p)
    A = max(kmin, _EM_AMIN)
    B = n - 2
    if B < 8 * A:
        return None
    wl = min(_horner(coef, 1.0 / A), _horner(coef, 1.0 / B), coef[0])
    wh = max(_horner(coef, 1.0 / A), _horner(coef, 1.0 / B), coef[0])
    k_cut = wl * (n - 1.0) / (52.0 + wl)
    if k_cut >= max(A, k_req) + 8:
        L, bottom, lower = A, k_cut, False
    else:
        # smallest L with the first left-out Gregory term, g_7 (e^(w n/L^2) - 1)^7 times
        # the stage mass exp(-w (n-1-L)/L)/n, below 1e-17
        L = max(A, k_req, int(math.ceil(math.sqrt(10.0 * wh * n))))
        while L <= B - 16 and 0.0095 * math.expm1(wh * n / (L * L)) ** 7 \
                * math.exp(-wl * (n - 1.0 - L) / L) / n > 1e-17:
            L += max(1, L // 16)
        if L > B - 16:
            return None
        bottom, lower = float(L), True
    pts: list[tuple[float, float]] = []
    hi = float(B)
    while hi > bottom:
        lo = max(bottom, hi / 3.0)
        mid = 0.5 * (lo + hi)
        half = 0.5 * (hi - lo)
        for x, gw in zip(_GL16X, _GL16W):
            pts.append((mid + half * x, gw * half))
        hi = lo
    return L, pts, lower


def _r2_core_opt(n: int, a: Sequence[float], ac: Sequence[float], p: float,
                 forced: bool, co: _Coef) -> _R2 | None:
    """:func:`_r2_core` for the optimal bars by the summation formula above, or
    None when it does not apply (then the caller sums directly)."""
    plan = _em_points(n, p)
    if plan is None:
        return None
    A, pts, lower = plan
    B = n - 2
    co.grow(64)
    acc = _Acc()

    def exact(K: int, w: float = 1.0) -> None:
        t = n - K
        lo, loc, hi, hic = a[t], ac[t], a[t - 1], ac[t - 1]
        V, C = _stage(n, K, lo, loc, hi, hic, _ycut(K, loc))
        e = t - 1
        Bw = list(map(mul, C, repeat(float(e)))) if (C is not None and e > 0) else None
        acc.add(K, V, Bw, w)

    for K in range(0, A):
        exact(K)
    exact(n - 1)
    for j, c in enumerate(_GREG6):
        exact(B - j, c)
        if lower:
            exact(A + j, c)
    coef, _ = _w_taylor(p)
    Ys = []
    for K in (A, (A + B) // 2, B):
        Ys.append(_ycut(K, ac[n - K]))
    Y = max(Ys) + 2
    for K, wt in pts:
        w0 = _horner(coef, 1.0 / K)
        w1 = _horner(coef, 1.0 / (K + 1.0))
        lo, loc = K / (K + w0), w0 / (K + w0)
        hi, hic = (K + 1.0) / (K + 1.0 + w1), w1 / (K + 1.0 + w1)
        V, C = _stage(n, K, lo, loc, hi, hic, Y)
        e = n - 1.0 - K
        Bw = list(map(mul, C, repeat(e))) if C is not None else None
        acc.add(K, V, Bw, wt)
    return _r2_finish(n, a, p, acc, forced=forced, co=co)


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


_SQRT2 = math.sqrt(2.0)
_INV_SQRT2PI = 1.0 / math.sqrt(2.0 * math.pi)


def _upper_z_chain(ac: Sequence[float]) -> list[float]:
    """z_i = Phi^-1(1 - ac_i) for a slowly changing sequence of small upper-tail
    chances ac (the optimal bars, stage by stage): each z from the one before by
    the Taylor step z + t + z t^2/2 (t = (ac_prev - ac)/phi), then one Newton
    step on the upper tail, z + (Q(z) - ac)/phi(z) (Q = 1 - Phi by erfc, full
    relative precision).  The step's error (1 + 2 z^2) t^3/6 is below 1e-8 when
    |t| <= 1e-3, and Newton squares it (error z e^2/2 < 1e-16); where |t| is
    larger, or ac >= 0.02, the exact :func:`dist_q` is used.  O(1) per entry
    with one erfc and one exp."""
    out = [0.0] * len(ac)
    erfc, exp = math.erfc, math.exp
    z = 0.0
    ph = 0.0
    prev = -1.0                 # the previous chance, -1 when the chain restarts
    for i, q in enumerate(ac):
        if 0.0 < q < 0.02 and prev > 0.0:
            t = (prev - q) / ph
            if -1e-3 <= t <= 1e-3:
                zp = z + t + 0.5 * z * t * t
                ph = _INV_SQRT2PI * exp(-0.5 * zp * zp)
                z = zp + (0.5 * erfc(zp / _SQRT2) - q) / ph
                prev = q
                out[i] = z
                continue
        if 0.0 < q < 1.0:
            z = dist_q(1.0 - q, q)
        else:
            z = math.inf if q <= 0.0 else -math.inf
        if 0.0 < q < 0.02:
            prev = q
            ph = _INV_SQRT2PI * exp(-0.5 * z * z)
        else:
            prev = -1.0
        out[i] = z
    return out


def _r2_scores(n: int, a: Sequence[float], ac: Sequence[float], dist: ScoreDistribution,
               must: bool, zs: Sequence[float] | None = None) -> tuple[float, float]:
    r_reg, r_fi, r_g1 = _r2_scores_part(n, a, ac, dist, must, 1, zs)
    forced = 0.0
    if must and n >= 2:
        forced = r_g1 / (n - 1) * dist.mean - r_fi
    return r_reg, forced


def _r2_scores_part(n: int, a: Sequence[float], ac: Sequence[float],
                    dist: ScoreDistribution, must: bool, t_from: int,
                    zs: Sequence[float] | None = None) -> tuple[float, float, float]:
    """(E[X; regular hire], E[X; forced hire]) for a record rule with p = 1:

        E[X; regular] = sum_t [a_t^(t-1) psi(a_t)
                        + (t-1) int_{a_t}^{a_{t-1}} psi u^(t-2) (1-u^(n-t+1))/(1-u) du]
        E[X; forced]  = G psi(0) - sum_{t>=2} (t-1) int_{a_t}^{a_{t-1}} psi u^(n-2) du
                        - (n-1) int_0^{a_n} psi u^(n-2) du,
        G = (1/(n-1)) sum_{m<n} a_m^(n-1)   (the chance of reaching the last stage).

    :func:`_r2_scores_part` sums the stages t >= t_from: (the regular part, the
    forced integrals, sum_{t_from <= m < n} a_m^(n-1)).

    A stage whose interval is one quadrature piece (almost all of them for the
    optimal bars) is done inline with both integrands on the same nodes;
    wider intervals go through :class:`_PsiQuad`.  O(N) nodes."""
    Q = _PsiQuad(dist)
    t0 = max(2, t_from)
    # stages that add something: a bar strictly inside (0, 1), or an interval
    stages = sorted(set(_live_stages(a, ac, t0, n))
                    | {t for t, c in zip(range(t0, n + 1), ac[t0:n + 1]) if 0.0 < c < 1.0}) \
        if not _zero_one(a) else _live_stages(a, ac, t0, n)
    if zs is None:
        if isinstance(dist, Normal):
            need = {1, n} | set(stages) | {t - 1 for t in stages}
            # z values only for the stages that need them (read like a list)
            zs = {t: dist_q(a[t], ac[t]) for t in need if 0 <= t <= n}  # type: ignore
        else:
            zs = [0.0] * (n + 1)
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

    total = (psi_at(1) if a[1] > 0.0 else dist.mean) if t_from <= 1 else 0.0
    forced_int = 0.0
    P = float(max(n - 2, 0))
    for t in stages:
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
                half = 0.5 * (ac[t] - ac[t - 1]) if ac[t] < 0.5 else 0.5 * (hi - lo)
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
        # stages whose whole integral is below 1e-20 of the scale (late stages of
        # the optimal rule in long pools) are left out
        if (t - 1) * b1(hi) > 1e-20 * B:
            total += (t - 1) * Q.integrate(lo, ac[t], zs[t], hi, ac[t - 1], zs[t - 1], g1,
                                           P1, b1)
        if must and (t - 1) * B * _pow(hi, n - 1) / (n - 1) > 1e-20 * B:
            def g2(u: float, uc: float) -> float:
                return _pow(u, n - 2)

            def b2(h: float) -> float:
                return B * _pow(h, n - 1) / (n - 1)

            forced_int += (t - 1) * Q.integrate(lo, ac[t], zs[t], hi, ac[t - 1], zs[t - 1],
                                                g2, P, b2)
    g1_ = 0.0
    if must and n >= 2:
        if a[n] > 0.0:
            forced_int += (n - 1) * Q.integrate(
                0.0, 1.0, -math.inf, a[n], ac[n], zs[n], lambda u, uc: _pow(u, n - 2), P,
                lambda h: B * _pow(h, n - 1) / (n - 1))
        m0_ = max(1, t_from)
        mid_ = [c for c in ac[m0_:n] if 0.0 < c < 1.0]
        g1_ = math.fsum([math.exp((n - 1) * math.log1p(-c)) for c in mid_]
                        + [1.0] * a[m0_:n].count(1.0))
    return total, forced_int, g1_


def _psi_u(dist: ScoreDistribution) -> Callable[[float, float], float]:
    """psi(u) from (u, 1 - u) with precision near u = 1 (normal: mean (1-u) + sd
    phi(Phi^-1(u)) with the inverse taken on the smaller tail)."""
    if isinstance(dist, Normal):
        mu, sd = dist.mu, dist.sd
        return lambda u, uc: mu * uc + sd * norm_pdf(dist_q(u, uc))
    if isinstance(dist, Uniform):
        lo_, wd = dist.low, dist.width
        return lambda u, uc: lo_ * uc + wd * uc * (1.0 + u) * 0.5
    tm = dist.tail_mean
    return lambda u, uc: tm(u)


def _score_stage(n: int, K: float, lo: float, loc: float, hi: float, hic: float,
                 width: float, psi2: Callable[[float, float], float],
                 Q: "_PsiQuad", B: float, must: bool) -> tuple[float, float] | None:
    """(regular, forced) parts of the stage with K later candidates (t = n - K) for
    :func:`_r2_scores_opt`: a_t^(t-1) psi(a_t) + (t-1) int psi u^(t-2) geom du and
    (t-1) int psi u^(n-2) du over [lo, hi] = [a_t, a_(t-1)] of the given width
    (computed without cancellation by the caller).  Gauss-Legendre in u (3 or 6
    nodes) on up to 64 equal pieces on which u^(n-2) changes by less than e^0.5
    (error below 1e-16 relative); None if more would be needed (the caller
    then sums directly).  Sample scores: the caller keeps the interval above
    the kinks of psi."""
    e = n - 1.0 - K            # t - 1
    P = float(max(n - 2, 0))
    if not lo > 0.0:
        return None
    # pieces (at most 64) on which u^(n-2) changes by less than e^0.5
    pieces = max(1, int(math.ceil(width / (lo / (P + 2.0)))))
    if pieces > 64:
        return None
    hw = 0.5 * width / pieces
    lam = hw * (P + 1.0) / lo
    xs, ws = (_GL3X, _GL3W) if lam <= 0.01 else (_GLX, _GLW)
    s1 = s2 = 0.0
    em1 = e - 1.0
    for j in range(pieces):
        midc = loc - (2 * j + 1) * hw       # 1 - (middle of piece j)
        mid = 1.0 - midc if midc < 0.5 else lo + (2 * j + 1) * hw
        for x, w in zip(xs, ws):
            u = mid + hw * x
            uc = midc - hw * x
            lu = math.log1p(-uc)
            f = w * psi2(u, uc)
            s1 += f * math.exp(em1 * lu) * (-math.expm1((K + 1.0) * lu) / uc)
            s2 += f * math.exp((n - 2) * lu)
    reg = math.exp(e * math.log1p(-loc)) * psi2(lo, loc) + e * s1 * hw
    return reg, (e * s2 * hw if must else 0.0)


def _r2_scores_opt(n: int, a: Sequence[float], ac: Sequence[float],
                   dist: ScoreDistribution, must: bool, p: float) -> tuple[float, float] | None:
    """:func:`_r2_scores` for the optimal bars by the summation formula of
    :func:`_r2_core_opt` (the stage parts are analytic in K as long as no kink of
    psi lies above the bars: sample scores), or None when it does not apply."""
    k_req = 0
    if isinstance(dist, Sample) and dist.kinks:
        # the stages must lie above the top kink: b(K) > top from K = k_req on
        top = dist.kinks[-1]
        k_req = next((K for K in range(1, n - 1) if a[n - K] > top), n)
    plan = _em_points(n, p, k_req)
    if plan is None:
        return None
    A, pts, lower = plan
    B = n - 2
    coef, _ = _w_taylor(p)
    Q = _PsiQuad(dist)
    psi2 = _psi_u(dist)
    bnd = dist.abs_mean_bound() + 1e-300
    reg = forced_int = g1 = 0.0

    def wK(k: float) -> float:
        return _horner(coef, 1.0 / k)

    def width(K: float, w0: float, w1: float) -> float:
        return (K * (w0 - w1) + w0) / ((K + w0) * (K + 1.0 + w1))

    def exact(K: int, wt: float = 1.0) -> bool:
        nonlocal reg, forced_int, g1
        t = n - K
        lo, loc, hi, hic = a[t], ac[t], a[t - 1], ac[t - 1]
        if K >= A:
            wd = width(K, wK(K), wK(K + 1.0))
        else:
            wd = (loc - hic) if loc < 0.5 else (hi - lo)
        r = _score_stage(n, K, lo, loc, hi, hic, wd, psi2, Q, bnd, must)
        if r is None:
            return False
        reg += wt * r[0]
        forced_int += wt * r[1]
        if K >= 1:
            g1 += wt * math.exp((n - 1) * math.log1p(-loc))
        return True

    # stage 1 (K = n - 1): psi(a_1); the stages K < A go to the direct sum below
    reg += psi2(a[1], ac[1]) if a[1] > 0.0 else dist.mean
    g1 += math.exp((n - 1) * math.log1p(-ac[1]))
    for j, c in enumerate(_GREG6):
        if not exact(B - j, c) or (lower and not exact(A + j, c)):
            return None
    for K, wt in pts:
        w0, w1 = wK(K), wK(K + 1.0)
        lo, loc = K / (K + w0), w0 / (K + w0)
        hi, hic = (K + 1.0) / (K + 1.0 + w1), w1 / (K + 1.0 + w1)
        r = _score_stage(n, K, lo, loc, hi, hic, width(K, w0, w1), psi2, Q, bnd, must)
        if r is None:
            return None
        reg += wt * r[0]
        forced_int += wt * r[1]
        g1 += wt * math.exp((n - 1) * math.log1p(-loc))
    # the last A stages (t = n - A + 1 .. n) directly
    r_reg, r_fi, r_g1 = _r2_scores_part(n, a, ac, dist, must, n - A + 1)
    reg += r_reg
    forced_int += r_fi
    g1 += r_g1
    forced = 0.0
    if must and n >= 2:
        forced = g1 / (n - 1) * dist.mean - forced_int
    return reg, forced


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
    h = min(H, len(reg))
    head[:h] = reg[:h]
    fh = forced_head[:H] + [forced_tail] * max(0, H - A)
    head = list(map(add, head, fh))
    cum_reg = list(accumulate(reg, initial=0.0))
    cum_f = list(accumulate(forced_head, initial=0.0))

    def le(m: int) -> float:
        m = max(0, min(m, n))
        r = cum_reg[min(m, len(reg))]
        f = cum_f[min(m, A)] + max(0, m - A) * forced_tail
        return _clamp(r + f)

    mean = math.fsum(map(mul, range(1, len(reg) + 1), reg))
    mean += math.fsum(map(mul, range(1, A + 1), forced_head))
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
    terms = [0.0] + list(map(mul, piJ[1:], be[2:L + 1]))
    S = list(accumulate(reversed(terms)))
    S.reverse()
    S.append(0.0)
    R = min(n, L + 1)
    reg = [p * v for v in piJ[:R]]
    if len(reg) < R:
        reg.extend([0.0] * (R - len(reg)))
    if p < 1.0:
        m = max(0, min(R, L - 1))
        reg[:m] = map(add, reg[:m],
                      map(mul, map(mul, repeat(1.0 - p), al[1:m + 1]), S[1:m + 1]))
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
                      zs: Sequence[float] | None = None, optimal: bool = False) -> _Perf:
    """Goal-best style rule (offer to a best-so-far above the bar).  ``optimal``:
    the bars are those of :func:`best_bars` (then the stage sums may use the
    summation formula, :func:`_r2_core_opt`)."""
    co = _Coef(p)
    core = _r2_core_opt(n, a, ac, p, must, co) if optimal else None
    if core is None:
        core = _r2_core(n, a, ac, p, forced=must, co=co)
    forced = p * core.forced_mass if (must and n >= 2) else 0.0
    none = core.none_reg - forced
    ranks = _r2_ranks(n, core, p, must, co, rank_based)
    score: float | None = None
    if p == 1.0:
        sc = _r2_scores_opt(n, a, ac, dist, must, p) if optimal else None
        reg, fs = sc if sc is not None else _r2_scores(n, a, ac, dist, must, zs)
        score = reg + (fs if must else 0.0)
    elif rank_based and isinstance(dist, Uniform) and ranks is not None:
        # E[U | rank a] = (n + 1 - a)/(n + 1) for rules that look at ranks only, so
        # E[U; hire] = sum_a P(a) (n + 1 - a)/(n + 1) = P(hire) - E[rank; hire]/(n + 1)
        eu = (1.0 - none) - ranks.mean_mass / (n + 1)
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
        first = max(1, lo)
        reg = [vals[first]] * (first - 1) + [vals[k] for k in range(first, top_k + 1)]
        while reg and reg[-1] == 0.0:
            reg.pop()
    best_reg = reg[0] if reg else 0.0
    score = p * psi_b * (1.0 - none_reg) / (p * q) if q > 0.0 else 0.0
    forced = 0.0
    fh: list[float] = []
    f_tail = 0.0
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
            if x > 0.0:
                lo, pmf = _binom_window(n - 1, x / tot, b / tot)
                scale = b * tot ** (n - 1)
                w = [0.0] * lo + [v * scale for v in pmf]
            else:
                w = [b * b ** (n - 1)]
            # fh[a-1] = p sum_{d < a} w_d/(n - d): constant after the window, where
            # it is passed on as the per-rank tail value
            while len(w) > 1 and w[-1] == 0.0:
                w.pop()
            cum = list(accumulate(map(truediv, w, range(n, n - len(w), -1))))
            fh = [p * v for v in cum]
            f_tail = fh[-1]
        f_best = fh[0]
        score += p * reach_last * (dist.mean - psi_b) if b > 0.0 else 0.0
    none = none_reg - forced
    if not must:
        ranks = _ranks_from_parts(n, reg, [], 0.0)
    else:
        ranks = _ranks_from_parts(n, reg, fh, f_tail)
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
    # upq[r][k] = P(X > bar), pab[r][k] = E[X; X > bar] (0 where P(X > bar) = 0)
    upq: list[array] | None = None
    pab: list[array] | None = None


def score_bars(n: int, m: int, p: float, c: float, must: bool,
               dist: ScoreDistribution) -> _ScorePlan:
    """Moser's recursion with declines, cost and m openings.  O(N m), one call of
    ``dist.upper_parts`` per (stage, openings left), which also gives what the
    forward evaluation needs (the chance of clearing the bar and the partial
    mean above it)."""
    bars = [array("d", bytes(8 * n)) for _ in range(m + 1)]
    forced = [array("b", bytes(n)) for _ in range(m + 1)]
    upq = [array("d", bytes(8 * n)) for _ in range(m + 1)]
    pab = [array("d", bytes(8 * n)) for _ in range(m + 1)]
    mean = dist.mean
    up = dist.upper_parts
    if m == 1:
        b1, q1, a1 = bars[1], upq[1], pab[1]
        v = 0.0
        k0 = 0
        if must and n >= 1:
            forced[1][0] = 1
            b1[0] = -math.inf
            q1[0] = 1.0
            a1[0] = mean
            v = -c + p * mean
            k0 = 1
        if isinstance(dist, Normal):
            # Normal.upper_parts inlined (the same operations): one erfc, one exp
            mu, sd = dist.mu, dist.sd
            erfc, exp = math.erfc, math.exp
            for k in range(k0, n):
                z = (v - mu) / sd
                q = 0.5 * erfc(z / _SQRT2)
                ph = _INV_SQRT2PI * exp(-0.5 * z * z)
                b1[k] = v
                q1[k] = q
                a1[k] = mu * q + sd * ph if q > 0.0 else 0.0
                v = -c + v + p * (sd * (ph - z * q) if z < 5.0 else dist.excess(v))
        else:
            for k in range(k0, n):
                q, pa, ex = up(v)
                b1[k] = v
                q1[k] = q
                a1[k] = pa if q > 0.0 else 0.0
                v = -c + v + p * ex
        return _ScorePlan(n=n, m=m, bars=bars, forced=forced, value=v, upq=upq, pab=pab)
    # one chain per r: V_{k+1,r} needs V_{k,r} and V_{k,r-1} only, so the chains
    # are computed one after the other (r = 1, 2, ..., m), each in one loop
    prev = [0.0] * (n + 1)        # V_{k, r-1}, k = 0..n
    cur = prev
    smp = isinstance(dist, Sample)
    nrm = isinstance(dist, Normal)
    for r in range(1, m + 1):
        cur = [0.0] * (n + 1)
        br, fr, qr, ar = bars[r], forced[r], upq[r], pab[r]
        k0 = min(r, n) if must else 0
        for k in range(k0):       # every remaining candidate is needed: take anyone
            fr[k] = 1
            br[k] = -math.inf
            qr[k] = 1.0
            ar[k] = mean
            cur[k + 1] = -c + p * (mean + prev[k]) + (1.0 - p) * cur[k]
        v = cur[k0]
        if smp:
            xs, fs, psik = dist.xs, dist.fs, dist._psi_knots  # type: ignore[attr-defined]
            nxs = len(xs) - 1
            x_lo, x_hi = xs[0], xs[-1]
            bis = bisect.bisect_right
            for k in range(k0, n):
                D = v - prev[k]
                br[k] = D
                if x_lo < D < x_hi:
                    # Sample.upper_parts inlined (the same operations)
                    i = bis(xs, D, 1, nxs) - 1
                    x0, x1, f0, f1 = xs[i], xs[i + 1], fs[i], fs[i + 1]
                    u = f0 + (D - x0) / (x1 - x0) * (f1 - f0)
                    top = psik[i + 1]
                    q = 1.0 - u
                    pa = top + (f1 - u) * 0.5 * (D + x1)
                    ex = (f1 - u) * 0.5 * (x1 - D) + (top - D * (1.0 - f1))
                    if ex < 0.0:
                        ex = 0.0
                else:
                    q, pa, ex = up(D)
                qr[k] = q
                ar[k] = pa if q > 0.0 else 0.0
                v = -c + v + p * ex
                cur[k + 1] = v
        elif nrm:
            mu, sd = dist.mu, dist.sd  # type: ignore[attr-defined]
            erfc, exp = math.erfc, math.exp
            for k in range(k0, n):
                D = v - prev[k]
                br[k] = D
                z = (D - mu) / sd
                q = 0.5 * erfc(z / _SQRT2)
                ph = _INV_SQRT2PI * exp(-0.5 * z * z)
                qr[k] = q
                ar[k] = mu * q + sd * ph if q > 0.0 else 0.0
                v = -c + v + p * (sd * (ph - z * q) if z < 5.0 else dist.excess(D))
                cur[k + 1] = v
        else:
            for k in range(k0, n):
                D = v - prev[k]
                br[k] = D
                q, pa, ex = up(D)
                qr[k] = q
                ar[k] = pa if q > 0.0 else 0.0
                v = -c + v + p * ex
                cur[k + 1] = v
        prev = cur
    return _ScorePlan(n=n, m=m, bars=bars, forced=forced, value=cur[n], upq=upq, pab=pab)


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
    """Forward evaluation of the goal-score rule.  O(N m); for one opening the
    chance of reaching each stage is a running product (C-speed)."""
    n, m = plan.n, plan.m
    assert plan.upq is not None and plan.pab is not None
    if m == 1:
        q1 = plan.upq[1][::-1]            # stage order i = 1..n (k = n - i)
        a1 = plan.pab[1][::-1]
        reach = list(accumulate(map(sub, repeat(1.0), map(mul, repeat(p), q1)), mul,
                                initial=1.0))
        seen = sum(reach) - reach[n]
        hires = p * sum(map(mul, reach, q1))
        score = p * sum(map(mul, reach, a1))
        none = reach[n]
        forced_any = p * reach[n - 1] if (n >= 1 and plan.forced[1][0]) else 0.0
        prob = None
    else:
        prob, score, seen, hires = _score_plan_loop(plan, p)
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


def _score_plan_loop(plan: _ScorePlan, p: float
                     ) -> tuple[list[list[float]], float, float, float]:
    """Several openings: prob[r][f], the chance of meeting a stage with r openings
    left (f = 1 if a forced hire happened already), carried stage by stage."""
    n, m = plan.n, plan.m
    assert plan.upq is not None and plan.pab is not None
    p0 = [0.0] * (m + 1)          # no forced hire yet
    p1 = [0.0] * (m + 1)          # a forced hire happened already
    p0[m] = 1.0
    score = 0.0
    seen = 0.0
    hires = 0.0
    upq, pab, forced = plan.upq, plan.pab, plan.forced
    rs = range(1, m + 1)          # upwards: r - 1 has had its own move already
    for i in range(1, n + 1):
        k = n - i
        for r in rs:
            pr0 = p0[r]
            pr1 = p1[r]
            tot = pr0 + pr1
            if tot <= 0.0:
                continue
            seen += tot
            hp = p * upq[r][k]
            hires += tot * hp
            score += tot * p * pab[r][k]
            stay = 1.0 - hp
            if forced[r][k]:
                p1[r - 1] += tot * hp
            else:
                p0[r - 1] += pr0 * hp
                p1[r - 1] += pr1 * hp
            p0[r] = pr0 * stay
            p1[r] = pr1 * stay
    prob = [[x, y] for x, y in zip(p0, p1)]
    return prob, score, seen, hires


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
    # the regular stages (first and last only): forced stages are the last ones
    nreg = n - fz.count(1)
    reg = [b[n - 1], b[n - nreg]] if nreg >= 2 else ([b[n - 1]] if nreg == 1 else [])
    what = "a candidate" if m == 1 else "each candidate"
    if not reg:
        w = "Make an offer to every candidate (each one is needed)."
        return w
    w = f"Make an offer to {what} who scores at least {_fmt(reg[0], dec)} at stage 1"
    if nreg >= 2:
        w += f"; the bar falls to {_fmt(reg[-1], dec)} by stage {nreg:,}"
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
        zs = [0.0] + _upper_z_chain(ac[1:]) if isinstance(dist, Normal) else None
        pf = _eval_record_rule(n, a, ac, p, must, dist, rank_based=False, zs=zs,
                               optimal=True)
        score_thr: list[float | None]
        if isinstance(dist, Normal):
            assert zs is not None
            mu_, sd_ = dist.mu, dist.sd
            score_thr = [mu_ + sd_ * z for z in zs[1:]]
        elif isinstance(dist, Uniform):
            lo_, wd_ = dist.low, dist.width
            score_thr = [lo_ + wd_ * u for u in a[1:]]
        else:
            score_thr = [dist.quantile(u) for u in a[1:]]
        for t in range(n, 0, -1):       # the last stage(s): any best so far
            if a[t] > 0.0:
                break
            score_thr[t - 1] = None
        words = _words_best(n, score_thr, dec, must, p)
        thresholds = [1] * n
        policy = Policy(thresholds=thresholds, groups=[StageGroup(1, n, 1)],
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
                  "numbers by Newton's method and a Taylor series in 1/k O(N), exact "
                  "performance in the binomial basis summed over the stages by the "
                  "Euler-Maclaurin (Gregory) formula, expected score by Gauss-Legendre")
        name = "optimal"
    else:
        m = s.openings
        plan = score_bars(n, m, p, c, must, dist)
        pf = _eval_score_plan(plan, p, c, dist, want_best=True)
        def stage_bars(r: int) -> list[float | None]:
            # stage order (k = n - i); the forced stages are the last ones
            out: list[float | None] = plan.bars[r][::-1].tolist()
            nf = plan.forced[r].count(1)
            if nf:
                out[n - nf:] = [None] * nf
            return out

        score_thr = stage_bars(m)
        by_open = None
        if m > 1:
            by_open = {str(r): stage_bars(r) for r in range(1, m + 1)}
        thresholds = [n] * n
        policy = Policy(thresholds=thresholds, groups=[StageGroup(1, n, n)],
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
