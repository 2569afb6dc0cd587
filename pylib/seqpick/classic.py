"""The classic best-choice ("secretary") problem in closed form.

N candidates arrive in random order; after each one you learn only how they
rank against those seen so far; an offer is final and always accepted; the
goal is to hire the overall best.  The optimal rule passes on the first r*
candidates and then makes an offer to the first candidate better than
everyone before.

Formulas used (r = number skipped, 1 <= r <= N-1)::

    P(success | skip r) = (r/N) * sum_{k=r}^{N-1} 1/k,        P(skip 0) = 1/N
    P(r) - P(r-1)       = (sum_{k=r}^{N-1} 1/k - 1) / N
    r*                  = the largest r with sum_{k=r}^{N-1} 1/k > 1  (0 if none)
    E[interviews]       = N * P(r) + r

The success chance rises while the harmonic tail exceeds 1, so r* is found
by bisection on the tail in O(log N).  Ties (two skip counts equally good)
need the tail to equal 1 exactly; a sum of consecutive unit fractions is an
integer only in the trivial case 1/1 (Kürschák 1918), so the only tie is
N = 2, where skipping 0 or 1 both win with chance 1/2; the smaller is chosen.

The rank of the hire uses a conditioning argument (no O(N^2) sums): let B be
the absolute rank of the best among the first r.  P(B = b) =
C(N-b, r-1) / C(N, r).  If B = 1 nobody is hired; otherwise the hire is the
first later candidate better than B, uniformly one of the b-1 ranks above it.
P(B = b) falls geometrically (ratio about 1 - r/N), so the series is cut
once the remaining mass P(B > b) is below 1e-18.

Complexity: the rule O(log N); each curve point O(1); the per-stage table
O(N) to write out; the rank of the hire O(min(N, N/r * 42)).

References
----------
Lindley, D. V. (1961). Dynamic programming and decision theory. *Applied
Statistics* 10, 39-51.
Gilbert, J. P. & Mosteller, F. (1966). Recognizing the maximum of a sequence.
*J. Amer. Statist. Assoc.* 61, 35-73.
Ferguson, T. S. (1989). Who solved the secretary problem? *Statistical
Science* 4, 282-296.
Kürschák, J. (1918). Über die harmonische Reihe. *Mat. Fiz. Lapok* 27, 299-300.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

from .advise import Advice, SearchState
from .errors import ScenarioError
from .harmonic import tail
from .results import (TOP_COUNTS, TOP_SHARES, Curve, Limit, Outcome, Policy,
                      RankDistribution, RuleResult, SolveResult, group_thresholds)
from .scenario import CompareRule, FixedPool, Scenario

__all__ = [
    "success_probability",
    "optimal_skip",
    "evaluate_skip",
    "success_curve",
    "solve_classic",
    "advise_classic",
    "RANK_HEAD",
    "CURVE_FULL_MAX",
    "CURVE_POINTS",
]

#: Ranks 1..RANK_HEAD are listed one by one in the rank distribution.
RANK_HEAD = 200
#: Up to this N the curve lists every skip count; above, about CURVE_POINTS.
CURVE_FULL_MAX = 2000
CURVE_POINTS = 1000
_TAIL_STOP = 1e-18
_EXACT_MAX = 60  # exact rational tie checks up to this N (none exist above; Kürschák)


def success_probability(n: int, r: int) -> float:
    """P(hire the best) for "skip r, then take the first best-so-far".  O(1)."""
    if not 0 <= r <= n - 1:
        raise ValueError("need 0 <= r <= n-1")
    if r == 0:
        return 1.0 / n
    return min(1.0, (r / n) * tail(r, n - 1))


def _tail_exact(n: int, r: int) -> Fraction:
    return sum((Fraction(1, k) for k in range(r, n)), Fraction(0))


def optimal_skip(n: int) -> tuple[int, bool]:
    """(r*, tie): the smallest optimal skip count, and whether r*+1 is as good.

    O(log N) bisection on the harmonic tail; exact rationals for N <= 60.
    """
    if n <= 2:
        return 0, n == 2
    if n <= _EXACT_MAX:
        r = 1
        while r + 1 <= n - 1 and _tail_exact(n, r + 1) > 1:
            r += 1
        tie = r + 1 <= n - 1 and _tail_exact(n, r + 1) == 1
        return r, tie
    lo, hi = 1, n - 1  # tail(lo) > 1 holds for n >= 4; find the largest such r
    while lo < hi:
        mid = (lo + hi + 1) // 2
        if tail(mid, n - 1) > 1.0:
            lo = mid
        else:
            hi = mid - 1
    return lo, False


@dataclass(frozen=True)
class _RankSeries:
    head: list[float]        # P(hire rank = a), a = 1..len(head), regular offers
    beyond: dict[int, float]  # P(regular hire has rank > m) for the share cut-offs m
    mean_rank_mass: float    # sum_b P(B=b) * b/2 (regular hires)


def _rank_series(n: int, r: int, cuts: tuple[int, ...]) -> _RankSeries:
    """Rank of the hire under skip r >= 1 via the best-of-first-r argument."""
    head_len = min(n, RANK_HEAD)
    # w[b] = P(B=b)/(b-1) for b >= 2 contributes to every rank a <= b-1.
    contrib = [0.0] * (head_len + 2)   # contrib[b'] = sum of w for b-1 == b' (capped)
    beyond = {m: 0.0 for m in cuts}
    mean_mass = 0.0
    p_b = r / n                       # P(B = 1)
    s_b = 1.0 - r / n                 # P(B > 1)
    b = 1
    overflow = 0.0                    # sum of w for b-1 > head_len
    while b < n - r + 1 and s_b > _TAIL_STOP:
        # move to b+1
        p_b *= (n - b - r + 1) / (n - b)
        s_b *= (n - b - r) / (n - b) if n - b > 0 else 0.0
        b += 1
        w = p_b / (b - 1)
        if b - 1 <= head_len:
            contrib[b - 1] += w
        else:
            overflow += w
        mean_mass += p_b * b / 2.0
        for m in cuts:
            if b - 1 > m:
                beyond[m] += p_b * (b - 1 - m) / (b - 1)
    # P(rank = a) = sum_{b-1 >= a} w  -> suffix sums over contrib
    head = [0.0] * head_len
    acc = overflow
    for a in range(head_len, 0, -1):
        acc += contrib[a]
        head[a - 1] = acc
    return _RankSeries(head, beyond, mean_mass)


def _describe_skip(n: int, r: int, must_hire: bool) -> str:
    if r == 0:
        words = "Make an offer to the first candidate."
    else:
        who = "candidate" if r == 1 else f"{r:,}"
        words = (f"Pass on the first {who}, then make an offer to the first candidate "
                 "better than everyone before.")
    if must_hire and r > 0:
        words += " If nobody qualifies, take the last candidate."
    return words


def evaluate_skip(n: int, r: int, *, must_hire: bool = False, name: str = "",
                  rule: dict | None = None, description: str | None = None) -> RuleResult:
    """Exact performance of "skip r, then take the first best-so-far"."""
    if not 0 <= r <= n - 1:
        raise ValueError("need 0 <= r <= n-1")
    cuts = tuple(sorted({max(1, int(math.floor(sh * n))) for sh in TOP_SHARES}))
    head_len = min(n, RANK_HEAD)
    if r == 0:
        head = [1.0 / n] * head_len
        p_best = 1.0 / n
        none = forced = 0.0
        interviews = 1.0
        exp_rank = (n + 1) / 2.0
        rank_le = {m: min(m, n) / n for m in set(TOP_COUNTS) | set(cuts)}
    else:
        p_best = success_probability(n, r)
        p_first_r = r / n  # the best is among the first r: nobody qualifies
        series = _rank_series(n, r, cuts)
        head = series.head
        forced = p_first_r if must_hire else 0.0
        none = 0.0 if must_hire else p_first_r
        if must_hire and n >= 2:
            # the forced last candidate is uniform over ranks 2..N
            each = p_first_r / (n - 1)
            head = [h + (each if a >= 2 else 0.0) for a, h in enumerate(head, start=1)]
        interviews = n * p_best + r
        hire = 1.0 - none
        mean_mass = series.mean_rank_mass + (forced * (n + 2) / 2.0 if must_hire else 0.0)
        exp_rank = mean_mass / hire if hire > 0 else None
        rank_le = {}
        for m in set(TOP_COUNTS) | set(cuts):
            if m <= head_len:
                rank_le[m] = math.fsum(head[:m])
            else:
                regular = (1.0 - p_first_r) - series.beyond.get(m, 0.0)
                extra = forced * (m - 1) / (n - 1) if (must_hire and n >= 2) else 0.0
                rank_le[m] = regular + extra
    p_best = min(max(p_best, 0.0), 1.0)
    other = max(0.0, 1.0 - p_best - none - forced)
    top = {str(m): _clamp(rank_le[m]) for m in TOP_COUNTS}
    for sh in TOP_SHARES:
        m = max(1, int(math.floor(sh * n)))
        top[f"{round(sh * 100)}%"] = _clamp(rank_le[m])
    listed = math.fsum(head)
    rest = max(0.0, 1.0 - none - listed)
    return RuleResult(
        name=name or (f"skip {r:,}"),
        description=description or _describe_skip(n, r, must_hire),
        rule=rule or {"skip": r},
        success_probability=p_best,
        expected_rank=exp_rank,
        expected_score=None,
        expected_interviews=interviews,
        p_no_hire=none,
        outcome=Outcome(best=p_best, other=other, none=none, forced_last=forced),
        top=top,
        rank_distribution=RankDistribution([_clamp(h) for h in head], rest, none),
        expected_hires=1.0 - none,
        expected_cost=0.0,
    )


def _clamp(x: float) -> float:
    return 0.0 if x < 0.0 else 1.0 if x > 1.0 else x


def success_curve(n: int, r_star: int) -> Curve:
    """Success chance for every skip count (N <= 2000) or ~1000 of them.

    The large-N limit -x ln x (x = r/N) is given beside each point.
    """
    if n <= CURVE_FULL_MAX:
        skips = list(range(n))
        complete = True
    else:
        pts = {round(k * (n - 1) / (CURVE_POINTS - 1)) for k in range(CURVE_POINTS)}
        pts.add(r_star)
        skips = sorted(pts)
        complete = False
    success = [success_probability(n, r) for r in skips]
    limit = [(-(r / n) * math.log(r / n)) if r > 0 else 0.0 for r in skips]
    return Curve(skips=skips, success=success, limit=limit, complete=complete)


def _compare_skip(n: int, rule: CompareRule, index: int, must_hire: bool) -> RuleResult:
    if rule.kind == "skip":
        r = int(rule.value)
        if r > n - 1:
            raise ScenarioError(f"compare.{index}.skip", f"got {r:,}; expected a whole number "
                                f"from 0 to {n - 1:,} (pool size minus one)")
        return evaluate_skip(n, r, must_hire=must_hire, rule={"skip": r})
    if rule.kind == "skip_share":
        r = min(n - 1, int(math.floor(rule.value * n)))
        pct = f"{rule.value * 100:.4g}%"
        return evaluate_skip(n, r, must_hire=must_hire, name=f"skip {pct}",
                             rule={"skip_share": rule.value},
                             description=f"Skip {pct} of the pool (the first {r:,}), then "
                                         "take the first candidate better than everyone "
                                         "before.")
    needs = "a time window" if rule.kind == "start_share" else "scores"
    raise ScenarioError(f"compare.{index}.{rule.kind}", f"this rule needs {needs}; the "
                        "scenario has neither (use skip or skip_share)")


def solve_classic(s: Scenario) -> SolveResult:
    """Solve the classic case (see the module docstring)."""
    assert isinstance(s.pool, FixedPool)
    n = s.pool.size
    r, tie = optimal_skip(n)
    optimal = evaluate_skip(n, r, must_hire=s.must_hire, name="optimal",
                            rule={"optimal": True})
    thresholds = [0] * r + [1] * (n - r)
    policy = Policy(thresholds=thresholds, groups=group_thresholds(thresholds),
                    words=_describe_skip(n, r, s.must_hire), skip=r, interval=True)
    notes = []
    if tie:
        notes.append(f"Skipping {r} or {r + 1} gives exactly the same chance "
                     f"({optimal.success_probability:.1%}); the rule skips the smaller "
                     "number.")
    notes.append("Assumes the candidates arrive in random order and that you can rank each "
                 "one against all those seen before.")
    compare = [_compare_skip(n, c, i, s.must_hire) for i, c in enumerate(s.compare)]
    limits = [
        Limit("success_probability", 1.0 / math.e,
              "1/e: Lindley 1961; Gilbert & Mosteller 1966; Ferguson 1989"),
        Limit("skip_share", 1.0 / math.e, "skip about N/e: Lindley 1961"),
    ]
    return SolveResult.from_rule(
        scenario=s.to_dict(), goal="best", policy=policy, optimal=optimal, compare=compare,
        curve=success_curve(n, r), limits=limits, notes=notes,
        method="classic best choice, closed form: rule O(log N), table O(N) "
               "(Lindley 1961; Gilbert & Mosteller 1966)")


def advise_classic(s: Scenario, state: SearchState) -> Advice:
    """Offer or pass in the classic case, from the actual state.

    The value of passing after stage i and continuing optimally is the value
    of "take the first best-so-far after stage max(i, r*)", which does not
    depend on what happened before stage i (relative ranks are independent).
    """
    assert isinstance(s.pool, FixedPool)
    n = s.pool.size
    i = state.stage
    j = state.newest.relative_rank or 1
    r, _ = optimal_skip(n)
    offer_value = i / n if j == 1 else 0.0
    if i >= n:
        pass_value = 0.0
    else:
        start = max(i, r)
        pass_value = success_probability(n, start) if start >= 1 else 1.0 / n
    plan_offer = j == 1 and i > r
    seen = f"{i:,} of {n:,} seen"
    if i == n and s.must_hire:
        decision = "offer"
        reason = (f"{seen}: the last candidate, and the search must end with a hire — "
                  "make the offer.")
    elif j != 1:
        decision = "pass"
        reason = (f"{seen}; ranked {j} so far, so cannot be the best overall — pass.")
    elif offer_value > pass_value:
        decision = "offer"
        reason = (f"{seen}; best so far, and the plan makes offers from candidate "
                  f"{r + 1:,} on — offer ({offer_value:.1%} chance this is the best vs "
                  f"{pass_value:.1%} if you pass).")
    else:
        decision = "pass"
        reason = (f"{seen}; best so far, but the plan waits until candidate {r + 1:,} — "
                  f"pass ({offer_value:.1%} chance this is the best vs {pass_value:.1%} if "
                  "you wait).")
    return Advice(decision=decision, reason=reason, stage=i, openings_left=state.openings_left,
                  value_kind="success_probability", offer_value=offer_value,
                  pass_value=pass_value, threshold=1 if i > r else 0,
                  plan_decision="offer" if plan_offer or (i == n and s.must_hire) else "pass")
