"""Load-side connection of solar and battery inverters to a panel busbar, NEC 705.12(B).

Rules: 100 % rule (125 % of inverter output current + main OCPD <= busbar), 120 % rule
(<= 1.2 x busbar, source breaker at the opposite end from the main), sum-of-breakers rule (all
breakers except the main <= busbar). Also: the largest inverter output the panel accepts, what a
derated main breaker changes (the main must still carry the calculated load) and a supply-side
connection (705.11: no busbar limit; output current <= service conductor ampacity).

References
----------
NEC 2023 705.12(B) (705.12(B)(3) in 2020), 705.11 supply-side connections, 705.13 power control
systems, 230.79(C), 240.6(A).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import asdict, dataclass
from typing import Any

from homeplan.electrical import tables
from homeplan.electrical.errors import ElectricalInputError
from homeplan.electrical.loads import Service
from homeplan.electrical.nec220 import CAUTION

__all__ = [
    "RULES",
    "BackfeedResult",
    "DeratedMainOption",
    "backfeed_check",
    "derated_main_options",
    "max_inverter_amps",
]

RULES: tuple[str, ...] = ("100", "120", "sum_of_breakers", "supply_side")


@dataclass(frozen=True)
class BackfeedResult:
    """Result of a 705.12 / 705.11 check (plain data).

    Attributes
    ----------
    rule : str
        Rule applied, one of :data:`RULES`.
    section : str
        NEC section of the rule.
    busbar_amps : float
        Busbar rating, A.
    main_breaker_amps : float
        Main breaker rating, A.
    inverter_output_amps : float
        Total inverter output current (or the power control limit), A.
    counted_amps : float
        Output counted against the busbar (125 % for load-side rules), A.
    max_inverter_amps : float
        Largest inverter output current allowed, A.
    max_inverter_kw : float
        The same at the service voltage, kW.
    headroom_amps : float
        Allowed minus actual output current, A.
    fits : bool
        True if the output is within the limit.
    explanation : str
        The rule in plain words.
    caution : str
        The planning caution.

    References
    ----------
    NEC 2023 705.12(B) (2020 705.12(B)(3)), 705.11.
    """

    rule: str
    section: str
    busbar_amps: float
    main_breaker_amps: float
    inverter_output_amps: float
    counted_amps: float
    max_inverter_amps: float
    max_inverter_kw: float
    headroom_amps: float
    fits: bool
    explanation: str
    caution: str

    def to_dict(self) -> dict[str, Any]:
        """The fields as a JSON-ready dict (A, kW).

        Returns
        -------
        dict of str to Any
            One entry per field.
        """
        return asdict(self)


def _amps_list(inverter_output_amps: float | Sequence[float]) -> list[float]:
    vals = [inverter_output_amps] if isinstance(inverter_output_amps, int | float) else list(inverter_output_amps)
    for v in vals:
        if isinstance(v, bool) or not isinstance(v, int | float) or not math.isfinite(v) or v < 0:
            raise ElectricalInputError(
                "inverter_output_amps", f"inverter output currents must be finite and >= 0 A, got {v!r}"
            )
    return [float(v) for v in vals]


def max_inverter_amps(
    busbar_amps: float,
    main_breaker_amps: float,
    *,
    rule: str = "120",
    load_breakers_amps: Sequence[float] = (),
    service_amps: float | None = None,
    edition: int = 2023,
) -> float:
    """Largest total inverter (solar + battery) output current the connection accepts.

    ``"100"``: (bus - main) / 1.25. ``"120"``: (1.2 x bus - main) / 1.25. ``"sum_of_breakers"``:
    the largest standard breaker fitting in bus - sum(load breakers), / 1.25.
    ``"supply_side"``: the service conductor ampacity (``service_amps``; default the main).

    Parameters
    ----------
    busbar_amps : float
        Busbar rating, A.
    main_breaker_amps : float
        Main breaker rating, A.
    rule : str
        One of :data:`RULES`.
    load_breakers_amps : sequence of float
        Ratings of every load breaker in the panel, A (``sum_of_breakers`` only).
    service_amps : float or None
        Service rating, A; None takes the main breaker rating.
    edition : int
        NEC edition year.

    Returns
    -------
    float
        Largest total inverter output current, A.

    Raises
    ------
    ElectricalInputError
        If the edition or rule is unknown, the ratings are inconsistent, or the load breakers
        are missing for ``sum_of_breakers``.

    References
    ----------
    NEC 2023 705.12(B) (2020 705.12(B)(3)); 705.11; 240.6(A).
    """
    tables.check_edition(edition)
    Service(service_amps=service_amps or main_breaker_amps, busbar_amps=busbar_amps,
            main_breaker_amps=main_breaker_amps)  # validates bus >= main etc.
    if rule not in RULES:
        raise ElectricalInputError("rule", f"unknown rule {rule!r}; use one of {list(RULES)}")
    f_src = tables.factor("backfeed_source_factor", edition)
    if rule == "100":
        return max(0.0, (busbar_amps - main_breaker_amps) / f_src)
    if rule == "120":
        f_bus = tables.factor("backfeed_busbar_factor_120", edition)
        return max(0.0, (f_bus * busbar_amps - main_breaker_amps) / f_src)
    if rule == "sum_of_breakers":
        breakers = _amps_list(list(load_breakers_amps))
        if not breakers:
            raise ElectricalInputError(
                "load_breakers_amps", "the sum-of-breakers rule needs the list of load breaker ratings in the panel"
            )
        room = busbar_amps - sum(breakers)
        fitting = [s for s in tables.standard_ocpd_amps() if s <= room + 1e-9]
        return fitting[-1] / f_src if fitting else 0.0
    return float(service_amps if service_amps is not None else main_breaker_amps)


def backfeed_check(
    service: Service,
    inverter_output_amps: float | Sequence[float],
    *,
    rule: str = "120",
    load_breakers_amps: Sequence[float] = (),
    pcs_limit_amps: float | None = None,
    edition: int = 2023,
) -> BackfeedResult:
    """Check solar/battery inverter output against the panel (all inverters, batteries included).

    ``pcs_limit_amps``: a listed power control system (705.13) limiting the output current; the
    limit is used in place of the inverters' total.

    Parameters
    ----------
    service : Service
        The service and main panel.
    inverter_output_amps : float or sequence of float
        Output current of each inverter, A.
    rule : str
        One of :data:`RULES`.
    load_breakers_amps : sequence of float
        Ratings of every load breaker in the panel, A (``sum_of_breakers`` only).
    pcs_limit_amps : float or None
        Output limit of a listed power control system, A.
    edition : int
        NEC edition year.

    Returns
    -------
    BackfeedResult
        The check, currents in A.

    Raises
    ------
    ElectricalInputError
        If the rule or edition is unknown or a current is not finite and >= 0 A.

    References
    ----------
    NEC 2023 705.12(B) (2020 705.12(B)(3)), 705.11, 705.13.
    """
    if rule not in RULES:
        raise ElectricalInputError("rule", f"unknown rule {rule!r}; use one of {list(RULES)}")
    total = sum(_amps_list(inverter_output_amps))
    if pcs_limit_amps is not None:
        _amps_list(pcs_limit_amps)
        total = min(total, float(pcs_limit_amps))
    assert service.busbar_amps is not None and service.main_breaker_amps is not None
    limit = max_inverter_amps(
        service.busbar_amps, service.main_breaker_amps, rule=rule,
        load_breakers_amps=load_breakers_amps, service_amps=service.service_amps, edition=edition,
    )
    f_src = tables.factor("backfeed_source_factor", edition)
    if rule == "supply_side":
        sec = tables.section("backfeed_supply_side", edition)
        counted = total
        expl = f"supply-side connection: output {total:g} A <= service conductors {limit:g} A; busbar not involved"
    else:
        sec = tables.section("backfeed_load_side", edition)
        counted = total * f_src
        names = {"100": "100 % rule", "120": "120 % rule (source breaker at the opposite end from the main)",
                 "sum_of_breakers": "sum-of-breakers rule"}
        expl = f"{names[rule]}: busbar {service.busbar_amps:g} A, main {service.main_breaker_amps:g} A"
    if pcs_limit_amps is not None:
        expl += f"; power control system limit {pcs_limit_amps:g} A ({tables.section('power_control', edition)})"
    return BackfeedResult(
        rule=rule,
        section=sec,
        busbar_amps=service.busbar_amps,
        main_breaker_amps=service.main_breaker_amps,
        inverter_output_amps=total,
        counted_amps=counted,
        max_inverter_amps=limit,
        max_inverter_kw=limit * service.volts / 1000.0,
        headroom_amps=limit - total,
        fits=total <= limit + 1e-9,
        explanation=expl,
        caution=CAUTION,
    )


@dataclass(frozen=True)
class DeratedMainOption:
    """A smaller main breaker in the same panel and what it allows.

    Attributes
    ----------
    main_breaker_amps : int
        Derated main breaker rating, A.
    max_inverter_amps : float
        Largest inverter output current it allows, A.
    max_inverter_kw : float
        The same at the service voltage, kW.
    backfeed_fits : bool
        True if the planned inverter output fits.
    load_fits : bool
        True if the calculated load still fits under the smaller main.

    References
    ----------
    NEC 2023 705.12(B); 230.79(C).
    """

    main_breaker_amps: int
    max_inverter_amps: float
    max_inverter_kw: float
    backfeed_fits: bool
    load_fits: bool

    def to_dict(self) -> dict[str, Any]:
        """The fields as a JSON-ready dict (A, kW).

        Returns
        -------
        dict of str to Any
            One entry per field.
        """
        return asdict(self)


def derated_main_options(
    service: Service,
    calculated_load_amps: float,
    inverter_output_amps: float | Sequence[float] = 0.0,
    *,
    rule: str = "120",
    edition: int = 2023,
) -> list[DeratedMainOption]:
    """Standard main breaker sizes below the present main (not below the 100 A one-family
    minimum), largest first, with the inverter output each allows and whether the calculated load
    still fits under it.

    Parameters
    ----------
    service : Service
        The service and main panel.
    calculated_load_amps : float
        Calculated load of the home, A.
    inverter_output_amps : float or sequence of float
        Output current of each inverter, A.
    rule : str
        ``100`` or ``120``.
    edition : int
        NEC edition year.

    Returns
    -------
    list of DeratedMainOption
        One option per standard size, largest first.

    Raises
    ------
    ElectricalInputError
        If the rule is not ``100`` or ``120``, or a current is invalid.

    References
    ----------
    NEC 2023 705.12(B); 240.6(A); 230.79(C) (one-family service >= 100 A).
    """
    if rule not in ("100", "120"):
        raise ElectricalInputError("rule", "derating the main only matters for the '100' and '120' rules")
    if not math.isfinite(calculated_load_amps) or calculated_load_amps < 0:
        raise ElectricalInputError("calculated_load_amps", f"must be >= 0 A, got {calculated_load_amps!r}")
    total = sum(_amps_list(inverter_output_amps))
    floor = tables.factor("min_service_amps_one_family", edition)
    assert service.main_breaker_amps is not None and service.busbar_amps is not None
    out = []
    for size in sorted(tables.standard_ocpd_amps(), reverse=True):
        if size >= service.main_breaker_amps or size < floor:
            continue
        limit = max_inverter_amps(service.busbar_amps, size, rule=rule, service_amps=service.service_amps,
                                  edition=edition)
        out.append(
            DeratedMainOption(
                main_breaker_amps=size,
                max_inverter_amps=limit,
                max_inverter_kw=limit * service.volts / 1000.0,
                backfeed_fits=total <= limit + 1e-9,
                load_fits=calculated_load_amps <= min(size, service.service_amps) + 1e-9,
            )
        )
    return out
