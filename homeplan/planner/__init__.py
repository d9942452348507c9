"""The planner: from a plan to its result (:class:`~homeplan.result.PlanResult`).

The stages, in order (:mod:`homeplan.planner.chain`): ``home`` (upgrade graph, weather and heat
loss, end-of-life outlooks), ``projects`` (variant, size and cost), ``capacity`` (the service
remedy), ``incentives``, ``schedule`` (the MILP), ``result`` (the roadmap re-simulated year by
year). Modules, from the bottom up:

- ``lifecycle``: Weibull end-of-life risk of appliances, vehicles and the roof;
- ``candidates``: which upgrades apply to the home, and the upgrade graph (networkx);
- ``basis``: the home as it is for the energy engine (weather, heat loss, today's equipment);
- ``states``: the home after any set of projects, and the summary of its typical year;
- ``projects``: each candidate's variant, size and cost (and the sizes offered for solar and the
  battery, which the optimiser chooses among);
- ``context``: the frozen :class:`Context` the stages share, and the per-home :class:`PlannerCache`;
- ``breakdowns``: what old items cost while they stay (expected breakdowns, like-for-like);
- ``compare``: what a step costs beyond the like-for-like purchase it avoids;
- ``backup``: the battery a plan's critical loads need to ride through an outage;
- ``capacity``: NEC load calculations of every state and the remedy;
- ``programs``: the incentive programs the plan lists, read and checked (``check`` reads them too);
- ``incentives``: what those programs pay, estimated and evaluated exactly;
- ``scheduling``: the scheduling problem, solved and refined;
- ``solar_words``: why solar, the roof and the battery are where they are (or left out);
- ``finance``, ``baselines``, ``build``: the result;
- ``chain``: the stages in order (:func:`plan_roadmap`).

The planner reads files only through the plan's weather and incentive files; it never prints.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from homeplan.planner.chain import STAGES, plan_roadmap
    from homeplan.planner.context import Context, PlannerCache

__all__ = ["STAGES", "Context", "PlannerCache", "plan_roadmap"]

_HOME = {"STAGES": "chain", "plan_roadmap": "chain", "Context": "context", "PlannerCache": "context"}


def __getattr__(name: str) -> Any:
    """The public names, imported on first use: importing one stage's module (``lifecycle``,
    ``candidates``) must not load the whole planner and its numerical libraries (PEP 562)."""
    if name not in _HOME:
        raise AttributeError(f"module 'homeplan.planner' has no attribute {name!r}")
    import importlib

    return getattr(importlib.import_module(f"homeplan.planner.{_HOME[name]}"), name)
