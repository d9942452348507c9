"""Baseline for bench_energy.py: the same hourly model as homeplan.energy.simulate written as a
straightforward per-hour Python loop (no numpy vectorisation). Weather-only quantities (solar
position, POA irradiance, cell temperature) come from the same per-home cache, as they would in
any sensible implementation; everything that depends on the state is computed hour by hour.
"""

from __future__ import annotations

import math

from homeplan.energy import timegrid
from homeplan.energy._data import constant, hourly_profile
from homeplan.energy.appliances import cooking_annual_input, dryer_annual_input
from homeplan.energy.heating import FurnaceSpec, HeatPumpSpec, ResistanceHeatSpec
from homeplan.energy.solar import default_losses_pct
from homeplan.energy.units import btu_per_kwh, btu_per_unit
from homeplan.energy.vehicles import vehicle_annual_input


def _pw(t: float, v5: float, v17: float, v47: float) -> float:
    if t < 17.0:
        return v5 + (t - 5.0) * (v17 - v5) / 12.0
    return v17 + (t - 17.0) * (v47 - v17) / 30.0


def simulate_loop(spec, cache) -> dict[str, float]:  # noqa: C901 - deliberately naive
    """Annual totals of the same model, computed hour by hour in pure Python."""
    w = spec.weather
    kbtu = btu_per_kwh()
    temps = w.temp_f.tolist()
    hod = timegrid.hour_of_day().tolist()
    month = timegrid.hour_month().tolist()
    mains = cache.mains_f().tolist()
    price = cache.price(spec.electric_rate).tolist()
    water_prof = hourly_profile("water")
    plug_prof = hourly_profile("plug")
    cook_prof = hourly_profile("cooking")
    dry_prof = hourly_profile("dryer")
    lbw = constant("lb_per_gallon_water")
    gal = spec.gal_per_day
    cook_fuel, cook_units = cooking_annual_input(spec.cooking) if spec.cooking else ("electricity", 0.0)
    dry = dryer_annual_input(spec.dryer) if spec.dryer else {}
    ev_daily = []
    for v in spec.vehicles:
        fuel, units = vehicle_annual_input(v)
        if fuel == "electricity":
            ev_daily.append((units / 365.0, v))
    if spec.solar is not None:
        g, tc = cache.solar.poa_and_cell_temp(spec.solar)
        g, tc = g.tolist(), tc.tolist()
        losses = default_losses_pct() if spec.solar.losses_pct is None else spec.solar.losses_pct
        pdc0_inv = spec.solar.dc_kw / spec.solar.dc_ac_ratio / spec.solar.inverter_eff_nom
    bat = spec.battery
    if bat is not None:
        eta = math.sqrt(bat.round_trip_eff)
        lo, hi = bat.reserve_frac * bat.capacity_kwh, bat.capacity_kwh
        soc = min(max(bat.initial_frac * hi, lo), hi)
    totals = {"electricity": 0.0, "import": 0.0, "export": 0.0, "solar": 0.0, "fuel": 0.0}
    m_energy = [0.0] * 12
    m_credit = [0.0] * 12
    peak = 0.0
    h_spec = spec.heating
    for i in range(timegrid.HOURS_PER_YEAR):
        t = temps[i]
        h = hod[i]
        elec = 0.0
        fuel = 0.0
        load = spec.ua_btuh_f * max(spec.heating_balance_f - t, 0.0)
        if isinstance(h_spec, HeatPumpSpec):
            cap = max(_pw(t, h_spec.capacity_5_btuh, h_spec.capacity_17_btuh, h_spec.capacity_47_btuh), 0.0)
            if t < h_spec.cutout_f or (h_spec.switchover_f is not None and t < h_spec.switchover_f):
                cap = 0.0
            q = min(load, cap)
            cop = max(_pw(t, h_spec.cop_5, h_spec.cop_17, h_spec.cop_47), 1.0)
            if h_spec.cycling_cd > 0:
                plr = q / cap if cap > 0 else 0.0
                cop = max(cop * (1 - h_spec.cycling_cd * (1 - plr)), 0.5)
            elec += q / (cop * kbtu)
            if h_spec.backup == "resistance":
                elec += (load - q) / kbtu
            elif h_spec.backup != "none":
                fuel += (load - q) / (h_spec.backup_afue * btu_per_unit(h_spec.backup))
        elif isinstance(h_spec, ResistanceHeatSpec):
            elec += load / (h_spec.efficiency * kbtu)
        elif isinstance(h_spec, FurnaceSpec):
            fuel += load / (h_spec.afue * btu_per_unit(h_spec.fuel))
        if spec.cooling is not None:
            elec += (spec.ua_btuh_f * spec.cooling_load_multiplier * max(t - spec.cooling_balance_f, 0.0)
                     / (spec.cooling.seer2 * 1000))
        if spec.water_heater is not None:
            rise = max(spec.water_heater.setpoint_f - mains[i // 24], 0.0)
            u = gal * lbw * rise / spec.water_heater.uef / btu_per_unit(spec.water_heater.fuel)
            if spec.water_heater.fuel == "electricity":
                elec += u * water_prof[h]
            else:
                fuel += u * water_prof[h]
        if cook_fuel == "electricity":
            elec += cook_units / 365.0 * cook_prof[h]
        for f, units in dry.items():
            if f == "electricity":
                elec += units / 365.0 * dry_prof[h]
        for daily, v in ev_daily:
            start = {"overnight": v.plug_in_hour, "solar": 10, "tou": v.window_start_hour,
                     "immediate": 18}[v.schedule]
            k = (h - start) % 24
            elec += min(v.charger_kw, max(daily - v.charger_kw * k, 0.0))
        elec += spec.plug_kwh_per_yr / 365.0 * plug_prof[h]
        pv = 0.0
        if spec.solar is not None:
            pdc = g[i] * 0.001 * spec.solar.dc_kw * (1 + spec.solar.gamma_pdc * (tc[i] - 25.0))
            pdc *= 1 - losses / 100.0
            zeta = pdc / pdc0_inv
            e = spec.solar.inverter_eff_nom / 0.9637 * (-0.0162 * zeta - (0.0059 / zeta if zeta else 0.0) + 0.9858)
            pv = max(min(e * pdc, spec.solar.inverter_eff_nom * pdc0_inv), 0.0)
        net = elec - pv
        if bat is not None:
            surplus, deficit = max(-net, 0.0), max(net, 0.0)
            c_req, d_req = min(surplus, bat.power_kw), min(deficit, bat.power_kw)
            if bat.mode == "tou":
                if h in bat.charge_hours:
                    c_req = bat.power_kw
                if h not in bat.discharge_hours:
                    d_req = 0.0
            new = min(max(soc + c_req * eta - d_req / eta, lo), hi)
            ds = new - soc
            soc = new
            net += max(ds, 0.0) / eta - max(-ds, 0.0) * eta
        imp, exp = max(net, 0.0), max(-net, 0.0)
        m = month[i] - 1
        m_energy[m] += imp * price[i]
        m_credit[m] += exp * price[i]
        totals["electricity"] += elec
        totals["import"] += imp
        totals["export"] += exp
        totals["solar"] += pv
        totals["fuel"] += fuel
        peak = max(peak, elec)
    totals["peak_kw"] = peak
    totals["energy_charges_usd"] = sum(m_energy) - sum(m_credit)
    return totals
