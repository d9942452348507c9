"""What a portfolio keeps of each planned home: a few figures, and its years, steps and programs.

A :class:`HomeRecord` is made in the worker from the home's :class:`~homeplan.result.PlanResult`
and sent back to the driver, which writes it to the store; the full result is not kept (the app
re-plans a home from its stored plan when it is opened). Every figure here is read from the
result, none is computed anew, except the differences named below:

- fossil money before / after: the bills for gas, propane, oil, gasoline and diesel (fixed
  charges included) of the do-nothing baseline, and of the roadmap, in each year;
- emissions before / after: the do-nothing baseline's and the roadmap's, each year;
- peak demand: the year's peak demand as a meter would show it, on the winter and on the summer
  design day (the roadmap's ``peak_demand_*``); the added winter / summer peak is that minus
  the same figure of the do-nothing baseline in that year (today's home). A home whose roadmap
  has no peak demand figure keeps them empty;
- near the service limit: the roadmap's ``service_near_limit`` that year (the NEC 220.83
  calculated load fits but is above the near-limit share of the rating); over the limit: no
  headroom left.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from typing import Literal

from homeplan.money.incentives import Program
from homeplan.plan.fuels import FOSSIL_FUELS
from homeplan.plan.model import Plan
from homeplan.result import PlanResult
from homeplan.result.figures import CapacityState

__all__ = [
    "HomeRecord",
    "HomeStatus",
    "ProgramRow",
    "StepRow",
    "YearRow",
    "failed_record",
    "home_record",
]

HomeStatus = Literal["ok", "infeasible", "error", "failed"]
"""ok: planned; infeasible: no roadmap meets the plan's requirements (the reason is kept);
error: the row or plan file breaks a rule (the message says where); failed: the planner
stopped on an unexpected error (a bug: the message names it)."""


@dataclass(frozen=True)
class YearRow:
    """One home in one year of its roadmap."""

    year: int
    spend_usd: float
    incentives_usd: float
    net_usd: float
    bill_savings_usd: float
    bills_usd: float
    fossil_before_usd: float
    fossil_after_usd: float
    emissions_before_kg: float
    emissions_after_kg: float
    peak_demand_kw: float | None
    peak_demand_winter_kw: float | None
    peak_demand_summer_kw: float | None
    added_winter_kw: float | None
    added_summer_kw: float | None
    service_amps: float
    headroom_amps: float
    near_limit: bool
    over_limit: bool
    service_upgrades: int


@dataclass(frozen=True)
class StepRow:
    """One step of a home's roadmap: its year, project, kind of work, cost and incentives."""

    year: int
    project_id: str
    kind: str
    cost_usd: float
    incentives_usd: float


@dataclass(frozen=True)
class ProgramRow:
    """Money one incentive program pays one home in one year (by arrival); ``at_cap`` when the
    home reaches the program's household lifetime cap."""

    program_id: str
    name: str
    year: int
    amount_usd: float
    at_cap: bool


@dataclass(frozen=True)
class HomeRecord:
    """One home of a portfolio as the store keeps it (see the module docstring)."""

    seq: int
    home_id: str
    status: HomeStatus
    message: str = ""
    plan_name: str = ""
    place: str = ""
    first_year: int | None = None
    npv_usd: float | None = None
    spend_usd: float = 0.0
    incentives_usd: float = 0.0
    steps_count: int = 0
    gas_closed_year: int | None = None
    fully_electric_year: int | None = None
    service_amps_today: float | None = None
    headroom_today_amps: float | None = None
    peak_demand_winter_kw_today: float | None = None
    peak_demand_summer_kw_today: float | None = None
    peak_demand_winter_kw_after: float | None = None
    peak_demand_summer_kw_after: float | None = None
    plan_json: str = ""
    base_dir: str = ""
    content_hash: str = ""
    seconds: float = 0.0            # wall time of planning the home in its worker
    cpu_seconds: float = 0.0        # the worker's CPU time for it (less sensitive to a busy machine)
    years: tuple[YearRow, ...] = ()
    steps: tuple[StepRow, ...] = ()
    programs: tuple[ProgramRow, ...] = ()


def failed_record(seq: int, home_id: str, status: HomeStatus, message: str,
                  seconds: float = 0.0) -> HomeRecord:
    """A home that could not be planned, with what was wrong."""
    return HomeRecord(seq=seq, home_id=home_id, status=status, message=message, seconds=seconds)


def _service_by_year(capacity: tuple[CapacityState, ...], years: list[int]) -> dict[int, float]:
    """The service rating at each year's end: today's, then each later calculation's."""
    today = capacity[0].service_amps
    method = capacity[0].method
    out = {}
    for y in years:
        later = [c for c in capacity[1:] if c.year is not None and c.year <= y and c.method == method]
        out[y] = later[-1].service_amps if later else today
    return out


def _kw(value: float | None) -> float | None:
    return None if value is None else round(float(value), 2)


def _added(year_kw: float | None, today_kw: float | None) -> float | None:
    """A year's peak minus today's in the same season (none when either is unknown)."""
    if year_kw is None or today_kw is None:
        return None
    return round(year_kw - today_kw, 2)


def _program_cap(program: Program, ami_pct: float | None) -> float | None:
    if program.tiers and ami_pct is not None:
        tier = next((t for t in program.tiers if t.contains(ami_pct)), None)
        if tier is not None and tier.lifetime_cap_usd is not None:
            return tier.lifetime_cap_usd
    return program.lifetime_cap_usd


def home_record(seq: int, home_id: str, plan: Plan, result: PlanResult, base_dir: str,
                programs: tuple[Program, ...] = (), seconds: float = 0.0) -> HomeRecord:
    """The record of a planned home (see the module docstring for what each figure is)."""
    rm = result.roadmap
    loc = plan.home.location
    place = (loc.place or f"{loc.latitude:g}, {loc.longitude:g}") if loc is not None else ""
    today_cap = result.capacity[0] if result.capacity else None
    common = dict(
        seq=seq, home_id=home_id, plan_name=rm.plan_name, place=place, first_year=rm.first_year,
        service_amps_today=today_cap.service_amps if today_cap else None,
        headroom_today_amps=today_cap.headroom_amps if today_cap else None,
        peak_demand_winter_kw_today=_kw(result.energy_before.peak_demand_winter_kw),
        peak_demand_summer_kw_today=_kw(result.energy_before.peak_demand_summer_kw),
        plan_json=json.dumps(plan.model_dump(mode="json"), sort_keys=True, separators=(",", ":")),
        base_dir=base_dir, content_hash=result.content_hash, seconds=seconds,
    )
    if rm.status != "ok":
        return HomeRecord(status="infeasible", message=rm.infeasibility or "no roadmap fits", **common)
    kinds = {p.id: p.kind for p in result.projects}
    steps = tuple(StepRow(s.year, s.project_id, kinds.get(s.project_id, "replacement"), s.cost_usd,
                          round(s.incentives_usd, 2)) for s in rm.steps)
    nothing = {y.year: y for y in rm.baseline("do_nothing").years}
    service = _service_by_year(result.capacity, [y.year for y in rm.years])
    years = []
    for y in rm.years:
        base = nothing[y.year]
        amps = service[y.year]
        years.append(YearRow(
            year=y.year, spend_usd=y.spend_usd, incentives_usd=y.incentives_usd, net_usd=y.net_usd,
            bill_savings_usd=y.bill_savings_usd, bills_usd=round(y.total_bills_usd, 2),
            fossil_before_usd=round(sum(v for f, v in base.bills_usd.items() if f in FOSSIL_FUELS), 2),
            fossil_after_usd=round(sum(v for f, v in y.bills_usd.items() if f in FOSSIL_FUELS), 2),
            emissions_before_kg=base.emissions_kg, emissions_after_kg=y.emissions_kg,
            peak_demand_kw=y.peak_demand_kw, peak_demand_winter_kw=y.peak_demand_winter_kw,
            peak_demand_summer_kw=y.peak_demand_summer_kw,
            added_winter_kw=_added(y.peak_demand_winter_kw, base.peak_demand_winter_kw),
            added_summer_kw=_added(y.peak_demand_summer_kw, base.peak_demand_summer_kw),
            service_amps=amps, headroom_amps=y.service_headroom_amps,
            near_limit=y.service_near_limit,
            over_limit=y.service_headroom_amps < 0.0,
            service_upgrades=sum(1 for s in steps if s.year == y.year and s.kind == "service_upgrade"),
        ))
    by_id = {p.id: p for p in programs}
    program_rows = []
    for use in result.programs:
        total = sum(use.paid_by_year.values())
        prog = by_id.get(use.program_id)
        cap = _program_cap(prog, plan.household.ami_pct) if prog is not None else None
        at_cap = cap is not None and total >= cap - 0.5
        for year, amount in sorted(use.paid_by_year.items()):
            if amount:
                program_rows.append(ProgramRow(use.program_id, use.name, int(year), round(amount, 2), at_cap))
    milestones = {m.kind: m.year for m in rm.milestones}
    return HomeRecord(
        status="ok", npv_usd=rm.npv_usd, spend_usd=round(sum(s.cost_usd for s in rm.steps), 2),
        incentives_usd=round(sum(s.incentives_usd for s in rm.steps), 2), steps_count=len(rm.steps),
        gas_closed_year=milestones.get("gas_service_closed"),
        fully_electric_year=milestones.get("fully_electric"),
        peak_demand_winter_kw_after=_kw(result.energy_after.peak_demand_winter_kw),
        peak_demand_summer_kw_after=_kw(result.energy_after.peak_demand_summer_kw),
        years=tuple(years), steps=steps, programs=tuple(program_rows), **common,
    )
