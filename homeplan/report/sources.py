"""Each figure of a view with where it comes from, in words: the plan file, homeplan's built-in
tables (their source column, put plainly), or a computation and its method.

The app's sources panel ('w') shows these lines. Values are formatted as on the views; no ids,
keys of the file format or Python values appear.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Any

from homeplan.plan.text import clean
from homeplan.report.fmt import money
from homeplan.report.view import assumption_lines, comparison_lines
from homeplan.report.words import caps_words

__all__ = [
    "PLAN_FILE",
    "Sourced",
    "assumption_sources",
    "capacity_sources",
    "catalog_source_words",
    "energy_sources",
    "incentive_files_words",
    "money_sources",
    "program_sources",
    "step_sources",
]

PLAN_FILE = "your plan file"


@dataclass(frozen=True)
class Sourced:
    """One figure: what it is, its value as shown, where it comes from, and the thing it belongs
    to ("" for the plan as a whole; a step's label)."""

    what: str
    value: str
    source: str
    group: str = ""


_MARKERS = (
    (re.compile(r"^catalog typical estimate:\s*", re.I), ""),
    (re.compile(r",\s*(from memory|common practice, no source)\s*(?=\))", re.I), ""),
    (re.compile(r"\(\s*(from memory|common practice, no source)\s*\)", re.I), ""),
    (re.compile(r"(from memory|common practice, no source)\s*:?\s*", re.I), ""),
)


def catalog_source_words(source: str) -> str:
    """A row's source column as a homeowner reads it.

    A published reference is named as it stands ("NEC 2023 Table 430.248: ..."). A figure the
    table marks as recalled or as a trade rule of thumb is called what it is (a typical figure
    in the trade, not checked against a published table) followed by what the row describes.
    """
    text = clean(source).strip()
    if text.lower().startswith("your quote"):
        return text
    text = text.split(";")[0]  # the row's main reference (later clauses are working notes)
    recalled = bool(re.search(r"from memory|common practice|no source", text, re.I))
    for pattern, repl in _MARKERS:
        text = pattern.sub(repl, text)
    text = re.sub(r"\s+", " ", text).strip(" ;,:")
    text = re.sub(r"\b(\d+(?:\.\d+)?) t\b", r"\1 tons", text)
    if not recalled:
        return f"homeplan's built-in table, after {text}" if text else "homeplan's built-in table"
    what = f": {text}" if text else ""
    return ("homeplan's built-in table, a typical figure in the trade (an estimate, recalled "
            f"without checking a published table){what}")


def _given(section: Any, name: str) -> bool:
    return name in getattr(section, "model_fields_set", set())


def incentive_files_words(plan: Any) -> str:
    """The incentive programs' files named plainly (or that the plan has none)."""
    files = [clean(f) for f in plan.incentive_files]
    inline = [x for x in plan.incentives if isinstance(x, dict)]
    parts = []
    if files:
        parts.append("the incentive file" + ("s " if len(files) > 1 else " ") + ", ".join(files)
                     + " named in your plan file")
    if inline:
        parts.append("the programs written in your plan file")
    return " and ".join(parts) if parts else "no incentive programs (your plan file names none)"


_ASSUMPTION_SOURCES = {
    "Electricity price": ("prices", "electricity"),
    "Solar export": ("prices", "electricity"),
    "Gas price": ("prices", "gas"),
    "Oil price": ("prices", "oil"),
    "Propane price": ("prices", "propane"),
    "Gasoline price": ("prices", "gasoline"),
    "Price changes": ("prices", "inflation_pct"),
    "Discount rate": ("budget", "discount_rate_pct"),
    "Budgets by year": ("budget", "by_year"),
    "Loan": ("budget", "loans"),
    "Goal": ("choices", "objective"),
    "Grid emissions": ("prices", "grid_kg_co2_per_kwh"),
    "Price rise used": ("prices", "inflation_pct"),
}

_COMPUTED = {
    "Weather": "homeplan's built-in typical weather year for your climate (or the weather file "
               "your plan names)",
    "Heat loss worked out from": "computed: fitted to the monthly bills in your plan file",
    "Heat the home loses on the design day": "computed: the fitted heat loss at your home's "
                                             "heating design temperature",
    "Conventions": "how homeplan counts money and time",
    "Model against your bills": "computed: the hour-by-hour model's use against the bills in "
                                "your plan file",
    "Incentive files": PLAN_FILE,
}


def assumption_sources(plan: Any, result: Any) -> list[Sourced]:
    """The assumptions behind every figure (the printout's lines), each with its source."""
    out = []
    for what, value in assumption_lines(plan, result):
        where = _ASSUMPTION_SOURCES.get(what)
        if where is not None:
            section = getattr(plan, where[0])
            source = (PLAN_FILE if _given(section, where[1])
                      else "homeplan's default (your plan file does not set it)")
        elif what == "Costs without a quote":
            source = "homeplan's built-in price tables; each row names its reference"
        elif what == "Your quotes":
            source = PLAN_FILE
        elif what in _COMPUTED:
            source = _COMPUTED[what]
        elif what.startswith("Incentive"):
            source = incentive_files_words(plan)
        else:
            source = "homeplan, from your plan file"
        out.append(Sourced(what, value, source))
    return out


def step_sources(step: Any, info: Any, plan: Any) -> list[Sourced]:
    """One roadmap step's figures: its price, each incentive, what the household pays, its year.

    ``info`` is the project's catalog information (``ProjectInfo``) or None.
    """
    label = clean(step.label)
    out = []
    if info is not None:
        out.append(Sourced("Price today", money(info.cost_usd),
                           catalog_source_words(info.cost_source)))
    inflation = plan.prices.inflation_pct
    out.append(Sourced(f"Price in {step.year}", money(step.cost_usd),
                       f"computed: today's price raised by inflation ({inflation:g} % a year) "
                       f"to {step.year}" if info is not None and abs(info.cost_usd - step.cost_usd) > 0.5
                       else "computed: today's price"))
    files = ("your plan's incentive files (listed under the assumptions)"
             if plan.incentive_files else "your plan file")
    for line in step.incentives:
        how = {"point_of_sale": "taken off the invoice", "tax_credit": "a tax credit",
               "rebate": "a rebate"}.get(line.kind, clean(line.kind).replace("_", " "))
        out.append(Sourced(clean(line.program), money(line.amount_usd),
                           f"computed by the program's rules for your household ({how}); "
                           f"the program is in {files}"))
    out.append(Sourced("You pay", money(step.net_cost_usd),
                       "computed: the price less the incentives"))
    budget = plan.budget
    out.append(Sourced("Year", str(step.year),
                       "computed by the scheduler: the order of work that best meets your goal "
                       f"within your budget of {money(budget.usd_per_year)} a year"))
    return [Sourced(x.what, x.value, x.source, label) for x in out]


def _model_words(plan: Any) -> str:
    inflation = plan.prices.inflation_pct
    return ("computed: homeplan's hour-by-hour model of your home over a typical weather year "
            f"(fitted to the bills in your plan file), at your prices raised {inflation:g} % a "
            "year (or the price rises your plan file sets)")


def money_sources(plan: Any, result: Any, year: int | None) -> list[Sourced]:
    """One year's row of the Money view and the comparisons under it, each with its source.

    ``year``: the row under the cursor (None: the first year).
    """
    road = result.roadmap
    totals = {t.year: t for t in road.years}
    if not totals:
        return []
    t = totals.get(year) if year is not None else None
    t = t or road.years[0]
    group = f"{t.year} on the Money view"
    steps = road.steps_in(t.year)
    names = ", ".join(clean(s.label) for s in steps) or "no projects this year"
    out = [
        Sourced("Projects", money(t.spend_usd),
                f"the prices of the year's steps ({names}); Roadmap, w: where each price comes "
                "from"),
        Sourced("Back", money(t.incentives_usd),
                "computed: incentive money arriving this year, by each program's rules for your "
                "household and when it pays (Incentives view)"),
        Sourced("Bills", money(t.total_bills_usd), _model_words(plan)),
        Sourced("Plan running total", money(t.cumulative_usd),
                f"computed: projects less incentives, loan payments and bills added up since "
                f"{road.first_year}"),
    ]
    for kind, what, how in (("do_nothing", "Doing nothing, running total",
                             "keeping today's equipment and paying for breakdowns as they come"),
                            ("like_for_like", "Like for like, running total",
                             "replacing each appliance and car with the same kind on the same "
                             "fuel when it wears out, at the prices in homeplan's like-for-like "
                             "table")):
        b = road.baseline(kind)
        by_year = {y.year: y for y in (b.years if b else ())}
        if t.year in by_year:
            out.append(Sourced(what, money(by_year[t.year].cumulative_usd),
                               f"computed: {how}, with the same model of your bills"))
    out = [Sourced(x.what, x.value, x.source, group) for x in out]
    rate = plan.budget.discount_rate_pct
    for what, value, _ in comparison_lines(result):
        out.append(Sourced(what, value,
                           f"computed: each year's difference in money turned into today's "
                           f"dollars at the discount rate ({rate:g} % a year) and added up, "
                           "counting the equipment's remaining value at the end",
                           f"{road.first_year}-{road.last_year} as a whole"))
    return out


def energy_sources(result: Any) -> list[Sourced]:
    """The Energy view's yearly totals, now and after the plan, with their method."""
    out = []
    method = ("computed: homeplan's hour-by-hour model of your home over a typical weather year, "
              "fitted to the bills in your plan file")
    for when, energy in (("now", result.energy_before), ("after the plan", result.energy_after)):
        for key, value in energy.annual.items():
            if not value or key.startswith("grid_"):
                continue  # the grid's share is not a figure of the view
            name, _, unit = key.rpartition("_")
            unit = {"kwh": "kWh", "gal": "gallons", "gallon": "gallons",
                    "therm": "therms"}.get(unit, unit)
            what = f"{name.replace('_', ' ').capitalize()} a year, {when}"
            if name.startswith("solar"):
                source = ("computed: solar output of the roof in your plan file, hour by hour, "
                          "with the pvlib library's sun position and PVWatts model")
            elif name == "gasoline":
                source = ("computed: each car's miles a year over its miles per gallon, from your "
                          "plan file")
            else:
                source = method
            out.append(Sourced(what, f"{value:,.0f} {unit}", source, "Energy"))
    return out


def program_sources(plan: Any, program: Any) -> list[Sourced]:
    """One incentive program of the Incentives view (a ``ProgramUse``): what it pays and until
    when, with where each comes from."""
    name = clean(program.name)
    paid = sum(program.paid_by_year.values())
    years = ", ".join(f"{y}: {money(v)}" for y, v in sorted(program.paid_by_year.items()) if v)
    out = [Sourced("Pays in this roadmap", money(paid) + (f" ({years})" if years else ""),
                   "computed: the program's rates and caps applied to each step it covers, for "
                   "your household's income and taxes in your plan file"),
           Sourced("Rates and caps", caps_words(clean(program.caps_note)) or "-",
                   f"the program as written in {incentive_files_words(plan)}")]
    if program.ends:
        out.append(Sourced("Ends", clean(program.ends),
                           f"the program's last date as written in {incentive_files_words(plan)}"))
    return [Sourced(x.what, x.value, x.source, name) for x in out]


def capacity_sources(state: Any) -> list[Sourced]:
    """One row of the Power view (a ``CapacityState``), each figure with its source."""
    group = clean(state.label)
    method = clean(state.method)
    out = []
    if state.amps is not None:
        out.append(Sourced("Calculated load", f"{state.amps:,.0f} A",
                           f"computed: {method}, from the loads listed under the table "
                           "(each load's rating is yours where your plan file gives it, "
                           "otherwise homeplan's built-in table of typical nameplates)"))
    out.append(Sourced("Service", f"{state.service_amps:,.0f} A",
                       PLAN_FILE if state.year is None
                       else "your plan file, or the larger service a step of the plan installs"))
    if state.headroom_amps is not None:
        out.append(Sourced("Headroom", f"{state.headroom_amps:,.0f} A",
                           "computed: the service less the calculated load"))
    return [Sourced(x.what, x.value, x.source, group) for x in out]
