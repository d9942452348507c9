"""When the budget cannot replace every appliance by its replace-by year, the plan allows the
fewest extra years that make it feasible.

The planner finds that number by galloping search with feasibility tests; the reference is the
search it replaced: every delay in turn, 0, 1, 2, ..., each solved in full with the exact
settings (presolve off, gap 0), the first with a plan. The sample homes and budgets are invented.
"""

from __future__ import annotations

import copy

import pytest

from homeplan import PlannerCache
from homeplan.plan.load import load_plan, validate_document
from homeplan.plan.save import set_in
from homeplan.planner import scheduling
from homeplan.planner.chain import plan_capacity, plan_programs, prepare_home, size_projects
from homeplan.planner.incentives import IncentiveModel
from homeplan.schedule.milp import MilpSolver

from ..conftest import ROOT

EXACT = MilpSolver(time_limit_s=60.0, mip_rel_gap=0.0, presolve=False)


def _inputs(sample: str, budget_usd: float):
    loaded = load_plan(ROOT / "sample_homes" / f"{sample}.yaml")
    doc = copy.deepcopy(loaded.document)
    set_in(doc, ("budget", "usd_per_year"), budget_usd)
    plan, _ = validate_document(doc, sample)
    ctx = size_projects(prepare_home(plan, loaded.base_dir, PlannerCache()))
    cap = plan_capacity(ctx)
    ctx = ctx.with_details(cap.details).with_sizes(cap.sizes)
    incentives = IncentiveModel(ctx, plan_programs(ctx))
    co = {pid: scheduling.coefficients(ctx, pid, set(), incentives) for pid in ctx.details}
    return ctx, cap.model, co, incentives.groups()


@pytest.mark.parametrize(("sample", "budget_usd", "needs_delay"), [
    ("cold_gas_100a", 7000.0, True),
    ("oil_boiler_no_ducts", 4000.0, True),
    ("oil_boiler_no_ducts", 6000.0, False),
    ("cold_gas_100a", 3000.0, False),  # no delay is enough: the windows are dropped or no plan
])
def test_fewest_extra_years_match_trying_each_in_turn(sample: str, budget_usd: float,
                                                     needs_delay: bool) -> None:
    ctx, capacity, co, groups = _inputs(sample, budget_usd)
    notes: list[str] = []
    _, solution, delay = scheduling._solve_relaxing(ctx, co, capacity, True, groups, notes)
    reference = next((d for d in range(len(ctx.years))
                      if EXACT.solve(scheduling.build_problem(ctx, co, capacity, implicit_target=True,
                                                              delay=d, groups=groups)).feasible), None)
    assert delay == reference
    assert (reference is not None and reference > 0) == needs_delay  # the case is what it says
    if delay:
        assert solution.feasible
        assert f"the plan allows up to {delay} more year(s)" in " ".join(notes)
