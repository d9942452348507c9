"""Every key of the app, written once.

``ACTIONS`` is the one table of the app's keys. The app's and the views' ``BINDINGS``, the
command-palette entries and the rows of the Keys screen are all derived from it, so a key,
its footer label, its palette title and its line on the Keys screen cannot drift apart.

Kept light: only ``textual.binding`` is imported (the app imports this module at start-up).
"""

from __future__ import annotations

from dataclasses import dataclass

from textual.binding import Binding

__all__ = [
    "ACTIONS",
    "APP",
    "PORTFOLIO_ACTIONS",
    "READ_ONLY",
    "VIEW_TABS",
    "Action",
    "bindings",
    "help_rows",
    "palette_entries",
    "portfolio_bindings",
    "portfolio_help_rows",
]

# The views, in tab order: id and label (``app.VIEWS`` adds the widget classes). Keys 1-7.
VIEW_TABS: tuple[tuple[str, str], ...] = (
    ("next", "Next"),
    ("home", "Home"),
    ("roadmap", "Roadmap"),
    ("money", "Money"),
    ("power", "Power"),
    ("energy", "Energy"),
    ("incentives", "Incentives"),
)

APP = "app"


@dataclass(frozen=True)
class Action:
    """One key of the app and everywhere it is described.

    keys:        Textual key syntax; alternatives separated by commas ("ctrl+z,u").
    action:      the action string as bound ("undo", "show('next')"; view keys use "app.pin").
    label:       the footer label.
    show:        whether the footer shows it.
    title:       the command-palette title; None: not in the palette.
    description: the line under the title in the palette.
    scope:       "app", or the id of the view whose table holds the key ("roadmap", ...).
    help_key:    how the key is written for people on the Keys screen; "": not listed there.
    help:        the Keys-screen text. Actions of one scope with the same text share one row
                 (their help keys joined with " / ").
    builtin:     Textual binds the key itself (ctrl+p): listed on the Keys screen, not bound here.
    """

    keys: str
    action: str
    label: str
    show: bool = True
    title: str | None = None
    description: str = ""
    scope: str = APP
    help_key: str = ""
    help: str = ""
    builtin: bool = False


_VIEWS_HELP = f"views: {', '.join(label for _, label in VIEW_TABS)} (or click the tabs)"
_BUDGET_HELP = "set the yearly budget / raise or lower it by $1,000"
_PIN_HELP = "leave the project out / release a pin or exclusion"
_ITEM_HELP = "edit / add / remove an appliance or vehicle"
_UNDO_HELP = "undo / redo (u also undoes)"
_SAVE_HELP = "save (atomic, previous file kept as .bak) / save as"

ACTIONS: tuple[Action, ...] = (
    *(Action(str(i + 1), f"show('{vid}')", label, show=False, title=f"Show {label}",
             description=f"Open the {label.lower()} view", help_key=f"1-{len(VIEW_TABS)}",
             help=_VIEWS_HELP)
      for i, (vid, label) in enumerate(VIEW_TABS)),
    Action("b", "edit_budget", "Budget", show=False, title="Change budget",
           description="Set what you can spend each year", help_key="b", help=_BUDGET_HELP),
    Action("plus,equals_sign", "budget_step(1)", "+$1k", show=False,
           title="Raise budget by $1,000", description="Add $1,000 a year",
           help_key="+", help=_BUDGET_HELP),
    Action("minus", "budget_step(-1)", "-$1k", show=False, title="Lower budget by $1,000",
           description="Take $1,000 a year off", help_key="-", help=_BUDGET_HELP),
    Action("s", "settings", "Settings", show=False, title="Plan settings",
           description="First year, horizon, objective, risk level", help_key="s",
           help="plan settings: first year, years to plan, aim, risk level, deadline"),
    Action("dollar_sign", "prices", "Prices", show=False, title="Edit prices",
           description="Energy prices and household income", help_key="$",
           help="prices and household income"),
    # Incentives view (the programs table)
    Action("e", "app.edit_incentives", "Household & programs", scope="incentives",
           title="Household and incentive programs", description="Income, taxes, program files",
           help_key="e", help="household income, taxes and the incentive program files"),
    # Roadmap view (the year grid)
    Action("p", "app.pin", "Pin", scope="roadmap", title="Pin step to a year",
           description="Roadmap: keep the selected project in a year", help_key="p",
           help="pin the project to the year under the cursor (or ask for a year)"),
    Action("x", "app.exclude", "Leave out", scope="roadmap", title="Leave step out",
           description="Roadmap: exclude the selected project", help_key="x", help=_PIN_HELP),
    Action("r", "app.release", "Release", scope="roadmap", title="Release step",
           description="Roadmap: undo a pin or exclusion", help_key="r", help=_PIN_HELP),
    Action("enter", "app.step_details", "Details", show=False, scope="roadmap",
           title="Step details", description="Roadmap: cost, incentives and reasons",
           help_key="enter", help="cost, incentives, reasons and cautions of the step"),
    Action("v", "app.toggle_all_steps", "All projects", show=False, scope="roadmap",
           help_key="v", help="show or hide the projects the plan does not use"),
    # Home view (the inventory)
    Action("e", "app.edit_item", "Edit", scope="home", title="Edit appliance or vehicle",
           description="Home: change the selected item", help_key="e", help=_ITEM_HELP),
    Action("a", "app.add_item", "Add", scope="home", title="Add appliance or vehicle",
           description="Home: add an item", help_key="a", help=_ITEM_HELP),
    Action("d", "app.remove_item", "Remove", scope="home", title="Remove appliance or vehicle",
           description="Home: remove the selected item", help_key="d", help=_ITEM_HELP),
    Action("f", "app.fail_now", "Fails now?", scope="home", title="What if it fails now",
           description="Home: mark the selected appliance failed this year", help_key="f",
           help="what if this appliance fails now (press again to undo the what-if)"),
    Action("enter", "app.edit_item", "Edit", show=False, scope="home"),  # as e; not listed
    # history, files and the rest
    Action("ctrl+z,u", "undo", "Undo", title="Undo", description="Undo the last change",
           help_key="ctrl+z", help=_UNDO_HELP),
    Action("ctrl+y", "redo", "Redo", show=False, title="Redo",
           description="Redo the change just undone", help_key="ctrl+y", help=_UNDO_HELP),
    Action("ctrl+s", "save", "Save", title="Save",
           description="Save the plan file (a .bak copy is kept)", help_key="ctrl+s",
           help=_SAVE_HELP),
    Action("S", "save_as", "Save as", show=False, title="Save as",
           description="Save the plan under another name", help_key="S", help=_SAVE_HELP),
    Action("n", "new_plan", "New plan", show=False, title="New plan",
           description="Start a plan from a guided form", help_key="n",
           help="a new plan from a guided form"),
    Action("o", "next_option", "Options", show=False, title="Next option",
           description="Switch to the plan's next named option", help_key="o",
           help="switch between the plan's named options (alternatives in the file)"),
    Action("w", "where_from", "Sources", title="Where do these numbers come from",
           description="Sources of the numbers on this view", help_key="w",
           help="where the numbers on this view come from"),
    Action("t", "toggle_theme", "Light/dark", show=False, title="Switch light/dark",
           description="Toggle the light and dark colours", help_key="t",
           help="switch light and dark colours (NO_COLOR is respected)"),
    Action("g", "glossary", "Words", show=False, title="Glossary",
           description="The trade's terms in plain words (AFUE, HSPF2, VA...)", help_key="g",
           help="the glossary: the trade's terms (AFUE, HSPF2, tons, VA...) in plain words"),
    # the Keys screen does not list the key that opens it
    Action("question_mark", "help", "Keys", title="Keys", description="List every key"),
    Action("ctrl+p", "command_palette", "palette", show=False, builtin=True, help_key="ctrl+p",
           help="command palette: every action by name"),
    Action("escape", "show('next')", "Back", show=False, help_key="esc",
           help="back out of a form or panel; on a view, go to Next"),
    # in the palette as Textual's own "Quit" command
    Action("ctrl+q", "quit", "Quit", help_key="ctrl+q",
           help="quit (asks when there are unsaved changes)"),
)


# The portfolio viewer (``homeplan open RESULTS``): its own few keys. A home opened from it
# shows the single-home views read-only, with the app keys of READ_ONLY (the views' own keys
# that would edit the plan are switched off there).
PORTFOLIO_ACTIONS: tuple[Action, ...] = (
    Action("enter", "open_home", "Open home", help_key="enter",
           help="open the home under the cursor (planned again from its stored plan; read-only)"),
    Action("y", "tab('years')", "Years", help_key="y / h / p", help="years, homes, programs"),
    Action("h", "tab('homes')", "Homes", help_key="y / h / p", help="years, homes, programs"),
    Action("p", "tab('programs')", "Programs", help_key="y / h / p", help="years, homes, programs"),
    Action("r", "reload", "Reload", help_key="r",
           help="read the results again (a run may still be adding homes)"),
    Action("escape", "back", "Back", help_key="esc", help="from a home, back to the portfolio"),
    Action("t", "toggle_theme", "Light/dark", show=False, help_key="t",
           help="switch light and dark colours"),
    Action("question_mark", "help", "Keys", help_key="?", help="this list"),
    Action("ctrl+q", "quit", "Quit", help_key="ctrl+q", help="quit"),
)

READ_ONLY = frozenset({"show", "where_from", "step_details", "toggle_all_steps"})
"""App actions that only look (a home of a portfolio is shown with these and no others)."""


def portfolio_bindings() -> list[Binding]:
    """The ``BINDINGS`` of the portfolio viewer."""
    return [Binding(a.keys, a.action, a.label, show=a.show) for a in PORTFOLIO_ACTIONS]


def portfolio_help_rows() -> list[tuple[str, str]]:
    """(key, what it does) rows of the portfolio viewer's Keys screen, then the read-only keys
    of a home's views."""
    rows: dict[str, str] = {}
    for a in PORTFOLIO_ACTIONS:
        rows.setdefault(a.help, a.help_key)
    out = [(k, h) for h, k in rows.items()]
    seen = set()
    for a in ACTIONS:
        name = a.action.removeprefix("app.").split("(")[0]
        if name in READ_ONLY and a.help_key and a.help not in seen:
            seen.add(a.help)
            out.append((a.help_key, f"in a home: {a.help}"))
    return out


def bindings(scope: str = APP) -> list[Binding]:
    """The ``BINDINGS`` of the app ("app") or of a view's table (its view id)."""
    return [Binding(a.keys, a.action, a.label, show=a.show)
            for a in ACTIONS if a.scope == scope and not a.builtin]


def palette_entries() -> list[tuple[str, str, str]]:
    """(title, description, action string) of the command palette, in order.

    The palette runs the action string with ``app.run_action``, as a key press would.
    """
    return [(a.title, a.description, a.action) for a in ACTIONS if a.title is not None]


def help_rows() -> list[tuple[str, str]]:
    """(key, what it does) rows of the Keys screen, in order."""
    labels = dict(VIEW_TABS)
    rows: dict[tuple[str, str], list[str]] = {}
    for a in ACTIONS:
        if not a.help_key:
            continue
        keys = rows.setdefault((a.scope, a.help), [])
        if a.help_key not in keys:
            keys.append(a.help_key)
    out = []
    for (scope, text), keys in rows.items():
        key = " / ".join(keys)
        out.append((key if scope == APP else f"{labels[scope]}: {key}", text))
    return out
