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
chance q; it counts as ``forced_last``).  O(N).

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
from dataclasses import dataclass
from typing import Any

from .advise import Advice, SearchState
from .errors import ScenarioError
from .results import (Curve, Limit, Outcome, Policy, RuleResult, SolveResult,
                      group_thresholds)
from .scenario import ChancesPool, CompareRule, Scenario

__all__ = ["odds_start", "suffix_tables", "evaluate", "optimal_set", "solve_odds",
           "advise_odds", "CURVE_FULL_MAX", "CURVE_POINTS"]

CURVE_FULL_MAX = 2000
CURVE_POINTS = 1000


def odds_start(p: list[float]) -> tuple[int, float]:
    """Bruss's index s (1-based) and the odds sum from s on (inf if some p_k = 1
    with k >= s).  Sum the odds r_k = p_k/(1-p_k) from the end until >= 1.  O(N)."""
    total = 0.0
    for k in range(len(p), 0, -1):
        pk = p[k - 1]
        if pk >= 1.0:
            return k, math.inf
        total += pk / (1.0 - pk)
        if total >= 1.0:
            return k, total
    return 1, total


@dataclass
class SuffixTables:
    """Z[k] = P(no event at stages k..N); W[k] = win chance of "offer at the first
    event from stage k on" (k = 1..N+1; index 0 unused)."""

    z: list[float]
    w: list[float]


def suffix_tables(p: list[float], q: float = 1.0) -> SuffixTables:
    """O(N) backward recursions (module docstring)."""
    n = len(p)
    z = [1.0] * (n + 2)
    w = [0.0] * (n + 2)
    for k in range(n, 0, -1):
        pk = p[k - 1]
        z[k] = (1.0 - pk) * z[k + 1]
        w[k] = pk * q * z[k + 1] + (1.0 - pk * q) * w[k + 1]
    return SuffixTables(z, w)


def optimal_set(p: list[float], q: float, c: float, must: bool,
                z: list[float]) -> tuple[list[int], list[float]]:
    """Backward induction over stages: (offer-at-event flags per stage, V_1..V_{N+1})."""
    n = len(p)
    v = [0.0] * (n + 2)
    flags = [0] * n
    for k in range(n, 0, -1):
        pk = p[k - 1]
        cont = v[k + 1]
        if must and k == n:
            flags[k - 1] = 1
            v[k] = -c + q * pk
            continue
        if z[k + 1] > cont:
            flags[k - 1] = 1
            v[k] = -c + pk * (q * z[k + 1] + (1.0 - q) * cont) + (1.0 - pk) * cont
        else:
            v[k] = -c + cont
    return flags, v


@dataclass
class OddsValue:
    win: float
    other: float
    none: float
    forced: float
    interviews: float


def evaluate(p: list[float], flags: list[int], q: float, must: bool,
             z: list[float]) -> OddsValue:
    """Exact performance of "offer at an event at the flagged stages" (and at
    stage N whatever happens when ``must``).  O(N)."""
    n = len(p)
    alive = 1.0
    win = other = forced = 0.0
    seen_terms = []
    for k in range(1, n + 1):
        seen_terms.append(alive)
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
    cl = lambda x: min(1.0, max(0.0, x))
    return OddsValue(cl(win), cl(other), cl(alive), cl(forced), math.fsum(seen_terms))


def _check_supported(s: Scenario) -> list[float]:
    pool = s.pool
    assert isinstance(pool, ChancesPool)
    if s.goal.type != "best":
        raise ScenarioError("goal.type", f"got {s.goal.type!r}; with chances per stage only "
                            "goal \"best\" (stop on the last event) is supported")
    if s.openings != 1:
        raise ScenarioError("openings", f"got {s.openings}; with chances per stage only one "
                            "opening is supported")
    return list(pool.chances)


def _stage_words(flags: list[int], must: bool) -> tuple[str, int | None]:
    n = len(flags)
    first = next((i for i, f in enumerate(flags, start=1) if f), None)
    tail = " If no event comes by then, take the last stage anyway." if must else ""
    if first is None:
        return "Never make an offer: no stage is worth it." + tail, None
    if all(flags[first - 1:]):
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


def _compare(p: list[float], rule: CompareRule, i: int, q: float, c: float, must: bool,
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
    return _result(name, words, raw, evaluate(p, flags, q, must, z), c)


def _curve(p: list[float], q: float, s_opt: int) -> Curve:
    n = len(p)
    tabs = suffix_tables(p, q)
    if n <= CURVE_FULL_MAX:
        starts = list(range(1, n + 1))
        complete = True
    else:
        pts = {1 + round(i * (n - 1) / (CURVE_POINTS - 1)) for i in range(CURVE_POINTS)}
        pts.add(s_opt)
        starts = sorted(pts)
        complete = False
    return Curve(skips=[s - 1 for s in starts],
                 success=[min(1.0, max(0.0, tabs.w[s])) for s in starts],
                 limit=[None] * len(starts), complete=complete)  # type: ignore[list-item]


def solve_odds(s: Scenario) -> SolveResult:
    """Optimal rule and exact performance for a chances pool (module docstring)."""
    p = _check_supported(s)
    n = len(p)
    q, c, must = s.accept_probability, s.cost_per_candidate, s.must_hire
    tabs = suffix_tables(p, 1.0)
    standard = q == 1.0 and c == 0.0
    odds_sum_total = math.fsum(pk / (1.0 - pk) if pk < 1.0 else math.inf for pk in p)
    if standard:
        s_idx, odds_from_s = odds_start(p)
        flags = [0] * (s_idx - 1) + [1] * (n - s_idx + 1)
        method = "odds theorem (Bruss 2000): sum the odds from the end to 1, O(N)"
    else:
        flags, _ = optimal_set(p, q, c, must, tabs.z)
        method = ("backward induction over stages (independent events; declines count as "
                  "passes), O(N)")
        s_idx = None
        odds_from_s = None
    value = evaluate(p, flags, q, must, tabs.z)
    if standard:
        # the same numbers as the curve: W_s = P(exactly one event in s..N), Z_s
        value.win = min(1.0, max(0.0, tabs.w[s_idx]))
        if must:
            value.forced = min(1.0 - value.win, tabs.z[s_idx])
            value.none = 0.0
        else:
            value.none = min(1.0 - value.win, tabs.z[s_idx])
        value.other = max(0.0, 1.0 - value.win - value.none - value.forced)
    words, skip = _stage_words(flags, must)
    policy = Policy(thresholds=flags, groups=group_thresholds(flags), words=words, skip=skip,
                    interval=skip is not None)
    opt = _result("optimal", words, {"optimal": True}, value, c)
    compare = [_compare(p, r, i, q, c, must, tabs.z) for i, r in enumerate(s.compare)]
    first = (skip + 1) if skip is not None else next(
        (i for i, f in enumerate(flags, start=1) if f), 1)
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
        curve=_curve(p, q, first), limits=limits, notes=notes, method=method)


def advise_odds(s: Scenario, state: SearchState) -> Advice:
    """Offer or pass at the newest stage: relative_rank == 1 means the event happened.

    ``offer_value`` = q Z_{k+1} + (1-q) V_{k+1} with an event (Z_{k+1}: no event
    after this stage), (1-q) V_{k+1} without; ``pass_value`` = V_{k+1}, the
    optimal value from stage k+1 on (backward induction, net of later costs).
    The stages are independent, so this is optimal whatever happened before.
    """
    p = _check_supported(s)
    n = len(p)
    q, c, must = s.accept_probability, s.cost_per_candidate, s.must_hire
    k = state.stage
    tabs = suffix_tables(p, 1.0)
    flags, v = optimal_set(p, q, c, must, tabs.z)
    if s.accept_probability == 1.0 and c == 0.0:
        s_idx, _ = odds_start(p)
        flags = [0] * (s_idx - 1) + [1] * (n - s_idx + 1)
        if must:
            flags[-1] = 1
    event = state.newest.relative_rank == 1
    cont = v[k + 1]
    offer_value = (q * tabs.z[k + 1] if event else 0.0) + (1.0 - q) * cont
    forced = must and k == n
    if event and flags[k - 1]:
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
                  threshold=flags[k - 1], plan_decision=decision, notes=notes)
