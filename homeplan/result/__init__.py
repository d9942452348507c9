"""The typed output of planning a home: what every view, export and test reads.

``PlanResult`` holds the plan, its ``Roadmap`` (steps, year totals, milestones, baselines) and
the figures beside it (energy, capacity, finance, incentives, end-of-life outlooks). Everything
is a small frozen dataclass; "not computed" is ``None``. The JSON form of the roadmap is
``Roadmap.to_dict()`` (docs/roadmap-json.md).

The names are imported on first use (PEP 562), so reading one of these modules (an end-of-life
outlook for ``homeplan check``) does not load the others."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from homeplan.result.figures import (
        CapacityRow,
        CapacityState,
        EnergySummary,
        Finance,
        HourlyProfile,
        PlanReturns,
        ProgramUse,
        ProjectInfo,
        SolarHedge,
        SolverReport,
        StepReturns,
    )
    from homeplan.result.meter import MeterGap, MeterSummary
    from homeplan.result.outlook import LifeOutlook
    from homeplan.result.plan_result import PlanResult
    from homeplan.result.risk import (
        Band,
        FuelShock,
        PriceRisk,
        PriceSeries,
        SolarPriceRisk,
        YearBand,
    )
    from homeplan.result.roadmap import (
        SCHEMA_VERSION,
        Baseline,
        Emergency,
        IncentiveLine,
        LeftOut,
        Milestone,
        Roadmap,
        Step,
        YearTotals,
    )
    from homeplan.result.sensitivity import Sensitivity, SensitivityRow

__all__ = [
    "SCHEMA_VERSION",
    "Band",
    "Baseline",
    "CapacityRow",
    "CapacityState",
    "Emergency",
    "EnergySummary",
    "Finance",
    "FuelShock",
    "HourlyProfile",
    "IncentiveLine",
    "LeftOut",
    "LifeOutlook",
    "MeterGap",
    "MeterSummary",
    "Milestone",
    "PlanResult",
    "PlanReturns",
    "PriceRisk",
    "PriceSeries",
    "ProgramUse",
    "ProjectInfo",
    "Roadmap",
    "Sensitivity",
    "SensitivityRow",
    "SolarHedge",
    "SolarPriceRisk",
    "SolverReport",
    "Step",
    "StepReturns",
    "YearBand",
    "YearTotals",
]

_HOME = {
    **dict.fromkeys(("CapacityRow", "CapacityState", "EnergySummary", "Finance", "HourlyProfile",
                     "PlanReturns", "ProgramUse", "ProjectInfo", "SolarHedge", "SolverReport",
                     "StepReturns"), "figures"),
    **dict.fromkeys(("MeterGap", "MeterSummary"), "meter"),
    "LifeOutlook": "outlook",
    "PlanResult": "plan_result",
    **dict.fromkeys(("Band", "FuelShock", "PriceRisk", "PriceSeries", "SolarPriceRisk", "YearBand"), "risk"),
    **dict.fromkeys(("SCHEMA_VERSION", "Baseline", "Emergency", "IncentiveLine", "LeftOut", "Milestone",
                     "Roadmap", "Step", "YearTotals"), "roadmap"),
    **dict.fromkeys(("Sensitivity", "SensitivityRow"), "sensitivity"),
}
"""Public name -> the module of this package that defines it."""


def __getattr__(name: str) -> Any:
    """The public names, imported on first use (PEP 562)."""
    if name not in _HOME:
        raise AttributeError(f"module 'homeplan.result' has no attribute {name!r}")
    import importlib

    return getattr(importlib.import_module(f"homeplan.result.{_HOME[name]}"), name)


def __dir__() -> list[str]:
    return sorted(__all__)
