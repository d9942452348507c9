"""NEC Article 220 service load calculations for a one-family dwelling.

* :func:`nec220_83` - optional calculation for an existing dwelling, cases (A) and (B).
* :func:`nec220_82` - optional calculation for a new service (100 A or more).
* :func:`nec220_87` - existing load from a measured 12-month (or 30-day) peak demand.

Each returns a :class:`LoadCalcResult` with a breakdown table. All numbers are planning
estimates; a licensed electrician, a permit and the local inspector (AHJ) decide.

References
----------
NFPA 70 (NEC) 2020 and 2023 editions (2026 optional, unconfirmed factors): 220.82, 220.83, 220.87,
220.60 (noncoincident loads), 220.52, 220.14(J) (2020) / 220.41 (2023) general lighting,
220.70 (2023) / 750.30 energy management systems, 625.42 (EV charging continuous).
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import asdict, dataclass
from typing import Any

from homeplan.electrical import tables
from homeplan.electrical.errors import ElectricalInputError, MethodNotApplicableError
from homeplan.electrical.loads import HVAC_CATEGORIES, Dwelling, Ems, Load, Service

__all__ = [
    "CAUTION",
    "BreakdownRow",
    "LoadCalcResult",
    "MeasuredDemand",
    "added_load_demand_va",
    "nec220_82",
    "nec220_83",
    "nec220_87",
    "peak_kw_bound_from_hourly_kwh",
]

CAUTION = (
    "Planning estimate only, not a code load calculation of record. A licensed electrician must "
    "check the service and circuits; panel, service and circuit work needs a permit, and the local "
    "inspector (the authority having jurisdiction, AHJ) decides what is accepted."
)

_EPS = 1e-9


@dataclass(frozen=True)
class BreakdownRow:
    """One line of a load calculation.

    ``factor``/``counted_va`` are None for loads listed inside a group (the group's subtotal rows
    carry the factor), so the total is the sum of the non-None ``counted_va``.

    Attributes
    ----------
    load_name : str
        Load or subtotal label.
    va : float
        Nameplate or subtotal, VA.
    factor : float or None
        Demand factor applied, dimensionless (1.0 = 100 %).
    counted_va : float or None
        Amount counted in the total, VA.
    section : str
        NEC section applied.
    note : str
        Plain-words note.
    """

    load_name: str
    va: float
    factor: float | None
    counted_va: float | None
    section: str
    note: str = ""


@dataclass(frozen=True)
class LoadCalcResult:
    """Result of a service load calculation (plain data; :meth:`to_dict` for JSON).

    ``amps`` = ``total_va`` / ``volts``; ``service_amps`` is the smaller of the service rating
    and the main breaker; ``headroom_amps`` = ``service_amps`` - ``amps``.

    Attributes
    ----------
    method : str
        Title of the calculation.
    section : str
        NEC section of the method.
    edition : int
        NEC edition year.
    case : str
        ``A`` or ``B`` for 220.83, otherwise empty.
    rows : tuple of BreakdownRow
        The breakdown.
    total_va : float
        Calculated load, VA.
    volts : int
        Service voltage, V.
    amps : float
        Calculated load, A.
    service_amps : float
        Limit compared with, A.
    headroom_amps : float
        Limit minus load, A (negative = over).
    fits : bool
        True if the load is within the limit.
    caution : str
        The planning caution.
    notes : tuple of str
        Options chosen and other notes.

    References
    ----------
    NEC 2020/2023 220.82, 220.83, 220.87.
    """

    method: str
    section: str
    edition: int
    case: str
    rows: tuple[BreakdownRow, ...]
    total_va: float
    volts: int
    amps: float
    service_amps: float
    headroom_amps: float
    fits: bool
    caution: str
    notes: tuple[str, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready dict (rows as a list of dicts).

        Returns
        -------
        dict of str to Any
            One entry per field (VA, A).
        """
        out = asdict(self)
        out["rows"] = [asdict(r) for r in self.rows]
        out["notes"] = list(self.notes)
        return out


@dataclass(frozen=True)
class MeasuredDemand:
    """A measured maximum demand for NEC 220.87.

    ``peak_kw``: highest 15-minute average demand (kW, taken as kVA at unity power factor).
    ``period``: ``"12_months"`` or ``"30_days"`` (the exception; then ``seasonal_adjustment_va``
    must give, by measurement or calculation, the larger of heating or cooling and other seasonal
    loads not seen in the recording - 0 if truly none).
    ``basis``: ``"15min"`` (meter interval data) or ``"hourly_kwh_x4"`` (an upper bound from hourly
    data: an inspector's call, not code).

    Attributes
    ----------
    peak_kw : float
        Highest 15-minute average demand, kW.
    period : str
        ``12_months`` or ``30_days``.
    seasonal_adjustment_va : float or None
        Seasonal load not seen in a 30-day recording, VA.
    basis : str
        ``15min`` or ``hourly_kwh_x4``.

    Raises
    ------
    ElectricalInputError
        If the peak is not a finite number >= 0, the period or basis is unknown, or the
        seasonal adjustment is missing, negative or given for a 12-month period.

    References
    ----------
    NEC 2020/2023 220.87 and its exception.
    """

    peak_kw: float
    period: str = "12_months"
    seasonal_adjustment_va: float | None = None
    basis: str = "15min"

    def __post_init__(self) -> None:
        if not isinstance(self.peak_kw, int | float) or not math.isfinite(self.peak_kw) or self.peak_kw < 0:
            raise ElectricalInputError("peak_kw", f"must be a finite number >= 0 kW, got {self.peak_kw!r}")
        if self.period not in ("12_months", "30_days"):
            raise ElectricalInputError(
                "period", f"unknown period {self.period!r}; use '12_months' or '30_days' (220.87)"
            )
        if self.period == "30_days":
            adj = self.seasonal_adjustment_va
            if adj is None:
                raise ElectricalInputError(
                    "seasonal_adjustment_va",
                    "a 30-day recording must add the larger of the heating or cooling load (and "
                    "other seasonal loads) not seen in the recording (220.87 exception); enter it in "
                    "VA, or 0 if the recording already covers it",
                )
            if not math.isfinite(adj) or adj < 0:
                raise ElectricalInputError("seasonal_adjustment_va", f"must be >= 0 VA, got {adj!r}")
        elif self.seasonal_adjustment_va not in (None, 0, 0.0):
            raise ElectricalInputError(
                "seasonal_adjustment_va", "only used with period='30_days'; a 12-month peak covers all seasons"
            )
        if self.basis not in ("15min", "hourly_kwh_x4"):
            raise ElectricalInputError("basis", f"unknown basis {self.basis!r}; use '15min' or 'hourly_kwh_x4'")


def added_load_demand_va(load: Load, edition: int = 2023) -> float:
    """The demand of one new load as Article 220 counts it, before any continuous-load factor.

    A range or cooktop through Table 220.55 (one appliance: 80 % under 8.75 kW; 8 kW up to 12 kW;
    5 % more for each kW over 12, up to 27 kW); a dryer at 5,000 VA or its nameplate, whichever is
    larger (220.54); every other load at its nameplate.

    Parameters
    ----------
    load : Load
        The new load, VA at nameplate.
    edition : int
        NEC edition year.

    Returns
    -------
    float
        Its demand, VA.

    References
    ----------
    NEC 2023 Table 220.55 (Columns A, B, C and Note 1), 220.54.
    """
    va = float(load.va)
    if load.category == "range":
        kw = va / 1000.0
        if kw < tables.factor("range_column_c_min_kw", edition):
            return va * tables.factor("range_column_ab_single_factor", edition)
        over = max(0, math.floor(kw - 12.0 + 0.5)) if kw > 12.0 else 0  # each kW or major fraction
        return tables.factor("range_column_c_single_va", edition) * (
            1.0 + over * tables.factor("range_over_12kw_increase_pct", edition) / 100.0)
    if load.category == "dryer":
        return max(va, tables.factor("dryer_min_va", edition))
    return va


def peak_kw_bound_from_hourly_kwh(hourly_kwh: Iterable[float], edition: int = 2023) -> float:
    """Upper bound of the 15-minute peak from hourly kWh: max hourly kWh x 4.

    Not a code rule: some engineers use it when only hourly data exist; the inspector decides.

    Parameters
    ----------
    hourly_kwh : iterable of float
        Hourly energy readings, kWh.
    edition : int
        NEC edition year.

    Returns
    -------
    float
        Upper bound of the 15-minute peak demand, kW.

    Raises
    ------
    ElectricalInputError
        If there are no readings or a reading is not a finite number >= 0.

    References
    ----------
    Common practice, no source (an inspector's call on NEC 220.87 data, not code text); factor
    in ``code_factors.csv``.
    """
    values = [float(v) for v in hourly_kwh]
    if not values:
        raise ElectricalInputError("hourly_kwh", "no hourly readings given")
    if any(not math.isfinite(v) or v < 0 for v in values):
        raise ElectricalInputError("hourly_kwh", "hourly readings must be finite and >= 0 kWh")
    return max(values) * tables.factor("hourly_to_15min_bound_factor", edition)


# ---------------------------------------------------------------- helpers


def _check_loads(loads: Sequence[Load]) -> tuple[Load, ...]:
    out = tuple(loads)
    for ld in out:
        if not isinstance(ld, Load):
            raise ElectricalInputError("loads", f"expected Load objects, got {type(ld).__name__}")
    names = [ld.name for ld in out]
    dupes = sorted({n for n in names if names.count(n) > 1})
    if dupes:
        raise ElectricalInputError("loads", f"duplicate load names {dupes}; give each load a unique name")
    return out


def _general_items(dwelling: Dwelling, edition: int) -> list[tuple[str, float, str, str]]:
    per_ft2 = tables.factor("lighting_va_per_ft2", edition)
    per_circ = tables.factor("small_appliance_va_per_circuit", edition)
    sa = tables.section("small_appliance", edition)
    return [
        (
            "General lighting and receptacles",
            dwelling.floor_area_ft2 * per_ft2,
            tables.section("lighting", edition),
            f"{dwelling.floor_area_ft2:g} ft2 x {per_ft2:g} VA/ft2",
        ),
        (
            "Small-appliance circuits",
            dwelling.small_appliance_circuits * per_circ,
            sa,
            f"{dwelling.small_appliance_circuits} x {per_circ:g} VA",
        ),
        ("Laundry circuit", dwelling.laundry_circuits * per_circ, sa, f"{dwelling.laundry_circuits} x {per_circ:g} VA"),
    ]


def _split_ems(loads: tuple[Load, ...], ems: Ems | None) -> tuple[list[Load], list[Load], float]:
    """Return (unmanaged loads, managed loads, counted EMS VA)."""
    managed = [ld for ld in loads if ld.ems_controlled]
    rest = [ld for ld in loads if not ld.ems_controlled]
    if managed and ems is None:
        raise ElectricalInputError(
            "ems",
            f"loads {[m.name for m in managed]} are marked ems_controlled but no energy management "
            "system (Ems with a setpoint) was given; pass ems=Ems(...) or clear the flag",
        )
    if ems is not None and not managed:
        raise ElectricalInputError(
            "ems", "an energy management system was given but no load is marked ems_controlled=True"
        )
    counted = 0.0 if ems is None else min(ems.setpoint_va, sum(m.va for m in managed))
    return rest, managed, counted


def _ems_rows(managed: list[Load], ems: Ems | None, counted: float, factor: float, edition: int) -> list[BreakdownRow]:
    if ems is None:
        return []
    sec = tables.section("ems", edition)
    rows = [
        BreakdownRow(m.name, m.va, None, None, sec, f"managed by {ems.name}") for m in managed
    ]
    note = "setpoint counted as a continuous load in place of the managed loads"
    if counted < ems.setpoint_va:
        note = "setpoint above the managed loads' total; their nameplate total is counted"
    rows.append(BreakdownRow(f"{ems.name} setpoint", counted, factor, counted * factor, sec, note))
    return rows


_Item = tuple[Load, float, str]  # (load, factor, note)


def _hvac_sides(hvac: list[Load], mode: str, edition: int) -> tuple[list[_Item], list[_Item]]:
    """Heating-side and cooling-side items with factors.

    ``mode`` ``"full"``: every load at 100 % (220.83(B), 220.87 new loads); interlocked strips
    and compressor count as the larger of the two. ``"220.82"``: 220.82(C) factors.
    """
    comps = [ld for ld in hvac if ld.category == "heat_pump_compressor"]
    supps = [ld for ld in hvac if ld.category == "supplemental_heat"]
    heats = [ld for ld in hvac if ld.category == "heating"]
    stores = [ld for ld in hvac if ld.category == "thermal_storage"]
    cools = [ld for ld in hvac if ld.category == "cooling"]
    comp_va = sum(ld.va for ld in comps)
    supp_i = [ld for ld in supps if ld.interlocked]
    supp_n = [ld for ld in supps if not ld.interlocked]
    supp_i_va = sum(ld.va for ld in supp_i)
    units = sum(ld.heating_units for ld in heats)
    threshold = tables.factor("space_heat_units_threshold", edition)

    heat: list[_Item] = []
    if mode == "full":
        comp_off = bool(supp_i) and supp_i_va >= comp_va
        for ld in comps:
            heat.append((ld, 0.0, "interlocked strips larger; not coincident") if comp_off else (ld, 1.0, ""))
        for ld in supp_n:
            heat.append((ld, 1.0, "runs with the compressor"))
        for ld in supp_i:
            heat.append((ld, 1.0, "interlocked with the compressor") if comp_off else (ld, 0.0, "interlocked; compressor larger"))
        for ld in heats:
            heat.append((ld, 1.0, f"{units} separately controlled unit(s)"))
        for ld in stores:
            heat.append((ld, 1.0, "thermal storage"))
    else:
        f_supp = tables.factor("hp_supplemental_factor", edition)
        # Interlocked only: the compressor is not added to the strips (220.82(C)); the system
        # counts the larger of compressor (100 %) or strips (65 %), never less than either mode.
        interlocked_only = bool(supps) and not supp_n
        comp_wins = interlocked_only and comp_va > f_supp * supp_i_va
        for ld in comps:
            if not supps:
                heat.append((ld, 1.0, "heat pump without supplemental heat"))
            elif interlocked_only and not comp_wins:
                heat.append((ld, 0.0, "compressor interlocked off while supplemental heat runs; not added"))
            else:
                heat.append((ld, 1.0, "heat pump compressor"))
        for ld in supps:
            if comp_wins:
                heat.append((ld, 0.0, "interlocked; compressor larger than 65 % of the strips"))
            else:
                heat.append((ld, f_supp, "supplemental heat at 65 %"))
        f_heat = tables.factor(
            "space_heat_few_units_factor" if units < threshold else "space_heat_many_units_factor", edition
        )
        for ld in heats:
            heat.append((ld, f_heat, f"{units} separately controlled unit(s)"))
        for ld in stores:
            heat.append((ld, 1.0, "thermal storage at 100 %"))
    cool: list[_Item] = [(ld, 1.0, "air conditioning / cooling") for ld in cools]
    cool += [(ld, 1.0, "heat pump compressor cooling") for ld in comps]
    return heat, cool


def _pick_side(heat: list[_Item], cool: list[_Item]) -> tuple[str, list[_Item], list[Load]]:
    """Larger of heating or cooling; returns (side label, chosen items, omitted loads)."""
    heat_va = sum(ld.va * f for ld, f, _ in heat)
    cool_va = sum(ld.va * f for ld, f, _ in cool)
    if heat_va >= cool_va:
        chosen, other, label = heat, cool, "heating"
    else:
        chosen, other, label = cool, heat, "cooling"
    chosen_names = {ld.name for ld, _, _ in chosen}
    omitted = [ld for ld, _, _ in other if ld.name not in chosen_names]
    return label, chosen, omitted


def _finish(
    *,
    method: str,
    sec: str,
    edition: int,
    case: str,
    rows: list[BreakdownRow],
    service: Service,
    notes: list[str],
) -> LoadCalcResult:
    total = sum(r.counted_va for r in rows if r.counted_va is not None)
    amps = total / service.volts
    limit = service.limit_amps
    return LoadCalcResult(
        method=method,
        section=sec,
        edition=edition,
        case=case,
        rows=tuple(rows),
        total_va=total,
        volts=service.volts,
        amps=amps,
        service_amps=limit,
        headroom_amps=limit - amps,
        fits=amps <= limit + _EPS,
        caution=CAUTION,
        notes=tuple(notes),
    )


def _other_group_rows(
    items: list[tuple[str, float, str, str]], first_va: float, rem_factor: float, sec: str
) -> list[BreakdownRow]:
    rows = [BreakdownRow(n, va, None, None, s, note or "in other load") for n, va, s, note in items]
    total = sum(va for _, va, _, _ in items)
    first = min(total, first_va)
    rest = max(0.0, total - first_va)
    rows.append(BreakdownRow(f"Other load, first {first_va:,.0f} VA", first, 1.0, first, sec, f"of {total:,.0f} VA"))
    rows.append(BreakdownRow("Other load, remainder", rest, rem_factor, rest * rem_factor, sec, ""))
    return rows


def _hvac_rows(label: str, chosen: list[_Item], omitted: list[Load], sec: str, omit_sec: str) -> list[BreakdownRow]:
    rows = [BreakdownRow(ld.name, ld.va, f, ld.va * f, sec, note) for ld, f, note in chosen]
    rows += [
        BreakdownRow(ld.name, ld.va, 0.0, 0.0, omit_sec, f"noncoincident: smaller than {label}, omitted")
        for ld in omitted
    ]
    return rows


# ---------------------------------------------------------------- 220.83


def nec220_83(
    dwelling: Dwelling,
    loads: Sequence[Load],
    service: Service,
    *,
    edition: int = 2023,
    case: str = "auto",
    existing_hvac_in_a: str = "other_load",
    ems: Ems | None = None,
) -> LoadCalcResult:
    """NEC 220.83 optional calculation for an existing dwelling (existing + new loads).

    ``loads`` are all fixed appliances of the home in the state checked (existing and proposed;
    general lighting, small-appliance and laundry circuits come from ``dwelling``).
    ``case``: ``"auto"`` picks (B) when any proposed (``existing=False``) load is A/C or electric
    space heat (heat pump compressor, strips, heating, thermal storage), else (A); ``"A"``/``"B"``
    force it. Under (A) the code is silent on existing HVAC: ``existing_hvac_in_a="other_load"``
    (default, usual practice) puts the larger of heating or cooling in the other load;
    ``"100_percent"`` counts it at 100 % outside the 8 kVA/40 % diversity (conservative).

    (A): other load first 8 kVA at 100 %, remainder at 40 %.
    (B): larger of A/C or heating at 100 % (central heat, < 4 separately controlled units; heat pump
    compressor plus strips that can run with it, practice from memory), other load 8 kVA/40 %;
    four or more separately controlled heating units go into the other load.

    Parameters
    ----------
    dwelling : Dwelling
        Floor area and general-load circuits.
    loads : sequence of Load
        Every fixed load of the home in the state checked, VA at nameplate.
    service : Service
        The service and main panel.
    edition : int
        NEC edition year.
    case : str
        ``auto``, ``A`` or ``B``.
    existing_hvac_in_a : str
        ``other_load`` or ``100_percent``.
    ems : Ems or None
        Energy management system over the ``ems_controlled`` loads.

    Returns
    -------
    LoadCalcResult
        Breakdown (VA), total (VA and A) and headroom (A).

    Raises
    ------
    ElectricalInputError
        If an option or the edition is unknown, load names repeat, or EMS loads and ``ems``
        do not match.

    References
    ----------
    NEC 2020/2023 220.83(A) and (B); 220.60 noncoincident loads; 220.14(J) (2020) / 220.41 (2023)
    lighting; 220.52; 220.70 (2023) / 750.30 EMS.
    """
    tables.check_edition(edition)
    loads_t = _check_loads(loads)
    if case not in ("auto", "A", "B"):
        raise ElectricalInputError("case", f"unknown case {case!r}; use 'auto', 'A' or 'B'")
    if existing_hvac_in_a not in ("other_load", "100_percent"):
        raise ElectricalInputError(
            "existing_hvac_in_a", f"unknown option {existing_hvac_in_a!r}; use 'other_load' or '100_percent'"
        )
    base = tables.section("existing_optional", edition)
    rest, managed, ems_va = _split_ems(loads_t, ems)
    if case == "auto":
        new_hvac = any(ld.category in HVAC_CATEGORIES and not ld.existing for ld in loads_t)
        case = "B" if new_hvac else "A"
    sec = f"{base}({case})"
    notes: list[str] = []

    other = _general_items(dwelling, edition)
    for ld in rest:
        if ld.category not in HVAC_CATEGORIES:
            other.append((ld.name, ld.va, sec, ""))
    hvac = [ld for ld in rest if ld.category in HVAC_CATEGORIES]
    heat, cool = _hvac_sides(hvac, "full", edition)
    label, chosen, omitted = _pick_side(heat, cool)
    omit_sec = tables.section("noncoincident", edition)
    hvac_rows: list[BreakdownRow] = []
    if case == "B":
        threshold = tables.factor("space_heat_units_threshold", edition)
        units = sum(ld.heating_units for ld in hvac if ld.category == "heating")
        kept: list[_Item] = []
        for ld, f, note in chosen:
            if ld.category == "heating" and units >= threshold and f > 0:
                other.append((ld.name, ld.va * f, sec, "four or more separately controlled units: other load"))
            else:
                kept.append((ld, f, note))
        hvac_rows = _hvac_rows(label, kept, omitted, sec, omit_sec)
    elif existing_hvac_in_a == "other_load":
        for ld, f, note in chosen:
            if f > 0:
                other.append((ld.name, ld.va * f, sec, f"existing {label} in other load (practice option)"))
            else:
                hvac_rows.append(BreakdownRow(ld.name, ld.va, 0.0, 0.0, sec, note))
        hvac_rows += _hvac_rows(label, [], omitted, sec, omit_sec)
        if hvac:
            notes.append("The existing heating and cooling are counted with the other loads under "
                         "220.83(A); the section does not say where they go, so this follows common "
                         "practice - the electrician confirms it.")
    else:
        hvac_rows = _hvac_rows(label, chosen, omitted, sec, omit_sec)
        if hvac:
            notes.append("The existing heating and cooling are counted in full under 220.83(A) "
                         "(the cautious reading).")

    rows = _other_group_rows(
        other,
        tables.factor("existing_optional_first_va", edition),
        tables.factor("existing_optional_remainder_factor", edition),
        sec,
    )
    rows += hvac_rows
    rows += _ems_rows(managed, ems, ems_va, 1.0, edition)
    title = (
        f"NEC {edition} 220.83({case}) optional calculation, existing dwelling"
        + (" - A/C or electric heat added" if case == "B" else " - no new A/C or electric heat")
    )
    return _finish(method=title, sec=sec, edition=edition, case=case, rows=rows, service=service, notes=notes)


# ---------------------------------------------------------------- 220.82


def nec220_82(
    dwelling: Dwelling,
    loads: Sequence[Load],
    service: Service,
    *,
    edition: int = 2023,
    ems: Ems | None = None,
) -> LoadCalcResult:
    """NEC 220.82 optional calculation for a one-family dwelling on a new service >= 100 A.

    General load (lighting, small-appliance and laundry circuits, all fixed appliances and motors):
    first 10 kVA at 100 %, remainder at 40 %. Heating/A/C (220.82(C)) the largest of: A/C 100 %;
    heat pump without supplemental heat 100 %; heat pump compressor 100 % + supplemental heat 65 %
    (compressor not added when interlocked off while the strips run - then the larger of the
    compressor or 65 % of the strips); electric space heat 65 %
    (fewer than four separately controlled units) or 40 % (four or more); thermal storage 100 %.
    Components of one heating system are added together.

    Parameters
    ----------
    dwelling : Dwelling
        Floor area and general-load circuits.
    loads : sequence of Load
        Every fixed load of the home, VA at nameplate.
    service : Service
        The new service and main panel.
    edition : int
        NEC edition year.
    ems : Ems or None
        Energy management system over the ``ems_controlled`` loads.

    Returns
    -------
    LoadCalcResult
        Breakdown (VA), total (VA and A) and headroom (A).

    Raises
    ------
    ElectricalInputError
        If the service is below 100 A, the edition is unknown, load names repeat, or EMS loads
        and ``ems`` do not match.

    References
    ----------
    NEC 2020/2023 220.82(A)-(C); NEC Informative Annex D, Examples D2(a)-(c); 230.79(C).
    """
    tables.check_edition(edition)
    loads_t = _check_loads(loads)
    min_amps = tables.factor("min_service_amps_one_family", edition)
    if service.service_amps < min_amps:
        raise ElectricalInputError(
            "service_amps",
            f"220.82 applies to a service of {min_amps:g} A or more (220.82(A), 230.79(C)); got "
            f"{service.service_amps:g} A - use nec220_83 for an existing smaller service",
        )
    base = tables.section("new_optional", edition)
    rest, managed, ems_va = _split_ems(loads_t, ems)
    other = _general_items(dwelling, edition)
    sec_b = f"{base}(B)"
    for ld in rest:
        if ld.category not in HVAC_CATEGORIES:
            other.append((ld.name, ld.va, sec_b, ""))
    hvac = [ld for ld in rest if ld.category in HVAC_CATEGORIES]
    heat, cool = _hvac_sides(hvac, "220.82", edition)
    label, chosen, omitted = _pick_side(heat, cool)
    rows = _other_group_rows(
        other,
        tables.factor("new_optional_first_va", edition),
        tables.factor("new_optional_remainder_factor", edition),
        sec_b,
    )
    rows += _hvac_rows(label, chosen, omitted, f"{base}(C)", f"{base}(C)")
    rows += _ems_rows(managed, ems, ems_va, 1.0, edition)
    return _finish(
        method=f"NEC {edition} 220.82 optional calculation, one-family dwelling (new service)",
        sec=base,
        edition=edition,
        case="",
        rows=rows,
        service=service,
        notes=[],
    )


# ---------------------------------------------------------------- 220.87


def nec220_87(
    measured: MeasuredDemand,
    new_loads: Sequence[Load],
    service: Service,
    *,
    edition: int = 2023,
    has_solar_or_battery: bool = False,
    allow_with_solar_or_battery: bool = False,
    continuous_new_load_at_125: bool = True,
    ems: Ems | None = None,
) -> LoadCalcResult:
    """NEC 220.87: existing load from measured maximum demand at 125 % plus the new loads.

    New loads are counted as Article 220 counts them (:func:`added_load_demand_va`: ranges by
    Table 220.55, dryers by 220.54, the rest at nameplate); the larger of new heating or cooling
    only (220.60).
    ``continuous_new_load_at_125`` (default True, the conservative reading; inspectors differ)
    counts continuous new loads (EV chargers, water heaters, an EMS setpoint) at 125 %.
    Homes with solar or batteries are refused (the measured peak hides the load behind on-site
    generation; the 2020 text excludes them) unless ``allow_with_solar_or_battery`` is True.

    Parameters
    ----------
    measured : MeasuredDemand
        Measured maximum demand of the existing load.
    new_loads : sequence of Load
        Loads added since the recording, VA at nameplate.
    service : Service
        The service and main panel.
    edition : int
        NEC edition year.
    has_solar_or_battery : bool
        True if the home has solar or a battery.
    allow_with_solar_or_battery : bool
        Use the method anyway (only if the inspector accepts it).
    continuous_new_load_at_125 : bool
        Count continuous new loads at 125 %.
    ems : Ems or None
        Energy management system over the ``ems_controlled`` new loads.

    Returns
    -------
    LoadCalcResult
        Breakdown (VA), total (VA and A) and headroom (A).

    Raises
    ------
    MethodNotApplicableError
        If the home has solar or a battery and that is not allowed.
    ElectricalInputError
        If ``measured`` is not a :class:`MeasuredDemand`, the edition is unknown, load names
        repeat, or EMS loads and ``ems`` do not match.

    References
    ----------
    NEC 2020/2023 220.87 and its exception (30-day recording); 220.60; Table 220.55; 220.54;
    625.42.
    """
    tables.check_edition(edition)
    if not isinstance(measured, MeasuredDemand):
        raise ElectricalInputError("measured", "expected a MeasuredDemand")
    sec = tables.section("measured", edition)
    if has_solar_or_battery and not allow_with_solar_or_battery:
        raise MethodNotApplicableError(
            "has_solar_or_battery",
            f"{sec} is not used for a home with solar or a battery: the meter does not see the load "
            "they supply. Use the 220.83 calculation, or pass allow_with_solar_or_battery=True only "
            "if the inspector (AHJ) accepts it",
        )
    loads_t = _check_loads(new_loads)
    rest, managed, ems_va = _split_ems(loads_t, ems)
    f_peak = tables.factor("measured_peak_factor", edition)
    f_cont = tables.factor("continuous_factor", edition) if continuous_new_load_at_125 else 1.0
    basis = "15-minute interval data" if measured.basis == "15min" else "hourly kWh x 4 (bound; AHJ's call)"
    period = "12 months" if measured.period == "12_months" else "30-day recording"
    rows = [
        BreakdownRow(
            "Measured maximum demand", measured.peak_kw * 1000.0, f_peak, measured.peak_kw * 1000.0 * f_peak,
            sec, f"{period}, {basis}; kW taken as kVA",
        )
    ]
    notes: list[str] = []
    if measured.period == "30_days":
        adj = float(measured.seasonal_adjustment_va or 0.0)
        rows.append(
            BreakdownRow("Seasonal heating/cooling adjustment", adj, f_peak, adj * f_peak, f"{sec} Exception",
                         "larger of heating or cooling not in the recording")
        )
    if measured.basis == "hourly_kwh_x4":
        notes.append("Peak from hourly data bounded by hourly kWh x 4: not a code method; the inspector decides.")
    for ld in rest:
        if ld.category in HVAC_CATEGORIES:
            continue
        f = (f_cont if ld.continuous else 1.0) * added_load_demand_va(ld, edition) / max(ld.va, 1e-9)
        how = {"range": "Table 220.55", "dryer": "220.54"}.get(ld.category, "nameplate")
        rows.append(BreakdownRow(ld.name, ld.va, f, ld.va * f, sec,
                                 f"new load, {how}" + (", continuous" if ld.continuous else "")))
    hvac = [ld for ld in rest if ld.category in HVAC_CATEGORIES]
    heat, cool = _hvac_sides(hvac, "full", edition)
    label, chosen, omitted = _pick_side(heat, cool)
    chosen = [(ld, f * (f_cont if ld.continuous else 1.0), note) for ld, f, note in chosen]
    rows += _hvac_rows(label, chosen, omitted, sec, tables.section("noncoincident", edition))
    rows += _ems_rows(managed, ems, ems_va, f_cont, edition)
    notes.append(
        "Continuous new loads at 125 % (inspectors differ)." if continuous_new_load_at_125
        else "Continuous new loads at 100 % (inspectors differ)."
    )
    notes.append("Loads removed since the recording are not subtracted (conservative).")
    return _finish(
        method=f"NEC {edition} 220.87 existing load from measured maximum demand",
        sec=sec, edition=edition, case="", rows=rows, service=service, notes=notes,
    )
