"""The fossil side of a roadmap: one line per fuel the household still buys.

For gas, heating oil, propane, gasoline and diesel: the years it is still bought, what it costs
in each of them (the result's yearly bills by fuel, fixed charges included) and when its gas
service, tank or last car goes (the roadmap's milestones). The app's first view and the printout
both draw these lines; nothing here computes a bill.

References
----------
None: presentation of the result's own figures.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from homeplan.plan.fuels import FOSSIL_FUELS

__all__ = ["FUEL_WORDS", "FuelLine", "fossil_lines"]

FUEL_WORDS: dict[str, str] = {"gas": "Gas", "oil": "Heating oil", "propane": "Propane",
                              "gasoline": "Gasoline", "diesel": "Diesel"}

_ENDING = {  # fuel -> (milestone kind, words short, words long)
    "gas": ("gas_service_closed", "closed", "gas service closed"),
    "propane": ("propane_tank_removed", "tank out", "propane tank removed"),
    "oil": ("oil_tank_removed", "tank out", "oil tank removed"),
    "gasoline": ("last_gasoline_car", "last car", "last gasoline car gone"),
    "diesel": ("last_gasoline_car", "last car", "last diesel car gone"),
}


@dataclass(frozen=True)
class FuelLine:
    """One fuel: its yearly cost over the roadmap's years and how it ends.

    ``costs_usd`` has one value per roadmap year (0 once it is no longer bought); ``last_year``
    is the last year with a cost (None: never bought in the roadmap's years); ``ends_year`` the
    year of its milestone (None: it does not end within the horizon).
    """

    fuel: str
    label: str
    years: tuple[int, ...]
    costs_usd: tuple[float, ...]
    last_year: int | None
    ends_year: int | None
    ends_short: str
    ends_long: str

    @property
    def still_bought_at_end(self) -> bool:
        return self.last_year is not None and self.last_year == self.years[-1]

    def ending(self, long: bool = True) -> str:
        """"gas service closed 2031" / "last car 2033" / "still bought in 2036"."""
        if self.ends_year is not None:
            return f"{self.ends_long if long else self.ends_short} {self.ends_year}"
        if self.still_bought_at_end:
            return f"still bought in {self.years[-1]}" if long else f"still in {self.years[-1]}"
        return f"last bought {self.last_year}" if long else f"last {self.last_year}"


def fossil_lines(result: Any) -> tuple[FuelLine, ...]:
    """A line per fossil fuel bought in any year of the roadmap (or today), in a fixed order."""
    road = result.roadmap
    years = tuple(t.year for t in road.years)
    if not years:
        return ()
    today = getattr(result.energy_before, "bills_usd", {}) or {}
    out = []
    for fuel in FOSSIL_FUELS:
        costs = tuple(float(t.bills_usd.get(fuel, 0.0)) for t in road.years)
        if not any(c > 0.5 for c in costs) and today.get(fuel, 0.0) <= 0.5:
            continue
        bought = [y for y, c in zip(years, costs, strict=True) if c > 0.5]
        kind, short, long = _ENDING[fuel]
        ends = next((m.year for m in road.milestones if m.kind == kind), None)
        out.append(FuelLine(fuel, FUEL_WORDS[fuel], years, costs, bought[-1] if bought else None,
                            ends, short, long))
    return tuple(out)
