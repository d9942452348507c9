"""Commands that plan the home and print a view of the result: ``plan``, ``capacity``, ``costs``."""

from __future__ import annotations

import json
import textwrap
from dataclasses import asdict
from typing import Any

from homeplan import catalog
from homeplan.cli.common import load_and_plan, with_sensitivity
from homeplan.cli.parser import EXIT_BAD_INPUT
from homeplan.cli.say import say
from homeplan.plan.objectives import objective_words
from homeplan.report.fmt import money, service_verdict
from homeplan.report.risk import risk_lines, sensitivity_view
from homeplan.report.table import text_table
from homeplan.report.text import tornado_text
from homeplan.report.view import bill_fit_lines, comparison_lines, emergency_lines, payback_words
from homeplan.report.words import load_words

__all__ = ["cmd_capacity", "cmd_costs", "cmd_plan", "cmd_sensitivity"]


def _overrides(args) -> dict[tuple, Any]:
    out: dict[tuple, Any] = {}
    if getattr(args, "budget", None) is not None:
        out[("budget", "usd_per_year")] = args.budget
    if getattr(args, "objective", None):
        out[("choices", "objective")] = args.objective
    if getattr(args, "horizon", None) is not None:
        out[("budget", "horizon_years")] = args.horizon
    return out


def cmd_plan(args) -> int:
    loaded, result = load_and_plan(args.file, _overrides(args), allow=args.allow_outside,
                                   use_store=not args.no_cache)
    rm = result.roadmap
    if args.json:
        data = rm.to_dict()
        data["warnings"] = list(result.warnings)
        if result.solver is not None:
            data["solver"] = result.solver.to_dict()
        say(json.dumps(data, indent=2))
        return 0
    say(f"Roadmap for {rm.plan_name}, {rm.first_year}-{rm.last_year} "
          f"(aim: {objective_words(rm.objective).lower()}). Planning estimates.\n")
    for text in emergency_lines(rm):
        say(f"EMERGENCY: {text}\n")
    if rm.status != "ok":
        say(rm.infeasibility or "No plan meets every requirement.", err=True)
        return EXIT_BAD_INPUT  # the request cannot be met as asked: change the plan file
    rows = []
    for s in rm.steps:
        what = s.label + (f" ({s.variant})" if s.variant else "") + (f", {s.size}" if s.size else "")
        rows.append([s.year, what, money(s.cost_usd), money(s.incentives_usd), money(s.net_cost_usd),
                     payback_words(result, s.project_id), "; ".join(s.reasons)])
    say(text_table(["year", "step", "cost", "incentives", "you pay", "pays back in", "why this year"],
                     rows, "llrrrrl"))
    say()
    rows = []
    for y in rm.years:
        rows.append([y.year, money(y.spend_usd), money(y.incentives_usd), money(y.net_usd),
                     money(y.loan_payments_usd), money(y.total_bills_usd), money(y.bill_savings_usd),
                     f"{y.emissions_kg / 1000:.1f} t",
                     f"{y.service_headroom_amps:.0f} A"
                     + (f" ({y.service_load_pct:.0f} %, near its limit)" if y.service_near_limit else "")])
    say(text_table(["year", "projects", "incentives in", "out of pocket", "loan payments",
                      "energy bills", "bill savings", "CO2e", "service headroom"], rows, "lrrrrrrrr"))
    say()
    for m in rm.milestones:
        say(f"  {m.year}: {m.label}")
    rate = loaded.plan.budget.discount_rate_pct
    fin = result.finance.plan if result.finance else None
    returns = []
    if fin is not None and fin.irr_vs_like_for_like_pct is not None:
        returns.append(f"against like for like, a return of {fin.irr_vs_like_for_like_pct:.1f} % a year")
    if fin is not None and fin.irr_pct is not None:
        returns.append(f"against doing nothing, {fin.irr_pct:.1f} % a year")
    irr = "".join(f"; {r}" for r in returns)
    say()
    for what, value, means in comparison_lines(result):
        say(f"{what}: {value} ({means})")
    say(f"  (net present value at {rate:g} %: bill savings, minus spending net of incentives, plus the "
          f"breakdown repairs avoided and the equipment's remaining value at the end{irr})")
    fits = bill_fit_lines(rm)
    if fits:
        say("\nModel of today's home against your bills (planning estimate):")
        for line in fits:
            say(f"  {line}")
    lines = risk_lines(rm)
    if lines:
        say("\nPrice risk:")
        for line in lines:
            say(textwrap.fill(line, 100, initial_indent="  ", subsequent_indent="  "))
    for w in result.warnings:
        say(f"note: {w}")
    say()
    for c in rm.cautions:
        say(f"caution: {c}")
    return 0


def cmd_capacity(args) -> int:
    _, result = load_and_plan(args.file, allow=args.allow_outside, use_store=not args.no_cache)
    if args.json:
        say(json.dumps([asdict(s) for s in result.capacity], indent=2, allow_nan=False))
        return 0
    for s in result.capacity:
        say(f"== {s.label}: {s.method}")
        if not s.applies:  # a method that does not apply: say why
            for n in s.notes:
                say(f"   {n}")
            say()
            continue
        rows = [[load_words(r.name), f"{r.va:,.0f}", "" if r.factor is None else f"{r.factor:.0%}",
                 "" if r.counted_va is None else f"{r.counted_va:,.0f}", r.section] for r in s.rows]
        say(text_table(["load", "VA", "factor", "counted VA", "section"], rows, "lrrrl"))
        verdict = service_verdict(s.fits, s.near_limit, s.load_pct)
        say(f"total {s.total_va:,.0f} VA = {s.amps:.1f} A on a {s.service_amps:.0f} A service: "
            f"{verdict}, headroom {s.headroom_amps:.1f} A" + (f" ({s.remedy})" if s.remedy else ""))
        for n in s.notes:
            say(f"note: {n}")
        say()
    texts = catalog.cautions(result.plan.home.electrical.code_edition)
    for cid in ("electrical", "code_edition", "planning"):
        say(f"caution: {texts[cid]}")
    return 0


def _project_cautions(result, planned) -> dict[str, list[str]]:
    """Caution ids of each listed project: its catalog cautions, and those its planned step adds
    (a combustion test while fuel still burns)."""
    edition = result.plan.home.electrical.code_edition
    out: dict[str, list[str]] = {}
    for p in result.projects:
        ids = list(p.cautions)
        if p.id in planned:
            ids += [c for c in catalog.caution_ids_of(planned[p.id].cautions, edition) if c]
        out[p.id] = list(dict.fromkeys(ids))
    return out


def _caution_lines(result, planned) -> list[str]:
    """Each caution once, with the projects it concerns, then the planning caution."""
    texts = catalog.cautions(result.plan.home.electrical.code_edition)
    titles = catalog.caution_titles()
    labels = {p.id: p.label for p in result.projects}
    by_caution: dict[str, list[str]] = {}
    for pid, ids in _project_cautions(result, planned).items():
        for cid in ids:
            by_caution.setdefault(cid, []).append(labels[pid])
    if "electrical" in by_caution:
        by_caution.setdefault("code_edition", [])
    lines = []
    for cid, who in by_caution.items():
        if cid in texts:
            about = f" ({', '.join(dict.fromkeys(who))})" if who else ""
            lines.append(f"caution: {titles.get(cid, cid)}{about}: {' '.join(texts[cid].split())}")
    lines.append(f"caution: {' '.join(texts['planning'].split())}")
    return lines


def cmd_costs(args) -> int:
    _, result = load_and_plan(args.file, allow=args.allow_outside, use_store=not args.no_cache)
    rm = result.roadmap
    planned = {s.project_id: s for s in rm.steps}
    if args.json:
        texts = catalog.cautions(result.plan.home.electrical.code_edition)
        cautions = _project_cautions(result, planned)
        data = {
            "projects": [
                {"id": p.id, "label": p.label, "variant": p.variant, "size": p.size, "size_unit": p.size_unit,
                 "cost_today_usd": p.cost_usd, "cost_source": p.cost_source,
                 "cautions": [texts[c] for c in cautions[p.id] if c in texts],
                 "planned": planned[p.id].to_dict() if p.id in planned else None}
                for p in result.projects
            ],
            "years": [y.to_dict() for y in rm.years],
            "finance": asdict(result.finance) if result.finance else None,
            "programs": [{"id": u.program_id, "name": u.name, "kind": u.kind,
                          "paid_by_year": {str(k): v for k, v in u.paid_by_year.items()},
                          "caps": u.caps_note, "ends": u.ends} for u in result.programs],
        }
        say(json.dumps(data, indent=2, allow_nan=False))
        return 0
    rows = []
    for p in result.projects:
        s = planned.get(p.id)
        rows.append([p.label, money(p.cost_usd), s.year if s else "-", money(s.cost_usd) if s else "",
                     money(s.incentives_usd) if s else "", money(s.net_cost_usd) if s else "",
                     p.cost_source[:60]])
    for text in emergency_lines(rm):
        say(f"EMERGENCY: {text}\n")
    say("Costs today and in the planned year (before and after incentives). Planning estimates.\n")
    say(text_table(["project", "cost today", "year", "cost then", "incentives", "net", "cost from"],
                     rows, "lrrrrrl"))
    say()
    rows = [[y.year, money(y.spend_usd), money(y.incentives_usd), money(y.net_usd),
             money(y.loan_payments_usd), money(y.bill_savings_usd), money(y.cumulative_usd)] for y in rm.years]
    say(text_table(["year", "spend", "incentives in", "net", "loan payments", "bill savings", "cumulative"],
                     rows, "lrrrrrr"))
    fin = result.finance
    returns = fin.projects if fin else {}
    if returns:
        say("\nReturns per step (its cost beyond the like-for-like purchase it avoids when the old "
              "one is due, then the bill savings over its life):")
        rows = []
        for s in rm.steps:
            r = returns.get(s.project_id)
            if r is None:
                continue
            rows.append([s.year, s.label, money(s.net_cost_usd), money(r.avoided_usd),
                         money(r.incremental_cost_usd), money(r.first_year_savings_usd),
                         money(r.npv_over_life_usd), "-" if r.irr_pct is None else f"{r.irr_pct:.1f} %",
                         payback_words(result, s.project_id)])
        say(text_table(["year", "step", "you pay", "avoids", "extra cost", "saves in year 1", "NPV over life",
                        "IRR", "pays back in"], rows, "llrrrrrrr"))
    plan_r = fin.plan if fin else None
    if plan_r:
        irr = "-" if plan_r.irr_pct is None else f"{plan_r.irr_pct:.1f} %"
        pb = ("not within the horizon" if plan_r.simple_payback_years is None
              else f"{plan_r.simple_payback_years:.1f} years")
        lirr = "-" if plan_r.irr_vs_like_for_like_pct is None else f"{plan_r.irr_vs_like_for_like_pct:.1f} %"
        lpb = ("not within the horizon" if plan_r.simple_payback_vs_like_for_like_years is None
               else f"{plan_r.simple_payback_vs_like_for_like_years:.1f} years")
        say(f"\nThe whole plan against replacing like-for-like when due: IRR {lirr}, simple payback {lpb}.")
        say(f"The whole plan against doing nothing: IRR {irr}, simple payback {pb} (expected "
              "breakdown costs avoided and the equipment's remaining value included).")
    hedge = fin.solar_hedge if fin else None
    if hedge:
        what = "solar and battery" if hedge.includes_battery else "solar"
        verb = "lock" if hedge.includes_battery else "locks"
        say(f"Your {what} {verb} in electricity at {hedge.lcoe_usd_per_kwh * 100:.1f} c/kWh over "
              f"{hedge.life_years} years; the utility's price, rising with inflation, averages "
              f"{hedge.utility_levelised_usd_per_kwh * 100:.1f} c/kWh over the same years "
              f"({hedge.utility_first_year_usd_per_kwh * 100:.1f} c when the panels go up, "
              f"{hedge.utility_last_year_usd_per_kwh * 100:.1f} c in their last year).")
    if result.programs:
        say("\nIncentive programs used:")
        for u in result.programs:
            paid = ", ".join(f"{y}: {money(v)}" for y, v in u.paid_by_year.items())
            say(f"  {u.name} ({u.kind.replace('_', ' ')}): {paid}" + (f"; ends {u.ends}" if u.ends else ""))
    say()
    for line in _caution_lines(result, planned):
        say(line)
    return 0


def cmd_sensitivity(args) -> int:
    use_store = not getattr(args, "no_cache", False)
    loaded, result = load_and_plan(args.file, allow=args.allow_outside, use_store=use_store)
    if result.roadmap.status != "ok":
        say(result.roadmap.infeasibility or "No plan meets every requirement.", err=True)
        return EXIT_BAD_INPUT
    result = with_sensitivity(loaded, result, use_store=use_store)
    if args.json:
        say(json.dumps(result.sensitivity.to_dict(), indent=2, allow_nan=False))
        return 0
    view = sensitivity_view(result)
    say("What moves the net present value most: each assumption at a low and a high setting, the "
          "home re-planned. Planning estimates.\n")
    if view is None:
        say("No assumption could be varied for this plan.")
        return 0
    for line in view.lines:
        say(textwrap.fill(line, 100))
    say()
    say(tornado_text(view.base_usd, view.bars))
    say()
    say(text_table(list(view.table.headers), [list(r) for r in view.table.rows], view.table.align.replace("n", "l")))
    say(textwrap.fill(view.table.note, 100))
    return 0
