"""An invented demo community: many homes with a stated mix, reproducible from a seed.

Everything is invented: the four towns of the invented region of Lakeshire (their climate
numbers resemble real US climates, named in ``data/community_towns.csv``), the households, their
homes and their cars. The mix of ages, fuels, panels, roofs, incomes and cars is written in
``data/community_mix.csv`` (one row per choice with its share, and the condition it depends on:
the heating follows the town, the panel follows the age, the water heater follows the heating
fuel...). The same seed and number of homes give the same file on every machine (Python's
``random.Random``, whose sequence is stable across versions for ``random()``).

:func:`community_rows` gives the rows; :func:`write_community` writes ``homes.csv`` (one row per
home, columns naming keys of the template plan, see :mod:`homeplan.portfolio.inputs`) and the
template beside it.
"""

from __future__ import annotations

import csv
import io
import random
from collections.abc import Iterator
from dataclasses import dataclass
from functools import cache
from pathlib import Path

from homeplan.plan.save import write_atomic

__all__ = [
    "COLUMNS",
    "DEMO_HOMES",
    "DEMO_SEED",
    "FIRST_YEAR",
    "MixRow",
    "Town",
    "community_csv",
    "community_rows",
    "mix",
    "template_text",
    "towns",
    "write_community",
]

DATA = Path(__file__).with_name("data")
DEMO_SEED = 2027
DEMO_HOMES = 1000
FIRST_YEAR = 2027
NOW_YEAR = FIRST_YEAR - 1  # ages are counted back from the year before the plans start


@dataclass(frozen=True)
class Town:
    """An invented town: where it is, its climate numbers, its energy prices, its share of homes."""

    town: str
    place: str
    latitude: float
    longitude: float
    elevation_ft: float
    timezone: str
    hdd65: float
    cdd65: float
    heating_design_f: float
    cooling_design_f: float
    cloudiness: float
    electricity_usd_per_kwh: float
    gas_usd_per_therm: float
    propane_usd_per_gal: float
    oil_usd_per_gal: float
    share: float
    source: str


@dataclass(frozen=True)
class MixRow:
    """One choice of the mix: ``attribute`` takes ``value`` with ``share`` among the rows whose
    condition ``given`` (``key=value`` or empty) holds."""

    attribute: str
    given: str
    value: str
    share: float
    source: str


@cache
def towns() -> tuple[Town, ...]:
    """The invented towns (``data/community_towns.csv``)."""
    with (DATA / "community_towns.csv").open(encoding="utf-8", newline="") as fh:
        rows = list(csv.DictReader(fh))
    text = {"town", "place", "timezone", "source"}
    return tuple(Town(**{k: (v if k in text else float(v)) for k, v in r.items()}) for r in rows)


@cache
def mix() -> tuple[MixRow, ...]:
    """The stated mix of the community (``data/community_mix.csv``)."""
    with (DATA / "community_mix.csv").open(encoding="utf-8", newline="") as fh:
        return tuple(MixRow(r["attribute"], r["given"], r["value"], float(r["share"]), r["source"])
                     for r in csv.DictReader(fh))


def _pick(rng: random.Random, attribute: str, given: str = "") -> str:
    rows = [r for r in mix() if r.attribute == attribute and r.given == given]
    if not rows:
        raise KeyError(f"the community mix has no rows for {attribute} given {given!r}")
    x = rng.random() * sum(r.share for r in rows)
    for r in rows:
        x -= r.share
        if x < 0:
            return r.value
    return rows[-1].value


def _range(rng: random.Random, text: str, whole: bool = True) -> float:
    lo, hi = (float(v) for v in text.split("-"))
    v = lo + (hi - lo) * rng.random()
    return float(round(v)) if whole else round(v, 1)


HEATING = {  # option -> (kind, fuel, has ducts)
    "gas_furnace": ("furnace", "gas", True),
    "gas_boiler": ("boiler", "gas", False),
    "propane_furnace": ("furnace", "propane", True),
    "oil_boiler": ("boiler", "oil", False),
    "baseboard": ("baseboard", "electric", False),
    "heat_pump": ("heat_pump", "electric", True),
    "mini_split": ("mini_split", "electric", False),
}

COLUMNS = (
    "id", "home.name", "home.location.place", "home.location.latitude", "home.location.longitude",
    "home.location.elevation_ft", "home.location.timezone", "home.climate.hdd65", "home.climate.cdd65",
    "home.climate.heating_design_f", "home.climate.cooling_design_f", "home.climate.cloudiness",
    "home.year_built", "home.floor_area_ft2", "home.stories", "home.occupants", "home.envelope",
    "home.has_ducts", "home.electrical.service_amps", "home.electrical.free_spaces",
    "home.roof", "home.roof.year_installed", "home.roof.material", "home.roof.usable_area_ft2",
    "home.roof.tilt_deg", "home.roof.azimuth_deg",
    "appliances.heating.kind", "appliances.heating.fuel", "appliances.heating.year_installed",
    "appliances.cooling", "appliances.cooling.kind", "appliances.cooling.year_installed",
    "appliances.water_heater.fuel", "appliances.water_heater.year_installed",
    "appliances.range.fuel", "appliances.range.year_installed",
    "appliances.dryer", "appliances.dryer.fuel", "appliances.dryer.year_installed",
    "vehicles.car1", "vehicles.car1.fuel", "vehicles.car1.body", "vehicles.car1.mpg",
    "vehicles.car1.miles_per_year", "vehicles.car1.model_year",
    "vehicles.car2", "vehicles.car2.fuel", "vehicles.car2.body", "vehicles.car2.mpg",
    "vehicles.car2.miles_per_year", "vehicles.car2.model_year",
    "household.ami_pct", "household.federal_tax_liability_usd",
    "prices.electricity.usd_per_kwh", "prices.gas.usd_per_therm", "prices.propane.usd_per_gal",
    "prices.oil.usd_per_gal", "budget.usd_per_year",
)
"""The columns of ``homes.csv``: the home's id, then paths of keys of the template plan."""


def _installed(rng: random.Random, attribute: str, built: int) -> int:
    return max(built, NOW_YEAR - int(_range(rng, _pick(rng, attribute))))


def _fmt(v: float) -> str:
    return str(int(v)) if float(v).is_integer() else f"{v:g}"


def _home(rng: random.Random, n: int) -> dict[str, str]:
    """One invented home as the cells of its row (empty: the template's value)."""
    row = dict.fromkeys(COLUMNS, "")
    t = {x.town: x for x in towns()}[_pick_town(rng)]
    band = _pick(rng, "built")
    built = int(_range(rng, band))
    row.update({
        "id": f"h{n:05d}", "home.name": f"Demo home {n} (invented)", "home.location.place": t.place,
        "home.location.latitude": _fmt(t.latitude), "home.location.longitude": _fmt(t.longitude),
        "home.location.elevation_ft": _fmt(t.elevation_ft), "home.location.timezone": t.timezone,
        "home.climate.hdd65": _fmt(t.hdd65), "home.climate.cdd65": _fmt(t.cdd65),
        "home.climate.heating_design_f": _fmt(t.heating_design_f),
        "home.climate.cooling_design_f": _fmt(t.cooling_design_f),
        "home.climate.cloudiness": _fmt(t.cloudiness),
        "home.year_built": str(built),
        "home.floor_area_ft2": _fmt(_range(rng, _pick(rng, "floor_area_ft2", f"built={band}"))),
        "home.stories": _pick(rng, "stories"), "home.occupants": _pick(rng, "occupants"),
        "home.envelope": _pick(rng, "envelope", f"built={band}"),
        "home.electrical.service_amps": _pick(rng, "service_amps", f"built={band}"),
        "home.electrical.free_spaces": _pick(rng, "free_spaces"),
        "prices.electricity.usd_per_kwh": _fmt(t.electricity_usd_per_kwh),
        "prices.gas.usd_per_therm": _fmt(t.gas_usd_per_therm),
        "prices.propane.usd_per_gal": _fmt(t.propane_usd_per_gal),
        "prices.oil.usd_per_gal": _fmt(t.oil_usd_per_gal),
    })
    if _pick(rng, "roof") == "none":
        row["home.roof"] = "none"
    else:
        row.update({
            "home.roof.year_installed": str(_installed(rng, "roof_age_years", built)),
            "home.roof.material": _pick(rng, "roof_material"),
            "home.roof.usable_area_ft2": _fmt(_range(rng, _pick(rng, "roof_usable_area_ft2"))),
            "home.roof.tilt_deg": _pick(rng, "roof_tilt_deg"),
            "home.roof.azimuth_deg": _pick(rng, "roof_azimuth_deg"),
        })
    kind, fuel, ducts = HEATING[_pick(rng, "heating", f"town={t.town}")]
    row.update({"appliances.heating.kind": kind, "appliances.heating.fuel": fuel,
                "appliances.heating.year_installed": str(_installed(rng, "heating_age_years", built)),
                "home.has_ducts": "true" if ducts else "false"})
    cooling = "none" if kind == "heat_pump" else _pick(rng, "cooling", f"ducts={'yes' if ducts else 'no'}")
    if cooling == "none":
        row["appliances.cooling"] = "none"
    else:
        row["appliances.cooling.kind"] = cooling
        row["appliances.cooling.year_installed"] = str(_installed(rng, "cooling_age_years", built))
    row["appliances.water_heater.fuel"] = _pick(rng, "water_heater", f"fuel={fuel}")
    row["appliances.water_heater.year_installed"] = str(_installed(rng, "water_heater_age_years", built))
    row["appliances.range.fuel"] = _pick(rng, "range", f"fuel={fuel}")
    row["appliances.range.year_installed"] = str(_installed(rng, "range_age_years", built))
    dryer = _pick(rng, "dryer", f"fuel={fuel}")
    if dryer == "none":
        row["appliances.dryer"] = "none"
    else:
        row["appliances.dryer.fuel"] = dryer
        row["appliances.dryer.year_installed"] = str(_installed(rng, "dryer_age_years", built))
    cars = int(_pick(rng, "cars"))
    for i in (1, 2):
        key = f"vehicles.car{i}"
        if i > cars:
            row[key] = "none"
            continue
        car_fuel = _pick(rng, "car_fuel")
        body = _pick(rng, "car_body")
        row.update({f"{key}.fuel": car_fuel, f"{key}.body": body,
                    f"{key}.miles_per_year": _fmt(_range(rng, _pick(rng, "car_miles_per_year"))),
                    f"{key}.model_year": str(NOW_YEAR - int(_range(rng, _pick(rng, "car_age_years"))))})
        mpg = _range(rng, _pick(rng, "car_mpg", f"body={body}"))
        if car_fuel != "electric":
            row[f"{key}.mpg"] = _fmt(mpg * (1.4 if car_fuel == "hybrid" else 1.0))
    ami_band = _pick(rng, "ami_pct")
    row["household.ami_pct"] = _fmt(_range(rng, ami_band))
    row["household.federal_tax_liability_usd"] = _fmt(
        round(_range(rng, _pick(rng, "federal_tax_liability_usd", f"ami={ami_band}")), -1))
    row["budget.usd_per_year"] = _fmt(round(_range(rng, _pick(rng, "budget_usd_per_year", f"ami={ami_band}")), -2))
    return row


def _pick_town(rng: random.Random) -> str:
    ts = towns()
    x = rng.random() * sum(t.share for t in ts)
    for t in ts:
        x -= t.share
        if x < 0:
            return t.town
    return ts[-1].town


def community_rows(homes: int = DEMO_HOMES, seed: int = DEMO_SEED) -> Iterator[dict[str, str]]:
    """The community's homes, one row (column -> cell) each; the same for the same arguments."""
    rng = random.Random(seed)
    for n in range(1, homes + 1):
        yield _home(rng, n)


def community_csv(homes: int = DEMO_HOMES, seed: int = DEMO_SEED) -> str:
    """``homes.csv`` as text."""
    buf = io.StringIO()
    w = csv.DictWriter(buf, fieldnames=COLUMNS, lineterminator="\n")
    w.writeheader()
    for row in community_rows(homes, seed):
        w.writerow(row)
    return buf.getvalue()


def template_text(incentive_file: str | None = None) -> str:
    """The template plan: what every home of the community has unless its row says otherwise;
    ``incentive_file`` (relative to the template) names a catalog of incentive programs."""
    programs = (f"# Invented demo incentive programs (see the file's header).\n"
                f"incentive_files: [{incentive_file}]\n") if incentive_file else ""
    return f"""\
# Template plan of the invented demo community (made by `homeplan community`). Everything is
# invented. Each row of homes.csv names keys of this plan and overrides them; a cell left empty
# keeps the value here, 'none' removes the key or item.
format_version: 1
provenance:
  prepared_by: homeplan demo community generator
  notes: Invented homes for trying the portfolio command; not real households.
home:
  name: Demo home (invented)
  location: {{latitude: 44.95, longitude: -93.25}}
  climate: {{hdd65: 7500, cdd65: 750, heating_design_f: -10, cooling_design_f: 89}}
  floor_area_ft2: 1800
  year_built: 1970
  occupants: 3
  electrical: {{service_amps: 100, free_spaces: 2, code_edition: 2023}}
  roof: {{year_installed: 2010, material: asphalt_shingle, usable_area_ft2: 400, tilt_deg: 22.6, azimuth_deg: 180}}
appliances:
  - {{id: heating, kind: furnace, fuel: gas, year_installed: 2010}}
  - {{id: cooling, kind: central_ac, year_installed: 2012}}
  - {{id: water_heater, kind: water_heater, fuel: gas, type: storage, year_installed: 2016}}
  - {{id: range, kind: range, fuel: gas, year_installed: 2014}}
  - {{id: dryer, kind: dryer, fuel: electric, year_installed: 2016}}
vehicles:
  - {{id: car1, fuel: gasoline, miles_per_year: 11000}}
  - {{id: car2, fuel: gasoline, miles_per_year: 9000}}
household: {{ami_pct: 100, federal_tax_liability_usd: 4000}}
prices:
  electricity: {{usd_per_kwh: 0.15, fixed_usd_per_month: 12, export: net_metering}}
  gas: {{usd_per_therm: 1.3, fixed_usd_per_month: 14}}
  gasoline: {{usd_per_gal: 3.1}}
{programs}budget: {{usd_per_year: 8000, first_year: {FIRST_YEAR}, horizon_years: 10, carryover: true}}
choices: {{objective: npv}}
"""


def write_community(folder: str | Path, homes: int = DEMO_HOMES, seed: int = DEMO_SEED,
                    incentive_file: str | None = None) -> tuple[Path, Path]:
    """Write ``homes.csv`` and ``template.yaml`` into ``folder`` (atomically; earlier files kept
    as ``.bak``). Returns their paths."""
    folder = Path(folder)
    csv_path = write_atomic(folder / "homes.csv", community_csv(homes, seed))
    template = write_atomic(folder / "template.yaml", template_text(incentive_file))
    return csv_path, template
