"""Result objects with named fields; each serialises to plain JSON.

One :class:`RuleResult` describes how a rule performs (the optimal rule or a
compared rule of thumb): the chance of success, the outcome split, the rank
of the hire, how long the search takes.  :class:`SolveResult` is the answer to
``solve(scenario)``: the optimal rule's :class:`Policy`, its performance (the
same fields as a :class:`RuleResult`, flattened to the top level), the
compared rules, the success curve and the large-N limits.

Fields that do not apply to a scenario are ``None`` (``null`` in JSON), never
absent, so a reader can rely on every key being there.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, fields
from functools import partial
from itertools import compress
from operator import is_not, ne
from typing import Any, Sequence

__all__ = [
    "TOP_COUNTS",
    "TOP_SHARES",
    "Outcome",
    "RankDistribution",
    "RuleResult",
    "Policy",
    "StageGroup",
    "Curve",
    "Limit",
    "SolveResult",
    "group_thresholds",
    "to_jsonable",
]

#: The hire is among the best m, for these m ...
TOP_COUNTS = (1, 2, 3, 5, 10)
#: ... and among the best share of the pool, for these shares.
TOP_SHARES = (0.10, 0.25, 0.50)


_NUMBERS_OR_NULL = frozenset({int, float, type(None)})


def _clean(x: Any) -> Any:
    """Turn dataclasses, tuples and floats into JSON-safe values."""
    if hasattr(x, "__dataclass_fields__"):
        return {f.name: _clean(getattr(x, f.name)) for f in fields(x)}
    if isinstance(x, dict):
        return {str(k): _clean(v) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        kinds = set(map(type, x))  # C-level scan: the fast paths below cost O(len) in C
        if kinds == {int}:
            return list(x)  # long per-stage tables
        if kinds <= _NUMBERS_OR_NULL:
            if all(map(math.isfinite, filter(partial(is_not, None), x))):
                return list(x)  # long lists of numbers, with null for "none"
            return [v if v is None or math.isfinite(v) else None for v in x]
        if kinds == {StageGroup}:
            return [{"first": g.first, "last": g.last, "threshold": g.threshold} for g in x]
        return [_clean(v) for v in x]
    if isinstance(x, float):
        if math.isnan(x) or math.isinf(x):
            return None
        if x == 0.0:
            return 0.0
        return x
    return x


def to_jsonable(x: Any) -> Any:
    """Public helper: any result object as plain JSON-able data."""
    return _clean(x)


@dataclass
class Outcome:
    """How the search ends; the four shares sum to 1.

    ``best``: the goal was met by a regular offer (hired the overall best, or
    one of the best k for goal top); ``other``: someone else was hired by a
    regular offer; ``none``: the search ended with no hire; ``forced_last``:
    nobody qualified and the last candidate was taken because of
    ``must_hire`` (whatever their rank).
    """

    best: float
    other: float
    none: float
    forced_last: float


@dataclass
class RankDistribution:
    """P(the hire has absolute rank r) for r = 1..len(probabilities).

    Long pools are cut after ``len(probabilities)`` ranks; ``rest`` is the
    chance of a hire ranked lower than that, ``none`` the chance of no hire,
    so ``sum(probabilities) + rest + none == 1``.  With several openings
    this is the rank of the best person hired.
    """

    probabilities: list[float]
    rest: float
    none: float


@dataclass
class RuleResult:
    """How one rule performs."""

    name: str
    description: str
    rule: dict[str, Any]
    success_probability: float | None
    expected_rank: float | None
    expected_score: float | None
    expected_interviews: float
    p_no_hire: float
    outcome: Outcome
    top: dict[str, float] | None
    rank_distribution: RankDistribution | None
    expected_hires: float | None = None
    expected_cost: float | None = None

    def to_dict(self) -> dict[str, Any]:
        return _clean(self)


@dataclass
class StageGroup:
    """Consecutive stages ``first..last`` that share one threshold."""

    first: int
    last: int
    threshold: int


def group_thresholds(thresholds: Sequence[int]) -> list[StageGroup]:
    """Group per-stage thresholds into runs of equal value.

    O(len), with the scan for change points done at C level (``compress``
    over ``map(ne, ...)``): a pool of 10^6 stages groups in milliseconds.
    """
    n = len(thresholds)
    if n == 0:
        return []
    t = list(thresholds)
    cuts = list(compress(range(2, n + 1), map(ne, t[1:], t)))
    starts = [1] + cuts
    ends = [c - 1 for c in cuts] + [n]
    return [StageGroup(a, b, t[a - 1]) for a, b in zip(starts, ends)]


@dataclass
class Policy:
    """The optimal rule.

    ``thresholds[i-1]`` is the largest relative rank (1 = best so far) the
    rule accepts at stage i, 0 = pass everyone; ``groups`` is the same list
    grouped into stage ranges; ``skip`` the number passed over before the
    first acceptance when the rule is of skip-then-take form (else None);
    ``words`` the rule in plain words.
    """

    thresholds: list[int]
    groups: list[StageGroup]
    words: str
    skip: int | None = None
    thresholds_by_openings_left: dict[str, list[int]] | None = None
    score_thresholds: list[float | None] | None = None
    start_share: float | None = None
    start_time: float | None = None
    interval: bool = True
    #: Time windows: for arrival number k (key ``str(k)``), the earliest time
    #: (window units from the start) at which it gets an offer if best so far.
    time_thresholds: dict[str, float] | None = None
    #: Scores, several openings: for openings left r (key ``str(r)``), the score
    #: bar per stage (None = take anyone), as ``score_thresholds`` is for all open.
    score_thresholds_by_openings_left: dict[str, list[float | None]] | None = None


@dataclass
class Curve:
    """Exact success chance of the skip-r rule against r.

    ``limit[i]`` is the large-N limit -x ln x at x = skips[i] / N.
    """

    skips: list[int]
    success: list[float]
    limit: list[float | None]
    complete: bool


@dataclass
class Limit:
    """A large-N limit from the literature, shown beside the finite answer."""

    quantity: str
    value: float
    source: str


@dataclass
class SolveResult:
    """Answer to :func:`seqpick.solve`."""

    version: int
    scenario: dict[str, Any]
    goal: str
    policy: Policy
    success_probability: float | None
    expected_rank: float | None
    expected_score: float | None
    expected_interviews: float
    p_no_hire: float
    outcome: Outcome
    top: dict[str, float] | None
    rank_distribution: RankDistribution | None
    compare: list[RuleResult]
    curve: Curve | None
    limits: list[Limit]
    notes: list[str] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)
    expected_hires: float | None = None
    expected_cost: float | None = None
    method: str = ""

    @classmethod
    def from_rule(cls, *, scenario: dict[str, Any], goal: str, policy: Policy,
                  optimal: RuleResult, compare: list[RuleResult], curve: Curve | None,
                  limits: list[Limit], notes: list[str] | None = None,
                  warnings: list[str] | None = None, method: str = "") -> "SolveResult":
        """Build a result whose top-level performance fields are ``optimal``'s."""
        return cls(
            version=1, scenario=scenario, goal=goal, policy=policy,
            success_probability=optimal.success_probability,
            expected_rank=optimal.expected_rank, expected_score=optimal.expected_score,
            expected_interviews=optimal.expected_interviews, p_no_hire=optimal.p_no_hire,
            outcome=optimal.outcome, top=optimal.top,
            rank_distribution=optimal.rank_distribution, compare=compare, curve=curve,
            limits=limits, notes=list(notes or []), warnings=list(warnings or []),
            expected_hires=optimal.expected_hires, expected_cost=optimal.expected_cost,
            method=method,
        )

    def to_dict(self) -> dict[str, Any]:
        return _clean(self)
