"""The roadmap under sampled energy prices (the planner's "risk" stage) on the sample homes.

What is checked here is the accounting of the risk stage against the roadmap's own single-path
answer (zero volatility must give it back exactly) and the ordering of the bands; the price model
itself is checked against numpy and scipy.stats in tests/money/test_money_prices.py.
"""

from __future__ import annotations

import numpy as np
import pytest

from homeplan.plan.load import load_plan
from homeplan.planner.chain import plan_roadmap
from homeplan.result.roadmap import Roadmap

from ..conftest import ROOT

SAMPLES = ("cold_gas_100a", "oil_boiler_no_ducts", "mild_propane_roof")


def _plan(name: str, **values):
    loaded = load_plan(ROOT / "sample_homes" / f"{name}.yaml")
    return plan_roadmap(loaded.with_values({tuple(k.split("__")): v for k, v in values.items()}))


@pytest.fixture(scope="module", params=SAMPLES)
def planned(request):
    return request.param, _plan(request.param)


def test_bands_are_ordered_and_in_the_json(planned) -> None:
    _, result = planned
    risk = result.roadmap.price_risk
    assert risk is not None and risk.paths == 2000
    bands = [risk.plan_cost_usd, risk.like_for_like_cost_usd, risk.do_nothing_cost_usd]
    bands += [y.plan_bills_usd for y in risk.years] + [y.do_nothing_bills_usd for y in risk.years]
    for b in bands:
        assert b.p10 <= b.p50 <= b.p90
        assert b.p10 - 1e-6 <= b.mean <= b.p90 + 1e-6  # the first year is certain: no spread
    assert 0 <= risk.plan_beats_like_for_like_pct <= 100
    assert [y.year for y in risk.years] == [y.year for y in result.roadmap.years]
    back = Roadmap.from_dict(result.roadmap.to_dict())
    assert back.price_risk is not None
    assert back.price_risk.plan_cost_usd.p90 == pytest.approx(risk.plan_cost_usd.p90, abs=1e-3)


def test_zero_volatility_collapses_to_the_single_path_answer(planned) -> None:
    name, result = planned
    flat = _plan(name, prices__uncertainty__volatility_factor=0.0)
    rm = flat.roadmap
    risk = rm.price_risk
    for b in (risk.plan_cost_usd, risk.like_for_like_cost_usd, risk.do_nothing_cost_usd):
        assert b.p10 == pytest.approx(b.p90, abs=1e-6)
    # doing nothing minus the plan is the roadmap's NPV; minus like-for-like, its baseline's
    assert risk.do_nothing_cost_usd.p50 - risk.plan_cost_usd.p50 == pytest.approx(rm.npv_usd, abs=0.01)
    lfl = rm.baseline("like_for_like")
    assert risk.do_nothing_cost_usd.p50 - risk.like_for_like_cost_usd.p50 == pytest.approx(lfl.npv_usd, abs=0.01)
    # each year's bills are the roadmap's own (rounded to cents there)
    for band, year in zip(risk.years, rm.years, strict=True):
        assert band.plan_bills_usd.p50 == pytest.approx(year.total_bills_usd, abs=0.05)
        assert band.plan_bills_usd.p10 == pytest.approx(band.plan_bills_usd.p90, abs=1e-6)
    dn = rm.baseline("do_nothing")
    for band, year in zip(risk.years, dn.years, strict=True):
        assert band.do_nothing_bills_usd.p50 == pytest.approx(year.total_bills_usd, abs=0.05)
    assert risk.plan_beats_like_for_like_pct in (0.0, 100.0)
    # the same roadmap is planned either way: the volatility does not change the NPV objective
    assert rm.npv_usd == pytest.approx(result.roadmap.npv_usd)


def test_mean_of_the_paths_is_the_roadmaps_npv_within_sampling_error(planned) -> None:
    """The paths are mean-centred on the plan's escalation (E[m_t] = (1 + e)^t, Hull ch. 14) and
    costs are linear in prices, so the mean NPV over the paths estimates the roadmap's NPV."""
    _, result = planned
    risk = result.roadmap.price_risk
    mean_npv = risk.do_nothing_cost_usd.mean - risk.plan_cost_usd.mean
    spread = (risk.do_nothing_cost_usd.p90 - risk.do_nothing_cost_usd.p10) / 2.563  # ~ 1 sd (normal)
    assert abs(mean_npv - result.roadmap.npv_usd) < 4 * spread / np.sqrt(risk.paths) + 1.0


def test_electrifying_a_fuel_heated_home_cuts_its_exposure_to_price_shocks(planned) -> None:
    _, result = planned
    risk = result.roadmap.price_risk
    assert risk.bill_shock_after_usd < risk.bill_shock_before_usd
    fossil = [s for s in risk.shocks if s.fuel in ("gas", "propane", "oil")]
    assert fossil and all(s.after_usd < s.before_usd for s in fossil)


def test_the_seed_makes_the_figures_repeatable() -> None:
    a = _plan("minimal").roadmap.price_risk
    b = _plan("minimal").roadmap.price_risk
    c = _plan("minimal", prices__uncertainty__seed=99).roadmap.price_risk
    assert a.to_dict() == b.to_dict()
    assert a.plan_cost_usd.p90 != c.plan_cost_usd.p90


def test_solar_lock_in_beside_the_utility_price() -> None:
    result = _plan("oil_boiler_no_ducts")
    hedge = result.finance.solar_hedge
    solar = result.roadmap.price_risk.solar
    assert hedge is not None and solar is not None
    assert solar.lcoe_usd_per_kwh == hedge.lcoe_usd_per_kwh
    assert solar.utility_usd_per_kwh.p10 < solar.utility_usd_per_kwh.p90
    flat = _plan("oil_boiler_no_ducts", prices__uncertainty__volatility_factor=0.0).roadmap.price_risk.solar
    # with one certain path the utility's levelised price is the hedge's (NREL/TP-462-5173 form)
    assert flat.utility_usd_per_kwh.p50 == pytest.approx(hedge.utility_levelised_usd_per_kwh, abs=1e-4)


def test_history_drift_follows_the_trend_of_the_table() -> None:
    risk = _plan("minimal", prices__uncertainty__drift="history").roadmap.price_risk
    for f in risk.fuels:
        assert f.drift_pct == pytest.approx(f.historic_trend_pct)
    assert risk.drift == "history"


def test_the_risk_aware_objective_is_never_worse_on_its_own_scenarios() -> None:
    """The risk-aware plan minimises expected cost + weight x CVaR over the plan's scenarios:
    scored by the scheduler's exact evaluator on those scenarios, the best-NPV plan cannot do
    better (a property of the optimum; the formulation itself is checked against brute force in
    tests/schedule/test_agreement.py)."""
    from homeplan.planner.capacity import plan_capacity
    from homeplan.planner.chain import prepare_home, size_projects
    from homeplan.planner.context import PlannerCache
    from homeplan.planner.incentives import IncentiveModel, plan_programs
    from homeplan.planner.scheduling import schedule
    from homeplan.schedule.problem import evaluate

    loaded = load_plan(ROOT / "sample_homes" / "minimal.yaml")
    outcomes = {}
    for objective in ("npv", "risk_aware"):
        plan = loaded.with_values({("choices", "objective"): objective,
                                   ("choices", "risk_weight"): 2.0}).plan
        ctx = size_projects(prepare_home(plan, loaded.base_dir, PlannerCache()))
        cap = plan_capacity(ctx)
        ctx = ctx.with_details(cap.details)
        outcomes[objective] = schedule(ctx, cap.model, IncentiveModel(ctx, plan_programs(ctx)))
    risky = outcomes["risk_aware"]
    assert risky.problem.objective == "min_cost_cvar" and risky.problem.n_scenarios == 100
    own = evaluate(risky.problem, risky.solution.years)
    other = evaluate(risky.problem, outcomes["npv"].solution.years)
    if not other.violations:
        assert own.risk_cost_usd <= other.risk_cost_usd + 2e-5 * abs(other.risk_cost_usd)  # solver gap 1e-5
    assert own.risk_cost_usd == pytest.approx(risky.solution.objective_value, rel=1e-6)
