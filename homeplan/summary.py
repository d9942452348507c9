"""A few lines describing a plan, for `homeplan check` and the top of printouts."""

from __future__ import annotations

from homeplan import graph as graph_mod
from homeplan import lifecycle
from homeplan.plan.model import Plan
from homeplan.report.table import usd
from homeplan.units import display_area, display_temp


def plan_summary(plan: Plan, g=None) -> str:
    h = plan.home
    units = plan.display.units
    where = (h.location.place if h.location and h.location.place else
             f"{h.location.latitude:.2f}, {h.location.longitude:.2f}" if h.location else "climate given")
    lines = [f"  home:       {h.name or 'unnamed'} - {display_area(h.floor_area_ft2, units)}, {where}"]
    c = h.climate
    if c.heating_design_f is not None or c.hdd65 is not None:
        parts = []
        if c.hdd65 is not None:
            parts.append(f"HDD65 {c.hdd65:,.0f}")
        if c.heating_design_f is not None:
            parts.append(f"heating design {display_temp(c.heating_design_f, units)}")
        lines.append(f"  climate:    {', '.join(parts)}")
    e = h.electrical
    lines.append(f"  service:    {e.service_amps} A, busbar {e.busbar_amps or e.service_amps} A, "
                 f"main {e.main_breaker_amps or e.service_amps} A")
    outs = {o.key: o for o in lifecycle.plan_outlooks(plan)}
    for a in plan.appliances:
        o = outs[a.key]
        age = f"{o.age_years:.0f} yr" + (" (assumed)" if o.install_year_assumed else "")
        lines.append(f"  appliance:  {a.key}: {o.label}, {age}, likely end {o.expected_end_year}")
    for i, v in enumerate(plan.vehicles):
        distance = (f"{v.miles_per_year * 1.609344:,.0f} km/yr" if units == "si"
                    else f"{v.miles_per_year:,.0f} mi/yr")
        lines.append(f"  vehicle:    {plan.vehicle_key(i)}: {v.name or v.fuel} ({v.fuel}, {distance})")
    b = plan.budget
    lines.append(f"  budget:     {usd(b.usd_per_year)} a year from {plan.first_year} for "
                 f"{b.horizon_years} years" + (", unspent money carries over" if b.carryover else ""))
    if g is not None:
        ids = graph_mod.project_nodes(g)
        lines.append(f"  upgrades:   {len(ids)} candidates: {', '.join(ids)}")
    if plan.usage is None:
        lines.append("  note:       no bills given; energy use will be estimated from floor area")
    return "\n".join(lines)
