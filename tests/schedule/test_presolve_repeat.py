"""An answer found with presolve is checked before it is believed, and repeated without presolve.

HiGHS with presolve has been seen to declare feasible instances infeasible and to return worse
plans as optimal on random instances. These tests replace the presolved answer with a wrong one and check that the solver
notices and repeats the stage without presolve; the reference optimum is exhaustive enumeration.
"""

from __future__ import annotations

import dataclasses
from types import SimpleNamespace
from typing import Any

import numpy as np
import pytest

from homeplan.schedule.bruteforce import BruteForceSolver
from homeplan.schedule.milp import MilpSolver
from homeplan.schedule.problem import evaluate
from tests.schedule.instances import random_problem

SOLVER = MilpSolver(time_limit_s=20.0, mip_rel_gap=1e-5, presolve=True)


def _worse(objective: str, got: float, best: float) -> bool:
    if objective in ("min_out_of_pocket", "earliest_gas_closure"):
        return got > best + 1.0
    return got < best - 1.0


def _feasible_seed(objective: str) -> int:
    """A feasible instance whose "nothing done" placement is infeasible or clearly worse."""
    for seed in range(500):
        pr = random_problem(seed, objective=objective)
        best = BruteForceSolver().solve(pr)
        if not best.feasible or len(pr.projects) < 2:
            continue
        nothing = evaluate(pr, {p.id: None for p in pr.projects})
        if nothing.violations or _worse(objective, nothing.objective_value, best.objective_value):
            return seed
    raise AssertionError("no suitable instance")


def _lying(kind: str, real: Any) -> Any:
    """A stand-in for HiGHS whose presolved answers are wrong in the way named by ``kind``."""
    calls: list[bool] = []

    def highs(self: MilpSolver, model: Any, time_limit_s: float, presolve: bool) -> Any:
        calls.append(presolve)
        res = real(self, model, time_limit_s, presolve)
        if not presolve:
            return res
        if kind == "infeasible":
            return SimpleNamespace(x=None, status=2, message="fake: infeasible", fun=None)
        # "worse": nothing done, yet claimed to be worth the true optimum
        x = np.zeros_like(res.x)
        return SimpleNamespace(x=x, status=0, message="fake", fun=res.fun, mip_gap=0.0)

    return highs, calls


@pytest.mark.parametrize("objective", ["max_npv", "min_emissions", "earliest_gas_closure"])
@pytest.mark.parametrize("kind", ["infeasible", "worse"])
def test_wrong_presolved_answer_is_repeated_without_presolve(
    monkeypatch: pytest.MonkeyPatch, kind: str, objective: str
) -> None:
    pr = random_problem(_feasible_seed(objective), objective=objective)
    best = BruteForceSolver().solve(pr)
    highs, calls = _lying(kind, MilpSolver._highs)
    monkeypatch.setattr(MilpSolver, "_highs", highs)
    got = SOLVER.solve(pr)
    assert got.feasible and got.presolve_retried
    assert False in calls  # a solve without presolve happened
    # exhaustive enumeration's optimum, within the relative gap
    assert abs(got.objective_value - best.objective_value) <= 1e-5 * max(1.0, abs(best.objective_value))


def test_no_repeat_when_the_answer_holds_up() -> None:
    pr = random_problem(_feasible_seed("max_npv"), objective="max_npv")
    got = SOLVER.solve(pr)
    assert got.feasible and not got.presolve_retried


def test_repeat_can_be_turned_off(monkeypatch: pytest.MonkeyPatch) -> None:
    pr = random_problem(_feasible_seed("max_npv"), objective="max_npv")
    highs, calls = _lying("infeasible", MilpSolver._highs)
    monkeypatch.setattr(MilpSolver, "_highs", highs)
    got = dataclasses.replace(SOLVER, retry_without_presolve=False).solve(pr)
    assert got.status == "infeasible" and calls == [True]


@pytest.mark.parametrize("seed", [100557, 100750])
def test_instances_presolve_called_infeasible(seed: int) -> None:
    """Two random instances (8 projects x 10 years at most) that HiGHS 1.x with presolve called
    infeasible (benchmarks/bench_solver_agreement.py --raw); exhaustive enumeration finds plans."""
    pr = random_problem(seed, max_projects=8, max_years=10, max_combinations=200_000)
    best = BruteForceSolver().solve(pr)
    got = SOLVER.solve(pr)
    assert best.feasible and got.feasible
    assert abs(got.objective_value - best.objective_value) <= 1e-5 * max(1.0, abs(best.objective_value))
