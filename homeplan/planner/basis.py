"""The home as it is, for the energy engine: weather, heat loss, today's equipment and prices.

Everything that depends only on the home and its climate (weather year, solar geometry,
calibrated heat loss, today's equipment) is computed once into a :class:`HomeBasis`; each state
of the roadmap is then a cheap ``dataclasses.replace`` of its base
:class:`~homeplan.energy.simulate.HomeEnergySpec` (see :mod:`homeplan.planner.states`).

References
----------
ACCA Manual J / ASHRAE Fundamentals degree-day method for the heat-loss calibration (see
:mod:`homeplan.energy.calibrate`); equipment defaults in ``homeplan/data/equipment_performance.csv``.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable
from dataclasses import dataclass, replace
from pathlib import Path

from homeplan.catalog import ReferenceClimate, performance, reference_climates
from homeplan.energy import weather as wx
from homeplan.energy.appliances import (
    CookingSpec,
    DryerSpec,
)
from homeplan.energy.battery import BatterySpec
from homeplan.energy.calibrate import Calibration
from homeplan.energy.emissions import EmissionFactors
from homeplan.energy.heating import (
    CoolingSpec,
    FurnaceSpec,
    HeatingSpec,
    HeatPumpSpec,
    ResistanceHeatSpec,
)
from homeplan.energy.rates import ElectricRate, FuelPrice, FuelPrices, TouPeriod
from homeplan.energy.ratings import eer2_from_eer, hspf2_from_hspf, seer2_from_seer
from homeplan.energy.simulate import HomeEnergySpec, SiteCache, simulate
from homeplan.energy.solar import ArrayKeeper, SolarArraySpec, SolarSite
from homeplan.energy.vehicles import VehicleSpec
from homeplan.energy.water import WaterHeaterSpec
from homeplan.energy.weather import Weather
from homeplan.errors import InputError, PlanRuleError
from homeplan.plan.files import WEATHER, PlanFolder, as_folder, decode_utf8
from homeplan.plan.fuels import TANK_FUELS, appliance_fuel, engine_fuel
from homeplan.plan.model import Appliance, Plan
from homeplan.plan.text import clean
from homeplan.planner.calibration import (
    appliance_efficiency,
    first_heat_loss,
    fit_to_bills,
    heating_appliance,
)
from homeplan.planner.lifecycle import appliance_type
from homeplan.planner.peaks import PeakBasis, peak_basis
from homeplan.result.roadmap import BillFit

__all__ = [
    "BILL_YEAR_WEATHER_KEY",
    "CLIMATE_WEATHER_KEY",
    "HomeBasis",
    "appliance_efficiency",
    "electric_rate",
    "emission_factors",
    "fuel_prices",
    "home_basis",
    "load_weather",
    "nearest_reference_climate",
    "rated_eer2",
    "rated_hspf2",
    "rated_seer2",
    "rating_notes",
    "read_weather_file",
]


def nearest_reference_climate(lat: float, lon: float) -> tuple[ReferenceClimate, float]:
    """The reference climate nearest by great-circle distance (km)."""

    def km(c: ReferenceClimate) -> float:
        p1, p2 = math.radians(lat), math.radians(c.latitude)
        dl = math.radians(c.longitude - lon)
        x = math.sin((p2 - p1) / 2) ** 2 + math.cos(p1) * math.cos(p2) * math.sin(dl / 2) ** 2
        return 6371.0 * 2 * math.asin(math.sqrt(x))

    best = min(reference_climates(), key=km)
    return best, km(best)


# ------------------------------------------------------------------------------ weather


def load_weather(plan: Plan, base_dir: PlanFolder | Path | None,
                 make_year: Callable[[wx.ClimateNormals], Weather] | None = None) -> tuple[Weather, str]:
    """The weather year for the plan and a note on where it came from.

    A weather file (EPW or TMY3) wins; otherwise a deterministic typical year is generated from
    the climate numbers (by ``make_year``, default :func:`~homeplan.energy.weather.synthetic_weather`;
    a disk store passes its reader), filling gaps from the nearest reference climate (and saying so).
    """
    h = plan.home
    c = h.climate
    notes: list[str] = []
    if c.weather_file:
        w = read_weather_file(as_folder(base_dir), c.weather_file)
        if c.heating_design_f is not None or c.cooling_design_f is not None:
            w = replace(w, heating_design_f=c.heating_design_f or w.heating_design_f,
                        cooling_design_f=c.cooling_design_f or w.cooling_design_f)
        return w, f"weather file {Path(c.weather_file).name}"
    lat = h.location.latitude if h.location else None
    lon = h.location.longitude if h.location else None
    ref = None
    if lat is not None and None in (c.hdd65, c.cdd65, c.heating_design_f, c.cooling_design_f):
        ref, dist = nearest_reference_climate(lat, lon)
        notes.append(f"climate numbers not given were taken from the nearest reference climate, "
                     f"{ref.name} ({dist:,.0f} km away); add them under home.climate for accuracy")
    if lat is None:  # climate numbers given without a location: a mid-latitude US default
        lat, lon = 40.0, -95.0
        notes.append("no location given: the sun is modelled at 40 N, 95 W")

    def pick(value, attr):
        return value if value is not None else getattr(ref, attr)

    normals = wx.ClimateNormals(
        latitude_deg=lat, longitude_deg=lon,
        hdd65=pick(c.hdd65, "hdd65"), cdd65=pick(c.cdd65, "cdd65"),
        heating_design_f=pick(c.heating_design_f, "heating_design_f"),
        cooling_design_f=pick(c.cooling_design_f, "cooling_design_f"),
        cloudiness=c.cloudiness if c.cloudiness is not None else (ref.cloudiness if ref else 0.45),
        altitude_m=(h.location.elevation_ft or 0.0) * 0.3048 if h.location else 0.0,
    )
    year = (make_year or wx.synthetic_weather)(normals)
    return year, "; ".join(["built-in typical year", *notes])


# ------------------------------------------------------------------------------ equipment


def _cooling_appliance(plan: Plan) -> Appliance | None:
    for kind in ("central_ac", "heat_pump", "mini_split", "room_ac"):
        for a in plan.appliances:
            if a.kind == kind:
                return a
    return None


def rated_seer2(a: Appliance) -> float | None:
    """The appliance's SEER2: as given, or converted from a pre-2023 SEER (split-system factor,
    the default when the equipment type is not known; RESNET MINHERS Addendum 71)."""
    if a.seer2 is not None:
        return a.seer2
    return seer2_from_seer(a.seer) if a.seer is not None else None


def rated_hspf2(a: Appliance) -> float | None:
    """The heat pump's HSPF2: as given, or converted from a pre-2023 HSPF (split-system factor;
    RESNET MINHERS Addendum 71)."""
    if a.hspf2 is not None:
        return a.hspf2
    return hspf2_from_hspf(a.hspf) if a.hspf is not None else None


def rated_eer2(a: Appliance) -> float | None:
    """The appliance's EER2: as given, or converted from a pre-2023 EER (split-system factor, the
    ratio of DOE's paired 2023 standard levels; 10 CFR 430.32(c))."""
    if a.eer2 is not None:
        return a.eer2
    return eer2_from_eer(a.eer) if a.eer is not None else None


def rating_notes(plan: Plan) -> list[str]:
    """One note per pre-2023 rating converted, with the figure used."""
    out = []
    for a in plan.appliances:
        for old, new, value in (("SEER", "SEER2", rated_seer2(a)), ("HSPF", "HSPF2", rated_hspf2(a)),
                                ("EER", "EER2", rated_eer2(a))):
            given = getattr(a, old.lower())
            if given is not None and getattr(a, new.lower()) is None:
                out.append(f"the {a.key.replace('_', ' ')}'s {old} {given:g} (a pre-2023 rating) is "
                           f"counted as {new} {value:.1f} (split-system conversion)")
    return out


def existing_heat_pump(a: Appliance, design_load_btuh: float) -> HeatPumpSpec:
    """Today's heat pump: a typical single-stage unit of its size (else the design load, at least
    1.5 t) with backup strips, its COP curve scaled by its HSPF2 against a 7.5 HSPF2 unit."""
    cap = a.capacity_btuh or max(design_load_btuh, performance()["hp_min_btuh"])
    hp = HeatPumpSpec.typical("single_stage", cap, backup="resistance", seer2=rated_seer2(a) or 14.3)
    hspf_ratio = (rated_hspf2(a) or 7.5) / 7.5
    return replace(hp, cop_47=hp.cop_47 * hspf_ratio, cop_17=hp.cop_17 * hspf_ratio,
                   cop_5=max(1.0, hp.cop_5 * hspf_ratio))


def heating_spec_today(plan: Plan, design_load_btuh: float) -> HeatingSpec | None:
    a = heating_appliance(plan)
    if a is None:
        return None
    fuel = appliance_fuel(a)
    if a.kind in ("heat_pump", "mini_split"):
        return existing_heat_pump(a, design_load_btuh)
    if fuel == "electric":
        return ResistanceHeatSpec()
    return FurnaceSpec(fuel=engine_fuel(fuel), afue=appliance_efficiency(a), kind=a.kind)


def cooling_spec_today(plan: Plan) -> CoolingSpec | None:
    a = _cooling_appliance(plan)
    if a is None:
        return None
    return CoolingSpec(seer2=rated_seer2(a) or (10.0 if a.kind == "room_ac" else 13.0),
                       capacity_btuh=a.capacity_btuh, variable_speed=a.kind == "mini_split",
                       eer2=rated_eer2(a))


def water_spec_today(plan: Plan) -> WaterHeaterSpec | None:
    for a in plan.appliances:
        if a.kind == "water_heater":
            fuel = engine_fuel(appliance_fuel(a))
            kind = appliance_type(a)
            if kind == "heat_pump":
                return WaterHeaterSpec.heat_pump(a.uef or performance()["hpwh_240v_uef"])
            default_uef = {"natural_gas": 0.62, "propane": 0.62, "heating_oil": 0.55,
                           "electricity": 0.92}[fuel]  # typical UEF (from memory)
            if kind == "tankless" and fuel != "electricity":
                default_uef = 0.87
            return WaterHeaterSpec(fuel=fuel, uef=a.uef or default_uef, kind=kind or "storage")
    return None


def cooking_spec_today(plan: Plan) -> CookingSpec | None:
    for a in plan.appliances:
        if a.kind in ("range", "cooktop"):
            fuel = appliance_fuel(a)
            kind = {"gas": "natural_gas", "propane": "propane"}.get(fuel, "resistance")
            return CookingSpec(kind=kind)
    return None


def dryer_spec_today(plan: Plan) -> DryerSpec | None:
    for a in plan.appliances:
        if a.kind == "dryer":
            fuel = appliance_fuel(a)
            kind = {"gas": "natural_gas", "propane": "propane"}.get(fuel, "electric")
            if a.type == "heat_pump":
                kind = "heat_pump"
            return DryerSpec(kind=kind)
    return None


def vehicle_specs_today(plan: Plan) -> tuple[VehicleSpec, ...]:
    p = performance()
    out = []
    for v in plan.vehicles:
        if v.fuel == "electric":
            out.append(VehicleSpec(fuel="electricity", miles_per_yr=v.miles_per_year,
                                   kwh_per_mile=v.kwh_per_mile or p[f"ev_kwh_per_mile_{v.body}"]))
        else:
            default_mpg = {"car": 28.0, "suv": 24.0, "truck": 19.0}[v.body]  # from memory: US fleet
            mpg = v.mpg or default_mpg
            out.append(VehicleSpec(fuel="diesel" if v.fuel == "diesel" else "gasoline",
                                   miles_per_yr=v.miles_per_year, mpg=mpg))
    return tuple(out)


# ------------------------------------------------------------------------------ prices


def electric_rate(plan: Plan) -> ElectricRate:
    e = plan.prices.electricity
    periods = tuple(
        TouPeriod(name=t.name, usd_per_kwh=t.usd_per_kwh,
                  hours=tuple(range(t.start_hour, t.end_hour)), months=tuple(t.months),
                  weekdays_only=t.weekdays_only)
        for t in (e.time_of_use or ())
    )
    export_rate = e.export_usd_per_kwh if e.export_usd_per_kwh is not None else 0.05
    return ElectricRate(usd_per_kwh=e.usd_per_kwh, fixed_usd_per_month=e.fixed_usd_per_month,
                        tou_periods=periods, export=e.export, export_usd_per_kwh=export_rate)


def fuel_prices(plan: Plan, closed: Iterable[str] = ()) -> FuelPrices:
    pr = plan.prices
    closed = set(closed)
    prices = {
        "natural_gas": FuelPrice(pr.gas.usd_per_therm, pr.gas.fixed_usd_per_month),
        "propane": FuelPrice(pr.propane.usd_per_gal,
                             0.0 if "propane" in closed else pr.propane.fixed_usd_per_month),
        "heating_oil": FuelPrice(pr.oil.usd_per_gal, 0.0 if "oil" in closed else pr.oil.fixed_usd_per_month),
        "gasoline": FuelPrice(pr.gasoline.usd_per_gal, pr.gasoline.fixed_usd_per_month),
        "diesel": FuelPrice(pr.diesel.usd_per_gal, pr.diesel.fixed_usd_per_month),
    }
    return FuelPrices(prices)


def emission_factors(plan: Plan) -> EmissionFactors:
    return EmissionFactors.default(grid_kg_per_kwh=plan.prices.grid_kg_co2_per_kwh)


# ------------------------------------------------------------------------------ the basis


@dataclass(frozen=True, eq=False)
class HomeBasis:
    """Everything about one home that no project changes: weather, solar geometry, heat loss."""

    weather: Weather
    site: SiteCache               # solar geometry and plane-of-array irradiance of the site
    calibration: Calibration      # heat loss (UA) and the design heating load
    base: HomeEnergySpec          # the home today
    weather_note: str
    notes: tuple[str, ...]
    bill_fits: tuple[BillFit, ...] = ()   # how the model reproduces each fuel's bills
    peak: PeakBasis | None = None         # today's peak demand and design-day demand

    @property
    def design_load_btuh(self) -> float:
        return float(self.calibration.design_load_btuh)


CLIMATE_WEATHER_KEY = ("home", "climate", "weather_file")
BILL_YEAR_WEATHER_KEY = ("usage", "weather_file")


def read_weather_file(folder: PlanFolder, name: str, loc: tuple[str, ...] = CLIMATE_WEATHER_KEY) -> Weather:
    """The year of the weather file a plan names at ``loc``, read the one safe way."""
    path, data = folder.read(name, loc, WEATHER)
    hint = (WEATHER.hint if loc != BILL_YEAR_WEATHER_KEY else
            WEATHER.hint.replace("of one typical year", "of the weather during the billed year"))
    try:
        text = decode_utf8(data, name, WEATHER)
    except InputError as err:
        raise PlanRuleError(loc, f"weather file {name}: {err.problems[0].message}", "save it as UTF-8") from None
    try:
        return wx.read_weather_text(text, path.name)
    except wx.WeatherFileError as exc:
        raise PlanRuleError(loc, f"cannot use the weather file {name}: {clean(exc)[:160]}",
                            hint) from None
    except Exception:  # pvlib's and pandas' errors quote the file: say only what it is not
        raise PlanRuleError(loc, f"{name} is not a weather file homeplan can read", hint) from None


def _bill_year_site(plan: Plan, base_dir: PlanFolder | Path | None,
                    typical: Weather) -> tuple[SiteCache | None, str | None]:
    """The cache of the billed year's weather (``usage.weather_file``), when the plan gives one."""
    u = plan.usage
    if u is None or not u.weather_file:
        return None, None
    w = read_weather_file(as_folder(base_dir), u.weather_file, BILL_YEAR_WEATHER_KEY)
    w = replace(w, heating_design_f=typical.heating_design_f, cooling_design_f=typical.cooling_design_f)
    return SiteCache(w), Path(u.weather_file).name


def home_basis(plan: Plan, base_dir: PlanFolder | Path | None = None,
               make_year: Callable[[wx.ClimateNormals], Weather] | None = None,
               keep: ArrayKeeper | None = None,
               place: tuple[Weather, str, SolarSite] | None = None) -> HomeBasis:
    """Today's home: weather, solar geometry, heat loss and equipment, fitted to the bills.

    ``place`` gives the weather year, its note and its solar geometry when they are already
    known (homes of one place share them: :mod:`homeplan.planner.shared`); otherwise they are
    loaded for this home alone (``make_year``: see :func:`load_weather`; ``keep``: see
    :class:`~homeplan.energy.simulate.SiteCache`)."""
    weather, wnote, solar_site = (place if place is not None
                                  else (*load_weather(plan, base_dir, make_year), None))
    parts = {"water_heater": water_spec_today(plan), "cooking": cooking_spec_today(plan),
             "dryer": dryer_spec_today(plan)}
    cal, notes = first_heat_loss(plan, weather, parts)
    roof = plan.home.roof
    solar = None
    if plan.home.solar is not None:
        s = plan.home.solar
        solar = SolarArraySpec(dc_kw=s.size_kw, tilt_deg=s.tilt_deg or (roof.tilt_deg if roof else 25.0),
                               azimuth_deg=s.azimuth_deg or (roof.azimuth_deg if roof else 180.0),
                               dc_ac_ratio=(s.size_kw / s.inverter_kw) if s.inverter_kw else 1.2)
    battery = None
    if plan.home.battery is not None:
        b = plan.home.battery
        battery = BatterySpec(capacity_kwh=b.capacity_kwh, power_kw=b.power_kw)
    site = SiteCache(weather, keep, solar_site)
    spec = HomeEnergySpec(
        weather=weather, ua_btuh_f=float(cal.ua_btuh_f),
        heating=heating_spec_today(plan, float(cal.design_load_btuh)),
        cooling=cooling_spec_today(plan), vehicles=vehicle_specs_today(plan),
        solar=solar, battery=battery, electric_rate=electric_rate(plan),
        fuel_prices=fuel_prices(plan), emission_factors=emission_factors(plan),
        occupants=float(plan.home.occupants),
        gas_service_open=any(appliance_fuel(a) == "gas" for a in plan.appliances),
        fuel_accounts_open=tuple(engine_fuel(f) for f in TANK_FUELS
                                 if any(appliance_fuel(a) == f for a in plan.appliances)),
        label="today", **parts,
    )
    bill_site, bill_weather = _bill_year_site(plan, base_dir, weather)
    spec, fits, fit_notes = fit_to_bills(plan, spec, site, bill_site)
    heat_fit = next((f for f in fits if f.heating > 0 and "heating" in f.method), None)
    if heat_fit is not None:  # the fit to the bills supersedes the first estimate
        cal = replace(cal, method=f"{heat_fit.fuel} bills ({heat_fit.method}; heating needed below "
                                  f"{spec.heating_balance_f:g} F)", estimated=False)
        notes = [f"heat loss fitted to your {heat_fit.fuel} bills; the house needs heat below "
                 f"about {spec.heating_balance_f:g} F outdoors"]
    notes = [*notes, *fit_notes, *rating_notes(plan)]
    if bill_weather:
        wnote += f"; bills fitted under the billed year's weather ({bill_weather})"
    if not any(f.fuel == "electricity" for f in fits):
        notes.append("no electric bills: other plug loads use the default "
                     f"{spec.plug_kwh_per_yr:,.0f} kWh a year")
    if spec.ua_btuh_f != cal.ua_btuh_f or spec.heating_balance_f != 65.0:
        # the fitted home's own load at the design temperature: UA x (balance - design), the
        # balance temperature crediting the gains the bills show (Manual J's 70 F indoor
        # without gains would add a margin)
        cal = replace(cal, ua_btuh_f=spec.ua_btuh_f, design_load_btuh=spec.design_heating_load_btuh)
    peak = peak_basis(plan, spec, simulate(spec, site))
    return HomeBasis(weather=weather, site=site, calibration=cal, base=spec, weather_note=wnote,
                     notes=tuple(notes), bill_fits=fits, peak=peak)


# ------------------------------------------------------------------------------ states


