"""Every example in docs/plan-format.md is a valid plan file; the README states the two commands."""

from __future__ import annotations

import re

import pytest

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
    graph.build_graph(loaded.plan)


def test_readme_quick_start():
    text = (ROOT / "README.md").read_text()
    first = text.split("\n\n")[1]
    assert "electrification" in first
    assert "make demo" in text and "make test" in text
