"""Home battery dispatch (self-consumption or time-of-use arbitrage), vectorised.

The state of charge obeys SOC_t = clamp(SOC_{t-1} + x_t, reserve, capacity). Each hour is the
clamp-shift map s -> min(max(s + a, l), h); such maps compose into maps of the same form, so the
whole year is one parallel prefix scan (log2(8760) = 14 numpy passes) instead of a Python loop.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

__all__ = ["BatteryResult", "BatterySpec", "clamped_cumsum", "dispatch"]


@dataclass(frozen=True)
class BatterySpec:
    """A battery of ``capacity_kwh`` usable energy and ``power_kw`` charge/discharge limit.

    ``round_trip_eff`` is AC-to-AC and split equally between charging and discharging;
    ``reserve_frac`` is kept for backup. ``mode`` is ``self_consumption`` (store surplus solar,
    cover load) or ``tou`` (also charge from the grid in ``charge_hours`` and discharge only in
    ``discharge_hours``).

    Attributes
    ----------
    capacity_kwh : float
        Usable energy capacity, kWh.
    power_kw : float
        Charge and discharge power limit (AC), kW.
    round_trip_eff : float
        AC-to-AC round-trip efficiency, fraction in (0, 1].
    reserve_frac : float
        Share of the capacity kept for backup, fraction.
    mode : str
        Dispatch strategy: ``self_consumption`` or ``tou``.
    charge_hours : tuple of int
        Hours of day (0-23) of grid charging in ``tou`` mode.
    discharge_hours : tuple of int
        Hours of day (0-23) of discharging in ``tou`` mode.
    initial_frac : float
        State of charge at the start of the year, fraction of the capacity.

    Raises
    ------
    ValueError
        If ``mode`` is unknown or ``round_trip_eff`` is outside (0, 1].

    References
    ----------
    DiOrio, N. et al. (2015), "Technoeconomic modeling of battery energy storage in SAM",
    NREL/TP-6A20-64641 (round-trip efficiency, dispatch rules).
    """

    capacity_kwh: float = 13.5
    power_kw: float = 5.0
    round_trip_eff: float = 0.90
    reserve_frac: float = 0.20
    mode: str = "self_consumption"
    charge_hours: tuple[int, ...] = (0, 1, 2, 3, 4, 5)
    discharge_hours: tuple[int, ...] = (16, 17, 18, 19, 20)
    initial_frac: float = 0.5

    def __post_init__(self) -> None:
        if self.mode not in ("self_consumption", "tou"):
            raise ValueError("battery mode must be self_consumption or tou")
        if not 0 < self.round_trip_eff <= 1:
            raise ValueError("round_trip_eff must be in (0, 1]")


@dataclass(frozen=True, eq=False)
class BatteryResult:
    """Hourly battery AC charge (from home/grid), AC discharge and end-of-hour SOC (kWh).

    Attributes
    ----------
    charge_kwh : numpy.ndarray
        AC energy taken to charge in each hour, kWh (8760 values).
    discharge_kwh : numpy.ndarray
        AC energy delivered in each hour, kWh (8760 values).
    soc_kwh : numpy.ndarray
        State of charge at the end of each hour, kWh (8760 values).
    """

    charge_kwh: np.ndarray
    discharge_kwh: np.ndarray
    soc_kwh: np.ndarray


def clamped_cumsum(x: np.ndarray, lo: float, hi: float, s0: float) -> np.ndarray:
    """s_t = min(max(s_{t-1} + x_t, lo), hi) for all t, by a parallel prefix scan of clamp maps.

    Parameters
    ----------
    x : numpy.ndarray
        Increment of each step, any unit (e.g. kWh per hour; the same unit as the bounds).
    lo : float
        Lower bound of the state, e.g. the battery reserve in kWh.
    hi : float
        Upper bound of the state, e.g. the capacity in kWh.
    s0 : float
        State before the first step.

    Returns
    -------
    numpy.ndarray
        State after each step, same unit and length as ``x``.

    References
    ----------
    Blelloch, G. E. (1990), "Prefix sums and their applications", CMU-CS-90-190 (scans of
    associative operators); composition of clamp maps is associative.
    """
    n = x.size
    a, lo_a, hi_a = np.array(x, dtype=float), np.full(n, float(lo)), np.full(n, float(hi))
    a2, lo2, hi2 = np.empty(n), np.empty(n), np.empty(n)  # the next level, then swapped
    k = 1
    while k < n:
        m = n - k
        a_cur, l_cur, h_cur = a[k:], lo_a[k:], hi_a[k:]
        # step t (>= k) composes the map of steps t-2k+1..t-k with its own s -> min(max(s + a, l), h)
        nl, nh = lo2[k:], hi2[k:]
        np.add(lo_a[:m], a_cur, out=nl)
        np.maximum(nl, l_cur, out=nl)
        np.minimum(nl, h_cur, out=nl)
        np.add(hi_a[:m], a_cur, out=nh)
        np.maximum(nh, l_cur, out=nh)
        np.minimum(nh, h_cur, out=nh)
        np.add(a[:m], a_cur, out=a2[k:])
        a2[:k], lo2[:k], hi2[:k] = a[:k], lo_a[:k], hi_a[:k]  # steps before k are finished
        a, a2, lo_a, lo2, hi_a, hi2 = a2, a, lo2, lo_a, hi2, hi_a
        k *= 2
        # A map with l == h is constant (the state hit a bound inside its window): composing it
        # with earlier maps changes nothing the result reads, so once every unfinished step's map
        # is constant the scan is done (the same numbers as running it to the end).
        if k < n and np.array_equal(lo_a[k:], hi_a[k:]):
            break
    return np.minimum(np.maximum(s0 + a, lo_a), hi_a)


def dispatch(spec: BatterySpec, net_load_kw: np.ndarray, hour_of_day: np.ndarray) -> BatteryResult:
    """Dispatch the battery against the hourly net load (load - solar, kWh per hour).

    Charging stores ``eta`` of the AC energy taken and discharging delivers ``eta`` of the energy
    drawn, eta = sqrt(round-trip efficiency); power and energy limits and the reserve hold.

    Parameters
    ----------
    spec : BatterySpec
        The battery.
    net_load_kw : numpy.ndarray
        Load minus solar of each hour, kW = kWh per hour (8760 values; negative = surplus).
    hour_of_day : numpy.ndarray
        Hour of day (0-23) of each hour (8760 values).

    Returns
    -------
    BatteryResult
        Hourly AC charge, AC discharge and state of charge, kWh.

    References
    ----------
    NREL/TP-6A20-64641 (SAM battery dispatch: self-consumption and time-of-use strategies).
    """
    eta = math.sqrt(spec.round_trip_eff)
    p = spec.power_kw
    surplus = np.maximum(-net_load_kw, 0.0)
    deficit = np.maximum(net_load_kw, 0.0)
    charge_req = np.minimum(surplus, p)
    discharge_req = np.minimum(deficit, p)
    if spec.mode == "tou":
        charge_mask = np.isin(hour_of_day, spec.charge_hours)
        discharge_mask = np.isin(hour_of_day, spec.discharge_hours)
        charge_req = np.where(charge_mask, p, charge_req)
        discharge_req = np.where(discharge_mask, discharge_req, 0.0)
    x = charge_req * eta - discharge_req / eta
    lo = spec.reserve_frac * spec.capacity_kwh
    hi = spec.capacity_kwh
    s0 = min(max(spec.initial_frac * hi, lo), hi)
    soc = clamped_cumsum(x, lo, hi, s0)
    dsoc = np.empty_like(soc)  # np.diff(soc, prepend=s0), without building the longer array
    dsoc[:1] = soc[:1] - s0
    np.subtract(soc[1:], soc[:-1], out=dsoc[1:])
    charge = np.maximum(dsoc, 0.0) / eta
    discharge = np.maximum(-dsoc, 0.0) * eta
    return BatteryResult(charge, discharge, soc)
