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
evaluated exactly in the same model: the chance of meeting stage i with l
openings left is pushed forward in O(M m); success, the outcome split,
interviews, hires and the expected rank (arithmetic series over j <= t) follow
from it.  The rank distribution (ranks 1..200) and the top-m table push the
distribution of the hire's current relative rank forward (exact, O(M R)
for R ranks); for fixed pools and one opening the top-m table instead uses
``P(rank <= K | relative rank j at stage i) = P(Hypergeom(N, K, i) >= j)``
(at least j of the best K are among the first i), O(M) per entry for
best-so-far rules.  These extras are computed when the work fits the limits
below, else left ``None`` (never a guess) with a note.

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
* rank distribution: O(M min(M, 200) m) per rule, computed while the total
  stays within :data:`PUSH_BUDGET` (about one CPU second); the top-m table
  for fixed pools and one opening: O(M) per entry for best-so-far rules
  (:data:`HYPER_BUDGET`).

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
"""

from __future__ import annotations

import itertools
import json
import math
import operator
from array import array
from dataclasses import dataclass, field
from functools import lru_cache
from typing import Sequence

from .advise import Advice, SearchState
from .errors import ScenarioError
from .prior import pool_prior, prior_mean, single_size, suffix_sums, survival
from .results import (TOP_COUNTS, TOP_SHARES, Curve, Limit, Outcome, Policy,
                      RankDistribution, RuleResult, SolveResult, group_thresholds)
from .scenario import (FixedPool, PoissonPool, RangePool, Scenario, WeightsPool)

__all__ = [
    "solve_rankdp",
    "advise_rankdp",
    "RANK_HEAD",
    "CURVE_FULL_MAX",
    "CURVE_POINTS",
    "OPENINGS_WORK_MAX",
    "PUSH_BUDGET",
    "HYPER_BUDGET",
]

#: Ranks 1..RANK_HEAD are listed one by one in the rank distribution.
RANK_HEAD = 200
#: Up to this many stages the curve lists every skip count; above, about CURVE_POINTS.
CURVE_FULL_MAX = 2000
CURVE_POINTS = 1000
#: Largest (largest pool size) x (openings) solved with several openings.
OPENINGS_WORK_MAX = 800_000
#: Work limit (state updates, summed over all rules) for the exact rank distribution.
PUSH_BUDGET = 4_000_000
#: Work limit for the hypergeometric top-m table (fixed pools, one opening).
HYPER_BUDGET = 4_000_000
_TOL = 1e-13
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
    fixed_n: int | None     # the size if it is known for sure
    goal: str
    k: int
    p: float
    c: float
    m: int
    must: bool              # forced offer to the last candidate (known size only)
    mean: float
    reach: int              # largest stage with S > 0

    @property
    def levels(self) -> range:
        return range(1, self.m + 1)


def _model(s: Scenario) -> _Model:
    prior = pool_prior(s.pool)
    M = len(prior) - 1
    S = survival(prior)
    q = [0.0] * (M + 2)
    for i in range(1, M + 1):
        q[i] = S[i + 1] / S[i] if S[i] > 0.0 else 0.0
        if q[i] > 1.0:
            q[i] = 1.0
    inv = [prior[n] / n if n > 0 else 0.0 for n in range(M + 1)]
    t1 = suffix_sums(inv)
    ns = suffix_sums([n * prior[n] for n in range(M + 1)])
    x = [0.0] * (M + 2)
    e = [0.0] * (M + 2)
    for i in range(1, M + 1):
        if S[i] > 0.0:
            x[i] = min(1.0, i * t1[i] / S[i])
            e[i] = (ns[i] / S[i] + 1.0) / (i + 1.0)
    fixed_n = single_size(prior)
    reach = max((i for i in range(1, M + 1) if S[i] > 0.0), default=0)
    goal = s.goal.type
    must = bool(s.must_hire) and fixed_n is not None and goal in ("best", "top", "rank")
    return _Model(M=M, prior=prior, S=S, q=q, x=x, t1=t1, e=e, fixed_n=fixed_n, goal=goal,
                  k=s.goal.k or 1, p=s.accept_probability, c=s.cost_per_candidate,
                  m=s.openings, must=must, mean=prior_mean(prior), reach=reach)


# --------------------------------------------------------------------------
# backward induction
# --------------------------------------------------------------------------

@dataclass
class _Plan:
    """The optimal rule and the value arrays (kept for cheap advice)."""

    md: _Model
    value: float                         # objective incl. cost, whole search
    thr: list[list[int]]                 # thr[l][i], l = 1..m (thr[0] unused)
    W: list[array]                       # W[l][i], l = 0..m
    gain: list[float] | None = None      # top: sum_{j <= min(t_i,k)} h_i(j)
    h1: list[float] | None = None        # top: h_i(1)
    checkpoints: dict[int, list[float]] = field(default_factory=dict)   # top: h_i
    ties: int = 0


def _dp_best_level(md: _Model, w_prev: array) -> tuple[array, list[int], float, int]:
    """One openings-left level of the goal-best DP, given W^{l-1}.  O(M).

    ``W_i^l = q_i U_{i+1}^l`` with ``U_i^l = -c + (max(pass, offer_1) +
    (i-1) max(pass, offer_other)) / i``, ``offer_1 = p (x_i + W_i^{l-1}) +
    (1-p) W_i^l`` and ``offer_other = p W_i^{l-1} + (1-p) W_i^l``.
    Returns (W^l, thresholds, U_1^l, ties).
    """
    M, p, c = md.M, md.p, md.c
    q, x = md.q, md.x
    W = array("d", bytes(8 * (M + 2)))
    thr = [0] * (M + 1)
    onep = 1.0 - p
    u = 0.0
    ties = 0
    for i in range(M, 0, -1):
        pas = q[i] * u
        base = p * w_prev[i] + onep * pas
        xi = x[i]
        off1 = base + p * xi
        sc = _TOL * max(1.0, abs(off1), abs(pas))
        if xi > 0.0 and off1 >= pas - sc:
            if off1 <= pas + sc:
                ties += 1
            if i > 1 and base > pas + sc:
                thr[i] = i
                u = -c + (off1 + (i - 1) * base) / i
            else:
                thr[i] = 1
                u = -c + (off1 + (i - 1) * pas) / i
        else:
            u = -c + pas
        W[i] = pas
    return W, thr, u, ties


def _dp_best(md: _Model) -> _Plan:
    """Goal best, l = 1..m openings left.  O(M m).

    Level l needs only W^{l-1} at the same stage, so the levels are swept one
    after the other, each in O(M).
    """
    W = [array("d", bytes(8 * (md.M + 2)))]
    thr: list[list[int]] = [[]]
    ties = 0
    u1 = 0.0
    for _lv in range(1, md.m + 1):
        w, t, u1, tl = _dp_best_level(md, W[-1])
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
    W = array("d", bytes(8 * (M + 2)))
    thr = [0] * (M + 1)
    gain = [0.0] * (M + 2)
    h1 = [0.0] * (M + 2)
    ck: dict[int, list[float]] = {}
    u_next = 0.0
    h: list[float] = []
    ties = 0
    for i in range(M, 0, -1):
        qi = md.q[i]
        L = min(i, k)
        h = [1.0] * L if i == M else _h_step(h, i, qi, k)
        if i % _CHECKPOINT == 0 or i == M:
            ck[i] = h
        wi = qi * u_next
        lo = wi - _TOL * max(1.0, abs(wi))
        t = 0
        while t < L and h[t] >= lo:
            t += 1
        if t and h[t - 1] <= wi + _TOL * max(1.0, abs(wi)):
            ties += 1
        duds = i > L and wi < -_TOL * max(1.0, -wi)   # offering to anyone beats passing
        g = sum(h[:t])
        total = p * g + (1.0 - p) * t * wi + (L - t) * wi
        total += (i - L) * ((1.0 - p) * wi if duds else wi)
        u_next = -c + total / i
        W[i] = wi
        thr[i] = i if duds else t
        gain[i] = g
        h1[i] = h[0]
    value = md.S[1] * u_next
    return _Plan(md=md, value=value, thr=[[], thr], W=[array("d", bytes(8 * (M + 2))), W],
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
    """Goal rank (smallest expected rank), one opening.  O(M)."""
    M, p, c = md.M, md.p, md.c
    W = array("d", bytes(8 * (M + 2)))
    thr = [0] * (M + 1)
    u_next = 0.0
    ties = 0
    for i in range(M, 0, -1):
        qi, ei = md.q[i], md.e[i]
        wi = (1.0 - qi) * (i + 1) + qi * u_next
        t = _rank_t(wi, ei, i)
        if t and not _gt(wi, t * ei):
            ties += 1
        u_next = c + (p * ei * t * (t + 1) / 2.0 + (1.0 - p) * t * wi + (i - t) * wi) / i
        W[i] = wi
        thr[i] = t
    value = md.prior[0] * 1.0 + md.S[1] * u_next
    return _Plan(md=md, value=value, thr=[[], thr], W=[array("d", bytes(8 * (M + 2))), W],
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
    M = s.pool.max_size
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


def _key(s: Scenario) -> str:
    d = s.to_dict()
    d.pop("title", None)
    d.pop("compare", None)
    return json.dumps(d, sort_keys=True)


@lru_cache(maxsize=4)
def _plan_for_key(key: str) -> _Plan:
    from .scenario import parse_scenario
    s = parse_scenario(json.loads(key))
    md = _model(s)
    if md.goal == "best":
        return _dp_best(md)
    if md.goal == "top":
        return _dp_top(md)
    return _dp_rank(md)


def _plan(s: Scenario) -> _Plan:
    _check(s)
    return _plan_for_key(_key(s))


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
    entry: list[float] | None  # one opening: P(meet stage i with no hire) * p / i
    duds: bool           # some stage offers to anyone (i >= 2)


def _core1(md: _Model, rl: _Rule) -> _Core:
    """:func:`_core` for one opening (scalar state).  O(M)."""
    M, p = md.M, md.p
    goal, k = md.goal, md.k
    N = md.fixed_n if md.must else -1
    is_top, is_best, is_rank = goal == "top", goal == "best", goal == "rank"
    thr = rl.thr[1]
    gain = rl.gain
    x, e, q = md.x, md.e, md.q
    A = md.S[1]
    succ = fsucc = hires = forced = interviews = hire_best = rank_mass = 0.0
    none = md.prior[0]
    if is_rank:
        rank_mass = md.prior[0] * 1.0
    entry = [0.0] * (M + 2)
    duds = False
    for i in range(1, md.reach + 1):
        interviews += A
        wp = A * p / i
        entry[i] = wp
        t = thr[i]
        if t:
            xi = x[i]
            hire_best += wp * xi
            if is_best:
                succ += wp * xi
            elif is_top and gain is not None:
                succ += wp * gain[i]
            rank_mass += wp * e[i] * t * (t + 1) * 0.5
            if t >= i > k:
                duds = True
        move = wp * t
        if i == N and t < i:
            fc = wp * (i - t)
            forced += fc
            move += fc
            rank_mass += wp * e[i] * (i * (i + 1) - t * (t + 1)) * 0.5
            if is_top:
                fsucc += wp * max(0, min(k, i) - t)
            elif is_best and t == 0:
                fsucc += wp * x[i]
        hires += move
        A -= move
        qi = q[i]
        if qi < 1.0:
            end = A * (1.0 - qi)
            none += end
            if is_rank:
                rank_mass += end * (i + 1)
            A *= qi
    return _Core(succ=succ, fsucc=fsucc, hires=hires, forced=forced, none=none,
                 interviews=interviews, rank_mass=rank_mass, hire_best=hire_best,
                 entry=entry, duds=duds)


def _core(md: _Model, rl: _Rule) -> _Core:
    """Exact outcome of a threshold rule.  O(M m).

    Pushes P(meet stage i with l openings left) forward; several openings
    occur with goal best only (success adds up over hires, see the module
    docstring), one opening goes to :func:`_core1`.
    """
    if md.m == 1:
        return _core1(md, rl)
    m, p = md.m, md.p
    N = md.fixed_n if md.must else -1
    x, q = md.x, md.q
    thr = rl.thr
    P = [0.0] * (m + 1)
    P[m] = md.S[1]
    succ = fsucc = hires = forced = interviews = 0.0
    none = md.prior[0]
    duds = False
    for i in range(1, md.reach + 1):
        xi = x[i]
        pi = p / i
        for lv in range(1, m + 1):
            w = P[lv]
            if w == 0.0:
                continue
            interviews += w
            t = thr[lv][i]
            wp = w * pi
            move = wp * t
            if t:
                succ += wp * xi
                if t >= i > 1:
                    duds = True
            if i == N and lv == m and t < i:
                fc = wp * (i - t)
                forced += fc
                move += fc
                if t == 0:
                    fsucc += wp * xi
            if move:
                hires += move
                P[lv] = w - move
                P[lv - 1] += move
        P[0] = 0.0
        qi = q[i]
        if qi < 1.0:
            none += P[m] * (1.0 - qi)
            for lv in range(1, m + 1):
                P[lv] *= qi
    return _Core(succ=succ, fsucc=fsucc, hires=hires, forced=forced, none=none,
                 interviews=interviews, rank_mass=None, hire_best=succ,
                 entry=None, duds=duds)


def _moment_rank(md: _Model, rl: _Rule) -> float | None:
    """Expected rank of the best hire, several openings, best-so-far rules.

    Valid when every offer goes to a best-so-far (thresholds 0 or 1): the
    newest hire is then the best one, and the mean of the Markov chain of its
    relative rank evolves linearly.  O(M m).  Returns E[rank | a hire].
    """
    M, m, p = md.M, md.m, md.p
    N = md.fixed_n if md.must else None
    mass = [0.0] * (m + 1)      # P(meet stage with l left); for l < m a hire exists
    mom = [0.0] * (m + 1)       # sum of P * current relative rank of the best hire
    mass[m] = md.S[1]
    fin = 0.0
    hired = 0.0
    for i in range(1, md.reach + 1):
        pi = p / i
        g = 1.0 + 1.0 / i
        g1 = 1.0 + (1.0 - p) / i
        nm = [0.0] * (m + 1)
        nmo = [0.0] * (m + 1)
        nm[0] = mass[0]
        nmo[0] = mom[0] * g
        for lv in range(1, m + 1):
            w, mo = mass[lv], mom[lv]
            if w == 0.0:
                continue
            t = rl.thr[lv][i]
            if t > 1 and i >= 2:
                return None
            if lv == m:
                hp = w * pi * t
                nm[m] += w - hp
                nm[m - 1] += hp
                nmo[m - 1] += hp * 1.0
                if N is not None and i == N and t < i:
                    fc = w * pi * (i - t)
                    nm[m] -= fc
                    nm[m - 1] += fc
                    nmo[m - 1] += w * pi * (i * (i + 1) - t * (t + 1)) / 2.0
            elif t == 1:
                nm[lv] += w * (1.0 - pi)
                nmo[lv] += mo * g1 - pi * w
                nm[lv - 1] += w * pi
                nmo[lv - 1] += w * pi
            else:
                nm[lv] += w
                nmo[lv] += mo * g
        mass, mom = nm, nmo
        end = 1.0 - md.q[i]
        if end > 0.0:
            qi = md.q[i]
            for lv in range(0, m):
                fin += end * mom[lv]
                hired += end * mass[lv]
                mass[lv] *= qi
                mom[lv] *= qi
            mass[m] *= qi
    return fin / hired if hired > 0.0 else None


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
            add = A * p * inv
            top_j = t if t < L else L
            D[1:top_j + 1] = [v + add for v in D[1:top_j + 1]]
            if t > R:
                D[B] += add * (t - R)
            A -= add * t
            started = True
        if i == N and t < i and a0 > 0.0:
            add = a0 * p * inv
            hi = i if i < R else R
            if hi > t:
                D[t + 1:hi + 1] = [v + add for v in D[t + 1:hi + 1]]
            if i > max(t, R):
                D[B] += add * (i - max(t, R))
            A -= add * (i - t)
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

    Pushes P(l openings left, relative rank r of the best hire so far)
    forward; ``r = R+1`` stands for "worse than R".  O(M R m).  Returns
    (fin[0..R+1], beyond, none, shares) with shares[x] = P(rank <= max(1,
    floor(x n))) summed over the actual size n (exact only when R covers it).
    """
    if md.m == 1:
        return _push1(md, rl, R)
    M, m, p = md.M, md.m, md.p
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
    return (lo * (lo + 1) // 2 + (M - lo) * R) * (1 if m == 1 else 3 * m) + M


def _hyper_top(md: _Model, rl: _Rule, core: _Core, keys: list[int],
               p0: dict[int, tuple[list[float], list[float]]]) -> dict[int, float] | None:
    """P(hire's rank <= K), fixed pool, one opening.  See the module docstring.

    ``P(rank <= K | relative rank j at stage i) = P(H >= j)``, H the number of
    the best K among the first i (hypergeometric).  The rule contributes
    ``sum_i entry_i E[min(H_i, t_i)]``: ``1 - P(H_i = 0)`` where t = 1,
    ``E[H_i] = iK/N`` where t >= min(K, i), the pmf summed up to t elsewhere.
    O(N) per K for best-so-far rules.  Returns None when the pmf cannot be
    formed accurately (its first term underflows and t is not far below
    the mean).
    """
    N = md.fixed_n
    assert N is not None and core.entry is not None
    out: dict[int, float] = {}
    entry = core.entry
    thr = rl.thr[1]
    groups = group_thresholds(thr[1:N + 1])
    for K in keys:
        if K >= N:
            out[K] = 1.0 - core.none
            continue
        P0, Q1 = p0[K]
        acc = 0.0
        for grp in groups:
            t = grp.threshold
            if t == 0:
                continue
            if t == 1:
                acc += sum(map(operator.mul, entry[grp.first:grp.last + 1],
                               Q1[grp.first:grp.last + 1]))
                continue
            for i in range(grp.first, grp.last + 1):
                w = entry[i]
                t = thr[i]
                if w == 0.0:
                    continue
                if t >= (K if K < i else i):
                    acc += w * (i * K / N)
                    continue
                h_min = i - (N - K) if i > N - K else 0
                if h_min >= t:
                    acc += w * t
                    continue
                if h_min > 0:
                    # P(H = h_min): all N-i later candidates are among the best K
                    pr = 1.0
                    for l in range(N - i):
                        pr *= (K - l) / (N - l)
                else:
                    pr = P0[i]
                if pr < 1e-280:
                    if t <= (i * K / N) / 2.0:
                        # P(H < t) < exp(-mean/8) < 1e-37: E[min(H, t)] = t
                        acc += w * t
                        continue
                    return None
                below = 0.0
                part = 0.0
                for h in range(h_min, t):
                    below += pr
                    part += h * pr
                    pr *= (K - h) * (i - h) / ((h + 1.0) * (N - K - i + h + 1.0))
                acc += w * (part + t * (1.0 - below))
        if md.must:
            t = thr[N]
            acc += entry[N] * max(0, min(K, N) - t)
        out[K] = acc
    return out


def _hyper_cost(md: _Model, rules: list[_Rule], keys: list[int]) -> int:
    N = md.fixed_n or 0
    cost = len(keys) * N
    for rl in rules:
        thr = rl.thr[1]
        for i in range(1, N + 1):
            t = thr[i]
            if t >= 2:
                cost += len(keys) * min(t, i)
    return cost


def _p0_tables(N: int, keys: list[int]) -> dict[int, tuple[list[float], list[float]]]:
    """P(none of the best K among the first i) and 1 minus it, i = 0..N.  O(N) per K."""
    out = {}
    for K in keys:
        fac = [1.0] + [((N - K - i + 1) / (N - i + 1)) if N - K - i + 1 > 0 else 0.0
                       for i in range(1, N + 1)]
        col = list(itertools.accumulate(fac, operator.mul))
        out[K] = (col, [1.0 - v for v in col])
    return out


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


def _extras(md: _Model, rules: list[_Rule], cores: list[_Core]) -> tuple[list[_Extras],
                                                                           list[str]]:
    """Rank distribution and top-m table for every rule, within the work limits.

    Rules are served in order (the optimal rule first) from one budget of
    :data:`PUSH_BUDGET` work units: each gets the full distribution (every
    rank; gives the share columns and, with several openings, the expected
    rank), else ranks 1..200, else none.
    """
    notes: list[str] = []
    head = min(md.M, RANK_HEAD)
    full_R = md.M
    cost_full, cost_head = _push_cost(md, full_R), _push_cost(md, head)
    fixed = md.fixed_n
    keys: list[int] = []
    share_k: dict[float, int] = {}
    if fixed is not None:
        for sh in TOP_SHARES:
            share_k[sh] = max(1, int(math.floor(sh * fixed)))
        keys = sorted(set(TOP_COUNTS) | set(share_k.values()))
    hyper_ok = (fixed is not None and md.m == 1 and cost_full > PUSH_BUDGET
                and _hyper_cost(md, rules, keys) <= HYPER_BUDGET)
    p0 = _p0_tables(fixed, keys) if hyper_ok and fixed is not None else {}
    left = PUSH_BUDGET
    out: list[_Extras] = []
    missing_dist = missing_top = 0
    for rl, core in zip(rules, cores):
        top: dict[str, float] | None = None
        dist: RankDistribution | None = None
        er: float | None = None
        R: int | None = None
        if cost_full <= left:
            R, left = full_R, left - cost_full
        elif cost_head <= left:
            R, left = head, left - cost_head
        if R is not None:
            fin, _beyond, none, shares = _push(md, rl, R)
            probs = [_clamp(v) for v in fin[1:head + 1]]
            rest = max(0.0, 1.0 - none - math.fsum(probs))
            dist = RankDistribution(probs, rest, _clamp(none))
            cum = list(itertools.accumulate(fin[:R + 1]))
            hired = 1.0 - none

            def le(K: int) -> float:
                return cum[min(K, R)]
            if R == full_R:
                top = {str(K): _clamp(le(K)) for K in TOP_COUNTS}
                er = (math.fsum(r * v for r, v in enumerate(fin[:R + 1])) / hired
                      if hired > 0 else None)
                for sh in TOP_SHARES:
                    top[_share_key(sh)] = _clamp(le(share_k[sh]) if fixed is not None
                                                 else shares[sh])
        if top is None and hyper_ok:
            vals = _hyper_top(md, rl, core, keys, p0)
            if vals is not None:
                top = {str(K): _clamp(vals[K]) for K in TOP_COUNTS}
                for sh in TOP_SHARES:
                    top[_share_key(sh)] = _clamp(vals[share_k[sh]])
        if top is not None:
            top = _monotone(top)
        missing_dist += dist is None
        missing_top += top is None
        out.append(_Extras(top, dist, er))
    if missing_dist:
        which = "every rule" if missing_dist == len(rules) else "some compared rules"
        notes.append(f"The rank distribution is left out for {which}: it is computed "
                     f"exactly (ranks 1..{head}) only while the work fits a limit of "
                     f"{PUSH_BUDGET:,} state updates (one rule here needs {cost_head:,}).")
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
            exp_rank = ex.exp_rank_openings
            if exp_rank is None:
                exp_rank = _moment_rank(md, rl)
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
        gain = [0.0] * (r + 1) + [h1[i] for i in range(r + 1, M + 2)]
    return _Rule(name=name, description=description, rule=rule,
                 thr=[[]] + [t] * md.m, gain=gain, skip=r)


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
    suffix sums of P(i-1) G(i) give every point in O(1).
    """
    if md.goal == "rank" or md.m > 1:
        return None
    M, p = md.M, md.p
    if md.goal == "best":
        G = md.t1
    else:
        h1 = plan.h1 or []
        G = [md.S[i] * h1[i] / i if i >= 1 else 0.0 for i in range(M + 2)]
    P = [1.0] * (M + 2)
    for n in range(2, M + 2):
        P[n] = P[n - 1] * (1.0 - p / n)
    Z = [0.0] * (M + 3)
    for i in range(M, 0, -1):
        Z[i] = Z[i + 1] + P[i - 1] * G[i]

    def success(r: int) -> float:
        if r == 0:
            return _clamp(p * (G[1] + (1.0 - p) * Z[2]))
        return _clamp(p * Z[r + 1] / P[r])

    if M <= CURVE_FULL_MAX:
        skips = list(range(M))
        complete = True
    else:
        pts = {round(j * (M - 1) / (CURVE_POINTS - 1)) for j in range(CURVE_POINTS)}
        if opt_skip is not None and opt_skip < M:
            pts.add(opt_skip)
        skips = sorted(pts)
        complete = False
    succ = [success(r) for r in skips]
    limit: list[float | None]
    if md.goal == "best" and md.fixed_n is not None:
        n = md.fixed_n

        def lim(r: int) -> float:
            xx = r / n
            if xx <= 0.0:
                return 0.0
            if p >= 1.0:
                return -xx * math.log(xx)
            return p * (xx ** p - xx) / (1.0 - p)
        limit = [lim(r) for r in skips]
    else:
        limit = [None] * len(skips)
    return Curve(skips=skips, success=succ, limit=limit, complete=complete)  # type: ignore[arg-type]


def _runs(stages: Sequence[int]) -> list[tuple[int, int]]:
    """Maximal runs of consecutive stages in an increasing list."""
    if not stages:
        return []
    cuts = [a for a in range(1, len(stages)) if stages[a] != stages[a - 1] + 1]
    bounds = [0] + cuts + [len(stages)]
    return [(stages[a], stages[b - 1]) for a, b in zip(bounds, bounds[1:])]


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


def _level_words(md: _Model, t: list[int]) -> str:
    """Plain words for one list of thresholds (one openings-left level)."""
    last = md.reach
    stages = range(1, last + 1)
    if md.p == 1.0 and md.m == 1 and t[1] >= 1:
        return "make an offer to the first candidate"
    # "anyone" = a candidate who cannot meet the goal (offered only to stop paying)
    anyone = ([i for i in stages if i > md.k and t[i] >= i] if md.goal != "rank" else [])
    cost_txt = ("make an offer to anyone (more interviews would cost more than they can "
                "still add)")
    if md.goal == "best":
        acc = [i for i in stages if t[i] >= 1]
        if not acc:
            return "pass everyone"
        runs = _runs(acc)
        if len(runs) == 1 and runs[0][1] == last and runs[0][0] > 1:
            text = (f"pass on the first {_count(runs[0][0] - 1)}, then make an offer to each "
                    "candidate better than everyone before")
        elif len(runs) == 1 and runs[0] == (1, last):
            text = "make an offer to each candidate better than everyone before"
        else:
            text = ("make an offer to a candidate better than everyone before "
                    + _runs_text(runs, last) + "; pass at the other stages")
        if anyone:
            text += f"; {_runs_text(_runs(anyone), last)}, {cost_txt}"
        return text
    # goals top / rank: say where the bar rises
    regular = [0 if i in anyone else min(t[i], i) for i in stages]
    mono = all(regular[a] <= regular[a + 1] for a in range(len(regular) - 1))
    take_last = (md.goal == "rank" and md.fixed_n is not None and t[last] >= last)
    if mono:
        first = next((i for i, v in zip(stages, regular) if v >= 1), None)
        if first is None:
            return "pass everyone"
        pieces = []
        if all(regular[i - 1] >= i for i in range(first, last + 1)):
            who = "every candidate" if first == 1 else "every candidate after that"
            head = f"pass on the first {_count(first - 1)}, then " if first > 1 else ""
            return f"{head}make an offer to {who}"
        if first > 1:
            pieces.append(f"pass on the first {_count(first - 1)}")
        changes = [(i, v) for i, v in zip(stages, regular)
                   if v > 0 and (i == first or v != regular[i - 2])]
        if take_last and changes and changes[-1][0] == last:
            changes = changes[:-1]
        shown = changes[:5]
        for idx, (i, v) in enumerate(shown):
            if idx == 0:
                pieces.append(f"from stage {i:,} make an offer to {_who(v)}")
            else:
                pieces.append(f"from stage {i:,} to {_who(v)}")
        if len(changes) > len(shown):
            pieces.append(f"after that the bar keeps rising ({len(changes) - len(shown):,} "
                          "more steps, see the table)")
        if take_last:
            pieces.append("at the last candidate, take anyone")
        text = "; ".join(pieces)
    else:
        groups = group_thresholds(regular)
        segs = []
        for g in groups[:6]:
            where = (f"stage {g.first:,}" if g.first == g.last else
                     f"stages {g.first:,}-{g.last:,}")
            what = "pass" if g.threshold == 0 else f"offer to {_who(g.threshold)}"
            segs.append(f"{where}: {what}")
        if len(groups) > 6:
            segs.append("and so on (see the table)")
        text = "; ".join(segs)
    if anyone:
        text += f"; {_runs_text(_runs(anyone), last)}, {cost_txt}"
    return text


def _words(md: _Model, plan: _Plan) -> str:
    if md.m == 1:
        text = _level_words(md, plan.thr[1])
        text = text[0].upper() + text[1:] + "."
    else:
        parts = []
        for lv in range(md.m, 0, -1):
            lw = _level_words(md, plan.thr[lv])
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
        t = plan.thr[lv]
        r = 0
        while r < md.M and t[r + 1] == 0:
            r += 1
        if any(t[i] != 1 for i in range(r + 1, md.M + 1)):
            return None
        if r >= md.M or (r_all is not None and r != r_all):
            return None
        r_all = r
    return r_all


def _interval(md: _Model, t: list[int]) -> bool:
    acc = [i for i in range(1, md.reach + 1) if t[i] >= 1]
    return len(_runs(acc)) <= 1


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
                 gain=plan.gain)


def solve_rankdp(s: Scenario) -> SolveResult:
    """Optimal rule, its exact performance, compared rules, curve and limits."""
    plan = _plan(s)
    md = plan.md
    words = _words(md, plan)
    skip = _skip_of(md, plan)
    thresholds = plan.thr[md.m][1:md.M + 1]
    by_left = ({str(lv): plan.thr[lv][1:md.M + 1] for lv in md.levels}
               if md.m > 1 else None)
    policy = Policy(thresholds=thresholds, groups=group_thresholds(thresholds), words=words,
                    skip=skip, thresholds_by_openings_left=by_left,
                    interval=_interval(md, plan.thr[md.m]))
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
