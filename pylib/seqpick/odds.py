"""Stop on the last event: the odds theorem.

Model
-----
Pool ``{"chances": [p_1, ..., p_N]}``: at stage k an event ("this candidate
is the best so far", or any event of interest) happens with chance p_k,
independently of all other stages, and is seen at once.  Goal ``best`` here
means: stop (make an offer) on the *last* event.  Stopping on an earlier
event, or never stopping, is a failure.

Odds algorithm (Bruss 2000)
---------------------------
With the odds r_k = p_k / (1 - p_k), add them up from the end until the sum
first reaches 1, at index s (s = 1 if it never does): stop at the first event
from stage s on.  The win chance is
``Q_s R_s = prod_{k>=s} (1 - p_k) * sum_{k>=s} r_k``, computed here in the
equivalent form P(exactly one event among stages s..N) by the recursions
``Z_k = (1 - p_k) Z_{k+1}`` (no event from k on) and
``W_k = p_k Z_{k+1} + (1 - p_k) W_{k+1}`` (exactly one), so p_k = 1 needs no
special case (then s is at least the last such k, because the odds sum from
there is infinite).  With p_k = 1/k this is the classic secretary problem.
O(N).

For every start stage s' at once (the curve and the optimum) the same chance
is computed as Z_s' R_s' with R_s' = sum_{k>=s'} r_k when no p_k = 1 lies in
s'..N, and as prod_{k in s'..N, k != m} (1 - p_k) when exactly one does (at m;
0 if two do): running products and sums from the end (C-level
``itertools.accumulate``), so the whole solve has no Python-level loop over
the stages on this path.  Each running product or sum of n terms carries a
relative rounding error below n units in the last place (typically about
sqrt(n)), as the recursions did.

Declines and costs (derived here; exact)
----------------------------------------
With ``accept_probability`` q an offer is accepted with chance q
independently; a declined offer leaves the state unchanged (the stages are
independent), so it is the same as a pass.  With ``cost_per_candidate`` c
every stage seen costs c until the hire (there is no quitting without a
hire).  Because the stages are independent, the only state is the stage,
and backward induction over stages is the exact optimum over all stopping
rules (Chow, Robbins & Siegmund 1971):

    V_{N+1} = 0,  V_k = -c + p_k max(q Z_{k+1} + (1-q) V_{k+1}, V_{k+1}) + (1-p_k) V_{k+1},

so an event at stage k gets an offer iff Z_{k+1} > V_{k+1}.  For c = 0 this
set is {k >= s_q}: the ratio of "wait for the next accepted offer" to "stop"
is sum_{j>k} prod_{k<l<j} (1 - p_l q)/(1 - p_l) * p_j q / (1 - p_j), which
decreases in k (monotone case).  With ``must_hire`` an offer is made at stage
N whatever happens (a forced hire if there is no event there, accepted with
chance q; it counts as ``forced_last``).  O(N) (one Python-level loop for the
backward induction and one for the curve's recursion with declines; a rule
"offer from stage s on" is then evaluated by running products).

Outputs: ``policy.thresholds[k-1]`` is 1 if an event at stage k gets an offer
(0 otherwise), ``curve`` the exact win chance of "offer at the first event
from stage s'" for every s' (N <= 2000; else about 1000 values including the
optimum), with ``skips = s' - 1``.  Ranks are not defined by chances alone,
so ``top``, ``rank_distribution`` and ``expected_rank`` are null.

References
----------
Bruss, F. T. (2000). Sum the odds to one and stop. *Ann. Probab.* 28,
1384-1391.
Bruss, F. T. (2003). A note on bounds for the odds theorem of optimal
stopping. *Ann. Probab.* 31, 1859-1861 (the win chance is at least 1/e when
the odds sum to at least 1).
Chow, Y. S., Robbins, H. & Siegmund, D. (1971). *Great Expectations: The
Theory of Optimal Stopping*. Houghton Mifflin.
Ferguson, T. S. (1989). Who solved the secretary problem? *Statistical
Science* 4, 282-296.
"""

from __future__ import annotations

import math
from bisect import bisect_left
from dataclasses import dataclass
from itertools import accumulate, islice, repeat
from operator import mul, sub, truediv
from typing import Any, Sequence

from .advise import Advice, SearchState
from .errors import ScenarioError
from .results import (Curve, Limit, Outcome, Policy, RuleResult, SolveResult, StageGroup,
                      group_thresholds)
from .scenario import ChancesPool, CompareRule, Scenario

__all__ = ["odds_start", "suffix_tables", "evaluate", "optimal_set", "solve_odds",
           "advise_odds", "CURVE_FULL_MAX", "CURVE_POINTS"]

CURVE_FULL_MAX = 2000
CURVE_POINTS = 1000


def _suffix_products(p: Sequence[float], omp_rev: list[float] | None = None) -> list[float]:
    """[unused, Z_1, ..., Z_N, Z_{N+1} = 1] with Z_k = prod_{j=k}^{N} (1 - p_j),
    each factor applied in the order of the recursion Z_k = (1 - p_k) Z_{k+1}
    (``omp_rev``: the factors 1 - p_k for k = N..1, if known).  O(N)."""
    if omp_rev is None:
        omp_rev = list(map(sub, repeat(1.0), reversed(p)))
    z = list(accumulate(omp_rev, mul, initial=1.0))
    z.append(1.0)
    z.reverse()
    return z


@dataclass
class _Prepared:
    """Running products and sums from the end, shared by the whole solve."""

    z: list[float]            # Z_k, k = 1..N+1 (index 0 unused)
    m: int                    # last stage with p_k = 1 (0 if none)
    cum: list[float]          # cum[i] = sum of the odds of the last i stages (after m)
    odds_total: float         # sum of all odds from the end (inf if m); relative error < N ulp


def _prepare(p: Sequence[float]) -> _Prepared:
    """One pass for 1 - p_k from the end, then Z, m, the odds sums.  O(N), C-level."""
    n = len(p)
    omp_rev = list(map(sub, repeat(1.0), reversed(p)))
    try:
        m = n - omp_rev.index(0.0)     # chances are validated to [0, 1]: 1 - 1.0 == 0.0
    except ValueError:
        m = 0
    z = _suffix_products(p, omp_rev)
    cum = list(accumulate(map(truediv, reversed(p), islice(omp_rev, n - m)), initial=0.0))
    return _Prepared(z, m, cum, math.inf if m else cum[-1])


def _last_certain(p: Sequence[float]) -> int:
    """The last stage (1-based) with p_k = 1 (chances are validated to [0, 1]),
    or 0 if none.  O(N), C-level."""
    if not p or max(p) < 1.0:
        return 0
    return len(p) - p[::-1].index(1.0)


def _odds_from_end(p: Sequence[float], m: int) -> list[float]:
    """R[i] = sum of the odds r_k over the last i stages (k > N - i), for the
    stages after m (all p_k < 1 there), summed from the end like the loop
    ``total += r_k``.  O(N - m)."""
    rest = p[m:]
    odds = map(truediv, rest, map(sub, repeat(1.0), rest))
    return list(accumulate(reversed(list(odds)), initial=0.0))


def odds_start(p: Sequence[float], m: int | None = None,
               cum: list[float] | None = None) -> tuple[int, float]:
    """Bruss's index s (1-based) and the odds sum from s on (inf if some p_k = 1
    with k >= s).  Sum the odds r_k = p_k/(1-p_k) from the end until >= 1
    (``m``, ``cum``: :func:`_last_certain` and :func:`_odds_from_end`, if known).
    O(N)."""
    n = len(p)
    if m is None:
        m = _last_certain(p)
    if cum is None:
        cum = _odds_from_end(p, m)
    i = bisect_left(cum, 1.0)
    if i < len(cum):
        return n - i + 1, cum[i]
    if m:
        return m, math.inf
    return 1, cum[-1]


@dataclass
class SuffixTables:
    """Z[k] = P(no event at stages k..N); W[k] = win chance of "offer at the first
    event from stage k on" (k = 1..N+1; index 0 unused)."""

    z: list[float]
    w: list[float]


def suffix_tables(p: Sequence[float], q: float = 1.0) -> SuffixTables:
    """O(N) backward recursions (module docstring)."""
    z = _suffix_products(p)
    return SuffixTables(z, _w_table(p, q, z))


def _w_table(p: Sequence[float], q: float, z: list[float]) -> list[float]:
    """W_k = p_k q Z_{k+1} + (1 - p_k q) W_{k+1}, k = N..1 (index 0 unused).  O(N)."""
    n = len(p)
    w = [0.0] * (n + 2)
    acc = 0.0
    for k in range(n, 0, -1):
        pq = p[k - 1] * q
        acc = pq * z[k + 1] + (1.0 - pq) * acc
        w[k] = acc
    return w


def _start_wins(p: Sequence[float], starts: list[int], z: list[float], m: int,
                cum: list[float]) -> list[float]:
    """P(exactly one event in s..N) for each s in ``starts`` (the win chance of
    "offer at the first event from stage s on", accepted for sure), in [0, 1]:
    Z_s R_s, or the product over the other stages when stage m is certain
    (module docstring; m, cum from :func:`_last_certain`, :func:`_odds_from_end`).
    O(N)."""
    n = len(p)
    out = []
    if m:
        # prod_{k=s}^{m-1} (1 - p_k) for s = 1..m (index s), times Z_{m+1}
        before = list(accumulate(reversed(list(map(sub, repeat(1.0), p[:m - 1]))), mul,
                                 initial=1.0))
        before.reverse()
    for st in starts:
        if st > m:
            v = z[st] * cum[n - st + 1]
        else:
            v = before[st - 1] * z[m + 1]
        out.append(min(1.0, max(0.0, v)))
    return out


def optimal_set(p: Sequence[float], q: float, c: float, must: bool,
                z: list[float], values: bool = True) -> tuple[list[int], list[float]]:
    """Backward induction over stages: (offer-at-event flags per stage, V_1..V_{N+1};
    the second list is empty if not ``values``).  O(N)."""
    n = len(p)
    v = [0.0] * (n + 2) if values else []
    flags = [0] * n
    cont = 0.0
    omq = 1.0 - q
    for k in range(n, 0, -1):
        pk = p[k - 1]
        if must and k == n:
            flags[k - 1] = 1
            cont = -c + q * pk
        else:
            zk = z[k + 1]
            if zk > cont:
                flags[k - 1] = 1
                cont = -c + pk * (q * zk + omq * cont) + (1.0 - pk) * cont
            else:
                cont = -c + cont
        if values:
            v[k] = cont
    return flags, v


def _backward(p: Sequence[float], q: float, c: float, must: bool,
              z: list[float]) -> tuple[list[int], list[float]]:
    """:func:`optimal_set`'s flags and, in the same loop, :func:`_w_table`'s W
    (the curve: "offer from stage k on" with acceptance q).  O(N)."""
    n = len(p)
    w = [0.0] * (n + 2)
    flags = [0] * n
    cont = 0.0
    acc = 0.0
    omq = 1.0 - q
    for k in range(n, 0, -1):
        pk = p[k - 1]
        zk = z[k + 1]
        pq = pk * q
        acc = pq * zk + (1.0 - pq) * acc
        w[k] = acc
        if must and k == n:
            flags[k - 1] = 1
            cont = -c + pq
        elif zk > cont:
            flags[k - 1] = 1
            cont = -c + pk * (q * zk + omq * cont) + (1.0 - pk) * cont
        else:
            cont = -c + cont
    return flags, w


@dataclass
class OddsValue:
    win: float
    other: float
    none: float
    forced: float
    interviews: float


def _evaluate_from(p: Sequence[float], start: int, q: float, must: bool,
                   z: list[float]) -> OddsValue:
    """Exact performance of "offer at the first event from stage ``start`` on"
    (and at stage N whatever happens when ``must``): with a_k = P(no hire before
    stage k) = prod_{j=start}^{k-1} (1 - q p_j), win = sum_k a_k q p_k Z_{k+1},
    other = sum_k a_k q p_k (1 - Z_{k+1}), expected stages seen = start - 1 + sum_k a_k.
    O(N) running products."""
    n = len(p)
    cl = lambda x: min(1.0, max(0.0, x))    # noqa: E731
    if start > n:                          # never an offer at an event
        if must:
            pn = p[-1]
            return OddsValue(cl(q * pn), 0.0, cl(1.0 - q), cl(q * (1.0 - pn)), float(n))
        return OddsValue(0.0, 0.0, 1.0, 0.0, float(n))
    pq = p[start - 1:] if q == 1.0 else list(map(mul, repeat(q), islice(p, start - 1, None)))
    alive = list(accumulate(map(sub, repeat(1.0), pq), mul, initial=1.0))   # a_start..a_{N+1}
    hires = list(map(mul, alive, pq))
    win = math.fsum(map(mul, hires, islice(z, start + 1, None)))
    other = math.fsum(hires) - win
    before_last = alive[-2]
    if must:
        forced = before_last * (1.0 - p[-1]) * q
        none = before_last * (1.0 - q)
    else:
        forced = 0.0
        none = alive[-1]
    return OddsValue(cl(win), cl(other), cl(none), cl(forced),
                     (start - 1) + (math.fsum(alive) - alive[-1]))


def _seen_from(p: Sequence[float], start: int) -> float:
    """Expected stages seen under "offer at the first event from stage ``start``
    on" (offers accepted): start - 1 + sum_{k>=start} prod_{j=start}^{k-1} (1 - p_j).  O(N)."""
    n = len(p)
    if start > n:
        return float(n)
    return (start - 1) + math.fsum(accumulate(map(sub, repeat(1.0), p[start - 1:n - 1]),
                                              mul, initial=1.0))


def evaluate(p: Sequence[float], flags: list[int], q: float, must: bool,
             z: list[float]) -> OddsValue:
    """Exact performance of "offer at an event at the flagged stages" (and at
    stage N whatever happens when ``must``).  O(N); flags of the form 0..0 1..1
    go through :func:`_evaluate_from`."""
    n = len(p)
    first = _first_flag(flags)
    if first > n or all(flags[first - 1:]):
        return _evaluate_from(p, first, q, must, z)
    alive = 1.0
    win = other = forced = seen = 0.0
    for k in range(1, n + 1):
        seen += alive
        pk = p[k - 1]
        if must and k == n:
            win += alive * pk * q
            forced += alive * (1.0 - pk) * q
            alive *= 1.0 - q
        elif flags[k - 1]:
            hire = alive * pk * q
            win += hire * z[k + 1]
            other += hire * (1.0 - z[k + 1])
            alive -= hire
    cl = lambda x: min(1.0, max(0.0, x))    # noqa: E731
    return OddsValue(cl(win), cl(other), cl(alive), cl(forced), seen)


def _first_flag(flags: list[int]) -> int:
    """The first flagged stage (1-based), or len + 1."""
    try:
        return flags.index(1) + 1
    except ValueError:
        return len(flags) + 1


def _check_supported(s: Scenario) -> Sequence[float]:
    pool = s.pool
    assert isinstance(pool, ChancesPool)
    if s.goal.type != "best":
        raise ScenarioError("goal.type", f"got {s.goal.type!r}; with chances per stage only "
                            "goal \"best\" (stop on the last event) is supported")
    if s.openings != 1:
        raise ScenarioError("openings", f"got {s.openings}; with chances per stage only one "
                            "opening is supported")
    return pool.chances        # validated, read-only: no copy needed


def _stage_words(flags: list[int], must: bool,
                 first: int | None = None) -> tuple[str, int | None]:
    """The rule in words and its skip (None unless "from stage s on"); ``first``:
    the first flagged stage when the flags are known to be 0..0 1..1."""
    n = len(flags)
    monotone = first is not None
    if first is None:
        first = _first_flag(flags)
    tail = " If no event comes by then, take the last stage anyway." if must else ""
    if first > n:
        return "Never make an offer: no stage is worth it." + tail, None
    if monotone or all(flags[first - 1:]):
        if first == 1:
            return "Make an offer at the first event (the first stage where it happens)." \
                + tail, 0
        before = "stage 1" if first == 2 else f"stages 1 to {first - 1:,}"
        return (f"From stage {first:,} on, make an offer at the first event (pass on "
                f"{before})." + tail, first - 1)
    runs = [g for g in group_thresholds(flags) if g.threshold == 1]
    spans = ", ".join(f"{g.first:,}" if g.first == g.last else f"{g.first:,}-{g.last:,}"
                      for g in runs[:8])
    more = " and later ones (see the table)" if len(runs) > 8 else ""
    return (f"Make an offer at the first event in stages {spans}{more}; pass on events at "
            f"other stages." + tail, None)


def _result(name: str, description: str, rule: dict[str, Any], v: OddsValue,
            c: float) -> RuleResult:
    return RuleResult(
        name=name, description=description, rule=rule, success_probability=v.win,
        expected_rank=None, expected_score=None, expected_interviews=v.interviews,
        p_no_hire=v.none, outcome=Outcome(best=v.win, other=max(0.0, v.other),
                                          none=v.none, forced_last=v.forced),
        top=None, rank_distribution=None, expected_hires=1.0 - v.none,
        expected_cost=c * v.interviews)


def _compare(p: Sequence[float], rule: CompareRule, i: int, q: float, c: float, must: bool,
             z: list[float]) -> RuleResult:
    n = len(p)
    if rule.kind == "skip":
        r = int(rule.value)
        if r > n - 1:
            raise ScenarioError(f"compare.{i}.skip", f"got {r:,}; expected a whole number "
                                f"from 0 to {n - 1:,} (stages minus one)")
        name, raw = f"skip {r:,}", {"skip": r}
    elif rule.kind == "skip_share":
        r = min(n - 1, int(math.floor(rule.value * n)))
        name, raw = f"skip {rule.value * 100:.4g}%", {"skip_share": rule.value}
    else:
        needs = "a time window" if rule.kind == "start_share" else "scores"
        raise ScenarioError(f"compare.{i}.{rule.kind}", f"this rule needs {needs}; with "
                            "chances per stage use skip or skip_share")
    flags = [0] * r + [1] * (n - r)
    words, _ = _stage_words(flags, must)
    return _result(name, words, raw, _evaluate_from(p, r + 1, q, must, z), c)


def _curve_starts(n: int, s_opt: int) -> tuple[list[int], bool]:
    if n <= CURVE_FULL_MAX:
        return list(range(1, n + 1)), True
    pts = {1 + round(i * (n - 1) / (CURVE_POINTS - 1)) for i in range(CURVE_POINTS)}
    pts.add(s_opt)
    return sorted(pts), False


def _curve(p: Sequence[float], q: float, s_opt: int, z: list[float], m: int,
           cum: list[float], w: list[float] | None = None) -> Curve:
    """Win chance of "offer at the first event from stage s' on" for every s'
    (N <= 2000; else about 1000 values including the optimum); ``w``: the
    W table for q < 1 if known.  O(N)."""
    n = len(p)
    starts, complete = _curve_starts(n, s_opt)
    if q == 1.0:
        success = _start_wins(p, starts, z, m, cum)
    else:
        if w is None:
            w = _w_table(p, q, z)
        success = [min(1.0, max(0.0, w[st])) for st in starts]
    return Curve(skips=[st - 1 for st in starts], success=success,
                 limit=[None] * len(starts), complete=complete)  # type: ignore[list-item]


def solve_odds(s: Scenario) -> SolveResult:
    """Optimal rule and exact performance for a chances pool (module docstring)."""
    p = _check_supported(s)
    n = len(p)
    q, c, must = s.accept_probability, s.cost_per_candidate, s.must_hire
    pre = _prepare(p)
    z = pre.z
    standard = q == 1.0 and c == 0.0
    odds_sum_total = pre.odds_total
    w_q = None
    if standard:
        s_idx, odds_from_s = odds_start(p, pre.m, pre.cum)
        flags = [0] * (s_idx - 1) + [1] * (n - s_idx + 1)
        method = "odds theorem (Bruss 2000): sum the odds from the end to 1, O(N)"
        # W_s = P(exactly one event in s..N) (the same numbers as the curve), Z_s
        win = _start_wins(p, [s_idx], z, pre.m, pre.cum)[0]
        rest = min(1.0 - win, z[s_idx])
        value = OddsValue(win, max(0.0, 1.0 - win - rest), 0.0 if must else rest,
                          rest if must else 0.0, _seen_from(p, s_idx))
        groups = ([StageGroup(1, s_idx - 1, 0)] if s_idx > 1 else []) + [StageGroup(s_idx, n, 1)]
        words, skip = _stage_words(flags, must, s_idx)
    else:
        flags, w_q = _backward(p, q, c, must, z)
        method = ("backward induction over stages (independent events; declines count as "
                  "passes), O(N)")
        s_idx = None
        odds_from_s = None
        first = _first_flag(flags)
        if first > n or all(flags[first - 1:]):     # "from stage first on"
            value = _evaluate_from(p, first, q, must, z)
            groups = (([StageGroup(1, first - 1, 0)] if first > 1 else [])
                      + ([StageGroup(first, n, 1)] if first <= n else []))
            words, skip = _stage_words(flags, must, first)
        else:
            value = evaluate(p, flags, q, must, z)
            groups = group_thresholds(flags)
            words, skip = _stage_words(flags, must)
    policy = Policy(thresholds=flags, groups=groups, words=words, skip=skip,
                    interval=skip is not None)
    opt = _result("optimal", words, {"optimal": True}, value, c)
    compare = [_compare(p, r, i, q, c, must, z) for i, r in enumerate(s.compare)]
    first = (skip + 1) if skip is not None else min(_first_flag(flags), n)
    shown = "infinite (a stage has chance 1)" if math.isinf(odds_sum_total) else \
        f"{odds_sum_total:.6g}"
    notes = [f"Sum of the odds p/(1-p) over all {n:,} stages: {shown}."]
    if odds_from_s is not None:
        shown = "infinite" if math.isinf(odds_from_s) else f"{odds_from_s:.6g}"
        notes.append(f"Sum of the odds from stage {s_idx:,} on: {shown} (stage {s_idx:,} is "
                     "where the sum from the end first reaches 1, or stage 1 if it never "
                     "does).")
    notes.append("An event is any stage outcome you watch for (for example: this candidate "
                 "is the best so far); success means the offer falls on the last event.")
    notes.append("Ranks are not defined by chances alone: top, rank_distribution and "
                 "expected_rank are null.")
    limits = []
    if standard and odds_sum_total >= 1.0:
        limits.append(Limit("success_probability", 1.0 / math.e,
                            "lower bound when the odds sum to at least 1: Bruss 2000; "
                            "Bruss 2003"))
    return SolveResult.from_rule(
        scenario=s.to_dict(), goal="best", policy=policy, optimal=opt, compare=compare,
        curve=_curve(p, q, first, z, pre.m, pre.cum, w_q), limits=limits, notes=notes,
        method=method)


def advise_odds(s: Scenario, state: SearchState) -> Advice:
    """Offer or pass at the newest stage: ``event`` (or relative_rank == 1) says
    the event happened.

    ``offer_value`` = q Z_{k+1} + (1-q) V_{k+1} with an event (Z_{k+1}: no event
    after this stage), (1-q) V_{k+1} without; ``pass_value`` = V_{k+1}, the
    optimal value from stage k+1 on (backward induction, net of later costs;
    with offers always accepted and no cost it is the odds rule's W from
    max(k+1, s) on).  The stages are independent, so this is optimal whatever
    happened before.  O(N).
    """
    p = _check_supported(s)
    n = len(p)
    q, c, must = s.accept_probability, s.cost_per_candidate, s.must_hire
    k = state.stage
    pre = _prepare(p)
    z = pre.z
    if q == 1.0 and c == 0.0:
        s_idx, _ = odds_start(p, pre.m, pre.cum)
        offers = k >= s_idx or (must and k == n)
        cont = _start_wins(p, [max(k + 1, s_idx)], z, pre.m, pre.cum)[0] if k < n else 0.0
    else:
        flags, v = optimal_set(p, q, c, must, z)
        offers = bool(flags[k - 1])
        cont = v[k + 1]
    newest = state.newest
    event = newest.event if newest.event is not None else newest.relative_rank == 1
    offer_value = (q * z[k + 1] if event else 0.0) + (1.0 - q) * cont
    forced = must and k == n
    if event and offers:
        decision = "offer"
        reason = (f"Stage {k:,} of {n:,}: the event happened at a stage where the plan makes "
                  f"offers — offer ({offer_value:.1%} if you offer now vs {cont:.1%} if you "
                  "pass).")
    elif forced:
        decision = "offer"
        reason = (f"Stage {k:,} of {n:,}, the last: the search must end with a hire — make "
                  "the offer.")
    elif event:
        decision = "pass"
        reason = (f"Stage {k:,} of {n:,}: the event happened, but it is too early — pass "
                  f"({offer_value:.1%} if you offer now vs {cont:.1%} if you pass).")
    else:
        decision = "pass"
        reason = (f"Stage {k:,} of {n:,}: no event here — pass"
                  + (f" ({cont:.1%} chance of winning later)." if k < n else
                     "; the search ends without a hire."))
    kind = "success_probability"
    notes = [] if c == 0.0 else ["Values are the chance of success minus the expected cost "
                                 "of the stages still to be seen."]
    return Advice(decision=decision, reason=reason, stage=k, openings_left=state.openings_left,
                  value_kind=kind, offer_value=offer_value, pass_value=cont,
                  threshold=int(offers), plan_decision=decision, notes=notes)
