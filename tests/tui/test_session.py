"""The app's plan session (edits, undo/redo, saving) and helpers, without Textual."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from homeplan.errors import InputError
from homeplan.plan.load import load_plan, load_plan_text
from homeplan.tui import newplan
from homeplan.tui.format import kusd, trunc, usd
from homeplan.tui.screens.forms import FieldSpec, parse_value
from homeplan.tui.session import DELETE, PlanSession

from .conftest import ROOT


def test_edit_keeps_comments_and_only_changes_the_value(plan_file: Path):
    original = plan_file.read_text()
    s = PlanSession.open(plan_file)
    s.edit([(("budget", "usd_per_year"), 12000)], "budget")
    assert s.plan.budget.usd_per_year == 12000 and s.dirty
    assert s.text == original.replace("  usd_per_year: 9000\n", "  usd_per_year: 12000\n")


def test_rejected_edit_changes_nothing(plan_file: Path):
    s = PlanSession.open(plan_file)
    with pytest.raises(InputError) as err:
        s.edit([(("home", "electrical", "service_amps"), 5)], "bad")
    assert "service_amps" in str(err.value)
    assert s.plan.home.electrical.service_amps == 100 and not s.dirty and not s.can_undo


def test_undo_redo_and_saved_state(plan_file: Path):
    s = PlanSession.open(plan_file)
    s.edit([(("budget", "usd_per_year"), 1)], "one")
    s.edit([(("budget", "usd_per_year"), 2)], "two")
    assert s.undo() == "two" and s.plan.budget.usd_per_year == 1
    s.save()
    assert not s.dirty
    assert s.redo() == "two" and s.dirty
    assert s.undo() == "two" and not s.dirty
    assert s.undo() == "one" and s.plan.budget.usd_per_year == 9000 and s.dirty
    # a new edit after undo drops the redo branch, including the saved state
    s.edit([(("budget", "usd_per_year"), 3)], "three")
    assert not s.can_redo and s.dirty
    assert load_plan(plan_file).plan.budget.usd_per_year == 1


def test_undo_restores_the_exact_text(plan_file: Path):
    s = PlanSession.open(plan_file)
    before = s.text
    s.edit([(("choices", "pins", "solar"), 2030), (("choices", "exclude"), ["battery"])], "pin")
    assert "solar: 2030" in s.text
    s.undo()
    assert s.text == before


def test_delete_prunes_sections_left_empty(plan_file: Path):
    s = PlanSession.open(plan_file)
    s.edit([(("choices", "pins", "solar"), 2030)], "pin")
    s.edit([(("choices", "pins", "solar"), DELETE)], "release")
    assert "pins" not in s.text and s.plan.choices.pins == {}


def test_save_is_atomic_with_backup(plan_file: Path, tmp_path: Path):
    original = plan_file.read_text()
    s = PlanSession.open(plan_file)
    s.edit([(("prices", "gas", "usd_per_therm"), 1.5)], "gas price")
    s.save()
    assert (tmp_path / "home.yaml.bak").read_text() == original
    assert load_plan(plan_file).plan.prices.gas.usd_per_therm == 1.5
    other = tmp_path / "other.yaml"
    s.save(other)
    assert s.path == other and load_plan(other).plan.prices.gas.usd_per_therm == 1.5
    assert not list(tmp_path.glob(".*.tmp"))


def test_new_plan_text_validates_for_every_heating_choice():
    base = dict(name='A "quoted" home', latitude=40.0, longitude=-75.0, floor_area_ft2=1500,
                service_amps=100, water_heater_fuel="gas", range_fuel="electric",
                dryer_fuel="none", cars=2, usd_per_year=5000, first_year=2027, horizon_years=12)
    for heating in newplan.HEATING:
        text = newplan.new_plan_text({**base, "heating": heating, "central_ac": True})
        plan = load_plan_text(text, "new.yaml").plan
        kinds = [a.kind for a in plan.appliances]
        assert kinds[0] == newplan.HEATING[heating][0]
        assert ("central_ac" in kinds) == (heating != "heat_pump")
        assert plan.home.name == 'A "quoted" home' and len(plan.vehicles) == 2
        assert plan.budget.horizon_years == 12


def test_form_values_parse_as_people_type_them():
    money = FieldSpec("x", "Budget", "float")
    assert parse_value(money, "$12,500") == 12500.0
    year = FieldSpec("y", "Year", "int", optional=True)
    assert parse_value(year, " 2031 ") == 2031 and parse_value(year, "") is None
    with pytest.raises(ValueError, match="not a whole number"):
        parse_value(year, "2031.5")
    with pytest.raises(ValueError, match="a value is needed"):
        parse_value(money, "")


def test_money_is_rounded_to_what_matters():
    # the project's display rule (not an outside source): "$12,400, not $12,391.87"
    assert usd(12391.87) == "$12,400" and usd(-1234) == "-$1,230" and usd(0) == "$0"
    assert kusd(6240) == "6.2k" and kusd(23456) == "23k" and kusd(20) == "0" and kusd(-950) == "-950"


def test_only_the_tui_imports_textual():
    """The app is the only package that imports textual; its session and helpers do not."""
    offenders = []
    for path in (ROOT / "homeplan").rglob("*.py"):
        if "tui" in path.relative_to(ROOT / "homeplan").parts:
            continue
        text = path.read_text(encoding="utf-8")
        if "import textual" in text or "from textual" in text:
            offenders.append(str(path))
    assert offenders == []
    code = ("import sys\nimport homeplan.tui.session, homeplan.tui.newplan, homeplan.tui.format, "
            "homeplan.cli.app\n"
            "assert not [m for m in sys.modules if m.split('.')[0] == 'textual'], 'textual'\n")
    subprocess.run([sys.executable, "-c", code], check=True, capture_output=True, cwd=ROOT)


def test_open_command_reports_a_bad_file_without_starting_the_app(tmp_path: Path):
    bad = tmp_path / "bad.yaml"
    bad.write_text("home:\n  floor_area_ft2: x\n  electrical: {service_amps: 100}\n"
                   "budget: {usd_per_year: 1}\n")
    code = ("import sys\nfrom homeplan.cli.app import run\nrc = run(sys.argv[1])\n"
            "assert 'textual.app' not in sys.modules\nsys.exit(rc)\n")
    proc = subprocess.run([sys.executable, "-c", code, str(bad)], capture_output=True, text=True,
                          cwd=ROOT, timeout=60)
    assert proc.returncode == 2
    assert f"{bad}:2:" in proc.stderr and "Traceback" not in proc.stderr


def test_cut_names_keep_their_invented_mark():
    # project rule (not an outside source): a demo name cut to fit still says it is invented
    name = "Demo state heat pump rebate (invented)"
    assert trunc(name, 60) == name
    assert trunc(name, 24) == "Demo state h… (invented)" and len(trunc(name, 24)) == 24
    assert trunc("A long ordinary program name", 10) == "A long or…"
