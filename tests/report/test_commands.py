"""The print/export/diff commands through the real CLI entry point (exit codes 0 and 2).

The planner is replaced by the invented fixture result, so these tests check the views and the
command wiring only. Exit codes are the project's own convention (0 ok, 2 bad input or usage).
"""

from __future__ import annotations

import json

import pytest

from homeplan import cli
from homeplan.cli import outputs
from homeplan.result.roadmap import Roadmap
from tests.report.fixtures import make_result


def _wired() -> bool:
    """Whether the CLI already registers these commands (the lead wires them in)."""
    import contextlib
    import io

    try:
        with contextlib.redirect_stderr(io.StringIO()):
            cli.build_parser().parse_args(["print", "x.yaml"])
    except SystemExit:
        return False
    return True


@pytest.fixture
def run(monkeypatch):
    assert _wired(), "the CLI must register print, export and diff"
    monkeypatch.setattr(outputs, "load_and_plan", lambda _path, **_options: (None, make_result()))
    monkeypatch.setattr(cli, "preflight", lambda *_args, **_options: None)  # no file: a fixture result
    monkeypatch.setattr(outputs, "with_sensitivity", lambda _loaded, result, **_options: result)  # no re-planning
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1796083200")  # 2026-12-01T00:00:00Z
    return cli.main


def test_print_to_stdout_is_text(run, capsys) -> None:
    assert run(["print", "x.yaml"]) == 0
    out = capsys.readouterr().out
    assert out.startswith("Electrification roadmap: Example house") and "printed 2026-12-01" in out


@pytest.mark.parametrize("name,marker", [("s.html", "<!DOCTYPE html>"), ("s.md", "# Electrification"),
                                         ("s.txt", "Electrification roadmap")])
def test_print_format_from_extension(run, tmp_path, name, marker) -> None:
    out = tmp_path / name
    assert run(["print", "x.yaml", "-o", str(out)]) == 0
    assert out.read_text().startswith(marker)


def test_print_unknown_extension_is_bad_input(run, tmp_path, capsys) -> None:
    assert run(["print", "x.yaml", "-o", str(tmp_path / "s.pdf")]) == 2
    assert "--format" in capsys.readouterr().err


def test_print_format_flag_wins(run, capsys) -> None:
    assert run(["print", "x.yaml", "--format", "html"]) == 0
    assert capsys.readouterr().out.startswith("<!DOCTYPE html>")


def test_print_into_missing_folder_is_bad_input(run, tmp_path) -> None:
    assert run(["print", "x.yaml", "-o", str(tmp_path / "no" / "s.html")]) == 2


def test_export_all(run, tmp_path) -> None:
    code = run(["export", "x.yaml", "--csv", str(tmp_path / "csv"), "--ics", str(tmp_path / "r.ics"),
                "--json", str(tmp_path / "r.json")])
    assert code == 0
    assert (tmp_path / "csv" / "steps.csv").exists()
    assert (tmp_path / "r.ics").read_bytes().startswith(b"BEGIN:VCALENDAR\r\n")
    data = json.loads((tmp_path / "r.json").read_text())
    assert data["plan"]["content_hash"] and data["plan"]["provenance"]["prepared_by"]
    assert Roadmap.from_dict(data).steps == make_result().roadmap.steps  # still a valid roadmap document


def test_export_needs_a_target(run, capsys) -> None:
    assert run(["export", "x.yaml"]) == 2
    assert "nothing to export" in capsys.readouterr().err


def test_diff_inputs_only_on_sample_files(run, tmp_path, capsys) -> None:
    from tests.report.fixtures import plan_text

    a, b = tmp_path / "a.yaml", tmp_path / "b.yaml"
    a.write_text(plan_text(budget=8000))
    b.write_text("# a comment\n" + plan_text(budget=9000))
    assert run(["diff", str(a), str(b), "--inputs-only"]) == 0
    out = capsys.readouterr().out
    assert "budget per year: $8,000 -> $9,000" in out


def test_diff_of_bad_file_is_bad_input(run, tmp_path) -> None:
    bad = tmp_path / "bad.yaml"
    bad.write_text("home: [\n")
    assert run(["diff", str(bad), str(bad), "--inputs-only"]) == 2


def test_costs_shows_the_cautions_of_the_projects_it_lists(monkeypatch, capsys) -> None:
    """Every project the cost table lists brings its safety cautions (the project's own safety
    table, homeplan/data/cautions.yaml - the texts are ours, not an outside source)."""
    from homeplan import catalog
    from homeplan.cli import planning

    monkeypatch.setattr(planning, "load_and_plan", lambda _path, **_kw: (None, make_result()))
    monkeypatch.setattr(cli, "preflight", lambda *_args, **_options: None)  # no file: a fixture result
    texts = catalog.cautions(2023)
    assert cli.main(["costs", "x.yaml"]) == 0
    out = capsys.readouterr().out
    lines = [ln for ln in out.splitlines() if ln.startswith("caution: ")]
    flat = " ".join(texts["electrical"].split())
    assert f"caution: Licensed electrician and permit (New 200 A panel): {flat}" in lines
    assert any(ln.startswith("caution: Certified refrigerant technician (Heat pump):") for ln in lines)
    assert any("NEC 2023" in ln for ln in lines)  # the code edition follows the electrical one
    assert lines[-1] == f"caution: {' '.join(texts['planning'].split())}"
    assert cli.main(["costs", "--json", "x.yaml"]) == 0
    data = json.loads(capsys.readouterr().out)
    by_id = {p["id"]: p for p in data["projects"]}
    assert texts["electrical"] in by_id["panel_upgrade"]["cautions"]
    assert texts["refrigerant"] in by_id["heat_pump"]["cautions"]
