"""Commands that write the outputs: ``print``, ``export`` and ``diff``.

Dates: the printed date and the calendar's DTSTAMP come from ``SOURCE_DATE_EPOCH`` when it is
set (reproducible outputs), else from the clock (:func:`homeplan.cli.common.now_utc`).
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

from homeplan.cli.common import load_and_plan, now_utc
from homeplan.cli.say import say
from homeplan.errors import InputError, Problem
from homeplan.plan.hashing import content_hash
from homeplan.plan.load import load_plan
from homeplan.plan.save import write_atomic
from homeplan.report.csvout import CSV_NAMES, write_csv_dir
from homeplan.report.diff import diff_inputs, diff_roadmaps, render_diff
from homeplan.report.html import render_html
from homeplan.report.ics import render_ics
from homeplan.report.jsonout import render_json
from homeplan.report.text import render_markdown, render_text
from homeplan.report.view import build_report
from homeplan.result.plan_result import PlanResult

__all__ = ["FORMATS", "cmd_diff", "cmd_export", "cmd_print", "render_summary"]

FORMATS = {".html": "html", ".htm": "html", ".md": "md", ".markdown": "md", ".txt": "txt", ".text": "txt"}


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


def render_summary(result: PlanResult, fmt: str, today: dt.date | None = None) -> str:
    """The printed summary of a result in ``fmt`` (``html``, ``md`` or ``txt``)."""
    report = build_report(result, today=today)
    if fmt == "html":
        return render_html(report)
    return render_markdown(report) if fmt == "md" else render_text(report)


def cmd_print(args) -> int:
    fmt = _format_for(args.output, args.format)
    outputs = [args.output] if args.output else []
    _, result = load_and_plan(args.file, allow=args.allow_outside, outputs=outputs, force=args.force,
                              use_store=not args.no_cache)
    text = render_summary(result, fmt, today=now_utc().date())
    if args.output and args.output != "-":
        write_atomic(args.output, text, backup=False, replace_readonly=args.force)
        say(f"wrote {args.output}", err=True)
    else:
        say(text, end="")
    return 0


def cmd_export(args) -> int:
    if not (args.csv or args.ics or args.json):
        raise InputError("nothing to export: give --csv DIR, --ics FILE and/or --json FILE")
    outputs = [o for o in (args.ics, args.json) if o]
    if args.csv:
        outputs += [str(Path(args.csv) / name) for name in CSV_NAMES]
    _, result = load_and_plan(args.file, allow=args.allow_outside, outputs=outputs, force=args.force,
                              use_store=not args.no_cache)
    written: list[str] = []
    if args.csv:
        written += [str(p) for p in write_csv_dir(result, args.csv, hourly=args.hourly,
                                                   replace_readonly=args.force)]
    if args.ics:
        written.append(str(write_atomic(args.ics, render_ics(result, now=now_utc()), backup=False,
                                        replace_readonly=args.force)))
    if args.json:
        text = render_json(result)
        if args.json == "-":
            say(text, end="")
        else:
            written.append(str(write_atomic(args.json, text, backup=False, replace_readonly=args.force)))
    for w in written:
        say(f"wrote {w}", err=True)
    return 0


def cmd_diff(args) -> int:
    if args.inputs_only:
        la, lb = load_plan(args.a, allow=args.allow_outside), load_plan(args.b, allow=args.allow_outside)
        road = None
    else:
        la, ra = load_and_plan(args.a, allow=args.allow_outside, use_store=not args.no_cache)
        lb, rb = load_and_plan(args.b, allow=args.allow_outside, use_store=not args.no_cache)
        road = diff_roadmaps(ra.roadmap, rb.roadmap)
    inputs = diff_inputs(la.plan, lb.plan)
    say(render_diff(args.a, args.b, inputs, road, content_hash(la.plan), content_hash(lb.plan)), end="")
    return 0
