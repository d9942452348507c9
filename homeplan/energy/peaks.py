"""Peak demand as a meter reports it: the design day of the big electric loads.

The hourly model gives average kW, which is what energy and bills need; a meter (or the
utility) reports the highest demand over a short interval. Around a known or estimated peak of
today's home, each state of the plan adds the coincident demand of its big electric loads on a
design day: heating at the heating design temperature (heat pump and its backup, or resistance
heat), cooling at the cooling design temperature (a single-speed unit at full capacity), water
heating (element or compressor) and car charging in its window. The design day is held at the
design temperature; cooling runs through the afternoon; cooking and drying are short and
movable and are left out.

References
----------
ASHRAE Handbook - Fundamentals, ch. 14 (99 % heating and 1 % cooling design dry bulb);
DOE 10 CFR 430 Subpart B Appendix M1 (heat pump capacity and COP at the rating points);
Velander (1952) for a peak estimated from yearly use (coefficients from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from homeplan.energy._data import table_value
from homeplan.energy.heating import HeatPumpSpec, heating_hourly, hp_capacity_btuh, hp_cop
from homeplan.energy.simulate import HomeEnergySpec
from homeplan.energy.units import btu_per_kwh
from homeplan.energy.vehicles import daily_charging_kw

__all__ = [
    "DesignDayDemand",
    "design_day_demand",
    "peak_setting",
    "velander_peak_kw",
]


def peak_setting(key: str) -> float:
    """A value of ``data/peak_demand.csv`` (see :func:`homeplan.energy._data.table_value`)."""
    return table_value("peak_demand", key)


@dataclass(frozen=True)
class DesignDayDemand:
    """Demand of the big electric loads on the winter and summer design days, kW.

    Attributes
    ----------
    heating_kw : float
        Space heating at the heating design temperature (heat pump with its electric backup,
        resistance heat, or a furnace's blower), kW.
    cooling_kw : float
        Cooling at the cooling design temperature, kW.
    water_kw : float
        Electric water heating while it runs (element or compressor), kW.
    charging_kw : numpy.ndarray
        Car charging at home by hour of day, kW (24 values): the charger's power in each hour
        it charges.
    """

    heating_kw: float
    cooling_kw: float
    water_kw: float
    charging_kw: np.ndarray

    @property
    def winter_kw(self) -> float:
        """Highest hour of the winter design day: heating all day, water heating, charging."""
        return float(np.max(self.heating_kw + self.water_kw + self.charging_kw))

    @property
    def summer_kw(self) -> float:
        """Highest hour of the summer design day: cooling in the afternoon, water, charging."""
        hours = np.arange(24)
        start, end = int(peak_setting("cooling_peak_start_hour")), int(peak_setting("cooling_peak_end_hour"))
        cooling = np.where((hours >= start) & (hours < end), self.cooling_kw, 0.0)
        return float(np.max(cooling + self.water_kw + self.charging_kw))

    @property
    def highest_kw(self) -> float:
        """The larger of the two design days, kW."""
        return max(self.winter_kw, self.summer_kw)


def design_day_demand(spec: HomeEnergySpec, heating_design_f: float, cooling_design_f: float | None,
                      cooling_load_btuh: float) -> DesignDayDemand:
    """The big electric loads of one state of a home on its design days.

    Heating: the load UA x (balance - design temperature) at the design temperature: a heat
    pump's input at its capacity and COP there (a single-speed compressor at full capacity, a
    variable-speed one at the load) plus its electric backup for the shortfall; resistance heat
    at the load; a furnace's blower. Cooling: a single-speed unit runs at its rated
    capacity (``cooling_load_btuh`` when unknown), a variable-speed unit at the cooling load,
    each at an EER2 of ``eer2_per_seer2`` x SEER2. Water heating: a heat pump water heater's
    compressor or a resistance element. Charging: each electric car's charger at its power in the
    hours of its daily charging window.

    Parameters
    ----------
    spec : HomeEnergySpec
        The home in one state.
    heating_design_f : float
        99 % heating design temperature, F.
    cooling_design_f : float or None
        1 % cooling design temperature, F (None: no cooling demand is counted).
    cooling_load_btuh : float
        Total design cooling load of the home, Btu/h.

    Returns
    -------
    DesignDayDemand
        The loads' demands, kW.

    References
    ----------
    DOE 10 CFR 430 Subpart B Appendix M1 (capacity and COP at the rating points, EER2 at 95 F);
    ASHRAE Handbook - Fundamentals, ch. 14 (design dry bulbs); values in
    ``data/peak_demand.csv``.
    """
    heating_kw = 0.0
    h = spec.heating
    if h is not None and spec.ua_btuh_f > 0:
        load = spec.ua_btuh_f * max(spec.heating_balance_f - heating_design_f, 0.0)
        t = np.array([heating_design_f])
        if isinstance(h, HeatPumpSpec) and load > 0:
            cap = float(hp_capacity_btuh(h, t)[0])
            # a single-speed compressor draws its full power whenever it runs
            delivered = cap if h.cycling_cd > 0 else min(load, cap)
            heating_kw = delivered / float(hp_cop(h, t)[0]) / btu_per_kwh() if cap > 0 else 0.0
            if h.backup == "resistance":
                heating_kw += max(load - cap, 0.0) / btu_per_kwh()
        else:
            heating_kw = float(heating_hourly(h, t, np.array([load])).electric_kwh[0])
    cooling_kw = 0.0
    if spec.cooling is not None and cooling_design_f is not None and cooling_load_btuh > 0:
        cap = spec.cooling.capacity_btuh or cooling_load_btuh
        delivered = min(cooling_load_btuh, cap) if spec.cooling.variable_speed else cap
        eer2 = spec.cooling.eer2 or spec.cooling.seer2 * peak_setting("eer2_per_seer2")
        cooling_kw = delivered / (eer2 * 1000.0)  # EER2 in Btu/Wh: Btu/h / EER2 = W
    water_kw = 0.0
    w = spec.water_heater
    if w is not None and w.fuel == "electricity":
        water_kw = peak_setting("hpwh_compressor_kw" if w.kind == "heat_pump" else "resistance_element_kw")
    charging = np.zeros(24)
    for v in spec.vehicles:
        if v.fuel == "electricity":  # the charger at full power in every hour it charges
            charging = charging + np.where(daily_charging_kw(v) > 0, v.charger_kw, 0.0)
    return DesignDayDemand(heating_kw, cooling_kw, water_kw, charging)


def velander_peak_kw(annual_kwh: float) -> float:
    """A single home's peak demand estimated from its yearly use: k1 E + k2 sqrt(E).

    Parameters
    ----------
    annual_kwh : float
        Yearly electricity use, kWh.

    Returns
    -------
    float
        Estimated peak demand, kW.

    References
    ----------
    Velander, S. (1952), the distribution-planning formula P = k1 E + k2 sqrt(E) for customers
    known only by their yearly energy; coefficients for single-family homes from memory
    (``data/peak_demand.csv``).
    """
    e = max(annual_kwh, 0.0)
    return peak_setting("velander_k1") * e + peak_setting("velander_k2") * math.sqrt(e)

