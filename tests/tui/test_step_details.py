"""The roadmap view's details of a project: what a household reads when it selects a row.

A view test: the details must carry what the planner decided (the step's cost beyond the
like-for-like purchase it avoids, why solar is left out) - the planner's own figures are the
reference, so no outside source is needed. Demo homes are the invented samples.
"""

from __future__ import annotations

from homeplan import load_plan, plan_roadmap
from homeplan.tui.format import usd
from homeplan.tui.widgets.base import ViewData
from homeplan.tui.widgets.roadmap import project_rows, row_details
from tests.conftest import SAMPLES


def _details(path):
    loaded = load_plan(path)
    result = plan_roadmap(loaded)
    data = ViewData(plan=loaded.plan, result=result, path=path)
    return result, {r.id: row_details(data, r).plain for r in project_rows(data)}


def test_left_out_solar_says_why_and_a_due_replacement_shows_the_difference():
    result, details = _details(SAMPLES[0])  # cold_gas_100a: solar waits on an old roof
    (out,) = [x for x in result.roadmap.left_out if x.project_id == "solar"]
    assert f"Why not: {out.reason}" in details["solar"]
    hp = next(s for s in result.roadmap.steps if s.project_id == "heat_pump")
    assert hp.avoided_usd > 0  # the furnace and the air conditioner are due the same year
    assert f"{usd(hp.incremental_cost_usd)} beyond it" in details["heat_pump"]
