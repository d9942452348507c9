"""Weibull end-of-life model against closed-form values."""

from __future__ import annotations

import math

import numpy as np
import pytest

from homeplan.planner import lifecycle


def test_scale_gives_the_median():
    # Weibull median = eta (ln 2)^(1/beta) (closed form): S(median) = 0.5
    for median, shape in [(18, 3.0), (12, 2.0), (15, 1.0)]:
        eta = lifecycle.weibull_scale(median, shape)
        assert float(lifecycle.survival(median, eta, shape)) == pytest.approx(0.5, abs=1e-12)


def test_exponential_case_is_memoryless():
    # beta = 1: constant hazard 1 - exp(-1/eta) every year whatever the age (closed form)
    eta = lifecycle.weibull_scale(10, 1.0)
    h = lifecycle.hazard_by_year(7.0, 5, eta, 1.0)
    np.testing.assert_allclose(h, 1 - math.exp(-1 / eta), rtol=1e-12)


def test_yearly_probabilities_closed_form():
    # Rayleigh (beta = 2), eta = 10, age 10: P(fail in year 1 | alive) = 1 - exp(-(1.1^2 - 1)) = 1 - e^-0.21
    p = lifecycle.yearly_failure_probability(10.0, 3, 10.0, 2.0)
    assert p[0] == pytest.approx(1 - math.exp(-0.21), rel=1e-12)
    # year 2: (S(11) - S(12)) / S(10) = exp(-0.21) - exp(-0.44)
    assert p[1] == pytest.approx(math.exp(-0.21) - math.exp(-0.44), rel=1e-12)
    cum = lifecycle.cumulative_failure_probability(10.0, 3, 10.0, 2.0)
    np.testing.assert_allclose(np.cumsum(p), cum, rtol=1e-12)


def test_remaining_life_at_risk_closed_form():
    # S(a+r)/S(a) = 1 - p  =>  a + r = eta ((a/eta)^b - ln(1-p))^(1/b)
    eta, b, a = 20.0, 3.0, 15.0
    r = lifecycle.remaining_life_at_risk(a, 0.5, eta, b)
    assert float(lifecycle.survival(a + r, eta, b) / lifecycle.survival(a, eta, b)) == pytest.approx(0.5)
    # new appliance: the conditional median equals the median
    assert lifecycle.remaining_life_at_risk(0.0, 0.5, eta, b) == pytest.approx(eta * math.log(2) ** (1 / b))


def test_mean_remaining_life_of_new_unit_is_weibull_mean():
    # E[T] = eta * Gamma(1 + 1/beta) (closed form)
    eta, b = 20.0, 3.0
    assert lifecycle.mean_remaining_life(0.0, eta, b) == pytest.approx(eta * math.gamma(1 + 1 / b), rel=1e-6)


def test_older_appliance_has_higher_near_term_risk():
    young = lifecycle.outlook("a", "a", "furnace", "gas", "", 2020, "good", 2027)
    old = lifecycle.outlook("b", "b", "furnace", "gas", "", 2005, "good", 2027)
    assert old.yearly_failure_pct[0] > young.yearly_failure_pct[0]
    assert old.replace_by_year < young.replace_by_year


def test_failed_appliance_must_go_now():
    o = lifecycle.outlook("a", "a", "water_heater", "gas", "storage", 2015, "failed", 2027)
    assert o.replace_by_year == 2027 and o.yearly_failure_pct[0] == 100


def test_poor_condition_shortens_life():
    good = lifecycle.outlook("a", "a", "furnace", "gas", "", 2012, "good", 2027)
    poor = lifecycle.outlook("a", "a", "furnace", "gas", "", 2012, "poor", 2027)
    assert poor.expected_end_year < good.expected_end_year


def test_catalog_life_matches_sources():
    from homeplan import catalog

    # ASHRAE service-life table: residential gas furnace median 18 years
    assert catalog.service_life("furnace", "gas").median_life_years == 18
    # PNNL FEDS: heat pump water heater 12 years
    assert catalog.service_life("water_heater", "electric", "heat_pump").median_life_years == 12
    for row in catalog.service_lives():
        assert row.source.strip(), row


def test_conditional_yearly_risk_rises_with_age_when_parts_wear_out():
    # Textbook property (e.g. Meeker & Escobar 1998, ch. 4): the Weibull hazard
    # h(t) = (beta/eta) (t/eta)^(beta-1) increases with age for beta > 1, is constant for
    # beta = 1 and falls for beta < 1. The one-year conditional risk 1 - S(a+1)/S(a) is
    # checked against scipy.stats.weibull_min's survival function.
    from scipy.stats import weibull_min

    for shape in (1.5, 2.0, 3.5):
        eta = lifecycle.weibull_scale(15, shape)
        h = lifecycle.hazard_by_year(5.0, 20, eta, shape)
        ages = 5.0 + np.arange(21)
        sf = weibull_min.sf(ages, shape, scale=eta)
        np.testing.assert_allclose(h, 1 - sf[1:] / sf[:-1], rtol=1e-9)
        assert np.all(np.diff(h) > 0)
    falling = lifecycle.hazard_by_year(5.0, 10, lifecycle.weibull_scale(15, 0.8), 0.8)
    assert np.all(np.diff(falling) < 0)


def test_outlook_shows_the_rising_conditional_risk_beside_the_cumulative():
    # the same gas furnace (ASHRAE median 18 years, wear-out shape > 1): the chance it fails in a
    # year if it lasted that long rises, while the unconditional yearly share falls
    o = lifecycle.outlook("f", "gas furnace", "furnace", "gas", "", 2006, "good", 2027, years=8)
    assert o.shape > 1
    assert all(b > a for a, b in zip(o.hazard_pct, o.hazard_pct[1:], strict=False))
    assert o.yearly_failure_pct[-1] < o.yearly_failure_pct[0]
    # survival multiplies: 1 - cumulative = product of (1 - hazard) (definition of conditional risk)
    surv = np.cumprod(1 - np.array(o.hazard_pct) / 100)
    np.testing.assert_allclose(1 - surv, np.array(o.cumulative_failure_pct) / 100, rtol=1e-9)


@pytest.mark.parametrize(("age", "median", "shape"), [
    (0.0, 15, 2.5), (10.0, 18, 3.0), (30.0, 12, 3.0), (5.0, 15, 0.8), (50.0, 15, 0.8),
    (211.0, 20, 4.0),  # a roof laid in 1900: far past its median life, a few days left on average
])
def test_mean_remaining_life_against_numerical_integration(age, median, shape):
    # E[T - a | T > a] = integral over t >= 0 of S(a + t) / S(a) (definition of the mean
    # residual life, e.g. Meeker & Escobar 1998, ch. 4), integrated by scipy.integrate.quad over
    # scipy.stats.weibull_min's log survival function
    from scipy import integrate
    from scipy.stats import weibull_min

    eta = lifecycle.weibull_scale(median, shape)
    log_sf_a = weibull_min.logsf(age, shape, scale=eta)
    expected, _ = integrate.quad(lambda t: math.exp(weibull_min.logsf(age + t, shape, scale=eta) - log_sf_a),
                                 0, math.inf, epsabs=1e-13, epsrel=1e-12, limit=200)
    assert lifecycle.mean_remaining_life(age, eta, shape) == pytest.approx(expected, rel=1e-9)


def test_mean_remaining_life_of_exponential_is_its_scale_at_any_age():
    # beta = 1 is memoryless: the mean remaining life is eta whatever the age (closed form)
    for age in (0.0, 3.0, 40.0, 400.0):
        assert lifecycle.mean_remaining_life(age, 12.0, 1.0) == pytest.approx(12.0, rel=1e-12)


@pytest.mark.parametrize(("s", "x"), [(1.2, 0.0), (1.25, 0.5), (1.4, 2.3), (2.25, 3.0), (1.33, 40.0),
                                      (1.25, 1500.0)])
def test_upper_gamma_against_scipy(s, x):
    # scipy.special.gammaincc is the regularised upper incomplete gamma Q(s, x) = Gamma(s, x) / Gamma(s);
    # compared in logs, since Gamma(s, x) underflows for large x while exp(x) Gamma(s, x) does not
    from scipy.special import gammaincc

    got = lifecycle.upper_gamma_scaled(s, x)
    q = gammaincc(s, x)
    if q > 0:
        assert got == pytest.approx(math.exp(x) * math.gamma(s) * q, rel=1e-11)
    else:  # beyond double range: exp(x) Gamma(s, x) ~ x^(s-1) (1 + (s-1)/x + ...), A&S 6.5.32
        assert got == pytest.approx(x ** (s - 1) * (1 + (s - 1) / x + (s - 1) * (s - 2) / x ** 2), rel=1e-6)

