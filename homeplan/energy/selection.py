"""Design cooling load and heat pump selection from the design loads (ACCA Manual S).

A heat pump is chosen from the catalog's sizes for the home's loads, never for the size of the
equipment it replaces. Its rated cooling capacity must sit in the Manual S band around the
total cooling load; in a heating-dominated climate the band's top is raised so that the unit
can carry more of the heating load, and a variable-speed unit - which can turn down for mild
weather and summer - may be sized to the heating load as long as its lowest speed still fits
under the cooling load. What the unit cannot carry at the heating design temperature is left
for backup heat.

References
----------
ACCA Manual S (residential equipment selection; bands from memory, values in
``data/design_loads.csv`` and ``data/heat_pumps.csv``); ACCA Manual J (8th ed.) cooling design
conditions and internal gains (from memory); DOE 10 CFR 430 Subpart B Appendix M1 rating points
(capacity at the design temperature via :func:`homeplan.energy.heating.hp_capacity_btuh`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from homeplan.energy._data import heat_pump_class, table_value
from homeplan.energy.heating import HeatPumpSpec, hp_capacity_btuh

__all__ = [
    "CoolingLoad",
    "HeatPumpSelection",
    "design_cooling_load",
    "design_setting",
    "select_heat_pump",
    "with_size",
]

BTUH_PER_TON = 12000.0


def design_setting(key: str) -> float:
    """A value of ``data/design_loads.csv`` (see :func:`homeplan.energy._data.table_value`)."""
    return table_value("design_loads", key)


@dataclass(frozen=True)
class CoolingLoad:
    """Design cooling load of a home, Btu/h.

    Attributes
    ----------
    sensible_btuh : float
        Conduction and air leakage, people, appliances and sun through the windows, Btu/h.
    total_btuh : float
        Sensible plus latent (moisture) load, Btu/h.
    """

    sensible_btuh: float
    total_btuh: float


def design_cooling_load(ua_btuh_f: float, cooling_design_f: float, floor_area_ft2: float,
                        occupants: float) -> CoolingLoad:
    """Block cooling load at the 1 % cooling design temperature.

    Sensible = UA x (T_1% - T_indoor) + occupants x gain per person + appliance gain + glazing
    area x solar gain per ft2 of glass (glazing as a share of the floor area); total = sensible /
    sensible heat ratio.

    Parameters
    ----------
    ua_btuh_f : float
        Heat-loss coefficient of the house (calibrated), Btu/h-F.
    cooling_design_f : float
        1 % cooling design dry-bulb temperature, F.
    floor_area_ft2 : float
        Conditioned floor area, ft2.
    occupants : float
        Number of occupants.

    Returns
    -------
    CoolingLoad
        Sensible and total design cooling load, Btu/h.

    References
    ----------
    ACCA Manual J (8th ed.): 75 F indoor, 230 Btu/h sensible per occupant, 1,200 Btu/h for
    appliances (from memory); ASHRAE Handbook - Fundamentals, ch. 14 (1 % design dry bulb);
    window share, solar gain per ft2 of glass and sensible heat ratio are common practice, no
    source (``data/design_loads.csv``).
    """
    conduction = ua_btuh_f * max(cooling_design_f - design_setting("cooling_indoor_f"), 0.0)
    internal = occupants * design_setting("occupant_sensible_btuh") + design_setting("appliance_sensible_btuh")
    solar = floor_area_ft2 * design_setting("glazing_floor_frac") * design_setting("glazing_solar_btuh_ft2")
    sensible = conduction + internal + solar
    return CoolingLoad(sensible, sensible / design_setting("sensible_heat_ratio"))


@dataclass(frozen=True)
class HeatPumpSelection:
    """The unit chosen for a home's loads, with the figures an installer checks.

    Attributes
    ----------
    hp_class : str
        Heat pump class (``single_stage``, ``cold_climate``, ``ductless``).
    nominal_btuh : float
        Nominal capacity (rated heating at 47 F, taken as the rated cooling capacity), Btu/h.
    heating_load_btuh : float
        Design heating load, Btu/h.
    cooling_load_btuh : float
        Total design cooling load, Btu/h.
    capacity_at_design_btuh : float
        Heating capacity at the heating design temperature, Btu/h (0 below the cut-out).
    heating_design_f : float
        Heating design temperature, F.
    heating_dominated : bool
        The climate is heating-dominated by Manual S's degree-day test.
    rule : str
        Which rule decided the size, in words.
    """

    hp_class: str
    nominal_btuh: float
    heating_load_btuh: float
    cooling_load_btuh: float
    capacity_at_design_btuh: float
    heating_design_f: float
    heating_dominated: bool
    rule: str

    @property
    def nominal_tons(self) -> float:
        """Nominal capacity in tons (12,000 Btu/h each)."""
        return self.nominal_btuh / BTUH_PER_TON

    @property
    def cooling_ratio(self) -> float | None:
        """Nominal cooling capacity over the total cooling load (None without a cooling load)."""
        return self.nominal_btuh / self.cooling_load_btuh if self.cooling_load_btuh > 0 else None

    @property
    def heating_ratio(self) -> float | None:
        """Capacity at the design temperature over the heating load (None without one)."""
        return self.capacity_at_design_btuh / self.heating_load_btuh if self.heating_load_btuh > 0 else None

    @property
    def shortfall_btuh(self) -> float:
        """Heating load the unit cannot carry at the design temperature (for backup heat), Btu/h."""
        return max(self.heating_load_btuh - self.capacity_at_design_btuh, 0.0)


def _capacity_at(hp_class: str, nominal_btuh: float, temp_f: float) -> float:
    return float(hp_capacity_btuh(HeatPumpSpec.typical(hp_class, nominal_btuh), np.array([temp_f]))[0])


def select_heat_pump(heating_load_btuh: float, cooling_load_btuh: float, heating_design_f: float,
                     hp_class: str, hdd65: float, cdd65: float, *, min_btuh: float = 18000.0,
                     max_btuh: float = 60000.0, step_btuh: float = 6000.0) -> HeatPumpSelection:
    """The catalog size of a heat pump class for a home's design loads (ACCA Manual S).

    Sizes run from ``min_btuh`` to ``max_btuh`` in ``step_btuh`` steps. The rated cooling
    capacity must be at least ``cooling_min_frac`` x the cooling load and at most the class's
    ``cooling_max_frac`` x the load (``heating_dominated_cooling_max_frac`` when the climate is
    heating-dominated and that is higher). Within the band the smallest size that carries the
    heating load at the design temperature is taken, else the largest (backup heat covers the
    rest). A variable-speed class in a heating-dominated climate may instead be sized to the
    heating load, up to the size whose lowest speed (``min_capacity_frac``) still fits under the
    cooling load. Without a cooling load the heating load decides. When no size fits the band,
    the size nearest to it is taken.

    Parameters
    ----------
    heating_load_btuh : float
        Design heating load at ``heating_design_f``, Btu/h.
    cooling_load_btuh : float
        Total design cooling load, Btu/h (0: none known).
    heating_design_f : float
        99 % heating design temperature, F.
    hp_class : str
        Heat pump class in ``data/heat_pumps.csv``.
    hdd65, cdd65 : float
        Heating and cooling degree-days base 65 F of the climate, F-days.
    min_btuh, max_btuh, step_btuh : float
        The sizes offered, Btu/h.

    Returns
    -------
    HeatPumpSelection
        The size and the figures behind it.

    References
    ----------
    ACCA Manual S (equipment selection: cooling capacity band around the total cooling load;
    heating-dominated climates; variable-capacity heat pumps sized for heating), from memory;
    the bands are in ``data/design_loads.csv`` and ``data/heat_pumps.csv``.
    """
    ratings = heat_pump_class(hp_class)
    sizes = np.arange(min_btuh, max_btuh + 0.5, step_btuh)
    caps = np.array([_capacity_at(hp_class, s, heating_design_f) for s in sizes])
    heating_dominated = cdd65 <= 0 or hdd65 / cdd65 >= design_setting("heating_dominated_hdd_cdd")
    variable = ratings["min_capacity_frac"] < 1.0

    def pick(ok: np.ndarray, rule: str) -> HeatPumpSelection:
        idx = np.flatnonzero(ok)
        covering = [i for i in idx if caps[i] >= heating_load_btuh]
        i = covering[0] if covering else idx[-1]
        why = rule + ("" if covering else "; backup heat covers the rest of the heating load")
        return HeatPumpSelection(hp_class, float(sizes[i]), heating_load_btuh, cooling_load_btuh,
                                 float(caps[i]), heating_design_f, heating_dominated, why)

    if cooling_load_btuh <= 0:
        return pick(np.ones(sizes.size, bool), "sized to the heating load (no cooling load)")
    lo = design_setting("cooling_min_frac") * cooling_load_btuh
    top = ratings["cooling_max_frac"]
    if heating_dominated:
        top = max(top, design_setting("heating_dominated_cooling_max_frac"))
    hi = top * cooling_load_btuh
    if variable and heating_dominated:
        ok = (sizes >= lo) & (sizes * ratings["min_capacity_frac"] <= cooling_load_btuh)
        ok |= (sizes >= lo) & (sizes <= hi)
        if ok.any():
            return pick(ok, "variable-speed unit sized toward the heating load (heating-dominated "
                            "climate), its lowest speed within the cooling load")
    band = (sizes >= lo) & (sizes <= hi)
    if band.any():
        return pick(band, f"Manual S band: cooling capacity {design_setting('cooling_min_frac') * 100:.0f}"
                          f"-{top * 100:.0f} % of the cooling load")
    nearest = int(np.argmin(np.where(sizes < lo, lo - sizes, sizes - hi)))
    ok = np.zeros(sizes.size, bool)
    ok[nearest] = True
    return pick(ok, "the catalog size nearest to the cooling band")


def with_size(sel: HeatPumpSelection, nominal_btuh: float, rule: str) -> HeatPumpSelection:
    """The same loads with another nominal size (e.g. the one the household chose).

    Parameters
    ----------
    sel : HeatPumpSelection
        The selection for the home's loads.
    nominal_btuh : float
        The size to use, Btu/h.
    rule : str
        Why this size, in words.

    Returns
    -------
    HeatPumpSelection
        ``sel`` with the size and its capacity at the design temperature.
    """
    return HeatPumpSelection(sel.hp_class, nominal_btuh, sel.heating_load_btuh, sel.cooling_load_btuh,
                             _capacity_at(sel.hp_class, nominal_btuh, sel.heating_design_f),
                             sel.heating_design_f, sel.heating_dominated, rule)
