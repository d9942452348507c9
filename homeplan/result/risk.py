"""Price risk of a roadmap: what the plan, like-for-like replacement and doing nothing cost over
the horizon when energy prices follow sampled paths instead of one forecast.

Small frozen dataclasses with ``to_dict`` / ``from_dict`` for the roadmap JSON (``price_risk``,
docs/roadmap-json.md). Money in USD; a total cost is the present value at the plan's discount
rate (first year = year 0) of net spend, loan payments, energy bills and expected breakdown
repairs, less the equipment's remaining value at the end of the horizon.

References
----------
None: data containers. The numbers come from :mod:`homeplan.money.prices` (price paths) and the
planner's risk stage (:mod:`homeplan.planner.risk`).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

__all__ = ["Band", "FuelShock", "PriceRisk", "PriceSeries", "SolarPriceRisk", "YearBand"]


def _num(value: Any) -> float:
    v = float(value) if value is not None else math.nan
    return v


def _out(value: float) -> float | None:
    return value if math.isfinite(value) else None


@dataclass(frozen=True)
class Band:
    """Percentiles and mean of a sampled quantity (in the unit its owner's name gives).

    Attributes
    ----------
    p10 : float
        10th percentile.
    p50 : float
        Median.
    p90 : float
        90th percentile.
    mean : float
        Mean over the paths.
    """

    p10: float
    p50: float
    p90: float
    mean: float

    def to_dict(self) -> dict[str, Any]:
        return {k: _out(round(getattr(self, k), 4)) for k in ("p10", "p50", "p90", "mean")}

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> Band:
        return cls(*(_num(data.get(k)) for k in ("p10", "p50", "p90", "mean")))


@dataclass(frozen=True)
class PriceSeries:
    """One fuel of the price model.

    Attributes
    ----------
    fuel : str
        Bill fuel (``electricity``, ``gas``, ``propane``, ``oil``, ``gasoline``, ``diesel``).
    volatility_pct : float
        Standard deviation of the yearly log-price change used, percent.
    drift_pct : float
        Expected yearly price change the paths follow, percent (the plan's escalation, or the
        history's trend).
    historic_trend_pct : float
        Compound yearly change of the history, percent.
    source : str
        Where the history comes from.
    """

    fuel: str
    volatility_pct: float
    drift_pct: float
    historic_trend_pct: float
    source: str

    def to_dict(self) -> dict[str, Any]:
        return {"fuel": self.fuel, "volatility_pct": round(self.volatility_pct, 2),
                "drift_pct": round(self.drift_pct, 2),
                "historic_trend_pct": round(self.historic_trend_pct, 2), "source": self.source}

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> PriceSeries:
        return cls(data["fuel"], _num(data["volatility_pct"]), _num(data["drift_pct"]),
                   _num(data["historic_trend_pct"]), data.get("source", ""))


@dataclass(frozen=True)
class YearBand:
    """One year's energy bills (nominal USD) across the paths: the plan and doing nothing.

    Attributes
    ----------
    year : int
        Calendar year.
    plan_bills_usd : Band
        The plan's bills that year, USD.
    do_nothing_bills_usd : Band
        Today's home's bills that year, USD.
    """

    year: int
    plan_bills_usd: Band
    do_nothing_bills_usd: Band

    def to_dict(self) -> dict[str, Any]:
        return {"year": self.year, "plan_bills_usd": self.plan_bills_usd.to_dict(),
                "do_nothing_bills_usd": self.do_nothing_bills_usd.to_dict()}

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> YearBand:
        return cls(int(data["year"]), Band.from_dict(data["plan_bills_usd"]),
                   Band.from_dict(data["do_nothing_bills_usd"]))


@dataclass(frozen=True)
class FuelShock:
    """A one-standard-deviation yearly rise of one fuel's price, in the household's yearly bill.

    Attributes
    ----------
    fuel : str
        Bill fuel.
    volatility_pct : float
        The fuel's yearly standard deviation, percent.
    before_usd : float
        Bill change with today's home, USD per year.
    after_usd : float
        Bill change once the plan is done, USD per year.
    """

    fuel: str
    volatility_pct: float
    before_usd: float
    after_usd: float

    def to_dict(self) -> dict[str, Any]:
        return {"fuel": self.fuel, "volatility_pct": round(self.volatility_pct, 2),
                "before_usd": round(self.before_usd, 2), "after_usd": round(self.after_usd, 2)}

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> FuelShock:
        return cls(data["fuel"], _num(data["volatility_pct"]), _num(data["before_usd"]),
                   _num(data["after_usd"]))


@dataclass(frozen=True)
class SolarPriceRisk:
    """The locked-in cost of the plan's own solar (and battery) beside the utility's price.

    Attributes
    ----------
    lcoe_usd_per_kwh : float
        Levelised cost of the system's energy, USD/kWh (fixed once it is paid for).
    utility_usd_per_kwh : Band
        The utility's price levelised over the same kWh and years, across the paths, USD/kWh.
    utility_above_lcoe_pct : float
        Share of the paths in which the utility's levelised price is above the system's, percent.
    life_years : int
        Years of the comparison (the system's life).
    includes_battery : bool
        True when the plan's battery is part of the cost.
    """

    lcoe_usd_per_kwh: float
    utility_usd_per_kwh: Band
    utility_above_lcoe_pct: float
    life_years: int
    includes_battery: bool

    def to_dict(self) -> dict[str, Any]:
        return {"lcoe_usd_per_kwh": round(self.lcoe_usd_per_kwh, 4),
                "utility_usd_per_kwh": self.utility_usd_per_kwh.to_dict(),
                "utility_above_lcoe_pct": round(self.utility_above_lcoe_pct, 1),
                "life_years": self.life_years, "includes_battery": self.includes_battery}

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> SolarPriceRisk:
        return cls(_num(data["lcoe_usd_per_kwh"]), Band.from_dict(data["utility_usd_per_kwh"]),
                   _num(data["utility_above_lcoe_pct"]), int(data["life_years"]),
                   bool(data.get("includes_battery", False)))


@dataclass(frozen=True)
class PriceRisk:
    """The roadmap under sampled energy prices.

    Attributes
    ----------
    paths : int
        Number of sampled price paths.
    seed : int
        Seed of the paths (the same seed gives the same figures).
    drift : str
        ``plan`` (paths centred on the plan's escalation) or ``history`` (the history's trend).
    history_years : str
        Years of the price history behind the volatilities, e.g. ``2001-2024``.
    plan_cost_usd : Band
        Total cost of the plan over the horizon, present value, USD.
    like_for_like_cost_usd : Band
        Total cost of replacing like for like, present value, USD.
    do_nothing_cost_usd : Band
        Total cost of doing nothing (breakdowns repaired as they come), present value, USD.
    plan_beats_like_for_like_pct : float
        Share of the paths in which the plan costs less than like-for-like, percent.
    plan_beats_do_nothing_pct : float
        Share of the paths in which the plan costs less than doing nothing, percent.
    bill_shock_before_usd : float
        Standard deviation of a year's bills from one year of price moves, today's home, USD.
    bill_shock_after_usd : float
        The same once the plan is done, USD.
    shocks : tuple of FuelShock
        Each fuel's one-standard-deviation rise, before and after.
    years : tuple of YearBand
        Yearly bills across the paths, plan and doing nothing.
    fuels : tuple of PriceSeries
        The model of each fuel.
    solar : SolarPriceRisk or None
        The solar's locked-in cost beside the utility's price (None: the plan adds no solar).
    """

    paths: int
    seed: int
    drift: str
    history_years: str
    plan_cost_usd: Band
    like_for_like_cost_usd: Band
    do_nothing_cost_usd: Band
    plan_beats_like_for_like_pct: float
    plan_beats_do_nothing_pct: float
    bill_shock_before_usd: float
    bill_shock_after_usd: float
    shocks: tuple[FuelShock, ...] = ()
    years: tuple[YearBand, ...] = ()
    fuels: tuple[PriceSeries, ...] = ()
    solar: SolarPriceRisk | None = None

    def __post_init__(self) -> None:
        for name in ("shocks", "years", "fuels"):
            object.__setattr__(self, name, tuple(getattr(self, name)))

    def to_dict(self) -> dict[str, Any]:
        return {
            "paths": self.paths, "seed": self.seed, "drift": self.drift,
            "history_years": self.history_years,
            "plan_cost_usd": self.plan_cost_usd.to_dict(),
            "like_for_like_cost_usd": self.like_for_like_cost_usd.to_dict(),
            "do_nothing_cost_usd": self.do_nothing_cost_usd.to_dict(),
            "plan_beats_like_for_like_pct": round(self.plan_beats_like_for_like_pct, 1),
            "plan_beats_do_nothing_pct": round(self.plan_beats_do_nothing_pct, 1),
            "bill_shock_before_usd": round(self.bill_shock_before_usd, 2),
            "bill_shock_after_usd": round(self.bill_shock_after_usd, 2),
            "shocks": [s.to_dict() for s in self.shocks],
            "years": [y.to_dict() for y in self.years],
            "fuels": [f.to_dict() for f in self.fuels],
            "solar": self.solar.to_dict() if self.solar else None,
        }

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> PriceRisk:
        return cls(
            paths=int(data["paths"]), seed=int(data["seed"]), drift=data.get("drift", "plan"),
            history_years=data.get("history_years", ""),
            plan_cost_usd=Band.from_dict(data["plan_cost_usd"]),
            like_for_like_cost_usd=Band.from_dict(data["like_for_like_cost_usd"]),
            do_nothing_cost_usd=Band.from_dict(data["do_nothing_cost_usd"]),
            plan_beats_like_for_like_pct=_num(data["plan_beats_like_for_like_pct"]),
            plan_beats_do_nothing_pct=_num(data["plan_beats_do_nothing_pct"]),
            bill_shock_before_usd=_num(data["bill_shock_before_usd"]),
            bill_shock_after_usd=_num(data["bill_shock_after_usd"]),
            shocks=tuple(FuelShock.from_dict(s) for s in data.get("shocks", ())),
            years=tuple(YearBand.from_dict(y) for y in data.get("years", ())),
            fuels=tuple(PriceSeries.from_dict(f) for f in data.get("fuels", ())),
            solar=SolarPriceRisk.from_dict(data["solar"]) if data.get("solar") else None,
        )
