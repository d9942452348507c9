"""Electrical loads, the dwelling, the service and energy management, as frozen dataclasses.

Loads are given in volt-amperes at their nameplate (``va``); the service-side calculations in
:mod:`homeplan.electrical.nec220` apply the NEC demand factors. Builders read nameplate defaults
from ``homeplan/electrical/data/nameplates.csv`` (every row has a ``source``).

References
----------
NFPA 70 (NEC) 2020/2023: 210.11(C) (two small-appliance circuits and one laundry circuit),
220.82/220.83 (load categories), 230.79(C) (one-family service at least 100 A),
220.70 (2023) and 750.30 (energy management systems), 422.13 (water heaters continuous).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from homeplan.electrical import tables
from homeplan.electrical.errors import ElectricalInputError

__all__ = [
    "CATEGORIES",
    "HVAC_CATEGORIES",
    "LOAD_VOLTS",
    "SERVICE_VOLTS",
    "Dwelling",
    "Ems",
    "Load",
    "Service",
    "heat_pump_loads",
    "nameplate_load",
]

CATEGORIES: tuple[str, ...] = (
    "general_lighting",
    "small_appliance",
    "laundry",
    "appliance",
    "range",
    "dryer",
    "water_heater",
    "heating",
    "cooling",
    "heat_pump_compressor",
    "supplemental_heat",
    "thermal_storage",
    "ev_charger",
    "motor",
    "other",
)
"""Load categories. ``heating`` is resistance space heat (central or room units)."""

HVAC_CATEGORIES: frozenset[str] = frozenset(
    {"heating", "cooling", "heat_pump_compressor", "supplemental_heat", "thermal_storage"}
)
LOAD_VOLTS: tuple[int, ...] = (120, 208, 240)
SERVICE_VOLTS: tuple[int, ...] = (240, 208)


def _finite_nonneg(fieldname: str, value: float, hint: str) -> None:
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise ElectricalInputError(fieldname, f"must be a number, got {value!r}; {hint}")
    if not math.isfinite(value) or value < 0:
        raise ElectricalInputError(fieldname, f"must be a finite number >= 0, got {value!r}; {hint}")


@dataclass(frozen=True)
class Load:
    """One electrical load at its nameplate rating.

    Attributes
    ----------
    name : str
        Label shown in the breakdown.
    va : float
        Nameplate volt-amperes, VA (volts x amps; for motors and heat pumps use the nameplate
        rated-load or MCA current x volts).
    category : str
        One of :data:`CATEGORIES`.
    volts : int
        Load voltage, V: 120, 208 or 240.
    continuous : bool
        Runs 3 h or more at full current (EV chargers 625.42, water heaters 422.13).
    interlocked : bool
        For ``supplemental_heat``: locked out while the heat pump compressor runs
        (220.82(C)); for other loads informational.
    ems_controlled : bool
        Counted inside an energy management system group (220.70/750.30).
    ems_eligible : bool
        May be put under an energy management system by the remedy search.
    existing : bool
        Already installed (False for a proposed new load; decides 220.83 (A) vs (B)).
    heating_units : int
        Number of separately controlled space-heating units (``heating`` only).
    source : str
        Where the nameplate number came from.

    Raises
    ------
    ElectricalInputError
        If the name is empty, ``va`` is not a finite number >= 0, or the category, voltage or
        number of heating units is invalid.

    References
    ----------
    NEC 2020/2023 220.82(B)-(C), 220.83, 422.13, 625.42, 750.30.
    """

    name: str
    va: float
    category: str
    volts: int = 240
    continuous: bool = False
    interlocked: bool = False
    ems_controlled: bool = False
    ems_eligible: bool = False
    existing: bool = True
    heating_units: int = 1
    source: str = ""

    def __post_init__(self) -> None:
        if not isinstance(self.name, str) or not self.name.strip():
            raise ElectricalInputError("name", "a load needs a non-empty name")
        _finite_nonneg(
            f"load '{self.name}'.va", self.va, "enter the nameplate rating in VA (volts x amps)"
        )
        if self.category not in CATEGORIES:
            raise ElectricalInputError(
                f"load '{self.name}'.category",
                f"unknown category {self.category!r}; use one of {list(CATEGORIES)}",
            )
        if self.volts not in LOAD_VOLTS:
            raise ElectricalInputError(
                f"load '{self.name}'.volts",
                f"unknown voltage {self.volts!r}; residential loads are {list(LOAD_VOLTS)} V",
            )
        if not isinstance(self.heating_units, int) or self.heating_units < 1:
            raise ElectricalInputError(
                f"load '{self.name}'.heating_units",
                f"must be a whole number >= 1, got {self.heating_units!r}",
            )

    @property
    def amps(self) -> float:
        """Nameplate current at the load's voltage."""
        return self.va / self.volts


@dataclass(frozen=True)
class Dwelling:
    """The dwelling's general-load inputs.

    Attributes
    ----------
    floor_area_ft2 : float
        Living area, ft2.
    small_appliance_circuits : int
        Number of 20 A small-appliance circuits (at least 2).
    laundry_circuits : int
        Number of laundry circuits (at least 1).

    Raises
    ------
    ElectricalInputError
        If the area is not > 0 ft2 or a circuit count is below its minimum.

    References
    ----------
    NEC 2020/2023 210.11(C)(1)-(2): at least two 20 A small-appliance circuits and one laundry
    circuit; 220.82(B)(1)-(2), 220.83.
    """

    floor_area_ft2: float
    small_appliance_circuits: int = 2
    laundry_circuits: int = 1

    def __post_init__(self) -> None:
        _finite_nonneg("floor_area_ft2", self.floor_area_ft2, "enter the living area in ft2")
        if self.floor_area_ft2 <= 0:
            raise ElectricalInputError("floor_area_ft2", "must be > 0; enter the living area in ft2")
        if not isinstance(self.small_appliance_circuits, int) or self.small_appliance_circuits < 2:
            raise ElectricalInputError(
                "small_appliance_circuits",
                f"must be a whole number >= 2 (NEC 210.11(C)(1)), got {self.small_appliance_circuits!r}",
            )
        if not isinstance(self.laundry_circuits, int) or self.laundry_circuits < 1:
            raise ElectricalInputError(
                "laundry_circuits",
                f"must be a whole number >= 1 (NEC 210.11(C)(2)), got {self.laundry_circuits!r}",
            )


@dataclass(frozen=True)
class Service:
    """The electrical service and main panel.

    ``service_amps`` is the service rating; ``main_breaker_amps`` defaults to it and may be lower
    (a derated main); ``busbar_amps`` defaults to the main breaker. The load calculation is
    compared with the smaller of the service rating and the main breaker (:attr:`limit_amps`).

    Attributes
    ----------
    service_amps : float
        Service rating, A.
    busbar_amps : float or None
        Panel busbar rating, A; None takes the main breaker rating.
    main_breaker_amps : float or None
        Main breaker rating, A; None takes the service rating.
    volts : int
        Service voltage, V: 240 (120/240 V) or 208.

    Raises
    ------
    ElectricalInputError
        If a rating is not > 0 A, the main is above the service rating, the busbar is below the
        main, or the voltage is unknown.

    References
    ----------
    NEC 2020/2023 230.79(C), 705.12(B) (busbar), 240.6(A).
    """

    service_amps: float
    busbar_amps: float | None = None
    main_breaker_amps: float | None = None
    volts: int = 240

    def __post_init__(self) -> None:
        _finite_nonneg("service_amps", self.service_amps, "enter the service rating in A")
        if self.service_amps <= 0:
            raise ElectricalInputError("service_amps", "must be > 0; enter the service rating in A")
        main = self.service_amps if self.main_breaker_amps is None else self.main_breaker_amps
        _finite_nonneg("main_breaker_amps", main, "enter the main breaker rating in A")
        if main <= 0:
            raise ElectricalInputError("main_breaker_amps", "must be > 0")
        bus = main if self.busbar_amps is None else self.busbar_amps
        _finite_nonneg("busbar_amps", bus, "enter the panel busbar rating from its label in A")
        object.__setattr__(self, "main_breaker_amps", main)
        object.__setattr__(self, "busbar_amps", bus)
        if main > self.service_amps:
            raise ElectricalInputError(
                "main_breaker_amps",
                f"main breaker {main:g} A is larger than the service rating {self.service_amps:g} A; "
                "enter the service rating (usually the main breaker size) or check the main",
            )
        if bus < main:
            raise ElectricalInputError(
                "busbar_amps",
                f"busbar {bus:g} A is smaller than the main breaker {main:g} A; the panel label "
                "gives the busbar rating - check it (a main larger than the bus is a hazard)",
            )
        if self.volts not in SERVICE_VOLTS:
            raise ElectricalInputError(
                "volts", f"unknown service voltage {self.volts!r}; use 240 (120/240 V) or 208"
            )

    @property
    def limit_amps(self) -> float:
        """Ampacity the calculated load must stay within: min(service, main breaker)."""
        assert self.main_breaker_amps is not None
        return min(self.service_amps, self.main_breaker_amps)


@dataclass(frozen=True)
class Ems:
    """An energy management system limiting the ``ems_controlled`` loads to a setpoint.

    The setpoint is the counted load (continuous) in place of the managed loads.

    Attributes
    ----------
    setpoint_va : float
        Protected maximum setpoint, VA.
    name : str
        Label shown in the breakdown.

    Raises
    ------
    ElectricalInputError
        If the setpoint is not a finite value > 0 VA.

    References
    ----------
    NEC 2023 220.70 and 750.30 (setpoint used as the load; settings protected from the user,
    750.30(C)); NEC 2020 750.30.
    """

    setpoint_va: float
    name: str = "Energy management system"

    def __post_init__(self) -> None:
        _finite_nonneg("ems.setpoint_va", self.setpoint_va, "enter the EMS maximum setpoint")
        if self.setpoint_va <= 0:
            raise ElectricalInputError("ems.setpoint_va", "must be > 0 (the protected setpoint)")

    @classmethod
    def from_amps(cls, setpoint_amps: float, volts: int = 240, name: str = "Energy management system") -> Ems:
        """EMS with a setpoint given in amperes at ``volts``.

        Parameters
        ----------
        setpoint_amps : float
            Setpoint, A.
        volts : int
            Voltage, V.
        name : str
            Label shown in the breakdown.

        Returns
        -------
        Ems
            The system, setpoint in VA = amps x volts.

        Raises
        ------
        ElectricalInputError
            If the setpoint is not a finite value > 0.
        """
        _finite_nonneg("ems.setpoint_amps", setpoint_amps, "enter the EMS setpoint in A")
        return cls(setpoint_va=setpoint_amps * volts, name=name)


def nameplate_load(key: str, *, name: str | None = None, existing: bool = True, **overrides: object) -> Load:
    """A :class:`Load` from a row of ``nameplates.csv`` (``key`` column), with optional overrides.

    Parameters
    ----------
    key : str
        Row key of ``nameplates.csv``, e.g. ``heat_pump_compressor_2_5t``.
    name : str or None
        Label of the load; None takes the row's name.
    existing : bool
        True if the load is already installed.
    **overrides : object
        :class:`Load` fields to replace, e.g. ``va`` in VA.

    Returns
    -------
    Load
        The load, VA at nameplate.

    Raises
    ------
    ElectricalInputError
        If the key is unknown or an override is invalid.

    References
    ----------
    Row sources in ``homeplan/electrical/data/nameplates.csv`` (NEC Informative Annex D examples;
    other rows marked from memory).
    """
    table = tables.nameplates()
    if key not in table:
        raise ElectricalInputError("nameplate key", f"unknown key {key!r}; use one of {sorted(table)}")
    row = table[key]
    values: dict[str, object] = {
        "name": name or row["name"],
        "va": float(row["va"]),
        "category": row["category"],
        "volts": int(row["volts"]),
        "continuous": row["continuous"] == "true",
        "ems_eligible": row["ems_eligible"] == "true",
        "existing": existing,
        "source": row["source"],
    }
    values.update(overrides)
    return Load(**values)  # type: ignore[arg-type]


def heat_pump_loads(
    *,
    compressor_va: float | None = None,
    strips_kw: float = 0.0,
    interlocked: bool = False,
    existing: bool = False,
    name: str = "Heat pump",
) -> tuple[Load, ...]:
    """A heat pump as a compressor load plus optional supplemental strips.

    ``compressor_va`` defaults to the Annex D D2(c) 24 A at 240 V row; ``interlocked`` means the
    strips are locked out while the compressor runs.

    Parameters
    ----------
    compressor_va : float or None
        Compressor nameplate, VA; None takes the Annex D row.
    strips_kw : float
        Supplemental heat strips, kW (0 for none).
    interlocked : bool
        True if the strips are locked out while the compressor runs.
    existing : bool
        True if the heat pump is already installed.
    name : str
        Label prefix of the loads.

    Returns
    -------
    tuple of Load
        The compressor, then the strips when ``strips_kw`` > 0 (VA).

    Raises
    ------
    ElectricalInputError
        If ``strips_kw`` is not a finite number >= 0, or ``compressor_va`` is invalid.

    References
    ----------
    NEC 2020/2023 220.82(C) (heat pump compressor + supplemental heat), Article 440 (nameplate).
    """
    _finite_nonneg("strips_kw", strips_kw, "enter the supplemental heat in kW (0 for none)")
    comp = nameplate_load("heat_pump_compressor_2_5t", name=f"{name} compressor", existing=existing)
    if compressor_va is not None:
        comp = replace(comp, va=compressor_va, source="entered")
    out = [comp]
    if strips_kw > 0:
        out.append(
            Load(
                name=f"{name} strips {strips_kw:g} kW" + (" (interlocked)" if interlocked else ""),
                va=strips_kw * 1000.0,
                category="supplemental_heat",
                interlocked=interlocked,
                existing=existing,
                source="entered",
            )
        )
    return tuple(out)
