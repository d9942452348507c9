"""The one result object every view reads: a plan, its roadmap, and what explains it.

The TUI, the printed summary and the exports are thin views over ``PlanResult``; none of them
recomputes physics or money.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

from homeplan.plan.model import Plan
from homeplan.result.figures import (
    CapacityState,
    EnergySummary,
    Finance,
    HourlyProfile,
    ProgramUse,
    ProjectInfo,
    SolverReport,
)
from homeplan.result.outlook import LifeOutlook
from homeplan.result.roadmap import Roadmap
from homeplan.result.sensitivity import Sensitivity

__all__ = ["PlanResult"]


@dataclass(frozen=True)
class PlanResult:
    """A planned home: the roadmap and every figure the views show beside it.

    ``finance`` and ``solver`` are None when the request has no feasible roadmap;
    ``capacity_remedy`` names the project that makes room on the service (None: none needed);
    ``hourly`` holds today's and the planned home's hourly electricity (for the CSV export):
    it is computed on first use from ``hourly_source`` (only ``export --hourly`` needs it), or
    given directly;
    ``sensitivity`` ranks the assumptions that move the NPV most (None: not computed - it
    re-plans the home some twenty times, so only the commands that show it ask for it).
    """

    plan: Plan
    roadmap: Roadmap
    outlooks: tuple[LifeOutlook, ...]
    projects: tuple[ProjectInfo, ...]
    capacity: tuple[CapacityState, ...]
    energy_before: EnergySummary
    energy_after: EnergySummary
    programs: tuple[ProgramUse, ...] = ()
    content_hash: str = ""
    warnings: tuple[str, ...] = ()
    finance: Finance | None = None
    solver: SolverReport | None = None
    capacity_remedy: str | None = None
    solar_connection: str | None = None
    hourly_given: tuple[HourlyProfile, ...] = ()
    sensitivity: Sensitivity | None = None
    hourly_source: Callable[[], tuple[HourlyProfile, ...]] | None = field(
        default=None, repr=False, compare=False
    )

    @property
    def hourly(self) -> tuple[HourlyProfile, ...]:
        """Today's and the planned home's hourly electricity (8760 values each)."""
        if self.hourly_source is not None:
            return self.hourly_source()
        return self.hourly_given

    def project(self, project_id: str) -> ProjectInfo | None:
        return next((p for p in self.projects if p.id == project_id), None)
