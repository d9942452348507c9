"""The app's plan session (edits, undo/redo, saving) and helpers, without Textual."""

from __future__ import annotations

import datetime as dt
import subprocess
import sys
from pathlib import Path

import pytest

from homeplan import catalog
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
                dryer_fuel="none", cars="Blue sedan, Work truck", usd_per_year=5000,
                first_year=2027, horizon_years=12, timezone="America/New_York")
    for heating in newplan.HEATING:
        text = newplan.new_plan_text({**base, "heating": heating, "central_ac": True})
        plan = load_plan_text(text, "new.yaml").plan
        kinds = [a.kind for a in plan.appliances]
        assert kinds[0] == newplan.HEATING[heating][0]
        assert ("central_ac" in kinds) == (heating != "heat_pump")
        assert plan.home.name == 'A "quoted" home' and len(plan.vehicles) == 2
        assert [(v.id, v.name) for v in plan.vehicles] == [("blue_sedan", "Blue sedan"),
                                                            ("work_truck", "Work truck")]
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
    # the project's display rule (not an outside source): "$12,400, not $12,391.87"; the app rounds as the printout does (one figure, one
    # value): nearest $10 under $1,000, nearest $100 above; compact cells agree and never show a
    # non-zero amount as 0
    assert usd(12391.87) == "$12,400" and usd(-1234) == "-$1,200" and usd(0) == "$0"
    assert kusd(6240) == "6.2k" and kusd(23456) == "23k" and kusd(20) == "20" and kusd(-950) == "-950"
    assert kusd(4) == "0" and usd(4) == "$0"


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


@pytest.mark.parametrize("lat,lon,zone,words", [
    # Minneapolis, 44.98 N 93.27 W (US Census Bureau Gazetteer), on Central time (IANA
    # America/Chicago, UTC-6 in January): plausible.
    (44.98, -93.27, "America/Chicago", None),
    # the same house with the minus sign forgotten: 93.27 E is in Asia
    (44.98, 93.27, "America/Chicago", "did you mean -93.27"),
    # south of the equator with a North American zone
    (-44.98, -93.27, "America/Chicago", "did you mean 44.98"),
    # Boston (42.36 N 71.06 W, Census Gazetteer) with Pacific time: hours from its meridian
    (42.36, -71.06, "America/Los_Angeles", "far from the Pacific"),
    (42.36, -71.06, "America/New_York", None),
    (95.0, -71.0, "America/New_York", "latitude goes from -90 to 90"),
    (None, -71.0, "America/New_York", "choose the nearest city"),
])
def test_location_checked_against_the_time_zone(lat, lon, zone, words):
    from zoneinfo import ZoneInfo

    # the check's meridian is the zone's UTC offset times 15 degrees an hour (IANA tz database)
    offset_h = dt.datetime(2025, 1, 15, tzinfo=ZoneInfo(zone)).utcoffset().total_seconds() / 3600
    assert offset_h < 0  # every zone offered is west of Greenwich
    problem = newplan.location_problem(lat, lon, zone)
    if words is None:
        assert problem is None
    else:
        assert problem is not None and words in problem


def test_form_offers_only_zones_west_of_greenwich_and_north_american_cities():
    from zoneinfo import ZoneInfo

    for _, key in newplan.TIME_ZONES:  # IANA tz database offsets
        assert dt.datetime(2025, 7, 1, tzinfo=ZoneInfo(key)).utcoffset() < dt.timedelta(0)
    for label, name in newplan.place_choices()[1:]:
        city = next(c for c in catalog.reference_climates() if c.name == name)
        assert city.latitude > 0 and city.longitude < 0 and name in label
        lat, lon = newplan.resolve_location({"near": name})
        assert (lat, lon) == (city.latitude, city.longitude)
    assert newplan.resolve_location({"near": "Chicago IL", "latitude": 41.0, "longitude": -88.0}) == (41.0, -88.0)


def test_car_names_become_unique_ids():
    assert newplan.car_entries("Blue sedan, Blue sedan, 2019 truck,, ") == [
        ("blue_sedan", "Blue sedan"), ("blue_sedan_2", "Blue sedan"), ("car_2019_truck", "2019 truck")]
    assert newplan.car_entries("") == [] and newplan.car_entries(None) == []


def test_new_plan_text_carries_bills_roof_spaces_and_income():
    base = dict(latitude=44.98, longitude=-93.27, timezone="America/Chicago", floor_area_ft2=1500,
                service_amps=100, heating="gas_furnace", water_heater_fuel="gas", range_fuel="gas",
                dryer_fuel="electric", cars="", usd_per_year=5000, free_spaces=2,
                annual_kwh=7200.0, annual_therms=900.0, roof_facing="180", roof_year=2015,
                ami_pct="70")
    plan = load_plan_text(newplan.new_plan_text(base), "new.yaml").plan
    assert plan.home.electrical.free_spaces == 2
    assert plan.home.roof is not None and plan.home.roof.azimuth_deg == 180.0
    assert plan.usage.electricity.annual_kwh == 7200 and plan.usage.gas.annual_therms == 900
    assert plan.household.ami_pct == 70 and plan.vehicles == []
    assert plan.home.location.timezone == "America/Chicago"


def test_cut_names_keep_their_invented_mark():
    # project rule (not an outside source): a demo name cut to fit still says it is invented
    name = "Demo state heat pump rebate (invented)"
    assert trunc(name, 60) == name
    assert trunc(name, 24) == "Demo state h… (invented)" and len(trunc(name, 24)) == 24
    assert trunc("A long ordinary program name", 10) == "A long or…"
