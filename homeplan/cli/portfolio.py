"""Commands for many homes: ``portfolio`` (plan them all, add them up) and ``community`` (write
the invented demo community)."""

from __future__ import annotations

import os
import sys
import time
from pathlib import Path

from homeplan import __version__
from homeplan.cli.common import now_utc
from homeplan.cli.parser import EXIT_BAD_INPUT, EXIT_FAILURE, EXIT_INTERRUPTED, EXIT_OK
from homeplan.errors import InputError, Problem
from homeplan.portfolio.community import write_community
from homeplan.portfolio.inputs import Source, iter_inputs, open_source
from homeplan.portfolio.page import write_page
from homeplan.portfolio.rollup import Coincidence, default_coincidence, rollup, write_exports
from homeplan.portfolio.runner import Progress, WorkerLost, make_executor, run
from homeplan.portfolio.store import Store, store_path
from homeplan.report.table import text_table, usd

__all__ = ["cmd_community", "cmd_portfolio", "progress_line"]

PAGE_PROBLEMS = 30
"""Homes not planned listed on the summary page (homes.csv has them all)."""


def _duration(s: float) -> str:
    s = max(0, round(s))
    if s < 60:
        return f"{s} s"
    if s < 3600:
        return f"{s // 60} min {s % 60:02d} s"
    return f"{s // 3600} h {s % 3600 // 60:02d} min"


def progress_line(p: Progress, width: int = 24) -> str:
    """``[#####-------]  412/1000 homes  6.8 homes/s  about 1 min 26 s left  (3 problems)``."""
    share = p.stored_now / p.to_plan if p.to_plan else 1.0
    filled = round(share * width)
    rate = f"{p.rate_per_s:.1f} homes/s" if p.rate_per_s else "starting"
    left = p.left_s
    when = "done" if p.stored_now >= p.to_plan else (f"about {_duration(left)} left" if left is not None else "")
    problems = f"  ({p.problems} with problems)" if p.problems else ""
    return (f"[{'#' * filled}{'-' * (width - filled)}] {p.stored_now:>{len(str(p.to_plan))}}/{p.to_plan} "
            f"homes  {rate}  {when}{problems}")


class _Printer:
    """Progress on stderr: one line redrawn on a terminal, a line every 10 s otherwise."""

    def __init__(self, quiet: bool) -> None:
        self.quiet = quiet
        self.tty = sys.stderr.isatty()
        self.last = 0.0
        self.drawn = False

    def __call__(self, p: Progress) -> None:
        if self.quiet:
            return
        line = progress_line(p)
        if self.tty:
            print("\r" + line.ljust(100)[:max(40, os.get_terminal_size(2).columns - 1)], end="",
                  file=sys.stderr, flush=True)
            self.drawn = True
        elif time.monotonic() - self.last >= 10.0 or p.stored_now >= p.to_plan:
            self.last = time.monotonic()
            print(line, file=sys.stderr, flush=True)

    def end(self) -> None:
        if self.drawn:
            print(file=sys.stderr)
            self.drawn = False


def _coincidence(text: str | None) -> Coincidence:
    base = default_coincidence()
    if not text:
        return base
    try:
        winter, summer = (float(v) for v in text.split(","))
        return Coincidence(winter, summer, "given on the command line (--coincidence)")
    except ValueError:
        raise InputError(Problem("--coincidence", 0, 0, f"{text!r} is not two factors",
                                 "write WINTER,SUMMER, each above 0 and at most 1, e.g. 0.7,0.5")) from None


def _budgets(items: list[str] | None) -> dict[str, float]:
    out = {}
    for item in items or ():
        pid, _, amount = item.partition("=")
        try:
            value = float(amount.replace(",", "").lstrip("$"))
        except ValueError:
            value = -1.0
        if not pid or value < 0:
            raise InputError(Problem("--program-budget", 0, 0, f"{item!r} is not PROGRAM=USD",
                                     "e.g. --program-budget demo_state_hp_rebate=2000000"))
        out[pid.strip()] = value
    return out


def _open_store(args, source: Source) -> Store:
    """The run's store: a new one (with the input's list of homes), or the one to resume."""
    path = store_path(args.output)
    fingerprint = source.fingerprint()
    if args.resume:
        store = Store.open(path)
        meta = store.meta()
        if meta.get("fingerprint") != fingerprint or meta.get("kind") != source.kind:
            store.close()
            raise InputError(Problem(str(path), 0, 0, "the input has changed since this run began "
                                     f"({meta.get('input')})",
                                     "resume with the same input, or start a new run in another folder"))
        if not meta.get("inputs_complete"):  # stopped while the list of homes was written
            with store.conn:
                store.conn.execute("DELETE FROM inputs")
            store.add_inputs(iter_inputs(source))
            store.set_meta(inputs_complete=True)
        return store
    store = Store.create(path, {
        "kind": source.kind, "input": str(source.path.resolve()),
        "template": str(source.template_path.resolve()) if source.template_path else None,
        "fingerprint": fingerprint, "homeplan_version": __version__,
    })
    store.add_inputs(iter_inputs(source))
    store.set_meta(inputs_complete=True)
    return store


def _summary(store: Store, folder: Path, coincidence: Coincidence, budgets: dict[str, float],
             complete: bool) -> list[Path]:
    r = rollup(store, coincidence, budgets)
    files = write_exports(store, folder, r)
    problems = [(h, st, m) for _, h, st, m in store.homes(("seq", "home_id", "status", "message"))
                if st != "ok"][:PAGE_PROBLEMS]
    printed = now_utc().strftime("%Y-%m-%d %H:%M UTC")
    files.append(write_page(r, folder / "summary.html", complete=complete, printed=printed,
                            problems=problems))
    c = r.counts
    print(f"{c['done']} of {c['total']} homes in {folder}: {c['ok']} planned, "
          f"{c['infeasible']} without a roadmap that fits, {c['error']} with bad input, "
          f"{c['failed']} the planner could not plan.")
    if r.years:
        rows = [[y["year"], y["homes"], usd(y["spend_usd"]), usd(y["incentives_usd"]),
                 usd(y["fossil_avoided_usd"]), f"{y['emissions_avoided_t']:,.0f} t",
                 f"{y['added_winter_kw_diversified']:,.0f}", f"{y['added_summer_kw_diversified']:,.0f}",
                 y["service_upgrades"]] for y in r.years]
        print(text_table(["year", "homes", "spend", "incentives", "fossil $ avoided", "CO2 avoided",
                          "+winter kW", "+summer kW", "service upgrades"], rows, "lrrrrrrrr"))
        print("Added peaks are diversified: " + r.method + ".")
    for t in r.program_totals:
        if t.exhausted_year is not None:
            print(f"note: {t.name} ({t.program_id}): its budget of {usd(t.budget_usd or 0)} is used up "
                  f"in {t.exhausted_year}; the homes draw {usd(t.over_budget_usd)} more than it holds.")
    print(f"Files: {', '.join(p.name for p in files)} (all figures are planning estimates).")
    return files


def _problems(store: Store, most: int = 5) -> None:
    bad = [row for row in store.homes(("seq", "home_id", "status", "message"))
           if row[2] in ("error", "failed")]
    for _, home_id, status, message in bad[:most]:
        print(f"{'bad input' if status == 'error' else 'planner error'}: {home_id}: {message}",
              file=sys.stderr)
    if len(bad) > most:
        print(f"... and {len(bad) - most} more: see homes.csv (status and message columns)",
              file=sys.stderr)


def cmd_portfolio(args) -> int:
    """Plan every home of the input, store them, add them up and write the exports."""
    source = open_source(args.input, args.template)
    coincidence = _coincidence(args.coincidence)
    budgets = _budgets(args.program_budget)
    path = store_path(args.output)
    folder = path.parent
    if not args.resume and path.exists():
        raise InputError(Problem(str(path), 0, 0, "already holds a portfolio run",
                                 "add --resume to go on with it, or give another results folder"))
    try:  # reach the workers before a store is made: a failed start leaves nothing behind
        executor = make_executor(args.workers, args.scheduler)
    except ConnectionError as exc:
        print(f"homeplan: {exc}; check the address and that the scheduler is running", file=sys.stderr)
        return EXIT_FAILURE
    try:
        store = _open_store(args, source)
    except BaseException:
        executor.close(cancel=True)
        raise
    printer = _Printer(args.quiet)
    try:
        before = store.counts()
        if before["done"] == before["total"]:
            print(f"All {before['total']} homes are already planned in {folder}.", file=sys.stderr)
        try:
            outcome = run(source, store, executor, limit=args.limit, batch_size=args.batch_size,
                          progress=printer)
        except KeyboardInterrupt:
            printer.end()
            c = store.counts()
            print(f"Stopped: {c['done']} of {c['total']} homes are stored in {folder}; "
                  "run the same command with --resume to plan the rest.", file=sys.stderr)
            return EXIT_INTERRUPTED
        except WorkerLost as exc:
            printer.end()
            c = store.counts()
            print(f"homeplan: {exc}. {c['done']} of {c['total']} homes are stored in {folder}; "
                  "run the same command with --resume to plan the rest.", file=sys.stderr)
            return EXIT_FAILURE
        printer.end()
        c = store.counts()
        if outcome.seconds > 0 and outcome.stored:
            print(f"Planned {outcome.stored} homes in {_duration(outcome.seconds)} "
                  f"({outcome.stored / outcome.seconds:.1f} homes/s).", file=sys.stderr)
        store.set_meta(coincidence=[coincidence.winter, coincidence.summer], program_budgets=budgets)
        complete = c["done"] == c["total"]
        _summary(store, folder, coincidence, budgets, complete)
        if not complete:
            print(f"{c['total'] - c['done']} homes are not planned yet: run again with --resume.")
        _problems(store)
        if c["failed"]:
            return EXIT_FAILURE
        return EXIT_BAD_INPUT if c["error"] else EXIT_OK
    finally:
        store.close()


def cmd_community(args) -> int:
    """Write the invented demo community: homes.csv and template.yaml."""
    folder = Path(args.folder)
    folder.mkdir(parents=True, exist_ok=True)
    csv_path, template = write_community(folder, args.homes, args.seed, args.incentives)
    print(f"Wrote {csv_path} ({args.homes} invented homes, seed {args.seed}) and {template}.")
    print(f"Plan them: homeplan portfolio {csv_path} --template {template} -o RESULTS")
    return EXIT_OK
