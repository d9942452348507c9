"""A portfolio's results in the terminal, read-only: the sums by year, the homes, the programs.

``homeplan open RESULTS`` opens the store of a portfolio run (while the run goes on, too: the
store is read in WAL mode; ``r`` reads it again). Enter on a home plans it again from the plan
the run stored, in a thread worker, and shows it in the single-home views; nothing can be
edited or saved there (the keys that would change the plan are switched off). When the result
differs from the stored one (an incentive or weather file changed since the run), it says so.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Any

from rich.text import Text
from textual import on, work
from textual.app import App, ComposeResult
from textual.binding import Binding
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Static, TabbedContent, TabPane
from textual.worker import Worker, WorkerState

from homeplan.errors import InputError
from homeplan.plan.model import Plan
from homeplan.portfolio.rollup import Coincidence, Rollup, default_coincidence, rollup
from homeplan.portfolio.store import Store
from homeplan.tui.actions import (
    READ_ONLY,
    bindings,
    portfolio_bindings,
    portfolio_help_rows,
)
from homeplan.tui.app import THEMES, VIEWS, EnginePlanner
from homeplan.tui.format import usd
from homeplan.tui.screens.forms import TextScreen
from homeplan.tui.widgets.base import View, ViewData
from homeplan.tui.widgets.roadmap import RoadmapView, row_details

__all__ = ["EDITING", "PORTFOLIO_ONLY", "HomeScreen", "PortfolioApp", "home_bindings"]

EDITING = frozenset({"edit_budget", "budget_step", "settings", "prices", "edit_incentives", "pin",
                     "exclude", "release", "edit_item", "add_item", "remove_item", "fail_now",
                     "undo", "redo", "save", "save_as", "new_plan"})
"""Actions that would change a plan: off in a portfolio's homes."""

PORTFOLIO_ONLY = frozenset({"open_home", "tab", "reload"})
"""The portfolio's keys that do nothing while a home is shown."""

STATUS_WORDS = {"ok": "planned", "infeasible": "no roadmap fits", "error": "bad input",
                "failed": "planner error"}


def home_bindings() -> list[Binding]:
    """A home's keys: the single-home app's look-only keys (views 1-7, sources), and Esc back."""
    out = [b for b in bindings() if b.action.split("(")[0] in READ_ONLY and b.key != "escape"]
    return [*out, Binding("escape", "app.back", "Back")]


class HomeScreen(Screen):
    """One home of the portfolio in the single-home views, read-only."""

    BINDINGS = home_bindings()

    def __init__(self, row: dict[str, Any], planner: Any) -> None:
        super().__init__()
        self.row = row
        self.planner = planner
        self.plan = Plan.model_validate_json(row["plan_json"])
        self.result = None
        self.error: str | None = None
        self.note: str | None = None
        self._stale: set[str] = set()

    def compose(self) -> ComposeResult:
        yield Static("", id="status")
        with TabbedContent(initial="next", id="views"):
            for i, (vid, label, cls) in enumerate(VIEWS):
                with TabPane(f"{i + 1} {label}", id=vid):
                    if vid == "next":
                        yield cls(id=f"view-{vid}")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self._status()
        self.refresh_views()
        self.run_planner(self.plan, Path(self.row["base_dir"] or "."))

    @work(thread=True, exclusive=True, group="home", exit_on_error=False)
    def run_planner(self, plan: Plan, base_dir: Path):
        return self.planner(plan, base_dir)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if event.worker.group != "home":
            return
        if event.state == WorkerState.SUCCESS:
            self.result = event.worker.result
            stored = self.row.get("npv_usd")
            if (stored is not None and self.result.roadmap.status == "ok"
                    and abs(self.result.roadmap.npv_usd - stored) > 0.5):
                self.note = (f"planned again, this home's NPV is {usd(self.result.roadmap.npv_usd)}, "
                             f"not the stored {usd(stored)}: a file it names has changed since the run")
        elif event.state == WorkerState.ERROR:
            err = event.worker.error
            self.error = (str(err) if isinstance(err, InputError)
                          else f"the planner stopped ({type(err).__name__}: {err})")
        else:
            return
        self._status()
        self.refresh_views()

    def view_data(self) -> ViewData:
        return ViewData(plan=self.plan, result=self.result, path=Path(f"{self.row['home_id']}"),
                        planning=self.result is None and self.error is None,
                        error=self.error or self.note)

    def _status(self) -> None:
        t = Text(" ")
        t.append(f"{self.row['home_id']}", style="bold")
        t.append(f"  {self.row.get('place') or ''}  read-only")
        t.append("  planning…" if self.result is None and not self.error else "")
        t.append("  │ esc: back to the portfolio")
        self.query_one("#status", Static).update(t)

    def view(self, vid: str) -> View | None:
        found = self.query(f"#view-{vid}")
        return found.first(View) if found else None

    @property
    def active(self) -> str:
        return self.query_one("#views", TabbedContent).active or "next"

    def refresh_views(self) -> None:
        self._stale = {vid for vid, _, _ in VIEWS}
        self._refresh(self.active)

    def _refresh(self, vid: str) -> None:
        view = self.view(vid)
        if view is None or vid not in self._stale:
            return
        self._stale.discard(vid)
        view.show(self.view_data())

    @on(TabbedContent.TabActivated)
    async def _tab(self, event: TabbedContent.TabActivated) -> None:
        vid = event.pane.id or "next"
        view = self.view(vid)
        if view is None:
            cls = next(c for v, _, c in VIEWS if v == vid)
            view = cls(id=f"view-{vid}")
            await event.pane.mount(view)
        if self.active != vid:
            return
        self._refresh(vid)
        view.focus_main()

    def action_show(self, vid: str) -> None:
        self.set_focus(None)
        self.query_one("#views", TabbedContent).active = vid

    def action_where_from(self) -> None:
        view = self.view(self.active)
        if view is not None:
            self.app.push_screen(TextScreen("Where these numbers come from", view.where_from(self.view_data())))


class PortfolioApp(App[int]):
    """The results of a portfolio run, read-only."""

    CSS_PATH = Path(__file__).with_name("app.tcss")
    DEFAULT_CSS = """
    #years-table, #homes-table, #programs-table { height: 1fr; max-height: 100%; }
    """
    TITLE = "homeplan portfolio"
    BINDINGS = portfolio_bindings()
    ENABLE_COMMAND_PALETTE = False

    def __init__(self, path: str | os.PathLike, planner: Any = None, light: bool | None = None) -> None:
        super().__init__()
        self.path = Path(path)
        self.planner = planner or EnginePlanner()
        self.summary: Rollup | None = None
        self.homes: list[tuple] = []
        self.animation_level = "none"
        for theme in THEMES:
            self.register_theme(theme)
        if light is None:
            light = os.environ.get("HOMEPLAN_THEME", "").lower() == "light"
        self.theme = "homeplan-light" if light else "homeplan-dark"

    def compose(self) -> ComposeResult:
        yield Static("", id="status")
        with TabbedContent(initial="years", id="portfolio"):
            with TabPane("Years", id="years"):
                yield Static("", classes="legend", id="years-note")
                yield DataTable(id="years-table", cursor_type="row", zebra_stripes=True)
            with TabPane("Homes", id="homes"):
                yield DataTable(id="homes-table", cursor_type="row", zebra_stripes=True)
            with TabPane("Programs", id="programs"):
                yield DataTable(id="programs-table", cursor_type="row", zebra_stripes=True)
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.load()

    # ------------------------------------------------------------------ data

    def load(self) -> None:
        """Read the store (read-only) and fill the tables."""
        with Store.open(self.path, readonly=True) as store:
            meta = store.meta()
            c = meta.get("coincidence")
            co = Coincidence(c[0], c[1], "as the run used") if c else default_coincidence()
            self.summary = rollup(store, co, meta.get("program_budgets") or {})
            self.homes = list(store.homes(("seq", "home_id", "status", "place", "npv_usd", "spend_usd",
                                           "incentives_usd", "steps_count", "fully_electric_year",
                                           "message")))
        self._fill()

    def _fill(self) -> None:
        r = self.summary
        assert r is not None
        c = r.counts
        status = Text(" ")
        status.append(Path(str(r.meta.get("input", self.path))).name, style="bold")
        status.append(f"  {c['done']} of {c['total']} homes: {c['ok']} planned, {c['infeasible']} no "
                      f"roadmap fits, {c['error']} bad input, {c['failed']} planner error  │ read-only")
        self.query_one("#status", Static).update(status)
        years = self.query_one("#years-table", DataTable)
        years.clear(columns=True)
        years.add_columns("year", "homes", "spent", "incentives", "fossil $ avoided", "CO2e avoided",
                          "+winter kW", "+summer kW", "service upgrades", "near/over limit")
        for y in r.years:
            years.add_row(str(y["year"]), f"{y['homes']:,}", usd(y["spend_usd"]), usd(y["incentives_usd"]),
                          usd(y["fossil_avoided_usd"]), f"{y['emissions_avoided_t']:,.0f} t",
                          f"{y['added_winter_kw_diversified']:,.0f}", f"{y['added_summer_kw_diversified']:,.0f}",
                          f"{y['service_upgrades']:,}", f"{y['homes_near_limit']} / {y['homes_over_limit']}")
        self.query_one("#years-note", Static).update(Text(
            f"Sums over the planned homes. Added peaks diversified: {r.method}; c_inf "
            f"{r.coincidence.winter:g} winter, {r.coincidence.summer:g} summer. Planning estimates."))
        homes = self.query_one("#homes-table", DataTable)
        homes.clear(columns=True)
        homes.add_columns("home", "status", "place", "NPV", "spent", "incentives", "steps",
                          "all-electric", "message")
        for seq, hid, st, place, npv, spend, inc, steps, electric, msg in self.homes:
            homes.add_row(hid, STATUS_WORDS.get(st, st), place or "", usd(npv) if npv is not None else "",
                          usd(spend or 0), usd(inc or 0), str(steps or ""), str(electric or ""),
                          (msg or "")[:80], key=str(seq))
        programs = self.query_one("#programs-table", DataTable)
        programs.clear(columns=True)
        programs.add_columns("program", "paid", "homes", "at lifetime cap", "budget", "used up in")
        for t in r.program_totals:
            programs.add_row(t.name, usd(t.amount_usd), f"{t.homes:,}", f"{t.homes_at_cap:,}",
                             usd(t.budget_usd) if t.budget_usd is not None else "-",
                             str(t.exhausted_year or "-"))

    # ------------------------------------------------------------------ actions

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:  # noqa: ARG002
        """The keys that would edit a plan do nothing here (and are not shown); in a home, the
        portfolio's own keys give way to the home's."""
        if action in EDITING:
            return False
        return not (action in PORTFOLIO_ONLY and self._home() is not None)

    def _home(self) -> HomeScreen | None:
        return self.screen if isinstance(self.screen, HomeScreen) else None

    def action_tab(self, tab: str) -> None:
        if self._home() is None:
            self.query_one("#portfolio", TabbedContent).active = tab
            self.query_one(f"#{tab}-table", DataTable).focus()

    def action_open_home(self) -> None:
        if self._home() is not None:
            return
        tabs = self.query_one("#portfolio", TabbedContent)
        if tabs.active != "homes":
            tabs.active = "homes"
            return
        table = self.query_one("#homes-table", DataTable)
        if not table.row_count:
            return
        key = table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value
        with Store.open(self.path, readonly=True) as store:
            row = store.home(int(key))
        if row is None or not row.get("plan_json"):
            self.notify(f"{row['home_id'] if row else 'This home'} was not planned: "
                        f"{(row or {}).get('message') or 'no plan was stored'}", timeout=8)
            return
        self.push_screen(HomeScreen(row, self.planner))

    @on(DataTable.RowSelected, "#homes-table")
    def _selected(self) -> None:
        self.action_open_home()

    def action_back(self) -> None:
        if self._home() is not None:
            self.pop_screen()

    def action_reload(self) -> None:
        if self._home() is None:
            self.load()
            self.notify("Results read again.", timeout=3)

    def action_step_details(self) -> None:
        home = self._home()
        rv = home.view("roadmap") if home is not None else None
        row = rv.current_row() if isinstance(rv, RoadmapView) and hasattr(rv, "rows") else None
        if home is not None and row is not None:
            self.push_screen(TextScreen(row.label, row_details(home.view_data(), row)))

    def action_toggle_all_steps(self) -> None:
        home = self._home()
        rv = home.view("roadmap") if home is not None else None
        if isinstance(rv, RoadmapView):
            rv.toggle_all()

    def action_toggle_theme(self) -> None:
        self.theme = "homeplan-light" if self.theme == "homeplan-dark" else "homeplan-dark"

    def action_help(self) -> None:
        from rich.table import Table

        table = Table(box=None, show_header=False, padding=(0, 1, 0, 0), expand=True)
        table.add_column(style="bold", no_wrap=True)
        table.add_column(ratio=1)
        for key, what in portfolio_help_rows():
            table.add_row(key, what)
        self.push_screen(TextScreen("Keys", table))
