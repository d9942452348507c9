"""Costs over time: Wright's law, inflation, sized base costs and fuel price paths."""

from __future__ import annotations

import math
from pathlib import Path

import numpy_financial as npf
import pytest

from homeplan.money.costs import (
    CostRange,
    CostTrend,
    PriceEscalation,
    base_cost_usd,
    cost_in_year,
    cost_range_from_record,
    cost_trend_from_record,
    doublings_per_year,
    learning_annual_change_pct,
    price_path,
    wright_cost_factor,
)


def test_wright_three_doublings_at_20_pct() -> None:
    # Wright (1936), Factors affecting the cost of airplanes: cost falls by the learning rate at
    # each doubling of cumulative production; three doublings at 20 % -> 0.8^3 = 0.512
    assert wright_cost_factor(20, 3) == pytest.approx(0.512)


def test_learning_equivalent_annual_rate() -> None:
    # Wright's law definition: when cumulative production doubles every year (100 % growth),
    # cost falls by the learning rate each year
    assert learning_annual_change_pct(20, 100) == pytest.approx(-20.0)
    # consistency with the definition: the time to double cumulative production at 25 %/yr is
    # ln 2 / ln 1.25 years, and over that time cost must fall to (1 - 0.21) (21 % per doubling,
    # the catalog's battery rate, within the 20-24 % per doubling of Ziegler and Trancik (2021),
    # Energy Environ. Sci. 14:1635)
    yearly = 1 + learning_annual_change_pct(21, 25) / 100
    years_to_double = math.log(2) / math.log(1.25)
    assert yearly**years_to_double == pytest.approx(0.79)
    assert doublings_per_year(0) == 0


def test_cost_in_year_pure_inflation_matches_numpy_financial() -> None:
    trend = CostTrend(inflation_pct=3.0)
    # numpy-financial fv: 14,000 compounding 3 % for 7 years
    expected = npf.fv(0.03, 7, 0, -14_000)
    assert cost_in_year(14_000, 2025, 2032, trend) == pytest.approx(expected)
    # and back in time
    assert cost_in_year(14_000, 2025, 2023, trend) == pytest.approx(npf.pv(0.03, 2, 0, -14_000))


def test_cost_in_year_learning_and_soft_costs() -> None:
    # 100 % growth -> one doubling a year; 3 years at 20 % -> 0.512 (common practice, no source)
    hardware = CostTrend(inflation_pct=0.0, learning_rate_pct=20, deployment_growth_pct=100)
    assert cost_in_year(10_000, 2025, 2028, hardware) == pytest.approx(5_120)
    # half the cost is soft cost that does not learn: 0.5 x 0.512 + 0.5 = 0.756
    half = CostTrend(
        inflation_pct=0.0, learning_rate_pct=20, deployment_growth_pct=100, learning_share=0.5
    )
    assert cost_in_year(10_000, 2025, 2028, half) == pytest.approx(7_560)
    # nominal = real x inflation (numpy-financial fv for the inflation part)
    nominal = CostTrend(inflation_pct=2.5, learning_rate_pct=20, deployment_growth_pct=100)
    assert cost_in_year(10_000, 2025, 2028, nominal) == pytest.approx(npf.fv(0.025, 3, 0, -5_120))


def test_base_cost_sized_and_quote() -> None:
    # The function's own arithmetic on invented ranges (no outside source): cost per unit x size,
    # the level asked for, a fixed part plus a part per unit, and a quote that wins.
    solar = CostRange("kw", 2_500, 4_200, 5_000, source="invented for the test")
    assert base_cost_usd(solar, 7.4) == pytest.approx(4_200 * 7.4)
    assert base_cost_usd(solar, 7.4, "low") == pytest.approx(2_500 * 7.4)
    assert base_cost_usd(solar, 7.4, quote_usd=27_000) == 27_000
    minisplit = CostRange("each", 2_500, 3_750, 5_000, fixed_usd=5_000)
    assert base_cost_usd(minisplit, 2) == pytest.approx(5_000 + 2 * 3_750)
    with pytest.raises(ValueError, match="low <= typical <= high"):
        CostRange("kw", 5, 4, 6)
    with pytest.raises(ValueError, match="unknown size unit"):
        CostRange("acre", 1, 2, 3)


def test_price_path_escalation_and_fossil_scenario() -> None:
    cpi = PriceEscalation(cpi_pct=3.0)
    # EIA Electric Power Monthly: 2023 US residential average 15.98 c/kWh (from memory),
    # escalated at CPI (numpy-financial fv)
    path = price_path(0.1598, "electricity", 2023, [2023, 2030], cpi)
    assert path[0] == pytest.approx(0.1598)
    assert path[1] == pytest.approx(npf.fv(0.03, 7, 0, -0.1598))
    high = PriceEscalation(cpi_pct=3.0, fossil_extra_pct=2.0)
    gas = price_path(1.42, "natural_gas", 2023, [2033], high)[0]
    assert gas == pytest.approx(npf.fv(0.05, 10, 0, -1.42))  # numpy-financial fv
    # electricity is not a fossil fuel: no extra escalation
    assert price_path(0.1598, "electricity", 2023, [2030], high)[0] == pytest.approx(path[1])


def test_price_path_volatility_repeatable_and_centred() -> None:
    years = list(range(2025, 2036))
    vol = PriceEscalation(cpi_pct=3.0, fossil_volatility_pct=20, seed=7)
    a = price_path(1.4, "natural_gas", 2025, years, vol)
    b = price_path(1.4, "natural_gas", 2025, years, vol)
    assert a == b  # same seed, same scenario
    c = price_path(
        1.4, "natural_gas", 2025, years, PriceEscalation(3.0, fossil_volatility_pct=20, seed=8)
    )
    assert a != c
    assert price_path(0.17, "electricity", 2025, years, vol) == pytest.approx(
        price_path(0.17, "electricity", 2025, years, PriceEscalation(3.0))
    )
    # lognormal shocks with drift -sigma^2/2 keep the expected price on the escalation path
    # (E[exp(N(-s^2/2, s^2))] = 1); mean over 4,000 scenarios of the 10th year
    finals = [
        price_path(
            1.0, "propane", 2025, [2035], PriceEscalation(0.0, fossil_volatility_pct=20, seed=s)
        )[0]
        for s in range(4_000)
    ]
    assert sum(finals) / len(finals) == pytest.approx(1.0, rel=0.05)


def test_catalog_records() -> None:
    from ruamel.yaml import YAML

    path = Path(__file__).resolve().parents[2] / "homeplan" / "data" / "upgrades.yaml"
    upgrades = YAML(typ="safe").load(path.read_text(encoding="utf-8"))
    for rec in upgrades.values():
        if "cost" in rec:
            rng = cost_range_from_record(rec["cost"])
            assert rng.low_usd <= rng.typical_usd <= rng.high_usd
            cost_trend_from_record(rec.get("cost_change"), 2.5)
    # a learning record: 20 %/doubling at 100 %/yr growth, no inflation -> 0.512 after 3 years
    # (common practice, no source)
    trend = cost_trend_from_record(
        {"kind": "learning", "learning_rate_pct": 20, "growth_pct_per_year": 100}, 0.0
    )
    assert cost_in_year(1.0, 2025, 2028, trend) == pytest.approx(0.512)
    # the catalog's cold-climate ducted heat pump of 3 tons at its typical cost falls in the
    # $18-22k typical range of such systems (from memory, not a published table)
    hp = upgrades["heat_pump"]
    factor = hp["variants"]["cold_climate"]["cost_factor"]
    assert 18_000 <= base_cost_usd(cost_range_from_record(hp["cost"]), 3, cost_factor=factor) <= 22_000


def test_catalog_solar_and_battery_costs_bracket_the_published_figures() -> None:
    """The catalog's ranges hold the published US figures they cite (a check of the data)."""
    from ruamel.yaml import YAML

    path = Path(__file__).resolve().parents[2] / "homeplan" / "data" / "upgrades.yaml"
    upgrades = YAML(typ="safe").load(path.read_text(encoding="utf-8"))
    solar = cost_range_from_record(upgrades["solar"]["cost"])
    # LBNL Tracking the Sun, 2024 edition: 2023 median residential price about $4.20/W (from
    # memory); NREL Q1 2023 residential PV benchmark about $2.90/Wdc (from memory)
    for usd_per_w in (4.20, 2.90):
        assert solar.low_usd <= usd_per_w * 1000 <= solar.high_usd
    battery = cost_range_from_record(upgrades["battery"]["cost"])
    # LBNL Tracking the Sun: storage adds about $700-1,300 per kWh to paired PV (from memory)
    assert battery.low_usd <= 1_300 and battery.high_usd >= 700
