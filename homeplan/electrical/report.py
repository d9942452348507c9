"""Plain-data capacity report for every plan state, and a plain-text breakdown table.

References
----------
NEC 2023 (2020 selectable) 220.83, 220.87, 705.12(B): see :mod:`homeplan.electrical.nec220` and
:mod:`homeplan.electrical.nec705`.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from homeplan.electrical.errors import ElectricalInputError, MethodNotApplicableError
from homeplan.electrical.loads import Dwelling, Ems, Load, Service
from homeplan.electrical.nec220 import (
    CAUTION,
    LoadCalcResult,
    MeasuredDemand,
    nec220_83,
    nec220_87,
)
from homeplan.electrical.nec705 import backfeed_check

__all__ = ["PlanState", "capacity_report", "format_breakdown_text"]


@dataclass(frozen=True)
class PlanState:
    """One state of the home (today, or after a roadmap year): all its fixed loads.

    Loads with ``existing=False`` are the ones added since today (they decide 220.83 (A)/(B) and are
    the new load under 220.87). ``inverter_output_amps``: total solar + battery inverter output.

    Attributes
    ----------
    label : str
        Name of the state, e.g. ``today`` or ``2028``.
    loads : tuple of Load
        Every fixed load of the state, VA at nameplate.
    inverter_output_amps : float
        Total solar + battery inverter output current, A.
    has_solar_or_battery : bool
        True if the home has solar or a battery (220.87 is then refused).
    ems : Ems or None
        Energy management system over the ``ems_controlled`` loads.
    """

    label: str
    loads: tuple[Load, ...]
    inverter_output_amps: float = 0.0
    has_solar_or_battery: bool = False
    ems: Ems | None = None


def capacity_report(
    dwelling: Dwelling,
    service: Service,
    states: Sequence[PlanState],
    *,
    edition: int = 2023,
    measured: MeasuredDemand | None = None,
    existing_hvac_in_a: str = "other_load",
    continuous_new_load_at_125: bool = True,
    backfeed_rule: str = "120",
) -> list[dict[str, Any]]:
    """For each state: the 220.83 calculation, optionally 220.87 from a measured peak (or the
    reason it is refused), and the 705.12 check when there is inverter output. JSON-ready dicts.

    Parameters
    ----------
    dwelling : Dwelling
        Floor area and general-load circuits.
    service : Service
        The service and main panel.
    states : sequence of PlanState
        The plan states, today first.
    edition : int
        NEC edition year.
    measured : MeasuredDemand or None
        Measured peak demand for 220.87; None skips it.
    existing_hvac_in_a : str
        ``other_load`` or ``100_percent`` (see :func:`~homeplan.electrical.nec220.nec220_83`).
    continuous_new_load_at_125 : bool
        Count continuous new loads at 125 % under 220.87.
    backfeed_rule : str
        705.12 rule: ``100``, ``120``, ``sum_of_breakers`` or ``supply_side``.

    Returns
    -------
    list of dict
        One dict per state: ``state``, ``calc``, ``measured``, ``backfeed`` (VA and A) and
        ``caution``.

    Raises
    ------
    ElectricalInputError
        If no state is given or an input is invalid.

    References
    ----------
    NEC 2023 (2020 selectable) 220.83, 220.87, 705.12(B).
    """
    if not states:
        raise ElectricalInputError("states", "give at least one plan state (today)")
    out: list[dict[str, Any]] = []
    for st in states:
        calc = nec220_83(dwelling, st.loads, service, edition=edition, ems=st.ems,
                         existing_hvac_in_a=existing_hvac_in_a)
        entry: dict[str, Any] = {"state": st.label, "calc": calc.to_dict(), "measured": None, "backfeed": None,
                                 "caution": CAUTION}
        if measured is not None:
            new = [ld for ld in st.loads if not ld.existing]
            try:
                m = nec220_87(measured, new, service, edition=edition,
                              has_solar_or_battery=st.has_solar_or_battery or st.inverter_output_amps > 0,
                              continuous_new_load_at_125=continuous_new_load_at_125,
                              ems=st.ems if any(ld.ems_controlled for ld in new) else None)
                entry["measured"] = m.to_dict()
            except MethodNotApplicableError as exc:
                entry["measured"] = {"refused": str(exc)}
        if st.inverter_output_amps > 0:
            entry["backfeed"] = backfeed_check(service, st.inverter_output_amps, rule=backfeed_rule,
                                               edition=edition).to_dict()
        out.append(entry)
    return out


def _fmt_num(x: float | None, fmt: str) -> str:
    return "" if x is None else format(x, fmt)


def format_breakdown_text(result: LoadCalcResult) -> str:
    """Render a load calculation as a plain-text table with totals and the caution.

    Parameters
    ----------
    result : LoadCalcResult
        The calculation.

    Returns
    -------
    str
        The table (VA, demand factors, total VA and A, headroom A), ending in a newline.
    """
    head = ("Load", "VA", "Factor", "Counted VA", "Section")
    body = [
        (r.load_name + (f"  [{r.note}]" if r.note else ""), _fmt_num(r.va, ",.0f"), _fmt_num(r.factor, ".2f"),
         _fmt_num(r.counted_va, ",.0f"), r.section)
        for r in result.rows
    ]
    widths = [max(len(head[i]), *(len(b[i]) for b in body)) for i in range(5)]

    def line(cells: Sequence[str]) -> str:
        return "  ".join(
            c.ljust(widths[i]) if i in (0, 4) else c.rjust(widths[i]) for i, c in enumerate(cells)
        ).rstrip()

    rule = "-" * len(line(["-" * w for w in widths]))
    lines = [result.method, line(head), rule, *(line(b) for b in body), rule]
    lines.append(f"Total {result.total_va:,.0f} VA / {result.volts} V = {result.amps:.1f} A")
    verdict = "fits" if result.fits else "DOES NOT FIT"
    lines.append(f"Service {result.service_amps:g} A: headroom {result.headroom_amps:.1f} A - {verdict}")
    lines += [f"Note: {n}" for n in result.notes]
    lines.append(f"CAUTION: {result.caution}")
    return "\n".join(lines) + "\n"
