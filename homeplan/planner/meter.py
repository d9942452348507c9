"""The household's meter file in the plan: read it, take what it can tell, say what it cannot.

Before the home is modelled (:func:`read_meter`): twelve complete months of readings become the
plan's monthly electric use (which calibrates the plug loads, the cooling response and, for a
home heated by resistance, the heat loss, as monthly bills do); a gap-free 15-minute record of a
year, or of at least 30 days, gives the measured peak demand for the NEC 220.87 method when the
plan states none. With fewer than twelve complete months, the model of today's home is
calibrated to the meter's complete days instead (:func:`homeplan.planner.calibration.fit_to_meter`,
against the weather of the metered period when the plan gives it); :func:`meter_summary` reports
that fit (base load, heating and cooling response) with the rest.

Hourly readings average out the 15-minute peaks the code asks for, so they never stand in for
the measured peak; gaps are reported and never filled (a month with a gap is not a complete
month, a window with a gap is not continuous recording).

References
----------
NEC 2023 220.87 (maximum demand over one year, or at least 30 days of continuous recording, as
the highest 15-minute average); ASHRAE Guideline 14-2014 (calibration to metered data; hourly
criteria NMBE within +/-10 %, CV(RMSE) at most 30 %, from memory); NAESB REQ.21 (Green Button ESPI).
"""

from __future__ import annotations

import datetime as dt
import hashlib
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from homeplan.energy.calibrate import fit_statistics
from homeplan.energy.meter import (
    IntervalSeries,
    MeterFileError,
    hourly_kwh,
    monthly_kwh,
    parse_green_button,
    peak_demand,
)
from homeplan.errors import InputError, PlanRuleError, Problem
from homeplan.plan.files import METER, PlanFolder, as_folder, decode_utf8
from homeplan.plan.model import ElectricUsage, Plan
from homeplan.plan.text import clean
from homeplan.planner.calibration import MeterFit
from homeplan.planner.context import PlannerCache, content_key
from homeplan.result.meter import MeterGap, MeterSummary

__all__ = ["MeterReading", "meter_summary", "read_meter"]

MIN_NEC_DAYS = 30.0
YEAR_DAYS = 365.0
HOURLY_NMBE_PCT = 10.0      # ASHRAE Guideline 14-2014, hourly data: NMBE within +/-10 % (from memory)
HOURLY_CV_RMSE_PCT = 30.0   # ASHRAE Guideline 14-2014, hourly data: CV(RMSE) at most 30 % (from memory)
MIN_GRADED_HOURS = 24 * 7


@dataclass(frozen=True, eq=False)
class MeterReading:
    """The meter file read, and what the plan took from it before modelling."""

    series: IntervalSeries
    path: Path
    monthly_kwh: tuple[float, ...] | None
    peak_kw: float
    peak_start_s: int
    peak_period: str | None
    notes: tuple[str, ...]
    key: str = ""           # content key of the file's bytes


def _iso(seconds: int) -> str:
    return (dt.datetime(1970, 1, 1) + dt.timedelta(seconds=int(seconds))).strftime("%Y-%m-%dT%H:%M")


def _last_twelve(months: dict[tuple[int, int], float]) -> tuple[float, ...] | None:
    """January-December use from the latest run of twelve consecutive complete months."""
    keys = sorted(months)
    for end in range(len(keys) - 1, 10, -1):
        run = keys[end - 11:end + 1]
        y0, m0 = run[0]
        if all(run[i] == (y0 + (m0 - 1 + i) // 12, (m0 - 1 + i) % 12 + 1) for i in range(12)):
            by_month = {m: months[(y, m)] for y, m in run}
            return tuple(by_month[m] for m in range(1, 13))
    return None


def read_meter(plan: Plan, base_dir: PlanFolder | Path | None, cache: PlannerCache | None = None
               ) -> tuple[Plan, MeterReading | None]:
    """The plan with what its meter file tells (monthly electric use, the measured peak), and
    the reading; the plan unchanged and None when it names no meter file. The file is read the
    one safe way (a regular file under its size cap, inside the plan's folder unless allowed,
    UTF-8) and parsed once per cache while its content does not change.

    Raises
    ------
    InputError
        For a meter file that cannot be read as a Green Button file, at the line of the problem.
    PlanRuleError
        For a meter file that is missing, not a regular file, too large, not UTF-8 or outside
        the plan's folder (located at ``usage.meter_file`` by the caller).
    """
    u = plan.usage
    if u is None or not u.meter_file:
        return plan, None
    loc = ("usage", "meter_file")
    path, data = as_folder(base_dir).read(u.meter_file, loc, METER)
    try:
        text = decode_utf8(data, u.meter_file, METER)
    except InputError as err:
        raise PlanRuleError(loc, f"meter file {u.meter_file}: {err.problems[0].message}",
                            "download the file again, or save it as UTF-8") from None
    key = content_key("meter", hashlib.sha256(data).hexdigest())
    try:
        series = (cache.memo(key, lambda: parse_green_button(text, str(path))) if cache
                  else parse_green_button(text, str(path)))
    except MeterFileError as exc:
        raise InputError(Problem(exc.name, exc.line, exc.col, clean(exc.message), exc.hint)) from None
    notes: list[str] = []
    gaps = series.gaps
    if gaps:
        hours = sum(g.intervals for g in gaps) * series.interval_s / 3600
        notes.append(f"the meter file has {len(gaps)} gap{'s' if len(gaps) != 1 else ''} ({hours:g} hours "
                     f"missing, first at {_iso(gaps[0].start_s).replace('T', ' ')}); they are not filled: "
                     "days and months with a gap are left out")
    months = _last_twelve(monthly_kwh(series))
    usage = u
    if months is not None:
        # the meter counts what the grid delivered: with solar, what was bought
        usage = u.model_copy(update={"electricity": ElectricUsage(
            monthly_kwh=[round(m, 1) for m in months],
            bills_show="bought" if plan.home.solar is not None else None)})
        if u.electricity is not None:
            notes.append("monthly electric use taken from the meter file (twelve complete months), "
                         "in place of usage.electricity")
        else:
            notes.append("monthly electric use taken from the meter file (twelve complete months)")
    else:
        notes.append("the meter file holds fewer than twelve complete months: the model is calibrated "
                     "from its complete days instead (base load, heating and cooling response)")
    peak, peak_start, period = _measured_peak(series, notes)
    e = plan.home.electrical
    update = {"usage": usage}
    if period is not None:
        if e.peak_demand_kw is None:
            home = plan.home.model_copy(update={"electrical": e.model_copy(update={
                "peak_demand_kw": round(peak, 2), "peak_demand_period": period})})
            update["home"] = home
            notes.append(f"measured peak {peak:.1f} kW from the meter file ({period.replace('_', ' ')}) "
                         "used for the NEC 220.87 method")
        else:
            notes.append(f"the meter file's peak is {peak:.1f} kW; the plan's own peak_demand_kw "
                         f"({e.peak_demand_kw:g} kW) is used")
    if plan.home.solar is not None or plan.home.battery is not None:
        notes.append("with solar or a battery the meter records what the grid delivers, not the "
                     "home's own use")
    reading = MeterReading(series, path, months, peak, peak_start, period, tuple(notes), key)
    return plan.model_copy(update=update), reading


def _measured_peak(series: IntervalSeries, notes: list[str]) -> tuple[float, int, str | None]:
    """The peak for NEC 220.87 when the readings allow it, with the reason when they do not."""
    span = series.span_days
    if series.interval_s != 900:
        kw, start = peak_demand(series)
        notes.append(f"hourly readings (highest hour {kw:.1f} kW) average out the 15-minute peaks "
                     "NEC 220.87 asks for: not used as the measured peak")
        return kw, start, None
    if span < MIN_NEC_DAYS:
        kw, start = peak_demand(series)
        notes.append(f"the meter file covers {span:.0f} days; NEC 220.87 needs at least 30 days of "
                     "continuous recording: its peak is not used")
        return kw, start, None
    window = YEAR_DAYS if span >= YEAR_DAYS else span
    kw, start = peak_demand(series, window)
    first = series.start_s[-1] + series.interval_s - window * 86400
    if any(first <= g.start_s for g in series.gaps):
        notes.append("the readings have gaps in the recording window; NEC 220.87 asks for continuous "
                     "recording: the meter's peak is not used (ask the utility for a complete record)")
        return kw, start, None
    return kw, start, ("12_months" if window >= YEAR_DAYS else "30_days")


def _hourly_grade(series: IntervalSeries, grid_kw: np.ndarray | None, notes: list[str]
                  ) -> tuple[int, float | None, float | None, bool | None]:
    """The model of today's home hour by hour against the meter's complete hours (ASHRAE
    Guideline 14 measures for hourly data): hours compared, NMBE %, CV(RMSE) %, criteria met."""
    if grid_kw is None or np.asarray(grid_kw).size != 8760:
        return 0, None, None, None
    index, kwh = hourly_kwh(series)
    if index.size < MIN_GRADED_HOURS or kwh.mean() <= 0:
        notes.append("fewer than 7 days of complete hours: the hourly model is not graded against the meter")
        return int(index.size), None, None, None
    stats = fit_statistics(kwh, np.asarray(grid_kw, float)[index], n_params=1)
    ok = abs(stats.nmbe_pct) <= HOURLY_NMBE_PCT and stats.cv_rmse_pct <= HOURLY_CV_RMSE_PCT
    notes.append(f"the model of today's home against the meter's {index.size:,} complete hours: NMBE "
                 f"{stats.nmbe_pct:+.1f} %, CV(RMSE) {stats.cv_rmse_pct:.0f} % (ASHRAE Guideline 14 "
                 f"asks within 10 % and at most 30 % for hourly data: {'met' if ok else 'not met'}; the "
                 "model runs a typical year, not the weather and the weekdays of the metered hours)")
    return int(index.size), round(stats.nmbe_pct, 2), round(stats.cv_rmse_pct, 2), ok


def meter_summary(reading: MeterReading, fit: MeterFit | None, today_grid_kw: np.ndarray | None = None
                  ) -> MeterSummary:
    """The meter file in figures, with the change-point fit of its complete days (``fit``, made
    when the home was modelled: against the weather of the metered period when the plan gives
    it, else the typical year) and, given the model's hourly grid draw of today's home
    (``today_grid_kw``, kW over the 8760 hours of the typical year), the hourly grade of that
    model against the meter's complete hours."""
    s = reading.series
    notes = list(reading.notes)
    hours, nmbe, cv, ok = _hourly_grade(s, today_grid_kw, notes)
    cp = fit.metered if fit is not None else None
    if fit is not None:
        notes.extend(fit.notes)
    else:
        notes.append("fewer than 7 complete days: no base load or heating and cooling response")
    end = int(s.start_s[-1]) + s.interval_s
    return MeterSummary(
        file=reading.path.name, interval_minutes=s.interval_s // 60, first=_iso(int(s.start_s[0])), last=_iso(end),
        days=round(s.span_days, 2), readings=int(s.kwh.size), total_kwh=round(s.total_kwh, 3),
        gaps=tuple(MeterGap(_iso(g.start_s), g.intervals * s.interval_s / 3600) for g in s.gaps),
        peak_kw=round(reading.peak_kw, 3), peak_at=_iso(reading.peak_start_s), peak_period=reading.peak_period,
        monthly_kwh=reading.monthly_kwh, base_load_kw=None if cp is None else round(cp.base_load_kw, 3),
        heating_kwh_per_f_day=None if cp is None else round(cp.heating_kwh_per_f_day, 3),
        cooling_kwh_per_f_day=None if cp is None else round(cp.cooling_kwh_per_f_day, 3),
        fit_r2=None if cp is None else round(cp.r2, 3),
        heating_balance_f=None if cp is None else cp.heating_balance_f,
        cooling_balance_f=None if cp is None else cp.cooling_balance_f,
        fit_weather=None if fit is None else (fit.weather_file or "typical year"),
        calibrated=() if fit is None else fit.calibrated,
        daily_nmbe_pct=None if fit is None or fit.daily_nmbe_pct is None else round(fit.daily_nmbe_pct, 2),
        daily_cv_rmse_pct=None if fit is None or fit.daily_cv_rmse_pct is None else round(fit.daily_cv_rmse_pct, 2),
        hourly_hours=hours, hourly_nmbe_pct=nmbe,
        hourly_cv_rmse_pct=cv, meets_hourly_guideline_14=ok, notes=tuple(notes),
    )
