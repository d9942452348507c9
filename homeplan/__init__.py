"""homeplan: plan a whole-home electrification as an ordered, costed, year-by-year roadmap.

The public API::

    from homeplan import load_plan, plan_roadmap
    result = plan_roadmap(load_plan("sample_homes/minimal.yaml"))
    for step in result.roadmap.steps:
        print(step.year, step.label, step.net_cost_usd)

- :func:`load_plan` reads and validates a plan file (every problem with its line and column);
- :func:`plan_roadmap` plans it: a :class:`PlanResult` with the :class:`Roadmap` (steps, year
  totals, milestones, baselines) and the energy, capacity, finance and incentive figures;
- :class:`PlannerCache` keeps a home's weather and simulated states between re-plans;
- :class:`InputError` (bad input, located in its file) and :class:`PlanRuleError` (a rule a plan
  given without its file breaks) are the errors a caller catches.

All figures are planning estimates; work on panels, services, gas lines, combustion appliances,
batteries and roofs needs licensed professionals, permits and inspection.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

__version__ = "0.1.0"

if TYPE_CHECKING:
    from homeplan.errors import InputError, PlanRuleError, Problem
    from homeplan.plan.load import LoadedPlan, load_plan
    from homeplan.plan.model import Plan
    from homeplan.planner.chain import plan_roadmap
    from homeplan.planner.context import PlannerCache
    from homeplan.result import PlanResult, Roadmap, Step, YearTotals

__all__ = [
    "InputError",
    "LoadedPlan",
    "Plan",
    "PlanResult",
    "PlanRuleError",
    "PlannerCache",
    "Problem",
    "Roadmap",
    "Step",
    "YearTotals",
    "__version__",
    "load_plan",
    "plan_roadmap",
]

_HOME = {
    "InputError": "homeplan.errors", "PlanRuleError": "homeplan.errors", "Problem": "homeplan.errors",
    "LoadedPlan": "homeplan.plan.load", "load_plan": "homeplan.plan.load", "Plan": "homeplan.plan.model",
    "plan_roadmap": "homeplan.planner.chain", "PlannerCache": "homeplan.planner.context",
    "PlanResult": "homeplan.result", "Roadmap": "homeplan.result", "Step": "homeplan.result",
    "YearTotals": "homeplan.result",
}


def __getattr__(name: str) -> Any:
    """The public names, imported on first use (PEP 562): ``homeplan --help`` and ``check`` do
    not pay for the planner's numerical libraries."""
    if name not in _HOME:
        raise AttributeError(f"module 'homeplan' has no attribute {name!r}")
    import importlib

    return getattr(importlib.import_module(_HOME[name]), name)


def __dir__() -> list[str]:
    return sorted(__all__)
