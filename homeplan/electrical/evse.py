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


def _check_amps(fieldname: str, amps: float) -> None:
    if isinstance(amps, bool) or not isinstance(amps, int | float) or not math.isfinite(amps) or amps <= 0:
        raise ElectricalInputError(fieldname, f"must be a finite current > 0 A, got {amps!r}")


def next_standard_ocpd_amps(min_amps: float) -> int:
    """Smallest standard breaker/fuse rating >= ``min_amps``.

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

    References
    ----------
    NEC 2020/2023 625.41, 625.42 (continuous), 240.6(A).
    """
    _check_amps("charger_amps", charger_amps)
    return next_standard_ocpd_amps(charger_amps * tables.factor("continuous_factor", edition))


def rated_charger_amps(charger_amps: float, restricted_amps: float | None = None) -> float:
    """The charger current to use: the restricted (locked) setting when given.

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
        return asdict(self)


def evse_circuit(charger_amps: float, *, restricted_amps: float | None = None, volts: int = 240,
                 edition: int = 2023) -> EvseCircuit:
    """Charger current -> rated current, 125 % current, minimum breaker, and calc VA.

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

    References
    ----------
    NEC 2023 220.70, 750.30; NEC 2020 750.30; 215.3/230.42 continuous loads.
    """
    _check_amps("setpoint_amps", setpoint_amps)
    f = tables.factor("continuous_factor", edition) if continuous_at_125 else 1.0
    return setpoint_amps * volts * f
