"""Commands that describe a plan file before planning it: ``check``, ``schema``, ``graph``,
``lifecycle``."""

from __future__ import annotations

import json
from dataclasses import asdict
from typing import TYPE_CHECKING

from homeplan.cli.say import say
from homeplan.errors import PlanRuleError
from homeplan.plan.alternatives import options
from homeplan.plan.load import LoadedPlan, load_plan
from homeplan.plan.model import Plan
from homeplan.plan.save import write_atomic
from homeplan.plan.schema import plan_json_schema
from homeplan.planner import candidates, lifecycle
from homeplan.planner.programs import load_programs
from homeplan.report.table import text_table, usd
from homeplan.units import display_area, display_temp

if TYPE_CHECKING:
    import networkx as nx

__all__ = ["cmd_check", "cmd_graph", "cmd_lifecycle", "cmd_schema", "plan_summary"]


def _graph_checked(loaded: LoadedPlan) -> nx.DiGraph:
    try:
        return candidates.build_graph(loaded.plan)
    except PlanRuleError as err:
        raise loaded.locate(err) from None


def _order_checked(loaded: LoadedPlan) -> candidates.UpgradeOrder:
    """The upgrade graph's projects and order, checked, without building the graph (networkx)."""
    try:
        return candidates.upgrade_order(loaded.plan)
    except PlanRuleError as err:
        raise loaded.locate(err) from None


def _check_files(loaded: LoadedPlan) -> tuple[list[PlanRuleError], tuple[str, ...]]:
    """The files a plan names must be readable and hold valid data (incentives, weather, meter),
    read the way the planner reads them: every problem found, and what the meter file tells,
    in words."""
    plan = loaded.plan
    folder = loaded.folder
    errors: list[PlanRuleError] = []
    reading = None
    try:
        load_programs(plan, folder)
    except PlanRuleError as err:
        errors.append(err)
    u = plan.usage
    if u is not None and u.meter_file:
        # the meter's readings are numpy arrays: its reader is loaded only when a file is named
        from homeplan.planner.meter import read_meter

        try:
            _, reading = read_meter(plan, folder)
        except PlanRuleError as err:
            errors.append(err)
    bill_year = u.weather_file if u is not None else None
    if plan.home.climate.weather_file or bill_year:
        # a weather year is read by the energy engine (numpy, pandas, pvlib): only when named
        from homeplan.planner.basis import (
            BILL_YEAR_WEATHER_KEY,
            CLIMATE_WEATHER_KEY,
            read_weather_file,
        )

        for name, loc in ((plan.home.climate.weather_file, CLIMATE_WEATHER_KEY),
                          (bill_year, BILL_YEAR_WEATHER_KEY)):
            try:
                if name:
                    read_weather_file(folder, name, loc)
            except PlanRuleError as err:
                errors.append(err)
    if reading is None:
        return errors, ()
    m = reading.series
    return errors, (f"{reading.path.name}: {m.kwh.size:,} readings of {m.interval_s // 60} minutes over "
                    f"{m.span_days:.0f} days, {m.total_kwh:,.0f} kWh, highest {reading.peak_kw:.1f} kW",
                    *reading.notes)


def plan_summary(plan: Plan, order: candidates.UpgradeOrder | None = None) -> str:
    """A few lines describing a plan: the home, its service, appliances, cars and budget (and
    the upgrades that apply, given its ``order``)."""
    h = plan.home
    units = plan.display.units
    where = (h.location.place if h.location and h.location.place else
             f"{h.location.latitude:.2f}, {h.location.longitude:.2f}" if h.location else "climate given")
    lines = [f"  home:       {h.name or 'unnamed'} - {display_area(h.floor_area_ft2, units)}, {where}"]
    c = h.climate
    if c.heating_design_f is not None or c.hdd65 is not None:
        parts = []
        if c.hdd65 is not None:
            parts.append(f"HDD65 {c.hdd65:,.0f}")
        if c.heating_design_f is not None:
            parts.append(f"heating design {display_temp(c.heating_design_f, units)}")
        lines.append(f"  climate:    {', '.join(parts)}")
    e = h.electrical
    lines.append(f"  service:    {e.service_amps} A, busbar {e.busbar_rating_amps} A, "
                 f"main {e.main_rating_amps} A")
    outs = {o.key: o for o in lifecycle.plan_outlooks(plan)}
    for a in plan.appliances:
        o = outs[a.key]
        age = f"{o.age_years:.0f} yr" + (" (assumed)" if o.install_year_assumed else "")
        lines.append(f"  appliance:  {a.key}: {o.label}, {age}, likely end {o.expected_end_year}")
    for i, v in enumerate(plan.vehicles):
        distance = (f"{v.miles_per_year * 1.609344:,.0f} km/yr" if units == "si"
                    else f"{v.miles_per_year:,.0f} mi/yr")
        lines.append(f"  vehicle:    {plan.vehicle_key(i)}: {v.name or v.fuel} ({v.fuel}, {distance})")
    b = plan.budget
    lines.append(f"  budget:     {usd(b.usd_per_year)} a year from {plan.first_year} for "
                 f"{b.horizon_years} years" + (", unspent money carries over" if b.carryover else ""))
    if order is not None:
        ids = order.project_ids
        lines.append(f"  upgrades:   {len(ids)} candidates: {', '.join(ids)}")
    if plan.usage is None:
        lines.append("  note:       no bills given; energy use will be estimated from floor area")
    return "\n".join(lines)


def cmd_check(args) -> int:
    """Every problem of the file at once: its shape and rules (the loader), the project ids its
    choices name and the files it names."""
    loaded = load_plan(args.file, allow=args.allow_outside)
    errors, meter = _check_files(loaded)
    order = None
    try:
        order = candidates.upgrade_order(loaded.plan)
    except PlanRuleError as err:
        errors.insert(0, err)
    if errors:
        try:
            PlanRuleError.gather(errors)
        except PlanRuleError as err:
            raise loaded.locate(err) from None
    named = options(loaded)[1:]  # each option validated, its problems located in the file
    for _, opt in named:
        _order_checked(opt)
    say(f"{args.file}: ok")
    say(plan_summary(loaded.plan, order))
    if named:
        say(f"options: {', '.join(name for name, _ in named)} (compare them: homeplan compare {args.file})")
    for line in meter:
        say(f"  meter:      {line}")
    if loaded.migrated_from:
        say(f"note: migrated from plan format {loaded.migrated_from}; saving writes the new format")
    return 0


def cmd_schema(args) -> int:
    text = json.dumps(plan_json_schema(), indent=2) + "\n"
    if args.output:
        write_atomic(args.output, text, backup=False, replace_readonly=args.force)
    else:
        say(text, end="")
    return 0


def cmd_graph(args) -> int:
    loaded = load_plan(args.file)
    g = _graph_checked(loaded)
    if args.dot:
        say(candidates.to_dot(g), end="")
        return 0
    if args.json:
        data = {
            "projects": {n: {"label": g.nodes[n]["candidate"].label, "kind": g.nodes[n]["candidate"].kind,
                             "replaces": list(g.nodes[n]["candidate"].replaces)}
                         for n in candidates.project_nodes(g)},
            "edges": [{"from": u, "to": v, "kind": d["kind"], "why": d.get("why", "")}
                      for u, v, d in g.edges(data=True)],
            "layers": candidates.layers(g),
            "any_of": candidates.any_of_groups(g),
        }
        say(json.dumps(data, indent=2))
        return 0
    say(f"Upgrades that apply to {loaded.plan.home.name or args.file}, in order of what can come first:")
    for i, layer in enumerate(candidates.layers(g), 1):
        say(f"\n  {i}. " + ", ".join(layer))
        for n in layer:
            for u, _, d in g.in_edges(n, data=True):
                if d["kind"] == "any_of":
                    continue
                word = "after" if d["kind"] == "requires" else "better after"
                say(f"       {n}: {word} {u} ({d.get('why', '')})")
    for grp in candidates.any_of_groups(g).values():
        say(f"\n  Any one of: {' | '.join(grp['alternatives'])}")
        say(f"    gives {grp['label']} for: {', '.join(grp['needed_by'])}")
        say("    (the capacity check decides which, if any, is needed)")
    return 0


def cmd_lifecycle(args) -> int:
    plan = load_plan(args.file).plan
    years = args.years
    outs = lifecycle.plan_outlooks(plan, years)
    first = plan.first_year
    if args.json:
        say(json.dumps([asdict(o) for o in outs], indent=2))
        return 0
    say(f"End-of-life outlook from {first} (Weibull model from catalog service lives; "
          "planning estimates)\n")
    rows = []
    for o in outs:
        age = f"{o.age_years:.0f}" + ("?" if o.install_year_assumed else "")
        rows.append([o.key, o.label, age, f"{o.median_life_years:.0f}", o.expected_end_year,
                     o.replace_by_year, *(f"{h:.0f}/{c:.0f}" for h, c in
                                          zip(o.hazard_pct[:years], o.cumulative_failure_pct[:years],
                                              strict=True))])
    headers = ["id", "what", "age", "median life", "likely end", f"replace by ({plan.choices.replace_at_risk_pct:.0f}% risk)",
               *(str(first + i) for i in range(years))]
    say(text_table(headers, rows, "llrrrr" + "r" * years))
    say("\nEach year: the chance (%) it fails that year if it has lasted until then / the chance it "
          "has failed\nby the end of that year, from today. The first rises with age for parts that wear out.")
    if any(o.install_year_assumed for o in outs):
        say("? install year unknown: assumed half-way through its median life.")
    return 0
