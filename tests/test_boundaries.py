"""The core never imports the terminal UI; the CLI answers usage errors with exit code 2."""

from __future__ import annotations

import subprocess
import sys

from .conftest import ROOT

CORE = ["homeplan", "homeplan.plan.load", "homeplan.planner", "homeplan.planner.chain",
        "homeplan.catalog", "homeplan.cli", "homeplan.cli.describe", "homeplan.cli.planning",
        "homeplan.cli.outputs", "homeplan.report.view", "homeplan.result"]


def test_core_does_not_import_textual():
    code = ("import sys\n" + "".join(f"import {m}\n" for m in CORE) +
            "from homeplan import load_plan, plan_roadmap\n"
            f"r = plan_roadmap(load_plan({str(ROOT / 'sample_homes' / 'minimal.yaml')!r}))\n"
            "bad = [m for m in sys.modules if m.split('.')[0] == 'textual']\n"
            "print(bad)\nassert not bad\n")
    subprocess.run([sys.executable, "-c", code], check=True, capture_output=True)


def run(*args):
    return subprocess.run([sys.executable, "-m", "homeplan.cli", *args], capture_output=True, text=True)


def test_exit_codes():
    assert run("check", str(ROOT / "sample_homes" / "minimal.yaml")).returncode == 0
    bad = run("check", "/nonexistent/plan.yaml")
    assert bad.returncode == 2 and "file not found" in bad.stderr and "Traceback" not in bad.stderr
    assert run("no-such-command").returncode == 2
    assert run().returncode == 2


def test_help_on_every_command():
    import argparse

    from homeplan.cli import build_parser

    sub = next(a for a in build_parser()._actions if isinstance(a, argparse._SubParsersAction))
    commands = list(sub.choices)
    assert "check" in commands and run("--help").returncode == 0
    for c in commands:
        r = run(c, "--help")
        assert r.returncode == 0 and "usage:" in r.stdout, c


def test_bad_plan_reports_all_problems(tmp_path):
    f = tmp_path / "bad.yaml"
    f.write_text("home:\n  floor_area_ft2: x\n  electrical: {servce_amps: 100}\nbudget: {}\n")
    r = run("check", str(f))
    assert r.returncode == 2
    assert f"{f}:2:19:" in r.stderr and "did you mean 'service_amps'" in r.stderr
    assert "problems found" in r.stderr
