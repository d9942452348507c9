"""The household's meter file in the plan (``usage.meter_file``): its 15-minute peak serves the
NEC 2023 220.87 method, twelve complete months feed the fit to the bills, gaps and hourly
readings are reported and not used where the code asks for more.

Expected figures are computed here from the readings with numpy (sums, maxima), independent of
the planner.
"""

from __future__ import annotations

import datetime as dt
import json
import shutil

import numpy as np
import pytest

from homeplan import load_plan, plan_roadmap
from homeplan.cli import main
from homeplan.energy.meter import IntervalSeries, write_espi_xml, write_green_button_csv
from homeplan.result.roadmap import Roadmap

from ..conftest import ROOT
from ..energy.meter_example import EXAMPLE, example_series

HOME = """\
# invented test home: a small gas home on 100 A with its meter data
home:
  name: Metered home (invented)
  climate: {{hdd65: 5200, heating_design_f: 20, cdd65: 900, cooling_design_f: 90}}
  floor_area_ft2: 2200
  electrical: {{service_amps: 100{peak}}}
appliances:
  - {{id: furnace, kind: furnace, fuel: gas, year_installed: 2008}}
  - {{id: ac, kind: central_ac, year_installed: 2008, capacity_btuh: 30000}}
  - {{id: water_heater, kind: water_heater, fuel: gas, year_installed: 2014}}
  - {{id: range, kind: range, fuel: gas, year_installed: 2010}}
  - {{id: dryer, kind: dryer, fuel: electric, year_installed: 2015}}
usage:
  meter_file: {meter}
budget: {{usd_per_year: 40000, first_year: 2027}}
choices: {{exclude: [solar, battery, heat_pump_dryer]}}
"""

EPOCH = dt.datetime(1970, 1, 1)


def _plan(tmp_path, meter: str, peak: str = ""):
    path = tmp_path / "home.yaml"
    path.write_text(HOME.format(meter=meter, peak=peak))
    return path


def _year_hourly(seed: int = 3) -> IntervalSeries:
    """A year of invented hourly readings: more in winter, a daily swing."""
    n = 365 * 24
    t0 = int((dt.datetime(2025, 1, 1) - EPOCH).total_seconds())
    hours = np.arange(n)
    season = 1.0 + 0.4 * np.cos(2 * np.pi * hours / n)
    day = 0.4 + 0.5 * ((hours % 24 >= 17) & (hours % 24 < 22))
    kwh = np.round(season * day + np.random.default_rng(seed).uniform(0, 0.2, n), 3)
    return IntervalSeries(t0 + 3600 * np.arange(n, dtype=np.int64), kwh, 3600, -6 * 3600, "year")


@pytest.fixture(scope="module")
def january(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("jan")
    shutil.copy(ROOT / EXAMPLE, tmp / "jan.xml")
    return plan_roadmap(load_plan(_plan(tmp, "jan.xml")))


def test_thirty_days_of_15_minute_readings_give_the_measured_peak(january) -> None:
    s = example_series()
    expected_kw = float(s.kwh.max()) * 4   # NEC 2023 220.87: the highest 15-minute average demand
    m = january.roadmap.meter
    assert m is not None and m.peak_period == "30_days"
    assert m.peak_kw == pytest.approx(expected_kw, abs=1e-3)
    assert m.total_kwh == pytest.approx(float(s.kwh.sum()), abs=1e-6)
    assert m.readings == s.kwh.size and m.interval_minutes == 15 and not m.gaps
    assert m.monthly_kwh is None     # one month: no fit of the electric use to it
    # the measured peak is the planner's today figure and the NEC 2023 220.87 method is used
    first = january.roadmap.years[0]
    assert first.peak_demand_kw >= expected_kw - 1e-6
    assert january.roadmap.assumptions["peak_demand"].startswith("today's figure is your measured peak (30 days)")
    assert any("220.87" in c.method and "measured peak" in c.label for c in january.capacity)
    assert any("measured peak" in w and "30 days" in w for w in january.warnings)
    # the plan as written stays the result's plan (the file is not changed by reading the meter)
    assert january.plan.home.electrical.peak_demand_kw is None


def test_the_plans_own_peak_is_kept(tmp_path) -> None:
    shutil.copy(ROOT / EXAMPLE, tmp_path / "jan.xml")
    r = plan_roadmap(load_plan(_plan(tmp_path, "jan.xml", ", peak_demand_kw: 2.5")))
    assert r.roadmap.meter.peak_kw == pytest.approx(float(example_series().kwh.max()) * 4, abs=1e-3)
    assert r.roadmap.years[0].peak_demand_kw < r.roadmap.meter.peak_kw  # 2.5 kW today, not the meter's
    assert any("plan's own peak_demand_kw" in w for w in r.warnings)


def test_a_gap_is_reported_and_stops_the_measured_peak(tmp_path) -> None:
    s = example_series()
    keep = np.ones(s.kwh.size, bool)
    keep[1000:1004] = False                                  # one hour missing on day 11
    holed = IntervalSeries(s.start_s[keep], s.kwh[keep], 900, s.tz_offset_s, "holed")
    (tmp_path / "holed.xml").write_text(write_espi_xml(holed))
    r = plan_roadmap(load_plan(_plan(tmp_path, "holed.xml")))
    m = r.roadmap.meter
    assert m.peak_period is None and len(m.gaps) == 1 and m.gaps[0].hours == 1.0
    assert m.total_kwh == pytest.approx(float(holed.kwh.sum()), abs=1e-6)   # nothing filled in
    assert any("1 gap" in w and "not filled" in w for w in r.warnings)
    assert any("continuous recording" in w for w in r.warnings)


def test_a_year_of_hourly_readings_feeds_the_fit_to_the_bills(tmp_path) -> None:
    s = _year_hourly()
    (tmp_path / "year.csv").write_text(write_green_button_csv(s))
    r = plan_roadmap(load_plan(_plan(tmp_path, "year.csv")))
    m = r.roadmap.meter
    assert m.interval_minutes == 60 and m.peak_period is None       # hourly: not a 220.87 peak
    starts = (s.start_s // 86400).astype("datetime64[D]").astype(object)
    months = np.array([d.month for d in starts])
    by_month = [float(s.kwh[months == k].sum()) for k in range(1, 13)]
    assert m.monthly_kwh == pytest.approx(by_month, abs=0.06)        # rounded to 0.1 kWh
    (fit,) = [c for c in r.roadmap.calibration if c.fuel == "electricity"]
    assert fit.monthly and fit.billed == pytest.approx(sum(by_month), abs=1.0)
    assert any("hourly readings" in w for w in r.warnings)
    assert m.base_load_kw is not None and m.fit_r2 is not None
    # the model's hourly grid draw of today's home graded against every hour of the meter by
    # ASHRAE Guideline 14's formulas (n - p degrees of freedom, p = 1), computed here
    (today,) = [h for h in r.hourly if h.label == "today"]
    y, y_hat = s.kwh, np.asarray(today.grid_import_kw)      # 2025 from 1 January: hour i is hour i
    n = y.size
    assert m.hourly_hours == n == 8760
    assert m.hourly_nmbe_pct == pytest.approx((y - y_hat).sum() / ((n - 1) * y.mean()) * 100, abs=0.01)
    assert m.hourly_cv_rmse_pct == pytest.approx(np.sqrt(((y - y_hat) ** 2).sum() / (n - 1)) / y.mean() * 100,
                                                 abs=0.01)
    assert m.meets_hourly_guideline_14 == (abs(m.hourly_nmbe_pct) <= 10 and m.hourly_cv_rmse_pct <= 30)


def test_meter_figures_in_the_json_round_trip(january) -> None:
    data = json.loads(json.dumps(january.roadmap.to_dict()))
    assert data["meter"]["peak_period"] == "30_days"
    back = Roadmap.from_dict(data)
    assert back.meter == january.roadmap.meter


def test_a_bad_meter_file_is_exit_2_with_its_line(tmp_path, capsys) -> None:
    bad = write_espi_xml(example_series(2)).replace("<value>", "<value>x", 1)
    (tmp_path / "bad.xml").write_text(bad)
    line = bad[: bad.index("<value>x")].count("\n") + 1
    assert main(["plan", str(_plan(tmp_path, "bad.xml"))]) == 2
    err = capsys.readouterr().err
    assert f"bad.xml:{line}" in err and "not a number" in err
    assert main(["plan", str(_plan(tmp_path, "missing.xml"))]) == 2
    assert "meter file missing.xml: file not found" in capsys.readouterr().err


def test_with_solar_the_meters_months_count_what_was_bought(tmp_path) -> None:
    # Green Button "delivered" readings (ESPI flowDirection 1) are what the grid delivered: with
    # solar on the roof, the bought energy - not the net, not the home's use
    from homeplan.planner.meter import read_meter

    (tmp_path / "year.csv").write_text(write_green_button_csv(_year_hourly()))
    text = (ROOT / "sample_homes" / "newer_ac_small_solar.yaml").read_text()
    path = tmp_path / "solar.yaml"
    path.write_text(text.replace("\nusage:\n", "\nusage:\n  meter_file: year.csv\n")
                    if "\nusage:\n" in text else text + "usage:\n  meter_file: year.csv\n")
    loaded = load_plan(path)
    plan, reading = read_meter(loaded.plan, loaded.base_dir)
    assert reading is not None and plan.usage.electricity.bills_show == "bought"
    assert sum(plan.usage.electricity.monthly_kwh) == pytest.approx(float(_year_hourly().kwh.sum()), abs=1.0)
    assert any("what the grid delivers" in n for n in reading.notes)


def test_check_reads_the_meter_file(tmp_path, capsys) -> None:
    shutil.copy(ROOT / EXAMPLE, tmp_path / "jan.xml")
    assert main(["check", str(_plan(tmp_path, "jan.xml"))]) == 0
    out = capsys.readouterr().out
    s = example_series()
    assert f"jan.xml: {s.kwh.size:,} readings of 15 minutes over 31 days, {s.kwh.sum():,.0f} kWh" in out
    (tmp_path / "bad.xml").write_text((tmp_path / "jan.xml").read_text().replace("<value>", "<value>-", 1))
    assert main(["check", str(_plan(tmp_path, "bad.xml"))]) == 2
    assert "bad.xml:" in capsys.readouterr().err
