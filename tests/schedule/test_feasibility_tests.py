"""Feasibility tests (constraints alone, zero objective) and the searches built on them.

The reference for "is there a plan" is exhaustive enumeration (``BruteForceSolver``); the
searches are checked against a plain linear scan of every candidate.
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from homeplan.schedule.bruteforce import BruteForceSolver
from homeplan.schedule.explain import diagnose, first_true, minimum_extra_budget
from homeplan.schedule.milp import MilpSolver
from homeplan.schedule.problem import Problem, Project
from tests.schedule.instances import random_problem

SOLVER = MilpSolver(time_limit_s=20.0, mip_rel_gap=1e-5, presolve=True)


@settings(max_examples=300, deadline=None, derandomize=True)
@given(lo=st.integers(-3, 5), width=st.integers(-1, 40), answer=st.integers(-6, 50))
def test_first_true_finds_the_smallest_passing_value(lo: int, width: int, answer: int) -> None:
    hi = lo + width
    asked: list[int] = []

    def test(k: int) -> bool:
        assert lo <= k <= hi, "asked outside the range"
        asked.append(k)
        return k >= answer

    expected = next((k for k in range(lo, hi + 1) if k >= answer), None)  # a linear scan
    assert first_true(lo, hi, test) == expected
    assert len(asked) == len(set(asked))  # no value asked twice


def test_first_true_asks_few_when_the_answer_is_near_the_start() -> None:
    asked: list[int] = []
    assert first_true(1, 1000, lambda k: asked.append(k) or k >= 2) == 2
    assert len(asked) <= 3


@pytest.mark.parametrize("seed", range(60))
def test_feasibility_test_agrees_with_enumeration(seed: int) -> None:
    pr = random_problem(seed)
    assert SOLVER.feasible(pr) == BruteForceSolver().solve(pr).feasible


@pytest.mark.parametrize("seed", range(0, 60, 3))
def test_feasibility_with_extra_budget_is_the_problem_with_that_budget(seed: int) -> None:
    pr = random_problem(seed)
    test = SOLVER.feasible_with_extra_budget(pr)
    for extra in (0.0, 250.0, 5_000.0):
        richer = pr.replace(budget_usd=tuple(b + extra for b in pr.budget_usd))
        assert test(extra) == BruteForceSolver().solve(richer).feasible, extra


def test_minimum_extra_budget_same_with_either_kind_of_test() -> None:
    # Budgets 1000, 0, 0 with carryover; a mandatory $2,600 job due by 2027 needs
    # 1000 + 2e >= 2600 -> e = 800 (worked by hand).
    p = Project("p", (2600.0,) * 3, mandatory=True, latest_year=2027)
    pr = Problem(2026, (1000, 0, 0), (p,))
    assert minimum_extra_budget(pr, SOLVER.feasible) == pytest.approx(800.0)
    assert minimum_extra_budget(pr, with_extra=SOLVER.feasible_with_extra_budget(pr)) == pytest.approx(800.0)


def test_a_diagnosis_out_of_tests_says_so_and_names_only_what_it_checked() -> None:
    p = Project("p", (2600.0,) * 3, mandatory=True, latest_year=2027, label="Heat pump")
    pr = Problem(2026, (1000, 0, 0), (p,))
    full = diagnose(pr)
    assert full.extra_budget_usd_per_year == pytest.approx(800.0)
    assert "stopped" not in full.message
    cut = diagnose(pr, max_tests=0)  # no test after the first
    assert "stopped after 0 tests" in cut.message
    assert cut.extra_budget_usd_per_year is None and cut.blocking == ()
