"""Commands that write the outputs: ``print``, ``export`` and ``diff``.

Dates: the printed date and the calendar's DTSTAMP come from ``SOURCE_DATE_EPOCH`` when it is
set (reproducible outputs), else from the clock (:func:`homeplan.cli.common.now_utc`).
"""

from __future__ import annotations

import datetime as dt
import json
from pathlib import Path

from homeplan import __version__
from homeplan.cli.common import load_and_plan, now_utc, refuse_outputs_over_inputs, with_sensitivity
from homeplan.cli.say import say
from homeplan.errors import InputError, Problem
from homeplan.plan.alternatives import BASE_NAME, options
from homeplan.plan.hashing import content_hash
from homeplan.plan.load import load_plan
from homeplan.plan.save import write_atomic
from homeplan.planner.chain import plan_roadmap
from homeplan.planner.context import PlannerCache
from homeplan.report.compare import Comparison, build_comparison, comparison_json
from homeplan.report.csvout import CSV_NAMES, write_csv_dir
from homeplan.report.diff import diff_inputs, diff_roadmaps, render_diff
from homeplan.report.html import comparison_page, render_html
from homeplan.report.ics import render_ics
from homeplan.report.jsonout import render_json
from homeplan.report.text import comparison_markdown, comparison_text, render_markdown, render_text
from homeplan.report.view import build_report
from homeplan.result.plan_result import PlanResult

__all__ = ["FORMATS", "cmd_compare", "cmd_diff", "cmd_export", "cmd_print", "planned_options", "render_summary"]

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


def render_summary(result: PlanResult, fmt: str, today: dt.date | None = None,
                   comparison: Comparison | None = None) -> str:
    """The printed summary of a result in ``fmt`` (``html``, ``md`` or ``txt``)."""
    report = build_report(result, today=today, comparison=comparison)
    if fmt == "html":
        return render_html(report)
    return render_markdown(report) if fmt == "md" else render_text(report)


def cmd_print(args) -> int:
    fmt = _format_for(args.output, args.format)
    outputs = [args.output] if args.output else []
    loaded, result = load_and_plan(args.file, allow=args.allow_outside, outputs=outputs, force=args.force,
                                   use_store=not args.no_cache)
    if not getattr(args, "quick", False):
        result = with_sensitivity(loaded, result, use_store=not args.no_cache)
    comparison = None
    if result.plan.alternatives:
        comparison = build_comparison([(name, r) for name, _, r in
                                       planned_options([args.file], args.allow_outside)])
    text = render_summary(result, fmt, today=now_utc().date(), comparison=comparison)
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


def planned_options(files: list[str], allow: list[str] | None = None, outputs: list[str] | None = None,
                    force: bool = False) -> list[tuple[str, str, PlanResult]]:
    """Every option of the plan files - each file as planned, then its named options - planned,
    as ``(name, file, result)``. Names are the option's own with one file, else prefixed by the
    file's name. ``allow``: files outside a plan's folder the user lets it name; ``outputs``:
    files the command writes, refused when one is a file it reads (unless ``force``)."""
    out = []
    for f in files:
        loaded = load_plan(f, allow=allow or ())
        if not force:
            refuse_outputs_over_inputs(loaded, outputs or [])
        cache = PlannerCache()
        for name, opt in options(loaded):
            label = name if len(files) == 1 else (Path(f).stem if name == BASE_NAME else f"{Path(f).stem}: {name}")
            out.append((label, f, plan_roadmap(opt, cache=cache)))
    return out


def cmd_compare(args) -> int:
    fmt = _format_for(args.output, args.format) if (args.output or args.format) else "txt"
    outputs = [args.output] if args.output else []
    planned = planned_options(list(args.files), args.allow_outside, outputs, args.force)
    if len(planned) < 2:
        raise InputError(Problem(args.files[0], 0, 0, "nothing to compare: one plan without options",
                                 "give two or more plan files, or add alternatives: to the plan "
                                 "(see docs/plan-format.md)"))
    if args.json:
        say(json.dumps(comparison_json(planned), indent=2, allow_nan=False))
        return 0
    c = build_comparison([(n, r) for n, _, r in planned])
    if fmt == "html":
        text = comparison_page(c, "Options side by side: " + ", ".join(c.names),
                               now_utc().date().isoformat(), __version__)
    elif fmt == "md":
        text = "# " + "Options side by side\n\n" + comparison_markdown(c).split("\n", 2)[2]
    else:
        text = ("Options side by side. Planning estimates.\n\n" + comparison_text(c).split("\n", 2)[2])
    if args.output and args.output != "-":
        write_atomic(args.output, text, backup=False, replace_readonly=args.force)
        say(f"wrote {args.output}", err=True)
    else:
        say(text, end="")
    return 0
