"""End-of-life risk of the home's appliances: a Weibull survival model per appliance.

The scale comes from the catalog's median service life and the shape (wear-out) from the same
table. Condition shortens life by accelerated ageing: an appliance in "poor" condition ages
faster by the factor in data/condition_factors.csv.

Plain Python (``math``): a plan has a handful of items and at most 30 years of risk each, so
``check``, ``lifecycle`` and the app's first paint need no numpy.

References
----------
W. Weibull (1951), "A statistical distribution function of wide applicability", J. Appl. Mech.
ASHRAE Handbook - HVAC Applications, "Owning and Operating Costs", service-life table (medians).
For a Weibull distribution S(t) = exp(-(t/eta)^beta), the median is eta (ln 2)^(1/beta), and the
conditional survival after age a is S(a + t) / S(a) (any reliability text, e.g. Meeker &
Escobar, "Statistical Methods for Reliability Data", 1998, ch. 4).
Abramowitz & Stegun (1964), "Handbook of Mathematical Functions", 6.5.3 (upper incomplete gamma
function), 6.5.29 (its series) and 6.5.31 (its continued fraction), for the mean remaining life.
"""

from __future__ import annotations

import math
from dataclasses import replace

from homeplan import catalog
from homeplan.plan.fuels import appliance_fuel, vehicle_fuel
from homeplan.plan.model import Appliance, Plan, Roof, Vehicle
from homeplan.result.outlook import LifeOutlook

__all__ = [
    "appliance_outlook",
    "appliance_type",
    "conditional_survival",
    "cumulative_failure_probability",
    "hazard_by_year",
    "mean_remaining_life",
    "outlook",
    "plan_outlooks",
    "remaining_life_at_risk",
    "roof_outlook",
    "survival",
    "upper_gamma_scaled",
    "vehicle_outlook",
    "weibull_scale",
    "yearly_failure_probability",
]

def weibull_scale(median_years: float, shape: float) -> float:
    """Scale eta of a Weibull distribution with the given median: eta = median / (ln 2)^(1/beta)."""
    return median_years / math.log(2.0) ** (1.0 / shape)


def survival(age_years: float, scale: float, shape: float) -> float:
    """S(t) = exp(-(t/eta)^beta): the chance of still working at age t."""
    t = max(float(age_years), 0.0)
    return math.exp(-((t / scale) ** shape))


def conditional_survival(age_years: float, from_age_years: float, scale: float, shape: float) -> float:
    """S(t) / S(a): the chance of still working at age t given it works at age a (t >= a).

    Computed as exp((a/eta)^beta - (t/eta)^beta), so an age far past the median life (a roof
    laid in 1900) gives a small number, not 0/0: each S underflows to zero long before the
    ratio does.
    """
    t = max(float(age_years), 0.0)
    a = max(float(from_age_years), 0.0)
    return math.exp(min((a / scale) ** shape - (t / scale) ** shape, 0.0))


def yearly_failure_probability(age_years: float, years: int, scale: float, shape: float) -> tuple[float, ...]:
    """P(fails during future year k | works today), k = 1..years (unconditional on years between).

    Element k-1 is (S(a+k-1) - S(a+k)) / S(a); the elements sum to the cumulative risk.
    """
    s = [conditional_survival(age_years + k, age_years, scale, shape) for k in range(years + 1)]
    return tuple(s[k] - s[k + 1] for k in range(years))


def hazard_by_year(age_years: float, years: int, scale: float, shape: float) -> tuple[float, ...]:
    """P(fails during future year k | still works at the start of that year)."""
    return tuple(1.0 - conditional_survival(age_years + k + 1, age_years + k, scale, shape)
                 for k in range(years))


def cumulative_failure_probability(age_years: float, years: int, scale: float,
                                   shape: float) -> tuple[float, ...]:
    """P(has failed by the end of future year k | works today), k = 1..years."""
    return tuple(1.0 - conditional_survival(age_years + k, age_years, scale, shape)
                 for k in range(1, years + 1))


def remaining_life_at_risk(age_years: float, risk: float, scale: float, shape: float) -> float:
    """Years until the conditional failure probability reaches ``risk`` (0-1).

    Solves S(a + r) / S(a) = 1 - risk: a + r = eta ((a/eta)^beta - ln(1 - risk))^(1/beta).
    With risk = 0.5 this is the conditional median remaining life.
    """
    if not 0.0 < risk < 1.0:
        raise ValueError("risk must be between 0 and 1")
    a = max(age_years, 0.0)
    return scale * ((a / scale) ** shape - math.log(1.0 - risk)) ** (1.0 / shape) - a


def upper_gamma_scaled(s: float, x: float) -> float:
    """exp(x) Gamma(s, x), the upper incomplete gamma function scaled so that it does not
    underflow for large x (s > 0, x >= 0).

    Below x = s + 1 by the series of the lower function (A&S 6.5.29):
    gamma(s, x) = exp(-x) x^s sum_n x^n / (s (s+1) ... (s+n)), and Gamma(s, x) = Gamma(s) - gamma(s, x);
    above it by the continued fraction of A&S 6.5.31, evaluated by the modified Lentz method,
    whose value times x^s exp(-x) is Gamma(s, x). Relative error about 1e-14.
    """
    if s <= 0 or x < 0:
        raise ValueError("needs s > 0 and x >= 0")
    if x == 0:
        return math.gamma(s)
    tiny, eps = 1e-300, 1e-15
    if x < s + 1:
        term = total = 1.0 / s
        n = 0
        while abs(term) > abs(total) * eps:
            n += 1
            term *= x / (s + n)
            total += term
        return math.exp(x) * math.gamma(s) - x ** s * total
    b = x + 1.0 - s
    c, d = 1.0 / tiny, 1.0 / b
    h = d
    for i in range(1, 10_000):
        an = -i * (i - s)
        b += 2.0
        d = an * d + b
        d = tiny if abs(d) < tiny else d
        c = b + an / c
        c = tiny if abs(c) < tiny else c
        d = 1.0 / d
        delta = d * c
        h *= delta
        if abs(delta - 1.0) < eps:
            break
    return x ** s * h


def mean_remaining_life(age_years: float, scale: float, shape: float) -> float:
    """E[T - a | T > a] = integral of S(a + t) / S(a) dt over t >= 0, in closed form.

    With x = (a/eta)^beta the integral is eta exp(x) Gamma(1 + 1/beta, x) - a (substitute
    u = (t/eta)^beta in the integral of S, then A&S 6.5.3); at a = 0 it is the Weibull mean
    eta Gamma(1 + 1/beta).
    """
    a = max(float(age_years), 0.0)
    x = (a / scale) ** shape
    return max(scale * upper_gamma_scaled(1.0 + 1.0 / shape, x) - a, 0.0)


def outlook(
    key: str, label: str, kind: str, fuel: str, type_: str, install_year: int | None,
    condition: str, today_year: int, years: int = 15, risk_pct: float = 50.0,
) -> LifeOutlook:
    """End-of-life outlook from the catalog's service life for this kind, fuel and type."""
    life = catalog.service_life(kind, fuel, type_)
    assumed = install_year is None
    if install_year is None:
        install_year = int(round(today_year - life.median_life_years / 2))
    age = max(0.0, float(today_year - install_year))
    factor = catalog.condition_factors().get(condition, 1.0)
    failed = condition in ("failing", "failed") or factor <= 0.0
    eff_age = age / factor if factor > 0 else age
    scale = weibull_scale(life.median_life_years, life.weibull_shape)
    if failed:
        yearly = (1.0, *(0.0,) * (years - 1)) if years else ()
        cumulative = hazard = (1.0,) * years
        end = replace_by = today_year
        mean_rem = 0.0
    else:
        yearly = yearly_failure_probability(eff_age, years, scale, life.weibull_shape)
        cumulative = cumulative_failure_probability(eff_age, years, scale, life.weibull_shape)
        hazard = hazard_by_year(eff_age, years, scale, life.weibull_shape)
        rem_med = remaining_life_at_risk(eff_age, 0.5, scale, life.weibull_shape) * factor
        rem_risk = remaining_life_at_risk(eff_age, risk_pct / 100, scale, life.weibull_shape) * factor
        end = today_year + int(math.floor(rem_med))
        replace_by = today_year + int(math.floor(rem_risk))
        mean_rem = mean_remaining_life(eff_age, scale, life.weibull_shape) * factor
    return LifeOutlook(
        key=key, label=label, kind=kind, fuel=fuel, install_year=install_year,
        install_year_assumed=assumed, age_years=age, effective_age_years=eff_age,
        median_life_years=life.median_life_years, shape=life.weibull_shape, source=life.source,
        expected_end_year=end, mean_remaining_years=mean_rem, replace_by_year=replace_by,
        risk_pct=risk_pct, first_year=today_year,
        yearly_failure_pct=tuple(float(x) * 100 for x in yearly),
        cumulative_failure_pct=tuple(float(x) * 100 for x in cumulative), failed=failed,
        hazard_pct=tuple(float(x) * 100 for x in hazard),
    )


def appliance_type(appliance: Appliance) -> str:
    if appliance.type:
        return appliance.type
    return "storage" if appliance.kind == "water_heater" else ""


# Electric-only kinds named without a fuel, in words rather than the trade's abbreviations.
_KIND_WORDS = {"heat_pump": "heat pump", "central_ac": "central air conditioner",
               "room_ac": "room air conditioner", "mini_split": "mini-split heat pump"}


def appliance_outlook(a: Appliance, today_year: int, years: int = 15, risk_pct: float = 50,
                      failed_now: bool = False) -> LifeOutlook:
    words = _KIND_WORDS.get(a.kind, a.kind.replace("_", " "))
    label = words if a.kind in _KIND_WORDS else f"{appliance_fuel(a)} {words}"
    return outlook(a.key, label, a.kind, appliance_fuel(a), appliance_type(a), a.year_installed,
                   "failed" if failed_now else a.condition, today_year, years, risk_pct)


def vehicle_outlook(v: Vehicle, key: str, today_year: int, years: int = 15,
                    risk_pct: float = 50) -> LifeOutlook:
    fuel = vehicle_fuel(v.fuel)
    start = v.model_year or v.year_acquired
    o = outlook(key, v.name or f"{v.fuel} {v.body}", "vehicle", "gasoline", v.body, start, "good",
                today_year, years, risk_pct)
    if v.replace_year is not None:  # the owner's plan wins over the statistics
        o = replace(o, replace_by_year=v.replace_year, expected_end_year=v.replace_year)
    return replace(o, fuel=fuel)


def roof_outlook(roof: Roof, today_year: int, years: int = 15, risk_pct: float = 50) -> LifeOutlook:
    return outlook("roof", f"{roof.material.replace('_', ' ')} roof", "roof", "", roof.material,
                   roof.year_installed, "good", today_year, years, risk_pct)


def plan_outlooks(plan: Plan, years: int | None = None) -> list[LifeOutlook]:
    """Outlooks for every appliance, vehicle and the roof, from the plan's first year."""
    first = plan.first_year
    years = years or max(plan.budget.horizon_years, 10)
    risk = plan.choices.replace_at_risk_pct
    failed = set(plan.choices.failed_now)
    out = [appliance_outlook(a, first, years, risk, a.key in failed) for a in plan.appliances]
    for i, v in enumerate(plan.vehicles):
        if v.fuel != "electric":
            out.append(vehicle_outlook(v, plan.vehicle_key(i), first, years, risk))
    if plan.home.roof is not None:
        out.append(roof_outlook(plan.home.roof, first, years, risk))
    return out
