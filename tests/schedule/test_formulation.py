"""Small worked examples, each solved by hand (noted beside the expected values).

Demo projects and numbers are invented.
"""

from __future__ import annotations

import dataclasses

import pytest

from homeplan.schedule.bruteforce import BruteForceSolver
from homeplan.schedule.milp import MilpSolver, build_model, solve
from homeplan.schedule.problem import (
    ExclusiveGroup,
    IncentiveGroup,
    Interaction,
    Prerequisite,
    Problem,
    Project,
    Target,
    evaluate,
)

MILP = MilpSolver(mip_rel_gap=0.0)


def flat(value: float, n: int) -> tuple[float, ...]:
    return (float(value),) * n


def test_capped_incentive_spreads_two_items_over_two_years() -> None:
    # Two $6,000 heat pumps, 30 % credit capped at $2,000 a year (invented program), budget
    # $12,000 a year with carryover, value $6,500 each whenever done, no discounting.
    # Same year: credit min(0.3 * 12000, 2000) = 2000 -> NPV 2*6500 - 12000 + 2000 = 3000.
    # Two years: 2 * min(1800, 2000) = 3600 -> NPV 13000 - 12000 + 3600 = 4600 (worked by hand).
    hp1 = Project("hp1", flat(6000, 2), value_usd=flat(6500, 2))
    hp2 = Project("hp2", flat(6000, 2), value_usd=flat(6500, 2))
    credit = IncentiveGroup("credit", {"hp1": 0.3, "hp2": 0.3}, cap_usd_per_year=2000)
    pr = Problem(2026, flat(12000, 2), (hp1, hp2), incentive_groups=(credit,))
    sol = MILP.solve(pr)
    assert sol.status == "optimal"
    assert {sol.years["hp1"], sol.years["hp2"]} == {2026, 2027}
    assert sol.objective_value == pytest.approx(4600.0)  # worked by hand above
    assert sum(sol.incentives_usd["credit"]) == pytest.approx(3600.0)


def test_end_of_life_penalty_pulls_replacement_before_failure() -> None:
    # Water heater: replacing costs $4,000 any year and brings $3,000 of value; left undone it
    # carries an expected emergency cost of $0, $0, $2,500, $2,500 in years 0..3 (invented).
    # Done in year t avoids penalties from t on: NPV(t) = 3000 - 4000 - sum_{s<t} pen[s]:
    # with the cost falling $100 a year: t=0 -> -1000, t=1 -> -900, t=2 -> -800,
    # t=3 -> 3000 - 3700 - 5000 = -5700, never -> -5000. Best t=2, NPV -800 (worked by hand).
    wh = Project(
        "hpwh",
        (4000, 3900, 3800, 3700),
        value_usd=flat(3000, 4),
        undone_penalty_usd=(0, 0, 2500, 2500),
    )
    pr = Problem(2026, flat(10000, 4), (wh,))
    sol = MILP.solve(pr)
    assert sol.years["hpwh"] == 2028
    assert sol.objective_value == pytest.approx(-800.0)  # worked by hand above


def test_loan_just_in_time_and_interest() -> None:
    # Budget $0 then $5,000; a $4,000 project worth $4,500 only in year 0; loan limit $5,000 at
    # 5 % over 2 years, no discounting: borrow exactly 4000 in year 0 and repay
    # a = 0.05 / (1 - 1.05^-2) = 0.537805 per dollar in years 1 and 2; interest
    # 4000 * (2a - 1) = 302.44; NPV 4500 - 4000 - 302.44 = 197.56 (worked by hand).
    p = Project("p", (4000, 4000), value_usd=(4500, 0))
    pr = Problem(2026, (0, 5000), (p,), loan_limit_usd=5000, loan_rate=0.05, loan_term_years=2)
    sol = MILP.solve(pr)
    assert sol.years["p"] == 2026
    assert sol.loans_usd[0] == pytest.approx(4000.0)  # worked by hand above
    assert sol.objective_value == pytest.approx(197.56, abs=0.01)
    # without the loan it cannot be done in year 0 and is worthless later -> left out
    sol2 = MILP.solve(pr.replace(loan_limit_usd=0.0))
    assert sol2.years["p"] is None


def test_loan_annuity_factor_matches_textbook() -> None:
    # 10 % over 3 years: a = 0.1 / (1 - 1.1^-3) = 0.402115 (standard annuity table value)
    pr = Problem(2026, (0.0,), (), loan_rate=0.10, loan_term_years=3)
    assert pr.annuity_factor() == pytest.approx(0.402115, abs=1e-6)


def test_budget_carryover_versus_use_it_or_lose_it() -> None:
    # $3,000 a year, one $5,000 project worth $6,000 less $100 a year of delay: with carryover
    # it is done in year 1, the first affordable (3000 + 3000 >= 5000); without carryover never
    # (worked by hand).
    p = Project("p", flat(5000, 3), value_usd=(6000, 5900, 5800))
    pr = Problem(2026, flat(3000, 3), (p,))
    assert MILP.solve(pr).years["p"] == 2027
    assert MILP.solve(pr.replace(carryover=False)).years["p"] is None


def test_bill_savings_added_to_later_budgets() -> None:
    # Year budgets 5000, 0; A costs 5000 (NPV 500) and saves $2,000 in year 1; B costs 2000 in
    # year 1 (NPV 400). Only with savings reinvested can both be afforded; without, A alone
    # (500) beats B alone (400) (worked by hand).
    a = Project("a", (5000, 5000), value_usd=(5500, 0), savings_usd=(0, 2000))
    b = Project("b", (9999, 2000), value_usd=(0, 2400))
    pr = Problem(2026, (5000, 0), (a, b), savings_to_budget=True)
    sol = MILP.solve(pr)
    assert sol.years == {"a": 2026, "b": 2027}
    assert MILP.solve(pr.replace(savings_to_budget=False)).years["b"] is None


def test_any_of_capacity_and_remedy() -> None:
    # Service headroom 40 A (invented). A heat pump uses 50 A: needs either a panel upgrade
    # (provides 100 A, $3,000) or load management (provides 20 A, $500) first. Load management
    # alone leaves 40 + 20 - 50 = 10 A >= 0, and is cheaper (worked by hand).
    hp = Project("hp", flat(8000, 2), value_usd=flat(12000, 2), capacity_use=50)
    panel = Project("panel", flat(3000, 2), capacity_provided=100)
    lm = Project("lm", flat(500, 2), capacity_provided=20)
    pr = Problem(
        2026,
        flat(20000, 2),
        (hp, panel, lm),
        capacity_base=40,
        prerequisites=(Prerequisite("hp", ("panel", "lm")),),
    )
    sol = MILP.solve(pr)
    assert sol.years["panel"] is None and sol.years["lm"] is not None
    assert sol.years["hp"] is not None and sol.years["lm"] <= sol.years["hp"]
    assert sol.objective_value == pytest.approx(3500.0)  # 12000 - 8000 - 500
    # if the heat pump needs 70 A, load management is not enough: the panel is required
    big = pr.replace(projects=(dataclasses.replace(hp, capacity_use=70), panel, lm))
    sol2 = MILP.solve(big)
    assert sol2.years["panel"] is not None
    assert sol2.objective_value == pytest.approx(1000.0)  # 12000 - 8000 - 3000


def test_earliest_gas_closure_then_best_npv() -> None:
    # Closing gas ("close") needs the furnace and water heater replaced strictly before; budget
    # $10,000 a year with carryover; furnace 9000, water heater 4000, closure 500.
    # Years: 2026 furnace (9000), 2027 water heater (4000 <= 1000 + 10000), 2028 close:
    # earliest closure 2028 (worked by hand).
    f = Project("furnace", flat(9000, 5), value_usd=flat(9500, 5))
    w = Project("wh", flat(4000, 5), value_usd=flat(4200, 5))
    c = Project("close", flat(500, 5), value_usd=flat(0, 5))
    pr = Problem(
        2026,
        flat(10000, 5),
        (f, w, c),
        prerequisites=(
            Prerequisite("close", ("furnace",), strict=True),
            Prerequisite("close", ("wh",), strict=True),
        ),
        objective="earliest_gas_closure",
        objective_project="close",
    )
    # Both in 2026 would cost 13000 > 10000, so the closure cannot be 2027. NPV then is
    # (9500 - 9000) + (4200 - 4000) - 500 = 200 whatever the years (no discounting).
    sol = MILP.solve(pr)
    assert sol.objective_value == 2028  # worked by hand above
    assert sol.years["close"] == 2028
    assert sol.npv_usd == pytest.approx(200.0)
    assert BruteForceSolver().solve(pr).objective_value == 2028


def test_min_out_of_pocket_with_target() -> None:
    # Target: both projects by 2027. Costs fall 10 % a year; out of pocket is the nominal
    # spend, so the latest allowed year is chosen: 2027 for both: 900 + 1800 = 2700 (by hand).
    a = Project("a", (1000, 900, 810), value_usd=flat(0, 3))
    b = Project("b", (2000, 1800, 1620), value_usd=flat(0, 3))
    pr = Problem(
        2026, flat(5000, 3), (a, b), targets=(Target(("a", "b"), 2027),), objective="min_out_of_pocket"
    )
    sol = MILP.solve(pr)
    assert sol.years == {"a": 2027, "b": 2027}
    assert sol.objective_value == pytest.approx(2700.0)  # worked by hand above


def test_min_emissions_within_budget_and_exclusive_variants() -> None:
    # Two variants of one heat pump (choose at most one): ducted saves 30 t for $12,000,
    # mini-split 20 t for $7,000; plus an induction range saving 2 t for $3,000. Budget $10,000
    # total (one year): ducted alone 30 t does not fit with the range; best is mini-split +
    # range = 22 t (12000 > 10000 rules out ducted) (worked by hand).
    ducted = Project("ducted", (12000,), emissions_kg=(30000,))
    mini = Project("mini", (7000,), emissions_kg=(20000,))
    rng = Project("range", (3000,), emissions_kg=(2000,))
    pr = Problem(
        2026,
        (10000,),
        (ducted, mini, rng),
        exclusive_groups=(ExclusiveGroup(("ducted", "mini")),),
        objective="min_emissions",
    )
    sol = MILP.solve(pr)
    assert sol.done() == {"mini": 2026, "range": 2026}
    assert sol.objective_value == pytest.approx(22000.0)  # worked by hand above


def test_pins_and_exclusions_are_bounds() -> None:
    p = Project("p", flat(100, 3), value_usd=flat(1000, 3), pinned_year=2028)
    q = Project("q", flat(100, 3), value_usd=flat(1000, 3), excluded=True)
    pr = Problem(2026, flat(1000, 3), (p, q))
    model = build_model(pr)
    # variables are "done by year t": closed before the pin, closed everywhere when excluded
    assert list(model.ub[:3]) == [0.0, 0.0, 1.0]
    assert list(model.ub[3:6]) == [0.0, 0.0, 0.0]
    assert solve(pr).years == {"p": 2028, "q": None}


def test_infeasible_is_reported_by_both_solvers() -> None:
    p = Project("p", flat(5000, 2), mandatory=True)
    pr = Problem(2026, flat(1000, 2), (p,))
    assert MILP.solve(pr).status == "infeasible"
    assert BruteForceSolver().solve(pr).status == "infeasible"
    assert evaluate(pr, {"p": 2027}).violations == ("budget",)


def test_interaction_synergy_and_overlap() -> None:
    # Solar alone: cost 10000, value 9500 -> not worth it. With the heat pump done, solar gains
    # $400 a year of extra value for 3 years (invented). Both in 2026: heat pump 8000 -> 9000,
    # solar -500, synergy 3 * 400 = 1200: NPV 1000 + 700 = 1700 > 1000 (heat pump alone).
    hp = Project("hp", flat(8000, 3), value_usd=flat(9000, 3))
    solar = Project("solar", flat(10000, 3), value_usd=flat(9500, 3))
    syn = Interaction("hp", "solar", flat(400, 3))
    pr = Problem(2026, flat(30000, 3), (hp, solar), interactions=(syn,))
    sol = MILP.solve(pr)
    assert sol.done() == {"hp": 2026, "solar": 2026}
    assert sol.objective_value == pytest.approx(1700.0)  # worked by hand above
    # an overlap of -$600 a year makes doing both worse than the heat pump alone (1000)
    over = pr.replace(interactions=(Interaction("hp", "solar", flat(-600, 3)),),
                      projects=(hp, dataclasses.replace(solar, value_usd=flat(10500, 3))))
    # both in 2026: 1000 + 500 - 1800 = -300; solar 2026 + heat pump 2028: 1500 - 600 = 900;
    # heat pump alone (any year, no discounting) 1000; solar alone 500 (worked by hand)
    sol2 = MILP.solve(over)
    assert sol2.years["solar"] is None and sol2.years["hp"] is not None
    assert sol2.objective_value == pytest.approx(1000.0)
