"""Seqpick: exact optimal rules for choosing from a stream of candidates.

Public API::

    from seqpick import solve, advise, parse_scenario, ScenarioError

``solve(scenario)`` takes a JSON-able scenario dict (see
:mod:`seqpick.scenario`) and returns a :class:`SolveResult`;
``advise(scenario, seen)`` returns the :class:`Advice` for the newest
candidate of a live search.  Both raise :class:`ScenarioError` naming the
offending field.
"""

from .advise import Advice, advise
from .errors import ScenarioError
from .results import Outcome, Policy, RankDistribution, RuleResult, SolveResult
from .scenario import SCENARIO_VERSION, Scenario, parse_scenario
from .solve import solve

__all__ = [
    "solve",
    "advise",
    "parse_scenario",
    "Scenario",
    "SCENARIO_VERSION",
    "ScenarioError",
    "SolveResult",
    "RuleResult",
    "Policy",
    "Outcome",
    "RankDistribution",
    "Advice",
    "__version__",
]

__version__ = "0.1.0"
