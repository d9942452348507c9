"""End-of-life outlook of one appliance, vehicle or roof, as the planner computed it.

References
----------
None: a data container. The Weibull model that fills it is :mod:`homeplan.planner.lifecycle`.
"""

from __future__ import annotations

from dataclasses import dataclass

from homeplan.plan.fuels import FOSSIL_FUELS

__all__ = ["LifeOutlook"]


@dataclass(frozen=True)
class LifeOutlook:
    """Age and end-of-life risk of one appliance, vehicle or roof."""

    key: str
    label: str
    kind: str
    fuel: str
    install_year: int
    install_year_assumed: bool
    age_years: float
    effective_age_years: float
    median_life_years: float
    shape: float
    source: str
    expected_end_year: int          # conditional median: more likely than not failed by then
    mean_remaining_years: float
    replace_by_year: int            # conditional failure risk reaches the chosen level
    risk_pct: float
    first_year: int
    yearly_failure_pct: tuple[float, ...]   # chance it fails in each future year, given it works today
    cumulative_failure_pct: tuple[float, ...]     # chance it has failed by the end of each year
    failed: bool = False
    hazard_pct: tuple[float, ...] = ()      # chance it fails in each year if it made it to that year

    @property
    def fossil(self) -> bool:
        return self.fuel in FOSSIL_FUELS
