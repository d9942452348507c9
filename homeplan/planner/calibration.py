"""Today's home fitted to the household's own bills.

Two steps. First a heat-loss coefficient (UA) from the heating fuel's bills by the utility-bill
method (:func:`first_heat_loss`), or from floor area and age when there are none. Then the whole
model of today's home is fitted to every fuel's bills (:func:`fit_to_bills`): the heating part
(UA), the base load on each fuel (hot water, cooking, drying: one household factor per fuel),
the cooling part (its gain multiplier) and the other electric loads are scaled, within bounds,
so that each fuel's modelled year reproduces its bills - monthly where there are twelve monthly
bills, the yearly total otherwise. The fit is graded as ASHRAE Guideline 14 grades a calibrated
simulation (NMBE and CV(RMSE) of the monthly values).

With fewer than twelve complete months of the household's own meter readings (and no electric
bills), :func:`fit_to_meter` calibrates the same parts from the meter's complete days: a
change-point model of the metered days against their weather gives the base load and the
heating and cooling response, and the model of today's home, run under the same weather and
fitted the same way, is scaled to match them (other plug loads from the base load; for an
electrically heated or cooled home, the heat loss and the cooling gains from the slopes; for a
home heated by fuel, its furnace's or boiler's fan and pump electricity from the heating slope).

Bills of a year with its own weather file are fitted under that weather and the fitted home is
then run in the typical year (weather normalisation). Electric bills of a home with solar are
net of its production (or only what was bought, as the plan says): the home's gross use is
rebuilt from the modelled production before fitting.

References
----------
ASHRAE Guideline 14-2014 (calibrated simulation, monthly criteria, from memory); ASHRAE
Handbook - Fundamentals, ch. 19 (degree-day method); Fels (1986), PRISM.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from homeplan.energy import calibrate
from homeplan.energy._data import calibration_setting
from homeplan.energy.appliances import cooking_annual_input, dryer_annual_input
from homeplan.energy.calibrate import Calibration, fit_scales, fit_statistics
from homeplan.energy.heating import FurnaceSpec
from homeplan.energy.meter import (
    ChangePoint,
    IntervalSeries,
    change_point_fit,
    change_point_search,
    daily_kwh,
)
from homeplan.energy.simulate import EnergyResult, HomeEnergySpec, SiteCache, simulate
from homeplan.energy.units import FUEL_UNITS, btu_per_unit
from homeplan.energy.water import hot_water_gal_per_day, water_heater_annual_input
from homeplan.energy.weather import Weather
from homeplan.plan.fuels import TANK_FUELS, appliance_fuel, engine_fuel
from homeplan.plan.model import Appliance, Plan
from homeplan.result.roadmap import BillFit

__all__ = [
    "BillSeries",
    "MeterFit",
    "fit_to_meter",
    "bill_series",
    "electric_bills_show",
    "first_heat_loss",
    "fit_to_bills",
    "heating_appliance",
    "appliance_efficiency",
]

DAYS_IN_MONTH = np.array([31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31], dtype=float)
BASE_USES = ("water", "cooking", "drying")
UNIT_NAMES = {"kWh": "kWh", "therm": "therms", "gal": "gal"}


def heating_appliance(plan: Plan) -> Appliance | None:
    """The appliance that heats the home (the first furnace, boiler, heat pump or baseboard)."""
    for kind in ("furnace", "boiler", "heat_pump", "mini_split", "baseboard"):
        for a in plan.appliances:
            if a.kind == kind:
                return a
    return None


def appliance_efficiency(a: Appliance) -> float:
    """A heating appliance's efficiency: its AFUE when given, 1.0 for electric resistance, else a
    typical value for its type (from memory: furnaces and boilers of the 1990s-2000s 0.78-0.80,
    condensing 0.95)."""
    if a.afue:
        return a.afue
    fuel = appliance_fuel(a)
    if fuel == "electric":
        return 1.0
    # from memory: furnaces/boilers of the 1990s-2000s 0.78-0.80 AFUE; condensing 0.95
    return 0.95 if a.type == "condensing" else 0.80


# ------------------------------------------------------------------------------ the bills


@dataclass(frozen=True)
class BillSeries:
    """One fuel's bills: twelve months (January first) or a yearly total.

    ``fuel`` is the plan's name (``electricity``, ``gas``, ``propane``, ``oil``); ``engine`` the
    energy engine's (``natural_gas``, ``heating_oil``...). Tank deliveries are not monthly use:
    only their total is fitted.
    """

    fuel: str
    engine: str
    unit: str
    values: np.ndarray
    monthly: bool

    @property
    def total(self) -> float:
        return float(self.values.sum())


def bill_series(plan: Plan) -> tuple[BillSeries, ...]:
    """Every fuel's bills given in the plan (``usage``), electricity last."""
    u = plan.usage
    if u is None:
        return ()
    out: list[BillSeries] = []
    if u.gas is not None and (u.gas.monthly_therms or u.gas.annual_therms):
        m = u.gas.monthly_therms
        out.append(BillSeries("gas", "natural_gas", "therm",
                              np.array(m if m else [u.gas.annual_therms], float), bool(m)))
    for fuel in TANK_FUELS:
        g = getattr(u, fuel)
        if g is not None and (g.monthly_gal or g.annual_gal):
            total = float(sum(g.monthly_gal)) if g.monthly_gal else float(g.annual_gal)
            out.append(BillSeries(fuel, engine_fuel(fuel), "gal", np.array([total]), False))
    e = u.electricity
    if e is not None and (e.monthly_kwh or e.annual_kwh):
        m = e.monthly_kwh
        out.append(BillSeries("electricity", "electricity", "kWh",
                              np.array(m if m else [e.annual_kwh], float), bool(m)))
    return tuple(s for s in out if s.total > 0)


def electric_bills_show(plan: Plan) -> str:
    """``used``, ``net`` or ``bought``: what the electric bills count (``net`` assumed with solar)."""
    e = plan.usage.electricity if plan.usage else None
    if e is not None and e.bills_show:
        return e.bills_show
    return "net" if plan.home.solar is not None else "used"


# ------------------------------------------------------------------------------ first estimate


def _vintage(plan: Plan) -> str:
    y = plan.home.year_built
    if y is None or y < 1980 or plan.home.envelope == "leaky":
        return "pre1980" if (y is None or y < 1980) else "1980_2000"
    return "1980_2000" if y <= 2000 else "post2000"


def first_heat_loss(plan: Plan, weather: Weather, base: dict) -> tuple[Calibration, list[str]]:
    """Heat-loss coefficient from the heating fuel bills, or a floor-area default (flagged).

    ``base`` holds the non-heating specs of today's home, used to estimate the baseload on the
    heating fuel when only an annual total is known. :func:`fit_to_bills` refines the result
    against the whole model.
    """
    notes: list[str] = []
    design = float(weather.heating_design_f)
    hdd = float(weather.hdd65)
    a = heating_appliance(plan)
    bills = {s.fuel: s for s in bill_series(plan)}
    if a is not None and a.kind not in ("heat_pump", "mini_split"):
        fuel = appliance_fuel(a)
        series = bills.get("electricity" if fuel == "electric" else fuel)
        eff = appliance_efficiency(a)
        btu = btu_per_unit(engine_fuel(fuel))
        try:
            if series is not None and series.monthly:
                cal = calibrate.calibrate_summer_baseload(series.values, DAYS_IN_MONTH, hdd, design,
                                                          eff, btu_per_unit=btu)
                if cal.ua_btuh_f > 0:
                    notes.append(f"heat loss from your monthly {fuel} use ({cal.method})")
                    return cal, notes
            if series is not None and fuel != "electric":
                baseload = _baseload_on_fuel(plan, fuel, base, weather)
                if series.total > baseload:
                    cal = calibrate.calibrate_annual(series.total, baseload, hdd, design, eff,
                                                     btu_per_unit=btu)
                    notes.append(f"heat loss from your yearly {fuel} use, less an estimated "
                                 "baseload for water heating, cooking and drying")
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


# ------------------------------------------------------------------------------ the fit


def _part(r: EnergyResult, use: str, fuel: str) -> np.ndarray:
    return np.asarray(r.monthly_end_use_units.get(use, {}).get(fuel, np.zeros(12)), float)


def _base(r: EnergyResult, fuel: str) -> np.ndarray:
    return sum((_part(r, u, fuel) for u in BASE_USES), np.zeros(12))


def _with_base_scale(spec: HomeEnergySpec, fuel: str, k: float) -> HomeEnergySpec:
    """The household's hot water, cooking and drying on ``fuel`` scaled by ``k`` (as a service,
    so the new appliances that take them over inherit the household's habits)."""
    changes: dict = {}
    if spec.water_heater is not None and spec.water_heater.fuel == fuel:
        changes["hot_water_gal_per_day"] = spec.gal_per_day * k
    if spec.cooking is not None and cooking_annual_input(spec.cooking)[0] == fuel:
        changes["cooking"] = replace(spec.cooking, useful_kwh_per_yr=spec.cooking.useful_kwh * k)
    if spec.dryer is not None and fuel in dryer_annual_input(spec.dryer):
        changes["dryer"] = replace(spec.dryer, loads_per_yr=spec.dryer.loads * k)
    return replace(spec, **changes) if changes else spec


def _bounds(key: str) -> tuple[float, float]:
    return calibration_setting(f"{key}_scale_min"), calibration_setting(f"{key}_scale_max")


def _electric_target(series: BillSeries, r: EnergyResult, bills_show: str) -> np.ndarray:
    """The home's site use the electric bills stand for (gross of solar production)."""
    y = series.values
    if bills_show == "used" or not r.monthly_solar_kwh.any():
        return y
    if bills_show == "net":
        extra = r.monthly_solar_kwh
    else:  # bought: add back the production used in the home
        extra = r.monthly_solar_kwh - r.monthly_grid_export_kwh
    return y + (extra if series.monthly else np.array([extra.sum()]))


def _in_bill_terms(series: BillSeries, r: EnergyResult, bills_show: str) -> np.ndarray:
    """The model's monthly use counted as the bills count it."""
    if series.fuel != "electricity":
        return np.asarray(r.monthly_units.get(series.engine, np.zeros(12)), float)
    if bills_show == "net":
        return r.monthly_units["electricity"] - r.monthly_solar_kwh
    if bills_show == "bought":
        return np.asarray(r.monthly_grid_import_kwh, float)
    return np.asarray(r.monthly_units["electricity"], float)


def _fit_fuel(spec: HomeEnergySpec, site: SiteCache, series: BillSeries, heating_fuel: str | None,
              bills_show: str) -> HomeEnergySpec:
    """One round of scaling ``spec`` so that ``series`` is reproduced."""
    r = simulate(spec, site)
    f = series.engine
    monthly = series.monthly
    parts: dict[str, np.ndarray] = {}
    bounds: dict[str, tuple[float, float]] = {}
    if f == "electricity":
        y = _electric_target(series, r, bills_show)
        plug = _part(r, "plug", f)
        if spec.plug_kwh_per_yr > 0:
            parts["plug"] = plug
            bounds["plug"] = (calibration_setting("plug_floor_kwh") / spec.plug_kwh_per_yr, np.inf)
        if monthly:
            cool = _part(r, "cooling", f)
            if cool.sum() > 0:
                parts["cooling"] = cool
                lo, hi = _bounds("cooling")
                m = spec.cooling_load_multiplier
                bounds["cooling"] = (lo / m, hi / m)
            if heating_fuel == f and _part(r, "heating", f).sum() > 0:
                parts["heating"] = _part(r, "heating", f)
                bounds["heating"] = _bounds("ua")
    else:
        y = series.values
        heat = _part(r, "heating", f)
        base = _base(r, f)
        if heat.sum() > 0 and (monthly or heating_fuel == f):
            parts["heating"] = heat
            bounds["heating"] = _bounds("ua")
        if base.sum() > 0 and (monthly or "heating" not in parts):
            parts["base"] = base
            bounds["base"] = _bounds("base")
    if not parts:
        return spec
    total_model = np.asarray(r.monthly_units.get(f, np.zeros(12)), float)
    scaled = sum(parts.values(), np.zeros(12))
    fixed = total_model - scaled
    if not monthly:
        parts = {k: np.array([v.sum()]) for k, v in parts.items()}
        fixed = np.array([fixed.sum()])
    fit = fit_scales(y, parts, fixed, bounds)
    s = fit.scales
    if "heating" in s:
        spec = replace(spec, ua_btuh_f=spec.ua_btuh_f * s["heating"])
    if "base" in s:
        spec = _with_base_scale(spec, f, s["base"])
    if "cooling" in s:
        spec = replace(spec, cooling_load_multiplier=spec.cooling_load_multiplier * s["cooling"])
    if "plug" in s:
        spec = replace(spec, plug_kwh_per_yr=spec.plug_kwh_per_yr * s["plug"])
    return spec


def _heating_engine_fuel(spec: HomeEnergySpec) -> str | None:
    h = spec.heating
    if h is None:
        return None
    fuel = getattr(h, "fuel", None)
    return fuel if fuel is not None else "electricity"


def _method(series: BillSeries, spec: HomeEnergySpec, heating_fuel: str | None) -> str:
    what = "twelve monthly bills" if series.monthly else "the yearly total"
    if series.fuel == "electricity":
        parts = ["other loads"]
        if series.monthly and spec.cooling is not None:
            parts.append("cooling")
        if series.monthly and heating_fuel == "electricity":
            parts.append("heating")
    else:
        parts = []
        if heating_fuel == series.engine:
            parts.append("heating")
        if series.monthly or heating_fuel != series.engine:
            parts.append("hot water, cooking and drying")
    return f"fitted to {what}: {' and '.join(parts)} scaled"


def _summarise(series: BillSeries, spec: HomeEnergySpec, r_bill: EnergyResult, r_typ: EnergyResult,
               bills_show: str, heating_fuel: str | None) -> BillFit:
    f = series.engine
    model = _in_bill_terms(series, r_bill, bills_show)
    typical = _in_bill_terms(series, r_typ, bills_show)
    stats = fit_statistics(series.values, model) if series.monthly else None
    split = {use: float(_part(r_bill, use, f).sum()) for use in r_bill.monthly_end_use_units}
    base = sum(split.get(u, 0.0) for u in (*BASE_USES, "plug"))
    solar = 0.0
    if f == "electricity" and bills_show != "used":
        solar = float(r_bill.monthly_solar_kwh.sum())
        if bills_show == "bought":
            solar -= float(r_bill.monthly_grid_export_kwh.sum())
    return BillFit(
        fuel=series.fuel, unit=FUEL_UNITS[f], billed=series.total, modelled=float(model.sum()),
        typical_year=float(typical.sum()), monthly=series.monthly,
        nmbe_pct=stats.nmbe_pct if stats else None, cv_rmse_pct=stats.cv_rmse_pct if stats else None,
        r2=stats.r2 if stats else None,
        meets_guideline_14=stats.meets_monthly_criteria if stats else None,
        heating=split.get("heating", 0.0), cooling=split.get("cooling", 0.0), base=base,
        other=split.get("vehicles", 0.0), solar=solar, method=_method(series, spec, heating_fuel),
    )


def _balance_point(spec: HomeEnergySpec, site: SiteCache, ordered: list[BillSeries],
                   heating_fuel: str | None, bills_show: str) -> HomeEnergySpec:
    """The heating balance temperature that best explains the heating fuel's monthly bills.

    The house needs heat below its balance temperature (the indoor setting less what sun,
    people and appliances supply); each candidate is fitted and the one with the least squared
    monthly error kept (variable-base degree days).

    References
    ----------
    Fels, M. (1986), "PRISM: an introduction", Energy and Buildings 9:5-18 (variable-base
    degree-day model, the reference temperature fitted to the bills).
    """
    series = next((s for s in ordered if s.engine == heating_fuel and s.monthly), None)
    if series is None:
        return spec
    best: tuple[float, HomeEnergySpec] | None = None
    for balance_f in np.arange(calibration_setting("balance_min_f"),
                               calibration_setting("balance_max_f") + 0.1, 2.5):
        trial = _fit_fuel(replace(spec, heating_balance_f=float(balance_f)), site, series,
                          heating_fuel, bills_show)
        model = _in_bill_terms(series, simulate(trial, site), bills_show)
        err = float(((series.values - model) ** 2).sum())
        if best is None or err < best[0] - 1e-9:
            best = (err, trial)
    return best[1] if best is not None else spec


def fit_to_bills(plan: Plan, spec: HomeEnergySpec, site: SiteCache,
                 bill_site: SiteCache | None = None) -> tuple[HomeEnergySpec, tuple[BillFit, ...], list[str]]:
    """Scale today's home so that the model reproduces every fuel's bills.

    Fossil fuels first (the heating fuel sets the heat loss), then electricity; a few rounds,
    since the parts interact (a furnace's fan, self-consumed solar, a heat pump's efficiency).

    Parameters
    ----------
    plan : Plan
        The plan (its ``usage`` holds the bills).
    spec : HomeEnergySpec
        Today's home in the typical year, with the first heat-loss estimate.
    site : SiteCache
        The typical year's cache.
    bill_site : SiteCache or None
        The cache of the billed year's weather; None fits under the typical year.

    Returns
    -------
    spec : HomeEnergySpec
        Today's home fitted, in the typical year.
    fits : tuple of BillFit
        How each fuel's bills are reproduced.
    notes : list of str
        What was assumed, in plain words.

    References
    ----------
    ASHRAE Guideline 14-2014, calibrated simulation (from memory).
    """
    series = bill_series(plan)
    notes: list[str] = []
    if not series:
        return spec, (), notes
    fit_site = bill_site or site
    work = replace(spec, weather=fit_site.weather) if bill_site is not None else spec
    heating_fuel = _heating_engine_fuel(spec)
    bills_show = electric_bills_show(plan)
    ordered = sorted(series, key=lambda s: (s.fuel == "electricity", s.engine != heating_fuel))
    work = _balance_point(work, fit_site, ordered, heating_fuel, bills_show)
    for _ in range(3):
        for s in ordered:
            work = _fit_fuel(work, fit_site, s, heating_fuel, bills_show)
    fitted = replace(work, weather=site.weather) if bill_site is not None else work
    r_bill = simulate(work, fit_site)
    r_typ = simulate(fitted, site) if bill_site is not None else r_bill
    fits = tuple(_summarise(s, work, r_bill, r_typ, bills_show, heating_fuel) for s in series)
    for fit in fits:
        if abs(fit.annual_error_pct) > 3.0:
            notes.append(f"the model could not reproduce your {fit.fuel} bills within 3 % "
                         f"({fit.modelled:,.0f} against {fit.billed:,.0f} "
                         f"{UNIT_NAMES.get(fit.unit, fit.unit)}); check the bills and the appliances")
    if plan.home.solar is not None and any(s.fuel == "electricity" for s in series):
        e = plan.usage.electricity
        said = " (as the plan says)" if e is not None and e.bills_show else (
            " (assumed; set usage.electricity.bills_show if your bills show only what you bought)")
        words = {"net": "what you bought less what you sent back", "bought": "only what you bought",
                 "used": "your whole use"}[bills_show]
        notes.append(f"electric bills read as {words}{said}; the home's use is rebuilt from "
                     "the modelled solar production")
    if bill_site is not None:
        changed = [f for f in fits if f.billed and abs(f.typical_year / f.modelled - 1) > 0.005]
        if changed:
            notes.append("bills weather-normalised to the typical year: " + "; ".join(
                f"{f.fuel} {f.billed:,.0f} {UNIT_NAMES.get(f.unit, f.unit)} billed, "
                f"{f.typical_year:,.0f} in a typical year" for f in changed))
    else:
        notes.append("the billed year is taken as a typical year (add usage.weather_file with "
                     "that year's weather to normalise the bills)")
    return fitted, fits, notes


# ------------------------------------------------------------------------------ the meter's days

MIN_METER_DAYS = 14   # common practice, no source: two weeks of complete days before a daily fit is trusted


@dataclass(frozen=True)
class MeterFit:
    """The change-point model of the meter's complete days and what it calibrated.

    ``metered`` is the fit of the meter's days against ``weather`` (the file of the metered
    period's weather, or the typical year matched by day of the year when ``weather_file`` is
    None); ``modelled`` the same fit, at the same balance points, of the model of today's home
    on the same days after calibration. ``calibrated`` lists what was taken from the meter
    (empty: nothing, the reason is in the notes); ``daily_nmbe_pct`` and ``daily_cv_rmse_pct``
    grade the model's daily use against the meter's (None when the model was not compared);
    ``notes`` say the same in plain words.
    """

    metered: ChangePoint
    modelled: ChangePoint | None
    weather_file: str | None
    calibrated: tuple[str, ...]
    daily_nmbe_pct: float | None
    daily_cv_rmse_pct: float | None
    notes: tuple[str, ...] = ()


def _day_index(dates: tuple) -> tuple[np.ndarray, np.ndarray]:
    """Day of a 365-day year (0 = 1 January) of each date, 29 February left out: (index, kept)."""
    keep = np.array([not (d.month == 2 and d.day == 29) for d in dates], bool)
    doy = np.array([d.timetuple().tm_yday - 1 - (1 if (d.year % 4 == 0 and d.month > 2) else 0)
                    for d in dates], dtype=np.int64)   # 1901-2099: every fourth year is a leap year
    return doy[keep], keep


def _model_days(spec: HomeEnergySpec, site: SiteCache, doy: np.ndarray) -> np.ndarray:
    """The model's grid draw on the given days of the year, kWh per day (what a meter counts)."""
    r = simulate(spec, site)
    return np.asarray(r.grid_import_kw, float).reshape(365, 24).sum(axis=1)[doy]


def fit_to_meter(series: IntervalSeries, spec: HomeEnergySpec, site: SiteCache,
                 bill_site: SiteCache | None = None, bill_weather: str | None = None,
                 calibrate_model: bool = True) -> tuple[HomeEnergySpec, MeterFit | None, list[str]]:
    """Today's home calibrated to the meter's complete days.

    The meter's daily use is fitted against the daily mean temperature of the metered days
    (from ``bill_site``, the weather of the metered period, when the plan gives it; else the
    typical year by day of the year) with both balance points fitted. The model of today's
    home is run under the same weather and fitted at the same balance points; then, each within
    the bounds of the bill fit: the other plug loads take the difference of the base loads; an
    electric heating system's heat loss (and balance temperature) and an electric cooling
    system's gains are scaled by the ratio of the metered to the modelled slope; a furnace's or
    boiler's fan and pump electricity per therm delivered takes the difference of the heating
    slopes. Three rounds, since the parts interact. A response the metered days hold no weather for is left as it was.

    Parameters
    ----------
    series : IntervalSeries
        The meter's readings, kWh per interval.
    spec : HomeEnergySpec
        Today's home in the typical year (after any fit to the bills).
    site : SiteCache
        The typical year's cache.
    bill_site : SiteCache or None
        The cache of the metered period's weather (``usage.weather_file``); None: the typical year.
    bill_weather : str or None
        That weather file's name, for the notes.
    calibrate_model : bool
        False to fit and grade only (electric bills already calibrate the model).

    Returns
    -------
    spec : HomeEnergySpec
        Today's home, calibrated when asked and possible, in the typical year.
    fit : MeterFit or None
        The fits (None with fewer than 7 complete days).
    notes : list of str
        What was taken from the meter, in plain words.

    References
    ----------
    ASHRAE Guideline 14-2014, change-point models and calibrated simulation (from memory);
    Fels (1986), PRISM (variable-base degree days).
    """
    dates, kwh = daily_kwh(series)
    doy, keep = _day_index(dates)
    kwh = np.asarray(kwh, float)[keep]
    if kwh.size < 7:
        return spec, None, ["fewer than 7 complete days in the meter file: no base load or heating "
                            "and cooling response, and the model is not calibrated from it"]
    fit_site = bill_site or site
    temp = np.asarray(fit_site.weather.temp_f, float).reshape(365, 24).mean(axis=1)[doy]
    metered = change_point_search(kwh, temp)
    against = (f"the weather of the metered period ({bill_weather}, by day of the year)" if bill_site is not None
               else "the typical weather year, matched by day of the year, not the weather of the metered "
                    "days (add usage.weather_file with the weather of the metered period)")
    heat = (f"{metered.heating_kwh_per_f_day:.2f} kWh per heating degree day below {metered.heating_balance_f:g} F"
            if metered.heating_kwh_per_f_day >= 0.005 else "no heating response")
    cool = (f"{metered.cooling_kwh_per_f_day:.2f} kWh per cooling degree day above {metered.cooling_balance_f:g} F"
            if metered.cooling_kwh_per_f_day >= 0.005 else "no cooling response")
    notes = [f"the meter's {kwh.size} complete days against {against}: base load "
             f"{metered.base_load_kw:.2f} kW, {heat}, {cool} (R2 {metered.r2:.2f})"]
    work = replace(spec, weather=fit_site.weather) if bill_site is not None else spec
    taken: list[str] = []
    if not calibrate_model:
        notes.append("the model is fitted to the year's electric use (twelve months of the meter, or the "
                     "bills); the meter's daily fit is shown, not used")
    elif kwh.size < MIN_METER_DAYS:
        notes.append(f"the meter file holds {kwh.size} complete days; at least {MIN_METER_DAYS} are needed "
                     "to calibrate the model from them: the default plug loads stay")
    else:
        work, taken, why = _calibrate_to_days(work, fit_site, metered, temp, doy)
        notes.extend(why)
    model = _model_days(work, fit_site, doy)
    modelled = change_point_fit(model, temp, metered.heating_balance_f, metered.cooling_balance_f)
    nmbe = cv = None
    if kwh.mean() > 0:
        stats = fit_statistics(kwh, model, n_params=1)
        nmbe, cv = stats.nmbe_pct, stats.cv_rmse_pct
        if taken:
            notes.append(f"the calibrated model against the meter's {kwh.size} days: NMBE {nmbe:+.1f} %, "
                         f"CV(RMSE) {cv:.0f} % of daily use")
    fitted = replace(work, weather=site.weather) if bill_site is not None else work
    return fitted, MeterFit(metered, modelled, bill_weather if bill_site is not None else None,
                            tuple(taken), nmbe, cv, tuple(notes)), notes


def _calibrate_to_days(spec: HomeEnergySpec, site: SiteCache, metered: ChangePoint,
                       temp: np.ndarray, doy: np.ndarray) -> tuple[HomeEnergySpec, list[str], list[str]]:
    """Scale plug loads, heat loss, fan use and cooling gains so that the model's change-point fit on the
    metered days matches the meter's: (spec, what was taken, notes)."""
    start = spec
    electric_heat = _heating_engine_fuel(spec) == "electricity"
    heat_days = float(np.maximum(metered.heating_balance_f - temp, 0).sum()) > 1.0
    cool_days = float(np.maximum(temp - metered.cooling_balance_f, 0).sum()) > 1.0
    notes: list[str] = []
    if electric_heat and metered.heating_kwh_per_f_day > 0:
        lo, hi = calibration_setting("balance_min_f"), calibration_setting("balance_max_f")
        spec = replace(spec, heating_balance_f=float(np.clip(metered.heating_balance_f, lo, hi)))
    ua_lo, ua_hi = _bounds("ua")
    cool_lo, cool_hi = _bounds("cooling")
    floor = calibration_setting("plug_floor_kwh")
    fan_max = calibration_setting("fan_max_kwh_per_therm")
    fans = isinstance(spec.heating, FurnaceSpec) and metered.heating_kwh_per_f_day > 0 and heat_days
    for _ in range(3):
        model = change_point_fit(_model_days(spec, site, doy), temp, metered.heating_balance_f,
                                 metered.cooling_balance_f)
        changes: dict = {}
        if spec.plug_kwh_per_yr > 0:
            plug = spec.plug_kwh_per_yr + (metered.base_kwh_per_day - model.base_kwh_per_day) * 365.0
            changes["plug_kwh_per_yr"] = max(plug, floor)
        if electric_heat and metered.heating_kwh_per_f_day > 0 and model.heating_kwh_per_f_day > 0:
            ua = spec.ua_btuh_f * metered.heating_kwh_per_f_day / model.heating_kwh_per_f_day
            changes["ua_btuh_f"] = float(np.clip(ua, start.ua_btuh_f * ua_lo, start.ua_btuh_f * ua_hi))
        if fans:  # fuel heat: the furnace's blower or the boiler's pump is the electric heating response
            therms_per_f_day = spec.ua_btuh_f * 24.0 / 1e5
            aux = spec.heating.aux_kwh_per_therm_out + (
                metered.heating_kwh_per_f_day - model.heating_kwh_per_f_day) / therms_per_f_day
            changes["heating"] = replace(spec.heating, aux_kwh_per_therm_out=float(np.clip(aux, 0.0, fan_max)))
        if spec.cooling is not None and metered.cooling_kwh_per_f_day > 0 and model.cooling_kwh_per_f_day > 0:
            m = spec.cooling_load_multiplier * metered.cooling_kwh_per_f_day / model.cooling_kwh_per_f_day
            changes["cooling_load_multiplier"] = float(np.clip(m, cool_lo, cool_hi))
        spec = replace(spec, **changes)
    if spec.ua_btuh_f == start.ua_btuh_f:
        spec = replace(spec, heating_balance_f=start.heating_balance_f)
    taken: list[str] = []
    if spec.plug_kwh_per_yr != start.plug_kwh_per_yr:
        taken.append("plug")
        floored = " (held at the floor of a home's plug loads)" if spec.plug_kwh_per_yr <= floor else ""
        notes.append(f"other plug loads set from the meter's base load: {spec.plug_kwh_per_yr:,.0f} kWh a year "
                     f"in place of the default {start.plug_kwh_per_yr:,.0f}{floored}")
    if spec.ua_btuh_f != start.ua_btuh_f:
        taken.append("heating")
        notes.append(f"heating response scaled to the meter's: heat loss x{spec.ua_btuh_f / start.ua_btuh_f:.2f} "
                     f"({spec.ua_btuh_f:,.0f} Btu/h-F), heat needed below {spec.heating_balance_f:g} F")
    elif electric_heat:
        notes.append("the heating response is not taken from the meter: " + (
            "the metered days show no rise of use in the cold" if heat_days else
            "the metered days hold no heating weather"))
    if spec.heating != start.heating and fans:
        taken.append("heating_fan")
        aux = spec.heating.aux_kwh_per_therm_out
        capped = " (held at the most a fan plausibly uses)" if aux >= fan_max else ""
        notes.append(f"the {spec.heating.kind}'s fan and pump electricity taken from the meter's heating response: "
                     f"{aux:.2f} kWh per therm of heat delivered{capped}")
    if spec.cooling_load_multiplier != start.cooling_load_multiplier:
        taken.append("cooling")
        notes.append(f"cooling response scaled to the meter's: cooling gains "
                     f"x{spec.cooling_load_multiplier / start.cooling_load_multiplier:.2f}")
    elif spec.cooling is not None:
        notes.append("the cooling response is not taken from the meter: " + (
            "the metered days show no rise of use in the heat" if cool_days else
            "the metered days hold no cooling weather"))
    if not taken:
        return start, [], notes
    return spec, taken, notes
