"""Plan and roadmap differences in plain words, with a "because" for a single input change.

The expected wording is our own (for example "heat pump moved 2028 -> 2027 because the budget
rose to $9,000"); the plans and roadmaps are invented.
"""

from __future__ import annotations

from homeplan.report.diff import diff_inputs, diff_roadmaps, render_diff, single_cause
from homeplan.result.roadmap import Milestone, Roadmap, Step
from tests.report.fixtures import make_plan


def roadmap(hp_year: int, battery: bool, npv: float) -> Roadmap:
    steps = [Step("heat_pump", "Heat pump", hp_year, net_cost_usd=13000.0),
             Step("induction_range", "Induction range", 2030, net_cost_usd=2300.0)]
    if battery:
        steps.append(Step("battery", "Home battery", 2031, net_cost_usd=9000.0))
    return Roadmap("Example", 2027, 10, steps=steps, npv_usd=npv,
                   milestones=[Milestone(hp_year + 2, "Gas service closed", "gas_service_closed")])


def test_budget_change_in_words() -> None:
    changes = diff_inputs(make_plan(budget=8000), make_plan(budget=9000))
    assert [c.words for c in changes] == ["budget per year: $8,000 -> $9,000"]
    assert changes[0].because == "the budget rose to $9,000"


def test_roadmap_changes_with_because() -> None:
    inputs = diff_inputs(make_plan(budget=8000), make_plan(budget=9000))
    road = diff_roadmaps(roadmap(2028, False, 6400.0), roadmap(2027, True, 7600.0))
    words = [r.words for r in road]
    assert "heat pump moved 2028 -> 2027" in words
    assert "home battery added in 2031" in words
    assert "gas service closed moved 2030 -> 2029" in words
    assert "net present value +$1,200 ($6,400 -> $7,600)" in words
    text = render_diff("a.yaml", "b.yaml", inputs, road)
    assert "heat pump moved 2028 -> 2027 because the budget rose to $9,000" in text
    assert "budget per year: $8,000 -> $9,000" in text


def test_no_because_when_several_inputs_changed() -> None:
    inputs = diff_inputs(make_plan(budget=8000), make_plan(budget=9000, car="Other car"))
    assert single_cause(inputs) is None
    text = render_diff("a", "b", inputs, diff_roadmaps(roadmap(2028, False, 0.0), roadmap(2027, False, 0.0)))
    assert "because" not in text and "several inputs changed" in text


def test_provenance_change_is_listed_but_never_the_cause() -> None:
    inputs = diff_inputs(make_plan(budget=8000), make_plan(budget=9000, notes="New notes"))
    assert any(c.path == ("provenance", "notes") for c in inputs)
    cause = single_cause(inputs)
    assert cause is not None and cause.path == ("budget", "usd_per_year")


def test_list_items_matched_by_id_not_position() -> None:
    a = make_plan()
    doc = a.model_dump()
    doc["appliances"] = list(reversed(doc["appliances"]))
    b = type(a).model_validate(doc)
    assert diff_inputs(a, b) == []
    doc["appliances"] = [x for x in doc["appliances"] if x["id"] != "range"]
    words = [c.words for c in diff_inputs(a, type(a).model_validate(doc))]
    assert len(words) == 1 and words[0].startswith("appliance range: removed")


def test_removed_step_and_identical_plans() -> None:
    road = diff_roadmaps(roadmap(2028, True, 0.0), roadmap(2028, False, 0.0))
    assert [r.words for r in road] == ["home battery dropped (was 2031)",
                                       "you pay -$9,000 in all ($24,300 -> $15,300 after incentives)"]
    assert diff_inputs(make_plan(), make_plan()) == []
