"""Each candidate project made concrete for this home: variant, size, cost today and over time.

Sizes come from the home (heat pump tons from the design heating load, solar kW from the
electrified annual use and the roof area, roof area from the floor plan); costs from the
catalog range at the plan's cost level, or from the user's contractor quote.

References
----------
ACCA Manual S for heat pump selection (via :func:`homeplan.planner.states.heat_pump_selection`);
cost ranges and learning rates with their sources in ``homeplan/data/upgrades.yaml``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Any

from homeplan import catalog
from homeplan.catalog import performance
from homeplan.energy.selection import BTUH_PER_TON, HeatPumpSelection, with_size
from homeplan.energy.sizing import array_kw_for_coverage
from homeplan.money.costs import cost_in_year as grow_cost
from homeplan.money.costs import cost_trend_from_record
from homeplan.plan.fuels import appliance_fuel
from homeplan.plan.model import Plan
from homeplan.planner.basis import HomeBasis
from homeplan.planner.candidates import Candidate, dual_fuel_backup
from homeplan.planner.states import heat_pump_backup, heat_pump_selection
from homeplan.units import display_size

__all__ = [
    "ProjectDetail",
    "cost_in_year_usd",
    "detail",
    "replaced_fuels",
    "roof_area_ft2",
    "solar_size_kw",
    "with_variant",
]


@dataclass(frozen=True)
class ProjectDetail:
    """A candidate with its variant, size and today's cost."""

    candidate: Candidate
    variant: str | None
    variant_label: str
    size: float
    size_unit: str
    cost_today_usd: float
    cost_source: str
    life_years: float
    cost_change: dict[str, Any]
    quoted: bool = False
    backup_kw: float = 0.0        # electric backup heat of a heat pump (strips or heaters), kW
    backup_kind: str = ""         # "strips", "heaters", "existing" (dual fuel) or "" (none)
    sizing: HeatPumpSelection | None = None  # a heat pump's loads, size and capacity at design

    @property
    def id(self) -> str:
        return self.candidate.id

    @property
    def kind(self) -> str:
        return self.candidate.kind

    @property
    def label(self) -> str:
        return self.candidate.label

    def size_text(self) -> str:
        """The size in plain units (a heat pump in kW and Btu/h, not tons)."""
        return display_size(self.size, self.size_unit)


def roof_area_ft2(plan: Plan) -> float:
    """Roof surface from the footprint and the pitch: floor area / stories / cos(tilt)."""
    roof = plan.home.roof
    tilt = roof.tilt_deg if roof else 22.6
    return plan.home.floor_area_ft2 / plan.home.stories / math.cos(math.radians(min(tilt, 60.0)))


def solar_size_kw(plan: Plan, annual_load_kwh: float, specific_yield: float) -> float:
    """Array size covering the electrified home's annual use, limited by the usable roof.

    References
    ----------
    Common practice, no source: size to about 100 % of annual use (data/equipment_performance.csv);
    about 60 ft2 of roof per kW.
    """
    p = performance()
    want = array_kw_for_coverage(annual_load_kwh, max(specific_yield, 1.0), p["solar_target_coverage"])
    roof = plan.home.roof
    area = roof.usable_area_ft2 if roof and roof.usable_area_ft2 is not None else roof_area_ft2(plan) * 0.4
    fit = area * (1 - (roof.shading_pct if roof else 0) / 100) / p["solar_ft2_per_kw"]
    return float(max(1.0, round(min(want, fit) * 2) / 2))


def detail(plan: Plan, c: Candidate, basis: HomeBasis, electrified_kwh: float,
           specific_yield: float) -> ProjectDetail:
    kinds = catalog.upgrade_kinds()
    k = kinds[c.kind]
    opt = plan.options.get(c.id)
    variant_id = (opt.variant if opt and opt.variant else None) or c.variant
    if opt and opt.amps and c.kind == "ev_charger":
        variant_id = f"a{opt.amps:g}" if f"a{opt.amps:g}" in {v.id for v in k.variants} else variant_id
    if (c.kind == "heat_pump" and variant_id == "ducted" and not (opt and opt.variant)
            and basis.weather.heating_design_f is not None and basis.weather.heating_design_f < 5):
        variant_id = "cold_climate"  # below 5 F design a standard unit leans on strips all winter
    v = k.variant(variant_id) if k.variants else None
    if k.variants and v is None:
        v = k.variants[0]
    design_f = float(basis.weather.heating_design_f)
    size = 1.0
    sizing = None
    if c.kind == "heat_pump":
        sizing = heat_pump_selection(plan, basis, v.id if v else None)
        size = sizing.nominal_tons
        if opt and opt.size:
            size = opt.size
            sizing = with_size(sizing, size * BTUH_PER_TON, "the size you chose")
    elif opt and opt.size:
        size = opt.size
    elif c.kind == "solar":
        size = solar_size_kw(plan, electrified_kwh, specific_yield)
    elif c.kind == "battery":
        size = performance()["battery_default_kwh"]
    elif c.kind == "roof":
        size = roof_area_ft2(plan)
    backup_kw, backup_kind = 0.0, ""
    kept = dual_fuel_backup(plan) if c.kind == "heat_pump" else None
    if kept is not None:
        backup_kind = "existing"
    elif c.kind == "heat_pump":
        backup_kw, backup_kind = heat_pump_backup(v.id if v else None, size, basis.design_load_btuh,
                                                  design_f)
    own_kw = float(v.strips_kw or 0.0) if v else 0.0
    level = plan.prices.cost_level
    if opt and opt.cost_usd is not None:
        cost = opt.cost_usd
        who = ", ".join(x for x in (opt.contractor, str(opt.quote_date) if opt.quote_date else None) if x)
        source = f"your quote ({who})" if who else "your quote"
        quoted = True
    else:
        per = k.cost.level(level)
        units = size if k.cost.per in ("ton", "kw", "kwh", "ft2") else 1.0
        cost = per * units * (v.cost_factor if v else 1.0)
        source = f"catalog {level} estimate: {k.cost.source}"
        quoted = False
    label = v.label if v else ""
    if kept is not None:
        label += f", keeping the {appliance_fuel(kept)} {kept.kind} as backup"
    elif backup_kw > own_kw:  # backup the variant does not bring: its cost and its name
        p = performance()
        per_kw = p["hp_backup_heaters_usd_per_kw" if backup_kind == "heaters" else "hp_backup_strips_usd_per_kw"]
        if not quoted:
            cost += (backup_kw - own_kw) * per_kw
        what = "electric heaters" if backup_kind == "heaters" else "backup electric heat"
        label += (f" ({backup_kw:g} kW)" if own_kw else
                  f", with {backup_kw:g} kW of {what} for the coldest hours")
    return ProjectDetail(
        candidate=c, variant=v.id if v else None, variant_label=label,
        size=float(size), size_unit=k.size_unit, cost_today_usd=float(round(cost, 2)),
        cost_source=source, life_years=k.life_years, cost_change=dict(k.cost_change), quoted=quoted,
        backup_kw=float(backup_kw), backup_kind=backup_kind, sizing=sizing,
    )


def with_variant(d: ProjectDetail, plan: Plan, basis: HomeBasis, variant: str) -> ProjectDetail:
    """The same project with another variant (a lower-power one chosen by the capacity remedy)."""
    c = replace(d.candidate, variant=variant)
    if plan.options.get(d.id) and plan.options[d.id].variant:
        return d  # the user chose the equipment; the remedy must work around it
    return detail(plan, c, basis, 0.0, 1.0) if d.kind not in ("solar",) else d


def replaced_fuels(plan: Plan, c: Candidate) -> set[str]:
    keys = set(c.replaces)
    return {appliance_fuel(a) for a in plan.appliances if a.key in keys}


def cost_in_year_usd(d: ProjectDetail, plan: Plan, year: int) -> float:
    """Installed cost of a project in ``year``: today's cost changed by inflation or its learning
    curve (see :mod:`homeplan.money.costs`)."""
    trend = cost_trend_from_record(d.cost_change, plan.prices.inflation_pct)
    return grow_cost(d.cost_today_usd, plan.first_year, year, trend)
