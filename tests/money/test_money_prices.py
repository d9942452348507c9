"""Price paths: the model estimated from the shipped history, sampled paths, shocks, CVaR.

References for every check are general-purpose libraries (numpy, scipy.stats) applied to the
same data, or closed forms named beside the values.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats

from homeplan.money.finance import levelised_price_usd_per_kwh
from homeplan.money.prices import (
    bill_shock_usd,
    cvar,
    estimate_price_model,
    levelised_price_paths_usd_per_kwh,
    price_history,
    read_price_history,
    simulate_price_paths,
)

FUELS = ("electricity", "gas", "propane", "oil", "gasoline", "diesel")


def test_history_has_every_fuel_with_a_source_and_says_from_memory() -> None:
    h = price_history()
    assert set(FUELS) <= set(h.fuels)
    for fuel, src in zip(h.fuels, h.sources, strict=True):
        assert "EIA" in src, fuel
        assert "from memory" in src, fuel  # values recalled, not checked: the table says so
    assert h.years[0] <= 2001 and h.years[-1] >= 2024
    assert np.all(np.isfinite(h.usd)) and np.all(h.usd > 0)


def test_estimates_match_numpy_on_the_same_table() -> None:
    h = price_history()
    m = estimate_price_model(h, FUELS)
    logs = np.log(np.array([h.series(f) for f in FUELS]))
    r = np.diff(logs, axis=1)
    # reference: numpy's mean, standard deviation (ddof=1) and Pearson correlation
    np.testing.assert_allclose(m.drift, r.mean(axis=1), rtol=1e-12)
    np.testing.assert_allclose(m.volatility, r.std(axis=1, ddof=1), rtol=1e-12)
    np.testing.assert_allclose(m.correlation, np.corrcoef(r), atol=1e-12)
    assert m.n_changes == r.shape[1]
    # plausibility, from memory: oil and gasoline swing far more than electricity
    assert m.volatility[FUELS.index("oil")] > 3 * m.volatility[FUELS.index("electricity")]
    assert m.correlation[FUELS.index("gasoline"), FUELS.index("diesel")] > 0.9


def test_sampled_paths_reproduce_volatility_and_correlation_within_sampling_error() -> None:
    model = estimate_price_model(price_history(), FUELS)
    paths = simulate_price_paths(model, years=15, n_paths=3000, seed=7)
    assert paths.shape == (3000, len(FUELS), 16)
    r = np.diff(np.log(paths), axis=2)  # [N, F, T] yearly changes
    pooled = r.transpose(1, 0, 2).reshape(len(FUELS), -1)
    n = pooled.shape[1]
    # reference: scipy.stats chi-square interval of a normal sample variance (99.9 %)
    lo, hi = stats.chi2.ppf([0.0005, 0.9995], n - 1) / (n - 1)
    var = pooled.var(axis=1, ddof=1)
    true = model.volatility**2
    assert np.all(var >= true * lo) and np.all(var <= true * hi), (var, true)
    # reference: scipy.stats.pearsonr, Fisher z interval (99.9 %, z = 3.29)
    for i in range(len(FUELS)):
        for j in range(i + 1, len(FUELS)):
            rho = model.correlation[i, j]
            got = stats.pearsonr(pooled[i], pooled[j]).statistic
            assert abs(np.arctanh(got) - np.arctanh(rho)) <= 3.29 / np.sqrt(n - 3), (i, j, got, rho)


def test_mean_centred_paths_follow_the_plan_escalation() -> None:
    model = estimate_price_model(price_history(), FUELS)
    esc = {"electricity": 2.5, "gas": 4.0, "oil": -1.0}
    paths = simulate_price_paths(model, years=10, n_paths=20000, seed=3, escalation_pct=esc)
    for fuel, pct in esc.items():
        i = model.index(fuel)
        last = paths[:, i, -1]
        expected = (1 + pct / 100) ** 10  # E[S_t] = S_0 (1 + e)^t by construction (Hull ch. 14)
        se = last.std(ddof=1) / np.sqrt(last.size)
        assert abs(last.mean() - expected) < 4 * se, fuel
    # a fuel without an escalation keeps the history's drift: its median grows at the trend
    g = model.index("gasoline")
    median = np.median(paths[:, g, -1])
    assert median == pytest.approx(np.exp(10 * model.drift[g]), rel=0.05)


def test_zero_volatility_gives_the_single_path_exactly() -> None:
    model = estimate_price_model(price_history(), FUELS).scaled(0.0)
    paths = simulate_price_paths(model, years=12, n_paths=5, seed=1, escalation_pct={f: 3.0 for f in FUELS})
    np.testing.assert_allclose(paths, np.broadcast_to(1.03 ** np.arange(13), paths.shape), rtol=1e-12)


def test_paths_are_reproducible_from_the_seed() -> None:
    model = estimate_price_model(price_history(), FUELS)
    a = simulate_price_paths(model, 8, 100, seed=11)
    b = simulate_price_paths(model, 8, 100, seed=11)
    c = simulate_price_paths(model, 8, 100, seed=12)
    np.testing.assert_array_equal(a, b)
    assert not np.allclose(a, c)


def test_bill_shock_matches_a_monte_carlo_standard_deviation() -> None:
    model = estimate_price_model(price_history(), FUELS)
    bills = {"electricity": 1800.0, "gas": 1100.0, "gasoline": 2200.0}
    combined, by_fuel = bill_shock_usd(bills, model)
    # reference: numpy sample standard deviation of next year's bill under the model's shocks
    rng = np.random.default_rng(0)
    idx = [model.index(f) for f in bills]
    e = rng.multivariate_normal(np.zeros(len(idx)), model.cov[np.ix_(idx, idx)], size=400_000)
    sample = np.exp(e) @ np.array(list(bills.values()))
    assert combined == pytest.approx(sample.std(ddof=1), rel=0.01)
    sigma_gas = model.volatility[model.index("gas")]
    assert by_fuel["gas"] == pytest.approx(1100.0 * (np.exp(sigma_gas) - 1))
    assert bill_shock_usd({"electricity": 0.0}, model)[0] == 0.0


def test_levelised_paths_agree_with_the_scalar_formula_on_a_certain_path() -> None:
    # reference: the deterministic levelised price (NREL/TP-462-5173), itself checked elsewhere
    m = 1.025 ** np.arange(25)
    got = levelised_price_paths_usd_per_kwh(0.18, np.vstack([m, m]), 9000, 4.0, 0.5)
    want = levelised_price_usd_per_kwh(0.18, 2.5, 9000, 25, 4.0, 0.5)
    np.testing.assert_allclose(got, [want, want], rtol=1e-12)


def test_cvar_worked_examples_and_the_minimisation_it_stands_for() -> None:
    losses = np.arange(1.0, 11.0)
    assert cvar(losses, 0.2) == pytest.approx(9.5)  # mean of the two worst of ten
    assert cvar(losses, 0.25) == pytest.approx((10 + 9 + 0.5 * 8) / 2.5)
    assert cvar(losses, 1.0) == pytest.approx(losses.mean())
    # reference: Rockafellar & Uryasev (2000): CVaR = min over eta of eta + E[(L - eta)^+] / tail,
    # evaluated with numpy on a fine grid of eta
    rng = np.random.default_rng(5)
    x = rng.normal(100, 20, size=37)
    eta = np.linspace(x.min() - 1, x.max() + 1, 200001)
    for tail in (0.05, 0.1, 0.3):
        ru = (eta + np.maximum(x[None, :] - eta[:, None], 0).mean(axis=1) / tail).min()
        assert cvar(x, tail) == pytest.approx(ru, abs=1e-3)
    with pytest.raises(ValueError):
        cvar(losses, 0.0)


def test_bad_tables_are_reported_with_the_line(tmp_path) -> None:
    f = tmp_path / "p.csv"
    f.write_text("fuel,year,usd_per_unit,unit,source\nelectricity,2001,0.1,kWh,x\nelectricity,2002,-1,kWh,x\n")
    with pytest.raises(ValueError, match="p.csv:3"):
        read_price_history(f)
    f.write_text("fuel,year,usd_per_unit,unit,source\nelectricity,2001,0.1,kWh,\n")
    with pytest.raises(ValueError, match="p.csv:2"):
        read_price_history(f)


def test_model_needs_enough_history(tmp_path) -> None:
    f = tmp_path / "p.csv"
    f.write_text("fuel,year,usd_per_unit,unit,source\n"
                 "gas,2001,10,Mcf,x\ngas,2002,11,Mcf,x\ngas,2003,12,Mcf,x\n")
    with pytest.raises(ValueError, match="three"):
        estimate_price_model(read_price_history(f))
    with pytest.raises(ValueError, match="no price history"):
        estimate_price_model(price_history(), ["coal"])
