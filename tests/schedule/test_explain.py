"""Plain-words reasons and infeasibility diagnosis. Demo projects and numbers are invented."""

from __future__ import annotations

import pytest

from homeplan.schedule.explain import diagnose, diagnose_infeasible, explain, minimum_extra_budget
from homeplan.schedule.milp import MilpSolver
from homeplan.schedule.problem import ExclusiveGroup, Prerequisite, Problem, Project, Target
from tests.schedule.instances import random_problem

MILP = MilpSolver(mip_rel_gap=0.0)
T = 6


def flat(value: float, n: int = T) -> tuple[float, ...]:
    return (float(value),) * n


def demo_home() -> Problem:
    """Invented home: a panel upgrade before a heat pump, an ageing gas water heater, solar
    whose price falls 6 % a year, a rebate that ends in 2027."""
    panel = Project("panel", flat(3000), label="Panel upgrade")
    hp = Project("hp", flat(9000), label="Heat pump", value_usd=flat(12000))
    hpwh = Project(
        "hpwh",
        flat(4000),
        label="Heat pump water heater",
        value_usd=flat(4500),
        undone_penalty_usd=(0, 0, 500, 1500, 1500, 1500),
        failure_item="the water heater",
        failure_prob_by_year=(0.1, 0.2, 0.4, 0.6, 0.75, 0.85),
    )
    solar = Project(
        "solar",
        tuple(15000 * 0.94**t for t in range(T)),
        label="Solar",
        value_usd=flat(14000),
    )
    range_ = Project(
        "range",
        flat(2000),
        label="Induction range",
        value_usd=(2600, 2600, 0, 0, 0, 0),  # invented rebate makes it worth it until 2027
        latest_year=2027,
        window_reason="the rebate ends",
    )
    return Problem(
        2026,
        flat(6000),
        (panel, hp, hpwh, solar, range_),
        prerequisites=(Prerequisite("hp", ("panel",)),),
        discount_rate=0.03,
    )


def test_reasons_name_the_binding_constraint() -> None:
    pr = demo_home()
    sol = MILP.solve(pr)
    why = explain(pr, sol)
    assert "after the panel upgrade" in why["hp"]
    assert sol.years["panel"] in (sol.years["hp"], sol.years["hp"] - 1)
    # solar 15000 * 0.94^t: the geometric rate between any two years is 6 %
    assert "cheaper later: cost falls 6 %/yr" in why["solar"]
    # failure probability first reaches >= 50 % in 2029 (0.6), per the invented curve
    assert sol.years["hpwh"] <= 2028
    assert any("before the water heater's likely failure (60 % by 2029)" == r for r in why["hpwh"])
    assert sol.years["range"] is not None


def test_waiting_for_budget_and_rebate_end() -> None:
    # Two projects worth doing at once but $5,000 a year only fits one of $4,000 per year.
    a = Project("a", flat(4000, 3), label="Attic insulation", value_usd=(6000, 6000, 0),
                latest_year=2027, window_reason="the rebate ends")
    b = Project("b", flat(4000, 3), label="Heat pump water heater", value_usd=(5000, 4900, 4800))
    pr = Problem(2026, flat(5000, 3), (a, b), carryover=False)
    sol = MILP.solve(pr)
    why = explain(pr, sol)
    later = "a" if sol.years["a"] == 2027 else "b"
    assert sol.years["a"] != sol.years["b"]
    assert "waiting for budget" in why[later]
    if sol.years["a"] == 2027:
        assert "before the rebate ends" in why["a"]


def test_pinned_and_excluded() -> None:
    a = Project("a", flat(100, 3), label="Heat pump", value_usd=flat(1000, 3), pinned_year=2028)
    b = Project("b", flat(100, 3), label="Solar", value_usd=flat(1000, 3), excluded=True)
    c = Project("c", flat(5000, 3), label="Battery", value_usd=flat(100, 3))
    pr = Problem(2026, flat(10000, 3), (a, b, c))
    why = explain(pr, MILP.solve(pr))
    assert why["a"] == ("pinned by you to 2028",)
    assert why["b"] == ("excluded by you",)
    assert why["c"] == ("not worth it within the horizon",)


def target_problem() -> Problem:
    # Fully electric by 2027: heat pump 9000, water heater 4000, panel 3000 (invented).
    # Two years of $6,000 = 12,000 < 16,000; the minimum extra is (16000 - 12000) / 2 = $2,000
    # a year (worked by hand), or the target moves to 2028 (3 x 6000 = 18000 >= 16000).
    panel = Project("panel", flat(3000), label="Panel upgrade")
    hp = Project("hp", flat(9000), label="Heat pump", value_usd=flat(12000))
    wh = Project("wh", flat(4000), label="Heat pump water heater", value_usd=flat(4500))
    return Problem(
        2026,
        flat(6000),
        (panel, hp, wh),
        prerequisites=(Prerequisite("hp", ("panel",)),),
        targets=(Target(("panel", "hp", "wh"), 2027),),
    )


def test_diagnosis_names_budget_and_the_extra_needed() -> None:
    pr = target_problem()
    assert not MILP.solve(pr).feasible
    d = diagnose(pr)
    assert not d.feasible
    assert "budget" in d.blocking and "target" in d.blocking
    assert d.extra_budget_usd_per_year == pytest.approx(2000.0)  # worked by hand above
    assert d.target_year == 2028  # worked by hand above
    assert "budget" in d.message and "$2,000 a year" in d.message and "2028" in d.message
    # re-solve with the extra budget: feasible; $10 less: still infeasible
    extra = d.extra_budget_usd_per_year
    assert MILP.solve(pr.replace(budget_usd=tuple(b + extra for b in pr.budget_usd))).feasible
    assert not MILP.solve(pr.replace(budget_usd=tuple(b + extra - 10 for b in pr.budget_usd))).feasible
    assert diagnose_infeasible(pr) == d.message


def test_minimum_extra_budget_uneven_years() -> None:
    # Budgets 1000, 0, 0 with carryover; a mandatory $2,600 job due by 2027 needs
    # 1000 + 2e >= 2600 -> e = 800 (worked by hand).
    p = Project("p", flat(2600, 3), mandatory=True, latest_year=2027)
    pr = Problem(2026, (1000, 0, 0), (p,))

    def feasible(x: Problem) -> bool:
        return MILP.solve(x).feasible

    assert minimum_extra_budget(pr, feasible) == pytest.approx(800.0)


def test_diagnosis_of_structural_conflict() -> None:
    p = Project("p", flat(100, 3), label="Heat pump", pinned_year=2027, latest_year=2026)
    pr = Problem(2026, flat(1000, 3), (p,))
    d = diagnose(pr)
    assert "pin" in d.blocking or "window" in d.blocking
    assert "pinned to 2027, after its window closes (2026)" in d.message


def test_feasible_request_is_said_to_be_feasible() -> None:
    d = diagnose(demo_home())
    assert d.feasible and d.blocking == ()


def test_diagnosis_of_two_required_variants() -> None:
    a = Project("a", flat(100, 3), label="Ducted heat pump", mandatory=True)
    b = Project("b", flat(100, 3), label="Mini-split", mandatory=True)
    pr = Problem(2026, flat(1000, 3), (a, b), exclusive_groups=(ExclusiveGroup(("a", "b")),))
    d = diagnose(pr)
    assert d.blocking == ("mandatory",) or "exclusive" in d.blocking or "mandatory" in d.blocking
    assert "only one of Ducted heat pump, Mini-split may be done" in d.message


def test_waiting_for_service_capacity() -> None:
    # 40 A of headroom (invented): the charger (40 A) and the range (40 A) cannot both be
    # installed until the panel upgrade (+100 A) is done; the panel is affordable in 2027.
    # 2026's $2,000 pays for both appliances, so only capacity holds one back (by hand).
    charger = Project("charger", flat(1000, 3), label="EV charger", value_usd=(3000, 2500, 2000),
                      capacity_use=40)
    range_ = Project("range", flat(1000, 3), label="Induction range", value_usd=(3000, 2600, 2100),
                     capacity_use=40)
    panel = Project("panel", (9000, 3000, 3000), label="Panel upgrade", capacity_provided=100,
                    value_usd=flat(3500, 3))
    pr = Problem(2026, (2000, 5000, 0), (charger, range_, panel), capacity_base=40,
                 carryover=False)
    sol = MILP.solve(pr)
    why = explain(pr, sol)
    later = [p for p in ("charger", "range") if sol.years[p] == 2027]
    assert sol.years["panel"] == 2027 and len(later) == 1
    assert "waiting for service capacity" in why[later[0]]


def test_explanations_cover_every_project() -> None:
    explained = 0
    for seed in range(40):
        pr = random_problem(seed)
        sol = MILP.solve(pr)
        if not sol.feasible:
            continue  # nothing to explain; bounded below
        explained += 1
        why = explain(pr, sol)
        assert set(why) == set(pr.ids), seed
        for pid, reasons in why.items():
            assert reasons, (seed, pid)  # every project gets at least one reason
            assert all(isinstance(r, str) and r for r in reasons)
    assert explained >= 20  # not vacuous: measured 29 of the 40 instances have a plan


def test_explanation_of_a_project_delayed_to_avoid_a_follow_up() -> None:
    # Found by the earlier random search (instance 625): p2 (mandatory, after p1) is placed in
    # the last year, which keeps the follow-up "p0 within a year of p1 and p2" outside the plan;
    # its reason names that follow-up.
    pr = random_problem(625)
    assert [(f.project, set(f.after), f.within_years) for f in pr.followups] == [("p0", {"p1", "p2"}, 1)]
    sol = MILP.solve(pr)
    assert sol.feasible
    (reason,) = explain(pr, sol)["p2"]
    assert "would have to follow within 1 year" in reason


def test_extra_budget_found_by_diagnosis_really_works() -> None:
    """Infeasible random instances (of at most 200 drawn) until five diagnoses have named an
    extra budget: each names the problem in words, and the extra budget makes the instance
    feasible while $10 less does not. (Measured: the fifth comes at seed 44, after 17
    infeasible instances; the others cannot be fixed by money alone.)"""
    infeasible = with_budget = 0
    for seed in range(200):
        pr = random_problem(seed, max_projects=4, max_years=5)
        if MILP.solve(pr).feasible:
            continue  # this test is about infeasible instances; their count is bounded below
        infeasible += 1
        d = diagnose(pr)
        assert not d.feasible and d.message, seed
        if d.extra_budget_usd_per_year is not None:  # None: no budget fixes it (told in words)
            with_budget += 1
            e = d.extra_budget_usd_per_year
            assert MILP.solve(pr.replace(budget_usd=tuple(b + e for b in pr.budget_usd))).feasible
            if e >= 10:
                less = pr.replace(budget_usd=tuple(b + e - 10 for b in pr.budget_usd))
                assert not MILP.solve(less).feasible, seed
        if with_budget == 5:
            break
    assert with_budget == 5, f"only {with_budget} of {infeasible} diagnoses named an extra budget"
