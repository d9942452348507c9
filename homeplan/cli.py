"""The ``homeplan`` command line. Heavy libraries are imported inside each command.

Exit codes: 0 success, 1 failure while working, 2 bad input or usage.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
from collections.abc import Callable, Sequence

from homeplan import __version__
from homeplan.errors import InputError, PlanRuleError, Problem

EXIT_OK, EXIT_FAILURE, EXIT_BAD_INPUT = 0, 1, 2


class _Parser(argparse.ArgumentParser):
    def error(self, message: str):  # usage errors: exit 2 with a hint, as argparse does
        self.print_usage(sys.stderr)
        self.exit(EXIT_BAD_INPUT, f"{self.prog}: error: {message} (see '{self.prog} --help')\n")


def _positive(text: str, most: int) -> int:
    try:
        n = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number") from None
    if not 1 <= n <= most:
        raise argparse.ArgumentTypeError(f"{n} is outside 1-{most}")
    return n


def _load(path: str):
    from homeplan.plan.load import load_plan

    return load_plan(path)


def located(loaded, err: PlanRuleError) -> InputError:
    """Turn a rule error from the core into a located problem in the user's file."""
    from homeplan.plan.load import _Positions

    line, col = _Positions(loaded.document, {}).locate(err.loc, on_key=True)
    return InputError(Problem(str(loaded.path), line, col, err.message, err.hint))


def _graph_checked(loaded):
    from homeplan import graph

    try:
        return graph.build_graph(loaded.plan)
    except PlanRuleError as err:
        raise located(loaded, err) from None


def _check_files(loaded) -> None:
    """The files a plan refers to must exist and hold valid data (incentives, weather)."""
    from pathlib import Path

    from homeplan.incentive_adapter import load_programs

    plan = loaded.plan
    base = loaded.path.parent
    try:
        load_programs(plan, base)
        wf = plan.home.climate.weather_file
        if wf and not (Path(wf) if Path(wf).is_absolute() else base / wf).exists():
            raise PlanRuleError(("home", "climate", "weather_file"), f"weather file not found: {wf}",
                                "give a path relative to the plan file, or remove the key")
    except PlanRuleError as err:
        raise located(loaded, err) from None


# ----------------------------------------------------------------------------- commands


def cmd_check(args) -> int:
    from homeplan.summary import plan_summary

    loaded = _load(args.file)
    g = _graph_checked(loaded)
    _check_files(loaded)
    print(f"{args.file}: ok")
    print(plan_summary(loaded.plan, g))
    if loaded.migrated_from:
        print(f"note: migrated from plan format {loaded.migrated_from}; saving writes the new format")
    return EXIT_OK


def cmd_schema(args) -> int:
    from homeplan.plan.schema import plan_json_schema

    text = json.dumps(plan_json_schema(), indent=2) + "\n"
    if args.output:
        from homeplan.plan.save import write_atomic

        write_atomic(args.output, text, backup=False)
    else:
        sys.stdout.write(text)
    return EXIT_OK


def cmd_graph(args) -> int:
    from homeplan import graph

    loaded = _load(args.file)
    g = _graph_checked(loaded)
    if args.dot:
        sys.stdout.write(graph.to_dot(g))
        return EXIT_OK
    if args.json:
        data = {
            "projects": {n: {"label": g.nodes[n]["candidate"].label, "kind": g.nodes[n]["candidate"].kind,
                             "replaces": list(g.nodes[n]["candidate"].replaces)}
                         for n in graph.project_nodes(g)},
            "edges": [{"from": u, "to": v, "kind": d["kind"], "why": d.get("why", "")}
                      for u, v, d in g.edges(data=True)],
            "layers": graph.layers(g),
            "any_of": graph.any_of_groups(g),
        }
        print(json.dumps(data, indent=2))
        return EXIT_OK
    print(f"Upgrades that apply to {loaded.plan.home.name or args.file}, in order of what can come first:")
    for i, layer in enumerate(graph.layers(g), 1):
        print(f"\n  {i}. " + ", ".join(layer))
        for n in layer:
            for u, _, d in g.in_edges(n, data=True):
                if d["kind"] == "any_of":
                    continue
                word = "after" if d["kind"] == "requires" else "better after"
                print(f"       {n}: {word} {u} ({d.get('why', '')})")
    for grp in graph.any_of_groups(g).values():
        print(f"\n  Any one of: {' | '.join(grp['alternatives'])}")
        print(f"    gives {grp['label']} for: {', '.join(grp['needed_by'])}")
        print("    (the capacity check decides which, if any, is needed)")
    return EXIT_OK


def cmd_lifecycle(args) -> int:
    from homeplan import lifecycle
    from homeplan.report.table import text_table

    loaded = _load(args.file)
    plan = loaded.plan
    years = args.years
    outs = lifecycle.plan_outlooks(plan, years)
    first = plan.first_year
    if args.json:
        from dataclasses import asdict

        print(json.dumps([asdict(o) for o in outs], indent=2))
        return EXIT_OK
    print(f"End-of-life outlook from {first} (Weibull model from catalog service lives; "
          "planning estimates)\n")
    rows = []
    for o in outs:
        age = f"{o.age_years:.0f}" + ("?" if o.install_year_assumed else "")
        rows.append([o.key, o.label, age, f"{o.median_life_years:.0f}", o.expected_end_year,
                     o.replace_by_year, *(f"{p:.0f}%" for p in o.yearly_failure_pct[:years])])
    headers = ["id", "what", "age", "median life", "likely end", f"replace by ({plan.choices.replace_at_risk_pct:.0f}% risk)",
               *(str(first + i) for i in range(years))]
    print(text_table(headers, rows, "llrrrr" + "r" * years))
    print("\nThe year columns give the chance it fails in that year, given it works today.")
    if any(o.install_year_assumed for o in outs):
        print("? install year unknown: assumed half-way through its median life.")
    return EXIT_OK


# ----------------------------------------------------------------------------- wiring


def build_parser() -> argparse.ArgumentParser:
    p = _Parser(prog="homeplan", description="Plan a whole-home electrification, year by year.")
    p.add_argument("--version", action="version", version=f"homeplan {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)

    def command(name: str, func: Callable, help_: str, file: bool = True) -> argparse.ArgumentParser:
        sp = sub.add_parser(name, help=help_, description=help_)
        if file:
            sp.add_argument("file", help="plan file (YAML)")
        sp.set_defaults(func=func)
        return sp

    command("check", cmd_check, "validate a plan file and print a short summary")
    sp = command("schema", cmd_schema, "print the JSON Schema of the plan file format", file=False)
    sp.add_argument("-o", "--output", help="write to this file instead of stdout")
    sp = command("graph", cmd_graph, "show which upgrades apply and what must come before what")
    sp.add_argument("--dot", action="store_true", help="print Graphviz DOT")
    sp.add_argument("--json", action="store_true", help="print JSON")
    sp = command("lifecycle", cmd_lifecycle, "show each appliance's age, end of life and failure risk")
    sp.add_argument("--years", type=lambda t: _positive(t, 30), default=8,
                    help="years of risk to show (1-30, default 8)")
    sp.add_argument("--json", action="store_true", help="print JSON")
    _register_more(command)
    return p


def _register_more(command) -> None:
    """Commands implemented in other modules (each imports its engine lazily)."""
    from homeplan import commands

    commands.register(command)


def main(argv: Sequence[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if not getattr(args, "func", None):
        parser.print_help()
        return EXIT_BAD_INPUT
    try:
        return int(args.func(args) or 0)
    except InputError as exc:
        for problem in exc.problems:
            print(str(problem) if problem.path else f"homeplan: {problem.message}", file=sys.stderr)
        n = len(exc.problems)
        if n > 1:
            print(f"{n} problems found", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:
        return EXIT_OK
    except Exception as exc:  # a bug or an environment failure: say so briefly
        if os.environ.get("HOMEPLAN_DEBUG"):
            raise
        print(f"homeplan: internal error: {type(exc).__name__}: {exc}\n"
              "(set HOMEPLAN_DEBUG=1 to see the traceback, and please report it)", file=sys.stderr)
        return EXIT_FAILURE


if __name__ == "__main__":
    sys.exit(main())
