"""End to end on the invented sample homes: the real planner, then every output format.

Checks structure only (the numbers are the engines' and are tested there): the HTML has no
markup beyond our own (WHATWG HTML parsing via the standard library), the calendar follows RFC
5545 line rules, the CSV files read back with RFC 4180 parsing, the JSON is strict RFC 8259.
"""

from __future__ import annotations

import csv
import datetime as dt
import functools
import io
import json

import pytest

from homeplan import load_plan, plan_roadmap
from homeplan.report.csvout import monthly_energy_csv, steps_csv, years_csv
from homeplan.report.fmt import money
from homeplan.report.html import render_html
from homeplan.report.ics import render_ics
from homeplan.report.jsonout import render_json
from homeplan.report.text import render_markdown, render_text
from homeplan.report.view import build_report
from homeplan.result.roadmap import Roadmap
from tests.conftest import SAMPLES
from tests.report.test_html import ALLOWED_TAGS, parse

pytestmark = pytest.mark.slow


@functools.cache
def _result(path):
    return plan_roadmap(load_plan(path))


@pytest.mark.parametrize("path", SAMPLES, ids=[p.name for p in SAMPLES])
def test_every_output_of_a_sample(path) -> None:
    result = _result(path)
    report = build_report(result, today=dt.date(2026, 12, 1))
    html = render_html(report)
    tags = {t for t, _ in parse(html).tags}
    assert tags <= ALLOWED_TAGS
    assert report.footer.content_hash in html
    for step in result.roadmap.steps:
        assert str(step.year) in html
    text = render_text(report)
    assert "\x1b" not in text and "Safety" in text
    assert render_markdown(report).startswith("# Electrification roadmap")
    ics = render_ics(result, now=dt.datetime(2026, 12, 1, tzinfo=dt.UTC)).encode()
    assert all(len(line) <= 75 for line in ics.split(b"\r\n"))
    assert ics.count(b"BEGIN:VEVENT") == ics.count(b"END:VEVENT") >= len(result.roadmap.steps)
    steps = list(csv.DictReader(io.StringIO(steps_csv(result))))
    assert len(steps) == len(result.roadmap.steps)
    assert len(list(csv.DictReader(io.StringIO(years_csv(result))))) == len(result.roadmap.years)
    assert len(list(csv.DictReader(io.StringIO(monthly_energy_csv(result))))) == 24
    data = json.loads(render_json(result))
    assert Roadmap.from_dict(data).steps == result.roadmap.steps
    assert data["plan"]["content_hash"] == report.footer.content_hash
    # the schedule is proven best within the plan solver's relative gap (1e-5)
    assert data["solver"]["status"] == "optimal" and 0.0 <= data["solver"]["mip_gap"] <= 1e-5


@pytest.mark.parametrize("path", SAMPLES, ids=[p.name for p in SAMPLES])
def test_one_figure_one_value_on_every_view(path, capsys) -> None:
    """What a step costs after incentives and what a year takes out of pocket read the same on
    the app's Next and Roadmap views, the printout and the command line."""
    from homeplan import cli
    from homeplan.tui.widgets.base import ViewData
    from homeplan.tui.widgets.overview import next_text, this_year_text
    from homeplan.tui.widgets.roadmap import _money_lines

    result = _result(path)
    road = result.roadmap
    if not road.steps:
        pytest.skip("nothing scheduled")
    data = ViewData(result.plan, result, path)
    report = build_report(result, today=dt.date(2026, 12, 1))
    assert cli.main(["plan", str(path)]) == 0
    printed = capsys.readouterr().out
    steps = {(row[0], row[1]): row for row in report.steps.rows}
    pay = report.steps.headers.index("You pay")
    nxt = next_text(data, 120).plain
    for s in road.steps:
        shown = money(s.net_cost_usd)
        detail = ", ".join(x for x in (s.variant, s.size) if x)
        assert steps[(str(s.year), f"{s.label} ({detail})" if detail else s.label)][pay] == shown                    # printout
        assert any(shown in line for line in _money_lines(s))               # Roadmap details
        assert any(str(s.year) in ln and shown in ln for ln in printed.splitlines())  # CLI
        if s.year == road.steps[0].year and s in road.steps[:4]:
            assert shown in nxt                                             # Next
    first = road.years[0]
    assert f"{money(first.net_usd)} out of pocket" in this_year_text(data).plain
    years = {row[0]: row for row in report.years.rows}
    assert years[str(first.year)][report.years.headers.index("Projects")] == money(first.spend_usd)


@pytest.mark.parametrize("path", SAMPLES, ids=[p.name for p in SAMPLES])
def test_sample_homes_say_they_are_invented(path) -> None:
    """Demo homes, people and places are invented and say so where they are named."""
    plan = load_plan(path).plan
    place = plan.home.location.place if plan.home.location else None
    assert place is None or place.endswith(" (invented)"), place
    who = plan.provenance.prepared_for if plan.provenance else None
    assert who is None or who.endswith(" (invented)"), who
    header = [line for line in path.read_text(encoding="utf-8").splitlines()[:3] if line.startswith("#")]
    assert any("invented" in line.lower() for line in header)
