"""Energy prices as a random process: a yearly model estimated from history, and sampled paths.

The model is a correlated random walk of log prices (geometric Brownian motion sampled once a
year): each year every fuel's log price moves by its drift plus a normal shock, the shocks of the
fuels correlated as in the historic table. Its volatilities and correlations are estimated from
``money/data/price_history.csv`` (yearly US average residential / retail prices, one series per
fuel, each row with its source); the drift is the history's own trend, or the plan's escalation
(mean-centred, so that the expected price follows the plan's single path exactly).

Everything here is vectorised with numpy: thousands of paths are one array ``[paths, fuels,
years + 1]`` of price multipliers relative to today (index 0 is today, 1.0).

References
----------
Geometric Brownian motion and lognormal prices: J. C. Hull, "Options, Futures, and Other
Derivatives", ch. 14 (Wiener processes and Ito's lemma; E[S_t] = S_0 exp(mu t)).
Moments of the lognormal and multivariate lognormal distributions: N. L. Johnson, S. Kotz,
N. Balakrishnan, "Continuous Univariate Distributions", vol. 1, ch. 14; E[e^X] = e^(s^2/2) and
Cov(e^X, e^Y) = e^((s_x^2 + s_y^2)/2) (e^(c_xy) - 1) for zero-mean normal X, Y.
Conditional value at risk: R. T. Rockafellar, S. Uryasev, "Optimization of conditional value-at-
risk", Journal of Risk 2 (2000) 21-41.
"""

from __future__ import annotations

import csv
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from functools import cache
from pathlib import Path

import numpy as np

__all__ = [
    "HISTORY_FILE",
    "PriceHistory",
    "PriceModel",
    "bill_shock_usd",
    "cvar",
    "estimate_price_model",
    "levelised_price_paths_usd_per_kwh",
    "price_history",
    "read_price_history",
    "simulate_price_paths",
]

HISTORY_FILE = Path(__file__).parent / "data" / "price_history.csv"
"""The shipped table of historic yearly prices (fuel, year, usd_per_unit, unit, source)."""


@dataclass(frozen=True, eq=False)
class PriceHistory:
    """Yearly average prices of several fuels.

    Attributes
    ----------
    fuels : tuple of str
        Fuel names (``electricity``, ``gas``, ``propane``, ``oil``, ``gasoline``, ``diesel``).
    years : tuple of int
        Calendar years, ascending.
    usd : numpy.ndarray
        Price of each fuel in each year, USD per ``units[i]``, shape ``[fuels, years]`` (NaN
        where the table has no value).
    units : tuple of str
        Trade unit of each series (``kWh``, ``Mcf``, ``gal``).
    sources : tuple of str
        Where each series comes from (values recalled without a source say "from memory").
    """

    fuels: tuple[str, ...]
    years: tuple[int, ...]
    usd: np.ndarray
    units: tuple[str, ...]
    sources: tuple[str, ...]

    def series(self, fuel: str) -> np.ndarray:
        """Prices of one fuel by year.

        Parameters
        ----------
        fuel : str
            Fuel name.

        Returns
        -------
        numpy.ndarray
            USD per trade unit, one value per year of ``years`` (NaN where missing).
        """
        return self.usd[self.fuels.index(fuel)]


def read_price_history(path: Path | str = HISTORY_FILE) -> PriceHistory:
    """Read a price history table: columns ``fuel, year, usd_per_unit, unit, source``.

    Parameters
    ----------
    path : path
        The CSV file.

    Returns
    -------
    PriceHistory
        The prices by fuel and year, USD per trade unit.

    Raises
    ------
    ValueError
        If a row has no source, a price is not a positive number, a fuel changes unit or
        source, or a fuel and year repeat (the message names the line).
    """
    values: dict[tuple[str, int], float] = {}
    unit: dict[str, str] = {}
    source: dict[str, str] = {}
    with Path(path).open(newline="", encoding="utf-8") as fh:
        for line, row in enumerate(csv.DictReader(fh), start=2):
            fuel = (row.get("fuel") or "").strip()
            where = f"{Path(path).name}:{line}"
            if not fuel or not (row.get("source") or "").strip():
                raise ValueError(f"{where}: every row needs a fuel and a source")
            try:
                year = int(row["year"])
                price = float(row["usd_per_unit"])
            except (TypeError, ValueError):
                raise ValueError(f"{where}: year and usd_per_unit must be numbers") from None
            if not np.isfinite(price) or price <= 0:
                raise ValueError(f"{where}: price must be positive, got {price}")
            if (fuel, year) in values:
                raise ValueError(f"{where}: {fuel} {year} appears twice")
            if unit.setdefault(fuel, row["unit"]) != row["unit"]:
                raise ValueError(f"{where}: {fuel} changes unit ({unit[fuel]} -> {row['unit']})")
            if source.setdefault(fuel, row["source"]) != row["source"]:
                raise ValueError(f"{where}: {fuel} changes source within its series")
            values[(fuel, year)] = price
    fuels = tuple(unit)
    years = tuple(sorted({y for _, y in values}))
    usd = np.full((len(fuels), len(years)), np.nan)
    for (fuel, year), price in values.items():
        usd[fuels.index(fuel), years.index(year)] = price
    return PriceHistory(fuels, years, usd, tuple(unit[f] for f in fuels),
                        tuple(source[f] for f in fuels))


@cache
def price_history() -> PriceHistory:
    """The shipped table of historic prices (read once).

    Returns
    -------
    PriceHistory
        Yearly US average residential / retail prices, USD per trade unit.
    """
    return read_price_history(HISTORY_FILE)


@dataclass(frozen=True, eq=False)
class PriceModel:
    """Yearly log-price changes of several fuels: a drift and a covariance.

    Attributes
    ----------
    fuels : tuple of str
        Fuel names, in the order of the arrays.
    drift : numpy.ndarray
        Mean yearly change of the log price, per year (``[fuels]``).
    cov : numpy.ndarray
        Covariance of the yearly log-price changes, per year (``[fuels, fuels]``).
    first_year : int
        First year of the history the model was estimated from.
    last_year : int
        Last year of that history.
    n_changes : int
        Number of year-to-year changes behind the estimates.
    sources : tuple of str
        Source of each fuel's series.
    """

    fuels: tuple[str, ...]
    drift: np.ndarray
    cov: np.ndarray
    first_year: int = 0
    last_year: int = 0
    n_changes: int = 0
    sources: tuple[str, ...] = ()

    @property
    def volatility(self) -> np.ndarray:
        """Standard deviation of the yearly log-price change of each fuel, per year."""
        return np.sqrt(np.clip(np.diag(self.cov), 0.0, None))

    @property
    def correlation(self) -> np.ndarray:
        """Correlation matrix of the yearly log-price changes (identity where a fuel is flat)."""
        v = self.volatility
        safe = np.where(v > 0, v, 1.0)
        c = self.cov / np.outer(safe, safe)
        c[np.ix_(v == 0, v == 0)] = 0.0
        np.fill_diagonal(c, 1.0)
        return c

    @property
    def trend_pct(self) -> np.ndarray:
        """The history's compound growth rate of each fuel's price, percent per year
        (``exp(drift) - 1``: the median path's growth)."""
        return np.expm1(self.drift) * 100.0

    def index(self, fuel: str) -> int:
        """Position of a fuel in the model's arrays.

        Parameters
        ----------
        fuel : str
            Fuel name.

        Returns
        -------
        int
            Index into ``fuels``.

        Raises
        ------
        ValueError
            If the model has no such fuel.
        """
        return self.fuels.index(fuel)

    def scaled(self, volatility_factor: float) -> PriceModel:
        """The same model with every volatility multiplied by a factor (0 = no randomness).

        Parameters
        ----------
        volatility_factor : float
            Multiplier of the volatilities, dimensionless (>= 0).

        Returns
        -------
        PriceModel
            The model with covariance times the factor squared.
        """
        return PriceModel(self.fuels, self.drift, self.cov * volatility_factor**2, self.first_year,
                          self.last_year, self.n_changes, self.sources)


def estimate_price_model(history: PriceHistory, fuels: Sequence[str] | None = None) -> PriceModel:
    """Estimate drift, volatilities and correlations from yearly prices.

    The yearly changes ``r[y] = ln(P[y] / P[y-1])`` are taken over the years every chosen fuel
    has (so that the covariance is one consistent matrix); the drift is their mean and the
    covariance their sample covariance (``ddof = 1``).

    Parameters
    ----------
    history : PriceHistory
        Yearly prices, USD per trade unit.
    fuels : sequence of str or None
        The fuels to model (default: every fuel of the history).

    Returns
    -------
    PriceModel
        Drift (per year) and covariance (per year) of the log-price changes.

    Raises
    ------
    ValueError
        If a fuel is not in the history or fewer than three yearly changes are shared.

    References
    ----------
    Hull, "Options, Futures, and Other Derivatives", ch. 15 (estimating volatility from
    historical data: the standard deviation of log returns).
    """
    names = tuple(fuels) if fuels is not None else history.fuels
    missing = [f for f in names if f not in history.fuels]
    if missing:
        raise ValueError(f"no price history for {', '.join(missing)}")
    rows = np.array([history.series(f) for f in names])
    complete = np.all(np.isfinite(rows), axis=0)
    years = np.asarray(history.years)[complete]
    prices = rows[:, complete]
    consecutive = np.diff(years) == 1
    changes = np.diff(np.log(prices), axis=1)[:, consecutive]
    if changes.shape[1] < 3:
        raise ValueError("need at least three shared year-to-year changes to estimate the model")
    return PriceModel(
        fuels=names, drift=changes.mean(axis=1), cov=np.atleast_2d(np.cov(changes, ddof=1)),
        first_year=int(years[0]), last_year=int(years[-1]), n_changes=int(changes.shape[1]),
        sources=tuple(history.sources[history.fuels.index(f)] for f in names),
    )


def _factor(cov: np.ndarray) -> np.ndarray:
    """A matrix ``L`` with ``L @ L.T == cov`` (Cholesky, or eigenvalues clipped at zero when the
    covariance is only semi-definite)."""
    try:
        return np.linalg.cholesky(cov)
    except np.linalg.LinAlgError:
        w, v = np.linalg.eigh(cov)
        return v * np.sqrt(np.clip(w, 0.0, None))


def simulate_price_paths(model: PriceModel, years: int, n_paths: int, seed: int = 0,
                         escalation_pct: Mapping[str, float] | None = None) -> np.ndarray:
    """Sample price paths: multipliers of today's price, year by year, for every fuel.

    ``m[n, f, 0] = 1`` and ``ln m[n, f, t] = sum_{k <= t} (mu_f + e[n, k, f])`` with ``e`` normal,
    zero mean, covariance ``model.cov``. Without ``escalation_pct`` the drift is the history's
    (``mu = model.drift``: the median path grows at ``model.trend_pct``); with it, each fuel is
    mean-centred on its escalation (``mu = ln(1 + e) - s^2 / 2``, so that
    ``E[m[t]] = (1 + e)^t`` exactly: the plan's single path is the expected path).

    Parameters
    ----------
    model : PriceModel
        Drift and covariance of the yearly log-price changes.
    years : int
        Number of years after today (the paths have ``years + 1`` points).
    n_paths : int
        Number of paths.
    seed : int
        Seed of the random generator: the same seed gives the same paths.
    escalation_pct : mapping of str to float or None
        Escalation by fuel, percent per year (fuels not named keep the history's drift).

    Returns
    -------
    numpy.ndarray
        Price multipliers, dimensionless, shape ``[n_paths, fuels, years + 1]``.

    Raises
    ------
    ValueError
        If ``years`` or ``n_paths`` is negative, or an escalation is -100 % or below.

    References
    ----------
    Hull, ch. 14: geometric Brownian motion, ln S_t - ln S_0 ~ N((mu - s^2/2) t, s^2 t).
    """
    if years < 0 or n_paths < 0:
        raise ValueError("years and n_paths must not be negative")
    var = np.clip(np.diag(model.cov), 0.0, None)
    mu = np.array(model.drift, dtype=float)
    for fuel, pct in (escalation_pct or {}).items():
        if fuel not in model.fuels:
            continue
        if pct <= -100:
            raise ValueError(f"escalation of {fuel} must be above -100 %")
        i = model.index(fuel)
        mu[i] = np.log1p(pct / 100.0) - 0.5 * var[i]
    rng = np.random.default_rng(seed)
    z = rng.standard_normal((n_paths, years, len(model.fuels)))
    steps = z @ _factor(model.cov).T + mu  # [N, T, F]
    logs = np.concatenate([np.zeros((n_paths, 1, len(model.fuels))), np.cumsum(steps, axis=1)], axis=1)
    return np.exp(logs).transpose(0, 2, 1)


def bill_shock_usd(bills_usd: Mapping[str, float], model: PriceModel) -> tuple[float, dict[str, float]]:
    """How much a one-standard-deviation year of price moves changes a year's bills.

    For the bills ``b_f`` paid at today's prices, next year's bill is ``sum_f b_f exp(e_f)`` with
    ``e`` the model's yearly shocks (zero mean here: the trend is left out). The combined figure
    is the standard deviation of that bill, from the exact lognormal moments; the per-fuel
    figures are each fuel's bill times ``exp(s_f) - 1`` (its price one standard deviation up).

    Parameters
    ----------
    bills_usd : mapping of str to float
        Yearly bills by fuel at today's prices, USD (fuels the model lacks do not move).
    model : PriceModel
        Covariance of the yearly log-price changes.

    Returns
    -------
    combined : float
        Standard deviation of the yearly bill, USD.
    by_fuel : dict of str to float
        The bill change when one fuel's price is one standard deviation up, USD.

    References
    ----------
    Johnson, Kotz & Balakrishnan, vol. 1, ch. 14 (lognormal moments):
    Cov(e^X, e^Y) = e^((s_x^2 + s_y^2)/2) (e^c - 1).
    """
    fuels = [f for f in bills_usd if f in model.fuels]
    if not fuels:
        return 0.0, {}
    idx = [model.index(f) for f in fuels]
    b = np.array([bills_usd[f] for f in fuels], dtype=float)
    c = model.cov[np.ix_(idx, idx)]
    v = np.diag(c)
    cov_levels = np.exp(0.5 * (v[:, None] + v[None, :])) * np.expm1(c)
    combined = float(np.sqrt(max(b @ cov_levels @ b, 0.0)))
    by_fuel = {f: float(bills_usd[f] * np.expm1(np.sqrt(max(c[k, k], 0.0)))) for k, f in enumerate(fuels)}
    return combined, by_fuel


def levelised_price_paths_usd_per_kwh(price_now_usd_per_kwh: float, multipliers: np.ndarray,
                                      first_year_kwh: float, discount_rate_pct: float,
                                      degradation_pct: float = 0.0) -> np.ndarray:
    """The utility price levelised over a kWh stream, for each sampled path.

    ``sum_t p_t E_t d_t / sum_t E_t d_t`` with ``p_t = price_now * m[n, t-1]``,
    ``E_t = E_1 (1 - deg)^(t-1)``, ``d_t = (1 + r)^-t``, t = 1..N (the same convention as
    :func:`homeplan.money.finance.levelised_price_usd_per_kwh`).

    Parameters
    ----------
    price_now_usd_per_kwh : float
        Price in the first year of the stream, USD/kWh.
    multipliers : numpy.ndarray
        Price multipliers ``[paths, N]`` (first column: the first year of the stream).
    first_year_kwh : float
        Energy in the first year, kWh.
    discount_rate_pct : float
        Discount rate, percent per year.
    degradation_pct : float
        Decline of the energy stream, percent per year.

    Returns
    -------
    numpy.ndarray
        Levelised price of each path, USD/kWh.

    References
    ----------
    W. Short, D. Packey, T. Holt, NREL/TP-462-5173 (1995): levelising an escalating price.
    """
    m = np.atleast_2d(np.asarray(multipliers, dtype=float))
    t = np.arange(1, m.shape[1] + 1)
    w = first_year_kwh * (1.0 - degradation_pct / 100.0) ** (t - 1) / (1.0 + discount_rate_pct / 100.0) ** t
    return price_now_usd_per_kwh * (m @ w) / w.sum()


def cvar(losses: np.ndarray, tail: float) -> np.ndarray:
    """Conditional value at risk: the mean of the worst ``tail`` share of equally likely losses.

    For ``S`` scenarios and ``k = tail * S``, the ``floor(k)`` largest losses count fully and the
    next one by ``k - floor(k)``, divided by ``k`` - the minimum over ``eta`` of
    ``eta + sum (L - eta)^+ / k``.

    Parameters
    ----------
    losses : numpy.ndarray
        Losses of equally likely scenarios, in the last axis (any unit, e.g. USD).
    tail : float
        Share of the worst scenarios, fraction in (0, 1].

    Returns
    -------
    numpy.ndarray
        CVaR over the last axis, in the unit of ``losses``.

    Raises
    ------
    ValueError
        If ``tail`` is outside (0, 1] or there are no scenarios.

    References
    ----------
    Rockafellar & Uryasev (2000), Theorem 1 and the discrete form of CVaR.
    """
    x = np.asarray(losses, dtype=float)
    s = x.shape[-1]
    if not 0 < tail <= 1 or s == 0:
        raise ValueError("tail must be in (0, 1] and there must be scenarios")
    k = tail * s
    whole = int(np.floor(k + 1e-9))
    worst = -np.sort(-x, axis=-1)
    total = worst[..., :whole].sum(axis=-1)
    if whole < s and k - whole > 1e-9:
        total = total + (k - whole) * worst[..., whole]
    return total / k
