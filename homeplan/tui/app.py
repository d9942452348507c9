"""The homeplan terminal application: see the plan, change anything, watch it re-plan.

A thin view over the engine: the session (``session.py``) holds the plan file and its edits,
the planner runs in a thread worker, and each view draws the latest ``PlanResult``. While a
re-plan runs the previous result stays on screen; when it lands, steps that moved are marked
with the year they came from.
"""

from __future__ import annotations

import os
import time
from collections.abc import Callable
from functools import partial
from pathlib import Path
from typing import TYPE_CHECKING, Any, get_args

from rich.text import Text
from textual import events, on, work
from textual.app import App, ComposeResult
from textual.command import DiscoveryHit, Hit, Hits, Provider
from textual.theme import Theme
from textual.widgets import Footer, Static, TabbedContent, TabPane
from textual.worker import Worker, WorkerState

from homeplan import catalog
from homeplan.errors import InputError, PlanRuleError
from homeplan.plan.alternatives import BASE_NAME, option
from homeplan.plan.files import OutsideFolderError, PlanFolder
from homeplan.plan.load import LoadedPlan
from homeplan.plan.model import Fuel, Plan, VehicleFuel
from homeplan.plan.objectives import OBJECTIVES as OBJECTIVE_INFO
from homeplan.plan.objectives import objective_words
from homeplan.plan.save import ChangedOnDiskError, ReadOnlyFileError, write_atomic
from homeplan.plan.text import clean
from homeplan.report.changes import change_list
from homeplan.tui import newplan
from homeplan.tui.actions import VIEW_TABS, bindings, help_rows, palette_entries
from homeplan.tui.format import trunc_words, usd
from homeplan.tui.screens.forms import ChoiceScreen, FieldSpec, FormScreen, TextScreen
from homeplan.tui.session import DELETE, PlanSession, check_new_plan
from homeplan.tui.widgets.base import View, ViewData
from homeplan.tui.widgets.energy import EnergyView
from homeplan.tui.widgets.home import HomeView
from homeplan.tui.widgets.incentives import IncentivesView
from homeplan.tui.widgets.money import MoneyView
from homeplan.tui.widgets.overview import OverviewView
from homeplan.tui.widgets.power import PowerView
from homeplan.tui.widgets.roadmap import RoadmapView, row_details

if TYPE_CHECKING:
    from homeplan.result import PlanResult
    from homeplan.result.roadmap import Roadmap

__all__ = [
    "VIEWS",
    "EnginePlanner",
    "HomeplanApp",
    "PlanCommands",
    "PlannerUnavailable",
    "glossary_text",
    "help_text",
    "moved_steps",
    "new_plan_fields",
    "problem_words",
    "saved_words",
    "status_line",
]

Planner = Callable[[Plan, PlanFolder], "PlanResult"]

_VIEW_CLASSES: dict[str, type[View]] = {
    "next": OverviewView, "home": HomeView, "roadmap": RoadmapView, "money": MoneyView,
    "power": PowerView, "energy": EnergyView, "incentives": IncentivesView,
}
VIEWS: tuple[tuple[str, str, type[View]], ...] = tuple(
    (vid, label, _VIEW_CLASSES[vid]) for vid, label in VIEW_TABS)
"""The views in tab order: id, label (from the key table) and widget class."""

OBJECTIVES = tuple((o.label, key) for key, o in OBJECTIVE_INFO.items())
"""(label, key) of each objective, for the settings form."""
APPLIANCE_KINDS = ("furnace", "boiler", "central_ac", "room_ac", "heat_pump", "mini_split",
                   "baseboard", "water_heater", "range", "cooktop", "wall_oven", "dryer")
FUELS: tuple[str, ...] = get_args(Fuel)
VEHICLE_FUELS: tuple[str, ...] = get_args(VehicleFuel)
CONDITIONS = ("good", "fair", "poor", "failing", "failed")
BUDGET_STEP_USD = 1000

THEMES = (
    Theme(name="homeplan-dark", primary="#6CB4A8", secondary="#8FA3BF", accent="#E0A458",
          warning="#E0A458", error="#E57373", success="#8BBF6A", foreground="#E6E2D8",
          background="#15181C", surface="#1D2126", panel="#272C33", dark=True),
    Theme(name="homeplan-light", primary="#2F7D72", secondary="#4F6480", accent="#A8611E",
          warning="#A8611E", error="#B3261E", success="#3E7D2A", foreground="#23262A",
          background="#FAF8F3", surface="#F0ECE3", panel="#E4DED1", dark=False),
)


class PlannerUnavailable(RuntimeError):
    pass


class EnginePlanner:
    """The real planner, imported on first use (in the worker thread, after the first paint).

    One per open plan: its ``PlannerCache`` keeps weather and per-home results between re-plans
    (and, with ``use_store``, the built-in weather year in the user's cache folder between runs).
    """

    def __init__(self, use_store: bool = True) -> None:
        self._run: Callable[..., PlanResult] | None = None
        self._cache: Any = None
        self._use_store = use_store

    def __call__(self, plan: Plan, base_dir: PlanFolder) -> PlanResult:
        if self._run is None:
            try:
                # the planner loads numpy, scipy, pvlib and networkx: after the first paint
                from homeplan.planner.chain import plan_roadmap
                from homeplan.planner.context import PlannerCache
                from homeplan.planner.diskstore import default_store
            except ImportError as exc:
                raise PlannerUnavailable(f"homeplan.planner could not be imported ({exc})") from None
            store = default_store() if self._use_store else None
            self._run, self._cache = plan_roadmap, PlannerCache(store=store)
        return self._run(plan, base_dir=base_dir, cache=self._cache)


def moved_steps(old: Roadmap | None, new: Roadmap) -> dict[str, int | None]:
    """Project id -> year it had before (None: it was not in the plan) for steps that changed."""
    if old is None or old.status != "ok":
        return {}
    before = {s.project_id: s.year for s in old.steps}
    after = {s.project_id: s.year for s in new.steps}
    out: dict[str, int | None] = {pid: before.get(pid) for pid, y in after.items()
                                  if before.get(pid) != y}
    out.update({pid: y for pid, y in before.items() if pid not in after})
    return out


def status_line(name: str, state: tuple[str, str], dirty: bool, budgets: tuple[str, ...],
                file_name: str, width: int) -> Text:
    """The top line: the home, the planner's state, unsaved changes, the budget and the file.

    What does not fit goes in this order: the budget's details, the budget, then the home's name
    is shortened after a whole word; the file name and the state always show.
    """
    def line(name_text: str, budget: str) -> Text:
        text = Text(" ")
        text.append(name_text, style="bold")
        if state[0]:
            text.append("  ")
            text.append(state[0], style=state[1])
        if dirty:
            text.append("  ● unsaved", style="bold")
        if budget:
            text.append(f"  │ {budget}")
        text.append(f"  │ {file_name}")
        return text

    for budget in budgets:
        text = line(name, budget)
        if text.cell_len <= width:
            return text
    room = width - line("", "").cell_len
    return line(trunc_words(name, max(room, 8)), "")


def saved_words(target: Path, backup: Path | None, rebased: list) -> str:
    """What a save did, in words: the file, the backup only when one was written, the paths
    rewritten for a new folder."""
    text = f"Saved {target}"
    text += f" (the previous version kept as {backup.name})." if backup is not None else "."
    if rebased:
        text += " File paths rewritten for the new folder: " + "; ".join(
            f"{r.before} -> {r.after}" for r in rebased) + "."
        if any(r.after.startswith("../") for r in rebased):
            text += (" Those files are outside the plan's new folder: copy them next to it, or "
                     "allow them when you open the plan again (--allow-outside).")
    return clean(text, one_line=False)


def problem_words(err: InputError) -> str:
    """InputError problems without file positions (for edits made in the app)."""
    parts = []
    for p in err.problems:
        parts.append(p.message + (f" ({p.hint})" if p.hint else ""))
    return clean("; ".join(parts))


class PlanCommands(Provider):
    """Every action of the app in the command palette."""

    def _commands(self) -> list[tuple[str, str, Callable[[], Any]]]:
        app = self.app
        assert isinstance(app, HomeplanApp)
        return [(title, description, partial(app.run_action, action))
                for title, description, action in palette_entries()]

    async def discover(self) -> Hits:
        for title, help_text, callback in self._commands():
            yield DiscoveryHit(title, callback, help=help_text)

    async def search(self, query: str) -> Hits:
        matcher = self.matcher(query)
        for title, help_text, callback in self._commands():
            score = matcher.match(title)
            if score > 0:
                yield Hit(score, matcher.highlight(title), callback, help=help_text)


class HomeplanApp(App[int]):
    """Explore, edit and re-plan one home."""

    CSS_PATH = Path(__file__).with_name("app.tcss")
    TITLE = "homeplan"
    COMMANDS = App.COMMANDS | {PlanCommands}
    ENABLE_COMMAND_PALETTE = True

    BINDINGS = bindings("app")

    def __init__(self, session: PlanSession | None = None, planner: Planner | None = None,
                 new_path: str | os.PathLike | None = None, light: bool | None = None):
        super().__init__()
        self.session = session
        self._planner_given = planner
        self.planner: Planner | None = None
        self.new_path = Path(new_path) if new_path is not None else None
        self.result: PlanResult | None = None
        self.moved: dict[str, int | None] = {}
        self.changes: tuple[str, ...] = ()   # what the last re-plan changed, in words
        self._edited = False                 # the next result answers an edit (not an open)
        self._subject: str | None = None     # the item the last edit was about
        self.planning = False
        self.plan_error: str | None = None
        self.unavailable: str | None = None
        self.generation = 0
        self.shown_generation = 0
        self.painted: tuple[int, float] = (0, 0.0)
        self._plan_busy = False   # a planner worker is busy
        self._plan_pending = False   # edits arrived while it was busy
        self._stale: set[str] = set()
        self._asked_outside: set[Path] = set()  # outside files the user was asked about
        self._opening: Any = None          # a screen being opened (keys wait for it)
        self._early_keys: list[tuple[str, str | None]] = []
        self._key_screens: dict[int, Any] = {}  # key event -> the screen it was typed for
        self.option_index = 0     # 0: the plan as planned; i: its i-th named option
        self.animation_level = "none"  # calm: nothing slides or fades
        for theme in THEMES:
            self.register_theme(theme)
        if light is None:
            light = os.environ.get("HOMEPLAN_THEME", "").lower() == "light"
        self.theme = "homeplan-light" if light else "homeplan-dark"

    # ---------------------------------------------------------------------- layout

    # A key typed while a form or question is still opening (a fast "b7000") would reach the
    # screen below and be lost: keys that come back unhandled from a screen that is no longer
    # on top, or that arrive while a new screen opens, are kept and given to the new screen's
    # focused field once it is up.

    def push_screen(self, screen, *args, **kwargs):
        if not isinstance(screen, str):
            self._opening = screen
            self.set_timer(0.02, partial(self._replay_early_keys, screen, 0))
        return super().push_screen(screen, *args, **kwargs)

    async def on_event(self, event: events.Event) -> None:
        if isinstance(event, events.Key):
            if self._opening is not None and self._screen_ready(self._opening):
                self._replay_early_keys(self._opening, 50)
            if not event.is_forwarded:
                self._key_screens[id(event)] = self.screen
                while len(self._key_screens) > 64:
                    self._key_screens.pop(next(iter(self._key_screens)))
                if self._opening is not None:
                    self._early_keys.append((event.key, event.character))
                    return
            else:
                typed_for = self._key_screens.pop(id(event), None)
                if typed_for is not None and typed_for is not self.screen:
                    self._early_keys.append((event.key, event.character))
                    if self._opening is None:
                        self._replay_early_keys(self.screen, 50)
                    return
        await super().on_event(event)

    def _screen_ready(self, screen) -> bool:
        focused = self.focused
        return self.screen is screen and focused is not None and focused.screen is screen

    def _replay_early_keys(self, screen, tries: int) -> None:
        if not self._screen_ready(screen) and tries < 50:
            self.set_timer(0.02, partial(self._replay_early_keys, screen, tries + 1))
            return
        if self._opening is screen:
            self._opening = None
        keys, self._early_keys = self._early_keys, []
        for key, character in keys:
            (self.focused or self.screen)._forward_event(events.Key(key, character))

    def compose(self) -> ComposeResult:
        yield Static("", id="status")
        with TabbedContent(initial="next", id="views"):
            for i, (vid, label, cls) in enumerate(VIEWS):
                with TabPane(f"{i + 1} {label}", id=vid):
                    if vid == "next":  # the others are built when first opened
                        yield cls(id=f"view-{vid}")
        yield Footer(compact=True, show_command_palette=False)

    def on_mount(self) -> None:
        if self.session is not None:
            self._open_session(self.session)
        else:
            self._update_status()
            self.call_after_refresh(self.action_new_plan, True)

    def _open_session(self, session: PlanSession) -> None:
        self.session = session
        self.option_index = 0
        self.planner = self._planner_given or EnginePlanner()
        self.result, self.moved, self.plan_error, self.unavailable = None, {}, None, None
        self.changes, self._edited, self._subject = (), False, None
        self._plan_pending = False
        if session.migrated_from:
            self.notify(f"This file used plan format {session.migrated_from}; saving writes the "
                        "current format.", title="Migrated")
        self.refresh_views()
        self.view("next").focus_main()
        self.start_plan()

    # ---------------------------------------------------------------------- views

    def view(self, vid: str) -> View:
        return self.query_one(f"#view-{vid}", View)

    @property
    def active_view_id(self) -> str:
        return self.query_one("#views", TabbedContent).active or "next"

    def view_data(self) -> ViewData:
        assert self.session is not None
        return ViewData(plan=self.shown_plan() or self.session.plan, result=self.result, path=self.session.path,
                        moved=self.moved, changes=self.changes, planning=self.planning,
                        error=self.plan_error,
                        unavailable=self.unavailable)

    def maybe_view(self, vid: str) -> View | None:
        """The view if it has been opened (views are built the first time they are shown)."""
        found = self.query(f"#view-{vid}")
        return found.first(View) if found else None

    def refresh_views(self, now: bool = True) -> None:
        """Mark every view out of date; redraw the open one now (the others when opened)."""
        self._update_status()
        if self.session is None:
            return
        self._stale = {vid for vid, _, _ in VIEWS}
        if now:
            self._refresh_view(self.active_view_id)

    def _refresh_view(self, vid: str) -> None:
        view = self.maybe_view(vid)
        if self.session is None or vid not in self._stale or view is None:
            return
        self._stale.discard(vid)
        view.show(self.view_data())

    @on(TabbedContent.TabActivated)
    async def _tab_activated(self, event: TabbedContent.TabActivated) -> None:
        vid = event.pane.id or "next"
        view = self.maybe_view(vid)
        if view is None:
            cls = next(c for v, _, c in VIEWS if v == vid)
            view = cls(id=f"view-{vid}")
            await event.pane.mount(view)
        if self.active_view_id != vid:
            return  # the user has already moved on (focusing would switch back to this view)
        self._refresh_view(vid)
        view.focus_main()

    def on_resize(self) -> None:
        self._update_status()
        if self.session is not None:
            self._stale = {vid for vid, _, _ in VIEWS}
            self.call_after_refresh(self._refresh_view, self.active_view_id)

    def _update_status(self) -> None:
        status = self.query_one("#status", Static)
        if self.session is None:
            status.update(Text(" homeplan - no plan open", style="bold"))
            return
        s = self.session
        plan = self.shown_plan() or s.plan
        name = clean(s.name)  # text from the plan file is shown through the sanitiser
        if s.plan.alternatives:  # which named option is on screen (o switches)
            name += clean(f" · {self.option_name()} ({self.option_index + 1}/{len(s.plan.alternatives) + 1})")
        if self.planning:
            state = ("planning…", "italic")
        elif self.unavailable:
            state = ("no planner", "bold")
        elif self.plan_error:
            state = ("plan not updated", "bold reverse")
        elif self.result is not None and self.result.roadmap.status != "ok":
            state = ("no roadmap fits", "bold reverse")
        elif self.result is not None:
            state = ("plan up to date", "")
        else:
            state = ("", "")
        aim = objective_words(plan.choices.objective).lower()
        b = plan.budget
        budgets = (f"{usd(b.usd_per_year)}/yr from {plan.first_year}, {b.horizon_years} yrs, {aim}",
                   f"{usd(b.usd_per_year)}/yr, {aim}", f"{usd(b.usd_per_year)}/yr", "")
        status.update(status_line(name, state, s.dirty, budgets, clean(s.path.name), self.size.width))

    # ---------------------------------------------------------------------- planning

    def start_plan(self) -> None:
        """Re-plan the current plan. One planner runs at a time: edits made meanwhile are
        planned together as soon as it finishes (typing fast never piles up threads)."""
        if self.session is None or self.planner is None:
            return
        self.generation += 1
        self.planning = True
        self._update_status()
        if self._plan_busy:
            self._plan_pending = True
            return
        plan, problem = self._option()
        if plan is None:
            self.planning, self.plan_error = False, problem
            self.refresh_views()
            return
        self._plan_busy = True
        self.run_planner(self.planner, plan, self.session.folder, self.generation)

    def shown_plan(self) -> Plan | None:
        """The plan on screen: the plan itself, or its named option with the option's changes
        merged over the plan as edited (None if the option is not valid: see ``option_problem``)."""
        return self._option()[0]

    def option_problem(self) -> str | None:
        """Why the option on screen is not valid, in words (None: it is)."""
        return self._option()[1]

    def _option(self) -> tuple[Plan | None, str | None]:
        if self.session is None:
            return None, None
        self.option_index = min(self.option_index, len(self.session.plan.alternatives))
        if self.option_index == 0:
            return self.session.plan, None
        loaded = LoadedPlan(self.session.plan, self.session.document, self.session.path,
                            allow=tuple(self.session.folder.allowed))
        try:
            return option(loaded, self.option_index - 1).plan, None
        except InputError as err:
            return None, "This option is not valid: " + problem_words(err)

    def option_name(self) -> str:
        """The name of the option on screen."""
        if self.session is None or self.option_index == 0:
            return BASE_NAME
        return self.session.plan.alternatives[self.option_index - 1].name

    def action_next_option(self) -> None:
        """Show the plan's next named option (the plan itself after the last)."""
        if self.session is None:
            return
        n = len(self.session.plan.alternatives)
        if not n:
            self.notify("This plan has no named options: add alternatives: to the file "
                        "(see docs/plan-format.md).", title="Options")
            return
        self.option_index = (self.option_index + 1) % (n + 1)
        self.plan_error = None
        self.notify(f"Showing {self.option_name()} ({self.option_index + 1} of {n + 1}). Edits change "
                    "the plan itself; an option's changes apply on top of it.", title="Options")
        self.start_plan()

    def _planner_done(self) -> None:
        self._plan_busy = False
        if self._plan_pending and self.session is not None and self.planner is not None:
            self._plan_pending = False
            plan, problem = self._option()
            if plan is None:
                self.planning, self.plan_error = False, problem
                self.refresh_views()
                return
            self._plan_busy = True
            self.run_planner(self.planner, plan, self.session.folder, self.generation)

    @work(thread=True, exclusive=True, group="plan", exit_on_error=False)
    def run_planner(self, planner: Planner, plan: Plan, base_dir: PlanFolder,
                    generation: int) -> tuple[int, PlanResult]:
        return generation, planner(plan, base_dir)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        worker = event.worker
        if worker.group != "plan":
            return
        if event.state in (WorkerState.SUCCESS, WorkerState.ERROR, WorkerState.CANCELLED):
            self._planner_done()
        if event.state == WorkerState.SUCCESS:
            generation, result = worker.result
            if generation != self.generation:
                return  # an older edit's result: a newer plan is on its way
            old = self.result.roadmap if self.result is not None else None
            self.moved = moved_steps(old, result.roadmap) if result.roadmap.status == "ok" else {}
            self.changes = change_list(self.result, result, self._subject) if self._edited else ()
            self._edited, self._subject = False, None
            if self.changes:
                self.notify("\n".join(self.changes[:4]) + (
                    f"\n(and {len(self.changes) - 4} more on the Next view)"
                    if len(self.changes) > 4 else ""), title="What the change did", timeout=10)
            self.result = result
            self.planning = False
            self.plan_error = None
            self.shown_generation = generation
            self.refresh_views()
            self.call_after_refresh(self._painted, generation)
        elif event.state == WorkerState.ERROR:
            err = worker.error
            if self._plan_busy:
                return  # a newer plan is already on its way
            self.planning = False
            if isinstance(err, PlannerUnavailable):
                self.unavailable = str(err)
            elif isinstance(err, InputError):
                self.plan_error = "The plan was not updated: " + problem_words(err)
            elif isinstance(err, OutsideFolderError):
                self.plan_error = clean(f"The plan was not updated: {err.message}.")
                self._ask_outside(err)
            elif isinstance(err, PlanRuleError):
                self.plan_error = clean(f"The plan was not updated: {err.message}" + (
                    f" ({err.hint})" if err.hint else "") + ". Undo with ctrl+z.")
            else:
                self.plan_error = clean(f"The planner stopped ({type(err).__name__}: {err}). "
                                        "The last good plan is shown; undo with ctrl+z.")
            self.shown_generation = self.generation
            self.refresh_views()
        elif event.state == WorkerState.CANCELLED:
            pass

    def _ask_outside(self, err: OutsideFolderError) -> None:
        """The plan names a file outside its folder: read it only if the user says so."""
        if self.session is None or err.real in self._asked_outside:
            return
        self._asked_outside.add(err.real)

        def answer(choice: str | None) -> None:
            if choice == "r" and self.session is not None:
                self.session.allow_outside(err.real)
                self.start_plan()

        self.push_screen(ChoiceScreen(
            "A file outside the plan's folder",
            clean(f"The plan names {err.real}, which is outside its folder "
                  f"({self.session.base_dir.resolve()}). A plan from someone else should not read "
                  "other files on this computer. Read this file for this session?"),
            [("r", "Read it"), ("escape", "Do not read it")]), answer)

    def notify(self, message: str, *, title: str = "", severity: str = "information",
               timeout: float | None = None, markup: bool = False) -> None:
        """Every notice is sanitised (it may quote a file) and never read as markup."""
        super().notify(clean(message, one_line=False), title=clean(title), severity=severity,
                       timeout=timeout, markup=markup)

    def _painted(self, generation: int) -> None:
        """Called once the screen showing a new result has been drawn (for the benchmark)."""
        self.painted = (generation, time.perf_counter())

    # ---------------------------------------------------------------------- edits

    def try_edit(self, changes: list[tuple[tuple, Any]], what: str,
                 subject: str | None = None) -> str | None:
        """Apply an edit; on success re-plan and return None, else return the problem.
        ``subject``: the key of the item the edit is about (named when nothing moves)."""
        if self.session is None:
            return "No plan is open."
        try:
            self.session.edit(changes, what)
        except InputError as err:
            return problem_words(err)
        self._after_change(subject)
        return None

    def _after_change(self, subject: str | None = None) -> None:
        """Start re-planning at once; redraw now only what shows the plan itself (Home).

        The result that comes back is compared with the one on screen (what moved, and why).
        """
        self.plan_error = None
        self._edited, self._subject = True, subject
        self.start_plan()
        self.refresh_views(now=self.active_view_id == "home")

    def edit(self, changes: list[tuple[tuple, Any]], what: str, subject: str | None = None) -> bool:
        problem = self.try_edit(changes, what, subject)
        if problem:
            self.notify(problem, title="Not changed", severity="error", timeout=8)
            return False
        return True

    def _form(self, title: str, fields: list[FieldSpec], what: str,
              to_changes: Callable[[dict], list[tuple[tuple, Any]]] | None = None,
              note: str = "", subject: str | None = None) -> None:
        """A form whose values are document paths; applied (and checked) on Enter."""

        def check(values: dict) -> str | None:
            changes = to_changes(values) if to_changes else [
                (loc, DELETE if v is None else v) for loc, v in values.items()]
            problem = self.try_edit(changes, what, subject)
            if problem:  # name the fields as the form does, not as the file does
                for spec in fields:
                    if isinstance(spec.key, tuple) and isinstance(spec.key[-1], str):
                        problem = problem.replace(f"{spec.key[-1]} is ", f"'{spec.label}' is ")
            return problem

        self.push_screen(FormScreen(title, fields, check, note=note))

    # budget and settings ------------------------------------------------

    def action_edit_budget(self) -> None:
        if self.session is None:
            return
        self._form("Yearly budget", [
            FieldSpec(("budget", "usd_per_year"), "Budget per year", "float",
                      self.session.plan.budget.usd_per_year, unit="USD",
                      help="What the household can spend on projects each year."),
        ], "change the budget")

    def action_budget_step(self, sign: int) -> None:
        if self.session is None:
            return
        value = max(0.0, self.session.plan.budget.usd_per_year + sign * BUDGET_STEP_USD)
        value = int(value) if value == int(value) else value
        self.edit([(("budget", "usd_per_year"), value)], f"budget {usd(value)}")

    def action_settings(self) -> None:
        if self.session is None:
            return
        plan = self.session.plan
        b, c = plan.budget, plan.choices
        self._form("Plan settings", [
            FieldSpec(("budget", "usd_per_year"), "Budget per year", "float", b.usd_per_year,
                      unit="USD"),
            FieldSpec(("budget", "first_year"), "First year", "int", b.first_year, optional=True,
                      help="Blank: next calendar year."),
            FieldSpec(("budget", "horizon_years"), "Years to plan", "int", b.horizon_years),
            FieldSpec(("choices", "objective"), "Aim for", "choice", c.objective,
                      choices=OBJECTIVES),
            FieldSpec(("budget", "carryover"), "Unspent money carries over", "bool", b.carryover),
            FieldSpec(("choices", "replace_at_risk_pct"), "Replace at failure risk", "float",
                      c.replace_at_risk_pct, unit="%"),
            FieldSpec(("choices", "all_electric_by"), "Fully electric by", "int",
                      c.all_electric_by, optional=True, help="Blank: no deadline."),
        ], "change plan settings")

    def action_prices(self) -> None:
        if self.session is None:
            return
        p = self.session.plan.prices
        hh = self.session.plan.household
        el = ("prices", "electricity")
        self._form("Prices and household", [
            FieldSpec((*el, "usd_per_kwh"), "Electricity", "float", p.electricity.usd_per_kwh,
                      unit="$/kWh"),
            FieldSpec((*el, "fixed_usd_per_month"), "Electric fixed charge", "float",
                      p.electricity.fixed_usd_per_month, unit="$/month"),
            FieldSpec((*el, "export"), "Solar export", "choice", p.electricity.export,
                      choices=(("Net metering", "net_metering"), ("Net billing", "net_billing"),
                               ("No export credit", "none"))),
            FieldSpec(("prices", "gas", "usd_per_therm"), "Natural gas", "float",
                      p.gas.usd_per_therm, unit="$/therm"),
            FieldSpec(("prices", "gas", "fixed_usd_per_month"), "Gas fixed charge", "float",
                      p.gas.fixed_usd_per_month, unit="$/month"),
            FieldSpec(("prices", "propane", "usd_per_gal"), "Propane", "float",
                      p.propane.usd_per_gal, unit="$/gal"),
            FieldSpec(("prices", "oil", "usd_per_gal"), "Heating oil", "float", p.oil.usd_per_gal,
                      unit="$/gal"),
            FieldSpec(("prices", "gasoline", "usd_per_gal"), "Gasoline", "float",
                      p.gasoline.usd_per_gal, unit="$/gal"),
            FieldSpec(("prices", "inflation_pct"), "Inflation", "float", p.inflation_pct,
                      unit="%/yr"),
            FieldSpec(("prices", "fossil_extra_escalation_pct"), "Fuel prices rise extra",
                      "float", p.fossil_extra_escalation_pct, unit="%/yr"),
            FieldSpec(("household", "ami_pct"), "Income, % of area median", "float", hh.ami_pct,
                      optional=True, help="Some incentives depend on it (AMI)."),
            FieldSpec(("household", "federal_tax_liability_usd"), "Federal tax per year", "float",
                      hh.federal_tax_liability_usd, optional=True, unit="USD",
                      help="Caps how much of a tax credit you can use."),
        ], "change prices")

    def action_edit_incentives(self) -> None:
        if self.session is None:
            return
        plan = self.session.plan
        hh = plan.household
        folder = self.session.base_dir
        found = sorted(str(p.relative_to(folder)) for p in folder.glob("**/*.yaml")
                       if p.resolve() != self.session.path.resolve() and not p.name.endswith(".bak")
                       and len(p.relative_to(folder).parts) <= 3)[:8]

        def to_changes(values: dict) -> list:
            files = [f.strip() for f in (values.pop("files") or "").split(",") if f.strip()]
            changes = [(loc, DELETE if v is None else v) for loc, v in values.items()]
            changes.append((("incentive_files",), _flow_list(files) if files else DELETE))
            return changes

        def check(values: dict) -> str | None:
            files = [f.strip() for f in (values.get("files") or "").split(",") if f.strip()]
            missing = [f for f in files if f not in plan.incentive_files  # new ones must exist
                       and not (Path(f) if Path(f).is_absolute() else folder / f).is_file()]
            if missing:
                return (f"no such file: {', '.join(missing)} (paths are relative to the plan's "
                        f"folder, {folder})")
            return self.try_edit(to_changes(dict(values)), "change household and programs")

        help_files = ("Incentive program files, relative to the plan's folder, separated by "
                      "commas. Blank: none.")
        if found:
            help_files += " Files there: " + ", ".join(found) + "."
        self.push_screen(FormScreen("Household and incentive programs", [
            FieldSpec(("household", "ami_pct"), "Income, % of area median", "float", hh.ami_pct,
                      optional=True, help="Many programs pay more below 80 % or 150 % of the "
                      "area's median income (AMI)."),
            FieldSpec(("household", "federal_tax_liability_usd"), "Federal tax per year", "float",
                      hh.federal_tax_liability_usd, optional=True, unit="USD",
                      help="A tax credit cannot exceed the tax you owe."),
            FieldSpec(("household", "state_tax_liability_usd"), "State tax per year", "float",
                      hh.state_tax_liability_usd, optional=True, unit="USD"),
            FieldSpec("files", "Program files", "text", ", ".join(plan.incentive_files),
                      optional=True, help=help_files),
        ], check, note=f"{len(plan.incentives)} program(s) are written in the plan file itself; "
            "edit those in the file."))

    # roadmap steps --------------------------------------------------------

    def _roadmap_row(self):
        if self.session is None:
            return None
        rv = self.maybe_view("roadmap")
        row = rv.current_row() if isinstance(rv, RoadmapView) and hasattr(rv, "rows") else None
        if row is None:
            self.notify("Choose a project on the Roadmap view first (key 3).", timeout=4)
        return row

    def _pin_changes(self, pid: str, year: int | None) -> list[tuple[tuple, Any]]:
        excl = [x for x in self.session.plan.choices.exclude if x != pid]
        changes: list[tuple[tuple, Any]] = [(("choices", "exclude"), excl)]
        changes.append((("choices", "pins", pid), DELETE if year is None else year))
        return changes

    def action_pin(self) -> None:
        row = self._roadmap_row()
        if row is None:
            return
        rv = self.maybe_view("roadmap")
        assert isinstance(rv, RoadmapView)
        year = rv.current_year() if self.active_view_id == "roadmap" else None
        if year is not None:
            self.edit(self._pin_changes(row.id, year), f"pin {row.label} to {year}")
            return
        default = row.pinned or (row.step.year if row.step else self.session.plan.first_year)
        self._form(f"Pin {row.label} to a year", [
            FieldSpec("year", "Year", "int", default),
        ], f"pin {row.label}", lambda v: self._pin_changes(row.id, v["year"]),
            note="The planner will keep this project in that year.")

    def action_exclude(self) -> None:
        row = self._roadmap_row()
        if row is None:
            return
        excl = [x for x in self.session.plan.choices.exclude if x != row.id] + [row.id]
        self.edit([(("choices", "exclude"), excl), (("choices", "pins", row.id), DELETE)],
                  f"leave out {row.label}")

    def action_release(self) -> None:
        row = self._roadmap_row()
        if row is None:
            return
        if row.pinned is None and not row.excluded:
            self.notify(f"{row.label} is neither pinned nor left out.", timeout=4)
            return
        self.edit(self._pin_changes(row.id, None), f"release {row.label}")

    def action_toggle_all_steps(self) -> None:
        rv = self.maybe_view("roadmap")
        if isinstance(rv, RoadmapView):
            rv.toggle_all()

    def action_step_details(self) -> None:
        row = self._roadmap_row()
        if row is None or self.session is None:
            return
        self.push_screen(TextScreen(row.label, row_details(self.view_data(), row)))

    # home items -----------------------------------------------------------

    def _home_item(self):
        if self.session is None:
            return None
        hv = self.maybe_view("home")
        item = hv.current_item() if isinstance(hv, HomeView) and hasattr(hv, "items") else None
        if item is None:
            self.notify("Choose an item on the Home view first (key 2).", timeout=4)
        return item

    def action_edit_item(self) -> None:
        item = self._home_item()
        if item is None:
            return
        plan = self.session.plan
        if item.group == "appliance":
            a = plan.appliances[item.index]
            base = ("appliances", item.index)
            fields = [
                FieldSpec((*base, "year_installed"), "Year installed", "int", a.year_installed,
                          optional=True, help="Blank: unknown (assumed half-way through a "
                          "typical life)."),
                FieldSpec((*base, "fuel"), "Fuel", "choice", a.fuel or "",
                          choices=(("(usual for the kind)", ""), *((f, f) for f in FUELS))),
                FieldSpec((*base, "condition"), "Condition", "choice", a.condition,
                          choices=tuple((c, c) for c in CONDITIONS)),
            ]
            if a.kind in ("furnace", "boiler"):
                fields.append(FieldSpec((*base, "afue"), "Efficiency (AFUE)", "float", a.afue,
                                        optional=True, help="The share of the fuel that heats the "
                                        "home, on the label: 0.80 for 80 %."))
            ratings = []
            if a.kind in ("central_ac", "room_ac", "heat_pump", "mini_split"):
                ratings += [("seer", "SEER", "Cooling efficiency"), ("eer", "EER", "Cooling efficiency on a hot day")]
            if a.kind in ("heat_pump", "mini_split"):
                ratings.insert(1, ("hspf", "HSPF", "Heating efficiency"))
            for old, label, words in ratings:
                # the rating on the label: a pre-2023 one stays in its own field (converted by
                # the planner) rather than being offered as a second, conflicting figure
                if getattr(a, old) is not None and getattr(a, f"{old}2") is None:
                    fields.append(FieldSpec((*base, old), f"{words} ({label}, pre-2023)", "float",
                                            getattr(a, old), optional=True,
                                            help=f"On the yellow label; converted to {label}2 by the planner."))
                else:
                    fields.append(FieldSpec((*base, f"{old}2"), f"{words} ({label}2)", "float",
                                            getattr(a, f"{old}2"), optional=True,
                                            help="On the yellow label; higher is better."))
            if a.kind in ("furnace", "boiler", "central_ac", "heat_pump", "mini_split"):
                fields.append(FieldSpec((*base, "capacity_btuh"), "Output", "float", a.capacity_btuh,
                                        optional=True, unit="Btu/h", help="On the nameplate; "
                                        "12,000 Btu/h is 3.5 kW (a \"ton\")."))
            if a.kind == "water_heater":
                fields.append(FieldSpec((*base, "uef"), "Efficiency (UEF)", "float", a.uef,
                                        optional=True, help="On the yellow label, e.g. 0.62."))
                fields.append(FieldSpec((*base, "tank_gal"), "Tank", "float", a.tank_gal,
                                        optional=True, unit="gal"))
            fields.append(FieldSpec((*base, "problems"), "Known problems", "text", a.problems,
                                    optional=True))

            def to_changes(values: dict) -> list:
                return [(loc, DELETE if v in (None, "") else v) for loc, v in values.items()]

            self._form(f"Edit: {item.label.lower()}", fields, f"edit {item.label.lower()}",
                       to_changes, subject=item.key)
        elif item.group == "vehicle":
            v = plan.vehicles[item.index]
            base = ("vehicles", item.index)
            self._form(f"Edit: {item.label}", [
                FieldSpec((*base, "name"), "Name", "text", v.name, optional=True),
                FieldSpec((*base, "fuel"), "Fuel", "choice", v.fuel, choices=tuple(
                    (f.replace("_", " "), f) for f in VEHICLE_FUELS)),
                FieldSpec((*base, "mpg"), "Miles per gallon", "float", v.mpg, optional=True),
                FieldSpec((*base, "miles_per_year"), "Miles per year", "float", v.miles_per_year),
                FieldSpec((*base, "model_year"), "Model year", "int", v.model_year, optional=True),
                FieldSpec((*base, "replace_year"), "You plan to replace it in", "int",
                          v.replace_year, optional=True),
            ], f"edit {item.label}", subject=item.key)
        else:
            self._form("The roof" if plan.home.roof else "Describe the roof", roof_fields(plan),
                       "edit the roof", note="Panels need a sound roof facing roughly south, "
                       "east or west. Roof work means ladders and heights: leave it to insured "
                       "professionals.", subject="roof")

    def action_add_item(self) -> None:
        if self.session is None:
            return
        plan = self.session.plan
        kinds = tuple((k.replace("_", " "), k) for k in APPLIANCE_KINDS) + (("car or truck", "vehicle"),)

        def to_changes(values: dict) -> list:
            what, key, year = values["what"], values["id"], values["year"]
            if what == "vehicle":
                item: dict[str, Any] = {"fuel": values["vfuel"], "miles_per_year": 11000}
                if key:
                    item["id"] = key
                if year:
                    item["model_year"] = year
                return [(("vehicles", len(plan.vehicles)), _mapping(item))]
            item = {"kind": what}
            if key:
                item["id"] = key
            if values["fuel"]:
                item["fuel"] = values["fuel"]
            if year:
                item["year_installed"] = year
            return [(("appliances", len(plan.appliances)), _mapping(item))]

        def check(values: dict) -> str | None:
            changes = _append_changes(self.session, to_changes(values))
            return self.try_edit(changes, f"add {values['what'].replace('_', ' ')}")

        self.push_screen(FormScreen("Add to the home", [
            FieldSpec("what", "What", "choice", "water_heater", choices=kinds),
            FieldSpec("id", "Short name", "text", None, optional=True,
                      help="Lower case, e.g. basement_heater; needed when the kind is already there."),
            FieldSpec("fuel", "Fuel (appliance)", "choice", "",
                      choices=(("(default for the kind)", ""), *((f, f) for f in FUELS))),
            FieldSpec("vfuel", "Fuel (vehicle)", "choice", "gasoline", choices=tuple(
                (f.replace("_", " "), f) for f in VEHICLE_FUELS)),
            FieldSpec("year", "Year installed or model year", "int", None, optional=True),
        ], check, note="Details can be edited afterwards with e."))

    def action_remove_item(self) -> None:
        item = self._home_item()
        if item is None or item.group == "roof":
            if item is not None:
                self.notify("The roof stays; edit it instead (e).", timeout=4)
            return

        def answer(choice: str | None) -> None:
            if choice != "y":
                return
            plan = self.session.plan
            changes: list[tuple[tuple, Any]] = [((f"{item.group}s", item.index), DELETE)]
            if item.key in plan.choices.failed_now:
                changes.append((("choices", "failed_now"),
                                [k for k in plan.choices.failed_now if k != item.key]))
            self.edit(changes, f"remove {item.label.lower()}")

        self.push_screen(ChoiceScreen("Remove from the home",
                                      f"Remove the {item.label.lower()}? ctrl+z undoes it.",
                                      [("y", "Remove"), ("escape", "Keep")]), answer)

    def action_fail_now(self) -> None:
        item = self._home_item()
        if item is None:
            return
        if item.group != "appliance":
            self.notify("Only appliances can be marked as failed now.", timeout=4)
            return
        failed = list(self.session.plan.choices.failed_now)
        if item.key in failed:
            failed.remove(item.key)
            what = f"the {item.label.lower()} works again"
        else:
            failed.append(item.key)
            what = f"what if the {item.label.lower()} fails now"
        if self.edit([(("choices", "failed_now"), failed)], what, subject=item.key):
            self.notify(f"{what[0].upper()}{what[1:]}: re-planning.", timeout=3)

    # history and files ----------------------------------------------------

    def action_undo(self) -> None:
        if self.session is None:
            return
        what = self.session.undo()
        if what is None:
            self.notify("Nothing to undo.", timeout=3)
            return
        self.notify(f"Undone: {what}", timeout=3)
        self._after_change()

    def action_redo(self) -> None:
        if self.session is None:
            return
        what = self.session.redo()
        if what is None:
            self.notify("Nothing to redo.", timeout=3)
            return
        self.notify(f"Redone: {what}", timeout=3)
        self._after_change()

    def save(self, path: Path | None = None, *, overwrite_changed: bool = False,
             replace_readonly: bool = False) -> str | None:
        """Save; None when saved, else what went wrong (questions raise, see save_asking)."""
        try:
            target = self.session.save(path, overwrite_changed=overwrite_changed,
                                       replace_readonly=replace_readonly)
        except (ChangedOnDiskError, ReadOnlyFileError):
            raise
        except InputError as err:
            return problem_words(err)
        except OSError as err:
            return clean(f"could not save: {err.strerror or err}")
        self._update_status()
        self.notify(saved_words(target, self.session.last_backup, self.session.last_rebased),
                    timeout=6)
        self.refresh_views(now=False)
        return None

    def save_asking(self, path: Path | None = None, then: Callable[[bool], None] | None = None,
                    *, overwrite_changed: bool = False, replace_readonly: bool = False) -> None:
        """Save, asking first when the file changed on disk or is read-only; ``then(saved)``."""
        done = then or (lambda _saved: None)
        try:
            problem = self.save(path, overwrite_changed=overwrite_changed,
                                replace_readonly=replace_readonly)
        except ChangedOnDiskError:
            name = clean((path or self.session.path).name)

            def changed(choice: str | None) -> None:
                if choice == "o":
                    self.save_asking(path, then, overwrite_changed=True, replace_readonly=replace_readonly)
                else:
                    self.notify("Not saved: use save as (ctrl+shift+s) to keep both versions.",
                                title="Not saved", timeout=6)
                    done(False)

            self.push_screen(ChoiceScreen(
                "Changed on disk",
                f"{name} changed on disk since it was opened or last saved (another program "
                f"edited it). Overwrite it with this version? The version on disk is kept as "
                f"{name}.bak.", [("o", "Overwrite"), ("escape", "Cancel")]), changed)
            return
        except ReadOnlyFileError:
            name = clean((path or self.session.path).name)

            def readonly(choice: str | None) -> None:
                if choice == "w":
                    self.save_asking(path, then, overwrite_changed=overwrite_changed, replace_readonly=True)
                else:
                    done(False)

            self.push_screen(ChoiceScreen(
                "Read-only file", f"{name} is read-only. Write it anyway?",
                [("w", "Write it"), ("escape", "Cancel")]), readonly)
            return
        if problem:
            self.notify(problem, title="Not saved", severity="error", timeout=8)
        done(problem is None)

    def action_save(self) -> None:
        if self.session is None:
            return
        self.save_asking()

    def action_save_as(self) -> None:
        if self.session is None:
            return

        def check(values: dict) -> str | None:
            path = Path(values["path"]).expanduser()
            if path.is_dir():
                return f"{path} is a folder; give a file name"
            try:
                return self.save(path)
            except (ChangedOnDiskError, ReadOnlyFileError) as err:
                return problem_words(err)

        self.push_screen(FormScreen("Save as", [
            FieldSpec("path", "File", "text", str(self.session.path)),
        ], check, apply_label="Save"))

    def action_quit(self) -> None:
        if self.session is None or not self.session.dirty:
            self.exit(0)
            return

        def answer(choice: str | None) -> None:
            if choice == "s":
                self.save_asking(then=lambda saved: self.exit(0) if saved else None)
            elif choice == "d":
                self.exit(0)

        self.push_screen(ChoiceScreen("Unsaved changes",
                                      f"{clean(self.session.path.name)} has changes that are not saved.",
                                      [("s", "Save and quit"), ("d", "Quit without saving"),
                                       ("escape", "Stay")]), answer)

    async def action_new_plan(self, at_start: bool = False) -> None:
        if not at_start and self.session is not None and self.session.dirty:
            self.notify("Save (ctrl+s) or undo your changes before starting a new plan.",
                        title="Unsaved changes", severity="warning", timeout=6)
            return
        default_path = self.new_path or Path("my_home.yaml")

        def check(values: dict) -> str | None:
            path = Path(values["path"]).expanduser()
            if path.exists():
                return f"{path} already exists; choose another file name"
            if not path.parent.is_dir() and str(path.parent):
                return f"the folder {path.parent} does not exist"
            lat, lon = newplan.resolve_location(values)
            where = newplan.location_problem(lat, lon, values.get("timezone"))
            if where:
                return where[:1].upper() + where[1:] + ("" if where.endswith(("?", ".")) else ".")
            text = newplan.new_plan_text(values)
            err = check_new_plan(text, str(path))
            if err is not None:
                return problem_words(err)

            try:
                write_atomic(path, text, backup=False)
            except (OSError, InputError) as exc:
                return f"could not write {path}: {exc}"
            return None

        def done(values: dict | None) -> None:
            if values is None:
                if self.session is None:
                    self.exit(0)
                return
            self._open_session(PlanSession.open(Path(values["path"]).expanduser()))
            self.notify(f"Plan written to {values['path']}.", timeout=4)

        fields = new_plan_fields(default_path, self.session.plan.first_year if self.session else None)
        self.push_screen(FormScreen("A new plan", fields, check, apply_label="Create",
                                    note="Answer what you know; the rest uses typical values. "
                                    "You can change everything later."), done)

    # misc --------------------------------------------------------------------

    def action_show(self, vid: str) -> None:
        # Let go of the focus first: a widget focused in the pane being hidden would otherwise
        # tell the tabs to switch back to its own view.
        self.screen.set_focus(None)
        self.query_one("#views", TabbedContent).active = vid

    def action_where_from(self) -> None:
        if self.session is None:
            return
        vid = self.active_view_id
        self._refresh_view(vid)
        view = self.maybe_view(vid)
        if view is not None:
            self.push_screen(TextScreen("Where these numbers come from",
                                        view.where_from(self.view_data())))

    def action_toggle_theme(self) -> None:
        self.theme = "homeplan-light" if self.theme == "homeplan-dark" else "homeplan-dark"

    def action_help(self) -> None:
        self.push_screen(TextScreen("Keys", help_text()))

    def action_glossary(self) -> None:
        self.push_screen(TextScreen("Words of the trade", glossary_text()))


def _mapping(items: dict) -> Any:
    from ruamel.yaml.comments import CommentedMap

    m = CommentedMap()
    for k, v in items.items():
        m[k] = v
    m.fa.set_flow_style()
    return m


def _flow_list(items: list) -> Any:
    seq = _list(items)
    seq.fa.set_flow_style()
    return seq


def _list(items: list) -> Any:
    from ruamel.yaml.comments import CommentedSeq

    return CommentedSeq(items)


def _append_changes(session: PlanSession, changes: list[tuple[tuple, Any]]) -> list:
    """Turn 'set list[len]' into an append (set_in indexes lists, it cannot grow them)."""
    out = []
    for loc, value in changes:
        if len(loc) == 2 and isinstance(loc[1], int):
            current = session.get((loc[0],))
            items = _list(list(current) if current is not None else [])
            items.append(value)
            out.append(((loc[0],), items))
        else:
            out.append((loc, value))
    return out


ROOF_MATERIALS = (("asphalt shingle", "asphalt_shingle"), ("metal", "metal"), ("tile", "tile"),
                  ("slate", "slate"), ("wood shake", "wood_shake"), ("flat membrane", "membrane"))
ROOF_FACING = (("south", 180.0), ("south-west", 225.0), ("south-east", 135.0), ("west", 270.0),
               ("east", 90.0), ("north-west", 315.0), ("north-east", 45.0), ("north", 0.0))
# Pitch in inches of rise per 12 of run, as the slope's angle: atan(rise / 12) (trigonometry)
ROOF_SLOPES = (("flat", 0.0), ("gentle, 4 in 12 (18°)", 18.4), ("medium, 6 in 12 (27°)", 26.6),
               ("steep, 9 in 12 (37°)", 36.9), ("very steep, 12 in 12 (45°)", 45.0))


def _with_current(choices: tuple, value: Any, words: str) -> tuple:
    """The choices, plus the file's own value when it is not one of them."""
    if value is None or any(v == value for _, v in choices):
        return choices
    return ((words.format(value), value), *choices)


def roof_fields(plan: Plan) -> list[FieldSpec]:
    """The roof form: age, material, area for panels, which way it faces, slope, shade."""
    r = plan.home.roof
    base = ("home", "roof")
    return [
        FieldSpec((*base, "year_installed"), "Year the roof was put on", "int",
                  r.year_installed if r else None, optional=True),
        FieldSpec((*base, "material"), "Material", "choice", r.material if r else "asphalt_shingle",
                  choices=ROOF_MATERIALS),
        FieldSpec((*base, "usable_area_ft2"), "Area usable for panels", "float",
                  r.usable_area_ft2 if r else None, optional=True, unit="ft2",
                  help="The open part of the sunniest side; blank: worked out from the floor area."),
        FieldSpec((*base, "azimuth_deg"), "Its best side faces", "choice", r.azimuth_deg if r else 180.0,
                  choices=_with_current(ROOF_FACING, r.azimuth_deg if r else None, "{:.0f}° (as in the file)")),
        FieldSpec((*base, "tilt_deg"), "Slope", "choice", r.tilt_deg if r else 26.6,
                  choices=_with_current(ROOF_SLOPES, r.tilt_deg if r else None, "{:.1f}° (as in the file)")),
        FieldSpec((*base, "shading_pct"), "Shaded", "float", r.shading_pct if r else 0.0,
                  unit="%", help="Trees or buildings that shade it during the day; 0 for none."),
    ]


def _local_zone() -> str:
    """The computer's time zone when it is one the form offers (else the first of them)."""
    import contextlib

    zones = [key for _, key in newplan.TIME_ZONES]
    name = os.environ.get("TZ", "")
    with contextlib.suppress(OSError):
        name = name or os.path.realpath("/etc/localtime").split("zoneinfo/")[-1]
    return name if name in zones else zones[0]


def new_plan_fields(path: Path, first_year: int | None) -> list[FieldSpec]:
    heating = tuple((label, key) for key, (_, _, label) in newplan.HEATING.items())
    fuels = tuple((label, key) for key, label in newplan.FUEL_CHOICES.items() if key != "oil")
    return [
        FieldSpec("path", "Save as file", "text", str(path)),
        FieldSpec("name", "Name of the home", "text", None, optional=True),
        FieldSpec("place", "Town", "text", None, optional=True, help="For the printout only."),
        FieldSpec("near", "Nearest city in this list", "choice", "", choices=newplan.place_choices(),
                  help="Its coordinates are used when you leave them blank below."),
        FieldSpec("latitude", "Latitude", "float", None, optional=True,
                  placeholder="(blank: the city's)",
                  help="Decimal degrees from a map app, north positive, e.g. 44.95."),
        FieldSpec("longitude", "Longitude", "float", None, optional=True,
                  placeholder="(blank: the city's)",
                  help="Decimal degrees, west negative: every US home is negative, e.g. -93.25."),
        FieldSpec("timezone", "Time zone", "choice", _local_zone(), choices=newplan.TIME_ZONES),
        FieldSpec("floor_area_ft2", "Heated floor area", "float", None, unit="ft2"),
        FieldSpec("year_built", "Year built", "int", None, optional=True),
        FieldSpec("occupants", "People living there", "int", 3),
        FieldSpec("service_amps", "Electrical service", "choice", 100,
                  choices=tuple((f"{a} A", a) for a in newplan.SERVICE_AMPS),
                  help="The number on the main breaker."),
        FieldSpec("free_spaces", "Empty breaker spaces", "int", None, optional=True,
                  help="Count the free slots in the panel from outside its cover; do not open it. "
                  "Blank: not known."),
        FieldSpec("heating", "Heating", "choice", "gas_furnace", choices=heating),
        FieldSpec("heating_year", "Heating installed in", "int", None, optional=True),
        FieldSpec("central_ac", "Central air conditioning", "bool", False),
        FieldSpec("water_heater_fuel", "Water heater", "choice", "gas", choices=fuels),
        FieldSpec("water_heater_year", "Water heater installed in", "int", None, optional=True),
        FieldSpec("range_fuel", "Stove", "choice", "gas", choices=fuels),
        FieldSpec("dryer_fuel", "Clothes dryer", "choice", "electric",
                  choices=(*fuels, ("No dryer", "none"))),
        FieldSpec("cars", "Gasoline cars, by name", "text", "Family car", optional=True,
                  help="Separate them with commas, e.g. Blue sedan, Work truck. Blank: none."),
        FieldSpec("miles_per_year", "Miles per car per year", "float", 11000),
        FieldSpec("annual_kwh", "Electricity used a year", "float", None, optional=True,
                  unit="kWh", help="From a year of bills. Blank: typical use for the home."),
        FieldSpec("annual_therms", "Gas used a year", "float", None, optional=True, unit="therms",
                  help="From a year of gas bills. Blank: typical use."),
        FieldSpec("annual_gal", "Propane or oil used a year", "float", None, optional=True,
                  unit="gal", help="For propane or oil heating: a year of deliveries."),
        FieldSpec("roof_facing", "Roof side for solar panels", "choice", "",
                  choices=newplan.ROOF_FACING, help="The sunniest large side of the roof."),
        FieldSpec("roof_year", "Roof put on in", "int", None, optional=True),
        FieldSpec("roof_area_ft2", "Roof area for panels", "float", None, optional=True, unit="ft2",
                  help="Blank: worked out from the floor area."),
        FieldSpec("ami_pct", "Household income", "choice", "", choices=newplan.INCOME_BANDS,
                  help="Against the median income of your county: many incentives depend on it."),
        FieldSpec("usd_per_year", "Budget per year", "float", 5000, unit="USD"),
        FieldSpec("first_year", "First year", "int", first_year, optional=True,
                  help="Blank: next calendar year."),
        FieldSpec("horizon_years", "Years to plan", "int", 10),
    ]


def glossary_text() -> Text:
    """Each term of the trade, the plain words the screens use for it, and what it means."""
    out = Text()
    for g in catalog.glossary():
        out.append(g.term, style="bold")
        out.append(f" - {g.plain}\n", style="italic")
        out.append(f"{g.text}\n")
        out.append(f"Source: {g.source}\n\n", style="dim")
    return out


def help_text():
    from rich.console import Group
    from rich.table import Table

    table = Table(box=None, show_header=False, padding=(0, 1, 0, 0), expand=True)
    table.add_column(style="bold", no_wrap=True)
    table.add_column(ratio=1)
    for key, what in help_rows():
        table.add_row(key, what)
    marks = Text("\nMarks: reverse block = a step and its net cost; ░ = where a step was before "
                 "the last change; ▲ pinned; ✕ left out; ◆ burns fuel; Σ yearly totals.")
    return Group(table, marks)
