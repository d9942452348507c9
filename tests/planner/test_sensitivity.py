"""The sensitivity ranking: every assumption of data/sensitivity.csv at its low and high setting,
the home re-planned (a check of the machinery; the settings' sources are in the table)."""

from __future__ import annotations

import pytest

from homeplan.plan.load import load_plan
from homeplan.planner.chain import plan_roadmap
from homeplan.planner.sensitivity import cases, sensitivity, settings

from ..conftest import ROOT


def test_every_setting_has_a_source() -> None:
    for key, row in settings().items():
        assert row["source"], key
        assert row["low_label"] and row["high_label"], key


@pytest.fixture(scope="module")
def minimal():
    loaded = load_plan(ROOT / "sample_homes" / "minimal.yaml")
    return loaded, plan_roadmap(loaded)


def test_cases_cover_the_assumptions_the_issue_names(minimal) -> None:
    loaded, result = minimal
    keys = {c.key for c in cases(loaded.plan, result)}
    assert {"discount_rate", "cost_level", "learning", "weather", "budget", "escalation:electricity"} <= keys
    for c in cases(loaded.plan, result):
        if c.key == "discount_rate":
            assert c.plan.budget.discount_rate_pct in (1.0, 7.0)
        if c.key == "budget":
            assert c.plan.budget.usd_per_year in (loaded.plan.budget.usd_per_year * 0.75,
                                                   loaded.plan.budget.usd_per_year * 1.25)


@pytest.mark.slow
def test_ranking_is_by_swing_and_a_higher_discount_rate_lowers_a_positive_npv_of_savings(minimal) -> None:
    loaded, result = minimal
    s = sensitivity(loaded, result)
    assert s.base_npv_usd == result.roadmap.npv_usd
    swings = [r.swing_usd for r in s.rows]
    assert swings == sorted(swings, reverse=True)
    assert {r.key for r in s.rows} >= {"discount_rate", "weather", "budget"}
    # more learning makes later equipment cheaper: the plan is worth at least as much
    learning = next(r for r in s.rows if r.key == "learning")
    assert learning.high_npv_usd >= learning.low_npv_usd - 1.0
