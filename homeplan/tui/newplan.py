"""Turn the answers of the guided new-plan form into plan file text (no Textual here).

The form asks what a homeowner knows without opening a manual - where the home is, its heating,
water heater, stove and dryer, cars by name, bills if at hand, the roof, the panel's free
spaces, an income band - and leaves everything else to the catalog defaults. Before anything is
written the location is checked against the time zone (a longitude whose sign was forgotten
puts a Minnesota house in China), and the text is validated by the normal loader.

References
----------
IANA time zone database (Python ``zoneinfo``) for each zone's offset from UTC; mean solar time
moves 15 degrees of longitude per hour (360 degrees in 24 hours).
"""

from __future__ import annotations

import datetime as dt
import json
import re
from collections.abc import Mapping
from typing import Any
from zoneinfo import ZoneInfo, ZoneInfoNotFoundError

from homeplan import catalog
from homeplan.plan.model import FORMAT_VERSION

__all__ = [
    "FUEL_CHOICES",
    "HEATING",
    "INCOME_BANDS",
    "ROOF_FACING",
    "SERVICE_AMPS",
    "TIME_ZONES",
    "car_entries",
    "location_problem",
    "new_plan_text",
    "place_choices",
    "resolve_location",
]

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

TIME_ZONES: tuple[tuple[str, str], ...] = (
    ("Eastern (New York)", "America/New_York"),
    ("Central (Chicago)", "America/Chicago"),
    ("Mountain (Denver)", "America/Denver"),
    ("Arizona (Phoenix)", "America/Phoenix"),
    ("Pacific (Los Angeles)", "America/Los_Angeles"),
    ("Alaska (Anchorage)", "America/Anchorage"),
    ("Hawaii (Honolulu)", "Pacific/Honolulu"),
    ("Atlantic (Halifax)", "America/Halifax"),
)
"""Time zones of the homes homeplan plans for (US prices and the US electrical code); all are
north of the equator and west of Greenwich."""

INCOME_BANDS: tuple[tuple[str, str], ...] = (
    ("Not sure, or rather not say", ""),
    ("Below 80 % of the area's median", "70"),
    ("80 to 120 % of the median", "100"),
    ("120 to 150 % of the median", "135"),
    ("Above 150 % of the median", "200"),
)
"""Household income bands (the thresholds many programs use) and the value written for each:
a value inside the band, not the household's own figure."""

ROOF_FACING: tuple[tuple[str, str], ...] = (
    ("No roof for panels, or not sure", ""), ("South", "180"), ("South-west", "225"),
    ("South-east", "135"), ("West", "270"), ("East", "90"),
)
"""Which way the roof's best side faces, as the compass bearing in degrees ("" for none)."""

# Mean solar time: 15 degrees of longitude per hour; a zone's homes lie within about two hours of
# its meridian (common practice, no source: zones follow borders, not meridians).
_DEG_PER_HOUR = 15.0
_ZONE_SLACK_DEG = 35.0


def place_choices() -> tuple[tuple[str, str], ...]:
    """("Minneapolis MN (44.98, -93.27)", "Minneapolis MN") for each reference city, after
    "type the coordinates"."""
    cities = tuple((f"{c.name} ({c.latitude:.2f}, {c.longitude:.2f})", c.name)
                   for c in catalog.reference_climates())
    return (("None: I will type the coordinates", ""), *cities)


def resolve_location(a: Mapping[str, Any]) -> tuple[float | None, float | None]:
    """The latitude and longitude typed, or those of the chosen city when none were typed."""
    lat, lon = a.get("latitude"), a.get("longitude")
    city = a.get("near")
    if (lat is None or lon is None) and city:
        c = next((c for c in catalog.reference_climates() if c.name == city), None)
        if c is not None:
            return (lat if lat is not None else c.latitude, lon if lon is not None else c.longitude)
    return lat, lon


def location_problem(latitude: float | None, longitude: float | None, timezone: str | None) -> str | None:
    """What is wrong with a location given its time zone, in words (None when it is plausible).

    Catches a latitude south of the equator and a longitude east of Greenwich (a forgotten minus
    sign), and a longitude hours away from the zone's meridian.
    """
    if latitude is None or longitude is None:
        return ("give the latitude and longitude (a map app shows them), or choose the nearest "
                "city")
    if not -90 <= latitude <= 90 or not -180 <= longitude <= 180:
        return "latitude goes from -90 to 90 and longitude from -180 to 180"
    if not timezone:
        return None
    try:
        offset = dt.datetime(2025, 1, 15, tzinfo=ZoneInfo(timezone)).utcoffset()
    except (ZoneInfoNotFoundError, ValueError):
        return f"unknown time zone {timezone}"
    hours = offset.total_seconds() / 3600 if offset is not None else 0.0
    meridian = hours * _DEG_PER_HOUR
    zone = next((label for label, key in TIME_ZONES if key == timezone), timezone)
    if timezone in dict((k, v) for v, k in TIME_ZONES) and latitude < 0:
        return (f"a latitude of {latitude:g} is south of the equator, but the {zone} time zone is "
                f"in North America: did you mean {-latitude:g}?")
    if abs(longitude - meridian) > _ZONE_SLACK_DEG:
        if abs(-longitude - meridian) <= _ZONE_SLACK_DEG:
            return (f"a longitude of {longitude:g} is east of Greenwich (Asia, for this latitude), "
                    f"but the {zone} time zone is west of it: did you mean {-longitude:g}?")
        return (f"a longitude of {longitude:g} is far from the {zone} time zone (its homes are "
                f"near {meridian:g}): check the longitude or the time zone")
    return None


def _slug(name: str) -> str:
    s = re.sub(r"[^a-z0-9]+", "_", name.lower()).strip("_")
    return s if s and s[0].isalpha() else f"car_{s}".rstrip("_")


def car_entries(text: str | None) -> list[tuple[str, str]]:
    """(id, name) for each car named in "Blue sedan, Work truck" (ids made unique)."""
    out: list[tuple[str, str]] = []
    for name in (n.strip() for n in (text or "").split(",")):
        if not name:
            continue
        key, n = _slug(name), 2
        while any(key == k for k, _ in out):
            key, n = f"{_slug(name)}_{n}", n + 1
        out.append((key, name))
    return out


def _q(value: Any) -> str:
    """A YAML scalar; strings are quoted (JSON strings are valid YAML)."""
    if isinstance(value, str):
        return json.dumps(value, ensure_ascii=False)
    if isinstance(value, bool):
        return "true" if value else "false"
    return str(value)


def _flow(items: Mapping[str, Any]) -> str:
    return "{" + ", ".join(f"{k}: {_q(v)}" for k, v in items.items() if v is not None) + "}"


def new_plan_text(a: Mapping[str, Any]) -> str:
    """Plan file text from the form's answers (keys as in ``new_plan_fields`` of the app)."""
    lines = ["# Plan written by homeplan's new-plan form. Edit it in the app or by hand;",
             "# anything not given here comes from the built-in catalog defaults.",
             f"format_version: {FORMAT_VERSION}", "home:"]
    if a.get("name"):
        lines.append(f"  name: {_q(a['name'])}")
    lat, lon = resolve_location(a)
    place = a.get("place") or a.get("near") or None
    lines.append("  location: " + _flow({"latitude": lat, "longitude": lon,
                                          "timezone": a.get("timezone"), "place": place}))
    lines.append(f"  floor_area_ft2: {a['floor_area_ft2']}")
    if a.get("year_built"):
        lines.append(f"  year_built: {a['year_built']}")
    lines.append(f"  occupants: {a.get('occupants') or 3}")
    lines.append("  electrical:")
    lines.append(f"    service_amps: {a['service_amps']}")
    if a.get("free_spaces") is not None:
        lines.append(f"    free_spaces: {a['free_spaces']}")
    if a.get("roof_facing"):
        lines.append("  roof: " + _flow({"year_installed": a.get("roof_year"),
                                          "usable_area_ft2": a.get("roof_area_ft2"),
                                          "azimuth_deg": float(a["roof_facing"])}))
    lines.append("appliances:")
    kind, fuel, _ = HEATING[a["heating"]]
    lines.append("  - " + _flow({"id": "heating", "kind": kind, "fuel": fuel,
                                  "year_installed": a.get("heating_year")}))
    if a.get("central_ac") and kind != "heat_pump":
        lines.append("  - {id: ac, kind: central_ac}")
    lines.append("  - " + _flow({"id": "water_heater", "kind": "water_heater",
                                  "fuel": a["water_heater_fuel"],
                                  "year_installed": a.get("water_heater_year")}))
    lines.append(f"  - {{id: range, kind: range, fuel: {a['range_fuel']}}}")
    if a.get("dryer_fuel") and a["dryer_fuel"] != "none":
        lines.append(f"  - {{id: dryer, kind: dryer, fuel: {a['dryer_fuel']}}}")
    cars = car_entries(a.get("cars"))
    if cars:
        lines.append("vehicles:")
        for key, name in cars:
            lines.append("  - " + _flow({"id": key, "name": name, "fuel": "gasoline",
                                          "mpg": a.get("mpg") or 28,
                                          "miles_per_year": a.get("miles_per_year") or 11000}))
    usage = {}
    if a.get("annual_kwh") is not None:
        usage["electricity"] = {"annual_kwh": a["annual_kwh"]}
    if a.get("annual_therms") is not None:
        usage["gas"] = {"annual_therms": a["annual_therms"]}
    if a.get("annual_gal") is not None and fuel in ("propane", "oil"):
        usage[fuel] = {"annual_gal": a["annual_gal"]}
    if usage:
        lines.append("usage:  # a year of bills")
        lines += [f"  {k}: {_flow(v)}" for k, v in usage.items()]
    if a.get("ami_pct"):
        band = next((label for label, v in INCOME_BANDS if v == a["ami_pct"]), "")
        lines.append("household:")
        lines.append(f"  ami_pct: {a['ami_pct']}  # a value inside the band chosen: {band.lower()}")
    lines.append("budget:")
    lines.append(f"  usd_per_year: {a['usd_per_year']}")
    if a.get("first_year"):
        lines.append(f"  first_year: {a['first_year']}")
    lines.append(f"  horizon_years: {a.get('horizon_years') or 10}")
    return "\n".join(lines) + "\n"
