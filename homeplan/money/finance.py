"""Household finance: loans, discounting, NPV, IRR, payback, yearly cash flows, levelised cost.

Formulas are implemented here (numpy-financial is used only by the tests, as the reference).
Conventions: rates in percent per year; cash-flow lists start at t = 0 (not discounted), one
entry per year; money in USD, positive = cash coming to the household.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

# --------------------------------------------------------------------------- loans


def loan_payment_usd(
    principal_usd: float, rate_pct: float, term_years: float, payments_per_year: int = 12
) -> float:
    """Level payment of an amortised loan (annuity formula); 0 % loans pay principal / n.

    P = L r / (1 - (1 + r)^-n), r = rate_pct / 100 / payments_per_year, n = term x payments.

    References
    ----------
    Annuity (amortisation) formula; numpy-financial ``pmt``; money.md "loan payment".
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
    years from ``start_year`` (``payments_per_year`` each)."""

    principal_usd: float
    rate_pct: float
    term_years: int
    start_year: int
    payments_per_year: int = 12
    name: str = ""


@dataclass(frozen=True)
class LoanYear:
    year: int
    payments_usd: float
    interest_usd: float
    principal_usd: float
    balance_end_usd: float


def loan_schedule(loan: Loan) -> tuple[LoanYear, ...]:
    """Yearly totals of an amortised loan: payments, interest, principal, balance at year end.

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

    References
    ----------
    NIST Handbook 135, simple payback (SPB); ASTM E1121 (payback method).
    """
    return _payback(list(cash_flows_usd))


def discounted_payback_years(rate_pct: float, cash_flows_usd: Sequence[float]) -> float | None:
    """Like :func:`simple_payback_years` on flows discounted at ``rate_pct``.

    References
    ----------
    NIST Handbook 135, discounted payback (DPB); ASTM E1121.
    """
    r = rate_pct / 100.0
    return _payback([cf / (1.0 + r) ** t for t, cf in enumerate(cash_flows_usd)])


# --------------------------------------------------------------------------- household flows


@dataclass(frozen=True)
class YearFlow:
    """One year of household cash flow (USD; positive = to the household).

    ``spend_usd``: invoices paid that year after point-of-sale rebates; ``borrowed_usd``: loan
    principal that paid part of them; ``out_of_pocket_usd`` = spend - borrowed;
    ``incentives_usd``: rebates paid later and tax credits received; ``net_usd`` =
    incentives + bill savings - out of pocket - loan payments.
    """

    year: int
    spend_usd: float
    borrowed_usd: float
    out_of_pocket_usd: float
    incentives_usd: float
    loan_payments_usd: float
    bill_savings_usd: float
    net_usd: float
    cumulative_usd: float


def household_cash_flows(
    years: Sequence[int],
    spend_usd: Mapping[int, float],
    incentives_usd: Mapping[int, float] | None = None,
    loans: Sequence[Loan] = (),
    baseline_bills_usd: Mapping[int, float] | None = None,
    plan_bills_usd: Mapping[int, float] | None = None,
) -> tuple[YearFlow, ...]:
    """Per-year cash flows of a plan (or one project) against a baseline.

    Parameters
    ----------
    years : the horizon, in order.
    spend_usd : project invoices per year, after point-of-sale rebates.
    incentives_usd : cash received per year (e.g. ``IncentiveResult.cash_after_purchase_by_year()``).
    loans : loans drawn in their ``start_year`` to pay part of that year's spend.
    baseline_bills_usd / plan_bills_usd : energy bills per year for the baseline ("do nothing"
        or "like-for-like") and for the plan; savings = baseline - plan.

    References
    ----------
    NIST Handbook 135 (Life-Cycle Costing Manual): savings measured against a base case;
    cash-basis timing (incentives counted in the year the cash arrives).
    """
    incentives = incentives_usd or {}
    base = baseline_bills_usd or {}
    plan = plan_bills_usd or {}
    borrowed: dict[int, float] = {}
    payments: dict[int, float] = {}
    for loan in loans:
        borrowed[loan.start_year] = borrowed.get(loan.start_year, 0.0) + loan.principal_usd
        for ly in loan_schedule(loan):
            payments[ly.year] = payments.get(ly.year, 0.0) + ly.payments_usd
    out = []
    cumulative = 0.0
    for y in years:
        spend = spend_usd.get(y, 0.0)
        borrow = borrowed.get(y, 0.0)
        savings = base.get(y, 0.0) - plan.get(y, 0.0)
        net = incentives.get(y, 0.0) + savings - (spend - borrow) - payments.get(y, 0.0)
        cumulative += net
        out.append(
            YearFlow(
                year=y,
                spend_usd=spend,
                borrowed_usd=borrow,
                out_of_pocket_usd=spend - borrow,
                incentives_usd=incentives.get(y, 0.0),
                loan_payments_usd=payments.get(y, 0.0),
                bill_savings_usd=savings,
                net_usd=net,
                cumulative_usd=cumulative,
            )
        )
    return tuple(out)


@dataclass(frozen=True)
class FinanceSummary:
    npv_usd: float
    irr_pct: float | None
    simple_payback_years: float | None
    discounted_payback_years: float | None
    discount_rate_pct: float


def summarise(flows: Sequence[YearFlow], discount_rate_pct: float) -> FinanceSummary:
    """NPV, IRR and paybacks of the ``net_usd`` column (first year = t 0).

    References
    ----------
    See :func:`npv_usd`, :func:`irr_pct`, :func:`simple_payback_years`,
    :func:`discounted_payback_years`.
    """
    nets = [f.net_usd for f in flows]
    return FinanceSummary(
        npv_usd=npv_usd(discount_rate_pct, nets),
        irr_pct=irr_pct(nets),
        simple_payback_years=simple_payback_years(nets),
        discounted_payback_years=discounted_payback_years(discount_rate_pct, nets),
        discount_rate_pct=discount_rate_pct,
    )


def difference(plan: Sequence[YearFlow], baseline: Sequence[YearFlow]) -> list[float]:
    """Year-by-year ``net_usd`` of a plan minus a baseline (e.g. like-for-like replacement),
    matched by year; the result feeds :func:`npv_usd`, :func:`irr_pct` and the paybacks."""
    base = {f.year: f.net_usd for f in baseline}
    return [f.net_usd - base.get(f.year, 0.0) for f in plan]


def budgets_with_reinvested_savings(
    base_budget_usd: Mapping[int, float],
    bill_savings_usd: Mapping[int, float],
    share: float = 1.0,
) -> dict[int, float]:
    """Each year's budget plus ``share`` of the previous year's bill savings.

    Savings are not compounded: year y gets base[y] + share x savings[y - 1].

    References
    ----------
    Issue 5 (household finance): "add each year's bill savings to the next year's budget".
    """
    if not 0 <= share <= 1:
        raise ValueError("share must be between 0 and 1")
    return {
        y: b + share * bill_savings_usd.get(y - 1, 0.0) for y, b in sorted(base_budget_usd.items())
    }


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
    """The "locked-in" cost of solar + battery beside the utility price over the same life."""

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
