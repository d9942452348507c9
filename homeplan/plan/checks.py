"""Rules across fields that a plan must follow, each reported at the key that breaks it.

These run after the file has the right shape (plan/model.py) and before anything is computed,
so `homeplan check` catches them too.
"""

from __future__ import annotations

from homeplan.plan.model import Plan

__all__ = ["FUELS_BY_KIND", "UNMODELLED_FUELS", "rule_problems"]

FUELS_BY_KIND = {
    "furnace": {"gas", "propane", "oil", "electric", "wood"},
    "boiler": {"gas", "propane", "oil", "electric", "wood"},
    "water_heater": {"gas", "propane", "oil", "electric"},
    "range": {"gas", "propane", "electric"},
    "cooktop": {"gas", "propane", "electric"},
    "wall_oven": {"gas", "propane", "electric"},
    "dryer": {"gas", "propane", "electric"},
    "central_ac": {"electric"},
    "room_ac": {"electric"},
    "heat_pump": {"electric"},
    "mini_split": {"electric"},
    "baseboard": {"electric"},
}


UNMODELLED_FUELS = frozenset({"wood"})
"""Fuels the file format knows but the energy model does not (no price, no bills)."""


def rule_problems(plan: Plan) -> list[tuple[tuple, str, str]]:
    """(location, what is wrong, how to fix) for every broken rule."""
    out: list[tuple[tuple, str, str]] = []
    first = plan.first_year
    for i, a in enumerate(plan.appliances):
        if a.fuel and a.fuel not in FUELS_BY_KIND[a.kind]:
            out.append((("appliances", i, "fuel"), f"a {a.kind.replace('_', ' ')} does not burn {a.fuel}",
                        f"use one of {', '.join(sorted(FUELS_BY_KIND[a.kind]))}"))
        elif a.fuel in UNMODELLED_FUELS:
            out.append((("appliances", i, "fuel"), f"homeplan cannot model {a.fuel} heating yet (it has no "
                        f"prices or bills for {a.fuel})", "leave a wood stove or furnace out of the plan; "
                        "list the heating that the household pays for"))
        for old, new in (("seer", "seer2"), ("hspf", "hspf2"), ("eer", "eer2")):
            if getattr(a, old) is not None and getattr(a, new) is not None:
                out.append((("appliances", i, old), f"both {old} (a pre-2023 rating) and {new} are given",
                            f"give the one on the equipment's label: {new} from 2023, {old} before"))
        if a.year_installed is not None and a.year_installed > first:
            out.append((("appliances", i, "year_installed"),
                        f"installed in {a.year_installed}, after the plan's first year {first}",
                        "give the year it was installed"))
    for i, v in enumerate(plan.vehicles):
        start = v.year_acquired or v.model_year
        if v.year_acquired is not None and v.year_acquired > first:
            out.append((("vehicles", i, "year_acquired"), f"acquired in {v.year_acquired}, after {first}",
                        "vehicles in the plan are the ones the household has today"))
        if v.replace_year is not None and start is not None and v.replace_year < start:
            out.append((("vehicles", i, "replace_year"),
                        f"replace_year {v.replace_year} is before the car was acquired ({start})",
                        "give the year the household plans to replace it"))
        if v.fuel == "electric" and v.mpg is not None:
            out.append((("vehicles", i, "mpg"), "an electric vehicle has no mpg", "give kwh_per_mile instead"))
    h = plan.home
    for key, item in (("roof", h.roof), ("solar", h.solar), ("battery", h.battery)):
        year = getattr(item, "year_installed", None) if item is not None else None
        if year is not None and year > first:
            out.append((("home", key, "year_installed"), f"installed in {year}, after {first}",
                        "describe what the home has today; planned work goes in options or choices"))
    if h.year_built is not None and h.year_built > first:
        out.append((("home", "year_built"), f"built in {h.year_built}, after {first}", "check the year"))
    return out
