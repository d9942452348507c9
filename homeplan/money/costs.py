"""Project costs and energy prices over time.

Base cost of a project from a low / typical / high range (per item, ton, kW, kWh or ft2) or
from the user's contractor quote; change over time by general inflation or by a learning curve
(Wright's law) in real terms; and fuel / electricity price paths with per-fuel escalation and
an optional fossil-volatility scenario.

No default rates live here: learning rates, inflation and cost ranges come from data tables
or the plan file (``homeplan/data/``), each with its source.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

__all__ = [
    "ESTIMATES",
    "FOSSIL_FUELS",
    "SIZE_UNITS",
    "CostRange",
    "CostTrend",
    "PriceEscalation",
    "base_cost_usd",
    "cost_in_year",
    "cost_range_from_record",
    "cost_trend_from_record",
    "doublings_per_year",
    "inflation_factor",
    "learning_annual_change_pct",
    "price_path",
    "wright_cost_factor",
]

SIZE_UNITS: tuple[str, ...] = ("each", "ton", "kw", "kwh", "ft2")
ESTIMATES: tuple[str, ...] = ("low", "typical", "high")
FOSSIL_FUELS: frozenset[str] = frozenset(
    {"natural_gas", "gas", "propane", "heating_oil", "oil", "gasoline", "diesel", "kerosene"}
)


@dataclass(frozen=True)
class CostRange:
    """Installed cost range of one project kind, per ``unit`` of size (``each`` = per item).

    ``fixed_usd`` is added once (e.g. the first head of a mini-split, a new circuit).

    Attributes
    ----------
    unit : str
        Size unit, one of :data:`SIZE_UNITS`.
    low_usd : float
        Low cost, USD per unit of size.
    typical_usd : float
        Typical cost, USD per unit of size.
    high_usd : float
        High cost, USD per unit of size.
    fixed_usd : float
        Cost added once, USD.
    source : str
        Where the range comes from.

    Raises
    ------
    ValueError
        If the unit is unknown or not 0 <= low <= typical <= high.
    """

    unit: str
    low_usd: float
    typical_usd: float
    high_usd: float
    fixed_usd: float = 0.0
    source: str = ""

    def __post_init__(self) -> None:
        if self.unit not in SIZE_UNITS:
            raise ValueError(f"unknown size unit {self.unit!r}; use one of {', '.join(SIZE_UNITS)}")
        if not 0 <= self.low_usd <= self.typical_usd <= self.high_usd:
            raise ValueError(
                f"cost range must satisfy 0 <= low <= typical <= high, got "
                f"{self.low_usd:g} / {self.typical_usd:g} / {self.high_usd:g}"
            )


def base_cost_usd(
    cost_range: CostRange | None,
    size: float = 1.0,
    estimate: str = "typical",
    quote_usd: float | None = None,
    cost_factor: float = 1.0,
) -> float:
    """Cost of one project today: the user's quote if given, else
    (fixed + range x size) x cost_factor (a variant's factor in ``data/upgrades.yaml``).

    Parameters
    ----------
    cost_range : CostRange or None
        The catalog range (may be None when a quote is given).
    size : float
        Number of units in ``cost_range.unit`` (tons, kW, kWh, ft2; 1 for per item).
    estimate : str
        ``low``, ``typical`` or ``high``.
    quote_usd : float or None
        A contractor's quote for the whole project, USD; it wins over the range (and over
        ``cost_factor``).
    cost_factor : float
        Multiplier for a variant, dimensionless (cold-climate heat pump 1.25, ...).

    Returns
    -------
    float
        Cost today, USD.

    Raises
    ------
    ValueError
        If the quote or size is negative, neither a range nor a quote is given, or the
        estimate is unknown.

    References
    ----------
    Installed cost ranges: ``homeplan/data/upgrades.yaml`` (each with its source, e.g. LBNL
    "Tracking the Sun" 2024 for solar $/W).
    """
    if quote_usd is not None:
        if quote_usd < 0:
            raise ValueError("a quote cannot be negative")
        return float(quote_usd)
    if cost_range is None:
        raise ValueError("give either a cost range or a quote")
    if estimate not in ESTIMATES:
        raise ValueError(f"unknown estimate {estimate!r}; use low, typical or high")
    if size < 0:
        raise ValueError("size cannot be negative")
    per_unit = {
        "low": cost_range.low_usd,
        "typical": cost_range.typical_usd,
        "high": cost_range.high_usd,
    }
    return (cost_range.fixed_usd + per_unit[estimate] * size) * cost_factor


def cost_range_from_record(record: Mapping[str, Any]) -> CostRange:
    """Build a :class:`CostRange` from a catalog record
    ``{low, typical, high, per, source, fixed}`` (the ``cost`` entry of ``data/upgrades.yaml``).

    Parameters
    ----------
    record : mapping of str to Any
        ``low``, ``typical``, ``high`` (USD per unit), ``per`` (size unit, default ``each``),
        ``fixed`` (USD) and ``source``.

    Returns
    -------
    CostRange
        The range, USD per unit of size.

    Raises
    ------
    KeyError
        If ``low``, ``typical`` or ``high`` is missing.
    ValueError
        If a value is not a number, the unit is unknown or the range is out of order.
    """
    return CostRange(
        unit=str(record.get("per", "each")),
        low_usd=float(record["low"]),
        typical_usd=float(record["typical"]),
        high_usd=float(record["high"]),
        fixed_usd=float(record.get("fixed", 0.0)),
        source=str(record.get("source", "")),
    )


def inflation_factor(rate_pct: float, years: float) -> float:
    """Compound growth factor (1 + r)^years; negative years discount back in time.

    Parameters
    ----------
    rate_pct : float
        Growth rate, percent per year.
    years : float
        Time, years.

    Returns
    -------
    float
        Growth factor, dimensionless.

    References
    ----------
    Compound interest / CPI escalation, e.g. NIST Handbook 135 (Life-Cycle Costing Manual), ch. 4.
    """
    return (1.0 + rate_pct / 100.0) ** years


def wright_cost_factor(learning_rate_pct: float, doublings: float) -> float:
    """Cost multiplier after ``doublings`` of cumulative production: (1 - LR)^n.

    Parameters
    ----------
    learning_rate_pct : float
        Cost drop per doubling of cumulative production, percent.
    doublings : float
        Number of doublings.

    Returns
    -------
    float
        Cost multiplier, dimensionless.

    Raises
    ------
    ValueError
        If the learning rate is outside [0, 100).

    References
    ----------
    T. P. Wright, "Factors affecting the cost of airplanes", J. Aeronautical Sciences 3 (1936).
    Cost after n doublings of cumulative production: c0 * (1 - learning_rate)^n.
    """
    if not 0 <= learning_rate_pct < 100:
        raise ValueError("learning rate must be in [0, 100) percent per doubling")
    return (1.0 - learning_rate_pct / 100.0) ** doublings


def doublings_per_year(deployment_growth_pct: float) -> float:
    """Doublings of cumulative production per year when it grows ``g`` % a year: log2(1 + g).

    Assumes steady exponential growth, in which yearly deployment and cumulative production
    grow at the same rate.

    Parameters
    ----------
    deployment_growth_pct : float
        Growth of deployment, percent per year.

    Returns
    -------
    float
        Doublings of cumulative production per year.

    Raises
    ------
    ValueError
        If the growth is -100 % or below.

    References
    ----------
    Way, Ives, Mealy, Farmer, "Empirically grounded technology forecasts and the energy
    transition", Joule 6 (2022): Wright's law driven by exponential deployment growth.
    """
    if deployment_growth_pct <= -100:
        raise ValueError("deployment growth must be above -100 %")
    return math.log2(1.0 + deployment_growth_pct / 100.0)


def learning_annual_change_pct(learning_rate_pct: float, deployment_growth_pct: float) -> float:
    """Equivalent yearly cost change (negative = falling) of Wright's law with steady growth.

    ``(1 - LR)^(log2(1 + g)) - 1``, in percent.

    Parameters
    ----------
    learning_rate_pct : float
        Cost drop per doubling of cumulative production, percent.
    deployment_growth_pct : float
        Growth of deployment, percent per year.

    Returns
    -------
    float
        Cost change, percent per year (negative = falling).

    Raises
    ------
    ValueError
        If the learning rate is outside [0, 100) or the growth is -100 % or below.

    References
    ----------
    Wright (1936); Way et al., Joule 6 (2022) - see :func:`doublings_per_year`.
    """
    factor = wright_cost_factor(learning_rate_pct, doublings_per_year(deployment_growth_pct))
    return (factor - 1.0) * 100.0


@dataclass(frozen=True)
class CostTrend:
    """How one project kind's cost changes over time.

    ``inflation_pct``: general inflation (nominal USD). ``learning_rate_pct`` and
    ``deployment_growth_pct``: Wright's law in real terms (0 = no learning). ``learning_share``:
    the part of the installed cost that learns (hardware); the rest (labour, permits, soft
    costs) follows inflation only.

    Attributes
    ----------
    inflation_pct : float
        General inflation, percent per year.
    learning_rate_pct : float
        Cost drop per doubling of cumulative production, percent.
    deployment_growth_pct : float
        Growth of deployment, percent per year.
    learning_share : float
        Share of the cost that learns, fraction.

    Raises
    ------
    ValueError
        If ``learning_share`` is outside [0, 1].
    """

    inflation_pct: float
    learning_rate_pct: float = 0.0
    deployment_growth_pct: float = 0.0
    learning_share: float = 1.0

    def __post_init__(self) -> None:
        if not 0 <= self.learning_share <= 1:
            raise ValueError("learning_share must be between 0 and 1")


def cost_trend_from_record(
    record: Mapping[str, Any] | None, inflation_pct: float, learning_share: float = 1.0
) -> CostTrend:
    """Build a :class:`CostTrend` from a catalog ``cost_change`` record:
    ``{kind: inflation}`` or ``{kind: learning, learning_rate_pct, growth_pct_per_year}``
    (``data/upgrades.yaml``), with the plan's general inflation.

    Parameters
    ----------
    record : mapping of str to Any or None
        The ``cost_change`` record (percent per doubling, percent per year); None means
        inflation only.
    inflation_pct : float
        General inflation, percent per year.
    learning_share : float
        Share of the cost that learns, fraction (used when the record gives none).

    Returns
    -------
    CostTrend
        The trend.

    Raises
    ------
    ValueError
        If the kind is unknown or ``learning_share`` is outside [0, 1].
    KeyError
        If a learning record lacks ``learning_rate_pct`` or ``growth_pct_per_year``.
    """
    if not record or record.get("kind", "inflation") == "inflation":
        return CostTrend(inflation_pct=inflation_pct)
    if record.get("kind") != "learning":
        raise ValueError(
            f"unknown cost_change kind {record.get('kind')!r}; use inflation or learning"
        )
    return CostTrend(
        inflation_pct=inflation_pct,
        learning_rate_pct=float(record["learning_rate_pct"]),
        deployment_growth_pct=float(record["growth_pct_per_year"]),
        learning_share=float(record.get("learning_share", learning_share)),
    )


def cost_in_year(base_cost_usd: float, base_year: int, year: int, trend: CostTrend) -> float:
    """Nominal cost in ``year`` of a project costing ``base_cost_usd`` in ``base_year``.

    cost = base x (1 + i)^t x [s x (1 - LR)^(t log2(1 + g)) + (1 - s)],  t = year - base_year.

    Parameters
    ----------
    base_cost_usd : float
        Cost in ``base_year``, USD.
    base_year : int
        Calendar year of the base cost.
    year : int
        Calendar year wanted.
    trend : CostTrend
        How the cost changes.

    Returns
    -------
    float
        Cost in ``year``, nominal USD.

    Raises
    ------
    ValueError
        If the trend's learning rate or growth is out of range.

    References
    ----------
    Wright (1936); Way et al., Joule 6 (2022); NIST Handbook 135 (escalation).
    """
    t = year - base_year
    learned = wright_cost_factor(
        trend.learning_rate_pct, t * doublings_per_year(trend.deployment_growth_pct)
    )
    real = trend.learning_share * learned + (1.0 - trend.learning_share)
    return base_cost_usd * inflation_factor(trend.inflation_pct, t) * real


@dataclass(frozen=True)
class PriceEscalation:
    """Yearly price escalation per fuel, in percent.

    ``cpi_pct`` applies to any fuel not in ``by_fuel_pct``; ``fossil_extra_pct`` is added to
    fossil fuels (a higher-volatility / higher-escalation scenario); ``fossil_volatility_pct``
    is the yearly standard deviation of random log-price shocks for fossil fuels (0 = none),
    drawn from a seeded generator so a scenario is repeatable.

    Attributes
    ----------
    cpi_pct : float
        Default escalation, percent per year.
    by_fuel_pct : mapping of str to float
        Escalation by fuel, percent per year.
    fossil_extra_pct : float
        Extra escalation of fossil fuels, percent per year.
    fossil_volatility_pct : float
        Standard deviation of the yearly log-price shocks of fossil fuels, percent.
    seed : int
        Seed of the random generator.
    """

    cpi_pct: float
    by_fuel_pct: Mapping[str, float] = field(default_factory=dict)
    fossil_extra_pct: float = 0.0
    fossil_volatility_pct: float = 0.0
    seed: int = 0

    def rate_pct(self, fuel: str) -> float:
        """Deterministic escalation of ``fuel``.

        Parameters
        ----------
        fuel : str
            Fuel name, e.g. ``electricity``.

        Returns
        -------
        float
            Escalation, percent per year (fossil extra included).
        """
        base = self.by_fuel_pct.get(fuel, self.cpi_pct)
        return base + (self.fossil_extra_pct if fuel in FOSSIL_FUELS else 0.0)


def price_path(
    price_now: float, fuel: str, base_year: int, years: Sequence[int], escalation: PriceEscalation
) -> list[float]:
    """Price of ``fuel`` in each of ``years`` (trade unit: $/kWh, $/therm, $/gallon).

    Deterministic compound escalation; for fossil fuels with ``fossil_volatility_pct`` > 0 a
    seeded random walk of log-price shocks (mean-corrected so the expected price follows the
    escalation) is applied from ``base_year`` on.

    Parameters
    ----------
    price_now : float
        Price in ``base_year``, USD per trade unit.
    fuel : str
        Fuel name, e.g. ``natural_gas``.
    base_year : int
        Calendar year of ``price_now``.
    years : sequence of int
        Calendar years wanted.
    escalation : PriceEscalation
        Escalation scenario.

    Returns
    -------
    list of float
        Price in each of ``years``, nominal USD per trade unit.

    References
    ----------
    NIST Handbook 135 (escalation); lognormal price shocks: geometric Brownian motion, e.g.
    Hull, "Options, Futures, and Other Derivatives", ch. 14 (from memory).
    """
    rate = escalation.rate_pct(fuel)
    sigma = escalation.fossil_volatility_pct / 100.0 if fuel in FOSSIL_FUELS else 0.0
    shocks: dict[int, float] = {}
    if sigma > 0 and years:
        import numpy as np

        # stable per-fuel stream: the same seed gives the same path for a fuel
        rng = np.random.default_rng([escalation.seed, sum(map(ord, fuel))])
        last = max(max(years), base_year)
        steps = rng.normal(-0.5 * sigma * sigma, sigma, size=max(0, last - base_year))
        level = 0.0
        for i, y in enumerate(range(base_year + 1, last + 1)):
            level += float(steps[i])
            shocks[y] = level
    return [
        price_now * inflation_factor(rate, y - base_year) * math.exp(shocks.get(y, 0.0))
        for y in years
    ]
