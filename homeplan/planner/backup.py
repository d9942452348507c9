"""Riding through a power outage on a home battery: the size the critical loads need.

The plan lists the loads to keep on (average watts while they run, hours a day) and the outage
to ride through. Their energy over the outage, drawn through the battery's discharge efficiency
(the square root of its round-trip efficiency), is the usable energy the battery must hold when
the outage starts - an installer sets the battery's backup reserve to keep it. The sun recharging
the battery during a long outage is not counted (a cloudy outage is the one that matters).

References
----------
DiOrio et al. (2015), NREL/TP-6A20-64641 (battery round-trip efficiency, split evenly between
charge and discharge); NFPA 855 and NEC Article 706 govern where and how a battery is installed.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from homeplan.energy.battery import BatterySpec
from homeplan.plan.model import Plan

__all__ = ["BackupNeed", "backup_need", "hours_carried", "resilience_share"]


@dataclass(frozen=True)
class BackupNeed:
    """What the critical loads need from a battery in the outage the plan names."""

    energy_kwh: float          # the loads' energy over the outage, kWh (AC, at the loads)
    battery_kwh: float         # usable battery energy that delivers it, kWh
    peak_kw: float             # every critical load running at once, kW
    outage_hours: float
    value_usd_per_year: float
    loads: tuple[str, ...]


def _discharge_eff() -> float:
    return math.sqrt(BatterySpec().round_trip_eff)


def backup_need(plan: Plan) -> BackupNeed | None:
    """The battery the plan's critical loads need to ride through its outage (None: no loads)."""
    b = plan.backup
    if b is None or not b.critical_loads:
        return None
    avg_kw = sum(ld.watts * ld.hours_per_day / 24.0 for ld in b.critical_loads) / 1000.0
    energy = avg_kw * b.outage_hours
    return BackupNeed(energy_kwh=energy, battery_kwh=energy / _discharge_eff(),
                      peak_kw=sum(ld.watts for ld in b.critical_loads) / 1000.0,
                      outage_hours=b.outage_hours, value_usd_per_year=b.value_usd_per_year,
                      loads=tuple(ld.name for ld in b.critical_loads))


def hours_carried(need: BackupNeed, battery_kwh: float) -> float:
    """Hours a full battery of ``battery_kwh`` usable energy carries the critical loads."""
    avg_kw = need.energy_kwh / need.outage_hours
    return battery_kwh * _discharge_eff() / avg_kw if avg_kw > 0 else float("inf")


def resilience_share(need: BackupNeed, battery_kwh: float) -> float:
    """Share of the outage a battery of ``battery_kwh`` rides through (0-1): the share of the
    household's yearly resilience value it earns."""
    return min(1.0, hours_carried(need, battery_kwh) / need.outage_hours)
