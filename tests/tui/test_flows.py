"""Pilot tests: drive the app by its keys the way a homeowner would."""

from __future__ import annotations

from pathlib import Path

from textual.widgets import DataTable, Input, Static

from homeplan.errors import InputError, Problem
from homeplan.plan.load import load_plan
from homeplan.report.words import fit_labels
from homeplan.tui.app import HomeplanApp, PlannerUnavailable
from homeplan.tui.screens.forms import ChoiceScreen, FormScreen
from homeplan.tui.widgets.home import HomeView
from homeplan.tui.widgets.roadmap import RoadmapView, Timeline

from .conftest import SAMPLE, form_ready, make_app, settle, shared_planner


def text_of(app, selector: str) -> str:
    widget = app.screen.query_one(selector, Static)
    return str(widget.render())


def steps(app) -> dict[str, int]:
    return {s.project_id: s.year for s in app.result.roadmap.steps}


async def test_open_shows_the_three_answers(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert app.result is not None and app.result.plan == app.session.plan
        first = app.result.roadmap.steps[0]
        next_box = text_of(app, "#next-box")
        assert fit_labels([first.label], 24)[0][:15] in next_box and str(first.year) in next_box
        assert f"{first.year}:" in text_of(app, "#year-box")
        fuel = text_of(app, "#electric-box")
        assert "Gas" in fuel and "Gasoline" in fuel  # one line per fuel still bought
        closed = next(m for m in app.result.roadmap.milestones if m.kind == "gas_service_closed")
        assert f"closed {closed.year}" in fuel
        assert "plan up to date" in text_of(app, "#status")


async def test_budget_change_replans_and_marks_moved_steps(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        before = steps(app)
        await pilot.press("3", "b")
        assert isinstance(app.screen, FormScreen)
        field = app.screen.query_one("#field-0", Input)
        field.value = "30000"
        await pilot.press("enter")
        assert app.session.plan.budget.usd_per_year == 30000
        await settle(pilot)
        assert app.result.plan.budget.usd_per_year == 30000
        after = steps(app)
        assert after != before, "a budget more than three times larger should change the roadmap"
        assert app.moved == {pid: before.get(pid) for pid in after if before.get(pid) != after[pid]} | {
            pid: y for pid, y in before.items() if pid not in after}
        # the timeline shows the new years and where moved steps were
        table = app.screen.query_one(Timeline)
        view = app.screen.query_one(RoadmapView)
        moved_id = next(iter(app.moved))
        row = [r.id for r in view.rows].index(moved_id)
        cells = [str(c) for c in table.get_row_at(row)]
        first = app.result.roadmap.first_year
        if moved_id in after:
            assert cells[after[moved_id] - first + 1].strip() not in ("", "·", "░░░░")
        if app.moved[moved_id] is not None:
            assert "░" in cells[app.moved[moved_id] - first + 1]


async def test_old_plan_stays_visible_while_replanning(plan_file):
    import threading

    gate = threading.Event()
    calls = []

    def slow(plan, base_dir):
        calls.append(1)
        if len(calls) > 1:
            assert gate.wait(10)
        return shared_planner(plan, base_dir)

    app = make_app(plan_file, planner=slow)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        old = app.result
        await pilot.press("plus")
        assert app.planning and app.result is old
        assert "planning" in text_of(app, "#status")
        assert fit_labels([old.roadmap.steps[0].label], 24)[0][:15] in text_of(app, "#next-box")
        gate.set()
        await settle(pilot)
        assert app.result is not old and not app.planning


async def test_plus_minus_keys_step_the_budget(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("plus", "plus", "minus")
        assert app.session.plan.budget.usd_per_year == 10000
        await settle(pilot)
        assert app.result.plan.budget.usd_per_year == 10000


async def test_pin_exclude_release(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        view = app.screen.query_one(RoadmapView)
        table = app.screen.query_one(Timeline)
        first = app.result.roadmap.first_year
        # pin the first step two years later: put the cursor on that year and press p
        row = view.rows[0]
        target = row.step.year + 2
        table.move_cursor(row=0, column=target - first + 1)
        await pilot.press("p")
        assert app.session.plan.choices.pins == {row.id: target}
        await settle(pilot)
        rm = app.result.roadmap
        assert rm.status == "ok", rm.infeasibility  # the sample can take this pin
        assert steps(app)[row.id] == target
        assert view.rows[[r.id for r in view.rows].index(row.id)].pinned == target
        # leave another project out
        other = next(r for r in view.rows if r.id != row.id and r.step is not None)
        table.move_cursor(row=view.rows.index(other), column=0)
        await pilot.press("x")
        assert other.id in app.session.plan.choices.exclude
        await settle(pilot)
        assert other.id not in steps(app)
        label = str(table.get_row_at([r.id for r in view.rows].index(other.id))[0])
        assert label.startswith("✕")
        # release both
        table.move_cursor(row=[r.id for r in view.rows].index(other.id), column=0)
        await pilot.press("r")
        table.move_cursor(row=[r.id for r in view.rows].index(row.id), column=0)
        await pilot.press("r")
        await settle(pilot)
        assert app.session.plan.choices.pins == {} and app.session.plan.choices.exclude == []
        assert "pins" not in app.session.text and "exclude" not in app.session.text


async def test_pin_from_label_column_asks_for_the_year(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        view = app.screen.query_one(RoadmapView)
        app.screen.query_one(Timeline).move_cursor(row=0, column=0)
        pid = view.rows[0].id
        await pilot.press("p")
        assert isinstance(app.screen, FormScreen)
        app.screen.query_one("#field-0", Input).value = "2031"
        await pilot.press("enter")
        assert app.session.plan.choices.pins == {pid: 2031}


async def test_what_if_an_appliance_fails_now(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        await pilot.press("2")
        home = app.screen.query_one(HomeView)
        assert [i.key for i in home.items][0] == "furnace"
        await pilot.press("f")
        assert app.session.plan.choices.failed_now == ["furnace"]
        await settle(pilot)
        assert app.result.plan.choices.failed_now == ("furnace",) or \
            list(app.result.plan.choices.failed_now) == ["furnace"]
        table = app.screen.query_one("#inventory", DataTable)
        assert "FAILED" in str(table.get_row_at(0)[-1])
        furnace = next(o for o in app.result.outlooks if o.key == "furnace")
        assert furnace.failed
        await pilot.press("f")  # and back
        assert app.session.plan.choices.failed_now == []


async def test_edit_an_appliance(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        await pilot.press("2")
        home = app.screen.query_one(HomeView)
        row = [i.key for i in home.items].index("water_heater")
        app.screen.query_one("#inventory", DataTable).move_cursor(row=row)
        await pilot.press("e")
        form = app.screen
        assert isinstance(form, FormScreen)
        labels = [f.label for f in form.fields]
        assert "Efficiency (UEF)" in labels and "Tank" in labels
        form.query_one("#field-0", Input).value = "2024"  # year installed
        form.query_one(f"#field-{labels.index('Efficiency (UEF)')}", Input).value = "0.67"
        await pilot.press("enter")
        assert not isinstance(app.screen, FormScreen)
        wh = app.session.plan.appliances[2]
        assert wh.year_installed == 2024 and wh.uef == 0.67
        await settle(pilot)
        outlook = next(o for o in app.result.outlooks if o.key == "water_heater")
        assert outlook.install_year == 2024


async def test_a_pre_2023_rating_is_edited_in_its_own_field(plan_file):
    # an air conditioner from 2009 carries a SEER label, not SEER2: the form offers that field
    # (and no second SEER2 field that would contradict it) and keeps what the user types there
    plan_file.write_text(plan_file.read_text().replace("    seer2: 12.4\n", "    seer: 13\n"))
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        await pilot.press("2")
        home = app.screen.query_one(HomeView)
        app.screen.query_one("#inventory", DataTable).move_cursor(row=[i.key for i in home.items].index("ac"))
        await pilot.press("e")
        form = app.screen
        assert isinstance(form, FormScreen)
        labels = [f.label for f in form.fields]
        assert "Cooling efficiency (SEER, pre-2023)" in labels and not any("SEER2" in x for x in labels)
        assert "Cooling efficiency on a hot day (EER2)" in labels
        form.query_one(f"#field-{labels.index('Cooling efficiency (SEER, pre-2023)')}", Input).value = "14"
        await pilot.press("enter")
        assert not isinstance(app.screen, FormScreen)
        ac = next(a for a in app.session.plan.appliances if a.key == "ac")
        assert ac.seer == 14 and ac.seer2 is None


async def test_a_bad_value_is_explained_and_changes_nothing(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("b")
        form = app.screen
        form.query_one("#field-0", Input).value = "lots"
        await pilot.press("enter")
        assert isinstance(app.screen, FormScreen)
        assert "not a number" in str(form.query_one("#form-error", Static).render())
        form.query_one("#field-0", Input).value = "-5"
        await pilot.press("enter")
        assert isinstance(app.screen, FormScreen)
        error = str(form.query_one("#form-error", Static).render())
        assert "'Budget per year' is -5" in error and "at least 0" in error
        await pilot.press("escape")
        assert app.session.plan.budget.usd_per_year == 9000 and not app.session.dirty


async def test_add_and_remove_items(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        await pilot.press("2", "a")
        form = app.screen
        assert isinstance(form, FormScreen)
        from textual.widgets import Select

        form.query_one("#field-0", Select).value = "vehicle"
        form.query_one("#field-1", Input).value = "pickup"
        form.query_one("#field-4", Input).value = "2019"
        form.query_one("#field-4", Input).focus()
        await pilot.press("enter")
        plan = app.session.plan
        assert plan.vehicles[-1].id == "pickup" and plan.vehicles[-1].model_year == 2019
        await pilot.pause()
        home = app.screen.query_one(HomeView)
        keys = [i.key for i in home.items]
        assert "pickup" in keys
        app.screen.query_one("#inventory", DataTable).move_cursor(row=keys.index("pickup"))
        await pilot.press("d")
        assert isinstance(app.screen, ChoiceScreen)
        await pilot.press("y")
        assert all(v.id != "pickup" for v in app.session.plan.vehicles)
        await settle(pilot)


async def test_undo_and_redo(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("plus", "plus")
        assert app.session.plan.budget.usd_per_year == 11000
        await pilot.press("ctrl+z")
        assert app.session.plan.budget.usd_per_year == 10000
        await pilot.press("ctrl+z")
        assert app.session.plan.budget.usd_per_year == 9000 and not app.session.dirty
        await pilot.press("ctrl+z")  # nothing left: no change, no crash
        await pilot.press("ctrl+y")
        assert app.session.plan.budget.usd_per_year == 10000
        await settle(pilot)
        assert app.result.plan.budget.usd_per_year == 10000


async def test_save_and_reload_keeps_comments(plan_file: Path):
    original = plan_file.read_text()
    app = make_app(plan_file)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("plus", "plus", "plus")
        await pilot.press("ctrl+s")
        assert not app.session.dirty
        assert "unsaved" not in text_of(app, "#status")
    expected = original.replace("  usd_per_year: 9000\n", "  usd_per_year: 12000\n")
    assert expected != original
    assert plan_file.read_text() == expected
    assert (plan_file.parent / "home.yaml.bak").read_text() == original
    assert load_plan(plan_file).plan.budget.usd_per_year == 12000


async def test_save_as(plan_file: Path):
    app = make_app(plan_file)
    target = plan_file.parent / "copy.yaml"
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("plus", "S")
        assert isinstance(app.screen, FormScreen)
        app.screen.query_one("#field-0", Input).value = str(target)
        await pilot.press("enter")
        assert app.session.path == target and not app.session.dirty
    assert load_plan(target).plan.budget.usd_per_year == 10000
    assert load_plan(plan_file).plan.budget.usd_per_year == 9000


async def test_quit_with_unsaved_changes_asks(plan_file: Path):
    app = make_app(plan_file)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("plus", "ctrl+q")
        assert isinstance(app.screen, ChoiceScreen)
        await pilot.press("escape")  # stay
        assert not isinstance(app.screen, ChoiceScreen) and app.is_running
        await pilot.press("ctrl+q", "s")  # save and quit
        await pilot.pause()
    assert load_plan(plan_file).plan.budget.usd_per_year == 10000


async def test_quit_without_saving(plan_file: Path):
    original = plan_file.read_text()
    app = make_app(plan_file)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("plus", "ctrl+q", "d")
        await pilot.pause()
        assert not app.is_running
    assert plan_file.read_text() == original


async def test_quit_without_changes_does_not_ask(plan_file: Path):
    app = make_app(plan_file)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("ctrl+q")
        await pilot.pause()
        assert not app.is_running


async def test_new_plan_form_writes_a_valid_plan(tmp_path: Path):
    target = tmp_path / "fresh.yaml"
    seen = []

    def planner(plan, base_dir):  # the form is under test here, not the planner
        seen.append(plan)
        return shared_planner(load_plan(SAMPLE).plan, base_dir)

    app = HomeplanApp(session=None, planner=planner, new_path=target, light=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await form_ready(pilot)
        form = app.screen
        assert isinstance(form, FormScreen)
        keys = [f.key for f in form.fields]

        def put(key, value):
            form.query_one(f"#field-{keys.index(key)}", Input).value = value

        put("name", "Test house (invented)")
        put("latitude", "44.9")
        put("longitude", "-93.2")
        put("floor_area_ft2", "1,400")
        put("heating_year", "2008")
        put("first_year", "2027")
        await pilot.press("enter")
        await settle(pilot)
        assert app.session is not None and app.session.path == target
        assert app.result is not None and seen[-1] == app.session.plan
    loaded = load_plan(target)
    assert loaded.plan.home.name == "Test house (invented)"
    assert loaded.plan.home.floor_area_ft2 == 1400
    assert [a.kind for a in loaded.plan.appliances][:1] == ["furnace"]
    assert loaded.plan.appliances[0].year_installed == 2008
    assert len(loaded.plan.vehicles) == 1 and loaded.plan.budget.first_year == 2027


async def test_new_plan_form_reports_missing_answers(tmp_path: Path):
    app = HomeplanApp(session=None, planner=shared_planner, new_path=tmp_path / "x.yaml",
                      light=False)
    async with app.run_test(size=(80, 24)) as pilot:
        await form_ready(pilot)
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, FormScreen)
        assert "floor area" in str(app.screen.query_one("#form-error", Static).render())
        await pilot.press("escape")  # cancelling the form with no plan open leaves the app
        await pilot.pause()
        assert not app.is_running
    assert not (tmp_path / "x.yaml").exists()


async def test_engine_errors_are_messages_not_crashes(plan_file):
    calls = []

    def broken(plan, base_dir):
        calls.append(plan)
        if len(calls) == 1:
            return shared_planner(plan, base_dir)
        if len(calls) == 2:
            raise InputError(Problem("x", 1, 1, "pins.solar: no such project", "check the id"))
        raise RuntimeError("solver exploded")

    app = make_app(plan_file, planner=broken)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        good = app.result
        await pilot.press("plus")
        await settle(pilot)
        assert app.result is good  # the last good plan stays
        assert "no such project" in text_of(app, "#overview-banner")
        assert "plan not updated" in text_of(app, "#status")
        await pilot.press("plus")
        await settle(pilot)
        assert "solver exploded" in text_of(app, "#overview-banner")
        await pilot.press("3")
        assert "solver exploded" in text_of(app, "#roadmap-banner")


async def test_infeasible_roadmap_is_explained(plan_file):
    from dataclasses import replace

    def infeasible(plan, base_dir):
        res = shared_planner(plan, base_dir)
        rm = replace(res.roadmap, status="infeasible", steps=(),
                     infeasibility="the pins need $4,000 more in 2027")
        return replace(res, roadmap=rm)

    app = make_app(plan_file, planner=infeasible)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert "$4,000 more in 2027" in text_of(app, "#overview-banner")
        assert "no roadmap fits" in text_of(app, "#status")
        for key in "1234567":
            await pilot.press(key)


async def test_without_a_planner_the_home_still_works(plan_file):
    def missing(plan, base_dir):  # noqa: ARG001 - the app's planner interface
        raise PlannerUnavailable("homeplan.planner could not be imported (test)")

    app = make_app(plan_file, planner=missing)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert "Planner not available" in text_of(app, "#overview-banner")
        await pilot.press("2")
        assert len(app.screen.query_one(HomeView).items) == 8
        await pilot.press("plus")
        assert app.session.plan.budget.usd_per_year == 10000


async def test_every_view_at_80x24_and_the_power_caution(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        for key in "1234567":
            await pilot.press(key)
            await pilot.pause()
        await pilot.press("5")
        caution = text_of(app, "#power-caution")
        assert "licensed electrician" in caution
        assert app.screen.query_one("#power-caution").region.height > 0
        await pilot.press("w")
        assert app.screen.__class__.__name__ == "TextScreen"
        await pilot.press("escape")
        await pilot.press("question_mark")
        await pilot.press("escape")
        await pilot.press("t")
        assert app.theme == "homeplan-light"


async def test_step_details_show_reasons_and_cautions(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        view = app.screen.query_one(RoadmapView)
        step = view.rows[0].step
        text = text_of(app, "#roadmap-detail-text")
        assert step.label in text
        for reason in step.reasons:
            assert reason in text
        await pilot.press("enter")
        assert app.screen.__class__.__name__ == "TextScreen"
        await pilot.press("escape")
        shown = len(view.rows)
        await pilot.press("v")  # the projects the plan does not use
        assert len(view.rows) == len(app.result.projects) >= shown


async def test_command_palette_runs_actions(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        await pilot.press("ctrl+p")
        await pilot.press(*"Raise budget")
        await pilot.pause(0.3)
        await pilot.press("enter")
        await pilot.pause()
        assert app.session.plan.budget.usd_per_year == 10000





async def test_mouse_opens_views_and_selects_cells(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        await pilot.click("#--content-tab-roadmap")
        await pilot.pause()
        assert app.active_view_id == "roadmap"
        table = app.screen.query_one(Timeline)
        view = app.screen.query_one(RoadmapView)
        first = app.result.roadmap.first_year
        # click the cell of the first project two years after its step, then pin with the key
        row = view.rows[0]
        target = row.step.year + 2
        label_w = table.columns[table.coordinate_to_cell_key((0, 0)).column_key].width
        year_w = table.columns[table.coordinate_to_cell_key((0, 1)).column_key].width
        await pilot.click(table, offset=(label_w + (target - first) * year_w + 1, 1))
        assert table.cursor_coordinate == (0, target - first + 1)
        await pilot.press("p")
        assert app.session.plan.choices.pins == {row.id: target}


async def test_edit_prices_and_household(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        await pilot.press("dollar_sign")
        form = app.screen
        assert isinstance(form, FormScreen)
        labels = [f.label for f in form.fields]
        form.query_one(f"#field-{labels.index('Electricity')}", Input).value = "0.21"
        form.query_one("#field-0", Input).focus()
        await pilot.press("enter")
        assert app.session.plan.prices.electricity.usd_per_kwh == 0.21
        await pilot.press("7", "e")
        form = app.screen
        assert isinstance(form, FormScreen)
        form.query_one("#field-0", Input).value = "70"
        form.query_one("#field-0", Input).focus()
        await pilot.press("enter")
        assert app.session.plan.household.ami_pct == 70
        assert list(app.session.plan.incentive_files) == list(load_plan(SAMPLE).plan.incentive_files)
        await settle(pilot)
        assert app.result.plan.household.ami_pct == 70


async def test_resize_uses_the_room_and_no_color_works(plan_file, monkeypatch):
    monkeypatch.setenv("NO_COLOR", "1")
    app = make_app(plan_file)
    async with app.run_test(size=(80, 24)) as pilot:
        assert app.no_color
        await settle(pilot)
        await pilot.press("3")
        table = app.screen.query_one(Timeline)
        narrow = table.columns[table.coordinate_to_cell_key((0, 0)).column_key].width
        await pilot.resize_terminal(120, 40)
        await pilot.pause()
        await pilot.pause()
        wide = table.columns[table.coordinate_to_cell_key((0, 0)).column_key].width
        assert wide > narrow


async def test_fast_typing_plans_only_the_latest_edit(plan_file):
    import threading

    gate = threading.Event()
    seen = []

    def slow(plan, base_dir):
        seen.append(plan.budget.usd_per_year)
        if len(seen) == 2:
            assert gate.wait(10)
        return shared_planner(plan, base_dir)

    app = make_app(plan_file, planner=slow)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("plus")  # starts a plan that waits at the gate
        await pilot.press("plus", "plus", "plus")  # wait their turn, planned together
        gate.set()
        await settle(pilot)
        assert seen == [9000, 10000, 13000]
        assert app.result.plan.budget.usd_per_year == 13000 and not app.planning


async def test_o_switches_between_the_plans_named_options(plan_file):
    with plan_file.open("a") as fh:
        fh.write("alternatives:\n  - name: Double budget\n    changes:\n      budget: {usd_per_year: 18000}\n")
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        base = app.session.plan.budget.usd_per_year
        assert "As planned (1/2)" in text_of(app, "#status")
        await pilot.press("o")
        await settle(pilot)
        assert app.result.plan.budget.usd_per_year == 18000
        assert "Double budget (2/2)" in text_of(app, "#status")
        await pilot.press("o")
        await settle(pilot)
        assert app.result.plan.budget.usd_per_year == base
        assert "As planned (1/2)" in text_of(app, "#status")


async def test_o_without_options_says_how_to_add_them(plan_file):
    app = make_app(plan_file)
    async with app.run_test(size=(100, 30)) as pilot:
        await settle(pilot)
        await pilot.press("o")
        await pilot.pause()
        assert app.option_index == 0
        assert any("alternatives" in n.message for n in app._notifications)
