"""The key table (homeplan/tui/actions.py) against the three places that show it.

A consistency test of the app's own table: the keys bound by the app and its views, the
command-palette entries and the rows of the Keys screen must agree with each other. The table is
the reference, so no outside source is needed. The few keys that are deliberately missing from
the Keys screen or from the palette are listed here by name, so that a new gap fails the test.
"""

from __future__ import annotations

import re
from collections import Counter

from textual.binding import Binding
from textual.keys import format_key

from homeplan.tui.actions import ACTIONS, APP, VIEW_TABS, bindings, help_rows, palette_entries
from homeplan.tui.app import VIEWS, HomeplanApp, PlanCommands, help_text
from homeplan.tui.widgets.home import Inventory
from homeplan.tui.widgets.incentives import ProgramTable
from homeplan.tui.widgets.roadmap import Timeline

# where each scope's keys are bound
BOUND = {APP: HomeplanApp, "roadmap": Timeline, "home": Inventory, "incentives": ProgramTable}

# (scope, key) bound but not written on the Keys screen:
#   ? opens that screen itself; = is a second key for +; Enter on Home does what e does
NOT_ON_KEYS_SCREEN = {(APP, "question_mark"), (APP, "equals_sign"), ("home", "enter")}
# actions without an entry of ours in the palette: quit is Textual's own "Quit" command
NOT_IN_PALETTE = {"quit", "toggle_all_steps"}


def _written(key: str) -> str:
    """A key as people read it (Textual's display form; the Keys screen spells out enter)."""
    return "enter" if key == "enter" else format_key(key)


def _keys(binding: Binding) -> list[str]:
    return [k.strip() for k in binding.key.split(",")]


def _action_name(action: str) -> str:
    """'app.pin' -> 'pin' (view keys call the app's actions)."""
    return action.removeprefix("app.")


def _screen_rows() -> list[tuple[str, str]]:
    """The rows of the Keys screen as the screen builds them."""
    table = help_text().renderables[0]
    return list(zip(table.columns[0]._cells, table.columns[1]._cells, strict=True))


def _row_keys(written: str) -> tuple[str, list[str]]:
    """'Roadmap: x / r' -> ('roadmap', ['x', 'r']); '1-7' -> ('app', ['1', ..., '7'])."""
    scope = APP
    for vid, label in VIEW_TABS:
        if written.startswith(f"{label}: "):
            scope, written = vid, written.removeprefix(f"{label}: ")
    keys: list[str] = []
    for part in written.split(" / "):
        if m := re.fullmatch(r"(\d)-(\d)", part):
            keys += [str(i) for i in range(int(m[1]), int(m[2]) + 1)]
        else:
            keys.append(part)
    return scope, keys


def test_views_of_the_table_are_the_apps_tabs():
    assert list(VIEW_TABS) == [(vid, label) for vid, label, _ in VIEWS]


def test_bindings_come_from_the_table():
    def spec(bs):
        return [(b.key, b.action, b.description, b.show) for b in bs]

    for scope, cls in BOUND.items():
        assert spec(cls.BINDINGS) == spec(bindings(scope)), scope
    scopes = {a.scope for a in ACTIONS}
    assert scopes == set(BOUND)


def test_keys_screen_comes_from_the_table():
    assert _screen_rows() == help_rows()


async def test_palette_comes_from_the_table():
    app = HomeplanApp()  # no plan: the new-plan form opens, which is enough here
    async with app.run_test(size=(80, 24)):
        commands = PlanCommands(app.screen)._commands()
        assert [(t, d) for t, d, _ in commands] == [(t, d) for t, d, _ in palette_entries()]
        for (_, _, callback), (_, _, action) in zip(commands, palette_entries(), strict=True):
            assert callback.func == app.run_action
            assert callback.args == (action,)
        # quit, left out of our entries, is in Textual's system commands
        assert "Quit" in [c.title for c in app.get_system_commands(app.screen)]


def test_every_bound_key_is_on_the_keys_screen():
    rows = {}  # (scope, what it does) -> the keys written in that row
    for written, what in _screen_rows():
        scope, keys = _row_keys(written)
        rows[(scope, what)] = keys
    missing = set()
    for scope, cls in BOUND.items():
        for binding in cls.BINDINGS:
            entry = next(a for a in ACTIONS if (a.scope, a.keys, a.action)
                         == (scope, binding.key, binding.action))
            row = rows.get((scope, entry.help))
            for i, key in enumerate(_keys(binding)):
                written = _written(key)
                # in the key column of its own row; a second key may be named in the text
                named = row is not None and (written in row or i > 0 and re.search(
                    rf"(?<!\w){re.escape(written)}(?!\w)", entry.help) is not None)
                if not named:
                    missing.add((scope, key))
    assert missing == NOT_ON_KEYS_SCREEN


def test_keys_screen_lists_only_bound_keys():
    bound = {(scope, _written(k)) for scope, cls in BOUND.items()
             for b in cls.BINDINGS for k in _keys(b)}
    bound.add((APP, _written(HomeplanApp.COMMAND_PALETTE_BINDING)))  # Textual binds ctrl+p
    for written, _ in _screen_rows():
        scope, keys = _row_keys(written)
        for key in keys:
            assert (scope, key) in bound, written
    builtin = [a for a in ACTIONS if a.builtin]
    assert [(a.keys, a.action) for a in builtin] == [
        (HomeplanApp.COMMAND_PALETTE_BINDING, "command_palette")]


def test_every_bound_key_has_a_palette_entry():
    in_palette = {_action_name(action) for _, _, action in palette_entries()}
    without = {_action_name(b.action) for cls in BOUND.values() for b in cls.BINDINGS} - in_palette
    assert without == NOT_IN_PALETTE
    # and every palette entry has a key
    bound = {_action_name(b.action) for cls in BOUND.values() for b in cls.BINDINGS}
    assert in_palette <= bound


def test_no_key_twice_in_a_scope():
    for scope in BOUND:
        keys = Counter(k.strip() for a in ACTIONS if a.scope == scope for k in a.keys.split(","))
        assert [k for k, n in keys.items() if n > 1] == [], scope


def test_view_keys_do_not_hide_app_keys():
    app_keys = {k for b in HomeplanApp.BINDINGS for k in _keys(b)}
    app_keys.add(HomeplanApp.COMMAND_PALETTE_BINDING)
    for scope, cls in BOUND.items():
        if scope != APP:
            assert not app_keys & {k for b in cls.BINDINGS for k in _keys(b)}, scope
