"""The app opens a portfolio's results read-only: the sums by year, the homes, each home in the
single-home views (planned again from its stored plan, as the run planned it), nothing editable.
"""

from __future__ import annotations

from textual.widgets import DataTable

from homeplan.cli import main
from homeplan.portfolio.store import Store
from homeplan.tui.portfolio import HomeScreen, PortfolioApp

from .conftest import HOMES


async def _settle(pilot) -> None:
    for _ in range(3):
        await pilot.app.workers.wait_for_complete()
        await pilot.pause()


async def test_years_homes_and_a_home_read_only(straight_run):
    with Store.open(straight_run, readonly=True) as store:
        stored = store.home(2)
    app = PortfolioApp(straight_run, light=False)
    async with app.run_test(size=(120, 40)) as pilot:
        years = app.query_one("#years-table", DataTable)
        assert years.row_count == 10                            # the template's 10-year horizon
        await pilot.press("h")
        homes = app.query_one("#homes-table", DataTable)
        assert homes.row_count == HOMES
        await pilot.press("down", "down", "enter")
        await _settle(pilot)
        screen = app.screen
        assert isinstance(screen, HomeScreen) and screen.row["home_id"] == stored["home_id"]
        assert screen.result.roadmap.npv_usd == stored["npv_usd"]   # the run's result, again
        assert screen.note is None and screen.error is None
        plan = screen.plan
        await pilot.press("3", "p", "x", "r")                   # pin, leave out, release: off
        await _settle(pilot)
        assert app.screen is screen and screen.plan == plan
        assert not app.check_action("pin", ()) and not app.check_action("exclude", ())
        await pilot.press("escape")
        assert not isinstance(app.screen, HomeScreen)
        await pilot.press("question_mark")
        assert "read-only" in str(app.screen.body.columns[1]._cells)


def test_open_says_when_there_are_no_results(tmp_path, capsys):
    assert main(["open", str(tmp_path)]) == 2
    assert "no portfolio results here" in capsys.readouterr().err
