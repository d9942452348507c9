"""The sums of a portfolio: per year, per incentive program, per kind of work; CSV and Parquet.

Every sum is over the homes with a roadmap (status ``ok``); homes without one (no roadmap fits,
a bad row, a planner error) are counted and listed, not added. Sums are taken by SQLite in the
order of the homes in the input, so the same homes give the same sums whatever order they were
planned in; money is rounded to the cent, energy and power to 0.01.

Peak load: each home's peak demand in a year is the roadmap's ``peak_demand_*``, the peak a
meter would show on the winter and on the summer design day (today's measured or estimated peak
moved by the design-day demand of the big electric loads); its added winter and summer peak is
that minus the do-nothing baseline's in the same year. The roll-up sums both. Individual peaks
do not all happen in the same hour, so their sum overstates what the grid carries; the
diversified figure multiplies the sum of the added peaks by the coincidence factor of a group of
n homes,

    c(n) = c_inf + (1 - c_inf) / sqrt(n)

(n: the homes whose seasonal peak changed; c_inf: the factor of a very large group, per season,
``data/coincidence.csv`` or ``--coincidence``).

References
----------
Rusck, S. (1956), "The simultaneous demand in distribution network supplying domestic
consumers", ASEA Journal 10, 59-61 (the coincidence factor as a function of the number of
consumers, c_inf + (1 - c_inf)/sqrt(n)).
"""

from __future__ import annotations

import csv
import math
import os
import tempfile
from collections.abc import Iterable, Iterator, Mapping
from dataclasses import dataclass, field
from functools import cache
from pathlib import Path
from typing import Any

from homeplan.portfolio.store import Store

__all__ = [
    "Coincidence",
    "ProgramTotal",
    "Rollup",
    "coincidence_factor",
    "default_coincidence",
    "rollup",
    "write_exports",
]

DATA = Path(__file__).with_name("data")
METHOD = ("sum of each home's change in its design-day peak demand x c(n) = c_inf + (1 - c_inf)/sqrt(n) "
          "for the n homes whose peak changed (Rusck 1956)")


@dataclass(frozen=True)
class Coincidence:
    """c_inf of a very large group of homes, winter and summer, and where the values come from."""

    winter: float
    summer: float
    source: str

    def __post_init__(self) -> None:
        for v in (self.winter, self.summer):
            if not 0.0 < v <= 1.0:
                raise ValueError(f"a coincidence factor is between 0 and 1, not {v}")


@cache
def default_coincidence() -> Coincidence:
    """The defaults of ``data/coincidence.csv``."""
    with (DATA / "coincidence.csv").open(encoding="utf-8", newline="") as fh:
        rows = {r["season"]: r for r in csv.DictReader(fh)}
    return Coincidence(float(rows["winter"]["c_inf"]), float(rows["summer"]["c_inf"]),
                       "; ".join(f"{s}: {r['source']}" for s, r in rows.items()))


def coincidence_factor(n: int, c_inf: float) -> float:
    """Coincidence factor of ``n`` homes: 1 for one home, tending to ``c_inf`` for many
    (Rusck 1956). 0 homes: 0."""
    if n <= 0:
        return 0.0
    return c_inf + (1.0 - c_inf) / math.sqrt(n)


YEAR_SQL = """
SELECT y.year, COUNT(*),
  SUM(y.spend_usd), SUM(y.incentives_usd), SUM(y.net_usd), SUM(y.bill_savings_usd),
  SUM(y.fossil_before_usd), SUM(y.fossil_after_usd),
  SUM(y.emissions_before_kg), SUM(y.emissions_after_kg),
  SUM(y.peak_demand_kw), SUM(y.peak_demand_winter_kw), SUM(y.peak_demand_summer_kw),
  SUM(y.added_winter_kw), SUM(y.added_summer_kw),
  COALESCE(SUM(ABS(y.added_winter_kw) >= 0.01), 0), COALESCE(SUM(ABS(y.added_summer_kw) >= 0.01), 0),
  SUM(y.service_upgrades), SUM(y.near_limit), SUM(y.over_limit)
FROM home_years y JOIN homes h ON h.seq = y.seq
WHERE h.status = 'ok'
GROUP BY y.year ORDER BY y.year
"""

YEAR_COLUMNS = (
    "year", "homes", "spend_usd", "incentives_usd", "net_usd", "bill_savings_usd",
    "fossil_before_usd", "fossil_after_usd", "fossil_avoided_usd",
    "emissions_before_t", "emissions_after_t", "emissions_avoided_t",
    "peak_demand_kw_sum", "peak_demand_winter_kw_sum", "peak_demand_summer_kw_sum",
    "added_winter_kw_sum", "added_summer_kw_sum", "homes_winter_changed", "homes_summer_changed",
    "added_winter_kw_diversified", "added_summer_kw_diversified",
    "service_upgrades", "homes_near_limit", "homes_over_limit",
)
"""The columns of the yearly roll-up (money USD, emissions tonnes CO2e, power kW)."""

PROGRAM_COLUMNS = ("program_id", "name", "year", "amount_usd", "homes", "cumulative_usd",
                   "budget_usd", "budget_left_usd")
WORK_COLUMNS = ("year", "kind", "steps", "cost_usd", "incentives_usd")
HOME_COLUMNS = ("seq", "home_id", "status", "message", "plan_name", "place", "npv_usd", "spend_usd",
                "incentives_usd", "steps_count", "gas_closed_year", "fully_electric_year",
                "service_amps_today", "headroom_today_amps", "peak_demand_winter_kw_today",
                "peak_demand_summer_kw_today", "peak_demand_winter_kw_after",
                "peak_demand_summer_kw_after",
                "content_hash", "seconds", "cpu_seconds")
HOME_YEAR_COLUMNS = ("seq", "year", "spend_usd", "incentives_usd", "net_usd", "bill_savings_usd",
                     "bills_usd", "fossil_before_usd", "fossil_after_usd", "emissions_before_kg",
                     "emissions_after_kg", "peak_demand_kw", "peak_demand_winter_kw",
                     "peak_demand_summer_kw", "added_winter_kw",
                     "added_summer_kw", "service_amps", "headroom_amps", "near_limit",
                     "over_limit", "service_upgrades")


@dataclass(frozen=True)
class ProgramTotal:
    """One incentive program over the whole portfolio."""

    program_id: str
    name: str
    amount_usd: float
    homes: int
    homes_at_cap: int
    budget_usd: float | None = None
    exhausted_year: int | None = None
    over_budget_usd: float = 0.0


@dataclass(frozen=True)
class Rollup:
    """The portfolio's sums (see the module docstring)."""

    counts: dict[str, int]
    years: tuple[dict[str, Any], ...]
    programs: tuple[dict[str, Any], ...]
    program_totals: tuple[ProgramTotal, ...]
    work: tuple[dict[str, Any], ...]
    coincidence: Coincidence
    method: str = METHOD
    meta: dict[str, Any] = field(default_factory=dict)
    npv_usd: float = 0.0
    gas_closed: int = 0
    fully_electric: int = 0


def _r(v: float | None, digits: int = 2) -> float:
    return round(float(v or 0.0), digits)


def rollup(store: Store, coincidence: Coincidence | None = None,
           budgets: Mapping[str, float] | None = None) -> Rollup:
    """Add up the stored homes (see the module docstring)."""
    co = coincidence or default_coincidence()
    budgets = dict(budgets or {})
    years = []
    for row in store.conn.execute(YEAR_SQL):
        (year, homes, spend, inc, net, savings, f_before, f_after, e_before, e_after,
         p_sum, pw_sum, ps_sum, w_sum, s_sum, w_n, s_n, upgrades, near, over) = row
        years.append({
            "year": year, "homes": homes, "spend_usd": _r(spend), "incentives_usd": _r(inc),
            "net_usd": _r(net), "bill_savings_usd": _r(savings),
            "fossil_before_usd": _r(f_before), "fossil_after_usd": _r(f_after),
            "fossil_avoided_usd": _r((f_before or 0) - (f_after or 0)),
            "emissions_before_t": _r((e_before or 0) / 1000, 3),
            "emissions_after_t": _r((e_after or 0) / 1000, 3),
            "emissions_avoided_t": _r(((e_before or 0) - (e_after or 0)) / 1000, 3),
            "peak_demand_kw_sum": _r(p_sum), "peak_demand_winter_kw_sum": _r(pw_sum),
            "peak_demand_summer_kw_sum": _r(ps_sum),
            "added_winter_kw_sum": _r(w_sum), "added_summer_kw_sum": _r(s_sum),
            "homes_winter_changed": w_n, "homes_summer_changed": s_n,
            "added_winter_kw_diversified": _r((w_sum or 0) * coincidence_factor(w_n, co.winter)),
            "added_summer_kw_diversified": _r((s_sum or 0) * coincidence_factor(s_n, co.summer)),
            "service_upgrades": upgrades, "homes_near_limit": near, "homes_over_limit": over,
        })
    programs = []
    totals: dict[str, dict[str, Any]] = {}
    for pid, name, year, amount, homes in store.conn.execute(
            """SELECT p.program_id, MIN(p.name), p.year, SUM(p.amount_usd), COUNT(DISTINCT p.seq)
               FROM home_programs p JOIN homes h ON h.seq = p.seq WHERE h.status = 'ok'
               GROUP BY p.program_id, p.year ORDER BY p.program_id, p.year"""):
        t = totals.setdefault(pid, {"name": name, "amount": 0.0, "exhausted": None, "over": 0.0})
        t["amount"] += amount
        budget = budgets.get(pid)
        left = None if budget is None else _r(budget - t["amount"])
        if budget is not None and t["amount"] > budget + 0.005 and t["exhausted"] is None:
            t["exhausted"] = year
        programs.append({"program_id": pid, "name": name, "year": year, "amount_usd": _r(amount),
                         "homes": homes, "cumulative_usd": _r(t["amount"]), "budget_usd": budget,
                         "budget_left_usd": left})
    program_totals = []
    for pid, homes, capped in store.conn.execute(
            """SELECT p.program_id, COUNT(DISTINCT p.seq), COUNT(DISTINCT CASE WHEN p.at_cap THEN p.seq END)
               FROM home_programs p JOIN homes h ON h.seq = p.seq WHERE h.status = 'ok'
               GROUP BY p.program_id ORDER BY p.program_id"""):
        t = totals[pid]
        budget = budgets.get(pid)
        program_totals.append(ProgramTotal(
            pid, t["name"], _r(t["amount"]), homes, capped, budget, t["exhausted"],
            _r(max(0.0, t["amount"] - budget)) if budget is not None else 0.0))
    for pid, budget in budgets.items():  # a budget for a program no home drew from
        if pid not in totals:
            program_totals.append(ProgramTotal(pid, pid, 0.0, 0, 0, budget))
    work = [{"year": y, "kind": k, "steps": n, "cost_usd": _r(c), "incentives_usd": _r(i)}
            for y, k, n, c, i in store.conn.execute(
                """SELECT s.year, s.kind, COUNT(*), SUM(s.cost_usd), SUM(s.incentives_usd)
                   FROM home_steps s JOIN homes h ON h.seq = s.seq WHERE h.status = 'ok'
                   GROUP BY s.year, s.kind ORDER BY s.year, s.kind""")]
    npv, gas, electric = store.conn.execute(
        """SELECT SUM(npv_usd), COUNT(gas_closed_year), COUNT(fully_electric_year)
           FROM homes WHERE status = 'ok'""").fetchone()
    return Rollup(counts=store.counts(), years=tuple(years), programs=tuple(programs),
                  program_totals=tuple(program_totals), work=tuple(work), coincidence=co,
                  meta=store.meta(), npv_usd=_r(npv), gas_closed=gas or 0, fully_electric=electric or 0)


# ---------------------------------------------------------------------------- export


class _Atomic:
    """A file written beside its target and renamed over it when complete."""

    def __init__(self, target: Path, mode: str = "w") -> None:
        self.target = target
        fd, self.tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent)
        os.close(fd)
        self.mode = mode

    def __enter__(self) -> str:
        return self.tmp

    def __exit__(self, exc_type: object, *_: object) -> None:
        if exc_type is None:
            os.replace(self.tmp, self.target)
        else:
            Path(self.tmp).unlink(missing_ok=True)


def _csv(path: Path, columns: tuple[str, ...], rows: Iterable[Iterable[Any]]) -> None:
    with _Atomic(path) as tmp, open(tmp, "w", encoding="utf-8", newline="") as fh:
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(columns)
        for row in rows:
            w.writerow(["" if v is None else v for v in row])


def _parquet(path: Path, columns: tuple[str, ...], rows: Iterable[Iterable[Any]],
             chunk: int = 20_000) -> None:
    """Rows to a Parquet file, a chunk at a time (memory does not grow with the rows)."""
    # pyarrow is a large library: loaded only when exporting
    import pyarrow as pa
    import pyarrow.parquet as pq

    def table(block: list[tuple]) -> pa.Table:
        cols = list(zip(*block, strict=True)) if block else [[] for _ in columns]
        return pa.table({c: pa.array(list(v)) for c, v in zip(columns, cols, strict=True)})

    with _Atomic(path) as tmp:
        writer = None
        block: list[tuple] = []
        try:
            for row in rows:
                block.append(tuple(row))
                if len(block) >= chunk:
                    t = table(block)
                    writer = writer or pq.ParquetWriter(tmp, t.schema)
                    writer.write_table(t.cast(writer.schema))
                    block = []
            if block or writer is None:
                t = table(block) if block else pa.table({c: pa.array([], pa.null()) for c in columns})
                writer = writer or pq.ParquetWriter(tmp, t.schema)
                writer.write_table(t.cast(writer.schema))
        finally:
            if writer is not None:
                writer.close()


def _dict_rows(rows: Iterable[Mapping[str, Any]], columns: tuple[str, ...]) -> Iterator[tuple]:
    for r in rows:
        yield tuple(r.get(c) for c in columns)


def write_exports(store: Store, folder: str | Path, r: Rollup) -> list[Path]:
    """The roll-up and every stored home as CSV and Parquet files in ``folder`` (each written
    beside its name and renamed when complete). Returns the files written."""
    out = Path(folder)
    out.mkdir(parents=True, exist_ok=True)
    written = []
    program_rows = [*r.programs]
    tables: list[tuple[str, tuple[str, ...], Any]] = [
        ("years", YEAR_COLUMNS, lambda: _dict_rows(r.years, YEAR_COLUMNS)),
        ("programs", PROGRAM_COLUMNS, lambda: _dict_rows(program_rows, PROGRAM_COLUMNS)),
        ("work", WORK_COLUMNS, lambda: _dict_rows(r.work, WORK_COLUMNS)),
        ("homes", HOME_COLUMNS, lambda: store.homes(HOME_COLUMNS)),
        ("home_years", HOME_YEAR_COLUMNS, lambda: store.conn.execute(
            f"SELECT {', '.join(HOME_YEAR_COLUMNS)} FROM home_years ORDER BY seq, year")),
    ]
    for name, columns, rows in tables:
        _csv(out / f"{name}.csv", columns, rows())
        _parquet(out / f"{name}.parquet", columns, rows())
        written += [out / f"{name}.csv", out / f"{name}.parquet"]
    return written
