"""Bill calibration: UA and design heating load."""

from __future__ import annotations

import numpy as np
import pytest

from homeplan.energy.calibrate import (
    calibrate_annual,
    calibrate_from_floor_area,
    calibrate_regression,
    calibrate_summer_baseload,
    design_heating_load_btuh,
    ua_from_heating_fuel,
)

DAYS = np.array([31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31], float)
# Monthly HDD65 shape of a cold climate totalling 6,000 (invented, plausible).
HDD_M = np.array([1150, 950, 800, 480, 200, 40, 0, 0, 90, 400, 750, 1140], float)


def test_degree_day_method_by_hand():
    # Degree-day method (ASHRAE Handbook - Fundamentals 2021, ch. 19 "Energy Estimating and Modeling
    # Methods": heating energy = 24 UA HDD / efficiency), worked by hand: 1,000 therm/yr,
    # baseload 240 therm/yr, AFUE 0.80, HDD65 6,000, T_99 = 5 F
    #   Q = (1,000 - 240) x 1e5 x 0.80 = 60.8 MMBtu; UA = 60.8e6 / (24 x 6,000) = 422.22 Btu/h-F;
    #   design load = 422.22 x (65 - 5) = 25,333 Btu/h = 7.42 kW (NIST SP 811: 3,412.14 Btu/kWh)
    cal = calibrate_annual(1000.0, 240.0, 6000.0, 5.0, 0.80)
    assert cal.heating_fuel_per_yr * 1e5 * 0.80 == pytest.approx(60.8e6)  # by hand above
    assert cal.ua_btuh_f == pytest.approx(422.22, abs=0.01)  # by hand above
    assert cal.design_load_btuh == pytest.approx(25_333, abs=1)  # by hand above
    assert cal.design_load_kw == pytest.approx(7.42, abs=0.01)  # by hand above
    assert not cal.estimated


def test_seventy_degree_base_adds_about_eight_percent():
    # A 70 F indoor design temperature (ACCA Manual J, 8th ed., from memory) against the 65 F degree-day
    # base: (70 - 5) / (65 - 5) = 65/60 = 1.083 for T_99 = 5 F (by hand).
    ua = ua_from_heating_fuel(760.0, 1e5, 0.8, 6000.0)
    ratio = design_heating_load_btuh(ua, 5.0, 70.0) / design_heating_load_btuh(ua, 5.0, 65.0)
    assert ratio == pytest.approx(1.08, abs=0.01)


def _bills(ua: float, base_per_day: float, afue: float) -> np.ndarray:
    # Degree-day method (ASHRAE Fundamentals ch. 19): fuel = 24 UA HDD / (AFUE * 1e5) + baseload
    return base_per_day * DAYS + 24 * ua * HDD_M / (afue * 1e5)


def test_summer_baseload_split_recovers_ua():
    bills = _bills(422.22, 0.66, 0.80)
    # July/August have no HDD, so a two-month baseload split is exact (the UA of the hand
    # calculation in test_degree_day_method_by_hand)
    cal = calibrate_summer_baseload(bills, DAYS, float(HDD_M.sum()), 5.0, 0.80, n_base_months=2)
    assert cal.ua_btuh_f == pytest.approx(422.22, rel=1e-6)
    assert cal.baseload_per_day == pytest.approx(0.66, rel=1e-6)
    # With three months June's 40 HDD count as baseload: the method's known small low bias.
    cal3 = calibrate_summer_baseload(bills, DAYS, float(HDD_M.sum()), 5.0, 0.80)
    assert 0.95 * 422.22 < cal3.ua_btuh_f < 422.22


def test_regression_recovers_ua_with_noise():
    rng = np.random.default_rng(3)
    bills = _bills(422.22, 0.66, 0.80) * (1 + rng.normal(0, 0.03, 12))
    cal = calibrate_regression(bills, DAYS, HDD_M, 5.0, 0.80)
    # PRISM / ASHRAE Guideline 14 change-point regression: slope gives UA within a few %.
    assert cal.ua_btuh_f == pytest.approx(422.22, rel=0.06)
    assert cal.r2 is not None and cal.r2 > 0.95
    assert cal.method == "degree-day regression"


def test_regression_needs_heating_bills():
    with pytest.raises(ValueError):
        calibrate_regression(np.ones(12), DAYS, np.zeros(12), 5.0, 0.8)


def test_floor_area_fallback_is_flagged():
    cal = calibrate_from_floor_area(2000.0, 5.0, "pre1980")
    assert cal.estimated
    # common practice, no source: 0.30 Btu/h-F-ft2 for an older house -> 600 Btu/h-F
    assert cal.ua_btuh_f == pytest.approx(600.0)
    assert cal.design_load_btuh == pytest.approx(600.0 * 60)
