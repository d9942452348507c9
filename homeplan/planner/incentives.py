"""Incentive programs for one plan: where they come from and what they pay.

Programs are data: the plan's own ``incentives:`` list plus every file named in
``incentive_files:`` (paths relative to the plan file). Nothing is applied that the plan does
not list, so a plan for a real home never picks up the invented demo programs.

The scheduler gets per-project, per-year estimates (each purchase on its own); the roadmap gets
the exact evaluation of all chosen purchases together (shared yearly caps, lifetime caps,
stacking, tax liability and carryforward), by :mod:`homeplan.money.incentives`.
"""

from __future__ import annotations

import datetime as dt
import json
from dataclasses import dataclass, replace

from homeplan import catalog
from homeplan.errors import PlanRuleError
from homeplan.money.incentives import (
    PROJECT_KINDS,
    Household,
    IncentiveResult,
    Program,
    Purchase,
    YearIncentive,
    evaluate,
    incentives_by_install_year,
    program_totals,
)
from homeplan.plan.files import INCENTIVES, as_folder
from homeplan.plan.fuels import HOME_FUELS, appliance_fuel
from homeplan.planner.context import Context
from homeplan.planner.programs import load_programs, read_incentive_file
from homeplan.planner.projects import cost_in_year_usd
from homeplan.result.figures import ProgramUse
from homeplan.schedule.problem import IncentiveGroup

# load_programs and read_incentive_file live in homeplan.planner.programs (light, for check)
__all__ = ["VEHICLE_CREDITS_NOTE", "AwardLine", "IncentiveModel", "load_programs", "plan_programs",
           "read_incentive_file"]

MONEY_KIND = {"close_gas": "gas_closure"}
VEHICLE_CREDITS_NOTE = (
    "Vehicle tax credits are not modelled: the clean vehicle credits for new (26 USC 30D) and "
    "used (26 USC 25E) vehicles depend on the vehicle's price and the buyer's income, and ended "
    "for vehicles acquired after 2025-09-30 (Pub. L. 119-21); an electric vehicle's cost here "
    "is its premium over a gasoline car, before any credit or dealer discount.")
"""Said in the result of every plan with an electric vehicle.

References
----------
26 USC 30D and 25E as amended by Pub. L. 117-169; Pub. L. 119-21 (2025) ended both for vehicles
acquired after 2025-09-30.
"""
INSTALL_MONTH_DAY = (3, 1)
"""Purchases are dated 1 March of their year: quotes in the winter, installation in spring."""


@dataclass(frozen=True)
class AwardLine:
    program: str
    amount_usd: float
    arrives: dt.date
    kind: str

    @property
    def arrival_year(self) -> int:
        return self.arrives.year


def _install_date(year: int) -> dt.date:
    return dt.date(year, *INSTALL_MONTH_DAY)


def plan_programs(ctx: Context) -> tuple[Program, ...]:
    """Programs of the plan, re-read only when the list or a file (by size and time) changes."""
    folder = as_folder(ctx.base_dir)
    stamps = []
    for i, name in enumerate(ctx.plan.incentive_files):
        try:
            path = folder.resolve(name, ("incentive_files", i), INCENTIVES)
            st = path.stat()
            stamps.append((str(path), st.st_size, st.st_mtime_ns))
        except (OSError, PlanRuleError):  # reported when the file is read
            stamps.append((name, None, None))
    key = "programs:" + json.dumps([ctx.plan.incentives, stamps], sort_keys=True, default=str)
    return ctx.cache.shared_memo(key, lambda: load_programs(ctx.plan, ctx.base_dir))


class IncentiveModel:
    """Incentive estimates and exact evaluation for one plan (with its final projects)."""

    def __init__(self, ctx: Context, programs: tuple[Program, ...]):
        self.ctx = ctx
        self.programs = programs
        h = ctx.plan.household
        self.household = Household(ami_pct=h.ami_pct, tax_liability_usd=h.federal_tax_liability_usd,
                                   state_tax_liability_usd=h.state_tax_liability_usd)
        self._estimates: dict[str, dict[int, YearIncentive]] = {}
        # programs with yearly caps shared by several items are given to the scheduler as capped
        # groups (so that spreading capped items over tax years is found when it pays); the
        # per-item estimates cover everything else
        self.estimate_programs = tuple(self._without_capped_kinds(p) for p in programs)
        self.estimate_programs = tuple(p for p in self.estimate_programs if p.kinds)

    def with_ctx(self, ctx: Context) -> IncentiveModel:
        """The same programs for the plan with other project details (another size chosen)."""
        return IncentiveModel(ctx, self.programs)

    @staticmethod
    def _without_capped_kinds(program: Program) -> Program:
        if not program.yearly_caps:
            return program
        capped = frozenset().union(*(g.kinds for g in program.yearly_caps))
        return replace(program, kinds=frozenset(program.kinds - capped), yearly_caps=())

    def groups(self) -> tuple[IncentiveGroup, ...]:
        """Yearly-capped programs as scheduler groups: each project's share of its cost that
        the program pays on its own (rate, tier and per-item caps), the yearly cap, the years
        the program is open, and when the money arrives."""
        out = []
        for prog in self.programs:
            for cg in prog.yearly_caps:
                years = [y for y in self.ctx.years
                         if (prog.starts is None or prog.starts <= _install_date(y))
                         and (prog.ends is None or _install_date(y) <= prog.ends)]
                if not years:
                    continue
                alone = replace(prog, yearly_caps=(), lifetime_cap_usd=None, kinds=frozenset(cg.kinds))
                rates = {}
                for pid, d in self.ctx.details.items():
                    if MONEY_KIND.get(d.kind, d.kind) not in cg.kinds:
                        continue
                    cost = cost_in_year_usd(d, self.ctx.plan, years[0])
                    res = evaluate([self.purchase(pid, years[0], cost)], [alone], self.household)
                    earned = sum(a.earned_usd for a in res.awards)
                    if cost > 0 and earned > 0:
                        rates[pid] = earned / cost
                if not rates:
                    continue
                pos = prog.kind == "point_of_sale_rebate"
                lag = 0 if pos or (prog.kind == "rebate_later" and prog.paid_after_days < 300) else 1
                out.append(IncentiveGroup(id=f"{prog.id}:{cg.name}", rates=rates, cap_usd_per_year=cg.cap_usd,
                                          arrives_after_years=lag, adds_to_budget=pos, name=prog.name,
                                          active_years=tuple(years)))
        return tuple(out)

    @property
    def notes(self) -> tuple[str, ...]:
        """What the incentive estimate leaves out that the plan's projects would need."""
        if any(d.kind == "ev" for d in self.ctx.details.values()):
            return (VEHICLE_CREDITS_NOTE,)
        return ()

    def purchase(self, pid: str, year: int, cost_usd: float) -> Purchase:
        d = self.ctx.details[pid]
        keys = set(d.candidate.replaces)
        fuels = {appliance_fuel(a) for a in self.ctx.plan.appliances if a.key in keys}
        return Purchase(
            project_id=pid, kind=MONEY_KIND.get(d.kind, d.kind), cost_usd=cost_usd,
            installed_on=_install_date(year),
            panel_amps=(float(catalog.upgrade_kinds()[d.kind].provides_amps or 0) or None)
            if d.kind in ("panel_upgrade", "service_upgrade") else None,
            size_kw=d.size if d.kind == "solar" else None,
            size_kwh=d.size if d.kind == "battery" else None,
            fuel_switch=bool(fuels & set(HOME_FUELS)),
        )

    def estimate(self, pid: str, year: int, cost_usd: float) -> tuple[float, float]:
        """(point-of-sale, later) incentives of one purchase alone in ``year``."""
        if not self.estimate_programs:
            return 0.0, 0.0
        key = MONEY_KIND.get(self.ctx.details[pid].kind, self.ctx.details[pid].kind)
        if key not in PROJECT_KINDS:
            return 0.0, 0.0
        table = self._estimates.get(pid)
        if table is None or year not in table:
            d = self.ctx.details[pid]
            costs = {y: cost_in_year_usd(d, self.ctx.plan, y) for y in self.ctx.years}
            first = self.purchase(pid, self.ctx.first_year, costs[self.ctx.first_year])
            key = f"incentives:{id(self.programs)}:{first}:{sorted(costs.items())}:{self.household}"
            table = self.ctx.cache.memo(key, lambda: incentives_by_install_year(
                first, costs, self.estimate_programs, self.household))
            self._estimates[pid] = table
        ye = table[year]
        scale = cost_usd / ye.cost_usd if ye.cost_usd else 1.0
        return ye.point_of_sale_usd * min(scale, 1.0), ye.later_usd * min(scale, 1.0)

    def exact(self, done: dict[str, int], costs: dict[str, float]
              ) -> tuple[dict[str, list[AwardLine]], IncentiveResult | None]:
        """Every award of the chosen purchases evaluated together: (award lines by project id,
        the engine's full result or None)."""
        if not self.programs or not done:
            return {}, None
        items = [self.purchase(p, y, costs[p]) for p, y in sorted(done.items(), key=lambda kv: (kv[1], kv[0]))
                 if MONEY_KIND.get(self.ctx.details[p].kind, self.ctx.details[p].kind) in PROJECT_KINDS]
        result = evaluate(items, self.programs, self.household)
        names = {p.id: p.name for p in self.programs}
        out: dict[str, list[AwardLine]] = {}
        for a in result.awards:
            if a.paid_usd <= 0:
                continue
            kind = ("point_of_sale" if a.at_point_of_sale else
                    "tax_credit" if a.program_kind.startswith("tax_credit") else "rebate")
            for pay in a.payments:
                if pay.amount_usd > 0:
                    out.setdefault(a.project_id, []).append(
                        AwardLine(names.get(a.program_id, a.program_id), round(pay.amount_usd, 2), pay.on, kind))
        return out, result

    def uses(self, result: IncentiveResult | None) -> tuple[ProgramUse, ...]:
        """What each program pays in the plan, with its caps in words and its end date."""
        if result is None or not self.programs:
            return ()
        return tuple(program_totals(result, self.programs))
