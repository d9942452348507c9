"""Finance formulas checked against numpy-financial (the reference library) and NREL/NIST
definitions."""

from __future__ import annotations

import numpy as np
import numpy_financial as npf
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from homeplan.money.finance import (
    Loan,
    discounted_payback_years,
    energy_hedge,
    irr_pct,
    levelised_cost_usd_per_kwh,
    levelised_price_usd_per_kwh,
    loan_payment_usd,
    loan_schedule,
    npv_usd,
    simple_payback_years,
)


def _rng(test: str, case: int) -> np.random.Generator:
    """A generator of its own for each case: a case's numbers do not depend on which other cases
    ran before it (or on pytest's order or selection)."""
    return np.random.default_rng([20261201, sum(map(ord, test)), case])


@pytest.mark.parametrize("_case", range(8))
def test_loan_payment_matches_numpy_financial(_case: int) -> None:
    rng = _rng("loan", _case)
    principal = float(rng.uniform(1_000, 80_000))
    rate = float(rng.choice([0.0, rng.uniform(0.5, 12.0)]))
    term = int(rng.integers(1, 31))
    expected = npf.pmt(rate / 100 / 12, term * 12, -principal)  # numpy-financial pmt
    assert loan_payment_usd(principal, rate, term) == pytest.approx(expected, rel=1e-10)


def test_zero_rate_loan() -> None:
    # numpy-financial pmt at 0 %: 12,000 over 5 years -> 200 a month
    assert loan_payment_usd(12_000, 0, 5) == pytest.approx(npf.pmt(0, 60, -12_000))
    assert loan_payment_usd(12_000, 0, 5) == pytest.approx(200)


def test_loan_schedule_interest_matches_numpy_financial() -> None:
    loan = Loan(20_000, 6.5, 10, 2026)
    sched = loan_schedule(loan)
    assert len(sched) == 10
    per = np.arange(1, 121)
    ipmt = npf.ipmt(0.065 / 12, per, 120, -20_000)  # numpy-financial ipmt per month
    for k, ly in enumerate(sched):
        assert ly.interest_usd == pytest.approx(ipmt[12 * k : 12 * k + 12].sum(), rel=1e-9)
    assert sum(ly.principal_usd for ly in sched) == pytest.approx(20_000)
    assert sched[-1].balance_end_usd == pytest.approx(0, abs=1e-6)


@pytest.mark.parametrize("_case", range(8))
def test_npv_matches_numpy_financial(_case: int) -> None:
    rng = _rng("npv", _case)
    flows = list(rng.normal(0, 5_000, size=int(rng.integers(2, 30))))
    rate = float(rng.uniform(0, 12))
    assert npv_usd(rate, flows) == pytest.approx(npf.npv(rate / 100, flows), rel=1e-9, abs=1e-6)


@pytest.mark.parametrize("_case", range(10))
def test_irr_matches_numpy_financial(_case: int) -> None:
    rng = _rng("irr", _case)
    n = int(rng.integers(3, 25))
    upfront = -float(rng.uniform(5_000, 40_000))
    later = list(rng.uniform(200, 6_000, size=n))
    flows = [upfront, *later]
    expected = npf.irr(flows)  # numpy-financial irr (root closest to zero)
    got = irr_pct(flows)
    if np.isnan(expected):
        assert got is None
    else:
        assert got is not None
        assert got / 100 == pytest.approx(expected, abs=1e-7)


def test_irr_known_cases_from_numpy_financial_docs() -> None:
    # numpy-financial irr docstring examples
    assert irr_pct([-100, 39, 59, 55, 20]) / 100 == pytest.approx(npf.irr([-100, 39, 59, 55, 20]))
    assert irr_pct([-100, 0, 0, 74]) / 100 == pytest.approx(-0.0955, abs=5e-5)
    assert irr_pct([-100, 100, 0, 7]) / 100 == pytest.approx(0.06206, abs=5e-6)
    assert irr_pct([-5, 10.5, 1, -8, 1]) / 100 == pytest.approx(0.0886, abs=5e-5)
    assert irr_pct([100, 50, 10]) is None  # never negative: no IRR (npf returns nan)
    assert np.isnan(npf.irr([100, 50, 10]))


def test_simple_and_discounted_payback() -> None:
    flows = [-1_000, 300, 300, 300, 300]
    # NIST Handbook 135 simple payback: 3 full years leave -100, 100/300 of year 4 -> 3.333
    assert simple_payback_years(flows) == pytest.approx(3 + 1 / 3)
    rate = 5.0
    dpb = discounted_payback_years(rate, flows)
    assert dpb is not None
    # numpy-financial npv of the prefixes: the discounted total turns positive in year 4 ...
    k = next(i for i in range(len(flows)) if npf.npv(rate / 100, flows[: i + 1]) >= 0)
    assert int(dpb) + 1 == k
    # ... and the fraction is the part of year k's discounted flow needed
    before = npf.npv(rate / 100, flows[:k])
    assert dpb == pytest.approx((k - 1) + (-before) / (flows[k] / 1.05**k))
    assert simple_payback_years([-1_000, 100, 100]) is None
    assert discounted_payback_years(5, [-1_000, 300, 300, 300, 300]) > simple_payback_years(flows)


def test_lcoe_against_numpy_financial_annuities() -> None:
    # undiscounted: 20,000 / (8,000 kWh x 25 years) = 0.10 $/kWh (NREL/TP-462-5173 definition)
    assert levelised_cost_usd_per_kwh(20_000, 8_000, 25, 0.0) == pytest.approx(0.10)
    # discounted kWh = present value of an annuity (numpy-financial pv)
    expected = 20_000 / -npf.pv(0.05, 25, 8_000)
    assert levelised_cost_usd_per_kwh(20_000, 8_000, 25, 5.0) == pytest.approx(expected)
    # with degradation, O&M and a year-12 replacement, discounted with numpy-financial npv
    energy = [8_000 * 0.995 ** (t - 1) for t in range(1, 26)]
    costs = [250.0] * 25
    costs[11] += 6_000
    exp = (20_000 - 3_000 + npf.npv(0.05, [0, *costs])) / npf.npv(0.05, [0, *energy])
    got = levelised_cost_usd_per_kwh(
        20_000,
        8_000,
        25,
        5.0,
        om_usd_per_year=250,
        degradation_pct=0.5,
        replacements_usd={12: 6_000},
        incentives_usd=3_000,
    )
    assert got == pytest.approx(exp)


def test_levelised_utility_price_and_hedge() -> None:
    # with escalation equal to the discount rate every discounted price is p1 / (1 + r)
    got = levelised_price_usd_per_kwh(0.17, 3.0, 8_000, 25, 3.0)
    assert got == pytest.approx(0.17 * 25 / 1.03 / -npf.pv(0.03, 25, 1))
    hedge = energy_hedge(25_000, 8_000, 25, 5.0, 0.17, 3.0)
    assert hedge.utility_last_year_usd_per_kwh == pytest.approx(npf.fv(0.03, 24, 0, -0.17))
    assert hedge.utility_levelised_usd_per_kwh > 0.17  # rising price levelises above year 1
    assert hedge.lcoe_usd_per_kwh == pytest.approx(25_000 / -npf.pv(0.05, 25, 8_000))


@settings(max_examples=60, deadline=None)
@given(
    upfront=st.floats(1_000, 50_000),
    later=st.lists(st.floats(100, 10_000), min_size=2, max_size=30),
)
def test_irr_property_npv_zero_and_numpy_financial(upfront: float, later: list[float]) -> None:
    flows = [-upfront, *later]
    rate = irr_pct(flows)
    expected = npf.irr(flows)  # numpy-financial irr
    if np.isnan(expected):
        assert rate is None
        return
    assert rate is not None
    assert rate / 100 == pytest.approx(expected, abs=1e-6)
    assert npv_usd(rate, flows) == pytest.approx(0, abs=1e-6 * upfront)  # IRR definition
