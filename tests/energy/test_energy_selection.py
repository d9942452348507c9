"""Heat pump selection from design loads, checked against ACCA Manual S (2nd ed., 2014)
sizing bands and the DOE rating-point capacity curve."""

from __future__ import annotations

import numpy as np
import pytest

from homeplan.energy._data import heat_pump_class
from homeplan.energy.selection import design_cooling_load, select_heat_pump, with_size

# ACCA Manual S (2nd ed., 2014; from memory): total cooling capacity 90-115 % of the total
# cooling load for single-speed equipment, up to 130 % for variable-speed; up to 125 % for heat
# pumps in heating-dominated climates (HDD65 at least twice CDD65).
SINGLE_SPEED_BAND = (0.90, 1.15)
VARIABLE_SPEED_BAND = (0.90, 1.30)
HEATING_DOMINATED_TOP = 1.25


def capacity_by_rating_points(hp_class: str, nominal_btuh: float, temp_f: float) -> float:
    """Capacity linear between the 5, 17 and 47 F rating points and extrapolated below 5 F with
    the 5-17 F slope (DOE 10 CFR 430 Subpart B Appendix M1 rating points), written out here
    independently of the engine."""
    r = heat_pump_class(hp_class)
    c5, c17, c47 = r["cap_5_frac"] * nominal_btuh, r["cap_17_frac"] * nominal_btuh, nominal_btuh
    if temp_f < r["cutout_f"]:
        return 0.0
    if temp_f >= 17:
        return float(np.interp(temp_f, [17, 47], [c17, c47])) if temp_f <= 47 else c47 + (temp_f - 47) * (c47 - c17) / 30
    return c5 + (temp_f - 5) * (c17 - c5) / 12


def test_cooling_dominated_single_speed_stays_in_the_manual_s_band():
    # A hot-climate home: HDD65 1,500, CDD65 3,000 (cooling-dominated); 30,000 Btu/h cooling load.
    sel = select_heat_pump(18000, 30000, 35, "single_stage", hdd65=1500, cdd65=3000)
    lo, hi = SINGLE_SPEED_BAND
    assert not sel.heating_dominated
    assert lo <= sel.cooling_ratio <= hi
    assert sel.nominal_tons == 2.5  # the only half-ton size between 27,000 and 34,500 Btu/h


def test_heating_dominated_single_speed_may_go_to_125_percent_and_leaves_the_rest_to_backup():
    # A cold-climate home (HDD65 7,000, CDD65 600) with a small cooling load and a large
    # heating load: the unit goes to the top of the raised band, and no further.
    sel = select_heat_pump(45000, 24000, 0, "single_stage", hdd65=7000, cdd65=600)
    assert sel.heating_dominated
    assert sel.cooling_ratio <= HEATING_DOMINATED_TOP
    assert sel.nominal_btuh == 30000  # 125 % of 24,000 Btu/h is 30,000
    assert sel.shortfall_btuh == pytest.approx(45000 - sel.capacity_at_design_btuh)
    assert sel.shortfall_btuh > 0


def test_heating_dominated_variable_speed_is_sized_for_heat_with_its_low_speed_under_the_cooling_load():
    # ACCA Manual S (2nd ed., 2014; from memory): variable-capacity heat pumps may be sized for
    # the heating load in heating-dominated climates; the lowest speed must still fit the
    # cooling load.
    sel = select_heat_pump(36000, 20000, -5, "cold_climate", hdd65=7500, cdd65=700)
    r = heat_pump_class("cold_climate")
    assert sel.capacity_at_design_btuh >= 36000
    assert sel.nominal_btuh * r["min_capacity_frac"] <= 20000
    smaller = with_size(sel, sel.nominal_btuh - 6000, "check")
    assert smaller.capacity_at_design_btuh < 36000, "the smallest size that carries the load"


def test_cooling_dominated_variable_speed_uses_its_own_band():
    sel = select_heat_pump(15000, 36000, 40, "cold_climate", hdd65=1200, cdd65=3500)
    lo, hi = VARIABLE_SPEED_BAND
    assert lo <= sel.cooling_ratio <= hi


@pytest.mark.parametrize("hp_class,temp_f", [("single_stage", 35), ("single_stage", 10),
                                             ("cold_climate", -10), ("ductless", 20)])
def test_capacity_at_design_follows_the_rating_points(hp_class, temp_f):
    sel = select_heat_pump(20000, 20000, temp_f, hp_class, hdd65=5000, cdd65=1000)
    assert sel.capacity_at_design_btuh == pytest.approx(
        capacity_by_rating_points(hp_class, sel.nominal_btuh, temp_f), rel=1e-9)


def test_block_cooling_load_by_hand():
    # ACCA Manual J (8th ed., from memory): 75 F indoor, 230 Btu/h per occupant, 1,200 Btu/h of
    # appliances; windows 15 % of the floor at 25 Btu/h per ft2 of glass and a sensible heat
    # ratio of 0.8 (common practice, no source).
    load = design_cooling_load(ua_btuh_f=500, cooling_design_f=95, floor_area_ft2=2000, occupants=3)
    sensible = 500 * 20 + 3 * 230 + 1200 + 2000 * 0.15 * 25
    assert load.sensible_btuh == pytest.approx(sensible)
    assert load.total_btuh == pytest.approx(sensible / 0.8)


def test_variable_speed_stops_where_its_lowest_speed_would_overcool():
    # 60,000 Btu/h at a 35 % lowest speed is 21,000 Btu/h, above a 20,000 Btu/h cooling load:
    # the unit stops at 54,000 Btu/h and backup heat covers what it cannot carry.
    sel = select_heat_pump(40000, 20000, -5, "cold_climate", hdd65=7500, cdd65=700)
    assert sel.nominal_btuh == 54000
    assert sel.shortfall_btuh > 0
