"""Every example in docs/plan-format.md is a valid plan file; the README states the two commands."""

from __future__ import annotations

import re

import pytest

from homeplan.plan.alternatives import options
from homeplan.plan.load import load_plan
from homeplan.planner import candidates as graph

from .conftest import ROOT

DOC = ROOT / "docs" / "plan-format.md"
BLOCKS = re.findall(r"```yaml\n(.*?)```", DOC.read_text(), flags=re.S)


def test_there_are_examples_for_every_section():
    text = "\n".join(BLOCKS)
    for section in ("provenance:", "display:", "home:", "appliances:", "vehicles:", "usage:",
                    "household:", "prices:", "budget:", "incentives:", "incentive_files:",
                    "options:", "choices:"):
        assert section in text, section


@pytest.mark.parametrize("block", BLOCKS, ids=[f"example{i}" for i in range(len(BLOCKS))])
def test_example_is_valid(block, tmp_path):
    # the incentive example names a file relative to docs/: keep that layout in tmp_path
    (tmp_path / "docs").mkdir()
    (tmp_path / "sample_homes").symlink_to(ROOT / "sample_homes")
    f = tmp_path / "docs" / "example.yaml"
    f.write_text(block)
    loaded = load_plan(f)
    for _, opt in options(loaded):  # named options are plans too
        graph.build_graph(opt.plan)


def test_readme_quick_start():
    text = (ROOT / "README.md").read_text()
    first = text.split("\n\n")[1]
    assert "electrification" in first
    assert "make demo" in text and "make test" in text


def test_roadmap_json_doc_matches_the_code():
    """docs/roadmap-json.md names the schema version and every key the code writes (a check of
    the project's own documentation against its code; no outside source)."""
    from homeplan.plan.fuels import UNIT_KEY
    from homeplan.result import SCHEMA_VERSION
    from tests.report.fixtures import make_result

    doc = (ROOT / "docs" / "roadmap-json.md").read_text()
    assert f"Schema version: **{SCHEMA_VERSION}**" in doc
    data = make_result().roadmap.to_dict()
    incentives = [i for s in data["steps"] for i in s["incentives"]]
    assert incentives and data["milestones"] and data["baselines"], "the fixture shows every part"
    keys = set(data) | set(data["steps"][0]) | set(data["years"][0]) | set(data["baselines"][0])
    keys |= set(data["milestones"][0]) | set(incentives[0])
    risk = data["price_risk"]
    keys |= set(risk) | set(risk["plan_cost_usd"]) | set(risk["shocks"][0]) | set(risk["years"][0])
    keys |= set(risk["fuels"][0]) | set(risk["solar"])
    documented = set(re.findall(r"^\| `(\w+)` \|", doc, flags=re.M))
    assert keys - documented == set()
    for unit_key in UNIT_KEY.values():
        assert f"`{unit_key}`" in doc


def test_readme_python_example_runs(capsys, monkeypatch):
    """The README's public-API example works as written (run from the project folder)."""
    text = (ROOT / "README.md").read_text()
    lines = text.split("## From Python", 1)[1].splitlines()[2:]
    block = lines[:next(i for i, line in enumerate(lines) if line and not line.startswith("    "))]
    code = "\n".join(line[4:] for line in block)
    assert code.startswith("from homeplan import load_plan, plan_roadmap")
    monkeypatch.chdir(ROOT)
    exec(compile(code, "README.md", "exec"), {})
    out = capsys.readouterr().out
    assert out.startswith("Step(project_id=")
