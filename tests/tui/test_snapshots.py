"""Snapshots of every view at 80x24 and 120x40 on the cold-climate demo home, and of every view
at 80x24 on the same home with the longest names (long labels wrap; no word is cut).

Regenerate after an intended change with:
    .venv/bin/python -m pytest tests/tui/test_snapshots.py --snapshot-update
and look at the SVGs (tests/tui/__snapshots__/) before committing them. The numbers come from the
real planner, so an engine change that moves a step also changes these pictures.
"""

from __future__ import annotations

import pytest

from .conftest import SAMPLE, long_names_plan, make_app, settle

VIEWS = ["1", "2", "3", "4", "5", "6", "7"]
NAMES = ["next", "home", "roadmap", "money", "power", "energy", "incentives"]


async def _ready(pilot) -> None:
    await settle(pilot)


@pytest.mark.parametrize("size", [(80, 24), (120, 40)], ids=["80x24", "120x40"])
@pytest.mark.parametrize("key", VIEWS, ids=NAMES)
def test_view(snap_compare, key, size):
    app = make_app(SAMPLE)
    assert snap_compare(app, press=[key], terminal_size=size, run_before=_ready)


def test_light_theme_roadmap(snap_compare):
    app = make_app(SAMPLE)
    app.theme = "homeplan-light"
    assert snap_compare(app, press=["3"], terminal_size=(80, 24), run_before=_ready)


def test_budget_form(snap_compare):
    app = make_app(SAMPLE)
    assert snap_compare(app, press=["b"], terminal_size=(80, 24), run_before=_ready)


@pytest.mark.parametrize("key", VIEWS, ids=NAMES)
def test_view_long_names(snap_compare, key, tmp_path):
    app = make_app(long_names_plan(tmp_path))
    assert snap_compare(app, press=[key], terminal_size=(80, 24), run_before=_ready)
