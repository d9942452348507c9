"""The peak demand a meter would show, today and in each state of the plan.

Today's figure is the plan's measured peak (``home.electrical.peak_demand_kw``) when given,
else an estimate: the yearly use of everything but the big loads through Velander's formula,
plus the big loads' design-day demand. Each later state moves it by the change
in the design-day demand of the big electric loads (heat pump and its backup at the heating
design temperature, cooling at the cooling design temperature, water heating, charging in its
window), season by season: peak = today's peak + that season's design-day demand of the state
- the highest design-day demand of today's home. It is never below the modelled highest hourly
average of the state.

References
----------
See :mod:`homeplan.energy.peaks` (design-day demand; Velander 1952 for the estimate).
"""

from __future__ import annotations

from dataclasses import dataclass

from homeplan.energy.peaks import DesignDayDemand, design_day_demand, velander_peak_kw
from homeplan.energy.selection import design_cooling_load
from homeplan.energy.simulate import EnergyResult, HomeEnergySpec
from homeplan.plan.model import Plan

__all__ = ["MeterPeak", "PeakBasis", "meter_peak", "peak_basis"]


@dataclass(frozen=True)
class PeakBasis:
    """Today's peak demand and the design-day demand it is measured against.

    Attributes
    ----------
    today_kw : float
        Today's peak demand, kW (measured, or estimated).
    measured : bool
        True when the plan gives the meter's figure.
    method : str
        How the figure is found, in words (shown beside it).
    today : DesignDayDemand
        Today's big electric loads on the design days.
    heating_design_f : float
        Heating design temperature, F.
    cooling_design_f : float or None
        Cooling design temperature, F.
    cooling_load_btuh : float
        Total design cooling load of the home, Btu/h.
    """

    today_kw: float
    measured: bool
    method: str
    today: DesignDayDemand
    heating_design_f: float
    cooling_design_f: float | None
    cooling_load_btuh: float


@dataclass(frozen=True)
class MeterPeak:
    """Peak demand of one state of the home, kW (the larger season, and each design day)."""

    kw: float
    winter_kw: float
    summer_kw: float


def peak_basis(plan: Plan, today: HomeEnergySpec, today_result: EnergyResult) -> PeakBasis:
    """Today's peak (measured or estimated) and today's design-day demand."""
    w = today.weather
    t_heat = float(w.heating_design_f)
    t_cool = None if w.cooling_design_f is None else float(w.cooling_design_f)
    cooling = 0.0
    if t_cool is not None:
        cooling = design_cooling_load(today.ua_btuh_f, t_cool, plan.home.floor_area_ft2,
                                      float(plan.home.occupants)).total_btuh
    demand = design_day_demand(today, t_heat, t_cool, cooling)
    e = plan.home.electrical
    if e.peak_demand_kw is not None:
        period = "12 months" if e.peak_demand_period == "12_months" else "30 days"
        return PeakBasis(float(e.peak_demand_kw), True,
                         f"today's figure is your measured peak ({period}); later years add the "
                         "design-day demand of the new loads (heat pump and backup at the design "
                         "temperature, cooling, water heating, charging)",
                         demand, t_heat, t_cool, cooling)
    uses = today_result.end_use_units
    big = sum(uses.get(u, {}).get("electricity", 0.0) for u in ("heating", "cooling", "water", "vehicles"))
    other = max(float(today_result.monthly_units["electricity"].sum()) - big, 0.0)
    estimate = max(velander_peak_kw(other) + demand.highest_kw, float(today_result.peak_kw))
    return PeakBasis(estimate, False,
                     f"estimated: the other uses ({other:,.0f} kWh a year) by Velander's formula, "
                     "plus the design-day demand of heating, cooling, water heating and charging "
                     "- give home.electrical.peak_demand_kw from your meter for a better figure",
                     demand, t_heat, t_cool, cooling)


def meter_peak(pb: PeakBasis, spec: HomeEnergySpec, result: EnergyResult) -> MeterPeak:
    """The peak demand of one state: today's peak moved by the change in design-day demand."""
    d = design_day_demand(spec, pb.heating_design_f, pb.cooling_design_f, pb.cooling_load_btuh)
    shift = pb.today_kw - pb.today.highest_kw
    winter = max(shift + d.winter_kw, float(result.peak_winter_kw))
    summer = max(shift + d.summer_kw, float(result.peak_summer_kw))
    return MeterPeak(max(winter, summer), winter, summer)
