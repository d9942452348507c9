"""Space heating and cooling: furnaces/boilers (AFUE), resistance, heat pumps, central AC (SEER2).

Hourly loads come from the degree-hour model: load_btuh = UA * max(T_balance - T_out, 0).
Heat pumps are described by their ratings at 47, 17 and 5 F; the typical ratings of each class
are in ``data/heat_pumps.csv``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from homeplan.energy._data import heat_pump_class, heat_pump_classes
from homeplan.energy.units import btu_per_kwh, btu_per_unit

__all__ = [
    "COMBUSTION_FUELS",
    "CoolingSpec",
    "FurnaceSpec",
    "HeatPumpSpec",
    "HeatingHourly",
    "HeatingSpec",
    "ResistanceHeatSpec",
    "balance_point_f",
    "cooling_kwh",
    "cooling_load_btuh",
    "heat_pump_hourly",
    "heating_hourly",
    "heating_load_btuh",
    "hp_capacity_btuh",
    "hp_cop",
    "size_heat_pump",
]

#: Fuels a combustion heater or dual-fuel backup can burn.
COMBUSTION_FUELS = ("natural_gas", "propane", "heating_oil")


@dataclass(frozen=True)
class FurnaceSpec:
    """Furnace or boiler burning ``fuel`` at ``afue``.

    Attributes
    ----------
    fuel : str
        ``natural_gas``, ``propane`` or ``heating_oil``.
    afue : float
        Annual fuel utilisation efficiency, fraction (0.3-1.0).
    aux_kwh_per_therm_out : float
        Blower or circulator electricity per therm of delivered heat, kWh/therm (0 to ignore).
    kind : str
        ``furnace`` or ``boiler`` (labels only).

    References
    ----------
    DOE 10 CFR 430 Subpart B Appendix N (AFUE test procedure).
    """

    fuel: str = "natural_gas"
    afue: float = 0.80
    aux_kwh_per_therm_out: float = 0.0
    kind: str = "furnace"

    def __post_init__(self) -> None:
        if self.fuel not in COMBUSTION_FUELS:
            raise ValueError(f"furnace fuel must be one of {COMBUSTION_FUELS}, got {self.fuel!r}")
        if not 0.3 <= self.afue <= 1.0:
            raise ValueError("afue must be between 0.3 and 1.0")


@dataclass(frozen=True)
class ResistanceHeatSpec:
    """Electric resistance heat (baseboard, electric furnace).

    Attributes
    ----------
    efficiency : float
        Delivered heat per unit of electricity, fraction (1.0 at the point of use).
    """

    efficiency: float = 1.0


@dataclass(frozen=True)
class HeatPumpSpec:
    """Air-source heat pump rated at 47/17/5 F, with backup and cut-out.

    Attributes
    ----------
    capacity_47_btuh, capacity_17_btuh, capacity_5_btuh : float
        Heating capacity at 47, 17 and 5 F outdoor, Btu/h.
    cop_47, cop_17, cop_5 : float
        Coefficient of performance at the same points, dimensionless.
    cutout_f : float
        Outdoor temperature below which the compressor stops, F.
    backup : str
        ``resistance``, ``none`` or a combustion fuel (dual fuel, burned at ``backup_afue``).
    backup_afue : float
        Efficiency of a combustion backup, fraction.
    switchover_f : float or None
        Dual fuel: below this outdoor temperature the backup carries the whole load, F.
    cycling_cd : float
        Part-load degradation coefficient, dimensionless (0 for inverter units).
    seer2 : float
        Cooling seasonal efficiency, Btu/Wh.

    References
    ----------
    DOE 10 CFR 430 Subpart B Appendix M1 (AHRI 210/240-2023) rating points H1 47 F, H3 17 F, H4 5 F.
    ENERGY STAR cold-climate criterion: COP >= 1.75 and capacity >= 70 % of 47 F rating at 5 F.
    """

    capacity_47_btuh: float
    capacity_17_btuh: float
    capacity_5_btuh: float
    cop_47: float
    cop_17: float
    cop_5: float
    cutout_f: float = -13.0
    backup: str = "resistance"
    backup_afue: float = 1.0
    switchover_f: float | None = None
    cycling_cd: float = 0.0
    seer2: float = 16.0

    def __post_init__(self) -> None:
        if self.backup not in ("resistance", "none", *COMBUSTION_FUELS):
            raise ValueError(f"unknown heat pump backup {self.backup!r}")
        if min(self.cop_47, self.cop_17, self.cop_5) <= 0:
            raise ValueError("COPs must be positive")

    @classmethod
    def typical(cls, kind: str, capacity_47_btuh: float, **kw: float | str | None) -> HeatPumpSpec:
        """A typical unit of a class and size.

        Parameters
        ----------
        kind : str
            Heat pump class in ``data/heat_pumps.csv``: ``single_stage``, ``cold_climate`` or
            ``ductless``.
        capacity_47_btuh : float
            Nominal heating capacity at 47 F, Btu/h.
        **kw
            Fields that replace the class's values (``backup``, ``cutout_f``, ``seer2``...).

        Returns
        -------
        HeatPumpSpec
            Capacities at 17 and 5 F as the class's fractions of ``capacity_47_btuh``; COPs,
            cut-out (F), cycling coefficient and SEER2 (Btu/Wh) from the table.

        References
        ----------
        The sources of each class's values are in the table's ``source`` column.
        """
        if kind not in heat_pump_classes():
            raise ValueError(f"kind must be one of {', '.join(heat_pump_classes())}")
        e = heat_pump_class(kind)
        c = capacity_47_btuh
        kw.setdefault("cutout_f", e["cutout_f"])
        kw.setdefault("cycling_cd", e["cycling_cd"])
        kw.setdefault("seer2", e["seer2"])
        return cls(c, e["cap_17_frac"] * c, e["cap_5_frac"] * c, e["cop_47"], e["cop_17"], e["cop_5"],
                   **kw)  # type: ignore[arg-type]

    @classmethod
    def cold_climate(cls, capacity_47_btuh: float, **kw: float | str | None) -> HeatPumpSpec:
        """Typical cold-climate variable-speed unit (see :meth:`typical`)."""
        return cls.typical("cold_climate", capacity_47_btuh, **kw)

    @classmethod
    def single_stage(cls, capacity_47_btuh: float, **kw: float | str | None) -> HeatPumpSpec:
        """Typical single-stage unit (see :meth:`typical`)."""
        return cls.typical("single_stage", capacity_47_btuh, **kw)


HeatingSpec = FurnaceSpec | ResistanceHeatSpec | HeatPumpSpec


@dataclass(frozen=True)
class CoolingSpec:
    """Central air conditioner (or the cooling side of a heat pump) rated by SEER2.

    Attributes
    ----------
    seer2 : float
        Seasonal energy efficiency ratio 2, Btu/Wh.
    capacity_btuh : float or None
        Rated cooling capacity, Btu/h (None: unknown); used for the peak demand, not the energy.
    variable_speed : bool
        The compressor modulates (inverter) instead of running at full capacity or not at all.
    eer2 : float or None
        Full-load efficiency at 95 F outdoors, Btu/Wh (None: unknown, a typical ratio to SEER2 is
        used); used for the peak demand, not the energy.

    References
    ----------
    DOE 10 CFR 430 Subpart B Appendix M1 (SEER2; EER2 at the 95 F full-load test); RESNET
    MINHERS Addendum 71 (SEER2 = 0.95 SEER).
    """

    seer2: float = 13.4
    capacity_btuh: float | None = None
    variable_speed: bool = False
    eer2: float | None = None


def heating_load_btuh(ua_btuh_f: float, temp_f: np.ndarray, balance_f: float = 65.0) -> np.ndarray:
    """Hourly heating load = UA * max(T_balance - T_out, 0).

    Parameters
    ----------
    ua_btuh_f : float
        Heat-loss coefficient of the house, Btu/h-F.
    temp_f : numpy.ndarray
        Outdoor dry-bulb temperature, F (one value per hour).
    balance_f : float
        Balance-point temperature, F.

    Returns
    -------
    numpy.ndarray
        Heating load, Btu/h (one value per hour).

    References
    ----------
    ASHRAE Handbook - Fundamentals, ch. 19 (variable-base degree-hour method).
    """
    return ua_btuh_f * np.maximum(balance_f - temp_f, 0.0)


def cooling_load_btuh(ua_btuh_f: float, temp_f: np.ndarray, balance_f: float = 65.0) -> np.ndarray:
    """Hourly sensible cooling load = UA * max(T_out - T_balance, 0) (degree-hour method).

    Parameters
    ----------
    ua_btuh_f : float
        Heat-loss coefficient of the house, Btu/h-F.
    temp_f : numpy.ndarray
        Outdoor dry-bulb temperature, F (one value per hour).
    balance_f : float
        Balance-point temperature, F.

    Returns
    -------
    numpy.ndarray
        Sensible cooling load, Btu/h (one value per hour).

    References
    ----------
    ASHRAE Handbook - Fundamentals, ch. 19 (degree-hour method; no solar or latent gains).
    """
    return ua_btuh_f * np.maximum(temp_f - balance_f, 0.0)


def _piecewise(temp_f: np.ndarray, v5: float, v17: float, v47: float) -> np.ndarray:
    """Linear through (5, v5), (17, v17), (47, v47); extrapolated with the end slopes."""
    t = np.asarray(temp_f, float)
    low = v5 + (t - 5.0) * (v17 - v5) / 12.0
    high = v17 + (t - 17.0) * (v47 - v17) / 30.0
    return np.where(t < 17.0, low, high)


def hp_capacity_btuh(spec: HeatPumpSpec, temp_f: np.ndarray) -> np.ndarray:
    """Maximum heating capacity at outdoor ``temp_f``; zero below the cut-out temperature.

    Parameters
    ----------
    spec : HeatPumpSpec
        The heat pump.
    temp_f : numpy.ndarray
        Outdoor dry-bulb temperature, F.

    Returns
    -------
    numpy.ndarray
        Capacity, Btu/h: linear through the 5, 17 and 47 F ratings, with the 5-17 F slope below
        5 F, and 0 below the cut-out.

    References
    ----------
    DOE 10 CFR 430 Subpart B Appendix M1 (AHRI 210/240-2023): capacity linear in outdoor
    temperature between the rating points in the HSPF2 bin calculation (from memory).
    """
    cap = np.maximum(_piecewise(temp_f, spec.capacity_5_btuh, spec.capacity_17_btuh,
                                spec.capacity_47_btuh), 0.0)
    return np.where(np.asarray(temp_f) < spec.cutout_f, 0.0, cap)


def hp_cop(spec: HeatPumpSpec, temp_f: np.ndarray) -> np.ndarray:
    """Steady-state heating COP at outdoor ``temp_f`` (piecewise linear, clamped at >= 1).

    Parameters
    ----------
    spec : HeatPumpSpec
        The heat pump.
    temp_f : numpy.ndarray
        Outdoor dry-bulb temperature, F.

    Returns
    -------
    numpy.ndarray
        COP, dimensionless, at least 1.

    References
    ----------
    DOE 10 CFR 430 Subpart B Appendix M1 (AHRI 210/240-2023) rating points; linear between them
    as in the HSPF2 bin calculation (from memory).
    """
    return np.maximum(_piecewise(temp_f, spec.cop_5, spec.cop_17, spec.cop_47), 1.0)


def balance_point_f(spec: HeatPumpSpec, ua_btuh_f: float, indoor_balance_f: float = 65.0) -> float:
    """Thermal balance point T*: UA (T_bal - T*) = Cap(T*). Below it backup heat is needed.

    Parameters
    ----------
    spec : HeatPumpSpec
        The heat pump.
    ua_btuh_f : float
        Heat-loss coefficient of the house, Btu/h-F.
    indoor_balance_f : float
        Balance point of the house's heating load, F.

    Returns
    -------
    float
        The thermal balance point, F (found on a 0.01 F grid from -60 F).

    References
    ----------
    ASHRAE Handbook - HVAC Systems and Equipment, ch. 49 (heat pump balance point).
    """
    grid = np.arange(-60.0, indoor_balance_f + 0.005, 0.01)
    short = heating_load_btuh(ua_btuh_f, grid, indoor_balance_f) - hp_capacity_btuh(spec, grid)
    ok = short <= 0
    if not ok.any():
        return float(indoor_balance_f)
    return float(grid[np.argmax(ok)])


@dataclass(frozen=True, eq=False)
class HeatingHourly:
    """Hourly heating energy by carrier.

    Attributes
    ----------
    electric_kwh : numpy.ndarray
        Electricity each hour, kWh.
    fuel_units : numpy.ndarray
        Fuel each hour in its trade unit (therm, gallon).
    fuel : str or None
        The fuel burned, if any.
    backup_btuh : numpy.ndarray
        Heat supplied by the backup each hour, Btu/h.
    delivered_btuh : numpy.ndarray
        Heat delivered each hour, Btu/h.
    """

    electric_kwh: np.ndarray
    fuel_units: np.ndarray
    fuel: str | None
    backup_btuh: np.ndarray
    delivered_btuh: np.ndarray

    @property
    def backup_hours(self) -> int:
        """Hours per year in which backup heat runs."""
        return int(np.count_nonzero(self.backup_btuh > 1e-9))


def heat_pump_hourly(spec: HeatPumpSpec, temp_f: np.ndarray, load_btuh: np.ndarray) -> HeatingHourly:
    """Hourly heat-pump and backup energy for a heating load.

    Q_hp = min(Load, Cap(T)); backup = Load - Q_hp; kWh = Q_hp / (COP PLF 3412.14) + resistance
    backup / 3412.14, or dual-fuel backup / (AFUE Btu/unit). PLF = 1 - Cd (1 - PLR).

    Parameters
    ----------
    spec : HeatPumpSpec
        The heat pump.
    temp_f : numpy.ndarray
        Outdoor dry-bulb temperature, F (one value per hour).
    load_btuh : numpy.ndarray
        Heating load, Btu/h (one value per hour).

    Returns
    -------
    HeatingHourly
        Electricity (kWh), backup fuel (trade units) and heat delivered each hour. Without a
        backup, load above the unit's capacity is left unmet.

    References
    ----------
    AHRI 210/240-2023 (DOE 10 CFR 430 Subpart B Appendix M1): part-load factor
    PLF = 1 - Cd (1 - PLR); 1 kWh = 3,412.14 Btu (US EIA, "Units and calculators explained").
    """
    kbtu = btu_per_kwh()
    cap = hp_capacity_btuh(spec, temp_f)
    if spec.switchover_f is not None:
        cap = np.where(np.asarray(temp_f) < spec.switchover_f, 0.0, cap)
    q_hp = np.minimum(load_btuh, cap)
    backup = load_btuh - q_hp
    cop = hp_cop(spec, temp_f)
    if spec.cycling_cd > 0:
        plr = np.divide(q_hp, cap, out=np.zeros_like(q_hp), where=cap > 0)
        cop = cop * (1.0 - spec.cycling_cd * (1.0 - plr))
        cop = np.maximum(cop, 0.5)
    elec = q_hp / (cop * kbtu)
    fuel_units = np.zeros_like(load_btuh)
    fuel: str | None = None
    if spec.backup == "resistance":
        elec = elec + backup / kbtu
    elif spec.backup in COMBUSTION_FUELS:
        fuel = spec.backup
        fuel_units = backup / (spec.backup_afue * btu_per_unit(fuel))
    else:  # no backup: unmet load
        backup = np.zeros_like(backup)
    return HeatingHourly(elec, fuel_units, fuel, backup, q_hp + backup)


def heating_hourly(spec: HeatingSpec, temp_f: np.ndarray, load_btuh: np.ndarray) -> HeatingHourly:
    """Hourly energy of any heating system for a heating load.

    Parameters
    ----------
    spec : FurnaceSpec, ResistanceHeatSpec or HeatPumpSpec
        The heating system.
    temp_f : numpy.ndarray
        Outdoor dry-bulb temperature, F (one value per hour).
    load_btuh : numpy.ndarray
        Heating load, Btu/h (one value per hour).

    Returns
    -------
    HeatingHourly
        Electricity (kWh) and fuel (trade units) each hour.

    Raises
    ------
    TypeError
        For a spec of another type.

    References
    ----------
    DOE 10 CFR 430 Appendix N (AFUE): fuel = load / (AFUE * Btu/unit);
    resistance: kWh = load / 3412.14; heat pumps: :func:`heat_pump_hourly`.
    """
    zero = np.zeros_like(load_btuh)
    if isinstance(spec, HeatPumpSpec):
        return heat_pump_hourly(spec, temp_f, load_btuh)
    if isinstance(spec, ResistanceHeatSpec):
        return HeatingHourly(load_btuh / (spec.efficiency * btu_per_kwh()), zero, None, zero, load_btuh)
    if isinstance(spec, FurnaceSpec):
        units = load_btuh / (spec.afue * btu_per_unit(spec.fuel))
        aux = load_btuh / 1e5 * spec.aux_kwh_per_therm_out
        return HeatingHourly(aux, units, spec.fuel, zero, load_btuh)
    raise TypeError(f"unknown heating spec {type(spec).__name__}")


def cooling_kwh(seer2: float, load_btuh: np.ndarray) -> np.ndarray:
    """Cooling electricity: kWh = load (Btu) / (SEER2 * 1000) (seasonal average efficiency).

    Parameters
    ----------
    seer2 : float
        Seasonal energy efficiency ratio 2, Btu/Wh.
    load_btuh : numpy.ndarray
        Cooling load, Btu/h (one value per hour: Btu in that hour).

    Returns
    -------
    numpy.ndarray
        Electricity, kWh per hour.

    References
    ----------
    DOE 10 CFR 430 Appendix M1: SEER2 in Btu per Wh; cooling COP = SEER / 3.412.
    """
    return load_btuh / (seer2 * 1000.0)


def size_heat_pump(design_load_btuh: float, design_temp_f: float, kind: str = "cold_climate",
                   coverage: float = 1.0, step_btuh: float = 6000.0, *,
                   size_at_f: float | None = None, cooling_load_btuh: float = 0.0,
                   min_btuh: float | None = None, max_btuh: float | None = None,
                   balance_f: float = 65.0, **kw: float | str | None) -> HeatPumpSpec:
    """Smallest unit of a class (in ``step_btuh`` steps of 47 F capacity) that carries the load.

    The capacity at the sizing temperature must cover ``coverage`` x the heating load there:
    at the design temperature by default (below the cut-out, at the cut-out); with
    ``size_at_f``, at the warmer of it and the design temperature, the load scaled linearly
    from the design load (degree-hour model) - a single-stage unit sized at 17 F leans on backup
    heat below it. The unit is at least as large as ``cooling_load_btuh`` and is kept between
    ``min_btuh`` and ``max_btuh``.

    Parameters
    ----------
    design_load_btuh : float
        Heating load at the design temperature, Btu/h.
    design_temp_f : float
        Heating design temperature (99 % dry bulb), F.
    kind : str
        Heat pump class (see :meth:`HeatPumpSpec.typical`).
    coverage : float
        Share of the load at the sizing temperature the unit must carry, fraction.
    step_btuh : float
        Size step of the 47 F capacity, Btu/h (6,000 = half a ton).
    size_at_f : float, optional
        Warmest temperature at which the unit must carry the load alone, F.
    cooling_load_btuh : float
        Cooling the unit must also supply, Btu/h.
    min_btuh, max_btuh : float, optional
        Smallest and largest 47 F capacity offered, Btu/h.
    balance_f : float
        Balance point of the degree-hour load model, F.
    **kw
        Passed to :meth:`HeatPumpSpec.typical` (``backup``, ``seer2``...).

    Returns
    -------
    HeatPumpSpec
        The unit, its 47 F capacity a whole number of steps.

    References
    ----------
    ACCA Manual S (equipment selection at the design condition); NEEP cold-climate air-source heat
    pump sizing guidance (size to the heating load at design, from memory); the degree-hour load
    model of ASHRAE Handbook - Fundamentals, ch. 19.
    """
    unit = HeatPumpSpec.typical(kind, 1.0, **kw)
    t = design_temp_f if size_at_f is None else max(design_temp_f, size_at_f)
    load = design_load_btuh * (balance_f - t) / max(balance_f - design_temp_f, 1.0)
    cap_at_t = float(hp_capacity_btuh(unit, np.array([t]))[0])
    if cap_at_t <= 0:
        # sizing temperature below the cut-out: size to the cut-out temperature instead
        cap_at_t = float(hp_capacity_btuh(unit, np.array([unit.cutout_f]))[0])
    need = max(coverage * load / max(cap_at_t, 1e-6), cooling_load_btuh)
    nominal = max(step_btuh, math.ceil(need / step_btuh - 1e-9) * step_btuh)
    if min_btuh is not None:
        nominal = max(nominal, min_btuh)
    if max_btuh is not None:
        nominal = min(nominal, max_btuh)
    return HeatPumpSpec.typical(kind, nominal, **kw)
