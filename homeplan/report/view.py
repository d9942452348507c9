"""The printed summary as plain data: what every output format shows, already in words.

:func:`build_report` reads one :class:`~homeplan.result.PlanResult` and returns a
:class:`Report` of short strings and small tables. It computes nothing physical: every figure
comes from the result; this module only chooses, rounds and names. The renderers (text,
Markdown, HTML) lay the same report out for their medium and escape user text for it; the
strings here are *not* escaped (they are cleaned of control characters only).

References
----------
None: presentation only. The figures' sources are cited by the engines that made them.
"""

from __future__ import annotations

import datetime as dt
import re
from dataclasses import dataclass
from typing import Any

from homeplan import __version__, catalog
from homeplan.plan.fuels import BILL_FUELS, GASOLINE_VEHICLES, TANK_FUELS
from homeplan.plan.hashing import content_hash
from homeplan.plan.objectives import OBJECTIVES, objective_words
from homeplan.plan.text import clean
from homeplan.report.compare import Comparison
from homeplan.report.fmt import (
    Table,
    energy_key_words,
    finite,
    money,
    money_short,
    money_signed,
    number,
    pct,
    peak_demand_kw,
    service_verdict,
    tonnes,
)
from homeplan.report.fossil import fossil_lines
from homeplan.report.risk import RiskView, SensitivityView, risk_view, sensitivity_view
from homeplan.report.words import caps_words
from homeplan.units import display_area, display_temp, heat_output_words

__all__ = [
    "GROUP_LABELS",
    "Bar",
    "Footer",
    "Mark",
    "Report",
    "Series",
    "Table",
    "Timeline",
    "YearChart",
    "assumption_lines",
    "build_report",
    "collect_cautions",
    "bill_fit_lines",
    "comparison_lines",
    "emergency_lines",
    "export_words",
    "footer_line",
    "group_of",
    "npv_vs_like_for_like",
    "payback_words",
    "step_safety",
    "without_empty_columns",
]

# Groups of upgrade categories (homeplan/data/upgrades.yaml): one colour each on the timeline.
GROUPS: dict[str, tuple[str, ...]] = {
    "appliances": ("heating", "water", "cooking", "drying"),
    "electrical": ("electrical",),
    "solar": ("solar", "storage"),
    "vehicles": ("vehicles",),
    "building": ("envelope", "roof", "fuel"),
}
GROUP_LABELS: dict[str, str] = {
    "appliances": "Heating, hot water, kitchen, laundry",
    "electrical": "Panel and service work",
    "solar": "Solar and battery",
    "vehicles": "Vehicles and charging",
    "building": "Building shell and fuel lines",
    "other": "Other work",
}


@dataclass(frozen=True)
class Bar:
    year: int
    label: str
    detail: str
    group: str


@dataclass(frozen=True)
class Mark:
    year: int
    label: str


@dataclass(frozen=True)
class Timeline:
    first_year: int
    last_year: int
    bars: tuple[Bar, ...]
    marks: tuple[Mark, ...]

    @property
    def groups(self) -> tuple[str, ...]:
        order = list(GROUP_LABELS)
        return tuple(sorted({b.group for b in self.bars}, key=order.index))


@dataclass(frozen=True)
class Footer:
    content_hash: str
    printed: str                 # ISO date the summary was made
    prepared_by: str
    prepared_for: str
    plan_date: str
    tool_version: str
    notes: str


@dataclass(frozen=True)
class Series:
    """One line or set of bars of the yearly chart: a name and one value per year (USD)."""

    name: str
    values: tuple[float, ...]
    kind: str            # "plan" or "like_for_like"


@dataclass(frozen=True)
class YearChart:
    """Yearly energy bills and money out (projects after incentives, loans, bills), for the
    plan and for replacing like for like."""

    years: tuple[int, ...]
    bills: tuple[Series, ...]
    cash_out: tuple[Series, ...]


@dataclass(frozen=True)
class Report:
    title: str
    subtitle: str
    status: str                                 # "ok" or "infeasible"
    infeasibility: str
    emergencies: tuple[str, ...]                # failed heat or hot water: shown first
    home: tuple[tuple[str, str], ...]
    headline: tuple[tuple[str, str], ...]
    timeline: Timeline
    steps: Table
    years: Table
    energy: Table
    capacity: Table
    capacity_notes: tuple[str, ...]
    programs: Table
    assumptions: tuple[tuple[str, str], ...]
    cautions: tuple[tuple[str, str], ...]
    warnings: tuple[str, ...]
    footer: Footer
    solar_months: Table | None = None            # use against solar by month, when the plan has solar
    money_note: str = "Money is rounded: to the nearest $10 under $1,000, else to the nearest $100."
    against: tuple[tuple[str, str, str], ...] = ()      # (against what, money, what it means)
    chart: YearChart | None = None
    fossil: Table | None = None
    advisor: tuple[tuple[str, str], ...] = ()
    glossary: tuple[tuple[str, str, str], ...] = ()     # (term, plain words, explanation)
    risk: RiskView | None = None                # price risk (None: not computed)
    sensitivity: SensitivityView | None = None  # what moves the NPV (None: not computed)
    comparison: Comparison | None = None        # the plan's named options side by side


# ----------------------------------------------------------------------------- helpers


def _category(result: Any, project_id: str) -> str:
    kinds = catalog.upgrade_kinds()
    info = result.project(project_id) if hasattr(result, "project") else None
    kind = info.kind if info is not None else project_id
    if kind not in kinds:  # e.g. "ev_sedan" -> "ev"
        kind = next((k for k in sorted(kinds, key=len, reverse=True) if project_id.startswith(k)), kind)
    return kinds[kind].category if kind in kinds else ""


def group_of(result: Any, project_id: str) -> str:
    cat = _category(result, project_id)
    return next((g for g, cats in GROUPS.items() if cat in cats), "other")


def collect_cautions(result: Any) -> tuple[tuple[str, str], ...]:
    """Cautions for the work in this roadmap: catalog ids expanded, free text kept; planning first."""
    known = catalog.cautions(result.plan.home.electrical.code_edition)
    titles = catalog.caution_titles()
    ids: list[str] = ["planning"]
    road = result.roadmap
    for s in road.steps:
        ids.extend(s.cautions)
        info = result.project(s.project_id)
        if info is not None:
            ids.extend(info.cautions)
    ids.extend(road.cautions)
    if any(c.remedy for c in result.capacity):
        ids.append("electrical")
    by_text = {" ".join(clean(t).split()): k for k, t in known.items()}
    out: list[tuple[str, str]] = []
    seen: set[str] = set()
    for cid in ids:
        text = clean(cid)
        key = text if text in known else by_text.get(" ".join(text.split()))
        if key is not None:
            text = clean(known[key])
        if not text or text in seen:
            continue
        seen.add(text)
        out.append((titles[key] if key is not None else "Note", text))
    return tuple(out)


def _step_what(step: Any) -> tuple[str, str]:
    label = clean(step.label) or clean(step.project_id)
    detail = ", ".join(x for x in (clean(step.variant), clean(step.size)) if x)
    return label, detail


def _home_lines(plan: Any, result: Any) -> list[tuple[str, str]]:
    h = plan.home
    units = plan.display.units
    lines: list[tuple[str, str]] = []
    where = ""
    if h.location is not None:
        where = clean(h.location.place) or f"{h.location.latitude:.2f}, {h.location.longitude:.2f}"
    built = f", built {h.year_built}" if h.year_built else ""
    lines.append(("Home", f"{display_area(h.floor_area_ft2, units)}, {h.stories} "
                  f"stor{'y' if h.stories == 1 else 'ies'}{built}" + (f", {where}" if where else "")))
    c = h.climate
    parts = []
    if c.heating_design_f is not None:
        parts.append(f"heating design {display_temp(c.heating_design_f, units)}")
    if c.hdd65 is not None:
        parts.append(f"{c.hdd65:,.0f} heating degree days (65 F base)")
    if parts:
        lines.append(("Climate", ", ".join(parts)))
    e = h.electrical
    lines.append(("Electrical", f"{e.service_amps} A service, {e.busbar_rating_amps} A "
                  f"busbar, {e.free_spaces if e.free_spaces is not None else 'unknown'} free spaces"))
    outs = {o.key: o for o in result.outlooks}
    items = []
    for a in plan.appliances:
        o = outs.get(a.key)
        label = clean(o.label) if o is not None else f"{a.fuel or ''} {a.kind}".strip()
        year = f" ({a.year_installed})" if a.year_installed else ""
        items.append(f"{label}{year}")
    if items:
        lines.append(("Appliances", "; ".join(items)))
    cars = [f"{clean(v.name) or v.body} ({v.fuel.replace('_', '-')})" for v in plan.vehicles]
    if cars:
        lines.append(("Vehicles", "; ".join(cars)))
    if h.solar is not None:
        lines.append(("Solar today", f"{h.solar.size_kw:g} kW DC"))
    if h.battery is not None:
        lines.append(("Battery today", f"{h.battery.capacity_kwh:g} kWh"))
    b = plan.budget
    lines.append(("Budget", f"{money(b.usd_per_year)} a year from {plan.first_year} for "
                  f"{b.horizon_years} years" + ("; unspent money carries over" if b.carryover else "")))
    return lines


def npv_vs_like_for_like(road: Any) -> float | None:
    """The plan against replacing each thing like for like when it wears out: money ahead (+) or
    behind (-) over the years planned, in today's dollars. The roadmap's own figure when it
    carries one; else its net present value against doing nothing less the like-for-like path's
    (both against doing nothing, discounted alike, so the difference compares the two paths)."""
    own = getattr(road, "npv_vs_like_for_like_usd", None)
    if own is not None and finite(own):
        return own
    lfl = road.baseline("like_for_like")
    if lfl is None or not (finite(road.npv_usd) and finite(lfl.npv_usd)):
        return None
    return road.npv_usd - lfl.npv_usd


def _ahead_words(value: float) -> str:
    return f"{money(abs(value))} {'ahead' if value >= 0 else 'behind'}"


def comparison_lines(result: Any) -> list[tuple[str, str, str]]:
    """The plan against replacing like for like first (what the household would do anyway),
    then against doing nothing."""
    road = result.roadmap
    years = f"{road.first_year}-{road.last_year}"
    out = []
    lfl = npv_vs_like_for_like(road)
    if lfl is not None:
        out.append(("Against replacing like for like", _ahead_words(lfl),
                    f"compared with replacing each appliance and car with the same kind on the same "
                    f"fuel when it wears out, {years}, in today's dollars"))
    if finite(road.npv_usd):
        out.append(("Against doing nothing", _ahead_words(road.npv_usd),
                    f"compared with keeping today's equipment and paying for breakdowns as they "
                    f"come, {years}, in today's dollars"))
    return out


def _headline(result: Any) -> list[tuple[str, str]]:
    road = result.roadmap
    steps = road.steps
    cost = sum(s.cost_usd for s in steps)
    inc = sum(s.incentives_usd for s in steps)
    net = sum(s.net_cost_usd for s in steps)
    out: list[tuple[str, str]] = []
    if steps:
        span = f"{steps[0].year}" if steps[0].year == steps[-1].year else f"{steps[0].year} to {steps[-1].year}"
        out.append((f"steps, {span}", str(len(steps))))
    out.append(("installed cost", money(cost)))
    out.append(("incentives", money(inc)))
    out.append(("you pay", money(net)))
    before, after = result.energy_before, result.energy_after
    if finite(before.emissions_kg) and finite(after.emissions_kg) and before.emissions_kg > 0:
        change = (after.emissions_kg - before.emissions_kg) / before.emissions_kg * 100
        out.append((f"CO2e a year: {tonnes(before.emissions_kg)} -> {tonnes(after.emissions_kg)}",
                    f"{change:+.0f} %"))
    for m in road.milestones:
        if m.kind == "fully_electric":
            out.append(("all-electric", str(m.year)))
    return out


def emergency_lines(road: Any) -> tuple[str, ...]:
    """What the roadmap does about each failed heat source or water heater, in words (shown at
    the top of every view and printout)."""
    out = []
    for e in road.emergencies:
        text = (f"The {clean(e.label)} has failed: {clean(e.step_label).lower()} in {e.year} "
                f"({money(e.step_cost_usd)} after point-of-sale incentives), before anything else "
                f"that year, so the home keeps its {clean(e.service)}.")
        if e.other_id and e.other_cost_usd is not None:
            gap = e.other_cost_usd - e.step_cost_usd
            text += (f" The other way, {clean(e.other_label).lower()}, costs "
                     f"{money(abs(gap))} {'more' if gap > 0 else 'less'} now.")
        if e.over_budget_usd > 0.5:
            paid = []
            if e.from_savings_usd > 0.5:
                paid.append(f"{money(e.from_savings_usd)} from savings")
            if e.from_loan_usd > 0.5:
                paid.append(f"{money(e.from_loan_usd)} from the emergency loan (its payments come on "
                            "top of the yearly budget)")
            if e.unfunded_usd > 0.5:
                paid.append(f"{money(e.unfunded_usd)} over budget - no savings or loan given for it")
            text += f" {e.year} spends {money(e.over_budget_usd)} beyond its budget: " + "; ".join(paid) + "."
        out.append(text)
    return tuple(dict.fromkeys(out))


_FUEL_WORDS = {"electricity": "Electricity", "gas": "Gas", "propane": "Propane", "oil": "Heating oil"}
_UNIT_WORDS = {"kWh": "kWh", "therm": "therms", "gal": "gallons"}


def bill_fit_lines(road: Any) -> tuple[str, ...]:
    """How the model of today's home reproduces each fuel's bills, one line per fuel.

    References
    ----------
    ASHRAE Guideline 14-2014, monthly calibration criteria (NMBE within +/-5 %, CV(RMSE) at most
    15 %; from memory).
    """
    out = []
    for f in road.calibration:
        unit = _UNIT_WORDS.get(f.unit, f.unit)
        text = (f"{_FUEL_WORDS.get(f.fuel, clean(f.fuel))}: {f.billed:,.0f} {unit} billed, "
                f"{f.modelled:,.0f} modelled ({f.annual_error_pct:+.1f} %)")
        if f.monthly and f.cv_rmse_pct is not None and f.nmbe_pct is not None:
            verdict = ("within ASHRAE Guideline 14's limits for monthly bills (5 %, 15 %)"
                       if f.meets_guideline_14 else
                       "outside ASHRAE Guideline 14's limits for monthly bills (5 %, 15 %): "
                       "the monthly pattern is only roughly followed")
            text += (f"; month by month: bias {round(f.nmbe_pct, 1) + 0.0:+.1f} %, scatter (CV of RMSE) "
                     f"{f.cv_rmse_pct:.1f} %, {verdict}")
        elif not f.monthly:
            text += "; yearly total only, the months are not checked"
        parts = [f"{name} {value:,.0f}" for name, value in (
            ("heating", f.heating), ("cooling", f.cooling),
            ("hot water, cooking, drying and other uses", f.base), ("cars", f.other)) if value >= 0.5]
        if parts:
            text += f"; of which {', '.join(parts)}"
            if f.solar >= 0.5:
                text += f", less {f.solar:,.0f} from the solar panels"
        if abs(f.typical_year - f.modelled) > 0.005 * max(f.modelled, 1.0):
            text += f"; {f.typical_year:,.0f} in a typical year"
        out.append(text)
    return tuple(out)


def step_safety(step: Any, edition: int) -> str:
    """The short titles of a step's cautions ("Licensed electrician and permit; ..."), or ""."""
    titles = catalog.caution_titles()
    ids = catalog.caution_ids_of(step.cautions, edition)
    return "; ".join(titles[i] if i is not None else "see the safety notes"
                     for i in dict.fromkeys(ids))


def payback_words(result: Any, project_id: str) -> str:
    """A step's simple payback: what it costs after incentives beyond the like-for-like
    replacement it avoids (the full cost after incentives when the old one is not due) against
    its bill savings over its life (the result's finance figures). "at once" when it costs no
    more than that replacement."""
    fin = result.finance.projects.get(project_id) if result.finance is not None else None
    if fin is None:
        return ""
    if getattr(fin, "incremental_cost_usd", 1.0) <= 0 and fin.first_year_savings_usd >= 0:
        return "at once"
    if fin.first_year_savings_usd <= 0.5:
        return "no bill savings"
    if fin.simple_payback_years is None:
        return "not within its life"
    return f"{fin.simple_payback_years:.0f} yr" if fin.simple_payback_years >= 1 else "under 1 yr"


def _steps_table(result: Any) -> Table:
    rows = []
    road = result.roadmap
    edition = result.plan.home.electrical.code_edition
    for s in road.steps:
        label, detail = _step_what(s)
        what = f"{label} ({detail})" if detail else label
        reason = "; ".join(clean(r) for r in s.reasons if clean(r))
        safety = step_safety(s, edition)
        if safety:
            reason += (". " if reason else "") + f"Safety: {safety}."
        rows.append((str(s.year), what, money(s.cost_usd), money(s.incentives_usd),
                     money(s.net_cost_usd), payback_words(result, s.project_id), reason))
    total = None
    if road.steps:
        total = ("", "Total", money(sum(s.cost_usd for s in road.steps)),
                 money(sum(s.incentives_usd for s in road.steps)),
                 money(sum(s.net_cost_usd for s in road.steps)), "", "")
    return Table(("Year", "What", "Cost", "Incentives", "You pay", "Pays back in", "Why this year"),
                 tuple(rows), "nlrrrrw", total,
                 "Cost is the installed price before incentives; incentives may arrive later "
                 "(rebates after the work, tax credits with the next tax return). Pays back in: "
                 "years of bill savings to repay what you pay beyond replacing the old one like for "
                 "like when it is due (all you pay when it is not; simple payback, over the step's "
                 "life).")


def _years_table(result: Any) -> Table:
    road = result.roadmap
    base = road.baseline("like_for_like") or road.baseline("do_nothing")
    base_cum = {y.year: y.cumulative_usd for y in base.years} if base is not None else {}
    against = "like-for-like" if base is not None and base.kind == "like_for_like" else "doing nothing"
    rows = []
    loans = any(y.loan_payments_usd for y in road.years)  # no loans: no column of $0
    for y in road.years:
        ahead = (base_cum[y.year] - y.cumulative_usd) if y.year in base_cum else None
        rows.append((str(y.year), money(y.spend_usd), money(y.incentives_usd),
                     money(y.loan_payments_usd) if loans else "", money(y.total_bills_usd),
                     money_signed(y.bill_savings_usd), money(y.cumulative_usd),
                     money_signed(ahead) if ahead is not None else "n/a", tonnes(y.emissions_kg)))
    return Table(("Year", "Projects", "Incentives in", "Loan payments", "Energy bills",
                  "Bill savings", "Spent so far", f"Ahead of {against}", "CO2e"),
                 tuple(rows), "nrrrrrrrr", None,
                 "Spent so far adds projects after incentives, loan payments and energy bills "
                 "from the first year. Bill savings are against keeping today's equipment. "
                 + ("Ahead of like-for-like compares what has been spent so far with replacing each "
                    "thing with the same kind when it is due" if against == "like-for-like" else
                    "Ahead of doing nothing compares that with keeping today's equipment and bills")
                 + " (positive: the plan has cost less so far).")


def _energy_table(result: Any) -> Table:
    b, a = result.energy_before, result.energy_after
    rows: list[tuple[str, str, str, str]] = []
    keys = list(dict.fromkeys([*b.annual.keys(), *a.annual.keys()]))
    for key in keys:
        vb, va = b.annual.get(key, 0.0), a.annual.get(key, 0.0)
        if not (vb or va):
            continue
        name, unit = energy_key_words(key)
        rows.append((f"{name} ({unit})" if unit else name, number(vb), number(va),
                     _change(vb, va, lambda v: number(v))))
    bb, ba = sum(b.bills_usd.values()), sum(a.bills_usd.values())
    rows.append(("Energy bills a year", money(bb), money(ba), _change(bb, ba, money_signed, True)))
    if b.fuel_money_out_usd or a.fuel_money_out_usd:
        rows.append(("Paid for fossil fuel a year", money(b.fuel_money_out_usd),
                     money(a.fuel_money_out_usd),
                     _change(b.fuel_money_out_usd, a.fuel_money_out_usd, money_signed, True)))
    rows.append(("CO2e a year", tonnes(b.emissions_kg), tonnes(a.emissions_kg),
                 _change(b.emissions_kg, a.emissions_kg, lambda v: tonnes(v))))
    pb, pa = peak_demand_kw(b), peak_demand_kw(a)
    meter = b.peak_demand_kw is not None
    rows.append(("Peak demand (as a meter shows it)" if meter else "Peak demand (highest hour)",
                 number(pb, 1, "kW"), number(pa, 1, "kW"), _change(pb, pa, lambda v: number(v, 1, "kW"))))
    return Table(("Typical year", clean(b.label) or "Today", clean(a.label) or "After the plan",
                  "Change"), tuple(rows), "lrrr", None,
                 "A typical weather year at today's prices; bills include fixed charges. Peak "
                 "demand: " + clean(getattr(result.roadmap, "assumptions", {}).get(
                     "peak_demand", "the highest hour of the modelled year")) + ".")


MONTH_NAMES = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")


def _solar_months(result: Any) -> Table | None:
    """Electricity use against solar production by month after the plan (None without solar)."""
    a = result.energy_after
    use, solar = a.monthly.get("electricity_kwh"), a.monthly.get("solar_kwh")
    if not use or not solar or sum(solar) <= 0:
        return None
    exported = a.monthly.get("grid_export_kwh") or (0.0,) * 12
    imported = a.monthly.get("grid_import_kwh") or (0.0,) * 12
    rows = tuple((m, number(u), number(p), number(u - p), number(x), number(i))
                 for m, u, p, x, i in zip(MONTH_NAMES, use, solar, exported, imported, strict=True))
    total = ("Year", number(sum(use)), number(sum(solar)), number(sum(use) - sum(solar)),
             number(sum(exported)), number(sum(imported)))
    share = sum(exported) / sum(solar) * 100
    return Table(("Month", "Use (kWh)", "Solar (kWh)", "Use minus solar", "Exported", "Bought"),
                 rows, "lrrrrr", total,
                 f"After the plan, in a typical weather year. {share:.0f} % of the solar output is "
                 "exported (credited as the export rule says); winter months draw on the grid.")


def _change(before: float, after: float, fmt: Any, is_money: bool = False) -> str:
    if not (finite(before) and finite(after)):
        return "n/a"
    d = after - before
    if is_money:
        return fmt(d)
    text = fmt(d)
    return text if text.startswith("-") or text in ("0", "0.0 t", "n/a") else "+" + text


def _capacity_table(result: Any) -> tuple[Table, tuple[str, ...]]:
    rows = []
    notes: list[str] = []
    for c in result.capacity:
        rows.append((clean(c.label), clean(c.method), number(c.amps, 0, "A"),
                     number(c.service_amps, 0, "A"), number(c.headroom_amps, 0, "A"),
                     service_verdict(c.fits, c.near_limit, c.load_pct), clean(c.remedy) or ""))
        notes.extend(clean(n) for n in c.notes if clean(n))
    table = Table(("Home as of", "Method", "Calculated load", "Service", "Headroom", "Fits",
                   "What the plan does"), tuple(rows), "llrrrll", None,
                  "Load calculations estimate the service a licensed electrician will check; "
                  "they are not a permit design.")
    return table, tuple(dict.fromkeys(notes))


def _programs_table(result: Any) -> Table:
    rows = []
    for p in result.programs:
        paid = sum(p.paid_by_year.values())
        years = ", ".join(str(y) for y, v in sorted(p.paid_by_year.items()) if v)
        rows.append((clean(p.name) or clean(p.program_id), clean(p.kind).replace("_", " "),
                     money(paid), years or "-", clean(p.ends) or "open-ended", caps_words(clean(p.caps_note))))
    return Table(("Program", "Kind", "Pays in this plan", "Money arrives", "Window closes", "Limits"),
                 tuple(rows), "llrlll", None,
                 "Incentive rules change: check each program's current terms before you buy.")


def _assumption_value(value: Any) -> str:
    if isinstance(value, float):
        return f"{value:g}"
    if isinstance(value, dict):
        return ", ".join(f"{clean(k)}: {_assumption_value(v)}" for k, v in value.items())
    if isinstance(value, list | tuple):
        if len(value) > 6:
            return ", ".join(_assumption_value(v) for v in value[:6]) + f", ... ({len(value)} values)"
        return ", ".join(_assumption_value(v) for v in value)
    return clean(value)


def export_words(plan: Any, road: Any) -> str:
    """How exported solar power is paid, with its rate and any limit: the roadmap's own
    assumption (``export``) when it records one, else the plan's setting."""
    e = plan.prices.electricity
    export = road.assumptions.get("export") if road is not None else None
    if not isinstance(export, dict):
        export = {"rule": e.export, "usd_per_kwh": e.export_usd_per_kwh,
                  "rate_given": e.export_usd_per_kwh is not None, "limit_kw": e.export_limit_kw}
    rule, rate = export.get("rule"), export.get("usd_per_kwh")
    if rule == "net_metering":
        text = "net metering: each kWh sent to the grid offsets a kWh bought, at the retail price"
    elif rule == "none":
        text = "no credit for power sent to the grid: the system sends none, so what the home cannot use is lost"
    elif rate is None or not finite(rate):
        text = "net billing: power sent to the grid is credited at the utility's export rate"
    else:
        text = f"net billing: power sent to the grid is credited at ${rate:.3f}/kWh"
        if not export.get("rate_given", True):
            text += " (not in the plan: a typical rate assumed - add your utility's)"
    if export.get("limit_kw") is not None and rule != "none":
        text += f"; at most {export['limit_kw']:g} kW sent to the grid"
    return text


def assumption_lines(plan: Any, result: Any) -> list[tuple[str, str]]:
    """The assumptions behind a result as (what, value) lines in words: prices, how they change,
    the discount rate, the goal, costs, incentive data, weather, solar output and backup power.
    The printout and the app's sources panel show these same lines."""
    p = plan.prices
    out: list[tuple[str, str]] = []
    e = p.electricity
    tou = f"; time-of-use periods: {len(e.time_of_use)}" if e.time_of_use else ""
    out.append(("Electricity price", f"${e.usd_per_kwh:.3f}/kWh + ${e.fixed_usd_per_month:.2f}/month"
                f"{tou}"))
    out.append(("Solar export", export_words(plan, result.roadmap)))
    fuels = {a.fuel for a in plan.appliances if a.fuel}
    fuels |= {k.partition("_")[0] for k, v in result.energy_before.annual.items() if v}
    if plan.usage is not None and plan.usage.gas is not None:
        fuels.add("gas")
    if "gas" in fuels:
        out.append(("Gas price", f"${p.gas.usd_per_therm:.2f}/therm + ${p.gas.fixed_usd_per_month:.2f}/month"))
    for fuel in TANK_FUELS:
        if fuel in fuels:
            out.append((f"{fuel.capitalize()} price", f"${getattr(p, fuel).usd_per_gal:.2f}/gallon"))
    if any(v.fuel in GASOLINE_VEHICLES for v in plan.vehicles):
        out.append(("Gasoline price", f"${p.gasoline.usd_per_gal:.2f}/gallon"))
    esc = [f"inflation {pct(p.inflation_pct)} a year"]
    if p.fossil_extra_escalation_pct:
        esc.append(f"fossil fuels {pct(p.fossil_extra_escalation_pct)} a year above inflation")
    for fuel in BILL_FUELS:
        rate = getattr(p, fuel).escalation_pct
        if rate is not None:
            esc.append(f"{fuel} {pct(rate)} a year")
    out.append(("Price changes", "; ".join(esc)))
    b = plan.budget
    out.append(("Discount rate", f"{pct(b.discount_rate_pct)} a year (for net present value)"))
    if b.by_year:
        out.append(("Budgets by year", ", ".join(f"{y}: {money(v)}" for y, v in sorted(b.by_year.items()))))
    for loan in b.loans:
        out.append(("Loan", f"{clean(loan.name)}: {money(loan.amount_usd)} at {pct(loan.rate_pct)} "
                    f"over {loan.term_years} years"))
    goal = OBJECTIVES.get(plan.choices.objective)
    detail = (f" (the worst {plan.choices.risk_tail_pct:g} % of price paths weighed x{plan.choices.risk_weight:g})"
              if plan.choices.objective == "risk_aware" else "")
    out.append(("Goal", f"{objective_words(plan.choices.objective)}" + (f": {goal.meaning}" if goal else "")
                + detail))
    out.append(("Costs without a quote", f"homeplan's {p.cost_level} installed prices (planning "
                "estimates; each price's reference is in homeplan's catalog)"))
    if p.grid_kg_co2_per_kwh is not None:
        out.append(("Grid emissions", f"{p.grid_kg_co2_per_kwh:g} kg CO2e/kWh"))
    labels = {q.id: q.label for q in (getattr(result, "projects", None) or ())}
    quotes = [f"{clean(labels.get(pid) or caps_words(pid))}: {money(o.cost_usd)}" + (f" ({clean(o.contractor)}" if o.contractor else "")
              + (f", {o.quote_date.isoformat()}" if o.quote_date else "") + (")" if o.contractor else "")
              for pid, o in plan.options.items() if o.cost_usd is not None]
    if quotes:
        out.append(("Your quotes", "; ".join(quotes)))
    # Incentive data: dates of the records the plan carries, and the files it includes.
    dates = []
    for raw in plan.incentives:
        if not isinstance(raw, dict):
            continue
        name = clean(raw.get("name") or raw.get("id") or "program")
        window = "-".join(clean(raw.get(k)) for k in ("starts", "ends") if raw.get(k)) or "no dates given"
        dates.append(f"{name} ({window})")
    if dates:
        out.append(("Incentive data in the plan", "; ".join(dates)))
    if plan.incentive_files:
        out.append(("Incentive files", ", ".join(clean(f) for f in plan.incentive_files)))
    planner = result.roadmap.assumptions
    for key, value in sorted(planner.items()):
        if "incentive" in str(key) and ("date" in str(key) or "as_of" in str(key)):
            out.append(("Incentive data as of", _assumption_value(value)))
    esc = planner.get("escalation_pct")
    if isinstance(esc, dict) and esc:
        out.append(("Price rise used", ", ".join(f"{clean(k)} {pct(v)}" for k, v in esc.items()
                                                 if isinstance(v, int | float)) + " a year"))
    yield_ = planner.get("solar_yield_kwh_per_kwdc")
    if isinstance(yield_, dict) and yield_.get("new_array"):
        text = (f"{number(yield_['new_array'], 0)} kWh a year per kW of panels on this roof (tilt "
                f"{yield_.get('tilt_deg', 0):g} deg, facing {yield_.get('azimuth_deg', 0):g} deg, shade "
                f"{yield_.get('shade_loss_pct', 0):g} %)")
        if yield_.get("existing_array"):
            text += f"; the existing array {number(yield_['existing_array'], 0)}"
        out.append(("Solar yield", text))
    backup = planner.get("backup")
    if isinstance(backup, dict):
        out.append(("Backup power", f"{backup['critical_kwh']:g} kWh of critical loads over a "
                    f"{backup['outage_hours']:g}-hour outage: a battery of at least "
                    f"{backup['battery_kwh_needed']:g} kWh; you value it at "
                    f"{money(backup['value_usd_per_year'])} a year (counts in the choice of battery, "
                    "not in the money figures)"))
    for key, label in (("weather", "Weather"), ("heat_loss_method", "Heat loss worked out from"),
                       ("design_heating_load_btuh", "Heat the home loses on the design day"),
                       ("conventions", "Conventions")):
        value = planner.get(key)
        if value is None or value == "":
            continue
        text = heat_output_words(value) if key.endswith("_btuh") and finite(value) else _assumption_value(value)
        out.append((label, text))
    for line in bill_fit_lines(result.roadmap):
        out.append(("Model against your bills", line))
    return out


def without_empty_columns(t: Table, blank: tuple[str, ...] = ("",)) -> Table:
    """The table without the columns that are empty in every row (their header goes too);
    ``blank`` lists what counts as empty (the years table drops a column of $0 loan payments)."""
    keep = [i for i in range(len(t.headers))
            if any(str(row[i]).strip() not in blank for row in t.rows if i < len(row))]
    if len(keep) == len(t.headers) or not t.rows:
        return t
    return Table(tuple(t.headers[i] for i in keep), tuple(tuple(r[i] for i in keep) for r in t.rows),
                 "".join(t.align[i] for i in keep),
                 tuple(t.total[i] for i in keep) if t.total else None, t.note)


def _chart(result: Any) -> YearChart | None:
    road = result.roadmap
    if not road.years:
        return None
    years = tuple(t.year for t in road.years)
    bills = [Series("This plan", tuple(t.total_bills_usd for t in road.years), "plan")]
    cash = [Series("This plan", tuple(t.net_usd + t.loan_payments_usd + t.total_bills_usd
                                      for t in road.years), "plan")]
    lfl = road.baseline("like_for_like")
    if lfl is not None and len(lfl.years) == len(years):
        bills.append(Series("Like for like", tuple(t.total_bills_usd for t in lfl.years), "like_for_like"))
        cash.append(Series("Like for like", tuple(t.net_usd + t.loan_payments_usd + t.total_bills_usd
                                                  for t in lfl.years), "like_for_like"))
    return YearChart(years, tuple(bills), tuple(cash))


def _fossil_table(result: Any) -> Table | None:
    lines = fossil_lines(result)
    if not lines:
        return None
    years = lines[0].years
    last = max((ln.last_year or years[0]) for ln in lines)
    shown = [y for y in years if y <= min(last + 1, years[-1])]
    rows = []
    for ln in lines:
        rows.append((ln.label, *(money_short(ln.costs_usd[years.index(y)])
                                 if ln.costs_usd[years.index(y)] > 0.5 else "-" for y in shown),
                     ln.ending(True)))
    return Table(("Fuel", *(str(y) for y in shown), "When it stops"), tuple(rows),
                 "l" + "r" * len(shown) + "l", None,
                 "What each fuel costs a year while it is still bought (US dollars, k = thousand; "
                 "fixed charges included), and when its gas service, tank or last car goes.")


def _advisor(plan: Any) -> list[tuple[str, str]]:
    a = plan.advisor
    if a is None:
        return []
    out = []
    for label, value in (("Company", a.company), ("Contact", a.name),
                         ("License number", a.license_number), ("Phone", a.phone),
                         ("Email", a.email), ("Website", a.website), ("Address", a.address)):
        if value:
            out.append((label, clean(value)))
    if a.quote_date is not None:
        out.append(("Quote date", a.quote_date.isoformat()))
    if a.valid_until is not None:
        out.append(("Valid until", a.valid_until.isoformat()))
    return out


def _glossary(texts: list[str]) -> tuple[tuple[str, str, str], ...]:
    """The glossary's terms that appear in the printout's text."""
    blob = " ".join(texts)
    out = []
    for g in catalog.glossary():
        words = [w.strip() for w in g.term.replace(" and ", ",").split(",") if w.strip()]
        if any(re.search(rf"(?<![A-Za-z]){re.escape(w)}(?![A-Za-z])", blob) for w in words):
            out.append((g.term, g.plain, g.text))
    return tuple(out)


# ----------------------------------------------------------------------------- entry point


def build_report(result: Any, today: dt.date | None = None, tool_version: str | None = None,
                 comparison: Comparison | None = None) -> Report:
    """Everything the printed summary shows, as cleaned (not escaped) strings; ``comparison``
    is the plan's named options side by side, when it has them."""
    plan = result.plan
    road = result.roadmap
    prov = plan.provenance
    today = today or dt.date.today()
    name = clean(plan.home.name) or clean(road.plan_name) or "Unnamed home"
    bars = []
    for s in road.steps:
        label, detail = _step_what(s)
        bars.append(Bar(s.year, label, detail, group_of(result, s.project_id)))
    timeline = Timeline(road.first_year, road.last_year, tuple(bars),
                        tuple(Mark(m.year, clean(m.label)) for m in road.milestones))
    capacity, cap_notes = _capacity_table(result)
    capacity = without_empty_columns(capacity)
    footer = Footer(
        content_hash=result.content_hash or content_hash(plan),
        printed=today.isoformat(),
        prepared_by=clean(prov.prepared_by),
        prepared_for=clean(prov.prepared_for),
        plan_date=prov.date.isoformat() if prov.date else "",
        tool_version=clean(tool_version or prov.tool_version or __version__),
        notes=clean(prov.notes),
    )
    subtitle = f"Prepared for {footer.prepared_for}" if footer.prepared_for else ""
    steps = without_empty_columns(_steps_table(result))
    years = without_empty_columns(_years_table(result))
    energy = without_empty_columns(_energy_table(result))
    programs = without_empty_columns(_programs_table(result))
    fossil = _fossil_table(result)
    assumptions = tuple(assumption_lines(plan, result))
    against = tuple(comparison_lines(result))
    cautions = collect_cautions(result)
    texts = [" ".join(" ".join(r) for r in t.rows) + " ".join(t.headers)
             for t in (steps, years, energy, capacity, programs)]
    texts += [f"{k} {v}" for k, v in assumptions] + [n for n in cap_notes]
    texts += [f"{a} {b} {c}" for a, b, c in against]
    return Report(
        title=f"Electrification roadmap: {name}",
        subtitle=subtitle,
        status=clean(road.status),
        infeasibility=clean(road.infeasibility),
        emergencies=emergency_lines(road),
        home=tuple(_home_lines(plan, result)),
        headline=tuple(_headline(result)),
        timeline=timeline,
        steps=steps,
        years=years,
        energy=energy,
        capacity=capacity,
        capacity_notes=cap_notes,
        programs=programs,
        assumptions=assumptions,
        cautions=cautions,
        warnings=tuple(clean(w) for w in result.warnings if clean(w)),
        footer=footer,
        solar_months=_solar_months(result),
        against=against,
        chart=_chart(result),
        fossil=fossil,
        advisor=tuple(_advisor(plan)),
        glossary=_glossary(texts),
        risk=risk_view(road),
        sensitivity=sensitivity_view(result),
        comparison=comparison,
    )


def footer_line(f: Footer) -> str:
    parts = [f"plan {f.content_hash}", f"printed {f.printed}"]
    if f.prepared_by:
        parts.append(f"prepared by {f.prepared_by}" + (f" on {f.plan_date}" if f.plan_date else ""))
    elif f.plan_date:
        parts.append(f"plan dated {f.plan_date}")
    parts.append(f"homeplan {f.tool_version}")
    return " | ".join(parts)
