"""Sizing and migration rules checked against their definitions."""

from __future__ import annotations

import numpy as np
import pytest

from homeplan.energy.heating import hp_capacity_btuh
from homeplan.plan import migrate
from homeplan.planner.states import heat_pump_spec, heat_pump_tons


@pytest.mark.parametrize("design_f,load", [(-10, 28000), (4, 25000), (12, 40000), (20, 18000)])
def test_cold_climate_unit_carries_the_design_load(design_f, load):
    # ACCA Manual S: the selected unit's capacity at the design temperature covers the load
    # (capacity curve through the 47/17/5 F rating points, DOE 10 CFR 430 App. M1)
    tons = heat_pump_tons(load, design_f, "cold_climate")
    hp = heat_pump_spec("cold_climate", tons, 0.0)
    cap = float(hp_capacity_btuh(hp, np.array([max(design_f, hp.cutout_f)]))[0])
    assert 1.5 < tons < 5.0, "the cases are chosen away from the 1.5-5 t clamps"
    assert cap >= load
    # and not more than half a ton too big (rounded up to half tons)
    smaller = heat_pump_spec("cold_climate", tons - 0.5, 0.0)
    assert float(hp_capacity_btuh(smaller, np.array([max(design_f, hp.cutout_f)]))[0]) < load


def test_unit_is_at_least_the_cooling_load():
    # common practice, no source: a heat pump replacing an AC is at least the AC's size
    assert heat_pump_tons(10000, 30, "ducted", cooling_btuh=42000) == 3.5


def test_standard_unit_sized_at_17f():
    # single-stage unit sized for the load at its 17 F rating point; strips carry the rest
    load_17 = 30000 * (65 - 17) / (65 - 0)
    tons = heat_pump_tons(30000, 0, "ducted")
    hp = heat_pump_spec("ducted", tons, 10.0)
    assert float(hp_capacity_btuh(hp, np.array([17.0]))[0]) >= load_17


def test_migration_chain_applies_each_step_in_order():
    # the format has one version today; the mechanism is checked with two made-up steps
    steps = {1: lambda d: {**d, "b": d["a"] * 2}, 2: lambda d: {**d, "c": d["b"] + 1}}
    out = migrate.upgrade({"a": 3, "format_version": 1}, 1, steps=steps, to_version=3)
    assert out == {"a": 3, "b": 6, "c": 7, "format_version": 3}


def test_migration_gap_is_reported():
    with pytest.raises(KeyError, match="no migration from plan format 1"):
        migrate.upgrade({}, 1, steps={}, to_version=2)


def test_project_value_by_hand():
    """scheduling._value: savings for the horizon's years, later incentives a year later, and
    the unused share of what was paid at the end (NIST Handbook 135 present value, straight-line
    residual). Worked by hand below."""
    from types import SimpleNamespace

    from homeplan.planner.scheduling import Coefficients, _value

    ctx = SimpleNamespace(
        plan=SimpleNamespace(budget=SimpleNamespace(discount_rate_pct=10.0)),
        years=[2027, 2028, 2029],
        escalation=lambda _fuel: 0.0,
    )
    co = Coefficients(cost_usd=[1000.0] * 3, pos_incentive_usd=[100.0] * 3,
                      later_incentive_usd=[200.0] * 3, savings_by_fuel={"gas": 110.0},
                      emissions_saved_kg=0.0)
    # installed in year index 1 (2028), life 4 years, horizon 3 years, discount 10 %:
    #   savings in years 1 and 2: 110/1.1 + 110/1.21 = 100 + 90.909 = 190.909
    #   later incentive 200 arrives in year 2: 200/1.21 = 165.289
    #   paid 1000 - 100 - 200 = 700; used 2 of 4 years at the end -> 350 left, at year 3: 350/1.331 = 262.960
    assert _value(ctx, co, 1, 4.0) == pytest.approx(190.909 + 165.289 + 262.960, abs=0.01)
