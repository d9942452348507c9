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
from homeplan.result.outlook import LifeOutlook
from homeplan.result.plan_result import PlanResult
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

__all__ = [
    "SCHEMA_VERSION",
    "Baseline",
    "CapacityRow",
    "CapacityState",
    "Emergency",
    "EnergySummary",
    "Finance",
    "HourlyProfile",
    "IncentiveLine",
    "LifeOutlook",
    "Milestone",
    "PlanResult",
    "PlanReturns",
    "ProgramUse",
    "ProjectInfo",
    "Roadmap",
    "SolarHedge",
    "SolverReport",
    "Step",
    "StepReturns",
    "YearTotals",
]
