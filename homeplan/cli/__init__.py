"""The ``homeplan`` command line (entry point :func:`main`).

Modules: ``parser`` (every command, its arguments, the exit codes), one module per group of
commands (``describe``: check, schema, graph, lifecycle; ``planning``: plan, capacity, costs;
``outputs``: print, export, diff; ``app``: open), ``common`` (the load-and-plan path they share).

Exit codes: 0 success, 1 failure while working, 2 bad input or usage.
"""

from __future__ import annotations

import importlib
import os
from collections.abc import Sequence

from homeplan.cli.c_output import c_output_aside
from homeplan.cli.parser import (
    COMMANDS,
    EXIT_BAD_INPUT,
    EXIT_FAILURE,
    EXIT_INTERRUPTED,
    EXIT_OK,
    build_parser,
)
from homeplan.cli.say import say
from homeplan.errors import InputError
from homeplan.plan.preflight import preflight

__all__ = ["build_parser", "debugging", "main"]


def debugging() -> bool:
    """True when ``HOMEPLAN_DEBUG`` asks for tracebacks (1, true, yes or on; 0 or empty: no)."""
    return os.environ.get("HOMEPLAN_DEBUG", "").strip().lower() in ("1", "true", "yes", "on")


# Commands whose named files are checked here, before the heavy imports. ``check`` reads them
# itself through the same safe readers, so that every problem of the file is listed in one run.
_READ_NAMED = {"plan", "capacity", "costs", "print", "export", "diff", "open"}


def _preflight(args) -> None:
    """The plan files of the command, and what they name, checked before the heavy imports."""
    paths = [args.a, args.b] if args.command == "diff" else [getattr(args, "file", None)]
    allow = getattr(args, "allow_outside", None) or []
    for path in paths:
        if path is None or (args.command == "open" and not os.path.lexists(path)):
            continue  # open without a file, or a new plan: nothing to read
        if args.command == "open" and (os.path.isdir(path) or str(path).endswith(".sqlite")):
            continue  # a portfolio's results: the app checks its store before opening it read-only
        preflight(path, allow, named=args.command in _READ_NAMED)


def main(argv: Sequence[str] | None = None) -> int:
    """Run one command; returns its exit code. Bad input is reported without a traceback."""
    parser = build_parser()
    args = parser.parse_args(argv)
    if not args.command:
        parser.print_help()
        return EXIT_BAD_INPUT
    module, function = COMMANDS[args.command]
    try:
        _preflight(args)
        # the command's group is imported only now: it loads the planner and its libraries
        run = getattr(importlib.import_module(f"homeplan.cli.{module}"), function)
        with c_output_aside():  # a C library's stray printf stays off the command's output
            return int(run(args) or 0)
    except InputError as exc:
        for problem in exc.problems:
            say(str(problem) if problem.path else f"homeplan: {problem.message}", err=True)
        n = len(exc.problems)
        if n > 1:
            say(f"{n} problems found", err=True)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        return EXIT_INTERRUPTED
    except BrokenPipeError:
        return EXIT_OK
    except OSError as exc:  # the system refused (disk full, I/O error): not a bug, say what failed
        if debugging():
            raise
        where = f" ({exc.filename})" if exc.filename else ""
        say(f"homeplan: could not finish: {exc.strerror or exc}{where}", err=True)
        return EXIT_FAILURE
    except Exception as exc:  # a bug or an environment failure: say so briefly
        if debugging():
            raise
        say(f"homeplan: internal error: {type(exc).__name__}: {exc}\n"
            "(set HOMEPLAN_DEBUG=1 to see the traceback, and please report it)", err=True)
        return EXIT_FAILURE
