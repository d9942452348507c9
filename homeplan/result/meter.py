"""What the household's own meter data said, and what the plan took from it.

References
----------
None: a data container. The figures come from :mod:`homeplan.energy.meter` through
:mod:`homeplan.planner.meter`.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import asdict, dataclass
from typing import Any

__all__ = ["MeterGap", "MeterSummary"]


@dataclass(frozen=True)
class MeterGap:
    """Readings missing from the file (reported, never filled).

    Attributes
    ----------
    start : str
        Local standard time of the first missing interval, ISO ``YYYY-MM-DDTHH:MM``.
    hours : float
        Time missing, hours.
    """

    start: str
    hours: float


@dataclass(frozen=True)
class MeterSummary:
    """The meter file in figures.

    Attributes
    ----------
    file : str
        The file's name.
    interval_minutes : int
        Minutes per reading (15 or 60).
    first : str
        Start of the first reading, local standard time (ISO).
    last : str
        End of the last reading, local standard time (ISO).
    days : float
        Days from the first reading to the last.
    readings : int
        Readings in the file.
    total_kwh : float
        Electricity delivered over the readings, kWh.
    gaps : tuple of MeterGap
        Missing readings.
    peak_kw : float
        Highest average demand over one reading, kW.
    peak_at : str
        When it started, local standard time (ISO).
    peak_period : str or None
        ``12_months`` or ``30_days`` when the peak serves the NEC 220.87 method; None when it
        cannot (hourly readings, fewer than 30 days, gaps in the window).
    monthly_kwh : tuple of float or None
        January to December use from twelve complete months (None: fewer in the file).
    base_load_kw : float or None
        Use with no heating or cooling, as a steady power, kW (None: too few complete days).
    heating_kwh_per_f_day : float or None
        Extra daily use per heating degree day (below ``heating_balance_f``), kWh per F-day.
    cooling_kwh_per_f_day : float or None
        Extra daily use per cooling degree day (above ``cooling_balance_f``), kWh per F-day.
    fit_r2 : float or None
        How well daily use follows the degree days, dimensionless.
    heating_balance_f : float or None
        The fitted heating change point (base of the heating degree days), F.
    cooling_balance_f : float or None
        The fitted cooling change point, F.
    fit_weather : str or None
        The weather the daily use was fitted against: the name of the file of the metered
        period's weather, or ``typical year`` (matched by day of the year).
    calibrated : tuple of str
        What of the model of today's home was taken from the meter's days (``plug``,
        ``heating``, ``heating_fan``, ``cooling``; empty: nothing, e.g. twelve months or bills
        calibrate it).
    daily_nmbe_pct : float or None
        NMBE of the model's daily grid draw against the meter's complete days, % (same weather).
    daily_cv_rmse_pct : float or None
        CV(RMSE) of the same, %.
    hourly_hours : int
        Complete hours of the meter the model of today's home was graded against (0: not graded).
    hourly_nmbe_pct : float or None
        ASHRAE Guideline 14 NMBE of the model's hourly grid draw against those hours, %.
    hourly_cv_rmse_pct : float or None
        ASHRAE Guideline 14 CV(RMSE) of the same, %.
    meets_hourly_guideline_14 : bool or None
        NMBE within +/-10 % and CV(RMSE) at most 30 % (None: not graded).
    notes : tuple of str
        What the plan took from the file and what it could not, in words.
    """

    file: str
    interval_minutes: int
    first: str
    last: str
    days: float
    readings: int
    total_kwh: float
    gaps: tuple[MeterGap, ...]
    peak_kw: float
    peak_at: str
    peak_period: str | None
    monthly_kwh: tuple[float, ...] | None = None
    base_load_kw: float | None = None
    heating_kwh_per_f_day: float | None = None
    cooling_kwh_per_f_day: float | None = None
    fit_r2: float | None = None
    heating_balance_f: float | None = None
    cooling_balance_f: float | None = None
    fit_weather: str | None = None
    calibrated: tuple[str, ...] = ()
    daily_nmbe_pct: float | None = None
    daily_cv_rmse_pct: float | None = None
    hourly_hours: int = 0
    hourly_nmbe_pct: float | None = None
    hourly_cv_rmse_pct: float | None = None
    meets_hourly_guideline_14: bool | None = None
    notes: tuple[str, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        d = asdict(self)
        d["gaps"] = [asdict(g) for g in self.gaps]
        d["monthly_kwh"] = None if self.monthly_kwh is None else list(self.monthly_kwh)
        d["notes"] = list(self.notes)
        d["calibrated"] = list(self.calibrated)
        return d

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> MeterSummary:
        d = dict(data)
        d["gaps"] = tuple(MeterGap(str(g["start"]), float(g["hours"])) for g in d.get("gaps", ()))
        d["monthly_kwh"] = None if d.get("monthly_kwh") is None else tuple(float(v) for v in d["monthly_kwh"])
        d["notes"] = tuple(d.get("notes", ()))
        d["calibrated"] = tuple(d.get("calibrated", ()))
        known = set(cls.__dataclass_fields__)
        return cls(**{k: v for k, v in d.items() if k in known})
