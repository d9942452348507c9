"""The invented meter data shipped as sample_homes/meter/invented_january_15min.xml.

An invented all-purpose profile, not a measurement: a gas-heated home's electricity in
January 2025, 15-minute readings on a US Central standard-time clock. Base load, morning and
evening activity, the furnace blower following a synthetic outdoor temperature, an electric range
at dinner on most days and an electric dryer three times a week. ``tests/energy/test_meter.py``
checks that the shipped file is exactly what this function writes.
"""

from __future__ import annotations

import datetime as dt

import numpy as np

from homeplan.energy.meter import IntervalSeries, write_espi_xml

EXAMPLE = "sample_homes/meter/invented_january_15min.xml"
TZ_CENTRAL_S = -6 * 3600


def example_series(days: int = 31, seed: int = 2025) -> IntervalSeries:
    """The invented readings (kWh per 15 minutes, rounded to Wh)."""
    rng = np.random.default_rng(seed)
    n = days * 96
    t0 = int((dt.datetime(2025, 1, 1) - dt.datetime(1970, 1, 1)).total_seconds())
    start = t0 + 900 * np.arange(n, dtype=np.int64)
    hour = (np.arange(n) % 96) / 4.0
    day = np.arange(n) // 96
    daily_mean_f = 22.0 + 8.0 * np.sin(day / 5.0) + rng.normal(0, 4.0, days)[day]
    temp_f = daily_mean_f - 7.0 * np.cos((hour - 4.0) / 24.0 * 2 * np.pi)
    kw = 0.32 + rng.normal(0, 0.03, n).clip(-0.1, 0.1)                      # fridge, electronics
    kw += np.where((hour >= 6) & (hour < 8.5), 0.6, 0.0)                     # morning
    kw += np.where((hour >= 17) & (hour < 22.5), 0.9, 0.0)                   # evening lights, TV
    kw += 0.55 * np.clip((65.0 - temp_f) / 55.0, 0.0, 1.0)                   # furnace blower duty
    cooks = rng.random(days) < 0.7
    dinner = (hour >= 17.75) & (hour < 18.5) & cooks[day]
    kw += np.where(dinner, 2.6, 0.0)                                         # electric range
    dries = np.isin(np.arange(days) % 7, (1, 4, 6))
    laundry = (hour >= 18.25) & (hour < 19.0) & dries[day]
    kw += np.where(laundry, 5.2, 0.0)                                        # electric dryer
    kwh = np.round(kw * 0.25, 3)
    return IntervalSeries(start + 0, kwh, 900, TZ_CENTRAL_S, "invented")


def example_daily_mean_f(days: int = 31, seed: int = 2025) -> np.ndarray:
    """The synthetic outdoor daily mean temperature the invented readings follow, F (the same
    draws as :func:`example_series`; the daily swing averages out over the hours of a day)."""
    rng = np.random.default_rng(seed)
    day = np.arange(days)
    return 22.0 + 8.0 * np.sin(day / 5.0) + rng.normal(0, 4.0, days)


def example_xml() -> str:
    return write_espi_xml(example_series(), "Interval electricity use, January 2025 (invented household)")


if __name__ == "__main__":  # writes the shipped file (run from the project folder)
    from pathlib import Path

    Path(EXAMPLE).write_text(example_xml(), encoding="utf-8")
