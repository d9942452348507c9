"""The portfolio's sums and exports.

The yearly sums are recomputed here in Python (math.fsum over every stored home-year) rather
than in SQL; the coincidence factor is checked against Rusck's formula worked by hand; the CSV
and Parquet files are read back with the csv module and pyarrow.
"""

from __future__ import annotations

import csv
import math
import sqlite3

import pyarrow.parquet as pq
import pytest

from homeplan.portfolio.rollup import (
    HOME_COLUMNS,
    YEAR_COLUMNS,
    Coincidence,
    coincidence_factor,
    rollup,
    write_exports,
)
from homeplan.portfolio.store import Store

from .conftest import HOMES


@pytest.fixture(scope="module")
def summed(straight_run):
    with Store.open(straight_run, readonly=True) as store:
        yield rollup(store, Coincidence(0.6, 0.4, "test"), {"demo_state_hp_rebate": 5000.0})


def _home_years(path):
    conn = sqlite3.connect(path)
    conn.row_factory = sqlite3.Row
    rows = conn.execute("SELECT y.* FROM home_years y JOIN homes h USING (seq) WHERE h.status = 'ok'").fetchall()
    conn.close()
    return rows


def test_rusck_coincidence_by_hand():
    # Rusck (1956): c(n) = c_inf + (1 - c_inf) / sqrt(n)
    assert coincidence_factor(1, 0.5) == 1.0          # one home: its own peak
    assert coincidence_factor(4, 0.5) == 0.75         # 0.5 + 0.5 / 2
    assert coincidence_factor(100, 0.6) == pytest.approx(0.64)  # 0.6 + 0.4 / 10
    assert coincidence_factor(10**8, 0.7) == pytest.approx(0.7, abs=1e-4)
    assert coincidence_factor(0, 0.7) == 0.0
    with pytest.raises(ValueError):
        Coincidence(1.2, 0.5, "")


def test_yearly_sums_are_the_sums_of_the_homes(straight_run, summed):
    rows = _home_years(straight_run)
    for y in summed.years:
        mine = [r for r in rows if r["year"] == y["year"]]
        assert y["homes"] == len(mine) == summed.counts["ok"]
        for col in ("spend_usd", "incentives_usd", "net_usd", "bill_savings_usd", "fossil_before_usd",
                    "fossil_after_usd"):
            assert y[col] == pytest.approx(math.fsum(r[col] for r in mine), abs=0.01), col
        assert y["fossil_avoided_usd"] == pytest.approx(y["fossil_before_usd"] - y["fossil_after_usd"], abs=0.02)
        assert y["emissions_before_t"] == pytest.approx(math.fsum(r["emissions_before_kg"] for r in mine) / 1000,
                                                        abs=0.001)
        for col in ("peak_demand_kw", "peak_demand_winter_kw", "peak_demand_summer_kw"):
            assert y[f"{col}_sum"] == pytest.approx(math.fsum(r[col] for r in mine), abs=0.01), col
        w = math.fsum(r["added_winter_kw"] for r in mine)
        n = sum(abs(r["added_winter_kw"]) >= 0.01 for r in mine)
        assert y["added_winter_kw_sum"] == pytest.approx(w, abs=0.01)
        assert y["added_winter_kw_diversified"] == pytest.approx(w * (0.6 + 0.4 / math.sqrt(n)) if n else 0.0,
                                                                 abs=0.01)
        assert y["homes_near_limit"] == sum(r["near_limit"] for r in mine)
        assert y["service_upgrades"] == sum(r["service_upgrades"] for r in mine)


def test_a_program_budget_runs_out_in_the_year_the_draws_pass_it(straight_run, summed):
    conn = sqlite3.connect(straight_run)
    by_year = dict(conn.execute("SELECT year, SUM(amount_usd) FROM home_programs "
                                "WHERE program_id = 'demo_state_hp_rebate' GROUP BY year ORDER BY year"))
    conn.close()
    total, expected = 0.0, None
    for year, amount in sorted(by_year.items()):
        total += amount
        if total > 5000.0 and expected is None:
            expected = year
    assert expected is not None  # the test budget is small enough to run out
    t = next(p for p in summed.program_totals if p.program_id == "demo_state_hp_rebate")
    assert t.budget_usd == 5000.0 and t.exhausted_year == expected
    assert t.over_budget_usd == pytest.approx(max(0.0, total - 5000.0), abs=0.01)


def test_exports_hold_the_same_numbers(straight_run, summed, tmp_path):
    with Store.open(straight_run, readonly=True) as store:
        files = write_exports(store, tmp_path, summed)
    assert {f.name for f in files} >= {"years.csv", "years.parquet", "homes.csv", "home_years.parquet"}
    with open(tmp_path / "years.csv", newline="") as fh:
        lines = list(csv.DictReader(fh))
    assert tuple(lines[0]) == YEAR_COLUMNS
    assert [float(r["spend_usd"]) for r in lines] == [y["spend_usd"] for y in summed.years]
    table = pq.read_table(tmp_path / "years.parquet").to_pylist()
    assert [r["added_winter_kw_diversified"] for r in table] == [y["added_winter_kw_diversified"]
                                                                 for y in summed.years]
    homes = pq.read_table(tmp_path / "homes.parquet")
    assert homes.num_rows == HOMES and tuple(homes.column_names) == HOME_COLUMNS
    assert pq.read_table(tmp_path / "home_years.parquet").num_rows == len(_home_years(straight_run))
    assert not list(tmp_path.glob(".*.tmp"))  # every file was completed and renamed
