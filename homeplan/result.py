"""The one result object every view reads: a plan, its roadmap, and what explains it.

The TUI, the printed summary and the exports are thin views over ``PlanResult``; none of them
recomputes physics or money.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from homeplan.lifecycle import LifeOutlook
from homeplan.money.incentives import ProgramTotal
from homeplan.plan.model import Plan
from homeplan.schedule.roadmap import Roadmap


@dataclass(frozen=True)
class ProjectInfo:
    """A candidate project as the views show it (whether or not the roadmap includes it)."""

    id: str
    kind: str
    label: str
    variant: str | None
    variant_label: str
    size: float
    size_unit: str
    cost_usd: float                # today's installed cost before incentives
    cost_source: str               # "your quote (contractor, date)" or the catalog source
    replaces: tuple[str, ...] = ()
    cautions: tuple[str, ...] = ()  # caution ids (homeplan.catalog.cautions())
    excluded: bool = False
    pinned_year: int | None = None


@dataclass(frozen=True)
class CapacityRow:
    name: str
    va: float
    factor: float
    counted_va: float
    section: str


@dataclass(frozen=True)
class CapacityState:
    """The service load calculation for one state of the home."""

    label: str                     # "today", "2028: after Heat pump"
    year: int | None
    method: str                    # e.g. "NEC 2023 220.83(B)"
    total_va: float
    amps: float
    service_amps: float
    headroom_amps: float
    fits: bool
    rows: tuple[CapacityRow, ...] = ()
    remedy: str | None = None      # what the plan does to make it fit, in words
    notes: tuple[str, ...] = ()


@dataclass(frozen=True)
class EnergySummary:
    """A typical year of one state of the home."""

    label: str
    monthly: dict[str, tuple[float, ...]]   # 'electricity_kwh', 'gas_therm', 'solar_kwh', ... 12 values
    annual: dict[str, float]                # same keys, annual totals
    bills_usd: dict[str, float]             # by fuel, including fixed charges
    emissions_kg: float
    peak_kw: float
    fuel_money_out_usd: float = 0.0         # money that leaves the household for fossil fuel
    peak_winter_kw: float = 0.0
    peak_summer_kw: float = 0.0
    backup_heat_hours: int = 0              # hours a year the heat pump's backup heat runs
    solar_kwh_per_kw: float = 0.0           # specific yield of the array, when there is one


ProgramUse = ProgramTotal
"""How much one incentive program pays in this roadmap (program_id, name, kind, paid_by_year,
caps_note, ends): the money engine's own per-program total."""


@dataclass(frozen=True)
class PlanResult:
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
    extra: dict[str, Any] = field(default_factory=dict)

    def project(self, project_id: str) -> ProjectInfo | None:
        return next((p for p in self.projects if p.id == project_id), None)
