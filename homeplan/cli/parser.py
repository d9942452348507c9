"""The ``homeplan`` command line: every command, its arguments and the exit codes, in one place.

Each command names the module of its group and its function (``COMMANDS``); :func:`homeplan.cli.main`
imports that module only when the command runs, so ``homeplan --help`` stays fast.

Exit codes: 0 success, 1 failure while working, 2 bad input or usage.
"""

from __future__ import annotations

import argparse
import math
import os
import sys
from typing import NoReturn

from homeplan import __version__
from homeplan.plan.objectives import ALIASES
from homeplan.plan.objectives import OBJECTIVES as OBJECTIVE_INFO

__all__ = [
    "COMMANDS",
    "EXIT_BAD_INPUT",
    "EXIT_FAILURE",
    "EXIT_INTERRUPTED",
    "EXIT_OK",
    "OBJECTIVES",
    "build_parser",
]

EXIT_OK, EXIT_FAILURE, EXIT_BAD_INPUT = 0, 1, 2
EXIT_INTERRUPTED = 130  # 128 + SIGINT, as shells report Ctrl-C

OBJECTIVES = tuple(OBJECTIVE_INFO)
"""The objectives' names (homeplan.plan.objectives); older spellings are accepted too."""

COMMANDS: dict[str, tuple[str, str]] = {
    "check": ("describe", "cmd_check"),
    "schema": ("describe", "cmd_schema"),
    "graph": ("describe", "cmd_graph"),
    "lifecycle": ("describe", "cmd_lifecycle"),
    "plan": ("planning", "cmd_plan"),
    "capacity": ("planning", "cmd_capacity"),
    "costs": ("planning", "cmd_costs"),
    "sensitivity": ("planning", "cmd_sensitivity"),
    "open": ("app", "cmd_open"),
    "print": ("outputs", "cmd_print"),
    "export": ("outputs", "cmd_export"),
    "diff": ("outputs", "cmd_diff"),
    "portfolio": ("portfolio", "cmd_portfolio"),
    "community": ("portfolio", "cmd_community"),
    "compare": ("outputs", "cmd_compare"),
}
"""Command -> (module in ``homeplan.cli``, function taking the parsed arguments)."""


class _Parser(argparse.ArgumentParser):
    def error(self, message: str) -> NoReturn:  # usage errors: exit 2 with a hint, as argparse does
        self.print_usage(sys.stderr)
        self.exit(EXIT_BAD_INPUT, f"{self.prog}: error: {message} (see '{self.prog} --help')\n")


def _whole(text: str, most: int, what: str = "") -> int:
    try:
        n = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number{what}") from None
    if not 1 <= n <= most:
        raise argparse.ArgumentTypeError(f"{n}{what} is outside 1-{most}")
    return n


def _count(text: str) -> int:
    try:
        n = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number") from None
    if not 0 <= n <= 512:
        raise argparse.ArgumentTypeError(f"{n} is outside 0-512")
    return n


def _address(text: str) -> str:
    scheme, sep, rest = text.partition("://")
    if not sep or not scheme or not rest:
        raise argparse.ArgumentTypeError(f"{text!r} is not a scheduler address like tcp://HOST:8786")
    return text


def _years(text: str) -> int:
    return _whole(text, 30, " of years")


def _money(text: str) -> float:
    try:
        v = float(text.replace(",", "").lstrip("$"))
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not an amount of money") from None
    if not math.isfinite(v) or v < 0:
        raise argparse.ArgumentTypeError(f"{text!r} must be zero or more")
    return v


def _objective(text: str) -> str:
    name = ALIASES.get(text, text)
    if name not in OBJECTIVE_INFO:
        raise argparse.ArgumentTypeError(f"{text!r} is not an objective; choose from "
                                         f"{', '.join(OBJECTIVE_INFO)}")
    return name


def build_parser() -> argparse.ArgumentParser:
    """The parser of every command (``args.command`` names the one given)."""
    p = _Parser(prog="homeplan", description="Plan a whole-home electrification, year by year.")
    p.add_argument("--version", action="version", version=f"homeplan {__version__}")
    no_cache = ("do not read or keep the built-in weather year in the user's cache folder "
                "(HOMEPLAN_CACHE_DIR, or the platform's user cache folder)")
    p.add_argument("--no-cache", action="store_true", help=no_cache)
    sub = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)

    def command(name: str, help_: str, file: bool = True) -> argparse.ArgumentParser:
        sp = sub.add_parser(name, help=help_, description=help_)
        if file:
            sp.add_argument("file", help="plan file (YAML)")
            # also after the command; SUPPRESS keeps the top-level value when it is not given
            sp.add_argument("--no-cache", action="store_true", default=argparse.SUPPRESS, help=no_cache)
        return sp

    def allow_outside(sp: argparse.ArgumentParser) -> argparse.ArgumentParser:
        sp.add_argument("--allow-outside", metavar="PATH", action="append", default=[],
                        help="let the plan name this file outside its own folder (an incentive or "
                        "weather file); repeat for more. Without it such files are refused")
        return sp

    def force(sp: argparse.ArgumentParser) -> None:
        sp.add_argument("--force", action="store_true",
                        help="write even over a file this command reads (the plan itself, its "
                        "incentive or weather files) or a read-only file")

    def json_flag(sp: argparse.ArgumentParser) -> None:
        sp.add_argument("--json", action="store_true", help="print JSON")

    allow_outside(command("check", "validate a plan file and print a short summary"))
    sp = command("schema", "print the JSON Schema of the plan file format", file=False)
    sp.add_argument("-o", "--output", help="write to this file instead of stdout")
    force(sp)
    sp = command("graph", "show which upgrades apply and what must come before what")
    sp.add_argument("--dot", action="store_true", help="print Graphviz DOT")
    json_flag(sp)
    sp = command("lifecycle", "show each appliance's age, end of life and failure risk")
    sp.add_argument("--years", type=_years, default=8, help="years of risk to show (1-30, default 8)")
    json_flag(sp)

    sp = allow_outside(command("plan", "compute the year-by-year roadmap and print it"))
    sp.add_argument("--json", action="store_true", help="print the roadmap as JSON (docs/roadmap-json.md)")
    sp.add_argument("--budget", type=_money, help="override the yearly budget (USD)")
    sp.add_argument("--horizon", type=_years, help="override the number of years (1-30)")
    sp.add_argument("--objective", type=_objective, metavar="{" + ",".join(OBJECTIVES) + "}",
                    help="override the objective: " + "; ".join(
                        f"{k}: {o.meaning}" for k, o in OBJECTIVE_INFO.items()))
    json_flag(allow_outside(command("capacity", "electrical load calculation today and after each "
                                    "roadmap step")))
    json_flag(allow_outside(command("costs", "costs, incentives and net cost of each project by year")))
    json_flag(allow_outside(command("sensitivity", "which assumptions move the net present value most "
                                    "(each at a low and a high setting, the home re-planned; takes a "
                                    "few seconds)")))

    sp = command("open", "open the plan in the terminal app (explore, edit, re-plan); "
                 "a FILE that does not exist yet starts the guided new-plan form; a portfolio's "
                 "results folder opens read-only", file=False)
    sp.add_argument("file", nargs="?", help="plan file (YAML), or a portfolio's RESULTS folder; "
                    "omit it to start a new plan")
    sp.add_argument("--light", action="store_true", help="light colours for a light terminal background")
    allow_outside(sp)

    sp = command("print", "print a summary of the roadmap (text, Markdown or a printable HTML page)")
    sp.add_argument("-o", "--output", help="write to this file (.html, .md or .txt) instead of stdout")
    sp.add_argument("--format", choices=("txt", "md", "html"), help="output format (default: from the "
                    "file extension, else txt)")
    sp.add_argument("--quick", action="store_true", help="leave out the sensitivity ranking (it re-plans "
                    "the home about twenty times)")
    force(allow_outside(sp))
    sp = command("export", "export the roadmap as CSV files, an iCalendar file or JSON")
    sp.add_argument("--csv", metavar="DIR", help="write steps.csv, years.csv and monthly_energy.csv here")
    sp.add_argument("--hourly", action="store_true", help="with --csv: also hourly_energy.csv when available")
    sp.add_argument("--ics", metavar="FILE", help="write reminders (quotes, incentive deadlines, "
                    "replace-by dates) as an iCalendar file")
    sp.add_argument("--json", metavar="FILE", help="write the roadmap result as JSON ('-' for stdout)")
    force(allow_outside(sp))
    sp = command("diff", "show what changed between two plan files and their roadmaps", file=False)
    sp.add_argument("a", help="the earlier plan file (YAML)")
    sp.add_argument("b", help="the later plan file (YAML)")
    sp.add_argument("--inputs-only", action="store_true", help="compare the inputs only (no planning)")
    allow_outside(sp)

    sp = command("portfolio", "plan many homes (a folder of plan files, or a CSV of homes with a "
                 "template plan) and add them up year by year", file=False)
    sp.add_argument("input", help="a folder of plan files, or a CSV of homes (one row per home)")
    sp.add_argument("-o", "--output", required=True, metavar="RESULTS",
                    help="folder for the results: the store (portfolio.sqlite), CSV and Parquet "
                    "exports and summary.html")
    sp.add_argument("--template", metavar="PLAN", help="with a CSV: the plan that fills in what the "
                    "columns do not")
    sp.add_argument("--workers", type=_count, default=os.cpu_count() or 1,
                    help="worker processes on this machine (default: one per core; 0: plan in "
                    "this process)")
    sp.add_argument("--scheduler", type=_address, metavar="tcp://HOST:PORT",
                    help="run on this dask.distributed cluster instead of local processes")
    sp.add_argument("--batch-size", type=lambda t: _whole(t, 10000, " homes"), default=200,
                    help="most homes sent to a worker at once (default 200)")
    sp.add_argument("--limit", type=lambda t: _whole(t, 10**9, " homes"), metavar="N",
                    help="plan only N more homes (a quick look; --resume goes on later)")
    sp.add_argument("--resume", action="store_true",
                    help="go on with the run stored in RESULTS (homes already planned are kept)")
    sp.add_argument("--coincidence", metavar="WINTER,SUMMER",
                    help="coincidence factor of a very large group of homes for the diversified "
                    "peaks (default 0.7,0.5)")
    sp.add_argument("--program-budget", action="append", metavar="PROGRAM=USD",
                    help="a program's total budget, to see the year it runs out (repeatable)")
    sp.add_argument("--quiet", action="store_true", help="no progress bar")
    sp = command("community", "write an invented demo community: homes.csv and template.yaml",
                 file=False)
    sp.add_argument("folder", help="folder to write into (created if needed)")
    sp.add_argument("--homes", type=lambda t: _whole(t, 1_000_000, " homes"), default=1000,
                    help="number of homes (default 1000)")
    sp.add_argument("--seed", type=int, default=2027, help="random seed (default 2027): the same "
                    "seed gives the same homes")
    sp.add_argument("--incentives", metavar="FILE", help="an incentive catalog for the template to "
                    "name (a path relative to the folder)")
    sp = command("compare", "lay options side by side: several plan files, and the named options "
                 "(alternatives) inside them", file=False)
    sp.add_argument("files", nargs="+", metavar="FILE", help="plan files (YAML); each brings its own options")
    sp.add_argument("--json", action="store_true", help="print every option's roadmap as JSON")
    sp.add_argument("-o", "--output", help="write a printable comparison (.html, .md or .txt)")
    sp.add_argument("--format", choices=("txt", "md", "html"), help="output format (default: from the "
                    "file extension, else txt)")
    force(allow_outside(sp))
    missing = set(sub.choices) ^ set(COMMANDS)
    assert not missing, f"commands without a module or a parser: {sorted(missing)}"
    return p
