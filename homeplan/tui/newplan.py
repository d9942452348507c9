"""Turn the answers of the guided new-plan form into plan file text (no Textual here).

The form asks what a homeowner knows without opening a manual; everything else is left to the
catalog defaults. The text is validated by the normal loader before it is written.
"""

from __future__ import annotations

import json
from collections.abc import Mapping
from typing import Any

from homeplan.plan.model import FORMAT_VERSION

__all__ = ["FUEL_CHOICES", "HEATING", "SERVICE_AMPS", "new_plan_text"]

HEATING = {
    "gas_furnace": ("furnace", "gas", "Gas furnace"),
    "propane_furnace": ("furnace", "propane", "Propane furnace"),
    "oil_furnace": ("furnace", "oil", "Oil furnace"),
    "gas_boiler": ("boiler", "gas", "Gas boiler"),
    "oil_boiler": ("boiler", "oil", "Oil boiler"),
    "baseboard": ("baseboard", "electric", "Electric baseboard"),
    "heat_pump": ("heat_pump", "electric", "Heat pump"),
}
FUEL_CHOICES = {"gas": "Natural gas", "propane": "Propane", "oil": "Heating oil",
                "electric": "Electric"}
SERVICE_AMPS = (60, 100, 125, 150, 200, 400)


def _q(value: Any) -> str:
    """A YAML scalar; strings are quoted (JSON strings are valid YAML)."""
    if isinstance(value, str):
        return json.dumps(value, ensure_ascii=False)
    if isinstance(value, bool):
        return "true" if value else "false"
    return str(value)


def new_plan_text(a: Mapping[str, Any]) -> str:
    """Plan file text from the form's answers (keys as in ``NEW_PLAN_FIELDS`` of the app)."""
    lines = ["# Plan written by homeplan's new-plan form. Edit it in the app or by hand;",
             "# anything not given here comes from the built-in catalog defaults.",
             f"format_version: {FORMAT_VERSION}", "home:"]
    if a.get("name"):
        lines.append(f"  name: {_q(a['name'])}")
    loc = [f"latitude: {a['latitude']}", f"longitude: {a['longitude']}"]
    if a.get("place"):
        loc.append(f"place: {_q(a['place'])}")
    lines.append("  location: {" + ", ".join(loc) + "}")
    lines.append(f"  floor_area_ft2: {a['floor_area_ft2']}")
    if a.get("year_built"):
        lines.append(f"  year_built: {a['year_built']}")
    lines.append(f"  occupants: {a.get('occupants') or 3}")
    lines.append("  electrical:")
    lines.append(f"    service_amps: {a['service_amps']}")
    lines.append("appliances:")
    kind, fuel, _ = HEATING[a["heating"]]
    heat = f"  - {{id: heating, kind: {kind}, fuel: {fuel}"
    if a.get("heating_year"):
        heat += f", year_installed: {a['heating_year']}"
    lines.append(heat + "}")
    if a.get("central_ac") and kind != "heat_pump":
        lines.append("  - {id: ac, kind: central_ac}")
    wh = f"  - {{id: water_heater, kind: water_heater, fuel: {a['water_heater_fuel']}"
    if a.get("water_heater_year"):
        wh += f", year_installed: {a['water_heater_year']}"
    lines.append(wh + "}")
    lines.append(f"  - {{id: range, kind: range, fuel: {a['range_fuel']}}}")
    if a.get("dryer_fuel") and a["dryer_fuel"] != "none":
        lines.append(f"  - {{id: dryer, kind: dryer, fuel: {a['dryer_fuel']}}}")
    cars = int(a.get("cars") or 0)
    if cars:
        lines.append("vehicles:")
        for i in range(cars):
            lines.append(f"  - {{id: car{i + 1}, fuel: gasoline, mpg: {a.get('mpg') or 28}, "
                         f"miles_per_year: {a.get('miles_per_year') or 11000}}}")
    lines.append("budget:")
    lines.append(f"  usd_per_year: {a['usd_per_year']}")
    if a.get("first_year"):
        lines.append(f"  first_year: {a['first_year']}")
    lines.append(f"  horizon_years: {a.get('horizon_years') or 10}")
    return "\n".join(lines) + "\n"
