"""Advice during a live search: offer or pass for the newest candidate.

``advise(scenario, seen)`` looks at the actual state of a search -- how many
candidates have been seen, how the newest one ranks among them (or their
score), which offers were made and declined, how many openings are left --
and returns the optimal decision from that state, with the value of offering
now and of passing and continuing optimally.  Because the value comes from the
optimal continuation of the *actual* state, the advice stays optimal after
the user deviated from the plan.

The request format (a list of seen candidates, oldest first)::

    {"relative_rank": 2}                  # 1 = best of all seen so far
    {"score": 71.5}                       # when the scenario has scores
    {"relative_rank": 1, "label": "A. N.", "offered": true, "declined": true}
    {"relative_rank": 1, "time": 3.25}    # time windows: arrival time
    {"event": false}                      # chances per stage: did the event happen?

``offered`` without ``declined`` means the offer was accepted (a hire).
With a chances pool, ``event`` (true or false) says whether the stage's event
happened; ``relative_rank`` is accepted there too (1 = the event happened),
but the first stage can show "no event" only with ``event``.

Each solver module provides ``advise_<model>(scenario, state)`` returning an
:class:`Advice`; this module parses the request and dispatches.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from .errors import ScenarioError
from .results import _clean
from .scenario import (MAX_SIZE, ChancesPool, FixedPool, Scenario, WindowPool, number,
                       obj, parse_scenario)

__all__ = ["SeenEntry", "SearchState", "Advice", "parse_seen", "advise", "advise_request"]

MAX_LABEL = 200
_SEEN_KEYS = ("relative_rank", "score", "label", "offered", "declined", "time")


@dataclass(frozen=True)
class SeenEntry:
    """One candidate as seen.  ``relative_rank`` is 1 for the best so far."""

    relative_rank: int | None = None
    score: float | None = None
    label: str | None = None
    offered: bool = False
    declined: bool = False
    time: float | None = None
    event: bool | None = None  # chances pools: whether the stage's event happened

    @property
    def hired(self) -> bool:
        return self.offered and not self.declined


@dataclass(frozen=True)
class SearchState:
    """The state a search has reached, derived from the seen list."""

    seen: tuple[SeenEntry, ...]
    stage: int                 # number seen, = index of the newest (1-based)
    hires: int                 # accepted offers before the newest candidate
    openings_left: int         # openings left before deciding on the newest
    newest: SeenEntry
    best_score_before: float | None  # best score among the earlier candidates

    @property
    def current_is_best_so_far(self) -> bool:
        if self.newest.relative_rank is not None:
            return self.newest.relative_rank == 1
        return self.best_score_before is None or (
            self.newest.score is not None and self.newest.score > self.best_score_before)


@dataclass
class Advice:
    """The decision for the newest candidate.

    ``decision`` is ``"offer"``, ``"pass"`` or ``"done"`` (every opening is
    filled, or the pool is exhausted).  ``offer_value`` / ``pass_value`` are in
    the units of ``value_kind``: the chance of success (goals best/top), the
    expected final rank (goal rank, smaller is better) or the expected score
    (goal score), counting any cost per candidate.
    """

    decision: str
    reason: str
    stage: int
    openings_left: int
    value_kind: str
    offer_value: float | None
    pass_value: float | None
    threshold: int | None = None
    score_threshold: float | None = None
    plan_decision: str | None = None
    notes: list[str] = field(default_factory=list)

    def to_dict(self) -> dict[str, Any]:
        return _clean(self)


def parse_seen(raw: Any, s: Scenario) -> SearchState:
    """Validate the seen list against the scenario."""
    if not isinstance(raw, (list, tuple)) or not raw:
        raise ScenarioError("seen", "expected a non-empty list of candidates, oldest first")
    limit = s.pool.max_size
    if len(raw) > limit:
        raise ScenarioError("seen", f"got {len(raw):,} candidates; the scenario allows at "
                                    f"most {limit:,}")
    entries: list[SeenEntry] = []
    hires = 0
    best_score: float | None = None
    best_before: float | None = None
    last_time = 0.0
    for i, item in enumerate(raw):
        path = f"seen.{i}"
        d = obj(item, path, _SEEN_KEYS + (("event",) if isinstance(s.pool, ChancesPool) else ()))
        rr = sc = t = ev = None
        if s.scores is None:
            if "score" in d:
                raise ScenarioError(f"{path}.score", "this scenario has no scores; give "
                                                     "relative_rank instead")
            if "event" in d:
                ev = d["event"]
                if not isinstance(ev, bool):
                    raise ScenarioError(f"{path}.event", f"got {ev!r}; expected true or false")
            if "relative_rank" not in d and ev is None:
                if isinstance(s.pool, ChancesPool):
                    raise ScenarioError(f"{path}.event", "missing; expected true or false "
                                        "(or relative_rank, 1 = the event happened)")
                raise ScenarioError(f"{path}.relative_rank", f"missing; expected a whole "
                                    f"number from 1 (best so far) to {i + 1}")
            if "relative_rank" in d:
                v = d["relative_rank"]
                if isinstance(v, bool) or not isinstance(v, (int, float)) or v != int(v) \
                        or not 1 <= v <= i + 1:
                    raise ScenarioError(f"{path}.relative_rank", f"got {v!r}; expected a "
                                        f"whole number from 1 (best so far) to {i + 1}")
                rr = int(v)
                if ev is not None and ev != (rr == 1):
                    raise ScenarioError(f"{path}.event", f"got {ev!r}, but relative_rank {rr} "
                                        "says the opposite (1 = the event happened); give one "
                                        "of them")
        else:
            if "relative_rank" in d:
                raise ScenarioError(f"{path}.relative_rank", "this scenario has scores; "
                                                             "give score instead")
            if "score" not in d:
                raise ScenarioError(f"{path}.score", "missing; this scenario has scores")
            sc = number(d["score"], f"{path}.score", low=-1e12, high=1e12)
        label = d.get("label")
        if label is not None and (not isinstance(label, str) or len(label) > MAX_LABEL):
            raise ScenarioError(f"{path}.label", f"expected text of at most {MAX_LABEL} "
                                                 "characters")
        offered = d.get("offered", False)
        declined = d.get("declined", False)
        for k, v in (("offered", offered), ("declined", declined)):
            if not isinstance(v, bool):
                raise ScenarioError(f"{path}.{k}", f"got {v!r}; expected true or false")
        if declined and not offered:
            raise ScenarioError(f"{path}.declined", "a candidate can decline only an offer "
                                                    "that was made (set offered too)")
        if isinstance(s.pool, WindowPool):
            if "time" not in d:
                raise ScenarioError(f"{path}.time", f"missing; expected the arrival time "
                                    f"from {last_time:g} to {s.pool.window:g}")
            t = number(d["time"], f"{path}.time", low=last_time, high=s.pool.window)
            last_time = t
        elif "time" in d:
            raise ScenarioError(f"{path}.time", "only time-window scenarios take a time")
        is_last = i == len(raw) - 1
        if not is_last and offered and not declined:
            hires += 1
            if hires > s.openings:
                raise ScenarioError(f"{path}.offered", f"more accepted offers than openings "
                                                       f"({s.openings})")
        if is_last:
            best_before = best_score
        if sc is not None:
            best_score = sc if best_score is None else max(best_score, sc)
        entries.append(SeenEntry(rr, sc, label, offered, declined, t, ev))
    return SearchState(seen=tuple(entries), stage=len(entries), hires=hires,
                       openings_left=s.openings - hires, newest=entries[-1],
                       best_score_before=best_before)


def advise(scenario: Any, seen: Any) -> Advice:
    """Advice for the newest candidate in ``seen``; see the module docstring."""
    s = scenario if isinstance(scenario, Scenario) else parse_scenario(scenario)
    state = parse_seen(seen, s)
    if state.openings_left <= 0:
        return Advice("done", "Every opening is filled; the search is over.", state.stage,
                      0, _value_kind(s), None, None)
    if s.scores is not None:
        from . import fullinfo
        return fullinfo.advise_fullinfo(s, state)
    if isinstance(s.pool, WindowPool):
        from . import window
        return window.advise_window(s, state)
    if isinstance(s.pool, ChancesPool):
        from . import odds
        return odds.advise_odds(s, state)
    if s.is_classic:
        from . import classic
        return classic.advise_classic(s, state)
    if s.pool.max_size > MAX_SIZE:  # pragma: no cover - guarded by solve as well
        raise ScenarioError("pool.size", f"at most {MAX_SIZE:,} outside the classic case")
    from . import rankdp
    return rankdp.advise_rankdp(s, state)


def advise_request(payload: Any) -> Advice:
    """``{"scenario": {...}, "seen": [...]}`` -> :class:`Advice`."""
    d = obj(payload, "", ("scenario", "seen"))
    if "scenario" not in d:
        raise ScenarioError("scenario", "missing; expected {\"scenario\": {...}, "
                                        "\"seen\": [...]}")
    try:
        s = parse_scenario(d["scenario"])
    except ScenarioError as e:
        raise ScenarioError("scenario." + e.field if e.field else "scenario", e.message)
    return advise(s, d.get("seen"))


def _value_kind(s: Scenario) -> str:
    return {"rank": "expected_rank", "score": "expected_score"}.get(s.goal.type,
                                                                  "success_probability")
