"""The typed output of planning a home: what every view, export and test reads.

``PlanResult`` holds the plan, its ``Roadmap`` (steps, year totals, milestones, baselines) and
the figures beside it (energy, capacity, finance, incentives, end-of-life outlooks). Everything
is a small frozen dataclass; "not computed" is ``None``. The JSON form of the roadmap is
``Roadmap.to_dict()`` (docs/roadmap-json.md).
"""

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
from homeplan.result.risk import Band, FuelShock, PriceRisk, PriceSeries, SolarPriceRisk, YearBand
from homeplan.result.roadmap import (
    SCHEMA_VERSION,
    Baseline,
    Emergency,
    IncentiveLine,
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
