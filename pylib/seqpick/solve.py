"""Pick the solver that fits a scenario and run it.

Each solver module handles one family of published models and returns a
:class:`~seqpick.results.SolveResult`:

=================  ==========================================================
module             scenarios
=================  ==========================================================
``classic``        goal best, fixed pool, offers always accepted, one opening,
                   no cost (closed form, O(1) rule, O(N) table)
``rankdp``         relative ranks only: goals best / top / rank, fixed or
                   uncertain pool size, declines, cost, openings
``fullinfo``       scores from a known distribution: goals best / score
``window``         Poisson arrivals over a time window
``odds``           independent chances per stage (odds theorem)
=================  ==========================================================

A combination no solver supports raises :class:`~seqpick.errors.ScenarioError`
naming the conflicting field.
"""

from __future__ import annotations

from typing import Any

from .errors import ScenarioError
from .results import SolveResult
from .scenario import (MAX_SIZE, ChancesPool, FixedPool, Scenario, WindowPool,
                       parse_scenario)

__all__ = ["solve", "solve_scenario"]


def solve_scenario(s: Scenario) -> SolveResult:
    """Solve a validated scenario."""
    if s.scores is not None:
        from . import fullinfo
        return fullinfo.solve_fullinfo(s)
    if isinstance(s.pool, WindowPool):
        from . import window
        return window.solve_window(s)
    if isinstance(s.pool, ChancesPool):
        from . import odds
        return odds.solve_odds(s)
    if s.goal.type == "score":  # pragma: no cover - parse_scenario refuses this
        raise ScenarioError("goal.type", "goal \"score\" needs scores")
    if s.is_classic:
        from . import classic
        return classic.solve_classic(s)
    if s.pool.max_size > MAX_SIZE:
        raise ScenarioError("pool.size", f"got {s.pool.max_size:,}; pools above "
                            f"{MAX_SIZE:,} can be solved only for the classic case (goal "
                            "best, one opening, offers always accepted, no cost)")
    from . import rankdp
    return rankdp.solve_rankdp(s)


def solve(scenario: Any) -> SolveResult:
    """Validate ``scenario`` (a JSON-able dict or a :class:`Scenario`) and solve it.

    Raises
    ------
    ScenarioError
        if a field is invalid or the combination is not supported.
    """
    s = scenario if isinstance(scenario, Scenario) else parse_scenario(scenario)
    return solve_scenario(s)
