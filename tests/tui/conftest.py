"""Fixtures for the terminal app: a copy of a sample home and a shared planner.

The planner is the real pipeline; results are memoised by the plan's content so that the many
app instances of a test run (pilot and snapshot tests) plan each distinct plan once.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
SAMPLES = ROOT / "sample_homes"
SAMPLE = SAMPLES / "cold_gas_100a.yaml"

_MEMO: dict[str, object] = {}
_CACHE: list = []


def shared_planner(plan, base_dir):  # noqa: ARG001 - the app's planner interface
    """The real planner with one cache for the whole test run (results memoised by content)."""
    from homeplan import PlannerCache, plan_roadmap

    key = plan.model_dump_json()
    if key not in _MEMO:
        if not _CACHE:
            _CACHE.append(PlannerCache())
        _MEMO[key] = plan_roadmap(plan, base_dir=SAMPLES, cache=_CACHE[0])
    return _MEMO[key]


@pytest.fixture
def plan_file(tmp_path: Path) -> Path:
    """A private copy of the cold-climate demo home (so saving never touches the samples)."""
    target = tmp_path / "home.yaml"
    shutil.copy(SAMPLE, target)
    return target


@pytest.fixture(autouse=True)
def _fixed_look(monkeypatch):
    """Same colours whatever the developer's environment says."""
    monkeypatch.delenv("HOMEPLAN_THEME", raising=False)


def make_app(path: Path, planner=shared_planner, **kw):
    from homeplan.tui.app import HomeplanApp
    from homeplan.tui.session import PlanSession

    return HomeplanApp(session=PlanSession.open(path), planner=planner, light=False, **kw)


async def settle(pilot) -> None:
    """Wait for the planner worker and for the app to handle its result."""
    app = pilot.app
    for _ in range(3):
        await app.workers.wait_for_complete()
        await pilot.pause()
        if not app.planning:
            break
    await pilot.pause()


async def form_ready(pilot) -> None:
    """Wait until the form is open, its first field focused and its choice lists mounted (on
    a loaded machine a key pressed sooner can close the form while they are still mounting)."""
    from textual.widgets import Select
    from textual.widgets._select import SelectOverlay

    from homeplan.tui.screens.forms import FormScreen

    for _ in range(100):
        screen = pilot.app.screen
        if isinstance(screen, FormScreen) and screen.focused is not None and all(
                s.query(SelectOverlay) and s.query_one(SelectOverlay).option_count
                for s in screen.query(Select)):
            return
        await pilot.pause(0.05)
    raise AssertionError("the form did not finish opening")


# Long but realistic names, for the 80-column snapshots: what a household might type.
LONG_NAMES = {
    "name: Okafor-Lindqvist house": "name: Okafor-Lindqvist-Vandenberghe family house (invented)",
    'place: "Snowdemo Falls (invented)"':
        'place: "Snowdemo Falls Township, North Demo County (invented)"',
    "name: 2012 sedan": "name: 2012 station wagon for the daily commute",
    "name: 2017 wagon": "name: 2017 station wagon for family trips",
    "incentive_files: [incentives/demoland_invented.yaml]":
        "incentive_files: [incentives/demoland_invented.yaml, "
        "incentives/federal_2023_2025_example.yaml]",
}


def long_names_plan(folder: Path) -> Path:
    """The cold-climate demo home with the longest names of any sample (a long house name and
    place, two cars whose names start alike, both incentive files) written into ``folder``."""
    text = SAMPLE.read_text(encoding="utf-8")
    for before, after in LONG_NAMES.items():
        assert before in text, before
        text = text.replace(before, after)
    target = folder / "long_names_home.yaml"
    target.write_text(text, encoding="utf-8")
    shutil.copytree(SAMPLES / "incentives", folder / "incentives")
    return target
