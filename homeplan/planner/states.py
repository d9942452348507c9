"""States of the home for the energy engine: the home after any set of projects.

A state is the home's base spec (:class:`homeplan.planner.basis.HomeBasis`) with each chosen
project applied in a fixed order (:data:`APPLY_ORDER`): a heat pump of the variant's ratings and
the size the design load needs, a heat pump water heater, induction cooking, electric cars
sharing the planned charger, solar, a battery, air sealing, fuel accounts closed. Simulating a
state gives the typical year the roadmap reads (:func:`summarise_energy`).

References
----------
ACCA Manual S (equipment selection at the design condition); DOE 10 CFR 430 Subpart B
Appendix M1 (heat pump rating points 47/17/5 F); NEC 625.42 and SAE J1772 (charger power).
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass, replace

import numpy as np

from homeplan import catalog
from homeplan.catalog import performance
from homeplan.energy.appliances import CookingSpec, DryerSpec
from homeplan.energy.battery import BatterySpec
from homeplan.energy.heating import CoolingSpec, HeatPumpSpec, hp_capacity_btuh
from homeplan.energy.selection import HeatPumpSelection, design_cooling_load, select_heat_pump
from homeplan.energy.simulate import EnergyResult, HomeEnergySpec, simulate, with_heat_pump
from homeplan.energy.solar import SolarArraySpec
from homeplan.energy.vehicles import VehicleSpec
from homeplan.energy.water import WaterHeaterSpec
from homeplan.plan.fuels import FOSSIL_FUELS, UNIT_KEY, appliance_fuel, bill_fuel, engine_fuel
from homeplan.plan.model import Plan, ProjectOption
from homeplan.planner.basis import HomeBasis, appliance_efficiency, fuel_prices
from homeplan.planner.candidates import INSTALL_ORDER, dual_fuel_backup
from homeplan.planner.peaks import MeterPeak
from homeplan.result.figures import EnergySummary

__all__ = [
    "APPLY_ORDER",
    "Choice",
    "StateEnergy",
    "heat_pump_backup",
    "heat_pump_class",
    "heat_pump_spec",
    "heat_pump_selection",
    "peak_fields",
    "simulate_state",
    "state_spec",
    "summarise_energy",
]

APPLY_ORDER = INSTALL_ORDER
"""The order in which a state's projects are applied to the home's spec: the order of the work."""


@dataclass(frozen=True)
class Choice:
    """A project as it will be installed: which variant, what size, how much backup heat (kW)."""

    project_id: str
    kind: str
    variant: str | None
    size: float
    replaces: tuple[str, ...] = ()
    backup_kw: float = 0.0
    backup_kind: str = ""


def heat_pump_class(variant: str | None) -> str:
    """The heat pump class of a catalog variant (``single_stage`` when it names none)."""
    v = catalog.upgrade_kinds()["heat_pump"].variant(variant)
    return (v.hp_class if v is not None else None) or "single_stage"


def heat_pump_spec(variant: str | None, tons: float, strips_kw: float, backup_fuel: str | None = None,
                   backup_afue: float = 1.0) -> HeatPumpSpec:
    """A new heat pump of ``tons`` nominal 47 F capacity with its class's ratings; its backup is a
    kept furnace or boiler burning ``backup_fuel`` (engine fuel name) at ``backup_afue``, else
    electric resistance when it has backup kW, else none."""
    if backup_fuel is not None:
        return HeatPumpSpec.typical(heat_pump_class(variant), tons * 12000.0, backup=backup_fuel,
                                    backup_afue=backup_afue)
    backup = "resistance" if strips_kw > 0 else "none"
    return HeatPumpSpec.typical(heat_pump_class(variant), tons * 12000.0, backup=backup)


def heat_pump_backup(variant: str | None, tons: float, design_load_btuh: float,
                     design_temp_f: float) -> tuple[float, str]:
    """Electric backup heat a new heat pump needs: (kW, kind), kind ``strips`` (in the air
    handler of a ducted system) or ``heaters`` (baseboard or wall heaters, without ducts).

    When the unit's capacity at the design temperature is below the design load - or the design
    temperature is below its cut-out, where it gives none - the shortfall is covered by electric
    resistance heat, in steps of ``hp_backup_step_kw``; a variant's own strips count towards it.

    References
    ----------
    ACCA Manual S (supplemental heat for the design-condition shortfall of a heat pump); DOE
    10 CFR 430 Subpart B Appendix M1 rating points (capacity at the design temperature, via
    :func:`homeplan.energy.heating.hp_capacity_btuh`); 1 kW = 3,412.14 Btu/h (US EIA).
    """
    p = performance()
    v = catalog.upgrade_kinds()["heat_pump"].variant(variant)
    own = float(v.strips_kw or 0.0) if v is not None else 0.0
    hp = HeatPumpSpec.typical(heat_pump_class(variant), tons * 12000.0)
    shortfall = design_load_btuh - float(hp_capacity_btuh(hp, np.array([design_temp_f]))[0])
    kind = "heaters" if heat_pump_class(variant) == "ductless" else "strips"
    if shortfall <= 0:
        return own, "strips" if own else ""
    step = p["hp_backup_step_kw"]
    need = math.ceil(shortfall / 3412.14 / step - 1e-9) * step
    return max(own, need), kind


def heat_pump_selection(plan: Plan, basis: HomeBasis, variant: str | None) -> HeatPumpSelection:
    """The catalog size of the variant's heat pump class for the home's design loads.

    The heating load is the fitted home's load at the heating design temperature; the cooling
    load a block load at the cooling design temperature from the same heat loss, the floor area
    and the occupants. The size follows ACCA Manual S (never the size of today's air
    conditioner): see :func:`homeplan.energy.selection.select_heat_pump`. Half-ton steps,
    1.5-5 t (``hp_min_btuh``, ``hp_max_btuh``; larger homes need two systems).

    References
    ----------
    ACCA Manual S (equipment selection); ACCA Manual J (8th ed.) cooling design conditions
    (from memory).
    """
    p = performance()
    w = basis.weather
    cooling = 0.0
    if w.cooling_design_f is not None:
        cooling = design_cooling_load(float(basis.calibration.ua_btuh_f), float(w.cooling_design_f),
                                      plan.home.floor_area_ft2, float(plan.home.occupants)).total_btuh
    return select_heat_pump(basis.design_load_btuh, cooling, float(w.heating_design_f),
                            heat_pump_class(variant), float(w.hdd65), float(w.cdd65),
                            min_btuh=p["hp_min_btuh"], max_btuh=p["hp_max_btuh"])


def _with_quoted_ratings(hp: HeatPumpSpec, opt: ProjectOption | None) -> HeatPumpSpec:
    """Apply the ratings of the quoted equipment (plan options) to a catalog heat pump.

    HSPF2 scales the COP curve (seasonal COP = HSPF2 / 3.412, HSPF2 being Btu per Wh under DOE
    10 CFR 430 Subpart B Appendix M1); a COP or a
    capacity at 5 F from the equipment's data sheet replaces the 5 F rating point.
    """
    if opt is None:
        return hp
    changes = {}
    if opt.hspf2:
        # seasonal COP of the catalog curve, approximated by the mean of its 47 F and 17 F points
        seasonal_cop = (hp.cop_47 + hp.cop_17) / 2.0
        k = (opt.hspf2 / 3.412) / seasonal_cop
        changes.update(cop_47=hp.cop_47 * k, cop_17=hp.cop_17 * k, cop_5=max(1.0, hp.cop_5 * k))
    if opt.cop_5f:
        changes["cop_5"] = opt.cop_5f
    if opt.capacity_5f_pct:
        changes["capacity_5_btuh"] = hp.capacity_47_btuh * opt.capacity_5f_pct / 100.0
    if opt.seer2:
        changes["seer2"] = opt.seer2
    return replace(hp, **changes) if changes else hp


def _share_charger(vehicles: list[VehicleSpec], done: Iterable[Choice]) -> list[VehicleSpec]:
    """EVs charge at the planned charger's power (amps x 240 V), shared when there are several.

    References
    ----------
    SAE J1772 Level 2 (240 V); NEC 625.42 (the charger's rating is its continuous current).
    """
    done = list(done)
    charger = next((c for c in done if c.kind == "ev_charger"), None)
    evs = [i for i, v in enumerate(vehicles) if v.fuel == "electricity"]
    if charger is None or not evs:
        return vehicles
    v = catalog.upgrade_kinds()["ev_charger"].variant(charger.variant)
    kw = (v.amps if v and v.amps else 32.0) * 240.0 / 1000.0
    out = list(vehicles)
    for i in evs:
        out[i] = replace(out[i], charger_kw=kw / len(evs))
    return out


def state_spec(basis: HomeBasis, plan: Plan, done: Iterable[Choice], label: str = "") -> HomeEnergySpec:
    """The home's energy spec after the projects in ``done``."""
    done = list(done)

    spec = basis.base
    kinds = catalog.upgrade_kinds()
    p = performance()
    closed: set[str] = set()
    vehicles = list(spec.vehicles)
    gas_open = spec.gas_service_open
    for c in done:
        k = c.kind
        if k == "heat_pump":
            kept = dual_fuel_backup(plan) if c.backup_kind == "existing" else None
            if kept is not None:
                hp = heat_pump_spec(c.variant, c.size, 0.0, engine_fuel(appliance_fuel(kept)),
                                    appliance_efficiency(kept))
            else:
                hp = heat_pump_spec(c.variant, c.size, c.backup_kw)
            hp = _with_quoted_ratings(hp, plan.options.get(c.project_id))
            spec = with_heat_pump(spec, hp)
        elif k == "heat_pump_water_heater":
            uef = p["hpwh_120v_uef"] if c.variant == "v120" else p["hpwh_240v_uef"]
            opt = plan.options.get(c.project_id)
            uef = opt.uef if opt is not None and opt.uef else uef
            spec = replace(spec, water_heater=WaterHeaterSpec.heat_pump(uef))
        elif k == "induction_range":
            useful = spec.cooking.useful_kwh if spec.cooking else None
            spec = replace(spec, cooking=CookingSpec(kind="induction", useful_kwh_per_yr=useful))
        elif k == "heat_pump_dryer":
            # the household's own number of loads (fitted to its bills) carries over
            loads = spec.dryer.loads_per_yr if spec.dryer else None
            spec = replace(spec, dryer=DryerSpec(kind="heat_pump", loads_per_yr=loads))
        elif k == "ev":
            key = c.replaces[0]
            idx = next(i for i, _ in enumerate(plan.vehicles) if plan.vehicle_key(i) == key)
            veh = plan.vehicles[idx]
            vehicles[idx] = VehicleSpec(fuel="electricity", miles_per_yr=veh.miles_per_year,
                                        kwh_per_mile=p[f"ev_kwh_per_mile_{veh.body}"])
        elif k == "solar":
            roof = plan.home.roof
            spec = replace(spec, solar=SolarArraySpec(
                dc_kw=c.size, tilt_deg=roof.tilt_deg if roof else 25.0,
                azimuth_deg=roof.azimuth_deg if roof else 180.0))
        elif k == "battery":
            spec = replace(spec, battery=BatterySpec(capacity_kwh=c.size,
                                                     power_kw=p["battery_default_kw"] * c.size / p["battery_default_kwh"]))
        elif k == "envelope":
            cut = float(kinds["envelope"].extra.get("heat_loss_cut_pct", 15)) / 100.0
            spec = replace(spec, ua_btuh_f=spec.ua_btuh_f * (1.0 - cut))
        elif k == "close_gas":
            gas_open = False
        elif k == "remove_propane_tank":
            closed.add("propane")
        elif k == "remove_oil_tank":
            closed.add("oil")
    if spec.cooling is None and any(c.kind == "heat_pump" for c in done):
        spec = replace(spec, cooling=CoolingSpec(seer2=spec.heating.seer2))
    vehicles = _share_charger(vehicles, done)
    accounts = tuple(f for f in spec.fuel_accounts_open if bill_fuel(f) not in closed)
    spec = replace(spec, vehicles=tuple(vehicles), fuel_prices=fuel_prices(plan, closed),
                   fuel_accounts_open=accounts, label=label or spec.label)
    if not gas_open and "natural_gas" not in spec.fuels_used():
        spec = replace(spec, gas_service_open=False)
    return spec


def simulate_state(basis: HomeBasis, spec: HomeEnergySpec) -> EnergyResult:
    """The hourly typical year of one state of the home."""
    return simulate(spec, basis.site)


@dataclass(frozen=True)
class StateEnergy:
    """What the roadmap needs from one simulated state (annual figures at today's prices)."""

    bills_usd: dict[str, float]        # by bill fuel: electricity, gas, propane, oil, gasoline, diesel
    units: dict[str, float]            # electricity_kwh, gas_therm, ...
    emissions_kg: float
    peak_kw: float
    summary: EnergySummary
    peak: MeterPeak | None = None      # the peak a meter would show in this state


def peak_fields(state: StateEnergy) -> dict[str, float]:
    """A state's peak demand as a meter would show it, as YearTotals fields (none when unknown)."""
    if state.peak is None:
        return {}
    return {"peak_demand_kw": round(state.peak.kw, 2), "peak_demand_winter_kw": round(state.peak.winter_kw, 2),
            "peak_demand_summer_kw": round(state.peak.summer_kw, 2)}


def summarise_energy(result: EnergyResult, label: str, peak: MeterPeak | None = None) -> StateEnergy:
    """The annual and monthly figures of a simulated state, keyed by the result's fuel names."""
    monthly = {UNIT_KEY[f]: tuple(float(x) for x in v) for f, v in result.monthly_units.items()
               if f in UNIT_KEY}
    monthly["solar_kwh"] = tuple(float(x) for x in result.monthly_solar_kwh)
    monthly["grid_import_kwh"] = tuple(float(x) for x in result.monthly_grid_import_kwh)
    monthly["grid_export_kwh"] = tuple(float(x) for x in result.monthly_grid_export_kwh)
    annual = {k: float(sum(v)) for k, v in monthly.items()}
    bills = {bill_fuel(f): float(v.sum()) for f, v in result.monthly_bills_usd.items()
             if bill_fuel(f) is not None}
    emissions = float(sum(result.emissions_kg.values()))
    money_out = sum(v for f, v in bills.items() if f in FOSSIL_FUELS)
    summary = EnergySummary(label=label, monthly=monthly, annual=annual, bills_usd=bills,
                            emissions_kg=emissions, peak_kw=float(result.peak_kw),
                            fuel_money_out_usd=money_out, peak_winter_kw=float(result.peak_winter_kw),
                            peak_summer_kw=float(result.peak_summer_kw),
                            backup_heat_hours=int(result.backup_heat_hours),
                            peak_demand_kw=peak.kw if peak else None,
                            peak_demand_winter_kw=peak.winter_kw if peak else None,
                            peak_demand_summer_kw=peak.summer_kw if peak else None)
    units = {UNIT_KEY[f]: float(v.sum()) for f, v in result.monthly_units.items() if f in UNIT_KEY}
    return StateEnergy(bills_usd=bills, units=units, emissions_kg=emissions,
                       peak_kw=float(result.peak_kw), summary=summary, peak=peak)
