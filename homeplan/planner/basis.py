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
from collections.abc import Iterable
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np

from homeplan.catalog import ReferenceClimate, performance, reference_climates
from homeplan.energy import calibrate
from homeplan.energy import weather as wx
from homeplan.energy.appliances import (
    CookingSpec,
    DryerSpec,
    cooking_annual_input,
    dryer_annual_input,
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
from homeplan.energy.simulate import HomeEnergySpec, SiteCache, simulate
from homeplan.energy.solar import SolarArraySpec, SolarSite
from homeplan.energy.units import btu_per_unit
from homeplan.energy.vehicles import VehicleSpec
from homeplan.energy.water import WaterHeaterSpec, hot_water_gal_per_day, water_heater_annual_input
from homeplan.energy.weather import Weather
from homeplan.errors import PlanRuleError
from homeplan.plan.fuels import TANK_FUELS, appliance_fuel, engine_fuel
from homeplan.plan.model import Appliance, Plan
from homeplan.planner.lifecycle import appliance_type

__all__ = [
    "HomeBasis",
    "electric_rate",
    "emission_factors",
    "fuel_prices",
    "home_basis",
    "load_weather",
    "nearest_reference_climate",
]

DAYS_IN_MONTH = np.array([31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31], dtype=float)


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


def load_weather(plan: Plan, base_dir: Path | None) -> tuple[Weather, str]:
    """The weather year for the plan and a note on where it came from.

    A weather file (EPW or TMY3) wins; otherwise a deterministic typical year is generated from
    the climate numbers, filling gaps from the nearest reference climate (and saying so).
    """
    h = plan.home
    c = h.climate
    notes: list[str] = []
    if c.weather_file:
        path = Path(c.weather_file)
        if not path.is_absolute() and base_dir is not None:
            path = base_dir / path
        if not path.exists():
            raise PlanRuleError(("home", "climate", "weather_file"), f"weather file not found: {path}",
                                "give a path relative to the plan file, or remove the key")
        try:
            w = wx.read_weather(path)
        except (ValueError, KeyError, IndexError) as exc:
            raise PlanRuleError(("home", "climate", "weather_file"), f"cannot read weather file: {exc}",
                                "use an EPW (.epw) or TMY3 (.csv) file") from None
        if c.heating_design_f is not None or c.cooling_design_f is not None:
            w = replace(w, heating_design_f=c.heating_design_f or w.heating_design_f,
                        cooling_design_f=c.cooling_design_f or w.cooling_design_f)
        return w, f"weather file {path.name}"
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
    return wx.synthetic_weather(normals), "; ".join(["built-in typical year", *notes])


# ------------------------------------------------------------------------------ equipment


def _heating_appliance(plan: Plan) -> Appliance | None:
    for kind in ("furnace", "boiler", "heat_pump", "mini_split", "baseboard"):
        for a in plan.appliances:
            if a.kind == kind:
                return a
    return None


def _cooling_appliance(plan: Plan) -> Appliance | None:
    for kind in ("central_ac", "heat_pump", "mini_split", "room_ac"):
        for a in plan.appliances:
            if a.kind == kind:
                return a
    return None


def _default_efficiency(a: Appliance) -> float:
    if a.afue:
        return a.afue
    fuel = appliance_fuel(a)
    if fuel == "electric":
        return 1.0
    # from memory: furnaces/boilers of the 1990s-2000s 0.78-0.80 AFUE; condensing 0.95
    return 0.95 if a.type == "condensing" else 0.80


def existing_heat_pump(a: Appliance, design_load_btuh: float) -> HeatPumpSpec:
    """Today's heat pump: a typical single-stage unit of its size (else the design load, at least
    1.5 t) with backup strips, its COP curve scaled by its HSPF2 against a 7.5 HSPF2 unit."""
    cap = a.capacity_btuh or max(design_load_btuh, performance()["hp_min_btuh"])
    hp = HeatPumpSpec.typical("single_stage", cap, backup="resistance", seer2=a.seer2 or 14.3)
    hspf_ratio = (a.hspf2 or 7.5) / 7.5
    return replace(hp, cop_47=hp.cop_47 * hspf_ratio, cop_17=hp.cop_17 * hspf_ratio,
                   cop_5=max(1.0, hp.cop_5 * hspf_ratio))


def heating_spec_today(plan: Plan, design_load_btuh: float) -> HeatingSpec | None:
    a = _heating_appliance(plan)
    if a is None:
        return None
    fuel = appliance_fuel(a)
    if a.kind in ("heat_pump", "mini_split"):
        return existing_heat_pump(a, design_load_btuh)
    if fuel == "electric":
        return ResistanceHeatSpec()
    return FurnaceSpec(fuel=engine_fuel(fuel), afue=_default_efficiency(a), kind=a.kind)


def cooling_spec_today(plan: Plan) -> CoolingSpec | None:
    a = _cooling_appliance(plan)
    if a is None:
        return None
    return CoolingSpec(seer2=a.seer2 or (10.0 if a.kind == "room_ac" else 13.0))


def water_spec_today(plan: Plan) -> WaterHeaterSpec | None:
    for a in plan.appliances:
        if a.kind == "water_heater":
            fuel = engine_fuel(appliance_fuel(a))
            kind = appliance_type(a)
            if kind == "heat_pump":
                return WaterHeaterSpec.heat_pump(a.uef or performance()["hpwh_240v_uef"])
            default_uef = {"natural_gas": 0.62, "propane": 0.62, "heating_oil": 0.55,
                           "electricity": 0.92}[fuel]  # reference notes: typical UEF (from memory)
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


# ------------------------------------------------------------------------------ calibration


def _heating_fuel_bills(plan: Plan, fuel: str) -> tuple[np.ndarray | None, float | None]:
    u = plan.usage
    if u is None:
        return None, None
    if fuel == "gas" and u.gas is not None:
        m = np.array(u.gas.monthly_therms, float) if u.gas.monthly_therms else None
        return m, u.gas.annual_therms if m is None else float(m.sum())
    if fuel in TANK_FUELS:
        g = getattr(u, fuel)
        if g is not None:
            m = np.array(g.monthly_gal, float) if g.monthly_gal else None
            return m, g.annual_gal if m is None else float(m.sum())
    if fuel == "electric" and u.electricity is not None:
        m = np.array(u.electricity.monthly_kwh, float) if u.electricity.monthly_kwh else None
        return m, u.electricity.annual_kwh if m is None else float(m.sum())
    return None, None


def _vintage(plan: Plan) -> str:
    y = plan.home.year_built
    if y is None or y < 1980 or plan.home.envelope == "leaky":
        return "pre1980" if (y is None or y < 1980) else "1980_2000"
    return "1980_2000" if y <= 2000 else "post2000"


def calibrate_home(plan: Plan, weather: Weather, base: dict) -> tuple[Calibration, list[str]]:
    """Heat-loss coefficient from the heating fuel bills, or a floor-area default (flagged).

    ``base`` holds the non-heating specs of today's home, used to estimate the baseload on the
    heating fuel when only an annual total is known.
    """
    notes: list[str] = []
    design = float(weather.heating_design_f)
    hdd = float(weather.hdd65)
    a = _heating_appliance(plan)
    if a is not None and a.kind not in ("heat_pump", "mini_split"):
        fuel = appliance_fuel(a)
        monthly, annual = _heating_fuel_bills(plan, fuel)
        eff = _default_efficiency(a)
        btu = btu_per_unit(engine_fuel(fuel))
        try:
            if monthly is not None and monthly.sum() > 0:
                cal = calibrate.calibrate_summer_baseload(monthly, DAYS_IN_MONTH, hdd, design, eff,
                                                          btu_per_unit=btu)
                if cal.ua_btuh_f > 0:
                    notes.append(f"heat loss calibrated from your monthly {fuel} use ({cal.method})")
                    return cal, notes
            if annual:
                baseload = _baseload_on_fuel(plan, fuel, base, weather)
                if annual > baseload:
                    cal = calibrate.calibrate_annual(annual, baseload, hdd, design, eff, btu_per_unit=btu)
                    notes.append(f"heat loss calibrated from your annual {fuel} use, minus an "
                                 "estimated baseload for water heating, cooking and drying")
                    return cal, notes
        except (ValueError, TypeError) as exc:
            notes.append(f"could not calibrate from the bills ({exc}); using floor-area defaults")
    cal = calibrate.calibrate_from_floor_area(plan.home.floor_area_ft2, design, _vintage(plan))
    envelope = {"leaky": 1.2, "average": 1.0, "tight": 0.8}[plan.home.envelope]  # common practice, no source
    if envelope != 1.0:
        cal = replace(cal, ua_btuh_f=cal.ua_btuh_f * envelope,
                      design_load_btuh=cal.design_load_btuh * envelope)
    notes.append("no usable heating bills: heat loss estimated from floor area and age (less certain)")
    return cal, notes


def _baseload_on_fuel(plan: Plan, fuel: str, base: dict, weather: Weather) -> float:
    """Estimated yearly non-heating use of the heating fuel (water, cooking, drying)."""
    f = engine_fuel(fuel)
    total = 0.0
    w = base.get("water_heater")
    if w is not None and w.fuel == f:
        rise = 125.0 - float(np.mean(weather.temp_f)) - 5.0  # mains ~ annual mean air + ~5 F (Burch & Christensen 2007, from memory)
        total += water_heater_annual_input(w, hot_water_gal_per_day(plan.home.occupants), max(rise, 40.0))
    c = base.get("cooking")
    if c is not None:
        cf, units = cooking_annual_input(c)
        total += units if cf == f else 0.0
    d = base.get("dryer")
    if d is not None:
        total += dryer_annual_input(d).get(f, 0.0)
    return total


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

    @property
    def design_load_btuh(self) -> float:
        return float(self.calibration.design_load_btuh)


def home_basis(plan: Plan, base_dir: Path | None = None,
               place: tuple[Weather, str, SolarSite] | None = None) -> HomeBasis:
    """The home's basis. ``place`` gives the weather year, its note and its solar geometry when
    they are already known (homes of one place share them: :mod:`homeplan.planner.shared`);
    otherwise they are loaded for this home alone."""
    weather, wnote, solar_site = place if place is not None else (*load_weather(plan, base_dir), None)
    parts = {"water_heater": water_spec_today(plan), "cooking": cooking_spec_today(plan),
             "dryer": dryer_spec_today(plan)}
    cal, notes = calibrate_home(plan, weather, parts)
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
    site = SiteCache(weather, solar_site)
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
    # plug loads: what the electric bills show beyond the modelled end uses
    notes = list(notes)
    u = plan.usage
    billed = None
    if u is not None and u.electricity is not None:
        billed = (sum(u.electricity.monthly_kwh) if u.electricity.monthly_kwh else u.electricity.annual_kwh)
    if billed:
        trial = simulate(replace(spec, plug_kwh_per_yr=0.0), site)
        modelled = float(trial.load_kw.sum())
        solar_kwh = float(trial.solar_kw.sum())
        plug = billed + solar_kwh - modelled  # bills show net of solar used on site (approx.)
        floor = 1500.0  # common practice, no source: fridge, lights and electronics rarely less
        if plug < floor:
            notes.append(f"the electric bills ({billed:,.0f} kWh) are below the modelled uses; "
                         f"other plug loads set to {floor:,.0f} kWh")
            plug = floor
        spec = replace(spec, plug_kwh_per_yr=plug)
        monthly = u.electricity.monthly_kwh
        if monthly and spec.cooling is not None:
            spec, note = _calibrate_cooling(spec, site, monthly, billed, floor)
            if note:
                notes.append(note)
    else:
        notes.append("no electric bills: other plug loads use the default "
                     f"{spec.plug_kwh_per_yr:,.0f} kWh a year")
    return HomeBasis(weather=weather, site=site, calibration=cal, base=spec, weather_note=wnote,
                     notes=tuple(notes))


SUMMER = slice(5, 9)  # June to September


def _calibrate_cooling(spec: HomeEnergySpec, site: SiteCache, monthly_kwh: list[float], billed: float,
                       floor: float) -> tuple[HomeEnergySpec, str | None]:
    """Scale the sensible degree-hour cooling load so June-September matches the bills.

    Cooling energy is linear in the load multiplier, so two simulations give the line; the
    plug loads are then re-derived from the annual bill. The multiplier stands for the solar and
    latent gains the degree-hour model leaves out (kept between 0.5 and 4).

    References
    ----------
    ASHRAE Guideline 14-2014 (calibrating a model to monthly utility bills, from memory).
    """

    def summer(m: float) -> float:
        r = simulate(replace(spec, cooling_load_multiplier=m), site)
        return float(np.asarray(r.monthly_grid_import_kwh)[SUMMER].sum())

    a1, a2 = summer(1.0), summer(2.0)
    slope = a2 - a1
    target = float(sum(monthly_kwh[SUMMER]))
    if slope <= 1.0:
        return spec, None
    m = float(min(max(1.0 + (target - a1) / slope, 0.5), 4.0))
    trial = simulate(replace(spec, cooling_load_multiplier=m, plug_kwh_per_yr=0.0), site)
    plug = max(billed + float(trial.solar_kw.sum()) - float(trial.load_kw.sum()), floor)
    return (replace(spec, cooling_load_multiplier=m, plug_kwh_per_yr=plug),
            f"cooling calibrated to your summer electric bills (load x {m:.1f})")


# ------------------------------------------------------------------------------ states


