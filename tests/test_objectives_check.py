"""One name per objective everywhere, old spellings still read; `check` gathers every problem.

Not checks of the physics or the money: these check the plan format's names and that `check`
reports every problem of a file in one run.
"""

from __future__ import annotations

import json
import textwrap

import pytest

from homeplan import cli
from homeplan.plan import migrate
from homeplan.plan.load import load_plan_text
from homeplan.plan.objectives import ALIASES, OBJECTIVES, objective_words
from homeplan.result.roadmap import Roadmap
from homeplan.tui.session import PlanSession

BASE = textwrap.dedent("""\
    home:
      location: {latitude: 44.9, longitude: -93.2}
      floor_area_ft2: 1500
      electrical: {service_amps: 100}
    appliances:
      - {kind: furnace, year_installed: 2011}
      - {kind: water_heater, year_installed: 2010}
      - {kind: range}
    budget: {usd_per_year: 5000, first_year: 2027}
    """)


@pytest.mark.parametrize("old,new", sorted(ALIASES.items()))
def test_old_objective_names_are_read_as_the_one_name(old, new):
    plan = load_plan_text(BASE + f"choices: {{objective: {old}}}\n").plan
    assert plan.choices.objective == new
    assert objective_words(old) == objective_words(new) == OBJECTIVES[new].label


def test_format_1_file_is_migrated_and_the_app_saves_format_2(tmp_path):
    path = tmp_path / "old.yaml"
    path.write_text("format_version: 1\n# my comment stays\n" + BASE
                    + "choices:\n  objective: gas_off_early  # off gas early\n")
    session = PlanSession.open(path)
    assert session.migrated_from == 1
    assert session.plan.choices.objective == "home_fuel_off_soonest"
    session.save()
    text = path.read_text()
    assert "format_version: 2" in text
    line = next(ln for ln in text.splitlines() if "objective:" in ln)
    assert "objective: home_fuel_off_soonest" in line and "# off gas early" in line
    assert "# my comment stays" in text
    assert load_plan_text(text).migrated_from is None


def test_migration_step_renames_in_place():
    data = {"choices": {"objective": "out_of_pocket"}, "format_version": 1}
    assert migrate.upgrade(data, 1)["choices"]["objective"] == "least_out_of_pocket"


def test_json_of_schema_1_3_with_old_objective_reads():
    old = {"schema_version": "1.3", "plan_name": "x", "first_year": 2027, "horizon_years": 3,
           "objective": "earliest_gas_closure"}
    assert Roadmap.from_dict(old).objective == "home_fuel_off_soonest"
    assert Roadmap.from_dict(old).to_dict()["objective"] == "home_fuel_off_soonest"


def test_cli_objective_accepts_old_and_new_names_and_refuses_others(capsys):
    parser = cli.build_parser()
    assert parser.parse_args(["plan", "x.yaml", "--objective", "npv"]).objective == "best_value"
    assert parser.parse_args(["plan", "x.yaml", "--objective", "lowest_emissions"]).objective \
        == "lowest_emissions"
    with pytest.raises(SystemExit) as info:
        parser.parse_args(["plan", "x.yaml", "--objective", "cheapest"])
    assert info.value.code == 2
    assert "best_value" in capsys.readouterr().err


def test_check_reports_every_unknown_id_and_bad_pin_in_one_run(tmp_path, capsys):
    path = tmp_path / "bad.yaml"
    path.write_text(BASE + textwrap.dedent("""\
        incentive_files: [nope.yaml]
        choices:
          pins: {heat_pum: 2028, solarr: 2029, induction_range: 2050}
          exclude: [batery, envelope2]
          failed_now: [furnac]
          require_before: {heat_pump: [envelop]}
        """))
    assert cli.main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    for words in ("'heat_pum'", "'solarr'", "'batery'", "'envelope2'", "'furnac'", "'envelop'",
                  "pinned to 2050", "incentive file nope.yaml: file not found", "8 problems found"):
        assert words in err, words
    lines = [ln for ln in err.splitlines() if ln.startswith(str(path))]
    positions = [tuple(int(x) for x in ln[len(str(path)) + 1:].split(":")[:2]) for ln in lines]
    assert positions == sorted(positions)  # in the order of the file


def test_a_wrong_section_is_reported_once(tmp_path, capsys):
    path = tmp_path / "bad.yaml"
    path.write_text(BASE + "choices: 3\n")
    assert cli.main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    assert err.count("choices must be a section") == 1


def test_diff_names_a_list_once(tmp_path, capsys):
    a, b = tmp_path / "a.yaml", tmp_path / "b.yaml"
    (tmp_path / "x.yaml").write_text("[]\n")
    a.write_text(BASE + "incentive_files: [x.yaml]\n")
    b.write_text(BASE)
    assert cli.main(["diff", "--inputs-only", str(a), str(b)]) == 0
    out = capsys.readouterr().out
    assert "incentive files: [x.yaml] -> []" in out
    assert "incentive files incentive files" not in out


def test_plan_json_names_the_objective_as_the_plan_does(tmp_path, capsys):
    path = tmp_path / "p.yaml"
    path.write_text(BASE + "choices: {objective: emissions}\n")
    assert cli.main(["plan", str(path), "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["objective"] == "lowest_emissions"
