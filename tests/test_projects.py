"""Sizing and migration rules checked against their definitions."""

from __future__ import annotations

import pytest

from homeplan.plan import migrate


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
