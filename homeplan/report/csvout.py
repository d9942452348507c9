"""CSV exports of a roadmap: steps, yearly totals, monthly (and optionally hourly) energy.

Spreadsheet formula injection: a text cell that starts with ``=``, ``+``, ``-``, ``@``, a tab or
a carriage return may be run as a formula when the file is opened in a spreadsheet. Such *text*
cells get a leading single quote so they stay text. Numbers are written as plain numbers (a
negative number stays numeric: ``-1200.5``), because they came from the engines, not from a
person, and the spreadsheet must be able to add them up.

References
----------
RFC 4180, Common Format and MIME Type for CSV Files (CRLF line ends, quoting).
OWASP, "CSV Injection" (the characters to neutralise and the single-quote prefix).
"""

from __future__ import annotations

import csv
import io
import math
from collections.abc import Iterable, Sequence
from pathlib import Path
from typing import Any

from homeplan.errors import InputError, Problem
from homeplan.plan.save import write_atomic
from homeplan.plan.text import clean

__all__ = [
    "CSV_NAMES",
    "csv_text",
    "hourly_energy_csv",
    "monthly_energy_csv",
    "safe_cell",
    "steps_csv",
    "write_csv_dir",
    "years_csv",
]

DANGEROUS_START = ("=", "+", "-", "@", "\t", "\r")
MONTHS = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")


def safe_cell(value: Any) -> Any:
    """A value ready for a CSV cell: numbers as numbers, text neutralised, None as empty."""
    if value is None:
        return ""
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, int):
        return value
    if isinstance(value, float):
        return round(value, 4) if math.isfinite(value) else ""
    if hasattr(value, "item"):  # numpy scalar
        return safe_cell(value.item())
    text = str(value)
    if text.startswith(DANGEROUS_START):
        return "'" + text
    return text


def csv_text(headers: Sequence[str], rows: Iterable[Sequence[Any]]) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\r\n")
    w.writerow([safe_cell(h) for h in headers])
    for row in rows:
        w.writerow([safe_cell(v) for v in row])
    return buf.getvalue()


def steps_csv(result: Any) -> str:
    headers = ["year", "project_id", "what", "variant", "size", "cost_usd", "incentives_usd",
               "net_cost_usd", "financed_usd", "incentive_programs", "reasons", "cautions"]
    rows = []
    for s in result.roadmap.steps:
        programs = "; ".join(f"{clean(i.program)} {i.amount_usd:.0f} USD ({i.kind}, {i.arrives})"
                             for i in s.incentives)
        rows.append([s.year, clean(s.project_id), clean(s.label), clean(s.variant), clean(s.size),
                     s.cost_usd, s.incentives_usd, s.net_cost_usd, s.financed_usd, programs,
                     "; ".join(clean(r) for r in s.reasons), "; ".join(clean(c) for c in s.cautions)])
    return csv_text(headers, rows)


def years_csv(result: Any) -> str:
    road = result.roadmap
    fuels = sorted({f for y in road.years for f in y.bills_usd})
    energy = sorted({k for y in road.years for k in y.energy})
    base = road.baseline("do_nothing")
    base_cum = {y.year: y.cumulative_usd for y in base.years} if base is not None else {}
    headers = ["year", "spend_usd", "incentives_usd", "net_usd", "loan_payments_usd", "bills_total_usd",
               *(f"bills_{clean(f)}_usd" for f in fuels), "bill_savings_usd", "cumulative_usd",
               "do_nothing_cumulative_usd", "emissions_kg", "peak_kw", "service_headroom_amps",
               *(clean(k) for k in energy)]
    rows = []
    for y in road.years:
        rows.append([y.year, y.spend_usd, y.incentives_usd, y.net_usd, y.loan_payments_usd,
                     y.total_bills_usd, *(y.bills_usd.get(f) for f in fuels), y.bill_savings_usd,
                     y.cumulative_usd, base_cum.get(y.year), y.emissions_kg, y.peak_kw,
                     y.service_headroom_amps, *(y.energy.get(k) for k in energy)])
    return csv_text(headers, rows)


def monthly_energy_csv(result: Any) -> str:
    states = [("before", result.energy_before), ("after", result.energy_after)]
    keys = sorted({k for _, s in states for k in s.monthly})
    headers = ["state", "state_label", "month", "month_name", *(clean(k) for k in keys)]
    rows = []
    for name, s in states:
        for m in range(12):
            vals = [s.monthly[k][m] if k in s.monthly and len(s.monthly[k]) > m else None for k in keys]
            rows.append([name, clean(s.label), m + 1, MONTHS[m], *vals])
    return csv_text(headers, rows)


HOURLY_KEYS = ("grid_export_kw", "grid_import_kw", "load_kw", "solar_kw")


def hourly_energy_csv(result: Any) -> str | None:
    """Hour-by-hour electricity of today's home and the planned one (``result.hourly``), or
    None when the result has none (an infeasible request)."""
    if not result.hourly:
        return None
    headers = ["state", "hour_of_year", *HOURLY_KEYS]
    rows = []
    for profile in result.hourly:
        series = [getattr(profile, k) for k in HOURLY_KEYS]
        for h in range(max(len(v) for v in series)):
            rows.append([clean(profile.label), h, *(v[h] for v in series)])
    return csv_text(headers, rows)


CSV_NAMES = ("steps.csv", "years.csv", "monthly_energy.csv", "hourly_energy.csv")
"""The files ``write_csv_dir`` may write (the last with ``hourly`` only)."""


def write_csv_dir(result: Any, directory: str | Path, hourly: bool = False,
                  replace_readonly: bool = False) -> list[Path]:
    """Write the CSV files into ``directory`` (created if its parent exists); return the paths."""
    d = Path(directory)
    if d.exists() and not d.is_dir():
        raise InputError(Problem(str(d), 0, 0, "is a file, not a folder", "give a folder for --csv"))
    if not d.exists():
        if not d.parent.is_dir():
            raise InputError(Problem(str(d), 0, 0, "the parent folder does not exist", "create it first"))
        try:
            d.mkdir()
        except OSError as exc:
            raise InputError(Problem(str(d), 0, 0, f"cannot create the folder: {exc.strerror or exc}",
                                     "choose a folder you can write to")) from None
    files = {"steps.csv": steps_csv(result), "years.csv": years_csv(result),
             "monthly_energy.csv": monthly_energy_csv(result)}
    if hourly:
        text = hourly_energy_csv(result)
        if text is not None:
            files["hourly_energy.csv"] = text
    return [write_atomic(d / name, text, backup=False, replace_readonly=replace_readonly)
            for name, text in files.items()]
