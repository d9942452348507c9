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


@pytest.mark.parametrize("path", SAMPLES, ids=[p.name for p in SAMPLES])
def test_bills_npv_and_incentives_one_value_everywhere(path, capsys) -> None:
    """Yearly bills, the money ahead or behind (net present value) and incentives read the same
    on the printout, the command line, the JSON export and the app (Next view and its sources
    panel, Money and Incentives panels)."""
    from homeplan import cli
    from homeplan.report.sources import money_sources, program_sources, step_sources
    from homeplan.tui.widgets.base import ViewData
    from homeplan.tui.widgets.overview import this_year_text

    result = _result(path)
    road = result.roadmap
    data = ViewData(result.plan, result, path)
    report = build_report(result, today=dt.date(2026, 12, 1))
    assert cli.main(["plan", str(path)]) == 0
    printed = capsys.readouterr().out.splitlines()
    exported = json.loads(render_json(result))
    years = {row[0]: row for row in report.years.rows}
    bills_col = report.years.headers.index("Energy bills")
    inc_col = report.years.headers.index("Incentives in")
    for t in road.years:
        bills, back = money(t.total_bills_usd), money(t.incentives_usd)
        assert years[str(t.year)][bills_col] == bills                            # printout
        assert years[str(t.year)][inc_col] == back
        line = next(ln for ln in printed if ln.startswith(f"{t.year}  ") and "$" in ln
                    and ln.split()[1].startswith("$"))                            # CLI years table
        assert bills in line.split() and back in line.split()
        panel = {x.what: x.value for x in money_sources(result.plan, result, t.year)}
        assert panel["Bills"] == bills and panel["Back"] == back                 # app, Money 'w'
    first = road.years[0]
    assert f"Energy bills {money(first.total_bills_usd)}" in this_year_text(data).plain  # Next
    # net present value: printout, CLI, app panel, JSON
    panel = {x.what: x.value for x in money_sources(result.plan, result, None)}
    for what, value, _ in report.against:
        assert any(ln.startswith(f"{what}: {value}") for ln in printed)          # CLI
        assert panel[what] == value                                             # app
    if any(what == "Against doing nothing" for what, _, _ in report.against):
        npv = exported["npv_usd"]
        assert dict((w, v) for w, v, _ in report.against)["Against doing nothing"] == (
            f"{money(abs(npv))} {'ahead' if npv >= 0 else 'behind'}")            # JSON
    # incentives per step and per program
    steps = {(row[1].split(" (")[0], row[0]): row for row in report.steps.rows}
    inc = report.steps.headers.index("Incentives")
    infos = {p.id: p for p in result.projects}
    for s in road.steps:
        row = steps[(s.label.split(" (")[0], str(s.year))]
        assert row[inc] == money(s.incentives_usd)                               # printout
        for line in s.incentives:                                                # app 'w'
            assert any(x.what == line.program and x.value == money(line.amount_usd)
                       for x in step_sources(s, infos.get(s.project_id), result.plan))
    programs = {row[0]: row for row in report.programs.rows}
    pays = report.programs.headers.index("Pays in this plan")
    for p in result.programs:
        total = money(sum(p.paid_by_year.values()))
        if p.name in programs:
            assert programs[p.name][pays] == total                               # printout
        assert program_sources(result.plan, p)[0].value.startswith(total)        # app 'w'
