"""Named options inside one plan file: merged into the plan, located when wrong, compared side by
side (a check of the project's own file format; no outside source)."""

from __future__ import annotations

import json
import shutil

import pytest

from homeplan.cli import main
from homeplan.errors import InputError
from homeplan.plan.alternatives import BASE_NAME, option, options
from homeplan.plan.load import load_plan, load_plan_text

from .conftest import ROOT

BASE = """\
home:
  name: Option test house (invented)
  location: {latitude: 44.95, longitude: -93.25}
  floor_area_ft2: 1850
  electrical: {service_amps: 100}
appliances: [{kind: furnace}, {kind: water_heater}]
budget: {usd_per_year: 9000, first_year: 2027, horizon_years: 8}
choices: {exclude: [battery]}
"""


def test_mappings_merge_and_other_values_replace() -> None:
    text = BASE + """alternatives:
  - name: More money
    changes:
      budget: {usd_per_year: 20000}
  - name: No solar either
    description: Leave the roof alone.
    changes:
      choices: {exclude: [solar, battery], objective: risk_aware}
"""
    loaded = load_plan_text(text, "t.yaml")
    more = option(loaded, 0).plan
    assert more.budget.usd_per_year == 20000
    assert more.budget.first_year == 2027 and more.budget.horizon_years == 8   # merged, not replaced
    assert more.choices.exclude == ["battery"]
    solar = option(loaded, 1).plan
    assert solar.choices.exclude == ["solar", "battery"] and solar.choices.objective == "risk_aware"
    assert [n for n, _ in options(loaded)] == [BASE_NAME, "More money", "No solar either"]
    assert all(not o.plan.alternatives for _, o in options(loaded))


def test_a_bad_value_in_an_option_is_reported_where_it_is_written() -> None:
    text = BASE + """alternatives:
  - name: Broken
    changes:
      budget: {usd_per_year: -5}
"""
    loaded = load_plan_text(text, "t.yaml")
    with pytest.raises(InputError) as exc:
        option(loaded, 0)
    (p,) = exc.value.problems
    assert (p.line, p.col) == (text.splitlines().index("      budget: {usd_per_year: -5}") + 1, 30)
    assert "option 'Broken'" in p.message and "usd_per_year" in p.message


def test_option_names_must_differ_and_cannot_nest() -> None:
    with pytest.raises(InputError, match="repeats the name"):
        load_plan_text(BASE + "alternatives:\n  - {name: A}\n  - {name: a}\n", "t.yaml")
    with pytest.raises(InputError, match="cannot hold options"):
        load_plan_text(BASE + "alternatives:\n  - {name: A, changes: {alternatives: []}}\n", "t.yaml")


@pytest.fixture
def optioned(tmp_path):
    target = tmp_path / "home.yaml"
    shutil.copy(ROOT / "sample_homes" / "minimal.yaml", target)
    with target.open("a") as fh:
        fh.write("alternatives:\n  - name: Double budget\n    changes:\n      budget: {usd_per_year: 30000}\n")
    return target


def test_check_and_compare_commands(optioned, capsys) -> None:
    assert main(["check", str(optioned)]) == 0
    assert "options: Double budget" in capsys.readouterr().out
    assert main(["compare", str(optioned), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert [o["name"] for o in data["options"]] == [BASE_NAME, "Double budget"]
    a, b = (o["roadmap"] for o in data["options"])
    assert a["status"] == b["status"] == "ok" and b["price_risk"]["paths"] == 2000
    assert main(["compare", str(optioned)]) == 0
    out = capsys.readouterr().out
    assert "Options side by side" in out and "Double budget" in out and "Steps by year" in out


def test_compare_needs_two_options(capsys) -> None:
    assert main(["compare", str(ROOT / "sample_homes" / "minimal.yaml")]) == 2
    assert "nothing to compare" in capsys.readouterr().err


def test_compare_two_files_and_write_html(optioned, tmp_path, capsys) -> None:
    out = tmp_path / "c.html"
    assert main(["compare", str(optioned), str(ROOT / "sample_homes" / "minimal.yaml"), "-o", str(out)]) == 0
    html = out.read_text()
    assert "home: Double budget" in html and "<h2>Options side by side</h2>" in html
    assert html.count("<svg") == 1  # the range chart
    assert load_plan(optioned).plan.alternatives[0].name == "Double budget"
    capsys.readouterr()


def test_the_printout_has_a_comparison_page(optioned, capsys) -> None:
    assert main(["print", str(optioned), "--quick"]) == 0
    out = capsys.readouterr().out
    assert "Options side by side" in out and "Double budget" in out
    assert "What moves the result" not in out  # --quick leaves the sensitivity out
