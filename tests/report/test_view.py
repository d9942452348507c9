"""The report's data: cautions from the catalog, baselines found by name, colour groups.

The caution texts are the project's own safety table (homeplan/data/cautions.yaml); the groups
follow the categories of homeplan/data/upgrades.yaml. Plans and results are invented.
"""

from __future__ import annotations

import dataclasses
import datetime as dt

import pytest

from homeplan import catalog
from homeplan.report.view import build_report, collect_cautions, group_of
from homeplan.result.roadmap import Baseline, Step
from tests.report.fixtures import make_result


def test_cautions_deduplicated_whether_given_as_id_or_text() -> None:
    known = catalog.cautions()
    steps = [Step("heat_pump", "Heat pump", 2028, cautions=["refrigerant", known["refrigerant"]]),
             Step("close_gas", "Close the gas service", 2029, cautions=[known["gas_line"], "Mind the dog."])]
    out = collect_cautions(make_result(steps=steps))
    titles = [t for t, _ in out]
    named = catalog.caution_titles()
    assert titles[0] == named["planning"]                # always first
    assert titles.count(named["refrigerant"]) == 1 and titles.count(named["gas_line"]) == 1
    assert ("Note", "Mind the dog.") in out


@pytest.mark.parametrize("name", ["do_nothing", "Keep it as it is", "do nothing (pay for breakdowns as they come)"])
def test_do_nothing_baseline_found_by_kind_whatever_its_name(name: str) -> None:
    result = make_result()
    road = dataclasses.replace(result.roadmap, baselines=(Baseline("do_nothing", name, result.roadmap.years),))
    assert road.baseline("do_nothing") is not None and road.baseline("like_for_like") is None
    report = build_report(dataclasses.replace(result, roadmap=road), today=dt.date(2026, 12, 1))
    ahead = report.years.headers.index("Ahead of doing nothing")
    assert all(row[ahead] != "n/a" for row in report.years.rows)


def test_groups_follow_catalog_categories() -> None:
    result = make_result()
    assert group_of(result, "heat_pump") == "appliances"
    assert group_of(result, "panel_upgrade") == "electrical"
    assert group_of(result, "ev_charger") == "vehicles"
    assert group_of(result, "ev:sedan") == "vehicles"     # per-vehicle ids of the planner
    assert group_of(result, "close_gas") == "building"
    assert group_of(result, "something_new") == "other"
