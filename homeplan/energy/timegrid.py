"""The typical-year calendar shared by every hourly array: 365 days x 24 h = 8760 hours.

Hour ``i`` covers local standard time ``[i, i+1)`` of a non-leap year, starting 1 January 00:00
(EPW/TMY "hour-ending" data labelled at the hour start).
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

__all__ = [
    "DAYS_PER_YEAR",
    "HOURS_PER_YEAR",
    "MONTH_DAYS",
    "MONTH_NAMES",
    "SUMMER_MONTHS",
    "WINTER_MONTHS",
    "daily_mean",
    "day_of_year",
    "hour_month",
    "hour_of_day",
    "month_days",
    "month_start_hours",
    "monthly_sum",
    "weekday",
]

HOURS_PER_YEAR = 8760
DAYS_PER_YEAR = 365
MONTH_DAYS: tuple[int, ...] = (31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31)
MONTH_NAMES: tuple[str, ...] = (
    "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
)
#: Northern-hemisphere heating season months (Dec-Feb) and cooling season months (Jun-Aug), 1-based.
WINTER_MONTHS: tuple[int, ...] = (12, 1, 2)
SUMMER_MONTHS: tuple[int, ...] = (6, 7, 8)


def _ro(a: np.ndarray) -> np.ndarray:
    a.setflags(write=False)
    return a


@lru_cache(maxsize=1)
def month_start_hours() -> np.ndarray:
    """Index of the first hour of each month (12 ints), for ``np.add.reduceat``.

    Returns
    -------
    numpy.ndarray
        Hour index (0-based) of each month's first hour, 12 int64 values (read-only).
    """
    days = np.concatenate([[0], np.cumsum(MONTH_DAYS)[:-1]])
    return _ro((days * 24).astype(np.int64))


@lru_cache(maxsize=1)
def month_days() -> np.ndarray:
    """Days in each month of the typical year.

    Returns
    -------
    numpy.ndarray
        Days per month, 12 float values (read-only).
    """
    return _ro(np.array(MONTH_DAYS, dtype=float))


@lru_cache(maxsize=1)
def hour_month() -> np.ndarray:
    """Month number (1-12) of every hour.

    Returns
    -------
    numpy.ndarray
        Month of each hour, 1-12 (8760 int values, read-only).
    """
    return _ro(np.repeat(np.arange(1, 13), np.array(MONTH_DAYS) * 24))


@lru_cache(maxsize=1)
def hour_of_day() -> np.ndarray:
    """Hour of day (0-23) of every hour.

    Returns
    -------
    numpy.ndarray
        Hour of day of each hour, 0-23 (8760 int values, read-only).
    """
    return _ro(np.tile(np.arange(24), DAYS_PER_YEAR))


@lru_cache(maxsize=1)
def day_of_year() -> np.ndarray:
    """Day of year (1-365) of every hour.

    Returns
    -------
    numpy.ndarray
        Day of year of each hour, 1-365 (8760 int values, read-only).
    """
    return _ro(np.repeat(np.arange(1, DAYS_PER_YEAR + 1), 24))


@lru_cache(maxsize=8)
def weekday(first_weekday: int = 6) -> np.ndarray:
    """Day of week of every hour (0 = Monday); ``first_weekday`` is 1 January's (2023: Sunday=6).

    Parameters
    ----------
    first_weekday : int
        Day of week of 1 January, 0 = Monday ... 6 = Sunday.

    Returns
    -------
    numpy.ndarray
        Day of week of each hour, 0 = Monday (8760 int64 values, read-only).
    """
    return _ro(((np.arange(HOURS_PER_YEAR) // 24 + first_weekday) % 7).astype(np.int64))


def monthly_sum(hourly: np.ndarray) -> np.ndarray:
    """Sum an 8760 array into 12 monthly totals.

    Parameters
    ----------
    hourly : numpy.ndarray
        Amount in each hour, any unit (e.g. kWh; 8760 values).

    Returns
    -------
    numpy.ndarray
        Total of each month, same unit (12 values).
    """
    return np.add.reduceat(hourly, month_start_hours())


def daily_mean(hourly: np.ndarray) -> np.ndarray:
    """Mean of each of the 365 days.

    Parameters
    ----------
    hourly : numpy.ndarray
        Value of each hour, any unit (e.g. F; 8760 values).

    Returns
    -------
    numpy.ndarray
        Mean of each day, same unit (365 values).
    """
    return hourly.reshape(DAYS_PER_YEAR, 24).mean(axis=1)
