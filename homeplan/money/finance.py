"""Household finance: loans, discounting, NPV, IRR, payback, yearly cash flows, levelised cost.

Formulas are implemented here (numpy-financial is used only by the tests, as the reference).
Conventions: rates in percent per year; cash-flow lists start at t = 0 (not discounted), one
entry per year; money in USD, positive = cash coming to the household.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

__all__ = [
    "EnergyHedge",
    "Loan",
    "LoanYear",
    "discount_factor",
    "discounted_payback_years",
    "energy_hedge",
    "irr_pct",
    "levelised_cost_usd_per_kwh",
    "levelised_price_usd_per_kwh",
    "loan_payment_usd",
    "loan_schedule",
    "npv_usd",
    "remaining_value_share",
    "simple_payback_years",
]

# --------------------------------------------------------------------------- loans


def loan_payment_usd(
    principal_usd: float, rate_pct: float, term_years: float, payments_per_year: int = 12
) -> float:
    """Level payment of an amortised loan (annuity formula); 0 % loans pay principal / n.

    P = L r / (1 - (1 + r)^-n), r = rate_pct / 100 / payments_per_year, n = term x payments.

    Parameters
    ----------
    principal_usd : float
        Amount borrowed, USD.
    rate_pct : float
        Interest rate, percent per year.
    term_years : float
        Term, years.
    payments_per_year : int
        Payments per year.

    Returns
    -------
    float
        Payment, USD per payment period.

    Raises
    ------
    ValueError
        If the term is shorter than one payment.

    References
    ----------
    Annuity (amortisation) formula; numpy-financial ``pmt``.
    """
    n = round(term_years * payments_per_year)
    if n <= 0:
        raise ValueError("loan term must be at least one payment")
    r = rate_pct / 100.0 / payments_per_year
    if r == 0:
        return principal_usd / n
    return principal_usd * r / (1.0 - (1.0 + r) ** -n)


@dataclass(frozen=True)
class Loan:
    """A loan that pays for projects in ``start_year``; payments run ``term_years`` calendar
    years from ``start_year`` (``payments_per_year`` each).

    Attributes
    ----------
    principal_usd : float
        Amount borrowed, USD.
    rate_pct : float
        Interest rate, percent per year.
    term_years : int
        Term, years.
    start_year : int
        Calendar year the money is borrowed.
    payments_per_year : int
        Payments per year.
    name : str
        Label of the loan.
    """

    principal_usd: float
    rate_pct: float
    term_years: int
    start_year: int
    payments_per_year: int = 12
    name: str = ""


@dataclass(frozen=True)
class LoanYear:
    """One calendar year of a loan's schedule.

    Attributes
    ----------
    year : int
        Calendar year.
    payments_usd : float
        Payments made in the year, USD.
    interest_usd : float
        Interest paid in the year, USD.
    principal_usd : float
        Principal repaid in the year, USD.
    balance_end_usd : float
        Balance owed at the end of the year, USD.
    """

    year: int
    payments_usd: float
    interest_usd: float
    principal_usd: float
    balance_end_usd: float


def loan_schedule(loan: Loan) -> tuple[LoanYear, ...]:
    """Yearly totals of an amortised loan: payments, interest, principal, balance at year end.

    Parameters
    ----------
    loan : Loan
        The loan.

    Returns
    -------
    tuple of LoanYear
        One entry per year of the term, USD.

    Raises
    ------
    ValueError
        If the term is shorter than one payment.

    References
    ----------
    Standard amortisation: interest = balance x periodic rate; numpy-financial ``ipmt``/``ppmt``.
    """
    pay = loan_payment_usd(
        loan.principal_usd, loan.rate_pct, loan.term_years, loan.payments_per_year
    )
    r = loan.rate_pct / 100.0 / loan.payments_per_year
    balance = loan.principal_usd
    out = []
    for k in range(loan.term_years):
        paid = interest = 0.0
        for _ in range(loan.payments_per_year):
            i = balance * r
            p = min(pay, balance + i)
            balance = balance + i - p
            paid += p
            interest += i
        out.append(
            LoanYear(loan.start_year + k, paid, interest, paid - interest, max(0.0, balance))
        )
    return tuple(out)


# --------------------------------------------------------------------------- discounting


def discount_factor(rate_pct: float, years: float) -> float:
    """Single present value factor: what one dollar ``years`` from now is worth today.

    Parameters
    ----------
    rate_pct : float
        Discount rate, percent per year.
    years : float
        Time from today, years (may be fractional).

    Returns
    -------
    float
        (1 + r)^-t, dimensionless.

    References
    ----------
    NIST Handbook 135 (Life-Cycle Costing Manual), single present value factor.
    """
    return (1.0 + rate_pct / 100.0) ** -years


def remaining_value_share(years_used: float, life_years: float) -> float:
    """Share of equipment value left after ``years_used`` of a ``life_years`` service life.

    Parameters
    ----------
    years_used : float
        Years the equipment has served, years.
    life_years : float
        Its service life, years (taken as at least one year).

    Returns
    -------
    float
        max(0, 1 - used / life), between 0 and 1 (straight-line residual value).

    References
    ----------
    NIST Handbook 135 (Life-Cycle Costing Manual), residual value by straight-line depreciation.
    """
    return max(0.0, 1.0 - years_used / max(life_years, 1.0))


def npv_usd(rate_pct: float, cash_flows_usd: Sequence[float]) -> float:
    """Net present value, first flow at t = 0: sum CF_t / (1 + r)^t.

    Parameters
    ----------
    rate_pct : float
        Discount rate, percent per year.
    cash_flows_usd : sequence of float
        Cash flow of each year from t = 0, USD.

    Returns
    -------
    float
        Net present value at t = 0, USD.

    References
    ----------
    NIST Handbook 135 (Life-Cycle Costing Manual), present value; numpy-financial ``npv``.
    """
    r = rate_pct / 100.0
    return sum(cf / (1.0 + r) ** t for t, cf in enumerate(cash_flows_usd))


def irr_pct(cash_flows_usd: Sequence[float]) -> float | None:
    """Internal rate of return in percent, or None when NPV never crosses zero.

    Finds every sign change of NPV(r) over r in (-99 %, 10,000 %] on a fine grid, refines
    each by bisection and returns the root closest to 0 (numpy-financial's convention).

    Parameters
    ----------
    cash_flows_usd : sequence of float
        Cash flow of each year from t = 0, USD.

    Returns
    -------
    float or None
        Internal rate of return, percent per year; None when there is none.

    References
    ----------
    Brealey, Myers & Allen, "Principles of Corporate Finance", ch. 5 (IRR); numpy-financial ``irr``.
    """
    flows = list(cash_flows_usd)
    if len(flows) < 2 or all(f >= 0 for f in flows) or all(f <= 0 for f in flows):
        return None

    import numpy as np

    def f(rate: float) -> float:
        log_growth = math.log1p(rate)
        return sum(cf * math.exp(-log_growth * t) for t, cf in enumerate(flows))

    # NPV on a grid in log(1 + r) with 0.5 % steps, covering -99 % .. 10,000 %, vectorised;
    # grid points whose discount factors overflow (very negative rates) are dropped
    logs = np.arange(round(200 * math.log(0.01)), round(200 * math.log(101.0)) + 1) / 200.0
    t = np.arange(len(flows))
    with np.errstate(over="ignore", invalid="ignore"):
        values = (np.asarray(flows)[None, :] * np.exp(-logs[:, None] * t[None, :])).sum(axis=1)
    keep = np.isfinite(values)
    grid = [float(x) for x in np.expm1(logs[keep])]
    npvs = [float(v) for v in values[keep]]
    roots: list[float] = []
    if not grid:
        return None
    prev_r, prev_v = grid[0], npvs[0]
    for r, v in zip(grid[1:], npvs[1:], strict=True):
        if prev_v == 0:
            roots.append(prev_r)
        elif (prev_v < 0) != (v < 0) and v != 0:
            lo, hi, flo = prev_r, r, f(prev_r)
            for _ in range(200):
                mid = 0.5 * (lo + hi)
                fm = f(mid)
                if (fm < 0) == (flo < 0):
                    lo, flo = mid, fm
                else:
                    hi = mid
                if hi - lo < 1e-15:
                    break
            roots.append(0.5 * (lo + hi))
        prev_r, prev_v = r, v
    if prev_v == 0:
        roots.append(prev_r)
    if not roots:
        return None
    return 100.0 * min(roots, key=abs)


def _payback(flows: Sequence[float]) -> float | None:
    cum = 0.0
    for t, cf in enumerate(flows):
        before = cum
        cum += cf
        if cum >= 0 and (t == 0 or before < 0):
            if t == 0:
                return 0.0
            return (t - 1) + (-before / cf) if cf > 0 else float(t)
    return None


def simple_payback_years(cash_flows_usd: Sequence[float]) -> float | None:
    """Years until the cumulative (undiscounted) cash flow first reaches zero, interpolated
    within the year; flows[0] is the up-front year. None if it never pays back.

    Parameters
    ----------
    cash_flows_usd : sequence of float
        Cash flow of each year from t = 0, USD.

    Returns
    -------
    float or None
        Payback time, years; None if it never pays back.

    References
    ----------
    NIST Handbook 135, simple payback (SPB); ASTM E1121 (payback method).
    """
    return _payback(list(cash_flows_usd))


def discounted_payback_years(rate_pct: float, cash_flows_usd: Sequence[float]) -> float | None:
    """Like :func:`simple_payback_years` on flows discounted at ``rate_pct``.

    Parameters
    ----------
    rate_pct : float
        Discount rate, percent per year.
    cash_flows_usd : sequence of float
        Cash flow of each year from t = 0, USD.

    Returns
    -------
    float or None
        Discounted payback time, years; None if it never pays back.

    References
    ----------
    NIST Handbook 135, discounted payback (DPB); ASTM E1121.
    """
    r = rate_pct / 100.0
    return _payback([cf / (1.0 + r) ** t for t, cf in enumerate(cash_flows_usd)])


# --------------------------------------------------------------------------- levelised cost


def _energy_stream(first_year_kwh: float, degradation_pct: float, life_years: int) -> list[float]:
    return [
        first_year_kwh * (1.0 - degradation_pct / 100.0) ** (t - 1)
        for t in range(1, life_years + 1)
    ]


def levelised_cost_usd_per_kwh(
    capex_usd: float,
    first_year_kwh: float,
    life_years: int,
    discount_rate_pct: float,
    om_usd_per_year: float = 0.0,
    om_escalation_pct: float = 0.0,
    degradation_pct: float = 0.0,
    replacements_usd: Mapping[int, float] | None = None,
    incentives_usd: float = 0.0,
) -> float:
    """Levelised cost of energy: discounted costs / discounted kWh over the system's life.

    LCOE = [capex - incentives + sum_t (O&M_t + R_t)/(1+r)^t] / sum_t E_t/(1+r)^t, t = 1..N,
    E_t = E_1 (1 - d)^(t-1), O&M_t = O&M_1 (1 + e)^(t-1); ``replacements_usd`` maps a
    year of life (1..N) to a cost (e.g. an inverter or battery module).

    Parameters
    ----------
    capex_usd : float
        Up-front cost, USD.
    first_year_kwh : float
        Energy produced in the first year, kWh.
    life_years : int
        Service life, years.
    discount_rate_pct : float
        Discount rate, percent per year.
    om_usd_per_year : float
        Operation and maintenance in the first year, USD per year.
    om_escalation_pct : float
        Escalation of operation and maintenance, percent per year.
    degradation_pct : float
        Output degradation, percent per year.
    replacements_usd : mapping of int to float or None
        Replacement cost by year of life, USD.
    incentives_usd : float
        Incentives deducted from the up-front cost, USD.

    Returns
    -------
    float
        Levelised cost of energy, USD/kWh.

    Raises
    ------
    ValueError
        If the life or the first-year energy is not positive.

    References
    ----------
    W. Short, D. Packey, T. Holt, "A Manual for the Economic Evaluation of Energy Efficiency
    and Renewable Energy Technologies", NREL/TP-462-5173 (1995), levelised cost of energy.
    """
    if life_years <= 0 or first_year_kwh <= 0:
        raise ValueError("life and first-year energy must be positive")
    r = discount_rate_pct / 100.0
    energy = _energy_stream(first_year_kwh, degradation_pct, life_years)
    reps = replacements_usd or {}
    cost = capex_usd - incentives_usd
    kwh = 0.0
    for t in range(1, life_years + 1):
        disc = (1.0 + r) ** t
        cost += (
            om_usd_per_year * (1.0 + om_escalation_pct / 100.0) ** (t - 1) + reps.get(t, 0.0)
        ) / disc
        kwh += energy[t - 1] / disc
    return cost / kwh


def levelised_price_usd_per_kwh(
    first_year_price_usd_per_kwh: float,
    escalation_pct: float,
    first_year_kwh: float,
    life_years: int,
    discount_rate_pct: float,
    degradation_pct: float = 0.0,
) -> float:
    """Utility price levelised over the same kWh stream: sum p_t E_t d_t / sum E_t d_t,
    p_t = p_1 (1 + e)^(t-1), d_t = (1 + r)^-t.

    Parameters
    ----------
    first_year_price_usd_per_kwh : float
        Price in the first year, USD/kWh.
    escalation_pct : float
        Price escalation, percent per year.
    first_year_kwh : float
        Energy in the first year, kWh.
    life_years : int
        Period, years.
    discount_rate_pct : float
        Discount rate, percent per year.
    degradation_pct : float
        Decline of the energy stream, percent per year.

    Returns
    -------
    float
        Levelised price, USD/kWh.

    References
    ----------
    Short, Packey & Holt, NREL/TP-462-5173 (1995): levelising an escalating price.
    """
    r = discount_rate_pct / 100.0
    energy = _energy_stream(first_year_kwh, degradation_pct, life_years)
    num = den = 0.0
    for t in range(1, life_years + 1):
        w = energy[t - 1] / (1.0 + r) ** t
        num += first_year_price_usd_per_kwh * (1.0 + escalation_pct / 100.0) ** (t - 1) * w
        den += w
    return num / den


@dataclass(frozen=True)
class EnergyHedge:
    """The "locked-in" cost of solar + battery beside the utility price over the same life.

    Attributes
    ----------
    lcoe_usd_per_kwh : float
        Levelised cost of the system's energy, USD/kWh.
    utility_levelised_usd_per_kwh : float
        Levelised utility price over the same kWh, USD/kWh.
    utility_first_year_usd_per_kwh : float
        Utility price in the first year, USD/kWh.
    utility_last_year_usd_per_kwh : float
        Utility price in the last year of the life, USD/kWh.
    life_years : int
        Service life, years.
    """

    lcoe_usd_per_kwh: float
    utility_levelised_usd_per_kwh: float
    utility_first_year_usd_per_kwh: float
    utility_last_year_usd_per_kwh: float
    life_years: int


def energy_hedge(
    capex_usd: float,
    first_year_kwh: float,
    life_years: int,
    discount_rate_pct: float,
    utility_price_usd_per_kwh: float,
    utility_escalation_pct: float,
    *,
    om_usd_per_year: float = 0.0,
    degradation_pct: float = 0.0,
    replacements_usd: Mapping[int, float] | None = None,
    incentives_usd: float = 0.0,
) -> EnergyHedge:
    """Levelised cost of a solar + battery system next to the utility price rising at
    ``utility_escalation_pct`` (e.g. CPI) over the same kWh - the inflation hedge in one figure.

    Parameters
    ----------
    capex_usd : float
        Up-front cost, USD.
    first_year_kwh : float
        Energy produced in the first year, kWh.
    life_years : int
        Service life, years.
    discount_rate_pct : float
        Discount rate, percent per year.
    utility_price_usd_per_kwh : float
        Utility price in the first year, USD/kWh.
    utility_escalation_pct : float
        Utility price escalation (also applied to O&M), percent per year.
    om_usd_per_year : float
        Operation and maintenance in the first year, USD per year.
    degradation_pct : float
        Output degradation, percent per year.
    replacements_usd : mapping of int to float or None
        Replacement cost by year of life, USD.
    incentives_usd : float
        Incentives deducted from the up-front cost, USD.

    Returns
    -------
    EnergyHedge
        Levelised system cost and utility prices, USD/kWh.

    Raises
    ------
    ValueError
        If the life or the first-year energy is not positive.

    References
    ----------
    Short, Packey & Holt, NREL/TP-462-5173 (1995).
    """
    lcoe = levelised_cost_usd_per_kwh(
        capex_usd,
        first_year_kwh,
        life_years,
        discount_rate_pct,
        om_usd_per_year=om_usd_per_year,
        om_escalation_pct=utility_escalation_pct,
        degradation_pct=degradation_pct,
        replacements_usd=replacements_usd,
        incentives_usd=incentives_usd,
    )
    util = levelised_price_usd_per_kwh(
        utility_price_usd_per_kwh,
        utility_escalation_pct,
        first_year_kwh,
        life_years,
        discount_rate_pct,
        degradation_pct,
    )
    last = utility_price_usd_per_kwh * (1.0 + utility_escalation_pct / 100.0) ** (life_years - 1)
    return EnergyHedge(lcoe, util, utility_price_usd_per_kwh, last, life_years)
