"""EV charger (EVSE) branch circuits, the charger's load in a service calculation, and energy
management.

References
----------
NEC 2020/2023 625.41 (overcurrent protection at >= 125 % of the maximum load), 625.42 (EV charging
is a continuous load; 2023 625.42(B): a restricted, locked setting may be used as the rating),
240.6(A) standard ratings, NEC 2023 220.57 (standard method: larger of 7,200 VA or nameplate),
NEC 2023 220.70 and 750.30 (energy management: the setpoint is the counted load).
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass
from typing import Any

from homeplan.electrical import tables
from homeplan.electrical.errors import ElectricalInputError
from homeplan.electrical.loads import LOAD_VOLTS, Load

__all__ = [
    "EvseCircuit",
    "ems_counted_va",
    "ev_charger_load",
    "evse_breaker_amps",
    "evse_circuit",
    "evse_load_va",
    "next_standard_ocpd_amps",
    "rated_charger_amps",
]


def _check_amps(fieldname: str, amps: float) -> None:
    if isinstance(amps, bool) or not isinstance(amps, int | float) or not math.isfinite(amps) or amps <= 0:
        raise ElectricalInputError(fieldname, f"must be a finite current > 0 A, got {amps!r}")


def next_standard_ocpd_amps(min_amps: float) -> int:
    """Smallest standard breaker/fuse rating >= ``min_amps``.

    Parameters
    ----------
    min_amps : float
        Smallest acceptable rating, A.

    Returns
    -------
    int
        Standard rating, A.

    Raises
    ------
    ElectricalInputError
        If ``min_amps`` is not a finite current > 0 A or is above the largest standard size.

    References
    ----------
    NEC 2020/2023 240.6(A) (table ``standard_ocpd.csv``).
    """
    _check_amps("min_amps", min_amps)
    for size in tables.standard_ocpd_amps():
        if size >= min_amps - 1e-9:
            return size
    raise ElectricalInputError("min_amps", f"{min_amps:g} A is above the largest standard size in 240.6(A)")


def evse_breaker_amps(charger_amps: float, edition: int = 2023) -> int:
    """Minimum branch-circuit breaker for a charger: 125 % of its current, next standard size.

    Parameters
    ----------
    charger_amps : float
        Charger current, A.
    edition : int
        NEC edition year.

    Returns
    -------
    int
        Breaker rating, A.

    Raises
    ------
    ElectricalInputError
        If the current is not a finite value > 0 A or the edition is not supported.

    References
    ----------
    NEC 2020/2023 625.41, 625.42 (continuous), 240.6(A).
    """
    _check_amps("charger_amps", charger_amps)
    return next_standard_ocpd_amps(charger_amps * tables.factor("continuous_factor", edition))


def rated_charger_amps(charger_amps: float, restricted_amps: float | None = None) -> float:
    """The charger current to use: the restricted (locked) setting when given.

    Parameters
    ----------
    charger_amps : float
        Charger maximum current, A.
    restricted_amps : float or None
        Restricted (locked) setting, A; None when the charger is not restricted.

    Returns
    -------
    float
        Current to use, A.

    Raises
    ------
    ElectricalInputError
        If a current is not finite and > 0 A, or the setting is above the charger's maximum.

    References
    ----------
    NEC 2023 625.42(B) (restricted access setting).
    """
    _check_amps("charger_amps", charger_amps)
    if restricted_amps is None:
        return float(charger_amps)
    _check_amps("restricted_amps", restricted_amps)
    if restricted_amps > charger_amps:
        raise ElectricalInputError(
            "restricted_amps",
            f"restricted setting {restricted_amps:g} A is above the charger's maximum {charger_amps:g} A",
        )
    return float(restricted_amps)


def ev_charger_load(
    charger_amps: float,
    *,
    name: str = "EV charger",
    volts: int = 240,
    restricted_amps: float | None = None,
    existing: bool = False,
) -> Load:
    """A Level 2 EV charger as a continuous, EMS-eligible :class:`Load` (VA = amps x volts).

    Parameters
    ----------
    charger_amps : float
        Charger maximum current, A.
    name : str
        Label of the load.
    volts : int
        Circuit voltage, V (120, 208 or 240).
    restricted_amps : float or None
        Restricted (locked) setting, A; None when not restricted.
    existing : bool
        True if the charger is already installed.

    Returns
    -------
    Load
        The charger, VA = rated current x volts.

    Raises
    ------
    ElectricalInputError
        If the voltage is unknown or a current is invalid.

    References
    ----------
    NEC 2020/2023 625.42; 2023 625.42(B) restricted setting.
    """
    if volts not in LOAD_VOLTS:
        raise ElectricalInputError("volts", f"unknown voltage {volts!r}; use one of {list(LOAD_VOLTS)}")
    amps = rated_charger_amps(charger_amps, restricted_amps)
    label = f"{name} {amps:g} A" + (" (restricted setting)" if restricted_amps is not None else "")
    return Load(
        name=label,
        va=amps * volts,
        category="ev_charger",
        volts=volts,
        continuous=True,
        ems_eligible=True,
        existing=existing,
        source="charger current x volts",
    )


def evse_load_va(charger_amps: float, *, method: str = "optional", volts: int = 240,
                 restricted_amps: float | None = None, edition: int = 2023) -> float:
    """Charger VA for a service calculation.

    ``method="optional"`` (220.82/220.83): nameplate. ``method="standard"``: from the 2023 edition
    the larger of 7,200 VA or nameplate (220.57); 2020 nameplate.

    Parameters
    ----------
    charger_amps : float
        Charger maximum current, A.
    method : str
        ``optional`` or ``standard``.
    volts : int
        Circuit voltage, V.
    restricted_amps : float or None
        Restricted (locked) setting, A; None when not restricted.
    edition : int
        NEC edition year.

    Returns
    -------
    float
        Charger load for the calculation, VA.

    Raises
    ------
    ElectricalInputError
        If the method or voltage is unknown or a current is invalid.

    References
    ----------
    NEC 2023 220.57; NEC 2020/2023 220.82, 220.83; 625.42(B).
    """
    if method not in ("optional", "standard"):
        raise ElectricalInputError("method", f"unknown method {method!r}; use 'optional' or 'standard'")
    va = ev_charger_load(charger_amps, volts=volts, restricted_amps=restricted_amps).va
    if method == "standard":
        va = max(va, tables.factor("evse_standard_min_va", edition))
    return va


@dataclass(frozen=True)
class EvseCircuit:
    """Branch circuit for one charger (plain data).

    Attributes
    ----------
    charger_amps : float
        Charger maximum current, A.
    rated_amps : float
        Current used: the restricted setting when given, A.
    continuous_amps : float
        125 % of the rated current, A.
    breaker_amps : int
        Minimum standard breaker, A.
    load_va : float
        Load in the optional calculations, VA.
    standard_method_va : float
        Load in the standard calculation, VA.
    sections : tuple of str
        NEC sections applied.

    References
    ----------
    NEC 2020/2023 625.41, 625.42, 240.6(A); NEC 2023 220.57.
    """

    charger_amps: float
    rated_amps: float
    continuous_amps: float
    breaker_amps: int
    load_va: float
    standard_method_va: float
    sections: tuple[str, ...]

    def to_dict(self) -> dict[str, Any]:
        """The fields as a JSON-ready dict (A, VA).

        Returns
        -------
        dict of str to Any
            One entry per field.
        """
        return asdict(self)


def evse_circuit(charger_amps: float, *, restricted_amps: float | None = None, volts: int = 240,
                 edition: int = 2023) -> EvseCircuit:
    """Charger current -> rated current, 125 % current, minimum breaker, and calc VA.

    Parameters
    ----------
    charger_amps : float
        Charger maximum current, A.
    restricted_amps : float or None
        Restricted (locked) setting, A; None when not restricted.
    volts : int
        Circuit voltage, V.
    edition : int
        NEC edition year.

    Returns
    -------
    EvseCircuit
        Currents (A), breaker (A) and loads (VA) of the circuit.

    Raises
    ------
    ElectricalInputError
        If a current, the voltage or the edition is invalid.

    References
    ----------
    NEC 2020/2023 625.41, 625.42, 240.6(A); NEC 2023 220.57.
    """
    rated = rated_charger_amps(charger_amps, restricted_amps)
    f = tables.factor("continuous_factor", edition)
    return EvseCircuit(
        charger_amps=float(charger_amps),
        rated_amps=rated,
        continuous_amps=rated * f,
        breaker_amps=evse_breaker_amps(rated, edition),
        load_va=evse_load_va(charger_amps, volts=volts, restricted_amps=restricted_amps, edition=edition),
        standard_method_va=evse_load_va(
            charger_amps, method="standard", volts=volts, restricted_amps=restricted_amps, edition=edition
        ),
        sections=(
            tables.section("evse_circuit", edition),
            tables.section("evse_continuous", edition),
            tables.section("standard_ocpd", edition),
            tables.section("evse_standard", edition),
        ),
    )


def ems_counted_va(setpoint_amps: float, volts: int = 240, *, continuous_at_125: bool = False,
                   edition: int = 2023) -> float:
    """VA counted for an energy management system: its setpoint (a continuous load).

    ``continuous_at_125`` applies 125 % (feeder/service conductor sizing, or 220.87 if the
    inspector asks for it); the optional-method calculations count the setpoint at 100 %.

    Parameters
    ----------
    setpoint_amps : float
        EMS setpoint, A.
    volts : int
        Voltage, V.
    continuous_at_125 : bool
        Count the setpoint at 125 %.
    edition : int
        NEC edition year.

    Returns
    -------
    float
        Counted load, VA.

    Raises
    ------
    ElectricalInputError
        If the setpoint is not a finite current > 0 A.

    References
    ----------
    NEC 2023 220.70, 750.30; NEC 2020 750.30; 215.3/230.42 continuous loads.
    """
    _check_amps("setpoint_amps", setpoint_amps)
    f = tables.factor("continuous_factor", edition) if continuous_at_125 else 1.0
    return setpoint_amps * volts * f
