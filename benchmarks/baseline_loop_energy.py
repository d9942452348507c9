"""Baseline for bench_energy.py: the hourly model of homeplan.energy.simulate written as a plain
per-hour Python loop (no numpy inside the loop), by a competent hand.

What it shares with ``simulate`` is what ``simulate`` itself reads from the per-home
:class:`~homeplan.energy.simulate.SiteCache` without computing anything for the plan state: the
hourly outdoor temperature, the daily mains water temperature, the hourly energy price of the
tariff and the solar array's AC output per kWdc (weather and array shape only; its PVWatts chain is
checked against pvlib in tests/energy/test_energy_solar.py). Annual ratings of the appliances
(``cooking_annual_input`` and friends) and the data tables are read as ``simulate`` reads them.
Everything that depends on the plan state is computed here, hour by hour.

Everything that does not change from hour to hour is computed once before the loop: the spec's
fields and unit conversions, the heat pump's rating-line slopes and cut-off, the loads that are
the same every day (cooking, drying, vehicle charging, plug loads: one 24-value profile), the water
heating of each day, the battery's limits, and the fuel that only ever adds up (cooking, drying,
water and heating fuel are summed in Btu or units and converted once). The loop runs month by
month and day by day, so the month and the day are never looked up per hour.

It is also the independent implementation that tests/energy/test_baseline_loop.py holds the
vectorised model to.
"""

from __future__ import annotations

import math

from homeplan.energy import timegrid
from homeplan.energy._data import constant, hourly_profile
from homeplan.energy.appliances import cooking_annual_input, dryer_annual_input
from homeplan.energy.heating import FurnaceSpec, HeatPumpSpec, ResistanceHeatSpec
from homeplan.energy.units import btu_per_kwh, btu_per_unit
from homeplan.energy.vehicles import vehicle_annual_input

__all__ = ["simulate_loop"]

_NONE, _FURNACE, _RESISTANCE, _HEAT_PUMP = 0, 1, 2, 3


def _charging_day(daily_kwh: float, start_hour: int, charger_kw: float) -> list[float]:
    """One day's charging by hour of day: full power from ``start_hour`` until the day's energy is
    in, wrapping past midnight; a day longer than 24 h of charging spreads the rest evenly."""
    day = [0.0] * 24
    left = daily_kwh
    for k in range(24):
        step = min(charger_kw, max(left, 0.0))
        day[(start_hour + k) % 24] = step
        left -= charger_kw
    if daily_kwh > charger_kw * 24:
        extra = (daily_kwh - charger_kw * 24) / 24.0
        day = [x + extra for x in day]
    return day


def simulate_loop(spec, cache) -> dict[str, object]:  # noqa: C901, PLR0912, PLR0915 - one loop
    """Annual and monthly results of the same model, computed hour by hour in pure Python.

    Parameters
    ----------
    spec : homeplan.energy.simulate.HomeEnergySpec
        The home in one plan state.
    cache : homeplan.energy.simulate.SiteCache
        The home's cache (weather-only quantities).

    Returns
    -------
    dict
        Floats: ``site_kwh``, ``grid_import_kwh``, ``grid_export_kwh``, ``solar_kwh``,
        ``heating_electric_kwh``, ``cooling_kwh``, ``heating_delivered_kwh``,
        ``backup_heat_hours``, ``peak_kw``, ``peak_winter_kw``, ``peak_summer_kw``,
        ``peak_import_kw``, ``electric_bill_usd``, ``total_bill_usd``, ``kg_co2``; ``fuel_units``
        (dict of fuel to annual trade units); ``monthly_site_kwh``, ``monthly_import_kwh``,
        ``monthly_export_kwh`` (lists of 12 kWh).
    """
    kbtu = btu_per_kwh()
    temps = spec.weather.temp_f.tolist()
    mains = cache.mains_f().tolist()
    rate = spec.electric_rate
    price = cache.price(rate).tolist()

    # --- Loads that are the same every day: one 24-hour electric profile; their fuel, summed.
    fuel_units: dict[str, float] = {}

    def add_fuel(fuel: str, units: float) -> None:
        fuel_units[fuel] = fuel_units.get(fuel, 0.0) + units

    day_kwh = [0.0] * 24
    days = timegrid.DAYS_PER_YEAR

    def spread(profile: str, annual: float, fuel: str) -> None:
        shares = hourly_profile(profile)
        if fuel == "electricity":
            for h in range(24):
                day_kwh[h] += shares[h] * (annual / days)
        else:
            add_fuel(fuel, days * sum(s * (annual / days) for s in shares))

    if spec.cooking is not None:
        fuel, units = cooking_annual_input(spec.cooking)
        spread("cooking", units, fuel)
    if spec.dryer is not None:
        for fuel, units in dryer_annual_input(spec.dryer).items():
            spread("dryer", units, fuel)
    for v in spec.vehicles:
        fuel, units = vehicle_annual_input(v)
        if fuel != "electricity":
            add_fuel(fuel, units)
            continue
        start = {"overnight": v.plug_in_hour, "solar": 10, "tou": v.window_start_hour,
                 "immediate": 18}[v.schedule]
        for h, kwh in enumerate(_charging_day(units / days, start, v.charger_kw)):
            day_kwh[h] += kwh
    if spec.plug_kwh_per_yr > 0:
        spread("plug", spec.plug_kwh_per_yr, "electricity")

    # --- Water heating: the input of each day (mains temperature) times the draw profile.
    water_day = [0.0] * days
    water_shares = hourly_profile("water")
    water_elec = False
    wh = spec.water_heater
    if wh is not None:
        k = spec.gal_per_day * constant("lb_per_gallon_water") / wh.uef / btu_per_unit(wh.fuel)
        water_day = [k * max(wh.setpoint_f - t, 0.0) for t in mains]
        water_elec = wh.fuel == "electricity"
        if not water_elec:
            add_fuel(wh.fuel, sum(u * s for u in water_day for s in water_shares))

    # --- Heating and cooling: coefficients of the hourly degree-hour model.
    hs = spec.heating
    ua = spec.ua_btuh_f
    kind = _NONE
    if hs is not None and ua > 0:
        if isinstance(hs, HeatPumpSpec):
            kind = _HEAT_PUMP
        elif isinstance(hs, ResistanceHeatSpec):
            kind = _RESISTANCE
        elif isinstance(hs, FurnaceSpec):
            kind = _FURNACE
        else:
            raise TypeError(f"unknown heating spec {type(hs).__name__}")
    h_bal = spec.heating_balance_f
    res_k = aux_k = 0.0
    if kind == _RESISTANCE:
        res_k = 1.0 / (hs.efficiency * kbtu)
    elif kind == _FURNACE:
        aux_k = hs.aux_kwh_per_therm_out / 1e5
    hp_backup_elec = hp_backup_fuel = hp_cycling = False
    if kind == _HEAT_PUMP:
        c5, c17, c47 = hs.capacity_5_btuh, hs.capacity_17_btuh, hs.capacity_47_btuh
        cs_lo, cs_hi = (c17 - c5) / 12.0, (c47 - c17) / 30.0
        p5, p17, p47 = hs.cop_5, hs.cop_17, hs.cop_47
        ps_lo, ps_hi = (p17 - p5) / 12.0, (p47 - p17) / 30.0
        off_below = hs.cutout_f if hs.switchover_f is None else max(hs.cutout_f, hs.switchover_f)
        cd = hs.cycling_cd
        hp_cycling = cd > 0
        hp_backup_elec = hs.backup == "resistance"
        hp_backup_fuel = hs.backup not in ("resistance", "none")
    cool_k = 0.0
    c_bal = spec.cooling_balance_f
    if spec.cooling is not None and ua > 0:
        cool_k = ua * spec.cooling_load_multiplier / (spec.cooling.seer2 * 1000.0)

    # --- Solar, battery, export limit.
    sol = spec.solar
    has_pv = sol is not None and sol.dc_kw > 0
    pv_list = cache.solar.ac_kw_per_kwdc(sol).tolist() if has_pv else []
    dc_kw = sol.dc_kw if has_pv else 0.0
    bat = spec.battery
    has_bat = bat is not None and bat.capacity_kwh > 0
    tou_bat = False
    if has_bat:
        eta = math.sqrt(bat.round_trip_eff)
        p_kw = bat.power_kw
        lo, hi = bat.reserve_frac * bat.capacity_kwh, bat.capacity_kwh
        soc = min(max(bat.initial_frac * hi, lo), hi)
        tou_bat = bat.mode == "tou"
        charge_hour = [h in bat.charge_hours for h in range(24)]
        discharge_hour = [h in bat.discharge_hours for h in range(24)]
    cap = math.inf if rate.export_cap_kw is None else rate.export_cap_kw
    credit_at_price = rate.export == "net_metering"

    # --- The loop: month by month, day by day, hour by hour.
    m_site = [0.0] * 12
    m_imp = [0.0] * 12
    m_exp = [0.0] * 12
    m_energy_usd = [0.0] * 12
    m_credit_usd = [0.0] * 12
    m_peak = [0.0] * 12
    heat_elec = cool_elec = delivered_btu = backup_fuel_btu = solar_kwh = peak_imp = 0.0
    backup_hours = 0
    i = 0
    d = 0
    for m, n_days in enumerate(timegrid.MONTH_DAYS):
        site = imp_sum = exp_sum = energy_usd = credit_usd = peak = 0.0
        for _ in range(n_days):
            w_units = water_day[d]
            d += 1
            for h in range(24):
                t = temps[i]
                elec = day_kwh[h]
                if water_elec:
                    elec += w_units * water_shares[h]
                if kind and t < h_bal:
                    load = ua * (h_bal - t)
                    delivered_btu += load
                    if kind == _HEAT_PUMP:
                        if t < off_below:
                            cap_h = 0.0
                        else:
                            cap_h = c5 + (t - 5.0) * cs_lo if t < 17.0 else c17 + (t - 17.0) * cs_hi
                            if cap_h < 0.0:
                                cap_h = 0.0
                        q = load if load < cap_h else cap_h
                        e = 0.0
                        if q > 0.0:
                            cop = p5 + (t - 5.0) * ps_lo if t < 17.0 else p17 + (t - 17.0) * ps_hi
                            if cop < 1.0:
                                cop = 1.0
                            if hp_cycling:
                                cop *= 1.0 - cd * (1.0 - q / cap_h)
                                if cop < 0.5:
                                    cop = 0.5
                            e = q / (cop * kbtu)
                        backup = load - q
                        if backup > 1e-9 and (hp_backup_elec or hp_backup_fuel):
                            backup_hours += 1
                        if hp_backup_elec:
                            e += backup / kbtu
                        elif hp_backup_fuel:
                            backup_fuel_btu += backup
                    elif kind == _RESISTANCE:
                        e = load * res_k
                    else:
                        e = load * aux_k
                    heat_elec += e
                    elec += e
                if cool_k and t > c_bal:
                    e = cool_k * (t - c_bal)
                    cool_elec += e
                    elec += e
                site += elec
                if elec > peak:
                    peak = elec
                if has_pv:
                    pv = pv_list[i] * dc_kw
                    net = elec - pv
                else:
                    pv = 0.0
                    net = elec
                if has_bat:
                    c_req = -net if net < 0.0 else 0.0
                    if c_req > p_kw:
                        c_req = p_kw
                    d_req = net if net > 0.0 else 0.0
                    if d_req > p_kw:
                        d_req = p_kw
                    if tou_bat:
                        if charge_hour[h]:
                            c_req = p_kw
                        if not discharge_hour[h]:
                            d_req = 0.0
                    new = soc + c_req * eta - d_req / eta
                    if new < lo:
                        new = lo
                    if new > hi:
                        new = hi
                    ds = new - soc
                    soc = new
                    net += ds / eta if ds > 0.0 else ds * eta
                if net > 0.0:
                    imp_sum += net
                    energy_usd += net * price[i]
                    if net > peak_imp:
                        peak_imp = net
                elif net < 0.0:
                    exp = -net
                    if exp > cap:
                        pv -= exp - cap
                        exp = cap
                    exp_sum += exp
                    if credit_at_price:
                        credit_usd += exp * price[i]
                solar_kwh += pv
                i += 1
        m_site[m], m_imp[m], m_exp[m], m_peak[m] = site, imp_sum, exp_sum, peak
        m_energy_usd[m] = energy_usd
        m_credit_usd[m] = credit_usd if credit_at_price else (
            exp_sum * rate.export_usd_per_kwh if rate.export == "net_billing" else 0.0)

    # --- Fuel that only adds up, converted once.
    if kind == _FURNACE:
        add_fuel(hs.fuel, delivered_btu / (hs.afue * btu_per_unit(hs.fuel)))
    elif kind == _HEAT_PUMP and hp_backup_fuel:
        add_fuel(hs.backup, backup_fuel_btu / (hs.backup_afue * btu_per_unit(hs.backup)))
    if spec.gas_service_open:
        fuel_units.setdefault("natural_gas", 0.0)
    for fuel in spec.fuel_accounts_open:
        fuel_units.setdefault(fuel, 0.0)

    # --- Bills: monthly netting with carried credit, minimum bill, true-up; fuel bills.
    bank = 0.0
    electric_usd = 0.0
    floor = rate.min_bill_usd
    for m in range(12):
        v = m_energy_usd[m] - m_credit_usd[m] - bank
        bank = -v if v < 0.0 else 0.0
        electric_usd += max(max(v, 0.0) + rate.fixed_usd_per_month, floor)
    imp_kwh, exp_kwh = sum(m_imp), sum(m_exp)
    if rate.export == "net_metering" and bank > 0.0:
        electric_usd -= max(exp_kwh - imp_kwh, 0.0) * rate.true_up_usd_per_kwh
    total_usd = electric_usd
    for fuel, units in fuel_units.items():
        price_f = spec.fuel_prices.get(fuel)
        open_ = spec.gas_service_open if fuel == "natural_gas" else (
            units > 0 or fuel in spec.fuel_accounts_open)
        total_usd += units * price_f.usd_per_unit + (12 * price_f.fixed_usd_per_month if open_ else 0.0)
    factors = spec.emission_factors
    kg = (imp_kwh - exp_kwh) * factors.for_fuel("electricity")
    kg += sum(units * factors.for_fuel(fuel) for fuel, units in fuel_units.items())

    winter = [m_peak[m - 1] for m in timegrid.WINTER_MONTHS]
    summer = [m_peak[m - 1] for m in timegrid.SUMMER_MONTHS]
    return {
        "site_kwh": sum(m_site),
        "grid_import_kwh": imp_kwh,
        "grid_export_kwh": exp_kwh,
        "solar_kwh": solar_kwh,
        "heating_electric_kwh": heat_elec,
        "cooling_kwh": cool_elec,
        "heating_delivered_kwh": delivered_btu / kbtu,
        "backup_heat_hours": backup_hours,
        "peak_kw": max(m_peak),
        "peak_winter_kw": max(winter),
        "peak_summer_kw": max(summer),
        "peak_import_kw": peak_imp,
        "electric_bill_usd": electric_usd,
        "total_bill_usd": total_usd,
        "kg_co2": kg,
        "fuel_units": fuel_units,
        "monthly_site_kwh": m_site,
        "monthly_import_kwh": m_imp,
        "monthly_export_kwh": m_exp,
    }


def bench_states(weather):
    """The two invented states bench_energy.py times: a gas home, and the same home all-electric
    with a heat pump, heat pump water heater, induction, heat pump dryer, an EV, 7 kW of solar
    and a battery."""
    from dataclasses import replace

    from homeplan.energy.appliances import CookingSpec, DryerSpec
    from homeplan.energy.battery import BatterySpec
    from homeplan.energy.heating import CoolingSpec, size_heat_pump
    from homeplan.energy.simulate import HomeEnergySpec, with_heat_pump
    from homeplan.energy.solar import SolarArraySpec
    from homeplan.energy.vehicles import VehicleSpec
    from homeplan.energy.water import WaterHeaterSpec

    base = HomeEnergySpec(weather=weather, ua_btuh_f=450.0, cooling=CoolingSpec(13.4),
                          vehicles=(VehicleSpec(),), label="invented demo home")
    hp = size_heat_pump(base.design_heating_load_btuh, float(weather.heating_design_f))
    electric = replace(
        with_heat_pump(base, hp), water_heater=WaterHeaterSpec.heat_pump(),
        cooking=CookingSpec("induction"), dryer=DryerSpec("heat_pump"),
        vehicles=(VehicleSpec("electricity"),), solar=SolarArraySpec(7.0),
        battery=BatterySpec(), gas_service_open=False,
    )
    return base, electric
