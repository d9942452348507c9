"""CLI commands for the outputs: ``print``, ``export`` and ``diff``.

Wire them in with ``homeplan.report.commands.register(command)`` where ``command`` is the
helper of :func:`homeplan.cli.build_parser` (name, function, help, file=True) -> subparser.
Each command imports its engine inside the function, so ``homeplan --help`` stays fast.

Dates: the printed date and the calendar's DTSTAMP come from ``SOURCE_DATE_EPOCH`` when it is
set (reproducible outputs), else from the clock.

References
----------
Reproducible Builds, "SOURCE_DATE_EPOCH" specification, version 1.1.
"""

from __future__ import annotations

import datetime as dt
import os
import sys
from pathlib import Path
from typing import Any

from homeplan.errors import InputError, Problem

EXIT_OK = 0
FORMATS = {".html": "html", ".htm": "html", ".md": "md", ".markdown": "md", ".txt": "txt", ".text": "txt"}


def now_utc() -> dt.datetime:
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    if epoch:
        try:
            return dt.datetime.fromtimestamp(int(epoch), dt.UTC)
        except (ValueError, OverflowError, OSError):
            raise InputError(f"SOURCE_DATE_EPOCH must be a whole number of seconds, not {epoch!r}") from None
    return dt.datetime.now(dt.UTC)


def plan_result(path: str) -> tuple[Any, Any]:
    """Load a plan file and plan its roadmap: (LoadedPlan, PlanResult)."""
    from homeplan.errors import PlanRuleError
    from homeplan.plan.load import load_plan

    loaded = load_plan(path)
    try:
        from homeplan.pipeline import plan_roadmap
    except ImportError as exc:  # an incomplete installation, not bad input
        raise RuntimeError(f"the planner is not available in this build ({exc})") from None
    try:
        result = plan_roadmap(loaded.plan, base_dir=loaded.path.parent)
    except PlanRuleError as err:
        from homeplan.cli import located

        raise located(loaded, err) from None
    return loaded, result


def _format_for(output: str | None, fmt: str | None) -> str:
    if fmt:
        return fmt
    if not output:
        return "txt"
    ext = Path(output).suffix.lower()
    if ext not in FORMATS:
        raise InputError(Problem(output, 0, 0, f"cannot tell the format from the extension '{ext or '(none)'}'",
                                 "name the file .html, .md or .txt, or give --format"))
    return FORMATS[ext]


def render_summary(result: Any, fmt: str, today: dt.date | None = None) -> str:
    from homeplan.report.view import build_report

    report = build_report(result, today=today)
    if fmt == "html":
        from homeplan.report.html import render_html

        return render_html(report)
    from homeplan.report.text import render_markdown, render_text

    return render_markdown(report) if fmt == "md" else render_text(report)


def cmd_print(args) -> int:
    from homeplan.plan.save import write_atomic

    fmt = _format_for(args.output, args.format)
    _, result = plan_result(args.file)
    text = render_summary(result, fmt, today=now_utc().date())
    if args.output and args.output != "-":
        write_atomic(args.output, text, backup=False)
        print(f"wrote {args.output}", file=sys.stderr)
    else:
        sys.stdout.write(text)
    return EXIT_OK


def cmd_export(args) -> int:
    from homeplan.plan.save import write_atomic

    if not (args.csv or args.ics or args.json):
        raise InputError("nothing to export: give --csv DIR, --ics FILE and/or --json FILE")
    _, result = plan_result(args.file)
    written: list[str] = []
    if args.csv:
        from homeplan.report.csvout import write_csv_dir

        written += [str(p) for p in write_csv_dir(result, args.csv, hourly=args.hourly)]
    if args.ics:
        from homeplan.report.ics import render_ics

        written.append(str(write_atomic(args.ics, render_ics(result, now=now_utc()), backup=False)))
    if args.json:
        from homeplan.report.jsonout import render_json

        text = render_json(result)
        if args.json == "-":
            sys.stdout.write(text)
        else:
            written.append(str(write_atomic(args.json, text, backup=False)))
    for w in written:
        print(f"wrote {w}", file=sys.stderr)
    return EXIT_OK


def cmd_diff(args) -> int:
    from homeplan.plan.diff import diff_inputs, diff_roadmaps, render_diff
    from homeplan.plan.hashing import content_hash
    from homeplan.plan.load import load_plan

    if args.inputs_only:
        la, lb = load_plan(args.a), load_plan(args.b)
        road = None
    else:
        la, ra = plan_result(args.a)
        lb, rb = plan_result(args.b)
        road = diff_roadmaps(ra.roadmap, rb.roadmap)
    inputs = diff_inputs(la.plan, lb.plan)
    sys.stdout.write(render_diff(args.a, args.b, inputs, road, content_hash(la.plan), content_hash(lb.plan)))
    return EXIT_OK


def register(command) -> None:
    """Add ``print``, ``export`` and ``diff`` with the CLI's ``command`` helper."""
    sp = command("print", cmd_print, "print a summary of the roadmap (text, Markdown or a printable HTML page)")
    sp.add_argument("-o", "--output", help="write to this file (.html, .md or .txt) instead of stdout")
    sp.add_argument("--format", choices=("txt", "md", "html"), help="output format (default: from the "
                    "file extension, else txt)")
    sp = command("export", cmd_export, "export the roadmap as CSV files, an iCalendar file or JSON")
    sp.add_argument("--csv", metavar="DIR", help="write steps.csv, years.csv and monthly_energy.csv here")
    sp.add_argument("--hourly", action="store_true", help="with --csv: also hourly_energy.csv when available")
    sp.add_argument("--ics", metavar="FILE", help="write reminders (quotes, incentive deadlines, "
                    "replace-by dates) as an iCalendar file")
    sp.add_argument("--json", metavar="FILE", help="write the roadmap result as JSON ('-' for stdout)")
    sp = command("diff", cmd_diff, "show what changed between two plan files and their roadmaps", file=False)
    sp.add_argument("a", help="the earlier plan file (YAML)")
    sp.add_argument("b", help="the later plan file (YAML)")
    sp.add_argument("--inputs-only", action="store_true", help="compare the inputs only (no planning)")
