"""Green Button meter data: reading, writing, gaps, peaks and the daily change-point fit.

Round trips are checked against the series written; the daylight-saving dates against the US
statute; the regression against numpy's least squares on the same numbers.
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import numpy as np
import pytest

from homeplan.energy.meter import (
    IntervalSeries,
    MeterFileError,
    change_point_fit,
    change_point_search,
    daily_kwh,
    hourly_kwh,
    monthly_kwh,
    parse_espi_xml,
    parse_green_button_csv,
    peak_demand,
    read_green_button,
    write_espi_xml,
    write_green_button_csv,
)

from ..conftest import ROOT
from .meter_example import EXAMPLE, example_series, example_xml

EPOCH = dt.datetime(1970, 1, 1)


def _series(first: dt.datetime, days: int, interval_s: int = 900, seed: int = 0) -> IntervalSeries:
    n = days * 86400 // interval_s
    start = int((first - EPOCH).total_seconds()) + interval_s * np.arange(n, dtype=np.int64)
    kwh = np.round(np.random.default_rng(seed).uniform(0.05, 1.5, n) * interval_s / 3600, 3)
    return IntervalSeries(start, kwh, interval_s, -5 * 3600, "test")


def test_the_shipped_example_is_the_invented_generator_output() -> None:
    assert (ROOT / EXAMPLE).read_text(encoding="utf-8") == example_xml()
    s = read_green_button(ROOT / EXAMPLE)
    assert s.interval_s == 900 and s.span_days == 31 and not s.gaps


@pytest.mark.parametrize("fmt", ["xml", "csv"])
def test_round_trip_keeps_kwh_totals_and_peak(fmt) -> None:
    original = example_series()
    if fmt == "xml":
        back = parse_espi_xml(write_espi_xml(original), "x.xml")
        assert back.tz_offset_s == original.tz_offset_s
    else:
        back = parse_green_button_csv(write_green_button_csv(original), "x.csv")
    np.testing.assert_array_equal(back.start_s, original.start_s)
    assert back.total_kwh == pytest.approx(original.total_kwh, abs=1e-9)
    assert peak_demand(back) == peak_demand(original)
    # the peak is the highest 15-minute kWh over a quarter of an hour (NEC 2023 220.87: kW averaged
    # over 15 minutes)
    assert peak_demand(original)[0] == pytest.approx(original.kwh.max() * 4)


def test_csv_clock_follows_us_daylight_saving_both_ways() -> None:
    # 15 U.S.C. 260a: DST from 2:00 a.m. on the second Sunday of March (2025-03-09) to 2:00 a.m.
    # on the first Sunday of November (2025-11-02)
    original = _series(dt.datetime(2025, 3, 8), 2, 3600)
    text = write_green_button_csv(original)
    assert "2025-03-09,01:00" in text and "2025-03-09,02:00" not in text and "2025-03-09,03:00" in text
    back = parse_green_button_csv(text, "x.csv")
    np.testing.assert_array_equal(back.start_s, original.start_s)
    autumn = _series(dt.datetime(2025, 11, 1), 2, 900)
    text = write_green_button_csv(autumn)
    assert text.count("2025-11-02,01:00") == 2 and text.count("2025-11-02,01:45") == 2
    back = parse_green_button_csv(text, "x.csv")
    np.testing.assert_array_equal(back.start_s, autumn.start_s)
    assert not back.gaps and back.total_kwh == pytest.approx(autumn.total_kwh)


def test_gaps_are_reported_and_left_out_of_days_and_months() -> None:
    s = _series(dt.datetime(2025, 1, 1), 59, 3600)       # January and February
    keep = np.ones(s.kwh.size, bool)
    keep[24 * 40 + 5: 24 * 40 + 8] = False               # three hours on 2025-02-10
    holed = IntervalSeries(s.start_s[keep], s.kwh[keep], 3600, s.tz_offset_s, "holed")
    (gap,) = holed.gaps
    assert gap.intervals == 3
    assert gap.start_s == int((dt.datetime(2025, 2, 10, 5) - EPOCH).total_seconds())
    months = monthly_kwh(holed)
    assert set(months) == {(2025, 1)}
    assert months[(2025, 1)] == pytest.approx(s.kwh[: 31 * 24].sum())
    dates, _ = daily_kwh(holed)
    assert dt.date(2025, 2, 10) not in dates and len(dates) == 58


def _xml_with(reading: str, uom: int = 72) -> str:
    # the added reading is on line 8, the unit code on line 3
    return f"""<?xml version="1.0"?>
<feed xmlns="http://www.w3.org/2005/Atom" xmlns:espi="http://naesb.org/espi">
<entry><content><espi:ReadingType><espi:flowDirection>1</espi:flowDirection><espi:uom>{uom}</espi:uom>
</espi:ReadingType></content></entry>
<entry><content><espi:IntervalBlock>
<espi:IntervalReading><espi:timePeriod><espi:duration>3600</espi:duration><espi:start>1735689600</espi:start>
</espi:timePeriod><espi:value>500</espi:value></espi:IntervalReading>
{reading}
</espi:IntervalBlock></content></entry>
</feed>
"""


@pytest.mark.parametrize("reading,uom,line,words", [
    ("<espi:IntervalReading><espi:timePeriod><espi:duration>3600</espi:duration><espi:start>1735693200"
     "</espi:start></espi:timePeriod></espi:IntervalReading>", 72, 8, "no value"),
    ("<espi:IntervalReading><espi:timePeriod><espi:duration>300</espi:duration><espi:start>1735693200"
     "</espi:start></espi:timePeriod><espi:value>5</espi:value></espi:IntervalReading>", 72, 8, "interval of 300"),
    ("<espi:IntervalReading><espi:timePeriod><espi:duration>3600</espi:duration><espi:start>1735689600"
     "</espi:start></espi:timePeriod><espi:value>5</espi:value></espi:IntervalReading>", 72, 8, "second reading"),
    ("<espi:IntervalReading><espi:timePeriod><espi:duration>3600</espi:duration><espi:start>1735693200"
     "</espi:start></espi:timePeriod><espi:value>lots</espi:value></espi:IntervalReading>", 72, 8, "not a number"),
    ("", 169, 3, "not watt-hours"),
    ("<espi:IntervalReading><oops></espi:IntervalReading>", 72, 8, "not well-formed"),
])
def test_bad_xml_names_the_line(reading, uom, line, words) -> None:
    with pytest.raises(MeterFileError) as exc:
        parse_espi_xml(_xml_with(reading, uom), "bad.xml")
    assert exc.value.line == line and words in exc.value.message
    assert str(exc.value).startswith(f"bad.xml:{line}:")


def test_entity_declarations_are_refused() -> None:
    bomb = ('<?xml version="1.0"?><!DOCTYPE f [<!ENTITY a "aaaaaaaaaa"><!ENTITY b "&a;&a;&a;&a;">]>'
            "<feed>&b;</feed>")
    with pytest.raises(MeterFileError, match="entity"):
        parse_espi_xml(bomb, "bomb.xml")


def test_received_energy_is_not_use_and_two_delivered_series_are_refused() -> None:
    s = _series(dt.datetime(2025, 1, 1), 2, 3600)
    xml = write_espi_xml(s)
    exported = xml.replace("<espi:flowDirection>1</espi:flowDirection>", "<espi:flowDirection>19</espi:flowDirection>")
    with pytest.raises(MeterFileError, match="only energy sent to the grid"):
        parse_espi_xml(exported, "x.xml")


@pytest.mark.parametrize("text,line,words", [
    ("Name,X\nTYPE,DATE,START TIME,END TIME,USAGE,UNITS\nElectric usage,2025-01-01,00:00,00:59,0.5,kWh\n"
     "Electric usage,2025-01-01,01:00,01:59,half,kWh\n", 4, "not a number"),
    ("TYPE,DATE,START TIME,END TIME,USAGE,UNITS\nElectric usage,2025-13-01,00:00,00:59,0.5,kWh\n", 2, "not readable"),
    ("TYPE,DATE,START TIME,END TIME,USAGE,UNITS\nElectric usage,2025-01-01,00:00,00:59,0.5,therms\n", 2, "not energy"),
    ("account,1\nnothing here\n", 0, "no header"),
])
def test_bad_csv_names_the_line(text, line, words) -> None:
    with pytest.raises(MeterFileError) as exc:
        parse_green_button_csv(text, "bad.csv")
    assert exc.value.line == line and words in exc.value.message


def test_change_point_fit_matches_numpy_least_squares() -> None:
    rng = np.random.default_rng(4)
    temp = rng.uniform(-5, 90, 200)
    hdd, cdd = np.maximum(65 - temp, 0), np.maximum(temp - 65, 0)
    use = 9.0 + 0.8 * hdd + 1.5 * cdd + rng.normal(0, 1.0, temp.size)
    fit = change_point_fit(use, temp)
    x = np.column_stack([np.ones_like(use), hdd, cdd])
    ref, *_ = np.linalg.lstsq(x, use, rcond=None)  # reference: numpy least squares
    np.testing.assert_allclose([fit.base_kwh_per_day, fit.heating_kwh_per_f_day, fit.cooling_kwh_per_f_day],
                               ref, rtol=1e-10)
    assert fit.r2 == pytest.approx(1 - ((use - x @ ref) ** 2).sum() / ((use - use.mean()) ** 2).sum())
    # winter days only: no cooling term; the heating line is numpy's polyfit of the same points
    cold = temp < 60
    winter = change_point_fit(use[cold], temp[cold])
    slope, intercept = np.polyfit(hdd[cold], use[cold], 1)
    assert winter.cooling_kwh_per_f_day == 0.0
    assert (winter.heating_kwh_per_f_day, winter.base_kwh_per_day) == pytest.approx((slope, intercept))


def test_missing_file_and_plain_text(tmp_path: Path) -> None:
    with pytest.raises(MeterFileError, match="cannot read"):
        read_green_button(tmp_path / "none.xml")
    (tmp_path / "x.csv").write_bytes(b"\xff\xfe\x00bad")
    with pytest.raises(MeterFileError, match="UTF-8"):
        read_green_button(tmp_path / "x.csv")


def test_hourly_energy_matches_pandas_resampling() -> None:
    # a 15-minute year across a leap day, with a gap: pandas' resampling is the reference
    import pandas as pd

    s = _series(dt.datetime(2024, 2, 27), 5, 900, seed=7)
    keep = np.ones(s.kwh.size, bool)
    keep[50:53] = False
    holed = IntervalSeries(s.start_s[keep], s.kwh[keep], 900, s.tz_offset_s, "holed")
    index, kwh = hourly_kwh(holed)
    ts = pd.Series(holed.kwh, index=pd.to_datetime(holed.start_s, unit="s"))
    ref = ts.resample("h").agg(["sum", "count"])
    ref = ref[(ref["count"] == 4) & ~((ref.index.month == 2) & (ref.index.day == 29))]
    np.testing.assert_allclose(kwh, ref["sum"].to_numpy(), rtol=1e-12)
    expected = (ref.index.day_of_year - 1 - ((ref.index.is_leap_year) & (ref.index.month > 2))) * 24 + ref.index.hour
    np.testing.assert_array_equal(index, expected.to_numpy())
    # 27 and 28 February, 1 and 2 March kept (29 February left out); readings 50-52 leave hours 12 and 13
    assert 57 * 24 in index and 59 * 24 in index and kwh.size == 4 * 24 - 2


def test_change_point_search_recovers_a_five_parameter_model() -> None:
    # ASHRAE Guideline 14-2014 five-parameter change-point model (heating below one base, cooling
    # above another; from memory); Fels (1986), PRISM: the base temperatures fitted to the data.
    # Reference: scipy's nonlinear least squares of the same piecewise-linear model, started
    # away from the answer, and numpy least squares at the balance points found.
    from scipy.optimize import least_squares

    rng = np.random.default_rng(11)
    temp = rng.uniform(5, 95, 365)
    truth = (11.0, 0.9, 1.6, 57.0, 72.0)      # base kWh/day, kWh per heating / cooling F-day, bases F

    def model(p, t):
        return p[0] + p[1] * np.maximum(p[3] - t, 0) + p[2] * np.maximum(t - p[4], 0)

    use = model(truth, temp) + rng.normal(0, 0.8, temp.size)
    fit = change_point_search(use, temp)
    ref = least_squares(lambda p: model(p, temp) - use, x0=[use.mean(), 0.5, 0.5, 62.0, 68.0]).x
    assert (fit.heating_balance_f, fit.cooling_balance_f) == pytest.approx((ref[3], ref[4]), abs=1.0)  # 1 F grid
    assert (fit.heating_balance_f, fit.cooling_balance_f) == pytest.approx(truth[3:], abs=1.0)
    assert (fit.base_kwh_per_day, fit.heating_kwh_per_f_day, fit.cooling_kwh_per_f_day) == pytest.approx(
        ref[:3], rel=0.05)
    hdd = np.maximum(fit.heating_balance_f - temp, 0)
    cdd = np.maximum(temp - fit.cooling_balance_f, 0)
    x = np.column_stack([np.ones_like(use), hdd, cdd])
    coef, *_ = np.linalg.lstsq(x, use, rcond=None)
    np.testing.assert_allclose([fit.base_kwh_per_day, fit.heating_kwh_per_f_day, fit.cooling_kwh_per_f_day],
                               coef, rtol=1e-10)
    assert fit.sse == pytest.approx(float(((use - x @ coef) ** 2).sum()))


def test_change_point_search_keeps_65_f_when_the_days_cannot_tell() -> None:
    # a month colder than every base tried: every heating base gives the same straight line, so
    # the conventional 65 F degree-day base (ASHRAE Handbook - Fundamentals (2021 edition, ch. 14), from
    # memory) is kept, and the slope is numpy's polyfit of use on 65 F degree days
    rng = np.random.default_rng(5)
    temp = rng.uniform(5, 40, 31)
    use = 20.0 + 0.3 * (65 - temp) + rng.normal(0, 0.5, temp.size)
    fit = change_point_search(use, temp)
    slope, intercept = np.polyfit(65 - temp, use, 1)
    assert fit.heating_balance_f == 65.0 and fit.cooling_kwh_per_f_day == 0.0
    assert (fit.heating_kwh_per_f_day, fit.base_kwh_per_day) == pytest.approx((slope, intercept))
