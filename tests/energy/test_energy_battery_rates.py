"""Battery dispatch and electric/fuel bills."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from homeplan.energy import timegrid
from homeplan.energy.battery import BatterySpec, clamped_cumsum, dispatch
from homeplan.energy.rates import (
    ElectricRate,
    FuelPrice,
    TouPeriod,
    electric_bill,
    fuel_bill,
    hourly_price,
)


@settings(max_examples=60, deadline=None)
@given(st.lists(st.floats(-20, 20), min_size=1, max_size=300), st.floats(0, 5),
       st.floats(0, 20), st.floats(0, 1))
def test_clamped_cumsum_equals_loop(xs, lo, span, start):
    hi = lo + span
    s0 = lo + start * span
    ref, s = [], s0
    for x in xs:  # the textbook recursion (reference)
        s = min(max(s + x, lo), hi)
        ref.append(s)
    np.testing.assert_allclose(clamped_cumsum(np.array(xs), lo, hi, s0), ref, atol=1e-9)


@pytest.mark.parametrize("quiet_hours", [0, 3000])
def test_clamped_cumsum_equals_loop_over_a_year(quiet_hours):
    """A year of daily fill-and-drain cycles (every window of a few days hits a bound, so the
    scan may stop early), optionally ending in a long stretch of tiny steps that never hits one."""
    rng = np.random.default_rng(7)
    day = np.r_[np.full(8, -1.5), np.full(6, 3.0), np.full(10, -2.0)]
    xs = np.tile(day, 365) + rng.normal(0, 0.3, 8760)
    if quiet_hours:
        xs[-quiet_hours:] = rng.normal(0, 0.001, quiet_hours)
    ref, s = [], 6.75
    for x in xs.tolist():  # the textbook recursion (reference)
        s = min(max(s + x, 2.7), 13.5)
        ref.append(s)
    np.testing.assert_allclose(clamped_cumsum(xs, 2.7, 13.5, 6.75), ref, atol=1e-9)


def test_round_trip_efficiency_day():
    # Definition of AC round-trip efficiency: 10 kWh stored -> 0.9 x 10 kWh delivered.
    net = np.zeros(48)
    net[10:15] = -2.0  # 10 kWh surplus at midday
    net[18:23] = 2.0  # 10 kWh evening load
    spec = BatterySpec(capacity_kwh=20, power_kw=5, round_trip_eff=0.9, reserve_frac=0.0,
                       initial_frac=0.0)
    b = dispatch(spec, net, np.tile(np.arange(24), 2))
    assert b.charge_kwh.sum() == pytest.approx(10.0)
    assert b.discharge_kwh.sum() == pytest.approx(9.0)


def test_limits_and_conservation():
    rng = np.random.default_rng(0)
    net = rng.normal(0, 4, 8760)
    spec = BatterySpec(capacity_kwh=13.5, power_kw=5, round_trip_eff=0.9, reserve_frac=0.2)
    b = dispatch(spec, net, timegrid.hour_of_day())
    eta = 0.9 ** 0.5
    assert b.soc_kwh.min() >= 0.2 * 13.5 - 1e-9 and b.soc_kwh.max() <= 13.5 + 1e-9
    assert b.charge_kwh.max() <= 5 + 1e-9 and b.discharge_kwh.max() <= 5 + 1e-9
    s0 = 0.5 * 13.5
    stored = b.charge_kwh.sum() * eta - b.discharge_kwh.sum() / eta
    assert stored == pytest.approx(b.soc_kwh[-1] - s0)  # energy conservation
    # self-consumption never exports from the battery nor charges from the grid
    assert (b.discharge_kwh <= np.maximum(net, 0) + 1e-9).all()
    assert (b.charge_kwh <= np.maximum(-net, 0) + 1e-9).all()


def test_tou_mode_charges_off_peak_and_discharges_on_peak():
    net = np.ones(8760)
    spec = BatterySpec(mode="tou", charge_hours=(1, 2, 3), discharge_hours=(17, 18, 19))
    hod = timegrid.hour_of_day()
    b = dispatch(spec, net, hod)
    assert b.charge_kwh[~np.isin(hod, (1, 2, 3))].max() == 0
    assert b.discharge_kwh[~np.isin(hod, (17, 18, 19))].max() == 0
    assert b.discharge_kwh.sum() > 0


def test_tou_prices():
    rate = ElectricRate(usd_per_kwh=0.20, tou_periods=(
        TouPeriod("peak", 0.45, (16, 17, 18, 19, 20), months=(6, 7, 8, 9), weekdays_only=True),))
    p = hourly_price(rate)
    # 2023-07-03 (Monday) 17:00 is peak; 2023-07-02 (Sunday) 17:00 and January 17:00 are not
    assert p[(183 * 24) + 17] == 0.45
    assert p[(182 * 24) + 17] == 0.20
    assert p[17] == 0.20


def _hours_in_month(month: int) -> np.ndarray:
    return timegrid.hour_month() == month


def test_net_metering_monthly_netting_and_true_up():
    # Zinaman et al. (2017) NREL/BR-6A20-68469: monthly netting, credits carried, annual true-up.
    imp = np.zeros(8760)
    exp = np.zeros(8760)
    jan, may, jun = _hours_in_month(1), _hours_in_month(5), _hours_in_month(6)
    imp[jan] = 500 / jan.sum()
    exp[jan] = 100 / jan.sum()
    exp[may] = 300 / may.sum()
    imp[may] = 100 / may.sum()
    imp[jun] = 150 / jun.sum()
    rate = ElectricRate(usd_per_kwh=0.20, fixed_usd_per_month=10.0, true_up_usd_per_kwh=0.03)
    bill = electric_bill(rate, imp, exp)
    # hand computation: Jan (500 - 100) x 0.20 + 10 = 90; May credit 40 > 0 -> 10, carry 40;
    # Jun 150 x 0.20 = 30 - 30 of credit -> 10, carry 10 (forfeited: annual net import > 0)
    assert bill.total_usd[0] == pytest.approx(90.0)
    assert bill.total_usd[4] == pytest.approx(10.0)
    assert bill.total_usd[5] == pytest.approx(10.0)
    assert bill.annual_usd == pytest.approx(90 + 11 * 10)
    assert bill.true_up_payout_usd == 0.0


def test_net_metering_true_up_pays_annual_surplus():
    imp = np.full(8760, 0.5)
    exp = np.full(8760, 0.6)
    rate = ElectricRate(usd_per_kwh=0.20, fixed_usd_per_month=10.0, true_up_usd_per_kwh=0.03)
    bill = electric_bill(rate, imp, exp)
    # 876 kWh annual surplus x $0.03 paid at the true-up (NREL/BR-6A20-68469 design)
    assert bill.true_up_payout_usd == pytest.approx(876 * 0.03)
    assert bill.annual_usd == pytest.approx(120 - 876 * 0.03)


def test_net_billing_exports_at_export_rate():
    imp = np.full(8760, 1.0)
    exp = np.full(8760, 0.5)
    rate = ElectricRate(usd_per_kwh=0.20, fixed_usd_per_month=0.0, export="net_billing",
                        export_usd_per_kwh=0.05)
    bill = electric_bill(rate, imp, exp)
    assert bill.annual_usd == pytest.approx(8760 * 0.20 - 4380 * 0.05)


def test_gas_fixed_charge_until_service_closed():
    # common practice, no source: a utility's fixed monthly customer charge is billed while the
    # account (the gas service) is open and ends when it is closed
    price = FuelPrice(1.40, 15.0)
    assert fuel_bill(price, np.zeros(12), service_open=True).sum() == pytest.approx(180.0)
    assert fuel_bill(price, np.zeros(12), service_open=False).sum() == 0.0
    assert fuel_bill(price, np.full(12, 10.0), True)[0] == pytest.approx(29.0)


def test_battery_windows_follow_the_tariff():
    # DiOrio et al. (2015) NREL/TP-6A20-64641, time-of-use dispatch: discharge in the dearest
    # hours; charge from the grid in the cheapest only when the spread pays for the losses
    # (price_low < price_high x round-trip efficiency)
    from homeplan.energy.rates import battery_windows

    peak = TouPeriod("peak", 0.45, (16, 17, 18, 19, 20))
    night = TouPeriod("night", 0.10, (0, 1, 2, 3, 4, 5))
    charge, discharge = battery_windows(ElectricRate(usd_per_kwh=0.20, tou_periods=(peak, night)), 0.90)
    assert discharge == (16, 17, 18, 19, 20) and charge == (0, 1, 2, 3, 4, 5)
    # 0.42 x 0.90 < 0.40: a spread too small for the losses, no grid charging
    charge, discharge = battery_windows(
        ElectricRate(usd_per_kwh=0.40, tou_periods=(TouPeriod("peak", 0.42, (17, 18)),)), 0.90)
    assert charge == () and discharge == (17, 18)
    assert battery_windows(ElectricRate(usd_per_kwh=0.20)) is None
