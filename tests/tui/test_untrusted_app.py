"""The app with a plan from someone else: it asks before overwriting a file changed on disk or
read-only, asks before reading a file outside the plan's folder, and shows escape sequences from
the plan as visible characters (ECMA-48: ESC 0x1B starts a control function; Unicode chapter 22:
U+241B is its control picture)."""

from __future__ import annotations

from pathlib import Path

from homeplan.plan.files import PlanFolder
from homeplan.plan.load import load_plan
from homeplan.planner.chain import plan_roadmap
from homeplan.tui.screens.forms import ChoiceScreen

from .conftest import SAMPLES, make_app, settle


async def test_saving_over_a_change_on_disk_asks_first(plan_file: Path):
    app = make_app(plan_file)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("plus")
        elsewhere = plan_file.read_text().replace("usd_per_year: 9000", "usd_per_year: 9500")
        plan_file.write_text(elsewhere)  # a text editor saves meanwhile
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert isinstance(app.screen, ChoiceScreen) and app.session.dirty
        assert plan_file.read_text() == elsewhere
        await pilot.press("escape")  # cancel: nothing written
        await pilot.pause()
        assert plan_file.read_text() == elsewhere and app.session.dirty
        await pilot.press("ctrl+s")
        await pilot.pause()
        await pilot.press("o")  # overwrite: the other edit goes to the backup
        await pilot.pause()
        assert not app.session.dirty
    assert load_plan(plan_file).plan.budget.usd_per_year == 10000
    assert (plan_file.parent / "home.yaml.bak").read_text() == elsewhere


async def test_saving_a_read_only_file_asks_first(plan_file: Path):
    plan_file.chmod(0o444)
    app = make_app(plan_file)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("plus", "ctrl+s")
        await pilot.pause()
        assert isinstance(app.screen, ChoiceScreen)
        await pilot.press("w")
        await pilot.pause()
        assert not app.session.dirty
    assert load_plan(plan_file).plan.budget.usd_per_year == 10000


async def test_a_file_outside_the_folder_is_read_only_when_the_user_says_so(tmp_path: Path):
    folder = tmp_path / "plans"
    folder.mkdir()
    plan = folder / "home.yaml"
    plan.write_text((SAMPLES / "cold_gas_100a.yaml").read_text().replace(
        "incentive_files: [incentives/demoland_invented.yaml]", "incentive_files: [../programs.yaml]"))
    (tmp_path / "programs.yaml").write_text((SAMPLES / "incentives" / "demoland_invented.yaml").read_text())
    seen: list[PlanFolder] = []

    def planner(p, base_dir):  # the real pipeline, with the folder the app gives it
        seen.append(base_dir)
        return plan_roadmap(p, base_dir=base_dir)

    app = make_app(plan, planner=planner)
    async with app.run_test(size=(100, 30)) as pilot:
        for _ in range(200):  # the first plan fails (the worker's error is the app's to show)
            await pilot.pause(0.05)
            if isinstance(app.screen, ChoiceScreen):
                break
        assert isinstance(app.screen, ChoiceScreen)
        assert "outside" in str(app.screen.message) and app.result is None
        await pilot.press("r")
        await settle(pilot)
        assert app.result is not None and app.plan_error is None
    assert (tmp_path / "programs.yaml").resolve() in seen[-1].allowed


async def test_escape_sequences_in_the_plan_are_shown_not_sent(plan_file: Path):
    plan_file.write_text(plan_file.read_text().replace(
        "  name: Okafor-Lindqvist house", '  name: "Okafor\\e]52;c;SGVsbG8=\\a\\e[2J house"'))
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        status = str(app.query_one("#status").render())
        assert "\x1b" not in status and "\u241b]52" in status
