"""Plain words on screen and on paper: sizes, the change list, the fossil-fuel lines, the
comparisons, the advisor block and the glossary.

The change list and the fossil lines are checked against the two results they describe (every
figure they quote must be one of the result's own); the unit conversions against NIST SP 811
and pint; dates against the standard library's calendar. Plans are the invented demo homes.
"""

from __future__ import annotations

import dataclasses
import datetime as dt
import re
import shutil
from pathlib import Path

import pint
import pytest

from homeplan import PlannerCache, catalog, cli, load_plan, plan_roadmap
from homeplan.plan.load import load_plan_text
from homeplan.report.changes import change_list, closes_words
from homeplan.report.fossil import fossil_lines
from homeplan.report.html import render_html
from homeplan.report.view import Table, build_report, npv_vs_like_for_like, without_empty_columns
from homeplan.report.words import caps_words, distinct_labels, load_words
from homeplan.units import display_size, heat_output_words
from tests.report.fixtures import make_plan, make_result

SAMPLES = Path(__file__).resolve().parents[2] / "sample_homes"
COLD = SAMPLES / "cold_gas_100a.yaml"
_CACHE: list = []


def _plan(plan):
    if not _CACHE:
        _CACHE.append(PlannerCache())
    return plan_roadmap(plan, base_dir=SAMPLES, cache=_CACHE[0])


@pytest.fixture(scope="module")
def budgets():
    """The cold-climate demo home planned at its own budget and at $5,000 a year."""
    plan = load_plan(COLD).plan
    low = plan.model_copy(update={"budget": plan.budget.model_copy(update={"usd_per_year": 5000.0})})
    return _plan(plan), _plan(low)


def _money(text: str) -> float:
    return float(text.replace("$", "").replace(",", ""))


def test_tons_shown_as_kw_and_btuh() -> None:
    # NIST SP 811 (2008) Appendix B: 1 ton of refrigeration = 12,000 Btu/h = 3.516853 kW
    ureg = pint.UnitRegistry()
    kw = (3 * ureg.refrigeration_ton).to("kW").magnitude     # pint's own definition
    assert display_size(3, "ton") == f"{kw:,.1f} kW (36,000 Btu/h)" == "10.6 kW (36,000 Btu/h)"
    assert heat_output_words(42_000) == f"{(42_000 * ureg.Btu / ureg.hour).to('kW').magnitude:,.1f} kW (42,000 Btu/h)"
    assert "t" not in display_size(2.5, "ton").split()      # never "2.5 t"


def test_ids_and_abbreviations_become_words() -> None:
    text = caps_words("heat_pump_water_heater up to $1,500; heat_pump up to $6,000; 90 % at 0 to 80 % AMI")
    assert "_" not in text and "AMI" not in text
    assert text.startswith("heat pump water heater") and "% of area median income" in text
    kinds = catalog.upgrade_kinds()
    assert kinds["heat_pump"].label.lower() in text
    assert load_words("heat_pump strips 10 kW") == "Heat pump: backup electric heat 10 kW"
    assert load_words("ac (central ac)") == "Central ac"


def test_shortened_labels_stay_distinct() -> None:
    labels = ["Electric vehicle (replaces 2012 sedan)", "Electric vehicle (replaces 2017 wagon)", "Induction range"]
    out = distinct_labels(labels, 20)
    assert len(set(out)) == 3 and all(len(s) <= 20 for s in out)
    assert "sedan" in out[0] and "wagon" in out[1] and out[2] == "Induction range"


def test_change_list_names_every_move_with_the_results_own_figures(budgets) -> None:
    rich, poor = budgets
    lines = change_list(rich, poor)
    before = {s.project_id: s for s in rich.roadmap.steps}
    after = {s.project_id: s for s in poor.roadmap.steps}
    moved = [p for p in before if p in after and before[p].year != after[p].year]
    gone = [p for p in before if p not in after]
    new = [p for p in after if p not in before]
    assert len(lines) == len(moved) + len(gone) + len(new) > 0
    for pid in moved:
        a, b = before[pid], after[pid]
        line = next(ln for ln in lines if ln.startswith(b.label + ":"))
        assert f"moved from {a.year} to {b.year}" in line
        m = re.search(r"you pay (\$[\d,]+)", line)
        if m:
            # money is shown to the nearest $10 under $1,000, else to the nearest $100
            assert _money(m.group(1)) == pytest.approx(b.net_cost_usd, abs=50 if b.net_cost_usd >= 995 else 5)
    for pid in gone:
        assert any(ln.startswith(before[pid].label + ": no longer in the plan") for ln in lines)
    # a lost program is named with the date it closes, as the program's own end date says
    ends = {p.name: p.ends for r in (rich, poor) for p in r.programs}
    for ln in lines:
        for m in re.finditer(r"loses \$[\d,]+ of (.+?), which closes (\w+ \d{4})", ln):
            assert closes_words(ends[m.group(1)]) == m.group(2)


def test_nothing_moved_names_the_edited_item(budgets) -> None:
    rich, _ = budgets
    step = next(s for s in rich.roadmap.steps if "furnace" in s.replaces)
    assert change_list(rich, rich, "furnace") == (
        f"Nothing moved: the gas furnace is still replaced in {step.year} ({step.label.lower()}).",)
    assert change_list(None, rich) == ()


def test_close_dates_in_words() -> None:
    assert closes_words("2029-06-30") == dt.date(2029, 6, 30).strftime("%B %Y") == "June 2029"
    assert closes_words(None) == "" and closes_words("when funds run out") == "when funds run out"


def test_fossil_lines_are_the_results_bills_and_milestones(budgets) -> None:
    for result in budgets:
        lines = fossil_lines(result)
        assert lines and {ln.fuel for ln in lines} <= {"gas", "oil", "propane", "gasoline", "diesel"}
        for ln in lines:
            assert ln.costs_usd == tuple(float(t.bills_usd.get(ln.fuel, 0.0)) for t in result.roadmap.years)
            bought = [y for y, c in zip(ln.years, ln.costs_usd, strict=True) if c > 0.5]
            assert ln.last_year == (bought[-1] if bought else None)
        gas = next(ln for ln in lines if ln.fuel == "gas")
        closed = [m.year for m in result.roadmap.milestones if m.kind == "gas_service_closed"]
        assert gas.ends_year == (closed[0] if closed else None)
        assert gas.ending().startswith("gas service closed" if closed else "still bought")


def test_like_for_like_comparison_comes_first() -> None:
    result = make_result()
    report = build_report(result, today=dt.date(2026, 12, 1))
    road = result.roadmap
    # the fixture's paths: plan 6,400 ahead of doing nothing, like for like 9,800 behind it
    assert npv_vs_like_for_like(road) == pytest.approx(6400.0 - (-9800.0))
    assert [c[0] for c in report.against] == ["Against replacing like for like", "Against doing nothing"]
    assert report.against[0][1] == "$16,200 ahead" and report.against[1][1] == "$6,400 ahead"


def test_empty_columns_are_dropped() -> None:
    t = Table(("a", "b", "c"), (("1", "", "x"), ("2", "", "")), "lrl", ("T", "", ""))
    out = without_empty_columns(t)
    assert out.headers == ("a", "c") and out.rows == (("1", "x"), ("2", "")) and out.align == "ll"
    report = build_report(make_result(), today=dt.date(2026, 12, 1))
    for table in (report.steps, report.years, report.energy, report.capacity, report.programs):
        for i, head in enumerate(table.headers):
            assert any(str(r[i]).strip() for r in table.rows), head


def test_advisor_block_on_the_printout() -> None:
    text = COLD.read_text(encoding="utf-8")
    plan = load_plan_text(text, str(COLD)).plan
    assert plan.advisor is not None
    assert plan.advisor.valid_until == plan.advisor.quote_date + dt.timedelta(days=plan.advisor.quote_valid_days)
    result = dataclasses.replace(make_result(), plan=plan)
    html = render_html(build_report(result, today=dt.date(2026, 12, 1)))
    assert '<section class="advisor"><h2>Prepared by' in html and "Prairie Lantern Home Energy (invented)" in html
    assert "<dt>Valid until</dt><dd>2027-01-19</dd>" in html   # 2026-11-20 + 60 days
    assert 'class="advisor"' not in render_html(build_report(make_result(), today=dt.date(2026, 12, 1)))


@pytest.mark.parametrize("advisor,fix", [
    ("{quote_date: 2026-11-20, quote_valid_days: 30, quote_valid_until: 2027-01-01}", "not both"),
    ("{quote_valid_days: 30}", "add quote_date"),
    ("{quote_date: 2026-11-20, quote_valid_until: 2026-10-01}", "before quote_date"),
])
def test_bad_advisor_block_is_a_clear_message(tmp_path: Path, capsys, advisor: str, fix: str) -> None:
    text = COLD.read_text(encoding="utf-8")
    start = text.index("advisor:")
    end = text.index("\nhome:")
    path = tmp_path / "home.yaml"
    path.write_text(text[:start] + f"advisor: {advisor}\n" + text[end:], encoding="utf-8")
    shutil.copytree(COLD.parent / "incentives", tmp_path / "incentives")  # the files it names
    assert cli.main(["check", str(path)]) == 2
    out = capsys.readouterr()
    assert fix in out.out + out.err and "Traceback" not in out.err


def test_glossary_lists_only_terms_the_printout_uses() -> None:
    report = build_report(make_result(plan=make_plan()), today=dt.date(2026, 12, 1))
    terms = [g[0] for g in report.glossary]
    assert terms and len(terms) == len(set(terms))
    every = {g.term for g in catalog.glossary()}
    assert set(terms) <= every and set(terms) != every
    for g in catalog.glossary():
        assert g.source and g.plain and g.text
