"""The scenario: a plain JSON-able dict, validated into typed objects.

The scenario format is versioned (``"version": 1``) and its key names are the
public contract shared by the command line, the page and share links::

    {
      "version": 1,
      "title": "optional free text",
      "pool": {"size": 30},
      "goal": {"type": "best"},
      "scores": null,
      "accept_probability": 1,
      "openings": 1,
      "cost_per_candidate": 0,
      "must_hire": false,
      "compare": [{"skip": 11}, {"skip_share": 0.5}]
    }

``pool`` holds exactly one of the forms listed in :data:`POOL_FORMS`; ``goal``
one of :data:`GOAL_TYPES`; ``compare`` up to :data:`MAX_COMPARE` rules.

Validation happens here and only here: every rejection is a
:class:`~seqpick.errors.ScenarioError` naming the field (dotted path), what
was given and the allowed range.  Validation checks each field on its own;
whether a *combination* of fields can be solved is decided by the solver
dispatch (:mod:`seqpick.solve`), which raises the same error type.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Mapping, Union

from .errors import ScenarioError

__all__ = [
    "SCENARIO_VERSION",
    "MAX_SIZE",
    "MAX_SIZE_CLASSIC",
    "MAX_COMPARE",
    "MAX_TOP_K",
    "MAX_OPENINGS",
    "POOL_FORMS",
    "GOAL_TYPES",
    "FixedPool",
    "RangePool",
    "PoissonPool",
    "WeightsPool",
    "WindowPool",
    "ChancesPool",
    "Pool",
    "Goal",
    "Scores",
    "CompareRule",
    "Scenario",
    "parse_scenario",
]

SCENARIO_VERSION = 1
#: Largest pool any variant accepts (uncertain pools: largest possible size).
MAX_SIZE = 100_000
#: Largest fixed pool for the classic case (goal best, no declines, one opening).
MAX_SIZE_CLASSIC = 1_000_000
MAX_COMPARE = 20
MAX_TOP_K = 25
MAX_OPENINGS = 50
MAX_TITLE = 200
MAX_SAMPLE = 100_000
WINDOW_UNITS = ("minute", "hour", "day", "week", "month")

POOL_FORMS = ("size", "size_min/size_max", "size_mean", "size_weights",
              "window/arrivals_per_unit", "chances")
GOAL_TYPES = ("best", "top", "rank", "score")
DISTRIBUTIONS = ("uniform", "normal", "sample")
COMPARE_KINDS = ("skip", "skip_share", "start_share", "score_at_least")


# --------------------------------------------------------------------------
# typed objects
# --------------------------------------------------------------------------

@dataclass(frozen=True)
class FixedPool:
    """Exactly ``size`` candidates."""

    size: int
    kind: str = field(default="fixed", init=False)

    @property
    def max_size(self) -> int:
        return self.size

    def to_dict(self) -> dict[str, Any]:
        return {"size": self.size}


@dataclass(frozen=True)
class RangePool:
    """Every size from ``size_min`` to ``size_max`` equally likely.

    References
    ----------
    Presman, E. L. & Sonin, I. M. (1972). The best choice problem for a random
    number of objects. *Theory Probab. Appl.* 17, 657-668.
    """

    size_min: int
    size_max: int
    kind: str = field(default="range", init=False)

    @property
    def max_size(self) -> int:
        return self.size_max

    def to_dict(self) -> dict[str, Any]:
        return {"size_min": self.size_min, "size_max": self.size_max}


@dataclass(frozen=True)
class PoissonPool:
    """A Poisson number of candidates with mean ``size_mean``."""

    size_mean: float
    kind: str = field(default="poisson", init=False)

    @property
    def max_size(self) -> int:
        # Support is truncated where the upper tail is below 1e-16.
        m = self.size_mean
        return max(1, int(math.ceil(m + 12.0 * math.sqrt(m) + 40)))

    def to_dict(self) -> dict[str, Any]:
        return {"size_mean": self.size_mean}


@dataclass(frozen=True)
class WeightsPool:
    """P(size = k) proportional to ``weights[k-1]``, k = 1..len(weights)."""

    weights: tuple[float, ...]
    kind: str = field(default="weights", init=False)

    @property
    def max_size(self) -> int:
        last = max(i for i, w in enumerate(self.weights) if w > 0)
        return last + 1

    def to_dict(self) -> dict[str, Any]:
        return {"size_weights": list(self.weights)}


@dataclass(frozen=True)
class WindowPool:
    """Poisson arrivals at rate ``arrivals_per_unit`` over ``window`` units.

    ``start`` (an ISO 8601 date-time) and ``unit`` are for display only.

    References
    ----------
    Cowan, R. & Zabczyk, J. (1978). An optimal selection problem associated
    with the Poisson process. *Theory Probab. Appl.* 23, 584-592.
    Bruss, F. T. (1984). A unified approach to a class of best choice problems
    with an unknown number of options. *Ann. Probab.* 12, 882-889.
    """

    window: float
    arrivals_per_unit: float
    start: str | None = None
    unit: str | None = None
    kind: str = field(default="window", init=False)

    @property
    def mean_size(self) -> float:
        return self.window * self.arrivals_per_unit

    @property
    def max_size(self) -> int:
        return PoissonPool(self.mean_size).max_size

    def to_dict(self) -> dict[str, Any]:
        d: dict[str, Any] = {"window": self.window,
                             "arrivals_per_unit": self.arrivals_per_unit}
        if self.start is not None:
            d["start"] = self.start
        if self.unit is not None:
            d["unit"] = self.unit
        return d


@dataclass(frozen=True)
class ChancesPool:
    """Independent events with chances ``chances[k-1]`` at stages k = 1..n.

    References
    ----------
    Bruss, F. T. (2000). Sum the odds to one and stop. *Ann. Probab.* 28,
    1384-1391.
    """

    chances: tuple[float, ...]
    kind: str = field(default="chances", init=False)

    @property
    def max_size(self) -> int:
        return len(self.chances)

    def to_dict(self) -> dict[str, Any]:
        return {"chances": list(self.chances)}


Pool = Union[FixedPool, RangePool, PoissonPool, WeightsPool, WindowPool, ChancesPool]


@dataclass(frozen=True)
class Goal:
    """What counts as a good outcome.

    ``best``: hire the overall best; ``top``: hire one of the best ``k``;
    ``rank``: smallest expected absolute rank; ``score``: largest expected
    score (needs ``scores``).
    """

    type: str
    k: int | None = None

    def to_dict(self) -> dict[str, Any]:
        return {"type": self.type, "k": self.k} if self.type == "top" else {"type": self.type}


@dataclass(frozen=True)
class Scores:
    """Known distribution of candidates' scores (full information)."""

    distribution: str
    low: float | None = None
    high: float | None = None
    mean: float | None = None
    sd: float | None = None
    values: tuple[float, ...] | None = None

    def to_dict(self) -> dict[str, Any]:
        if self.distribution == "uniform":
            return {"distribution": "uniform", "low": self.low, "high": self.high}
        if self.distribution == "normal":
            return {"distribution": "normal", "mean": self.mean, "sd": self.sd}
        return {"distribution": "sample", "values": list(self.values or ())}


@dataclass(frozen=True)
class CompareRule:
    """A simple rule evaluated beside the optimal one.

    ``kind`` is one of ``skip`` (pass on the first ``value`` candidates, then
    take the first best-so-far), ``skip_share`` (the same with a share of the
    pool, rounded down), ``start_share`` (time window: first best-so-far after
    share ``value`` of the window) or ``score_at_least`` (first candidate whose
    score reaches ``value``).
    """

    kind: str
    value: float

    def to_dict(self) -> dict[str, Any]:
        v: Any = int(self.value) if self.kind == "skip" else self.value
        return {self.kind: v}


@dataclass(frozen=True)
class Scenario:
    """A validated scenario.  Build one with :func:`parse_scenario`."""

    pool: Pool
    goal: Goal = Goal("best")
    scores: Scores | None = None
    accept_probability: float = 1.0
    openings: int = 1
    cost_per_candidate: float = 0.0
    must_hire: bool = False
    compare: tuple[CompareRule, ...] = ()
    title: str | None = None
    version: int = SCENARIO_VERSION

    @property
    def is_classic(self) -> bool:
        """Goal best, fixed pool, no scores, offers always accepted, one
        opening, no cost: the case solved in closed form."""
        return (isinstance(self.pool, FixedPool) and self.goal.type == "best"
                and self.scores is None and self.accept_probability == 1.0
                and self.openings == 1 and self.cost_per_candidate == 0.0)

    def to_dict(self) -> dict[str, Any]:
        """Canonical JSON-able form (every field present)."""
        d: dict[str, Any] = {"version": self.version}
        if self.title is not None:
            d["title"] = self.title
        d["pool"] = self.pool.to_dict()
        d["goal"] = self.goal.to_dict()
        d["scores"] = self.scores.to_dict() if self.scores else None
        d["accept_probability"] = self.accept_probability
        d["openings"] = self.openings
        d["cost_per_candidate"] = self.cost_per_candidate
        d["must_hire"] = self.must_hire
        d["compare"] = [c.to_dict() for c in self.compare]
        return d


# --------------------------------------------------------------------------
# validation helpers
# --------------------------------------------------------------------------

def _shown(value: Any) -> str:
    text = repr(value) if isinstance(value, str) else str(value)
    if isinstance(value, bool):
        text = "true" if value else "false"
    elif value is None:
        text = "null"
    if len(text) > 40:
        text = text[:37] + "..."
    return text


def _is_number(value: Any) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def number(value: Any, path: str, *, low: float | None = None, high: float | None = None,
           low_open: bool = False, high_open: bool = False, what: str = "a number") -> float:
    """Validate a finite number within an (optionally open) range."""
    lo_txt = "" if low is None else (f"greater than {low:g}" if low_open else f"at least {low:g}")
    hi_txt = "" if high is None else (f"less than {high:g}" if high_open else f"at most {high:g}")
    rng = " and ".join(t for t in (lo_txt, hi_txt) if t)
    allowed = f"{what}{' ' + rng if rng else ''}"
    if not _is_number(value) or not math.isfinite(value):
        raise ScenarioError(path, f"got {_shown(value)}; expected {allowed}")
    v = float(value)
    if low is not None and (v < low or (low_open and v == low)):
        raise ScenarioError(path, f"got {_shown(value)}; expected {allowed}")
    if high is not None and (v > high or (high_open and v == high)):
        raise ScenarioError(path, f"got {_shown(value)}; expected {allowed}")
    return v


def integer(value: Any, path: str, *, low: int, high: int) -> int:
    """Validate a whole number in [low, high] (a float with no fraction is accepted)."""
    allowed = f"a whole number from {low:,} to {high:,}"
    if not _is_number(value) or not math.isfinite(value) or float(value) != int(value):
        raise ScenarioError(path, f"got {_shown(value)}; expected {allowed}")
    v = int(value)
    if v < low or v > high:
        raise ScenarioError(path, f"got {_shown(value)}; expected {allowed}")
    return v


def obj(value: Any, path: str, allowed_keys: tuple[str, ...]) -> Mapping[str, Any]:
    """Validate a JSON object whose keys are all in ``allowed_keys``."""
    if not isinstance(value, Mapping):
        raise ScenarioError(path or "scenario", f"got {_shown(value)}; expected an object")
    for key in value:
        if key not in allowed_keys:
            where = f"{path}.{key}" if path else str(key)
            raise ScenarioError(where, f"unknown field {_shown(key)}; allowed fields here: "
                                       + ", ".join(allowed_keys))
    return value


def number_list(value: Any, path: str, *, min_len: int, max_len: int, low: float,
                high: float | None = None) -> tuple[float, ...]:
    if not isinstance(value, (list, tuple)):
        raise ScenarioError(path, f"got {_shown(value)}; expected a list of numbers")
    if not (min_len <= len(value) <= max_len):
        raise ScenarioError(path, f"got {len(value):,} entries; expected from "
                                  f"{min_len:,} to {max_len:,}")
    # Fast path for long lists: one pass of builtins; on any doubt, fall back
    # to the per-entry check, which names the first bad entry.
    try:
        ok = all(type(v) is float or type(v) is int for v in value)
        if ok:
            vals = tuple(map(float, value))
            lo_v, hi_v = min(vals), max(vals)
            if math.isfinite(lo_v) and math.isfinite(hi_v) and lo_v >= low and \
                    (high is None or hi_v <= high) and all(v == v for v in vals):
                return vals
    except (OverflowError, TypeError, ValueError):
        pass
    return tuple(number(v, f"{path}.{i}", low=low, high=high) for i, v in enumerate(value))


# --------------------------------------------------------------------------
# parsers
# --------------------------------------------------------------------------

def _parse_pool(raw: Any) -> Pool:
    keys = ("size", "size_min", "size_max", "size_mean", "size_weights", "window",
            "arrivals_per_unit", "start", "unit", "chances")
    d = obj(raw, "pool", keys)
    present = {k for k in d}
    forms = [
        ("size",), ("size_min", "size_max"), ("size_mean",), ("size_weights",),
        ("window", "arrivals_per_unit"), ("chances",),
    ]
    matched = [f for f in forms if any(k in present for k in f)]
    if len(matched) != 1:
        raise ScenarioError("pool", "give exactly one of: " + "; ".join(POOL_FORMS)
                            + (f" (got {', '.join(sorted(present))})" if present else ""))
    form = matched[0]
    extra = present - set(form) - ({"start", "unit"} if form[0] == "window" else set())
    if extra:
        k = sorted(extra)[0]
        raise ScenarioError(f"pool.{k}", f"cannot be combined with pool.{form[0]}")
    for k in form:
        if k not in d:
            raise ScenarioError(f"pool.{k}", f"missing; pool.{form[0]} needs "
                                             + " and ".join(f"pool.{f}" for f in form))
    if form == ("size",):
        return FixedPool(integer(d["size"], "pool.size", low=1, high=MAX_SIZE_CLASSIC))
    if form == ("size_min", "size_max"):
        a = integer(d["size_min"], "pool.size_min", low=0, high=MAX_SIZE)
        b = integer(d["size_max"], "pool.size_max", low=max(a, 1), high=MAX_SIZE)
        return RangePool(a, b)
    if form == ("size_mean",):
        m = number(d["size_mean"], "pool.size_mean", low=0, high=MAX_SIZE * 0.9, low_open=True)
        return PoissonPool(m)
    if form == ("size_weights",):
        w = number_list(d["size_weights"], "pool.size_weights", min_len=1, max_len=MAX_SIZE,
                        low=0)
        if not sum(w) > 0:
            raise ScenarioError("pool.size_weights", "all weights are 0; at least one "
                                                     "must be greater than 0")
        return WeightsPool(w)
    if form == ("window", "arrivals_per_unit"):
        t = number(d["window"], "pool.window", low=0, low_open=True, high=1e9)
        lam = number(d["arrivals_per_unit"], "pool.arrivals_per_unit", low=0, low_open=True,
                     high=1e9)
        if t * lam > MAX_SIZE * 0.9:
            raise ScenarioError("pool.arrivals_per_unit",
                                f"window × arrivals_per_unit = {t * lam:,.6g} expected "
                                f"candidates; at most {MAX_SIZE * 0.9:,.0f} can be solved")
        start = d.get("start")
        if start is not None and (not isinstance(start, str) or len(start) > 40):
            raise ScenarioError("pool.start", f"got {_shown(start)}; expected an ISO 8601 "
                                              "date-time such as \"2026-03-02T09:00\"")
        unit = d.get("unit")
        if unit is not None and unit not in WINDOW_UNITS:
            raise ScenarioError("pool.unit", f"got {_shown(unit)}; expected one of "
                                             + ", ".join(WINDOW_UNITS))
        return WindowPool(t, lam, start, unit)
    c = number_list(d["chances"], "pool.chances", min_len=1, max_len=MAX_SIZE, low=0, high=1)
    return ChancesPool(c)


def _parse_goal(raw: Any) -> Goal:
    d = obj(raw, "goal", ("type", "k"))
    t = d.get("type")
    if t not in GOAL_TYPES:
        raise ScenarioError("goal.type", f"got {_shown(t)}; expected one of "
                                         + ", ".join(GOAL_TYPES))
    if t == "top":
        if "k" not in d:
            raise ScenarioError("goal.k", f"missing; goal \"top\" needs k, a whole number "
                                          f"from 1 to {MAX_TOP_K}")
        return Goal("top", integer(d["k"], "goal.k", low=1, high=MAX_TOP_K))
    if d.get("k") is not None:
        raise ScenarioError("goal.k", f"only goal \"top\" takes k (goal is {_shown(t)})")
    return Goal(t)


def _parse_scores(raw: Any) -> Scores | None:
    if raw is None:
        return None
    d = obj(raw, "scores", ("distribution", "low", "high", "mean", "sd", "values"))
    dist = d.get("distribution")
    if dist not in DISTRIBUTIONS:
        raise ScenarioError("scores.distribution", f"got {_shown(dist)}; expected one of "
                                                   + ", ".join(DISTRIBUTIONS))
    need = {"uniform": ("low", "high"), "normal": ("mean", "sd"), "sample": ("values",)}[dist]
    for k in d:
        if k != "distribution" and k not in need:
            raise ScenarioError(f"scores.{k}", f"not used by distribution {_shown(dist)}; "
                                               "it takes " + ", ".join(need))
    for k in need:
        if k not in d:
            raise ScenarioError(f"scores.{k}", f"missing; distribution {_shown(dist)} needs "
                                               + " and ".join(need))
    if dist == "uniform":
        lo = number(d["low"], "scores.low", low=-1e12, high=1e12)
        hi = number(d["high"], "scores.high", low=lo, low_open=True, high=1e12)
        return Scores("uniform", low=lo, high=hi)
    if dist == "normal":
        m = number(d["mean"], "scores.mean", low=-1e12, high=1e12)
        s = number(d["sd"], "scores.sd", low=0, low_open=True, high=1e12)
        return Scores("normal", mean=m, sd=s)
    vals = number_list(d["values"], "scores.values", min_len=2, max_len=MAX_SAMPLE,
                       low=-1e12, high=1e12)
    if len(set(vals)) < 2:
        raise ScenarioError("scores.values", "all past scores are equal; give at least two "
                                             "different values")
    return Scores("sample", values=vals)


def _parse_compare(raw: Any) -> tuple[CompareRule, ...]:
    if raw is None:
        return ()
    if not isinstance(raw, (list, tuple)):
        raise ScenarioError("compare", f"got {_shown(raw)}; expected a list of rules")
    if len(raw) > MAX_COMPARE:
        raise ScenarioError("compare", f"got {len(raw)} rules; at most {MAX_COMPARE}")
    rules = []
    for i, item in enumerate(raw):
        path = f"compare.{i}"
        d = obj(item, path, COMPARE_KINDS)
        if len(d) != 1:
            raise ScenarioError(path, "give exactly one of: " + ", ".join(COMPARE_KINDS))
        (kind, value), = d.items()
        p = f"{path}.{kind}"
        if kind == "skip":
            v = float(integer(value, p, low=0, high=MAX_SIZE_CLASSIC - 1))
        elif kind in ("skip_share", "start_share"):
            v = number(value, p, low=0, high=1, high_open=True, what="a share")
        else:
            v = number(value, p, low=-1e12, high=1e12)
        rules.append(CompareRule(kind, v))
    return tuple(rules)


def parse_scenario(raw: Any) -> Scenario:
    """Validate a JSON-able dict into a :class:`Scenario`.

    Raises
    ------
    ScenarioError
        naming the first offending field.
    """
    keys = ("version", "title", "pool", "goal", "scores", "accept_probability", "openings",
            "cost_per_candidate", "must_hire", "compare")
    d = obj(raw, "", keys)
    version = d.get("version", SCENARIO_VERSION)
    if version != SCENARIO_VERSION or isinstance(version, bool):
        raise ScenarioError("version", f"got {_shown(version)}; this engine reads version "
                                       f"{SCENARIO_VERSION}")
    title = d.get("title") or None
    if title is not None and (not isinstance(title, str) or len(title) > MAX_TITLE):
        raise ScenarioError("title", f"expected text of at most {MAX_TITLE} characters")
    if "pool" not in d:
        raise ScenarioError("pool", "missing; give the pool, e.g. {\"size\": 30}")
    pool = _parse_pool(d["pool"])
    goal = _parse_goal(d.get("goal", {"type": "best"}))
    scores = _parse_scores(d.get("scores"))
    p = number(d.get("accept_probability", 1), "accept_probability", low=0, high=1,
               low_open=True, what="a probability")
    openings = integer(d.get("openings", 1), "openings", low=1, high=MAX_OPENINGS)
    cost = number(d.get("cost_per_candidate", 0), "cost_per_candidate", low=0, high=1e12)
    default_must = goal.type in ("rank", "score")
    must = d.get("must_hire", default_must)
    if must is None:
        must = default_must
    if not isinstance(must, bool):
        raise ScenarioError("must_hire", f"got {_shown(must)}; expected true or false")
    compare = _parse_compare(d.get("compare"))
    if goal.type == "score" and scores is None:
        raise ScenarioError("goal.type", "goal \"score\" needs scores: give scores."
                                         "distribution (uniform, normal or sample)")
    if isinstance(pool, FixedPool):
        if openings > pool.size:
            raise ScenarioError("openings", f"got {openings}; expected at most the pool size "
                                            f"({pool.size})")
        for i, c in enumerate(compare):
            if c.kind == "skip" and c.value > pool.size - 1:
                raise ScenarioError(f"compare.{i}.skip", f"got {int(c.value):,}; expected a "
                                    f"whole number from 0 to {pool.size - 1:,} (pool size "
                                    f"minus one)")
    if goal.type == "top" and goal.k is not None and goal.k > pool.max_size:
        raise ScenarioError("goal.k", f"got {goal.k}; expected at most the largest possible "
                                      f"pool size ({pool.max_size})")
    return Scenario(pool=pool, goal=goal, scores=scores, accept_probability=p,
                    openings=openings, cost_per_candidate=cost, must_hire=must,
                    compare=compare, title=title, version=SCENARIO_VERSION)
