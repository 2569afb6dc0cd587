"""Exact optimal rules when only relative ranks are seen (backward induction).

Model
-----
Candidates arrive in random order, one at a time; after each one you learn
only its *relative rank* j among the i seen so far (1 = best so far).  The
pool size N is fixed or has a prior ``P(N = n)``, n = 0..M
(:mod:`seqpick.prior`); N is independent of the order.  An offer is accepted
with chance p, independently (a candidate who declines is gone: Smith 1975);
each candidate seen costs c, in the goal's units; up to m openings can be
filled.  The search ends when every opening is filled or the pool runs out;
you cannot tell in advance that a candidate is the last one unless N is known.

Two facts make a small state enough (Gilbert & Mosteller 1966):

* the relative ranks j_1, j_2, ... are independent, j_i uniform on 1..i, and
  independent of N; so after i candidates the posterior of N is the prior
  restricted to n >= i, ``post_i(n) = prior[n] / S(i)``, S(i) = P(N >= i), and
  the next candidate comes with chance ``q_i = S(i+1) / S(i)``;
* the relative rank of a candidate, seen again after later arrivals, is a
  Markov chain: at stage i+1 it grows by one with chance j/(i+1) (when the
  newcomer is better) and stays otherwise; the absolute rank is its value
  at stage N.

Payoffs of hiring a candidate of relative rank j at stage i:

* goal ``best``: ``x_i = [j = 1] * sum_n post_i(n) i/n``;
* goal ``top`` (one of the best k): ``h_i(j) = P(final rank <= k)``, from the
  chain above: ``h_i(j) = (1 - q_i) [j <= k] + q_i (j/(i+1) h_{i+1}(j+1) +
  (1 - j/(i+1)) h_{i+1}(j))``, ``h_M(j) = [j <= k]``.  This equals
  ``sum_n post_i(n) sum_{a=j}^{k} C(a-1,j-1) C(n-a,i-j) / C(n,i)`` without any
  binomial coefficient, costs O(k) per stage for fixed *and* uncertain pools,
  and stays in [0, 1] (a convex combination at every step);
* goal ``rank``: expected absolute rank ``j e_i`` with
  ``e_i = (E[N | N >= i] + 1) / (i + 1)``.  A search that ends with no hire
  counts as rank n + 1 (one worse than the worst of the n candidates).

Backward induction
------------------
``W_i^l`` is the value after the decision at stage i with l openings left
(given N >= i, counting only future costs); ``U_i^l`` the value on meeting
candidate i before seeing them::

    W_i^l = (1 - q_i) * end + q_i * U_{i+1}^l     (end = 0, or i+1 for goal rank)
    U_i^l = -c + (1/i) sum_j max(pass, offer_j)   (+c and min for goal rank)
    pass = W_i^l,   offer_j = p (payoff_j + W_i^{l-1}) + (1 - p) W_i^l

with ``W^0 = 0`` (the search is over; nothing more is paid or gained).  With
several openings (goal best only) success means *the overall best is among
the hires*; the events "hire number t is the overall best" are disjoint, so
the chance adds up over hires and (stage, openings left) is the whole state.

Threshold structure.  ``pass`` does not depend on j and ``offer_j`` falls as
j rises (``x`` is 0 for j > 1; ``h_i(j)`` falls in j because the chain from
j+1 stays above the chain from j when both are driven by the same arrivals;
``j e_i`` rises), so the accepted set at a stage is ``{j <= t_i}``: the rule
is a list of per-stage thresholds.  The thresholds need not form one skip
period: for some size priors a best-so-far is accepted at stage 2, not at
stage 3, and again later (``policy.interval`` is then False).  With a cost,
late in a long search the rule may offer to *anyone* (threshold = i): an
offer is the only way to stop paying.

Ties (offering and passing equally good): the rule offers -- it stops
earlier -- when the candidate can still meet the goal (or for goal rank),
and passes a candidate who cannot.  Comparisons allow a relative 1e-13.

Forward evaluation
------------------
Any threshold rule (the optimal one and the compared skip rules) is
evaluated exactly in the same model.  The decisions depend on the stage
only, so the process can be run as if the pool never ended and weighted by
``prior[n]`` where it stops: ``A_i``, the chance of meeting stage i with
nobody hired, is a product ``A_{i+1} = A_i (1 - p t_i / i)`` (several
openings: one such recurrence per level, fed by the hires of the level
above), and success, the outcome split, interviews, hires and the expected
rank (an arithmetic series over j <= t) are sums of ``A_i`` against
per-stage vectors.  The loops run in C (``itertools.accumulate``, ``map``,
slicing) wherever the recurrence allows.

The rank of the hire (the rank distribution and the "among the best m"
table) is exact as well, by one of three methods:

* Known pool size N, one opening, a rule that passes, offers to
  best-so-fars or offers to anyone (goal best; every skip rule): a
  best-so-far hired at stage i has rank a with chance
  ``C(N-a, i-1) / C(N, i) = (i/N) C(N-i, a-1) / C(N-1, a-1)``.  Over a run
  s..e of best-so-far stages, ``i A_{i+1} = (i - p) A_i``, and summation by
  parts of ``T(a) = sum_i A_i C(N-i, a-1)`` (with ``(N-i-a+1) C(N-i, a-1) =
  a C(N-i, a)`` and ``C(N-i+1, a) = C(N-i, a) + C(N-i, a-1)``) gives

      (a + 1 - p) T(a+1) = (N - a) T(a) - beta_a,
      beta_a = (s-1) A_s C(N-s+1, a) - e A_{e+1} C(N-e, a),

  a first-order recurrence in the rank: ranks 1..R cost O(R) per run
  after an O(N) pass (:func:`_tau_head`, normalised so that no binomial
  coefficient is formed).  A stage that offers to anyone hires a uniformly
  random candidate.  The share columns use
  ``P(rank <= K | best of the first i) = 1 - C(N-K, i) / C(N, i)``
  (:func:`_fixed_tails`).
* Otherwise (goals top / rank, uncertain pool sizes, several openings):
  the relative rank a of the (best) hire is a Markov chain (up by one with
  chance a/i); in ``E_i(a) = a C(i, a) P(relative rank a at stage i)`` the
  stay factors telescope and each rank is a prefix sum of the rank below
  plus the new hires (:func:`_e_head`): O(M m) per rank, in C.  Ranks
  ``1..R`` are listed with R as large as :data:`PUSH_BUDGET` allows (at
  least 1, at most :data:`RANK_HEAD`); the share columns for uncertain
  sizes or several openings need every rank up to M/2 and are given while
  that fits :data:`PUSH_FULL` (pools up to about 600 candidates).  Known sizes
  with one opening get ranks 1..10 at least (the top-m counts) and the
  share columns from :func:`_fixed_tails` (hypergeometric tails,
  Hoeffding-bounded cuts).
* Several openings where a level with a hire offers to more than
  best-so-fars (cost-driven offers to anyone): the direct push of the
  relative rank (:func:`_push`) while it fits :data:`PUSH_FALLBACK`.

``RankDistribution`` lists ranks ``1..R``; ``rest`` is the chance of a hire
ranked below R, so ``sum(probabilities) + rest + none = 1``.  What does not
fit the limits is left ``None`` (never a guess) with a note.

Complexity (M = largest possible pool size)
-------------------------------------------
* goal best: O(M m) time and memory (m openings; the levels are swept one
  after the other); several openings need M m <= :data:`OPENINGS_WORK_MAX`;
* goal top: O(M k) time, O(M + k) memory, for fixed *and* uncertain pools
  (the Markov-chain recurrence above; no O(M^2 k^2) sum over n is needed);
* goal rank: O(M) (accepted ranks j <= t contribute an arithmetic series);
* uncertain pools add O(M) (suffix sums of the prior);
* forward evaluation: O(M m) per rule (O(M) for one opening);
* success curve: O(M) once, then O(1) per skip count (suffix sums);
* rank of the hire: O(M + R) per rule for known sizes, one opening and
  best-so-far rules (R = min(N, 200)), plus O(N/K) (typically) per share
  column; otherwise O(M m R) for ranks 1..R with R M m bounded by
  :data:`PUSH_BUDGET` / :data:`PUSH_FULL` (known sizes with one opening:
  at least the O(10 M) of ranks 1..10; any rule: at least O(M m) for rank 1).

Supported combinations
----------------------
Goals best / top / rank; pools size, size_min/max, size_mean, size_weights;
any accept_probability and cost.  Several openings: goal best only (goal
top / rank refuse with an error on ``openings``).  must_hire: pools whose
size is known (also size_min = size_max or a single weight); goal best /
top with an uncertain size refuse it (error on ``must_hire``: the last
candidate cannot be recognised); goal rank with an uncertain size accepts
it but cannot honour it, and counts a search that ends with no hire as rank
n+1 (a note says so).  Compared rules: skip and skip_share (share of the
pool, or of the *expected* pool size rounded down); start_share and
score_at_least refuse (they need a time window / scores).

References
----------
Chow, Y. S., Moriguchi, S., Robbins, H. & Samuels, S. M. (1964). Optimal
selection based on relative rank (the "secretary problem"). *Israel J. Math.*
2, 81-90.
Gilbert, J. P. & Mosteller, F. (1966). Recognizing the maximum of a sequence.
*J. Amer. Statist. Assoc.* 61, 35-73.
Gusein-Zade, S. M. (1966). The problem of choice and the optimal stopping rule
for a sequence of independent trials. *Theory Probab. Appl.* 11, 472-476.
Presman, E. L. & Sonin, I. M. (1972). The best choice problem for a random
number of objects. *Theory Probab. Appl.* 17, 657-668.
Smith, M. H. (1975). A secretary problem with uncertain employment.
*J. Appl. Probab.* 12, 620-624.
Lindley, D. V. (1961). Dynamic programming and decision theory. *Applied
Statistics* 10, 39-51.
Hoeffding, W. (1963). Probability inequalities for sums of bounded random
variables. *J. Amer. Statist. Assoc.* 58, 13-30 (tail bounds, also for
sampling without replacement, i.e. the hypergeometric law).
Loader, C. (2000). Fast and accurate computation of binomial probabilities.
Technical note, AT&T Labs (the hypergeometric pmf as a ratio of binomial pmfs).
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass, field
from itertools import accumulate, compress, islice, repeat
from operator import add, eq, mul, ne, sub, truediv
from typing import Iterable

from .advise import Advice, SearchState
from .errors import ScenarioError
from .prior import (_bd0, _stirlerr, pool_prior, single_size, suffix_sums, survival,
                    wide_fsum)
from .results import (TOP_COUNTS, TOP_SHARES, Curve, Limit, Outcome, Policy,
                      RankDistribution, RuleResult, SolveResult, StageGroup,
                      group_thresholds)
from .scenario import (FixedPool, PoissonPool, RangePool, Scenario, WeightsPool)

__all__ = [
    "solve_rankdp",
    "advise_rankdp",
    "RANK_HEAD",
    "CURVE_FULL_MAX",
    "CURVE_POINTS",
    "OPENINGS_WORK_MAX",
    "PUSH_BUDGET",
    "PUSH_FULL",
    "PUSH_FALLBACK",
]

#: Ranks 1..RANK_HEAD are listed one by one in the rank distribution.
RANK_HEAD = 200
#: Up to this many stages the curve lists every skip count; above, about CURVE_POINTS.
CURVE_FULL_MAX = 2000
CURVE_POINTS = 1000
#: Largest (largest pool size) x (openings) solved with several openings.
OPENINGS_WORK_MAX = 800_000
#: Work limit (element updates in C loops, summed over all rules) for ranks
#: 1..R of the rank distribution by prefix sums (:func:`_e_head`), about 3 ms
#: of CPython; a rule gets at least rank 1 (known sizes: ranks 1..10).
PUSH_BUDGET = 80_000
#: Work limit for whole distributions (every rank up to the largest share cut,
#: for the share columns with uncertain sizes or several openings): pools up to
#: about 600 candidates, about 25 ms of CPython at most.
PUSH_FULL = 1_000_000
#: Work limit of the direct stage-by-stage push (:func:`_push`, several openings
#: with offers beyond best-so-fars only).
PUSH_FALLBACK = 300_000
_TOL = 1e-13
_LN_2PI = math.log(2.0 * math.pi)
_CHECKPOINT = 256


def _ge(a: float, b: float) -> bool:
    """a >= b up to a relative 1e-13 (ties count as >=)."""
    return a >= b - _TOL * max(1.0, abs(a), abs(b))


def _gt(a: float, b: float) -> bool:
    """a > b by more than a relative 1e-13."""
    return a > b + _TOL * max(1.0, abs(a), abs(b))


def _clamp(x: float) -> float:
    return 0.0 if x < 0.0 else 1.0 if x > 1.0 else x


# --------------------------------------------------------------------------
# the model: prior-derived arrays
# --------------------------------------------------------------------------

@dataclass
class _Model:
    M: int
    prior: list[float]
    S: list[float]          # S[i] = P(N >= i), i = 0..M+1
    q: list[float]          # q[i] = P(N >= i+1 | N >= i), i = 1..M
    x: list[float]          # x[i] = P(abs rank 1 | best so far at stage i)
    t1: list[float]         # t1[i] = sum_{n >= i} prior[n] / n  (= S[i] x[i] / i)
    e: list[float]          # e[i] = (E[N | N >= i] + 1) / (i + 1)
    ns: list[float]         # ns[i] = sum_{n >= i} n prior[n]  (= S[i] E[N | N >= i])
    fixed_n: int | None     # the size if it is known for sure
    goal: str
    k: int
    p: float
    c: float
    m: int
    must: bool              # forced offer to the last candidate (known size only)
    mean: float
    reach: int              # largest stage with S > 0
    cache: dict = field(default_factory=dict)   # derived vectors, see _vec

    @property
    def levels(self) -> range:
        return range(1, self.m + 1)


def _model(s: Scenario) -> _Model:
    """Prior-derived arrays.  O(M), every loop in C (map / accumulate); a known
    size N takes the same values from closed forms (S = 1, t1 = 1/N, ns = N,
    x_i = i (1/N), e_i = (N+1)/(i+1))."""
    prior = pool_prior(s.pool)
    M = len(prior) - 1
    fixed_n = single_size(prior)
    if fixed_n is not None and fixed_n == M and M >= 1 and prior[M] == 1.0:
        N = M
        S = [1.0] * (N + 1) + [0.0]
        q = [0.0] + [1.0] * (N - 1) + [0.0, 0.0]
        invn = 1.0 / N
        t1 = [invn] * (N + 1) + [0.0]
        ns = [float(N)] * (N + 1) + [0.0]
        x = [0.0]
        x += map(mul, range(1, N + 1), repeat(invn))
        if x[N] > 1.0:
            x[N] = 1.0
        x.append(0.0)
        e = [0.0]
        e += map(truediv, repeat(N + 1.0), range(2, N + 2))
        e.append(0.0)
        reach = N
        mean = float(N)
    else:
        S = survival(prior)
        reach = M - S[1:M + 1].count(0.0)       # S is non-increasing: zeros at the tail
        r = reach
        pad = [0.0] * (M - r)
        # S is a suffix sum of non-negative terms, so S[i+1] <= S[i] and q <= 1
        q = [0.0]
        q += map(truediv, S[2:r + 2], S[1:r + 1])
        q += pad
        q.append(0.0)
        inv = [0.0]
        inv += map(truediv, prior[1:], range(1, M + 1))
        t1 = suffix_sums(inv)
        nprior = list(map(mul, range(M + 1), prior))
        ns = suffix_sums(nprior)
        x = [0.0]
        x += map(truediv, map(mul, range(1, r + 1), t1[1:r + 1]), S[1:r + 1])
        if r and max(x) > 1.0:
            x = [v if v < 1.0 else 1.0 for v in x]
        x += pad
        x.append(0.0)
        e = [0.0]
        e += map(truediv, map(add, map(truediv, ns[1:r + 1], S[1:r + 1]), repeat(1.0)),
                 range(2, r + 2))
        e += pad
        e.append(0.0)
        mean = wide_fsum(nprior)
    goal = s.goal.type
    must = bool(s.must_hire) and fixed_n is not None and goal in ("best", "top", "rank")
    return _Model(M=M, prior=prior, S=S, q=q, x=x, t1=t1, e=e, ns=ns, fixed_n=fixed_n,
                  goal=goal, k=s.goal.k or 1, p=s.accept_probability,
                  c=s.cost_per_candidate, m=s.openings, must=must, mean=mean,
                  reach=reach)


def _vec(md: _Model, name: str) -> list[float]:
    """Derived per-stage vectors, built once per model (index i = stage, 0 unused).

    ``inv`` 1/i; ``pinv`` p/i; ``fac1`` 1 - p/i; ``sinv`` S_i/i; ``es``
    e_i S_i / i; ``up`` 1 + 1/i.  O(M) each, in C.
    """
    v = md.cache.get(name)
    if v is not None:
        return v
    M = md.M
    known = md.fixed_n == M and md.S[M] == 1.0      # S_i = 1 for i <= M
    if name == "inv":
        v = [0.0]
        v += map(truediv, repeat(1.0, M + 1), range(1, M + 2))
    elif name == "pinv":
        v = [0.0]
        v += map(truediv, repeat(md.p, M + 1), range(1, M + 2))
    elif name == "fac1":
        v = [0.0]
        v += map(sub, repeat(1.0, M + 1), map(truediv, repeat(md.p, M + 1), range(1, M + 2)))
    elif name == "sinv":
        if known:
            v = _vec(md, "inv")        # S_i / i = 1 / i (the entry M+1 is never read)
        else:
            v = [0.0]
            v += map(truediv, md.S[1:M + 2], range(1, M + 2))
    elif name == "es":
        v = [0.0]
        if known:
            v += map(truediv, md.e[1:M + 2], range(1, M + 2))
        else:
            v += map(mul, md.e[1:M + 2], _vec(md, "sinv")[1:])
    elif name == "up":
        v = [0.0]
        v += map(add, repeat(1.0, M + 1), _vec(md, "inv")[1:])
    else:  # pragma: no cover - programming error
        raise KeyError(name)
    md.cache[name] = v
    return v


# --------------------------------------------------------------------------
# backward induction
# --------------------------------------------------------------------------

@dataclass
class _Plan:
    """The optimal rule and the value arrays (kept for cheap advice)."""

    md: _Model
    value: float                         # objective incl. cost, whole search
    thr: list[list[int]]                 # thr[l][i], l = 1..m (thr[0] unused)
    W: list[list[float]]                 # W[l][i], l = 0..m
    gain: list[float] | None = None      # top: sum_{j <= min(t_i,k)} h_i(j)
    h1: list[float] | None = None        # top: h_i(1)
    checkpoints: dict[int, list[float]] = field(default_factory=dict)   # top: h_i
    ties: int = 0
    runs: dict[int, list[tuple[int, int, int]]] = field(default_factory=dict)  # optimal rule
    vecs: dict[int, list[float]] = field(default_factory=dict)                  # optimal rule


def _dp_best_level(md: _Model, w_prev: list[float] | None
                   ) -> tuple[list[float], list[int], float, int]:
    """One openings-left level of the goal-best DP, given W^{l-1}.  O(M).

    ``W_i^l = q_i U_{i+1}^l`` with ``U_i^l = -c + (max(pass, offer_1) +
    (i-1) max(pass, offer_other)) / i``, ``offer_1 = p (x_i + W_i^{l-1}) +
    (1-p) W_i^l`` and ``offer_other = p W_i^{l-1} + (1-p) W_i^l``
    (``w_prev`` None stands for W^0 = 0).  Returns (W^l, thresholds, U_1^l,
    ties).  One tight loop over the stages (locals only, zip over reversed
    slices).  Every value is at most ``B = 1 + c M`` in size, so the
    tie tolerance ``1e-13 max(1, |offer|, |pass|)`` is at most ``1e-13 B``:
    differences beyond twice that are decided at once, the rest exactly as
    :func:`_ge` would.
    """
    M, p, c = md.M, md.p, md.c
    thr = [0] * (M + 1)
    onep = 1.0 - p
    tol = _TOL
    big = 2.0 * tol * (1.0 + c * M + 1.0)          # > 2 tol max(1, |off1|, |pas|)
    u = 0.0
    ties = 0
    Wr: list[float] = []
    app = Wr.append
    wps = w_prev[M:0:-1] if w_prev is not None else repeat(0.0, M)
    for i, qi, xi, wi in zip(range(M, 0, -1), md.q[M:0:-1], md.x[M:0:-1], wps):
        pas = qi * u
        app(pas)
        if xi > 0.0:
            base = p * wi + onep * pas
            off1 = base + p * xi
            d = off1 - pas
            if d > big:
                # offer to a best-so-far, clearly (no tie); offer to anyone too?
                e2 = base - pas
                if i > 1 and (e2 > big or (e2 > -big and base > pas + tol * max(
                        1.0, abs(off1), abs(pas)))):
                    thr[i] = i
                    u = -c + (off1 + (i - 1) * base) / i
                else:
                    thr[i] = 1
                    u = -c + (off1 + (i - 1) * pas) / i
                continue
            if d > -big:
                sc = tol * max(1.0, abs(off1), abs(pas))
                if off1 >= pas - sc:
                    if off1 <= pas + sc:
                        ties += 1
                    if i > 1 and base > pas + sc:
                        thr[i] = i
                        u = -c + (off1 + (i - 1) * base) / i
                    else:
                        thr[i] = 1
                        u = -c + (off1 + (i - 1) * pas) / i
                    continue
        u = -c + pas
    W = [0.0]
    W += reversed(Wr)
    W.append(0.0)
    return W, thr, u, ties


def _dp_best(md: _Model) -> _Plan:
    """Goal best, l = 1..m openings left.  O(M m).

    Level l needs only W^{l-1} at the same stage, so the levels are swept one
    after the other, each in O(M).
    """
    W: list[list[float]] = [[0.0] * (md.M + 2)]
    thr: list[list[int]] = [[]]
    ties = 0
    u1 = 0.0
    for lv in range(1, md.m + 1):
        w, t, u1, tl = _dp_best_level(md, W[-1] if lv > 1 else None)
        W.append(w)
        thr.append(t)
        ties += tl
    return _Plan(md=md, value=md.S[1] * u1, thr=thr, W=W, ties=ties)


def _h_step(h_next: list[float], i: int, qi: float, k: int) -> list[float]:
    """h_i from h_{i+1} (top-k chance of relative ranks 1..min(i,k)).  O(k)."""
    L = min(i, k)
    a = 1.0 / (i + 1)
    nxt = h_next[1:] + [0.0]
    end = 1.0 - qi
    return [end + qi * (hj + a * j * (hj1 - hj))
            for j, hj, hj1 in zip(range(1, L + 1), h_next, nxt)]


def _dp_top(md: _Model) -> _Plan:
    """Goal top-k, one opening.  O(M k) time, O(M + k) memory."""
    M, k, p, c = md.M, md.k, md.p, md.c
    q = md.q
    W = [0.0] * (M + 2)
    thr = [0] * (M + 1)
    gain = [0.0] * (M + 2)
    h1 = [0.0] * (M + 2)
    ck: dict[int, list[float]] = {}
    u_next = 0.0
    h: list[float] = []
    ties = 0
    tol = _TOL
    onep = 1.0 - p
    js = range(1, k + 2)
    for i in range(M, 0, -1):
        qi = q[i]
        L = i if i < k else k
        if i == M:
            h = [1.0] * L
        else:
            # _h_step inlined: h_i(j) = (1-q) + q (h(j) + j/(i+1) (h(j+1) - h(j)))
            a = 1.0 / (i + 1)
            end = 1.0 - qi
            nxt = h[1:]
            if len(nxt) < L:
                nxt.append(0.0)
            h = [end + qi * (hj + a * j * (hj1 - hj)) for j, hj, hj1 in zip(js, h, nxt)]
            if len(h) > L:
                del h[L:]
        if i % _CHECKPOINT == 0 or i == M:
            ck[i] = h
        wi = qi * u_next
        awi = wi if wi >= 0.0 else -wi
        sc = tol * (awi if awi > 1.0 else 1.0)
        lo = wi - sc
        t = 0
        while t < L and h[t] >= lo:
            t += 1
        if t and h[t - 1] <= wi + sc:
            ties += 1
        duds = i > L and wi < -sc                 # offering to anyone beats passing
        g = sum(h[:t]) if t else 0.0
        total = p * g + onep * t * wi + (L - t) * wi
        total += (i - L) * (onep * wi if duds else wi)
        u_next = -c + total / i
        W[i] = wi
        thr[i] = i if duds else t
        gain[i] = g
        h1[i] = h[0]
    value = md.S[1] * u_next
    return _Plan(md=md, value=value, thr=[[], thr], W=[[0.0] * (M + 2), W],
                 gain=gain, h1=h1, checkpoints=ck, ties=ties)


def _rank_t(wi: float, ei: float, i: int) -> int:
    """Largest j <= i with j e_i <= W_i (ties accepted)."""
    if ei <= 0.0:
        return i
    t = int(math.floor(wi / ei)) if wi / ei < i + 1 else i
    t = max(0, min(i, t))
    if t < i and _ge(wi, (t + 1) * ei):
        t += 1
    while t > 0 and not _ge(wi, t * ei):
        t -= 1
    return t


def _dp_rank(md: _Model) -> _Plan:
    """Goal rank (smallest expected rank), one opening.  O(M).

    The threshold at stage i is ``floor(W_i / e_i)`` corrected for ties
    (:func:`_rank_t`).  In the loop the floor is final unless ``W_i / e_i``
    is within ``1e-11 (1 + W_i / e_i)`` of an integer (then the exact
    tolerance tests of :func:`_rank_t` run), which is far wider than the
    relative 1e-13 they allow.
    """
    M, p, c = md.M, md.p, md.c
    thr = [0] * (M + 1)
    u_next = 0.0
    ties = 0
    onep = 1.0 - p
    ph = 0.5 * p
    Wr: list[float] = []
    app = Wr.append
    for i, qi, ei in zip(range(M, 0, -1), md.q[M:0:-1], md.e[M:0:-1]):
        wi = (1.0 - qi) * (i + 1) + qi * u_next
        app(wi)
        if ei > 0.0 and wi >= 1.0:
            r = wi / ei
            if r < i:
                t = int(r)
                fr = r - t
                dl = 1e-11 * (1.0 + r)
                if dl < fr < 1.0 - dl:
                    thr[i] = t
                    u_next = c + (ph * ei * t * (t + 1) + onep * t * wi + (i - t) * wi) / i
                    continue
        t = _rank_t(wi, ei, i)
        if t and not _gt(wi, t * ei):
            ties += 1
        thr[i] = t
        u_next = c + (ph * ei * t * (t + 1) + onep * t * wi + (i - t) * wi) / i
    W = [0.0]
    W += reversed(Wr)
    W.append(0.0)
    value = md.prior[0] * 1.0 + md.S[1] * u_next
    return _Plan(md=md, value=value, thr=[[], thr], W=[[0.0] * (M + 2), W],
                 ties=ties)


# --------------------------------------------------------------------------
# checks and caching
# --------------------------------------------------------------------------

def _check(s: Scenario) -> None:
    if s.scores is not None:
        raise ScenarioError("scores", "the relative-rank engine takes no scores")
    if not isinstance(s.pool, (FixedPool, RangePool, PoissonPool, WeightsPool)):
        raise ScenarioError("pool", "the relative-rank engine takes pool.size, "
                                    "pool.size_min/size_max, pool.size_mean or "
                                    "pool.size_weights")
    g = s.goal.type
    if g not in ("best", "top", "rank"):
        raise ScenarioError("goal.type", f"got {g!r}; without scores the goal is best, "
                                         "top or rank")
    if s.openings > 1 and g != "best":
        why = ("whether one of several hires lands in the top k depends on how all of them "
               "rank against each other, which this engine does not track"
               if g == "top" else
               "the expected rank of the best of several hires depends on how all of them "
               "rank against each other, which this engine does not track")
        raise ScenarioError("openings", f"got {s.openings}; goal {g!r} is solved for one "
                                        f"opening only ({why}); use goal \"best\" (the "
                                        "overall best among the hires) for several openings")
    M = s.pool.max_size if s.openings > 1 else 0
    if s.openings > 1 and M * s.openings > OPENINGS_WORK_MAX:
        most = max(1, OPENINGS_WORK_MAX // M)
        raise ScenarioError("openings", f"got {s.openings} with up to {M:,} candidates; at "
                                        f"most {OPENINGS_WORK_MAX:,} (candidates x openings) "
                                        f"can be solved, i.e. at most {most} openings here")
    if s.must_hire and g in ("best", "top"):
        n = single_size(pool_prior(s.pool)) if not isinstance(s.pool, FixedPool) else 1
        if n is None:
            raise ScenarioError("must_hire", "got true, but with an uncertain pool size the "
                                             "last candidate cannot be recognised when they "
                                             "arrive, so a hire cannot be guaranteed; set "
                                             "must_hire to false")
    for i, rule in enumerate(s.compare):
        if rule.kind in ("start_share", "score_at_least"):
            needs = "a time window (pool.window)" if rule.kind == "start_share" else "scores"
            raise ScenarioError(f"compare.{i}.{rule.kind}", f"this rule needs {needs}; "
                                "this scenario has only relative ranks (use skip or "
                                "skip_share)")


def _key(s: Scenario) -> tuple:
    """Everything the DP depends on (not the title or the compared rules).

    The scenario's parts are frozen dataclasses, so the tuple hashes and
    compares by value (a long size_weights tuple hashes in C).
    """
    return (s.pool, s.goal, s.scores, s.accept_probability, s.openings,
            s.cost_per_candidate, s.must_hire)


_PLANS: dict[tuple, _Plan] = {}
_PLANS_MAX = 4


def _plan_cache_clear() -> None:
    """Forget the cached DP tables (benchmarks)."""
    _PLANS.clear()


def _build_plan(s: Scenario) -> _Plan:
    md = _model(s)
    if md.goal == "best":
        return _dp_best(md)
    if md.goal == "top":
        return _dp_top(md)
    return _dp_rank(md)


def _plan(s: Scenario) -> _Plan:
    """The DP for ``s``, cached for the last few scenarios (advice after a
    solve, or a solve with other compared rules, reuses it)."""
    _check(s)
    key = _key(s)
    plan = _PLANS.get(key)
    if plan is None:
        plan = _build_plan(s)
        if len(_PLANS) >= _PLANS_MAX:
            del _PLANS[next(iter(_PLANS))]
        _PLANS[key] = plan
    return plan


# --------------------------------------------------------------------------
# forward evaluation of a threshold rule
# --------------------------------------------------------------------------

@dataclass
class _Rule:
    name: str
    description: str
    rule: dict
    thr: list[list[int]]                  # thr[l][i]
    gain: list[float] | None = None       # top: per-stage sum_{j<=min(t,k)} h_i(j)
    skip: int | None = None
    runs: dict[int, list[tuple[int, int, int]]] = field(default_factory=dict)
    vecs: dict[int, list[float]] = field(default_factory=dict)   # _tvec per level


#: Up to this many runs the per-run slices are used, above it whole-stage vectors.
_FEW_RUNS = 12

#: Run codes: 0 pass everyone, 1 offer to a best-so-far, -1 offer to anyone
#: (t_i >= i >= 2), t >= 2 offer to relative ranks 1..t (t < i).
_ANYONE = -1


def _runs_of(thr: list[int], hi: int) -> list[tuple[int, int, int]]:
    """Maximal runs ``(first, last, code)`` of stages 1..hi (codes above).

    Change points are found in C (``compress``); the Python loop runs once
    per run.  When there are many runs (a stage that offers to anyone is a
    run of its own in ``thr``), the codes themselves are formed in C first,
    so that stretches of such stages are found in one go.  O(hi).
    """
    seg = thr[1:hi + 1]
    n = len(seg)
    if n == 0:
        return []
    cuts = list(compress(range(1, n), map(ne, seg[1:], seg[:-1])))
    if len(cuts) > 64:
        # code = t - (t+1) [t = i] = -1 where anyone is offered (stage 1: t itself)
        codes = list(map(sub, seg, map(mul, map(add, seg, repeat(1)),
                                       map(eq, seg, range(1, n + 1)))))
        codes[0] = seg[0]
        cuts = list(compress(range(1, n), map(ne, codes[1:], codes[:-1])))
        return [(a + 1, b, codes[a]) for a, b in zip([0] + cuts, cuts + [n])]
    out: list[tuple[int, int, int]] = []
    for a, b in zip([0] + cuts, cuts + [n]):
        t = seg[a]
        first, last = a + 1, b
        if t >= 2 and t >= first:
            # t = i at stage `first` (t <= i always): offer to anyone there
            if out and out[-1][2] == _ANYONE and out[-1][1] == first - 1:
                out[-1] = (out[-1][0], first, _ANYONE)
            else:
                out.append((first, first, _ANYONE))
            if last > first:
                out.append((first + 1, last, t))
        else:
            out.append((first, last, t))
    return out


def _rule_runs(md: _Model, rl: _Rule | _Plan, lv: int) -> list[tuple[int, int, int]]:
    """Runs (:func:`_runs_of`) of a rule's or the plan's thresholds at level
    lv, cached on the object (both keep ``thr`` and ``runs``)."""
    r = rl.runs.get(lv)
    if r is None:
        r = rl.runs[lv] = _runs_of(rl.thr[lv], md.reach)
    return r


def _rates(md: _Model, rl: _Rule, lv: int) -> list[float]:
    """h[i] = p t_i / i, the chance that an offer is made and accepted at
    stage i (given the stage is met at this level), i = 1..reach.  O(M)."""
    runs = _rule_runs(md, rl, lv)
    pinv = _vec(md, "pinv")
    h = [0.0]
    if len(runs) <= _FEW_RUNS:
        for s_, e_, t in runs:
            if t == 0:
                h += repeat(0.0, e_ - s_ + 1)
            elif t == 1:
                h += pinv[s_:e_ + 1]
            elif t == _ANYONE:
                h += repeat(md.p, e_ - s_ + 1)
            else:
                h += map(mul, pinv[s_:e_ + 1], repeat(float(t)))
    else:
        h += map(mul, _tvec(md, rl, lv)[1:], pinv[1:])
    return h


def _tvec(md: _Model, rl: _Rule, lv: int) -> list[float]:
    """``T[i]`` = number of relative ranks offered at stage i (t_i; i where
    anyone is offered), i = 1..reach, as floats; built from the runs in C."""
    v = rl.vecs.get(lv)
    if v is not None:
        return v
    T = [0.0]
    for s_, e_, t in _rule_runs(md, rl, lv):
        if t == _ANYONE:
            T += map(float, range(s_, e_ + 1))
        else:
            T += repeat(float(t), e_ - s_ + 1)
    rl.vecs[lv] = T
    return T


def _no_hire(md: _Model, rl: _Rule, lv: int = 1) -> list[float]:
    """``A[i]`` = chance of meeting stage i with nobody hired, as if the pool
    never ended (decisions depend on the stage only), i = 1..reach+1;
    ``A[i+1] = A[i] (1 - p t_i / i)``: a product, run in C.  O(M)."""
    runs = _rule_runs(md, rl, lv)
    if len(runs) <= _FEW_RUNS:
        p = md.p
        fac1 = _vec(md, "fac1")
        f: list[float] = []
        for s_, e_, t in runs:
            if t == 0:
                f += repeat(1.0, e_ - s_ + 1)
            elif t == 1:
                f += fac1[s_:e_ + 1]
            elif t == _ANYONE:
                f += repeat(1.0 - p, e_ - s_ + 1)
            else:
                f += map(sub, repeat(1.0), map(mul, _vec(md, "pinv")[s_:e_ + 1],
                                               repeat(float(t))))
        it: Iterable[float] = f
    else:
        T = _tvec(md, rl, lv)
        it = map(sub, repeat(1.0), map(mul, T[1:], _vec(md, "pinv")[1:]))
    A = [0.0]
    A += accumulate(it, mul, initial=1.0)
    return A


@dataclass
class _Core:
    succ: float          # goal met by a regular offer
    fsucc: float         # goal met by the forced last offer
    hires: float
    forced: float
    none: float
    interviews: float
    rank_mass: float | None   # sum P * E[rank] over hires (+ no-hire penalty for rank)
    hire_best: float     # P(a regular hire is the overall best)
    duds: bool           # some stage offers to anyone (i >= 2)
    #: mass[l][i] = P(meet stage i with l openings left) as if the pool never
    #: ended, out[l][i] = the part of it that hires at stage i (l = 1..m);
    #: for one opening mass[1] is the no-hire chance A of :func:`_no_hire`.
    mass: dict[int, list[float]] = field(default_factory=dict)
    out: dict[int, list[float]] = field(default_factory=dict)
    forced_at: tuple[int, int, float] | None = None   # (N, t_N, p A_N / N) of must_hire
    rates: dict[int, list[float]] = field(default_factory=dict)  # h[l][i] = p t_i / i


def _core1(md: _Model, rl: _Rule) -> _Core:
    """:func:`_core` for one opening.  O(M), the sums in C.

    With ``A`` from :func:`_no_hire`, the chance of meeting stage i is
    ``A_i S_i`` and each offered relative rank is hired with ``p A_i S_i / i``;
    interviews, hires, successes and the rank mass are dot products of ``A``
    with per-stage vectors (t_i, t_i (t_i+1)/2, and [t_i > 0]).
    """
    p, r = md.p, md.reach
    goal, k = md.goal, md.k
    runs = _rule_runs(md, rl, 1)
    A = _no_hire(md, rl)
    S, t1, prior = md.S, md.t1, md.prior
    sinv, es = _vec(md, "sinv"), _vec(md, "es")
    known = md.fixed_n == md.M == r and S[r] == 1.0    # S_i = 1, t1_i = 1/N
    interviews = sum(A[1:r + 1]) if known else sum(map(mul, A[1:r + 1], S[1:r + 1]))
    duds = any(t == _ANYONE and e_ > k for _s, e_, t in runs)
    gain = rl.gain if goal == "top" else None
    hb = hr = rm = ts = 0.0
    if len(runs) <= _FEW_RUNS:
        for s_, e_, t in runs:
            if t == 0:
                continue
            a = A[s_:e_ + 1]
            hb += sum(a) * t1[1] if known else sum(map(mul, a, t1[s_:e_ + 1]))
            if t == 1:
                hr += sum(map(mul, a, sinv[s_:e_ + 1]))
                rm += sum(map(mul, a, es[s_:e_ + 1]))
            elif t == _ANYONE:
                # all i ranks offered: t(t+1)/2 e_i S_i / i = (ns_i + S_i) / 2
                hr += sum(map(mul, a, S[s_:e_ + 1]))
                rm += 0.5 * sum(map(mul, a, map(add, md.ns[s_:e_ + 1], S[s_:e_ + 1])))
            else:
                hr += t * sum(map(mul, a, sinv[s_:e_ + 1]))
                rm += (0.5 * t * (t + 1)) * sum(map(mul, a, es[s_:e_ + 1]))
            if gain is not None:
                ts += sum(map(mul, map(mul, a, sinv[s_:e_ + 1]), gain[s_:e_ + 1]))
    else:
        T = _tvec(md, rl, 1)
        f0 = next(s_ for s_, _e, t in runs if t != 0)
        if known:
            hb = t1[1] * sum(compress(A[f0:r + 1], T[f0:r + 1]))
        else:
            hb = sum(compress(map(mul, A[f0:r + 1], t1[f0:r + 1]), T[f0:r + 1]))
        AS = list(map(mul, A[f0:r + 1], sinv[f0:r + 1]))        # A_i S_i / i
        hr = sum(map(mul, AS, T[f0:r + 1]))
        # t (t+1) / 2 e_i S_i / i
        rm = 0.5 * sum(map(mul, map(mul, A[f0:r + 1], es[f0:r + 1]),
                           map(mul, T[f0:r + 1], map(add, T[f0:r + 1], repeat(1.0)))))
        if gain is not None:
            ts = sum(map(mul, AS, gain[f0:r + 1]))
    hire_best = p * hb
    succ = hire_best if goal == "best" else p * ts if goal == "top" else 0.0
    hires = p * hr
    rank_mass = p * rm
    forced = fsucc = fc = 0.0
    forced_at = None
    N = md.fixed_n if md.must else -1
    if N > 0 and rl.thr[1][N] < N:
        t = rl.thr[1][N]
        wp = A[N] * p / N
        fc = wp * (N - t)
        forced = fc
        hires += fc
        rank_mass += wp * md.e[N] * (N * (N + 1) - t * (t + 1)) * 0.5
        if goal == "top":
            fsucc = wp * max(0, min(k, N) - t)
        elif goal == "best" and t == 0:
            fsucc = wp * md.x[N]
        forced_at = (N, t, wp)
    # the search ends at stage i (N = i) with nobody hired: prior[i] A[i+1]
    if known:
        none = A[r + 1] - fc
        if goal == "rank":
            rank_mass += (A[r + 1] - fc) * (r + 1)
    else:
        none = prior[0] + sum(map(mul, prior[1:r + 1], A[2:r + 2])) - fc
        if goal == "rank":
            rank_mass += prior[0] * 1.0 + sum(map(mul, map(mul, prior[1:r + 1],
                                                           A[2:r + 2]),
                                                  range(2, r + 2))) - fc * (N + 1)
    return _Core(succ=succ, fsucc=fsucc, hires=hires, forced=forced, none=none,
                 interviews=interviews, rank_mass=rank_mass, hire_best=hire_best,
                 duds=duds, mass={1: A}, forced_at=forced_at)


def _core(md: _Model, rl: _Rule) -> _Core:
    """Exact outcome of a threshold rule.  O(M m).

    Pushes P(meet stage i with l openings left) forward, one level after the
    other (a tight loop per level; the level with every opening left is a
    product, run in C); several openings occur with goal best only (success
    adds up over hires, see the module docstring), one opening goes to
    :func:`_core1`.
    """
    if md.m == 1:
        return _core1(md, rl)
    m, p, r = md.m, md.p, md.reach
    N = md.fixed_n if md.must else -1
    S, t1, prior = md.S, md.t1, md.prior
    mass: dict[int, list[float]] = {}
    out: dict[int, list[float]] = {}
    rates: dict[int, list[float]] = {}
    succ = fsucc = hires = forced = interviews = 0.0
    duds = False
    inflow: list[float] | None = None
    forced_at = None
    known = md.fixed_n == md.M == r and S[r] == 1.0    # S_i = 1, t1_i = 1/N
    for lv in range(m, 0, -1):
        runs = _rule_runs(md, rl, lv)
        h = _rates(md, rl, lv)
        if inflow is None:
            a = [0.0]
            a += accumulate(map(sub, repeat(1.0, r), h[1:]), mul, initial=1.0)
        else:
            a = [0.0]
            cur = 0.0
            app = a.append
            for hi, gi in zip(h[1:], inflow[1:]):
                app(cur)
                cur = cur - cur * hi + gi
            app(cur)
        o = [0.0]
        o += map(mul, a[1:r + 1], h[1:])
        if lv == m and N > 0 and rl.thr[m][N] < N:
            t = rl.thr[m][N]
            wp = a[N] * p / N
            fc = wp * (N - t)
            forced += fc
            hires += fc
            if t == 0:
                fsucc += wp * md.x[N]
            forced_at = (N, t, wp)
        if known:
            interviews += sum(a[1:r + 1])
            hires += sum(o)
        else:
            interviews += sum(map(mul, a[1:r + 1], S[1:r + 1]))
            hires += sum(map(mul, o[1:], S[1:r + 1]))
        for s_, e_, t in runs:
            if t != 0:
                succ += (sum(a[s_:e_ + 1]) * t1[1] if known else
                         sum(map(mul, a[s_:e_ + 1], t1[s_:e_ + 1])))
                if t == _ANYONE and any(a[s_:e_ + 1]):
                    duds = True
        mass[lv], out[lv] = a, o
        rates[lv] = h
        inflow = o
    succ *= p
    fc = forced_at[2] * (N - forced_at[1]) if forced_at else 0.0
    none = prior[0] + sum(map(mul, prior[1:r + 1], mass[m][2:r + 2])) - fc
    return _Core(succ=succ, fsucc=fsucc, hires=hires, forced=forced, none=none,
                 interviews=interviews, rank_mass=None, hire_best=succ, duds=duds,
                 mass=mass, out=out, forced_at=forced_at, rates=rates)


def _beyond_best(md: _Model, rl: _Rule, core: _Core, levels: range) -> bool:
    """Some level in ``levels`` offers to more than best-so-fars at a stage it
    can be at (mass > 0)."""
    for lv in levels:
        a = core.mass[lv]
        for s_, e_, t in _rule_runs(md, rl, lv):
            if t not in (0, 1) and any(a[s_:e_ + 1]):
                return True
    return False


def _moment_rank(md: _Model, rl: _Rule, core: _Core | None = None) -> float | None:
    """Expected rank of the best hire, several openings, best-so-far rules.

    Valid when every offer goes to a best-so-far (thresholds 0 or 1): the
    newest hire is then the best one, and the mean of the Markov chain of its
    relative rank evolves linearly: at level l, ``mom' = mom (1 + (1 - p t)/i)
    - hires_out + hires_in`` (a new best hire has relative rank 1).  One tight
    loop per level with an opening left, a prefix sum for the last level,
    O(M m).  Returns E[rank | a hire].
    """
    m, r = md.m, md.reach
    if core is None or not core.out:
        core = _core(md, rl)
    if _beyond_best(md, rl, core, md.levels):
        return None
    up, prior = _vec(md, "up"), md.prior
    fin = hired = 0.0
    inflow = core.out[m][:]
    inmom = inflow[:]
    if core.forced_at is not None:
        N, t, wp = core.forced_at
        inflow[N] += wp * (N - t)
        inmom[N] += wp * (N * (N + 1) - t * (t + 1)) / 2.0
    known = md.fixed_n == md.M == r and md.S[r] == 1.0     # prior = [N = r]
    for lv in range(m - 1, 0, -1):
        h = core.rates.get(lv) or _rates(md, rl, lv)
        a, o = core.mass[lv], core.out[lv]
        mo = [0.0]
        cur = 0.0
        app = mo.append
        for ci, di in zip(map(sub, up[1:r + 1], h[1:]), map(sub, inmom[1:], o[1:])):
            app(cur)
            cur = cur * ci + di
        app(cur)
        if known:
            fin += mo[r + 1]
            hired += a[r + 1]
        else:
            fin += sum(map(mul, prior[1:r + 1], mo[2:r + 2]))
            hired += sum(map(mul, prior[1:r + 1], a[2:r + 2]))
        if lv == m - 1 and core.forced_at is not None:
            N, t, wp = core.forced_at          # the forced hire joins after stage N
            hired += prior[N] * wp * (N - t)
        inflow = o
        inmom = o
    # level 0 (every opening filled): mom' = mom (1 + 1/i) + in_i, i.e.
    # mom_{i+1} / (i+1) = mom_i / i + in_i / (i+1): a prefix sum
    nu = list(accumulate(map(truediv, inmom[1:r + 1], range(2, r + 2)), initial=0.0))
    a0 = list(accumulate(inflow[1:r + 1], initial=0.0))        # a0[i] = mass after stage i
    if known:
        fin += (r + 1) * nu[r]
        hired += a0[r]
    else:
        fin += sum(map(mul, map(mul, prior[1:r + 1], nu[1:r + 1]), range(2, r + 2)))
        hired += sum(map(mul, prior[1:r + 1], a0[1:r + 1]))
    return fin / hired if hired > 0.0 else None


# --------------------------------------------------------------------------
# the rank of the hire: exact distribution and "among the best m" table
# --------------------------------------------------------------------------

def _tau_head(md: _Model, rl: _Rule, core: _Core, R: int) -> list[float]:
    """P(hire's rank = a), a = 1..R: known pool size N, one opening, every
    stage passes, offers to best-so-fars or offers to anyone.  O(M + R runs).

    A hire at stage i that is best so far has rank a with chance
    ``C(N-a, i-1) / C(N, i) = (i/N) C(N-i, a-1) / C(N-1, a-1)``, so a run
    s..e of best-so-far stages gives ``P(a) = (p/N) tau(a)`` with
    ``tau(a) = sum_{i=s}^{e} A_i C(N-i, a-1) / C(N-1, a-1)``.  Inside the run
    ``i A_{i+1} = (i - p) A_i``; summing by parts turns this into the
    first-order recurrence (derived in the module docstring)

        tau(a+1) = a / (a+1-p) * (tau(a) - delta_a),
        delta_a = ((s-1) A_s rho_s(a) - e A_{e+1} rho_e(a)) / a,
        rho_s(a) = C(N-s+1, a) / C(N-1, a),  rho_e(a) = C(N-e, a) / C(N-1, a),

    with ``tau(1) = sum_{i in run} A_i``: O(1) per rank and run, no binomial
    coefficient formed (the factor a/(a+1-p) <= 1 damps rounding errors).  A
    stage that offers to anyone hires a uniformly random candidate (rank
    uniform on 1..N); the forced last offer of must_hire hires rank j for
    each j > t_N with chance p A_N / N.
    """
    N = md.fixed_n
    assert N is not None
    p = md.p
    A = core.mass[1]
    runs = _rule_runs(md, rl, 1)
    state = []
    anyone = 0.0
    first_run = False
    for s_, e_, t in runs:
        if t == 1:
            state.append([s_, e_, sum(A[s_:e_ + 1]), 1.0, 1.0, (s_ - 1) * A[s_],
                          e_ * A[e_ + 1]])
            first_run = first_run or s_ == 1
        elif t == _ANYONE:
            anyone += sum(A[s_:e_ + 1])
    uni = p * anyone / N
    pN = p / N
    ft, fw = (core.forced_at[1], core.forced_at[2]) if core.forced_at else (N, 0.0)
    out: list[float] = []
    for a in range(1, R + 1):
        if a < N:
            v = pN * math.fsum(st[2] for st in state) if len(state) > 1 else \
                pN * (state[0][2] if state else 0.0)
        else:                                # rank N: best so far only at stage 1
            v = pN * A[1] if first_run else 0.0
        v += uni
        if a > ft:
            v += fw
        out.append(v)
        if a + 1 <= R and a + 1 < N:
            den = 1.0 / (N - a)
            cf = a / (a + 1.0 - p)
            for st in state:
                s_, e_ = st[0], st[1]
                st[3] *= (N - s_ + 2 - a) * den      # rho_s(a)
                st[4] *= (N - e_ + 1 - a) * den      # rho_e(a)
                st[2] = cf * (st[2] - (st[5] * st[3] - st[6] * st[4]) / a)
    return out


def _log_choose(n: int, k: int) -> float:
    return math.lgamma(n + 1.0) - math.lgamma(k + 1.0) - math.lgamma(n - k + 1.0)


def _rank_max_e(hi: int, R: int) -> int:
    """Largest R' <= R with R' C(hi, R') < 1e300 (the sums below stay finite)."""
    lo_, top = 0, min(R, hi)
    while lo_ < top:
        mid = (lo_ + top + 1) // 2
        if math.log(mid) + _log_choose(hi, mid) < 690.0:
            lo_ = mid
        else:
            top = mid - 1
    return lo_


def _e_support(md: _Model) -> tuple[int, int]:
    """The pool sizes n >= 1 with prior[n] > 0 lie in lo..hi."""
    hi = md.reach
    lo = next((n for n in range(1, hi + 1) if md.prior[n] > 0.0), hi)
    return lo, hi


def _e_lo(md: _Model, rl: _Rule) -> int | None:
    """First stage at which a hire can happen (None: never)."""
    lo = next((s_ for s_, _e, t in _rule_runs(md, rl, md.m) if t != 0), None)
    if md.must and md.fixed_n is not None and rl.thr[md.m][md.fixed_n] < md.fixed_n:
        lo = md.fixed_n if lo is None else min(lo, md.fixed_n)
    return lo


def _e_cost(md: _Model, rl: _Rule) -> int:
    """Work units (element updates) per rank of :func:`_e_head`."""
    lo = _e_lo(md, rl)
    if lo is None:
        return 1
    L = md.reach - lo + 1
    g = sum(e_ - s_ + 1 for s_, e_, t in _rule_runs(md, rl, md.m) if t not in (0, 1))
    cost = 2 * L * md.m + 3 * g
    if md.fixed_n is None:
        nlo, hi = _e_support(md)
        cost += 2 * (hi - max(nlo, lo) + 1)
    return cost


def _masks(runs: list[tuple[int, int, int]], lo: int
           ) -> list[tuple[int, int, int]]:
    """Maximal stretches (first, last, max rank) of stages lo.. that offer
    relative ranks >= 2 to a first hire: ``(s, e, t)`` means ranks 2..t at
    stage s..e (t = 0: "every rank <= i", offers to anyone)."""
    out: list[tuple[int, int, int]] = []
    for s_, e_, t in runs:
        if t in (0, 1) or e_ < lo:
            continue
        out.append((max(s_, lo), e_, 0 if t == _ANYONE else t))
    return out


def _e_head(md: _Model, rl: _Rule, core: _Core, R: int,
            cuts: dict[float, list[int]] | None = None
            ) -> tuple[list[float], dict[float, float]]:
    """P(rank of the (best) hire = a), a = 1..R, any pool, by prefix sums.

    Let ``D_i^l(a)`` be the chance (as if the pool never ended) that after
    stage i there are l openings left and the best hire has relative rank a.
    Between stages a hire of relative rank a moves to a+1 with chance a/i
    (a better newcomer), at levels l >= 1 minus the p t/i that a new
    best-so-far is hired (thresholds 0/1 there), plus new hires.  In
    ``E_i(a) = a C(i, a) D_i(a)`` the stay factors ``1 - a/i`` telescope
    and each rank is a prefix sum of the rank below:

        E_i(a) = E_{i-1}(a) + E_{i-1}(a-1) (1 - p t_i / (a-1)) + Y_i(a),

    ``Y_i(a) = p A_i C(i-1, a-1)`` for every offered relative rank a <= t_i
    of the first hire (A = chance of no hire yet) and ``i out_i`` at a = 1
    for the later hires; the search ending at stage n gives ``P(a) =
    sum_n prior[n] E_n(a) / (a C(n, a))``.  Exact (sums of non-negative
    terms), O(M m) per rank, a few passes in C; R is kept below where
    ``a C(M, a)`` would overflow.  ``cuts[x][n]`` (when given) is the share
    cut ``max(1, floor(x n))``; then the second return value is
    ``sum_n prior[n] P(rank <= cut | N = n)`` over the computed ranks.
    """
    m, p = md.m, md.p
    prior = md.prior
    hi = md.reach
    shares = {x: 0.0 for x in (cuts or {})}
    lo = _e_lo(md, rl)
    if lo is None:
        return [0.0] * R, shares
    L = hi - lo + 1
    top_runs = _rule_runs(md, rl, m)
    A = core.mass[m]
    # rank 1 of the first hire: p A_i at every stage that makes an offer
    y1 = [0.0] * L
    for s_, e_, t in top_runs:
        if t != 0 and e_ >= lo:
            s0 = max(s_, lo)
            y1[s0 - lo:e_ - lo + 1] = map(mul, A[s0:e_ + 1], repeat(p))
    masks = _masks(top_runs, lo)
    # V[j] = p A_i C(i-1, a-1) over the stages that offer ranks >= 2 (i = lo + j)
    V = y1[:] if masks else []
    forced = core.forced_at
    fv = 0.0
    if forced is not None:
        N, tN, wp = forced
        fv = wp * N                     # p A_N C(N-1, a-1) at a = 1
        if tN == 0:
            y1[N - lo] += fv
    # levels with a hire: level m-1 gets the first hire, level l < m-1 gets
    # (at rank 1) the hires out of level l+1
    E: dict[int, list[float]] = {m - 1: list(accumulate(y1))}
    for lv in range(m - 2, -1, -1):
        o = core.out[lv + 1]
        E[lv] = list(accumulate(map(mul, o[lo:hi + 1], range(lo, hi + 1))))
    acc_runs: dict[int, list[tuple[int, int]]] = {
        lv: [(max(s_, lo) - lo, e_ - lo + 1) for s_, e_, t in _rule_runs(md, rl, lv)
             if t == 1 and e_ >= lo] for lv in range(1, m)}
    fixed = md.fixed_n
    if fixed is None:
        nlo, _nhi = _e_support(md)
        w0 = max(nlo, lo)
        # om[n - w0] = prior[n] / (a C(n, a)) for n = w0..hi, w0 >= a
        om = list(map(truediv, prior[w0:hi + 1], range(w0, hi + 1)))
        cut_n = {x: w0 for x in shares}      # smallest n with cut(n) >= a
    out: list[float] = []
    cn = float(fixed) if fixed else 0.0        # a C(N, a) at a = 1
    for a in range(1, R + 1):
        if a > 1:
            a1 = a - 1
            inv_a1 = 1.0 / a1
            for lv in range(m - 1, -1, -1):
                prev = E[lv]
                live = lv == m - 1 and (masks or (forced is not None and a > forced[1]))
                if lv == 0 and not live:
                    # no new hires at this rank: a shifted prefix sum
                    E[0] = list(accumulate(islice(prev, L - 1), initial=0.0))
                    continue
                inc = [0.0]
                inc += islice(prev, L - 1)
                if lv >= 1:
                    cf = 1.0 - p / a1
                    for j0, j1 in acc_runs[lv]:
                        inc[j0:j1] = map(mul, inc[j0:j1], repeat(cf))
                if lv == m - 1:
                    # stages that still offer rank a, merged into maximal stretches
                    masks = [mk for mk in masks if not (mk[2] and a > mk[2])]
                    stretch: list[list[int]] = []
                    for s_, e_, _t in masks:
                        if stretch and stretch[-1][1] == s_ - 1:
                            stretch[-1][1] = e_
                        else:
                            stretch.append([s_, e_])
                    for s_, e_ in stretch:
                        j0, j1 = s_ - lo, e_ - lo + 1
                        # C(i-1, a-1) = C(i-1, a-2) (i-a+1) / (a-1)
                        V[j0:j1] = map(mul, map(mul, V[j0:j1], range(s_ - a1, e_ - a1 + 1)),
                                       repeat(inv_a1))
                        inc[j0:j1] = map(add, inc[j0:j1], V[j0:j1])
                    if forced is not None:
                        N, tN, wp = forced
                        fv *= (N - a1) * inv_a1
                        if a > tN:
                            inc[N - lo] += fv
                E[lv] = list(accumulate(inc))
        if fixed is not None:
            if a > 1:
                cn *= (fixed - a + 1) / (a - 1)     # a C(N, a) from (a-1) C(N, a-1)
            j = fixed - lo
            v = math.fsum(E[lv][j] for lv in range(m)) / cn if m > 1 else E[0][j] / cn
        else:
            if a > 1:
                # prior[n] / (a C(n, a)) = previous * (a-1) / (n-a+1), n >= a
                if w0 < a:
                    del om[:a - w0]
                    w0 = a
                om = list(map(mul, om, map(truediv, repeat(float(a - 1)),
                                           range(w0 - a + 1, hi - a + 2))))
            j0 = w0 - lo
            if m == 1:
                tot: Iterable[float] = islice(E[0], j0, None)
            else:
                tot = E[0][j0:]
                for lv in range(1, m):
                    tot = list(map(add, tot, islice(E[lv], j0, None)))
            if shares:
                prod = list(map(mul, om, tot))
                v = sum(prod)
                for x in shares:
                    # n with cut(n) >= a: a suffix of n (cut is non-decreasing)
                    cx = cuts[x]  # type: ignore[index]
                    n_ = max(cut_n[x], w0)
                    while n_ <= hi and cx[n_] < a:
                        n_ += 1
                    cut_n[x] = n_
                    if n_ <= hi:
                        shares[x] += sum(prod[n_ - w0:])
            else:
                v = sum(map(mul, om, tot))
        out.append(v)
    return out, shares


def _dbinom_raw(x: int, n: int, p: float, q: float) -> float:
    """Binomial pmf b(x; n, p) with q = 1-p, relative error ~1e-15 (Loader 2000)."""
    if x < 0 or x > n:
        return 0.0
    if p == 0.0:
        return 1.0 if x == 0 else 0.0
    if q == 0.0:
        return 1.0 if x == n else 0.0
    if x == 0:
        if n == 0:
            return 1.0
        lc = -_bd0(n, n * q) - n * p if p < 0.1 else n * math.log(q)
        return math.exp(lc)
    if x == n:
        lc = -_bd0(n, n * p) - n * q if q < 0.1 else n * math.log(p)
        return math.exp(lc)
    lc = (_stirlerr(n) - _stirlerr(x) - _stirlerr(n - x) - _bd0(x, n * p)
          - _bd0(n - x, n * q))
    lf = _LN_2PI + math.log(x) + math.log1p(-x / n)
    return math.exp(lc - 0.5 * lf)


def _dhyper(h: int, K: int, i: int, N: int) -> float:
    """P(H = h), H = how many of the best K are among the first i of N
    (hypergeometric), as a ratio of binomial pmfs (Loader 2000)."""
    p = i / N
    q = (N - i) / N
    return (_dbinom_raw(h, K, p, q) * _dbinom_raw(i - h, N - K, p, q)
            / _dbinom_raw(i, N, p, q))


def _min_mean(t: int, K: int, i: int, N: int) -> float:
    """E[min(H, t)] for H ~ Hypergeometric(N, K, i), 1 <= t < min(K, i).

    Hoeffding (1963) bounds P(H <= mu - y) and P(H >= mu + y) by
    exp(-2 y^2 / min(i, K)); where they are below e^-80 the sum is cut
    (error below t e^-80).  Otherwise ``t - sum_{h<t} (t-h) P(H = h)`` over
    h within sqrt(40 min(i, K)) of the mean, walking down from P(H = t-1).
    """
    mu = i * K / N
    w = min(i, K)
    y = math.sqrt(40.0 * w)
    h_min = i - (N - K) if i > N - K else 0
    if h_min >= t:
        return float(t)
    if mu - (t - 1) > y:
        return float(t)               # P(H < t) < e^-80
    if t - mu > y:
        return mu                     # P(H > t) < e^-80: min(H, t) = H
    h_lo = max(h_min, int(math.floor(mu - y)))
    h = t - 1
    pr = _dhyper(h, K, i, N)
    acc = 0.0
    while True:
        acc += (t - h) * pr
        if h <= h_lo or pr == 0.0:
            break
        pr *= h * (N - K - i + h) / ((K - h + 1.0) * (i - h + 1.0))
        h -= 1
    return t - acc


def _sure(t: int, K: int, i: int, N: int) -> bool:
    """The first shortcut of :func:`_min_mean`: mu - (t-1) > sqrt(40 min(i, K))."""
    return i * K / N - (t - 1) > math.sqrt(40.0 * min(i, K))


def _sure_from(t: int, K: int, N: int) -> int:
    """Smallest stage i with :func:`_sure` (it then holds for every later i).

    ``g(i) = iK/N - (t-1) - sqrt(40 min(i, K))`` is continuous and crosses
    zero once (with u = sqrt(i) it is a quadratic in u below K, linear above),
    so the crossing comes from the closed form and is then moved to the
    exact boundary of the floating-point test.
    """
    r = K / N
    b = math.sqrt(40.0)
    u = (b + math.sqrt(40.0 + 4.0 * r * (t - 1))) / (2.0 * r)
    i = int(u * u)
    if i >= K:
        i = int((t - 1 + math.sqrt(40.0 * K)) / r)
    i = max(1, i - 2)
    while not _sure(t, K, i, N):
        i += 1
    while i > 1 and _sure(t, K, i - 1, N):
        i -= 1
    return i


def _fixed_tails(md: _Model, rl: _Rule, core: _Core, keys: list[int]) -> dict[int, float]:
    """P(hire's rank <= K) for a known pool size N, one opening, any rule.

    ``P(rank <= K | relative rank j at stage i) = P(H >= j)``, H the number of
    the best K among the first i (hypergeometric), so a stage offering ranks
    1..t contributes ``p A_i / i * E[min(H_i, t)]``: ``1 - P(H_i = 0)`` for a
    best-so-far (``P(H_i = 0) = prod_{l<i} (N-K-l)/(N-l) <= (1 - K/N)^i``, cut
    once below 1e-35), ``i K / N`` for anyone, :func:`_min_mean` otherwise
    (which is t from the stage :func:`_sure_from` on).  O(runs) per K plus
    the stages where a tail is not negligible: usually O(N / K) per K.
    """
    N = md.fixed_n
    assert N is not None
    p = md.p
    A = core.mass[1]
    inv = _vec(md, "inv")
    runs = [(s_, e_, t, sum(map(mul, A[s_:e_ + 1], inv[s_:e_ + 1])), sum(A[s_:e_ + 1]))
            for s_, e_, t in _rule_runs(md, rl, 1) if t != 0]
    out: dict[int, float] = {}
    for K in keys:
        if K >= N:
            out[K] = 1.0 - core.none
            continue
        acc = 0.0
        lq = math.log1p(-K / N)                    # log of the bound's ratio
        for s_, e_, t, sai, sa in runs:
            if t == 1:
                acc += p * sai
                # minus p A_i / i P(H_i = 0), while it matters
                if s_ > N - K or s_ * lq < -80.6:           # (1-K/N)^s < 1e-35
                    continue
                p0 = math.prod(map(truediv, range(N - K, N - K - s_, -1),
                                   range(N, N - s_, -1)))
                if p0 < 1e-35:
                    continue
                ratio = (N - K - s_) / (N - s_)
                if ratio <= 0.0:
                    stop = s_
                else:
                    stop = min(e_, s_ + int(math.log(1e-35 / p0) / math.log(ratio)) + 1)
                vals = list(accumulate(map(truediv, range(N - K - s_, N - K - stop, -1),
                                           range(N - s_, N - stop, -1)), mul, initial=p0))
                acc -= p * sum(map(mul, map(mul, A[s_:stop + 1], inv[s_:stop + 1]), vals))
            elif t == _ANYONE or t >= K:
                acc += p * K / N * sa
            elif _sure(t, K, s_, N):
                acc += p * t * sai             # P(H < t) < e^-80 on the whole run
            else:
                # from stage i0 on P(H < t) < e^-80 (see _min_mean): E[min(H, t)] = t
                i0 = max(s_, min(e_ + 1, _sure_from(t, K, N)))
                if i0 <= e_:
                    acc += p * t * sum(map(mul, A[i0:e_ + 1], inv[i0:e_ + 1]))
                for i in range(s_, i0):
                    acc += p * A[i] / i * _min_mean(t, K, i, N)
        if core.forced_at is not None:
            _N, tN, wp = core.forced_at
            acc += wp * max(0, min(K, N) - tN)
        out[K] = acc
    return out


def _push1(md: _Model, rl: _Rule, R: int) -> tuple[list[float], float, float,
                                                      dict[float, float]]:
    """:func:`_push` for one opening.  O(M R).

    The process is run as if the pool never ended (decisions depend on the
    stage only), and the state at stage n is weighted by prior[n]: the
    search ends there with exactly that chance.
    """
    p = md.p
    N = md.fixed_n if md.must else -1
    prior = md.prior
    B = R + 1
    D = [0.0] * (R + 2)
    A = 1.0
    fin = [0.0] * (R + 2)
    none = prior[0]
    shares = {x: 0.0 for x in TOP_SHARES}
    rr = list(range(R + 2))
    thr = rl.thr[1]
    started = False
    for i in range(1, md.reach + 1):
        inv = 1.0 / i
        L = i if i < R else R
        if started:
            g = [r * v for r, v in zip(rr, D[:L + 1])]
            if L == R:
                D[B] += inv * g[R]
            D[:L + 1] = [v - inv * (a - b) for v, a, b in zip(D, g, [0.0] + g)]
        t = thr[i]
        a0 = A
        if A > 0.0 and t:
            add_ = A * p * inv
            top_j = t if t < L else L
            D[1:top_j + 1] = [v + add_ for v in D[1:top_j + 1]]
            if t > R:
                D[B] += add_ * (t - R)
            A -= add_ * t
            started = True
        if i == N and t < i and a0 > 0.0:
            add_ = a0 * p * inv
            hi_ = i if i < R else R
            if hi_ > t:
                D[t + 1:hi_ + 1] = [v + add_ for v in D[t + 1:hi_ + 1]]
            if i > max(t, R):
                D[B] += add_ * (i - max(t, R))
            A -= add_ * (i - t)
            started = True
        w = prior[i]
        if w > 0.0:
            fin[:L + 1] = [f + w * v for f, v in zip(fin, D[:L + 1])]
            fin[B] += w * D[B]
            none += w * A
            for x in TOP_SHARES:
                cut = min(max(1, int(math.floor(x * i))), L)
                shares[x] += w * sum(D[1:cut + 1])
    return fin, fin[B], none, shares


def _push(md: _Model, rl: _Rule, R: int) -> tuple[list[float], float, float,
                                                     dict[float, float]]:
    """Distribution of the (best) hire's absolute rank, ranks 1..R exactly.

    The direct stage-by-stage push of P(l openings left, relative rank r of
    the best hire so far); ``r = R+1`` stands for "worse than R".  O(M R m)
    with a list operation per stage: the reference for the faster
    :func:`_tau_head` / :func:`_e_head` (tests), and the fallback for several
    openings when a level with a hire offers to more than best-so-fars.
    Returns (fin[0..R+1], beyond, none, shares) with shares[x] = P(rank <=
    max(1, floor(x n))) summed over the actual size n (exact only when R
    covers it).
    """
    if md.m == 1:
        return _push1(md, rl, R)
    m, p = md.m, md.p
    N = md.fixed_n if md.must else None
    B = R + 1
    D = [[0.0] * (R + 2) for _ in range(m)]     # levels 0..m-1 (a hire exists)
    A = 1.0                                     # level m: no hire yet (see _push1)
    fin = [0.0] * (R + 2)
    none = md.prior[0]
    shares = {x: 0.0 for x in TOP_SHARES}
    rr = list(range(R + 2))
    for i in range(1, md.reach + 1):
        inv = 1.0 / i
        pi = p * inv
        L = min(i, R)
        new = [[0.0] * (R + 2) for _ in range(m)]
        # finished level 0: the best hire's relative rank drifts
        d = D[0]
        if any(d[1:L + 1]) or d[B]:
            nd = new[0]
            g = [r * v for r, v in zip(rr, d[:L + 1])]
            nd[:L + 1] = [v - inv * (x - y) for v, x, y in zip(d, g, [0.0] + g)]
            nd[B] = d[B] + (inv * g[R] if L == R else 0.0)
        # searching levels with a hire: l = 1..m-1
        for lv in range(1, m):
            d = D[lv]
            t = rl.thr[lv][i]
            seg = d[1:L + 1]
            if not any(seg) and not d[B]:
                continue
            nd, dn = new[lv], new[lv - 1]
            rng = range(1, L + 1)
            tt = t if t < L else L
            if tt:
                # new best j <= min(t, r): mass of r >= j (incl. "worse than R")
                suf = list(itertools.accumulate(reversed(seg), initial=d[B]))
                dn[1:tt + 1] = [v + pi * suf[L - j + 1]
                                for j, v in zip(range(1, tt + 1), dn[1:tt + 1])]
            td = t - 1 if t - 1 < L else L
            if td >= 1:
                # offers to someone worse than the best hire: the best stays r
                dn[1:td + 1] = [v + pi * (t - r) * dr
                                for r, v, dr in zip(range(1, td + 1), dn[1:td + 1], seg)]
            if t > R:
                dn[B] += pi * (t - R) * d[B]
            stay = [((i - r) - p * (t - r if t > r else 0)) * inv * dr
                    for r, dr in zip(rng, seg)]
            up = [(r - p * (r if r < t else t)) * inv * dr for r, dr in zip(rng, seg)]
            nd[1:L + 1] = [x + y for x, y in zip(nd[1:L + 1], stay)]
            nd[2:L + 2] = [x + y for x, y in zip(nd[2:L + 2], up)]
            nd[B] += d[B] * (1.0 - pi * t)
        # level m: nobody hired yet
        if A > 0.0:
            t = rl.thr[m][i]
            dn = new[m - 1]
            for j in range(1, min(t, L) + 1):
                dn[j] += A * pi
            if t > R:
                dn[B] += A * pi * (t - R)
            hire = A * pi * t
            if N is not None and i == N and t < i:
                for j in range(t + 1, min(i, R) + 1):
                    dn[j] += A * pi
                if i > max(t, R):
                    dn[B] += A * pi * (i - max(t, R))
                hire += A * pi * (i - t)
            A -= hire
        D = new
        end = md.prior[i]
        if end > 0.0:
            for lv in range(m):
                d = D[lv]
                fin[:L + 1] = [f + end * v for f, v in zip(fin, d[:L + 1])]
                fin[B] += end * d[B]
            none += end * A
            for x in TOP_SHARES:
                cut = min(max(1, int(math.floor(x * i))), L)
                shares[x] += end * sum(sum(D[lv][1:cut + 1]) for lv in range(m))
    return fin, fin[B], none, shares


def _push_cost(md: _Model, R: int) -> int:
    """Work units of :func:`_push` with depth R (several openings count 3x)."""
    M, m = md.reach, md.m
    lo = min(M, R)
    return (lo * (lo + 1) // 2 + (M - lo) * R) * (1 if m == 1 else 3 * m) + M * 30


@dataclass
class _Extras:
    top: dict[str, float] | None
    dist: RankDistribution | None
    exp_rank_openings: float | None


def _monotone(top: dict[str, float]) -> dict[str, float]:
    """Remove rounding-level dips: P(rank <= K) cannot fall as K grows."""
    out = dict(top)
    for keys in ([str(K) for K in TOP_COUNTS], [_share_key(sh) for sh in TOP_SHARES]):
        run = 0.0
        for key in keys:
            run = max(run, out[key])
            out[key] = run
    return out


def _share_key(sh: float) -> str:
    return f"{round(sh * 100)}%"


def _share_cuts(md: _Model) -> dict[float, list[int]]:
    """cuts[x][n] = max(1, floor(x n)), n = 0..M (the "best share x" of n)."""
    M = md.M
    return {x: [max(1, int(math.floor(x * n))) for n in range(M + 1)] for x in TOP_SHARES}


def _extras(md: _Model, rules: list[_Rule], cores: list[_Core]) -> tuple[list[_Extras],
                                                                           list[str]]:
    """Rank distribution and top-m table for every rule.

    * Known pool size, one opening, rules that pass, offer to best-so-fars or
      to anyone (goal best, every compared skip rule): :func:`_tau_head`, ranks
      1..min(N, RANK_HEAD), and :func:`_fixed_tails` for the share columns --
      always, O(N) per rule.
    * Otherwise (goals top / rank, uncertain pool sizes, several openings):
      :func:`_e_head`, O(M m) per rank.  Rules are served in order (the
      optimal rule first): a rule gets every rank up to the largest share
      cut when that fits what is left of :data:`PUSH_FULL` (the share
      columns for uncertain sizes / several openings need them), else ranks
      1..R with R as large as what is left of :data:`PUSH_BUDGET` allows
      (at least 1, at most RANK_HEAD; known sizes with one opening always
      get ranks 1..10 and the share columns from :func:`_fixed_tails`).
    * Several openings where a level with a hire offers to more than
      best-so-fars: the direct push :func:`_push` within :data:`PUSH_FALLBACK`.

    Every listed rank is exact; ``rest`` is the chance of a hire ranked lower
    than the last listed rank.
    """
    notes: list[str] = []
    M = md.M
    head = min(M, RANK_HEAD)
    fixed = md.fixed_n
    share_k: dict[float, int] = {}
    keys: list[int] = []
    if fixed is not None:
        for sh in TOP_SHARES:
            share_k[sh] = max(1, int(math.floor(sh * fixed)))
        keys = sorted(set(TOP_COUNTS) | set(share_k.values()))
    full = max(head, max(max(1, int(math.floor(x * M))) for x in TOP_SHARES))
    left = PUSH_BUDGET
    left_full = PUSH_FULL
    out: list[_Extras] = []
    missing_dist = missing_top = 0
    shown_R: set[int] = set()
    cuts: dict[float, list[int]] | None = None
    for rl, core in zip(rules, cores):
        top: dict[str, float] | None = None
        dist: RankDistribution | None = None
        er: float | None = None
        probs: list[float] | None = None
        le: dict[int, float] = {}             # P(rank <= K), K in keys or TOP_COUNTS
        share_v: dict[float, float] | None = None
        one = md.m == 1
        beyond = (not one) and _beyond_best(md, rl, core, range(1, md.m))
        if (one and fixed is not None
                and all(t in (0, 1, _ANYONE) for _s, _e, t in _rule_runs(md, rl, 1))):
            probs = _tau_head(md, rl, core, head)
        elif not beyond:
            per = _e_cost(md, rl)
            cap = _rank_max_e(md.reach, full)
            want_full = not (one and fixed is not None)
            # the share columns add a product and three partial sums per rank
            per_full = per + (3 * (md.reach - (_e_lo(md, rl) or 1) + 1)
                              if fixed is None else 0)
            if want_full and cap >= full and per_full * full <= left_full:
                R = full
                left_full -= per_full * R
            else:
                R = min(head, cap, max(1, left // per))
                if one and fixed is not None:
                    R = max(R, min(M, 10, cap))       # the top-m counts need 1..10
                left -= per * R
            if R == full and want_full and fixed is None:
                if cuts is None:
                    cuts = _share_cuts(md)
                probs, share_v = _e_head(md, rl, core, R, cuts)
            else:
                probs, _sv = _e_head(md, rl, core, R)
            if R == full and want_full and fixed is not None:
                cum = list(accumulate(probs))
                share_v = {x: cum[min(share_k[x], R) - 1] for x in TOP_SHARES}
        else:
            R = min(full, M)
            cost = _push_cost(md, R)
            if cost > PUSH_FALLBACK:
                R = head
                cost = _push_cost(md, R)
            if cost <= PUSH_FALLBACK:
                fin, _b, _none, shares = _push(md, rl, R)
                probs = fin[1:R + 1]
                if R >= full:
                    share_v = shares if fixed is None else {
                        x: math.fsum(fin[1:min(share_k[x], R) + 1]) for x in TOP_SHARES}
                    hired = 1.0 - core.none
                    if R == M and hired > 0:
                        er = math.fsum(r * v for r, v in enumerate(fin[:R + 1])) / hired
        if probs is not None:
            listed = [_clamp(v) for v in probs[:head]]
            rest = max(0.0, 1.0 - core.none - math.fsum(listed))
            dist = RankDistribution(listed, rest, _clamp(core.none))
            shown_R.add(len(listed))
            cum = list(accumulate(probs))
            for K in TOP_COUNTS:
                if K <= len(probs):
                    le[K] = cum[K - 1]
                elif len(probs) >= M:
                    le[K] = cum[-1]
        if len(le) == len(TOP_COUNTS):
            if fixed is not None and one and share_v is None:
                tails = _fixed_tails(md, rl, core, sorted(set(share_k.values())))
                share_v = {x: tails[share_k[x]] for x in TOP_SHARES}
            if share_v is not None:
                top = {str(K): _clamp(le[K]) for K in TOP_COUNTS}
                for sh in TOP_SHARES:
                    top[_share_key(sh)] = _clamp(share_v[sh])
                top = _monotone(top)
        missing_dist += dist is None
        missing_top += top is None
        out.append(_Extras(top, dist, er))
    if missing_dist:
        which = "every rule" if missing_dist == len(rules) else "some compared rules"
        notes.append(f"The rank distribution is left out for {which}: it is computed "
                     f"exactly only while the work fits a limit of {PUSH_FALLBACK:,} "
                     "state updates.")
    if shown_R and min(shown_R) < head:
        notes.append(f"The rank distribution lists ranks 1..{min(shown_R):,} exactly (the "
                     "chance of a lower rank is in 'rest'); more ranks would exceed the "
                     "work limit for this pool.")
    if missing_top:
        which = "every rule" if missing_top == len(rules) else "some compared rules"
        notes.append(f"The 'hire is among the best m' table is left out for {which}: for "
                     "this pool it would take more work than the limit allows. Numbers "
                     "shown are exact.")
    return out, notes


def _rule_result(md: _Model, rl: _Rule, core: _Core, ex: _Extras) -> RuleResult:
    goal = md.goal
    hire = core.hires
    if goal == "rank":
        exp_rank = core.rank_mass
        success = None
    else:
        success = _clamp(core.succ + core.fsucc)
        if core.rank_mass is not None:
            exp_rank = core.rank_mass / hire if hire > 0 else None
        else:
            exp_rank = _moment_rank(md, rl, core)
            if exp_rank is None:
                exp_rank = ex.exp_rank_openings
    best = _clamp(core.hire_best if goal == "rank" else core.succ)
    forced = _clamp(core.forced)
    none = _clamp(core.none)
    other = max(0.0, 1.0 - best - forced - none)
    return RuleResult(
        name=rl.name, description=rl.description, rule=rl.rule,
        success_probability=success, expected_rank=exp_rank, expected_score=None,
        expected_interviews=core.interviews, p_no_hire=none,
        outcome=Outcome(best=best, other=other, none=none, forced_last=forced),
        top=ex.top, rank_distribution=ex.dist, expected_hires=hire,
        expected_cost=md.c * core.interviews)


def _objective(md: _Model, core: _Core) -> float:
    """The optimised quantity (incl. cost) of an evaluated rule."""
    if md.goal == "rank":
        return (core.rank_mass or 0.0) + md.c * core.interviews
    return core.succ + core.fsucc - md.c * core.interviews


# --------------------------------------------------------------------------
# compared rules, curve, words
# --------------------------------------------------------------------------

def _skip_rule(md: _Model, plan: _Plan, r: int, name: str, rule: dict,
               description: str) -> _Rule:
    M = md.M
    r = max(0, min(r, M))
    t = [0] * (r + 1) + [1] * (M - r)
    gain = None
    if md.goal == "top":
        h1 = plan.h1 or []
        gain = [0.0] * (r + 1) + h1[r + 1:M + 2]
    hi = md.reach
    runs = ([(1, min(r, hi), 0)] if r >= 1 else []) + ([(r + 1, hi, 1)] if r < hi else [])
    return _Rule(name=name, description=description, rule=rule,
                 thr=[[]] + [t] * md.m, gain=gain, skip=r,
                 runs={lv: runs for lv in md.levels})


def _skip_target(md: _Model) -> str:
    if md.m > 1:
        return "each candidate better than everyone before until the openings are filled"
    if md.p < 1.0:
        return "each candidate better than everyone before until one accepts"
    return "the first candidate better than everyone before"


def _skip_words(md: _Model, r: int, lead: str | None = None) -> str:
    """Words for "skip r, then offer to each best-so-far"; ``lead`` replaces
    "Pass on the first r"."""
    target = _skip_target(md)
    if r >= md.M:
        text = "Never make an offer (the rule skips the whole pool)."
    elif r == 0 and md.p == 1.0 and md.m == 1:
        text = "Make an offer to the first candidate."
    elif r == 0:
        text = f"Make an offer to {target}, starting with the first candidate."
    else:
        text = f"{lead or 'Pass on the first ' + _count(r)}, then make an offer to {target}."
    if md.must and r < md.M and not (r == 0 and md.p == 1.0 and md.m == 1):
        text += " If nobody has been hired by the last candidate, take the last one."
    return text


def _compare(md: _Model, plan: _Plan, s: Scenario) -> list[_Rule]:
    out = []
    for c in s.compare:
        if c.kind == "skip":
            r = int(c.value)
            desc = _skip_words(md, r)
            if md.fixed_n is None and r >= md.M:
                desc += f" ({r:,} is at least the largest possible pool size, {md.M:,}.)"
            out.append(_skip_rule(md, plan, r, f"skip {r:,}", {"skip": r}, desc))
        else:
            pct = f"{c.value * 100:.4g}%"
            if md.fixed_n is not None:
                r = int(math.floor(c.value * md.fixed_n))
                lead = f"Skip {pct} of the pool (the first {r:,})"
            else:
                r = int(math.floor(c.value * md.mean))
                lead = (f"Skip {pct} of the expected pool size {md.mean:,.4g}, rounded "
                        f"down (the first {r:,})")
            desc = _skip_words(md, r, lead)
            out.append(_skip_rule(md, plan, r, f"skip {pct}", {"skip_share": c.value}, desc))
    return out


def _curve(md: _Model, plan: _Plan, opt_skip: int | None) -> Curve | None:
    """Success chance of skip-r for every r (or ~1000 of them).  O(M) + O(1) each.

    success(r) = p sum_{i>r} prod_{l=r+1}^{i-1} (1 - p/l) G(i), with
    G(i) = sum_{n>=i} prior[n]/n (goal best) or S(i) h_i(1)/i (goal top);
    with P(n) = prod_{l=2}^{n} (1 - p/l) the product is P(i-1)/P(r), so
    suffix sums of P(i-1) G(i) give every point in O(1).  The products and
    sums run in C (``accumulate``).
    """
    if md.goal == "rank" or md.m > 1:
        return None
    M, p = md.M, md.p
    if md.goal == "best":
        G = md.t1
    else:
        h1 = plan.h1 or []
        G = [0.0]
        G += [s_ * h / i for i, s_, h in zip(range(1, M + 2), md.S[1:M + 2], h1[1:M + 2])]
    P = [1.0]
    P += accumulate(_vec(md, "fac1")[2:M + 2], mul, initial=1.0)      # P[0..M+1]
    # Z[i] = sum_{j >= i} P[j-1] G[j], i = 1..M (summed from the top), kept
    # as Zr[i-1] = Z[i] / gz.  A known size has G = gz = 1/N on 1..N.
    g1 = md.goal == "best" and md.fixed_n == M and md.S[M] == 1.0
    Zr = list(accumulate(reversed(P[0:M]) if g1 else
                         reversed(list(map(mul, P[0:M], G[1:M + 1])))))
    Zr.reverse()            # now Zr[j] = Z[j + 1], j = 0..M-1
    Zr += [0.0, 0.0]
    gz = G[1] if g1 else 1.0

    def Z(i: int) -> float:
        return gz * Zr[i - 1]

    if M <= CURVE_FULL_MAX:
        skips = list(range(M))
        complete = True
    else:
        pts = {round(j * (M - 1) / (CURVE_POINTS - 1)) for j in range(CURVE_POINTS)}
        if opt_skip is not None and opt_skip < M:
            pts.add(opt_skip)
        skips = sorted(pts)
        complete = False
    pz = p * gz
    succ = [_clamp(pz * Zr[r] / P[r]) for r in skips]
    if skips and skips[0] == 0:
        succ[0] = _clamp(p * (G[1] + (1.0 - p) * Z(2)))
    limit: list[float | None]
    if md.goal == "best" and md.fixed_n is not None:
        n = md.fixed_n
        if p >= 1.0:
            limit = [-(r / n) * math.log(r / n) if r > 0 else 0.0 for r in skips]
        else:
            limit = [p * ((r / n) ** p - r / n) / (1.0 - p) if r > 0 else 0.0
                     for r in skips]
    else:
        limit = [None] * len(skips)
    return Curve(skips=skips, success=succ, limit=limit, complete=complete)


def _runs_text(runs: list[tuple[int, int]], last: int) -> str:
    parts = []
    for a, b in runs:
        if b >= last and a > 1:
            parts.append(f"from stage {a:,} on")
        elif b >= last:
            parts.append("at every stage")
        elif a == b:
            parts.append(f"at stage {a:,}")
        else:
            parts.append(f"at stages {a:,}-{b:,}")
    if len(parts) == 1:
        return parts[0]
    return ", then again ".join([", ".join(parts[:-1]), parts[-1]]) if len(parts) == 2 \
        else ", ".join(parts[:-1]) + ", then again " + parts[-1]


def _ordinal(n: int) -> str:
    suf = "th" if 10 <= n % 100 <= 20 else {1: "st", 2: "nd", 3: "rd"}.get(n % 10, "th")
    return f"{n}{suf}"


def _count(n: int) -> str:
    return "candidate" if n == 1 else f"{n:,}"


def _who(v: int) -> str:
    return ("a candidate better than everyone before" if v == 1 else
            f"anyone ranked {_ordinal(v)} or better so far")


def _blocks(runs: list[tuple[int, int, int]]) -> list[tuple[int, int]]:
    """Maximal stretches of stages that make some offer (code != 0)."""
    out: list[tuple[int, int]] = []
    for s_, e_, t in runs:
        if t == 0:
            continue
        if out and out[-1][1] == s_ - 1:
            out[-1] = (out[-1][0], e_)
        else:
            out.append((s_, e_))
    return out


#: Runs of the optimal thresholds at a level, cached on the plan.
_plan_runs = _rule_runs


def _level_words(md: _Model, t: list[int], runs: list[tuple[int, int, int]]) -> str:
    """Plain words for one list of thresholds (one openings-left level).

    Works on the runs of equal offers (:func:`_runs_of`), O(runs).
    """
    last = md.reach
    if md.p == 1.0 and md.m == 1 and t[1] >= 1:
        return "make an offer to the first candidate"
    k = md.k
    # "anyone" = a candidate who cannot meet the goal (offered only to stop paying):
    # stages i > k with t_i >= i
    anyone = ([(max(s_, k + 1), e_) for s_, e_, c in runs if c == _ANYONE and e_ > k]
              if md.goal != "rank" else [])
    cost_txt = ("make an offer to anyone (more interviews would cost more than they can "
                "still add)")
    if md.goal == "best":
        blocks = _blocks(runs)
        if not blocks:
            return "pass everyone"
        if len(blocks) == 1 and blocks[0][1] == last and blocks[0][0] > 1:
            text = (f"pass on the first {_count(blocks[0][0] - 1)}, then make an offer to "
                    "each candidate better than everyone before")
        elif len(blocks) == 1 and blocks[0] == (1, last):
            text = "make an offer to each candidate better than everyone before"
        else:
            text = ("make an offer to a candidate better than everyone before "
                    + _runs_text(blocks, last) + "; pass at the other stages")
        if anyone:
            text += f"; {_runs_text(anyone, last)}, {cost_txt}"
        return text
    # goals top / rank: say where the bar rises.  The regular bar min(t_i, i)
    # (0 where the offer is only to stop paying) as segments (first, last, v),
    # v = None meaning "v = i at stage i".
    segs: list[tuple[int, int, int | None]] = []
    for s_, e_, c in runs:
        if c == _ANYONE:
            if md.goal != "rank" and e_ > k:
                if s_ <= k:
                    segs.append((s_, k, None))
                segs.append((max(s_, k + 1), e_, 0))
            else:
                segs.append((s_, e_, None))
        else:
            segs.append((s_, e_, c))
    mono = True
    prev = -1
    for s_, e_, v in segs:
        if (s_ if v is None else v) < prev:
            mono = False
            break
        prev = e_ if v is None else v
    take_last = (md.goal == "rank" and md.fixed_n is not None and t[last] >= last)
    if mono:
        first = next((s_ for s_, e_, v in segs if v is None or v >= 1), None)
        if first is None:
            return "pass everyone"
        pieces = []
        if all(v is None or v >= e_ for s_, e_, v in segs if e_ >= first):
            who = "every candidate" if first == 1 else "every candidate after that"
            head = f"pass on the first {_count(first - 1)}, then " if first > 1 else ""
            return f"{head}make an offer to {who}"
        if first > 1:
            pieces.append(f"pass on the first {_count(first - 1)}")
        # changes of the bar: (stage, new bar); keep the first six and the count
        changes: list[tuple[int, int]] = []
        count = 0
        last_change = None
        prev = 0
        for s_, e_, v in segs:
            if v is None:
                lo_ = s_ if (s_ == first or s_ != prev) else s_ + 1
                n_ = e_ - lo_ + 1
                if n_ > 0:
                    for i in range(lo_, min(e_, lo_ + 6 - len(changes) - 1) + 1):
                        if len(changes) < 6:
                            changes.append((i, i))
                    count += n_
                    last_change = (e_, e_)
                prev = e_
            else:
                if v > 0 and (s_ == first or v != prev):
                    if len(changes) < 6:
                        changes.append((s_, v))
                    count += 1
                    last_change = (s_, v)
                prev = v
        if take_last and count and last_change is not None and last_change[0] == last:
            count -= 1
            del changes[count:]
        shown = changes[:5]
        for idx, (i, v) in enumerate(shown):
            if idx == 0:
                pieces.append(f"from stage {i:,} make an offer to {_who(v)}")
            else:
                pieces.append(f"from stage {i:,} to {_who(v)}")
        if count > len(shown):
            pieces.append(f"after that the bar keeps rising ({count - len(shown):,} "
                          "more steps, see the table)")
        if take_last:
            pieces.append("at the last candidate, take anyone")
        text = "; ".join(pieces)
    else:
        regular: list[int] = []
        for s_, e_, v in segs:
            regular += range(s_, e_ + 1) if v is None else repeat(v, e_ - s_ + 1)
        groups = group_thresholds(regular)
        parts = []
        for g in groups[:6]:
            where = (f"stage {g.first:,}" if g.first == g.last else
                     f"stages {g.first:,}-{g.last:,}")
            what = "pass" if g.threshold == 0 else f"offer to {_who(g.threshold)}"
            parts.append(f"{where}: {what}")
        if len(groups) > 6:
            parts.append("and so on (see the table)")
        text = "; ".join(parts)
    if anyone:
        text += f"; {_runs_text(anyone, last)}, {cost_txt}"
    return text


def _words(md: _Model, plan: _Plan) -> str:
    if md.m == 1:
        text = _level_words(md, plan.thr[1], _plan_runs(md, plan, 1))
        text = text[0].upper() + text[1:] + "."
    else:
        parts = []
        for lv in range(md.m, 0, -1):
            lw = _level_words(md, plan.thr[lv], _plan_runs(md, plan, lv))
            label = (f"With {lv} openings left" if lv == md.m else
                     f"with {lv} left" if lv > 1 else "with 1 left")
            parts.append(f"{label}: {lw}")
        text = "; ".join(parts) + "."
    if md.p < 1.0:
        text += " If an offer is declined, keep going with the same rule."
    if md.must and md.goal != "rank":
        text += " If nobody has been hired by the last candidate, make the last one an offer."
    return text


def _skip_of(md: _Model, plan: _Plan) -> int | None:
    """r if every level is 'pass r, then take each best-so-far', else None."""
    r_all = None
    for lv in md.levels:
        runs = (_plan_runs(md, plan, lv) if md.reach == md.M else
                _runs_of(plan.thr[lv], md.M))
        if len(runs) == 1 and runs[0][2] == 1:
            r = 0
        elif len(runs) == 2 and runs[0][2] == 0 and runs[1][2] == 1:
            r = runs[0][1]
        else:
            return None
        if r_all is not None and r != r_all:
            return None
        r_all = r
    return r_all


def _interval(md: _Model, plan: _Plan) -> bool:
    """The stages that make some offer form one stretch."""
    return len(_blocks(_plan_runs(md, plan, md.m))) <= 1


def _groups(md: _Model, plan: _Plan, thresholds: list[int]) -> list[StageGroup]:
    """:func:`seqpick.results.group_thresholds` of the optimal thresholds, from
    the cached runs (a stage offering to anyone is a group of its own)."""
    if md.reach != md.M:
        return group_thresholds(thresholds)
    out: list[StageGroup] = []
    for s_, e_, t in _plan_runs(md, plan, md.m):
        if t == _ANYONE:
            if out and out[-1].threshold == s_:      # t = s_ continues the group before
                out[-1].last = s_
                s_ += 1
            stages = range(s_, e_ + 1)
            out += map(StageGroup, stages, stages, stages)
        elif out and out[-1].threshold == t:
            out[-1].last = e_
        else:
            out.append(StageGroup(s_, e_, t))
    return out


# --------------------------------------------------------------------------
# limits, notes, method
# --------------------------------------------------------------------------

def _limits(md: _Model, s: Scenario) -> list[Limit]:
    out: list[Limit] = []
    plain = md.p == 1.0 and md.c == 0.0
    fixed = isinstance(s.pool, FixedPool)
    if md.goal == "best" and md.m == 1 and md.c == 0.0 and fixed:
        if md.p == 1.0:
            out.append(Limit("success_probability", 1.0 / math.e,
                             "1/e: Lindley 1961; Gilbert & Mosteller 1966"))
        else:
            v = md.p ** (1.0 / (1.0 - md.p))
            out.append(Limit("success_probability", v,
                             "p^(1/(1-p)) with offers accepted with chance p: Smith 1975, "
                             "J. Appl. Probab. 12"))
            out.append(Limit("skip_share", v, "skip the first p^(1/(1-p)) share: Smith 1975"))
    if (md.goal == "best" and md.m == 1 and plain and isinstance(s.pool, RangePool)
            and s.pool.size_min <= 1):
        out.append(Limit("success_probability", 2.0 * math.exp(-2.0),
                         "2/e^2 for a pool size uniform on 1..M: Presman & Sonin 1972, "
                         "Theory Probab. Appl. 17"))
    if md.goal == "best" and plain and fixed and md.m in (2, 3):
        v = {2: 0.5910, 3: 0.7321}[md.m]
        out.append(Limit("success_probability", v,
                         f"about {v:.4f} with {md.m} choices: Gilbert & Mosteller 1966, "
                         "J. Amer. Statist. Assoc. 61"))
    if md.goal == "top" and md.k == 2 and plain and fixed:
        out.append(Limit("success_probability", 0.5736,
                         "about 0.5736 for one of the best two: Gilbert & Mosteller 1966; "
                         "Gusein-Zade 1966"))
    if md.goal == "top" and md.k == 1 and plain and fixed:
        out.append(Limit("success_probability", 1.0 / math.e,
                         "1/e: Lindley 1961; Gilbert & Mosteller 1966"))
    if md.goal == "rank" and plain and fixed:
        out.append(Limit("expected_rank", 3.8695,
                         "about 3.8695: Chow, Moriguchi, Robbins & Samuels 1964, Israel J. "
                         "Math. 2"))
    return out


def _method(md: _Model) -> str:
    if md.goal == "best":
        cx = "O(M*m)" if md.m > 1 else "O(M)"
        what = "(stage, openings left)" if md.m > 1 else "stage"
    elif md.goal == "top":
        cx, what = "O(M*k)", "(stage, relative rank <= k)"
    else:
        cx, what = "O(M)", "stage, closed-form sums over accepted ranks"
    post = "" if md.fixed_n is not None else " with the pool-size posterior"
    return (f"backward induction over {what}{post}, {cx} (Gilbert & Mosteller 1966; "
            "Chow et al. 1964; Smith 1975; Presman & Sonin 1972)")


# --------------------------------------------------------------------------
# public entry points
# --------------------------------------------------------------------------

def _optimal_rule(md: _Model, plan: _Plan, words: str) -> _Rule:
    return _Rule(name="optimal", description=words, rule={"optimal": True}, thr=plan.thr,
                 gain=plan.gain, runs=plan.runs, vecs=plan.vecs)


def solve_rankdp(s: Scenario) -> SolveResult:
    """Optimal rule, its exact performance, compared rules, curve and limits."""
    plan = _plan(s)
    md = plan.md
    words = _words(md, plan)
    skip = _skip_of(md, plan)
    thresholds = plan.thr[md.m][1:md.M + 1]
    by_left = ({str(lv): plan.thr[lv][1:md.M + 1] for lv in md.levels}
               if md.m > 1 else None)
    policy = Policy(thresholds=thresholds, groups=_groups(md, plan, thresholds), words=words,
                    skip=skip, thresholds_by_openings_left=by_left,
                    interval=_interval(md, plan))
    rules = [_optimal_rule(md, plan, words)] + _compare(md, plan, s)
    cores = [_core(md, rl) for rl in rules]
    extras, notes = _extras(md, rules, cores)
    results = [_rule_result(md, rl, co, ex) for rl, co, ex in zip(rules, cores, extras)]
    notes = _notes(md, s, plan, cores[0]) + notes
    return SolveResult.from_rule(
        scenario=s.to_dict(), goal=md.goal, policy=policy, optimal=results[0],
        compare=results[1:], curve=_curve(md, plan, skip), limits=_limits(md, s),
        notes=notes, method=_method(md))


def _notes(md: _Model, s: Scenario, plan: _Plan, core: _Core) -> list[str]:
    notes = ["Assumes the candidates arrive in random order and that you can rank each one "
             "against all those seen before (and nothing more)."]
    if plan.ties:
        notes.append("At some stages offering and passing are exactly as good; the rule "
                     "then makes the offer (it stops earlier)"
                     + (" if the candidate can still meet the goal." if md.goal != "rank"
                        else "."))
    if isinstance(s.pool, PoissonPool):
        notes.append(f"The Poisson pool size is cut at {md.M:,} (the chance of more is below "
                     "1e-16) and the rest renormalised; all numbers are exact for that.")
    if md.fixed_n is None:
        notes.append("You cannot tell in advance which candidate is the last one: the "
                     "search may end before the rule has hired anyone.")
    if md.goal == "rank":
        if md.fixed_n is None and s.must_hire:
            notes.append("must_hire cannot be honoured when the pool size is uncertain (the "
                         "last candidate cannot be recognised); a search that ends with no "
                         "hire counts as rank n+1, one worse than the worst of the n "
                         "candidates.")
        elif core.none > 0:
            notes.append("A search that ends with no hire counts as rank n+1, one worse "
                         "than the worst of the n candidates; expected_rank includes it.")
    if md.must and md.p < 1.0:
        notes.append("The offer forced on the last candidate (must_hire) can be declined "
                     "like any other, so a search can still end with no hire.")
    if core.fsucc > 0:
        notes.append("success_probability counts a forced last hire that happens to meet "
                     "the goal; outcome.best counts regular offers only.")
    if core.duds and md.c > 0 and md.goal != "rank":
        notes.append("With this cost per candidate the rule at some point makes an offer "
                     "to anyone: hiring is the only way to stop paying for more interviews.")
    if md.c > 0:
        notes.append("Values net of cost subtract cost_per_candidate for every candidate "
                     "seen (added to the expected rank for goal rank).")
    if md.m > 1:
        notes.append("With several openings, success means the overall best is among the "
                     "hires; the rank figures describe the best person hired. The success "
                     "curve is shown for one opening only.")
    if md.goal == "best" and md.m == 1 and md.fixed_n is not None and md.p < 1.0:
        notes.append("The curve's large-N column is p(x^p - x)/(1 - p) at x = skip/N, the "
                     "declines version of -x ln x (its maximum p^(1/(1-p)) is Smith's limit).")
    if md.fixed_n is None and md.goal != "rank":
        notes.append("The curve has no large-N column for an uncertain pool size.")
    return notes


def _h_at(plan: _Plan, i: int) -> list[float]:
    """h_i (top-k chances by relative rank) from the nearest checkpoint.  O(256 k)."""
    md = plan.md
    above = min(c for c in plan.checkpoints if c >= i)
    h = plan.checkpoints[above]
    for st in range(above - 1, i - 1, -1):
        h = _h_step(h, st, md.q[st], md.k)
    return h


def advise_rankdp(s: Scenario, state: SearchState) -> Advice:
    """The optimal decision for the newest candidate from the actual state.

    Only (stage, relative rank of the newest, openings left) matter: earlier
    relative ranks are independent of the future, so the values below are
    those of the optimal continuation from here whatever happened before.
    Values count future costs only (the cost of those already seen is spent).
    """
    plan = _plan(s)
    md = plan.md
    i = state.stage
    j = state.newest.relative_rank or 1
    lv = state.openings_left
    if i > md.M or md.S[i] <= 0.0:
        raise ScenarioError("seen", f"got {i:,} candidates; under this pool-size prior "
                                    "that many cannot arrive")
    p = md.p
    kind = "expected_rank" if md.goal == "rank" else "success_probability"
    t_plan = plan.thr[lv][i]
    notes: list[str] = []
    past = 0.0
    if md.goal == "best":
        payoff = md.x[i] if j == 1 else 0.0
        w_pass = plan.W[lv][i]
        w_hire = plan.W[lv - 1][i]
        if state.hires and j != 1:
            # an earlier hire may still be the best so far: it is the overall best
            # with chance x_i, the same whatever we do now
            best_idx = max(a for a, e in enumerate(state.seen[:-1]) if e.relative_rank == 1)
            if state.seen[best_idx].hired:
                past = md.x[i]
                notes.append("Includes the chance that an earlier hire (still the best so "
                             "far) is the overall best.")
        offer_v = p * (payoff + w_hire) + (1.0 - p) * w_pass + past
        pass_v = w_pass + past
    elif md.goal == "top":
        h = _h_at(plan, i)
        payoff = h[j - 1] if j <= len(h) else 0.0
        w_pass = plan.W[1][i]
        offer_v = p * payoff + (1.0 - p) * w_pass
        pass_v = w_pass
    else:
        w_pass = plan.W[1][i]
        offer_v = p * j * md.e[i] + (1.0 - p) * w_pass
        pass_v = w_pass
    plan_offer = j <= t_plan
    forced = md.must and i == md.fixed_n and lv == md.m
    decision = "offer" if (plan_offer or forced) else "pass"
    if md.c > 0:
        notes.append("Values subtract the cost of the candidates still to come.")
    seen = (f"{i:,} of {md.fixed_n:,} seen" if md.fixed_n is not None
            else f"{i:,} seen")
    who = ("best so far" if j == 1 else f"ranked {_ordinal(j)} so far")

    def num(v: float) -> str:
        if kind == "expected_rank":
            return f"{v:.3f}"
        return f"{v:.1%}" if md.c == 0 else f"{v:.4f}"
    label = ("expected rank" if kind == "expected_rank" else
             "net value (chance of success minus future costs)" if md.c > 0 else
             "chance of success")
    compare_txt = f"{label} {num(offer_v)} if you offer now vs {num(pass_v)} if you pass"
    hopeless = ((md.goal == "best" and j > 1) or (md.goal == "top" and j > md.k))
    if forced and not plan_offer:
        reason = (f"{seen}: the last candidate, and nobody has been hired yet: must_hire "
                  "says make the offer.")
    elif decision == "offer" and hopeless:
        reason = (f"{seen}; {who}, so this one cannot meet the goal, but further "
                  f"interviews cost more than they can add: offer ({compare_txt}).")
    elif decision == "offer":
        reason = f"{who.capitalize()} at stage {i:,}: offer ({compare_txt})."
    elif hopeless:
        what = "the overall best" if md.goal == "best" else f"among the best {md.k}"
        reason = f"{seen}; {who}, so cannot be {what}: pass ({compare_txt})."
    else:
        later = next((a for a in range(i + 1, md.reach + 1) if plan.thr[lv][a] >= j), None)
        if t_plan == 0 and later is not None:
            reason = (f"{seen}; {who}, but the plan waits until candidate {later:,} ("
                      f"{compare_txt}).")
        elif later is not None:
            bar = "the best so far" if t_plan == 1 else f"ranks up to {t_plan}"
            reason = (f"{seen}; {who}, but at this stage the plan offers only to {bar} "
                      f"({compare_txt}).")
        else:
            reason = f"{seen}; {who}: pass ({compare_txt})."
    if md.goal == "rank" and (md.fixed_n == i or i == md.reach):
        notes.append(f"Passing the last candidate ends the search with no hire, counted as "
                     f"rank {i + 1} (one worse than the worst).")
    return Advice(decision=decision, reason=reason, stage=i, openings_left=lv,
                  value_kind=kind, offer_value=offer_v, pass_value=pass_v,
                  threshold=t_plan, plan_decision="offer" if (plan_offer or forced)
                  else "pass", notes=notes)
