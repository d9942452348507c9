"""Cheapest set of changes that lets an existing service carry the proposed new loads.

Enumerates (small) combinations of: a variant for each proposed load (first variant = the one
wanted; others are lower-power alternatives such as a 120 V heat pump water heater, interlocked or
no strips, a heat pump dryer, 16-24 A charging), an energy management system over the EMS-eligible
new loads, a derated main breaker or a supply-side connection for solar/battery, and service
upgrades. Each combination is checked with the 220.83 calculation (existing service) or 220.82
(new service) and the 705.12 busbar rule; the cheapest feasible one wins, ties broken by fewer
changes, then smaller service, then the order of variants and options given.

Costs are parameters (the catalog supplies them). The enumeration, not the costs or the code rules,
is "common practice": which remedies electricians reach for first.

References
----------
NEC 2023 (2020 selectable) 220.82, 220.83, 220.70/750.30, 705.12(B), 705.11, 230.79(C), 240.6(A).
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Sequence
from dataclasses import asdict, dataclass, replace
from typing import Any

from homeplan.electrical import tables
from homeplan.electrical.errors import ElectricalInputError
from homeplan.electrical.loads import Dwelling, Ems, Load, Service
from homeplan.electrical.nec220 import (
    CAUTION,
    LoadCalcResult,
    MeasuredDemand,
    _check_loads,
    nec220_82,
    nec220_83,
    nec220_87,
)
from homeplan.electrical.nec705 import BackfeedResult, backfeed_check, max_inverter_amps

__all__ = ["ProposedLoad", "Remedy", "RemedyCosts", "ServiceUpgrade", "Variant", "find_remedy"]


def _check_cost(fieldname: str, value: float | None) -> None:
    if value is None:
        return
    if isinstance(value, bool) or not isinstance(value, int | float) or not math.isfinite(value):
        raise ElectricalInputError(fieldname, f"must be a finite number of USD, got {value!r}")


@dataclass(frozen=True)
class Variant:
    """One way to install a proposed load: its loads and the extra cost over the wanted one.

    Attributes
    ----------
    label : str
        Name of the variant.
    loads : tuple of Load
        Its loads, VA at nameplate.
    extra_cost_usd : float
        Extra cost over the wanted variant, USD.

    Raises
    ------
    ElectricalInputError
        If the extra cost is not a finite number.
    """

    label: str
    loads: tuple[Load, ...]
    extra_cost_usd: float = 0.0

    def __post_init__(self) -> None:
        _check_cost(f"variant '{self.label}'.extra_cost_usd", self.extra_cost_usd)


@dataclass(frozen=True)
class ProposedLoad:
    """A proposed new load with its variants (first = wanted) and existing loads it replaces.

    Attributes
    ----------
    name : str
        Name of the proposed load.
    variants : tuple of Variant
        Ways to install it, the wanted one first.
    replaces : tuple of str
        Names of the existing loads it replaces.

    Raises
    ------
    ElectricalInputError
        If no variant is given.
    """

    name: str
    variants: tuple[Variant, ...]
    replaces: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        if not self.variants:
            raise ElectricalInputError(f"proposed '{self.name}'.variants", "give at least one variant")


@dataclass(frozen=True)
class ServiceUpgrade:
    """A larger service (new panel): rating, busbar (default = rating) and cost.

    Attributes
    ----------
    service_amps : float
        New service rating, A.
    cost_usd : float
        Cost of the upgrade, USD.
    busbar_amps : float or None
        New busbar rating, A; None takes the service rating.

    Raises
    ------
    ElectricalInputError
        If the cost is not a finite number.
    """

    service_amps: float
    cost_usd: float
    busbar_amps: float | None = None

    def __post_init__(self) -> None:
        _check_cost("service_upgrade.cost_usd", self.cost_usd)


@dataclass(frozen=True)
class RemedyCosts:
    """Costs of the remedies on offer (None = not offered).

    Attributes
    ----------
    ems_usd : float or None
        Cost of an energy management system, USD.
    derate_main_usd : float or None
        Cost of derating the main breaker, USD.
    supply_side_usd : float or None
        Cost of a supply-side solar/battery connection, USD.
    service_upgrades : tuple of ServiceUpgrade
        Larger services on offer.
    ems_min_setpoint_amps : float or None
        Lowest useful EMS setpoint, A; None takes the practice value in ``practice.csv``.

    Raises
    ------
    ElectricalInputError
        If a cost is not a finite number >= 0.
    """

    ems_usd: float | None = None
    derate_main_usd: float | None = None
    supply_side_usd: float | None = None
    service_upgrades: tuple[ServiceUpgrade, ...] = ()
    ems_min_setpoint_amps: float | None = None

    def __post_init__(self) -> None:
        for name in ("ems_usd", "derate_main_usd", "supply_side_usd"):
            _check_cost(name, getattr(self, name))
            v = getattr(self, name)
            if v is not None and v < 0:
                raise ElectricalInputError(name, f"cost must be >= 0 USD, got {v!r}")


@dataclass(frozen=True)
class Remedy:
    """The chosen remedy (plain data; :meth:`to_dict` for JSON).

    Attributes
    ----------
    fits : bool
        True if some combination fits.
    needed : bool
        True if a change to the plan is needed.
    cost_usd : float or None
        Extra cost of the chosen combination, USD; None when nothing fits.
    choices : tuple of (str, str)
        (proposed load, variant label) pairs chosen.
    ems : Ems or None
        Energy management system added, setpoint in VA.
    service : Service
        The service checked (the upgraded one when upgraded).
    service_upgrade : ServiceUpgrade or None
        Service upgrade chosen.
    derated_main_amps : float or None
        Derated main breaker rating, A.
    supply_side : bool
        True if solar/battery is connected on the supply side.
    calc : LoadCalcResult
        Load calculation of the chosen combination (the plan as proposed when nothing fits).
    backfeed : BackfeedResult or None
        705.12 check of the chosen combination.
    changes : tuple of str
        The changes in plain words.
    reasons : tuple of str
        The reasoning in plain words.
    candidates_checked : int
        Number of combinations checked.
    caution : str
        The planning caution.
    """

    fits: bool
    needed: bool
    cost_usd: float | None
    choices: tuple[tuple[str, str], ...]
    ems: Ems | None
    service: Service
    service_upgrade: ServiceUpgrade | None
    derated_main_amps: float | None
    supply_side: bool
    calc: LoadCalcResult
    backfeed: BackfeedResult | None
    changes: tuple[str, ...]
    reasons: tuple[str, ...]
    candidates_checked: int
    caution: str = CAUTION

    def to_dict(self) -> dict[str, Any]:
        """The remedy as a JSON-ready dict (USD, A, VA).

        Returns
        -------
        dict of str to Any
            One entry per field; nested results as dicts.
        """
        return {
            "fits": self.fits,
            "needed": self.needed,
            "cost_usd": self.cost_usd,
            "choices": [list(c) for c in self.choices],
            "ems_setpoint_va": None if self.ems is None else self.ems.setpoint_va,
            "service": asdict(self.service),
            "service_upgrade": None if self.service_upgrade is None else asdict(self.service_upgrade),
            "derated_main_amps": self.derated_main_amps,
            "supply_side": self.supply_side,
            "calc": self.calc.to_dict(),
            "backfeed": None if self.backfeed is None else self.backfeed.to_dict(),
            "changes": list(self.changes),
            "reasons": list(self.reasons),
            "candidates_checked": self.candidates_checked,
            "caution": self.caution,
        }


@dataclass(frozen=True)
class _Outcome:
    feasible: bool
    calc: LoadCalcResult
    backfeed: BackfeedResult | None
    service: Service
    ems: Ems | None
    derated: float | None


def _calc(dwelling: Dwelling, loads: list[Load], svc: Service, new_service: bool, ems: Ems | None,
          edition: int, existing_hvac_in_a: str, measured: MeasuredDemand | None = None,
          continuous_at_125: bool = True) -> LoadCalcResult:
    if new_service:
        return nec220_82(dwelling, loads, svc, edition=edition, ems=ems)
    if measured is not None:  # the existing load is the measured peak: only new loads are added
        return nec220_87(measured, [ld for ld in loads if not ld.existing], svc, edition=edition, ems=ems,
                         continuous_new_load_at_125=continuous_at_125)
    return nec220_83(dwelling, loads, svc, edition=edition, ems=ems, existing_hvac_in_a=existing_hvac_in_a)


def _evaluate(
    dwelling: Dwelling, loads: list[Load], svc: Service, new_service: bool, use_ems: bool, solar: str,
    inverter_amps: float, rule: str, edition: int, existing_hvac_in_a: str, ems_min_amps: float,
    margin_amps: float, measured: MeasuredDemand | None = None, continuous_at_125: bool = True,
) -> _Outcome | None:
    backfeed = None
    derated: float | None = None
    if inverter_amps > 0:
        if solar == "derate":
            assert svc.busbar_amps is not None and svc.main_breaker_amps is not None
            floor = tables.factor("min_service_amps_one_family", edition)
            sizes = [s for s in sorted(tables.standard_ocpd_amps(), reverse=True)
                     if floor <= s < svc.main_breaker_amps
                     and max_inverter_amps(svc.busbar_amps, s, rule=rule, service_amps=svc.service_amps,
                                           edition=edition) >= inverter_amps - 1e-9]
            if not sizes:
                return None
            derated = float(sizes[0])
            svc = replace(svc, main_breaker_amps=derated)
            backfeed = backfeed_check(svc, inverter_amps, rule=rule, edition=edition)
        else:
            backfeed = backfeed_check(svc, inverter_amps, rule="supply_side" if solar == "supply_side" else rule,
                                      edition=edition)
    ems: Ems | None = None
    if use_ems:
        managed_va = sum(ld.va for ld in loads if ld.ems_eligible and not ld.existing)
        min_va = ems_min_amps * svc.volts
        if managed_va <= min_va:
            return None
        loads = [replace(ld, ems_controlled=True) if ld.ems_eligible and not ld.existing else ld for ld in loads]
        probe = _calc(dwelling, loads, svc, new_service, Ems(min_va), edition, existing_hvac_in_a,
                      measured, continuous_at_125)
        room_va = (svc.limit_amps - margin_amps) * svc.volts - (probe.total_va - min_va)
        setpoint_amps = math.floor(room_va / svc.volts + 1e-9)
        if setpoint_amps < ems_min_amps or setpoint_amps * svc.volts >= managed_va:
            return None  # EMS cannot help, or is not needed (the plain option is cheaper)
        ems = Ems(setpoint_amps * svc.volts)
    calc = _calc(dwelling, loads, svc, new_service, ems, edition, existing_hvac_in_a, measured,
                 continuous_at_125)
    feasible = calc.fits and calc.headroom_amps >= margin_amps - 1e-9 and (backfeed is None or backfeed.fits)
    return _Outcome(feasible, calc, backfeed, svc, ems, derated)


def find_remedy(
    dwelling: Dwelling,
    existing_loads: Sequence[Load],
    service: Service,
    proposed: Sequence[ProposedLoad],
    costs: RemedyCosts = RemedyCosts(),
    *,
    inverter_output_amps: float = 0.0,
    edition: int = 2023,
    backfeed_rule: str = "120",
    existing_hvac_in_a: str = "other_load",
    margin_amps: float = 0.0,
    max_combinations: int = 50_000,
    measured: MeasuredDemand | None = None,
    continuous_new_load_at_125: bool = True,
) -> Remedy:
    """Cheapest combination of variants, EMS, solar connection and service size that fits.

    ``existing_loads`` are the home's fixed appliances today (general lighting and the small
    appliance/laundry circuits come from ``dwelling``); ``proposed`` are the new loads, each with
    variants (the first is the one wanted, at extra cost 0 by convention) and the names of the
    existing loads it replaces. ``inverter_output_amps`` is the total solar + battery inverter
    output current for the 705.12 check (0 = none). ``margin_amps``: headroom required on top of
    the calculation (0 = the code limit; a planning margin is common practice, no source).

    Parameters
    ----------
    dwelling : Dwelling
        Floor area and general-load circuits.
    existing_loads : sequence of Load
        The home's fixed loads today, VA at nameplate.
    service : Service
        The existing service and main panel.
    proposed : sequence of ProposedLoad
        The new loads, each with its variants.
    costs : RemedyCosts
        Remedies on offer and their costs, USD.
    inverter_output_amps : float
        Total solar + battery inverter output current, A (0 = none).
    edition : int
        NEC edition year.
    backfeed_rule : str
        705.12 rule: ``100`` or ``120``.
    existing_hvac_in_a : str
        ``other_load`` or ``100_percent`` (see :func:`~homeplan.electrical.nec220.nec220_83`).
    margin_amps : float
        Headroom required on top of the calculation, A.
    max_combinations : int
        Largest number of combinations to check.
    measured : MeasuredDemand or None
        A measured maximum demand: the existing service is then checked by 220.87 (the measured
        peak at 125 % plus the new loads) instead of 220.83; a new service still by 220.82.
    continuous_new_load_at_125 : bool
        With ``measured``: count continuous new loads at 125 % (inspectors differ).

    Returns
    -------
    Remedy
        The cheapest combination that fits, or ``fits=False`` with the plan as proposed.

    Raises
    ------
    ElectricalInputError
        If an input is invalid, a proposed load repeats or replaces an unknown load, or there
        are more than ``max_combinations`` combinations.

    References
    ----------
    NEC 2023 (2020 selectable) 220.83 or 220.87 (existing service), 220.82 (new service), 220.70/750.30
    (EMS setpoint counted), 705.12(B) (busbar), 705.11 (supply side), 230.79(C); remedy order is
    common practice, no source.
    """
    tables.check_edition(edition)
    base = list(_check_loads(existing_loads))
    names = {ld.name for ld in base}
    seen: set[str] = set()
    for p in proposed:
        if p.name in seen:
            raise ElectricalInputError("proposed", f"duplicate proposed load {p.name!r}")
        seen.add(p.name)
        for r in p.replaces:
            if r not in names:
                raise ElectricalInputError(
                    f"proposed '{p.name}'.replaces", f"no existing load named {r!r}; existing: {sorted(names)}"
                )
    if not math.isfinite(inverter_output_amps) or inverter_output_amps < 0:
        raise ElectricalInputError("inverter_output_amps", f"must be >= 0 A, got {inverter_output_amps!r}")
    if not math.isfinite(margin_amps) or margin_amps < 0:
        raise ElectricalInputError("margin_amps", f"must be >= 0 A, got {margin_amps!r}")
    if backfeed_rule not in ("100", "120"):
        raise ElectricalInputError("backfeed_rule", "use '100' or '120' for the remedy search")
    removed = {r for p in proposed for r in p.replaces}
    base = [ld for ld in base if ld.name not in removed]
    ems_min_amps = (costs.ems_min_setpoint_amps if costs.ems_min_setpoint_amps is not None
                    else tables.practice("ems_min_setpoint_amps"))

    services: list[tuple[Service, ServiceUpgrade | None]] = [(service, None)]
    for up in sorted(costs.service_upgrades, key=lambda u: (u.service_amps, u.cost_usd)):
        if up.service_amps > service.service_amps:
            services.append((Service(up.service_amps, busbar_amps=up.busbar_amps), up))
    solar_opts = ["none"]
    if inverter_output_amps > 0:
        if costs.derate_main_usd is not None:
            solar_opts.append("derate")
        if costs.supply_side_usd is not None:
            solar_opts.append("supply_side")
    ems_opts = [False] + ([True] if costs.ems_usd is not None else [])
    variant_ranges = [range(len(p.variants)) for p in proposed]
    n = math.prod(len(r) for r in variant_ranges) * len(services) * len(solar_opts) * len(ems_opts)
    if n > max_combinations:
        raise ElectricalInputError(
            "proposed", f"{n} combinations to check (limit {max_combinations}); offer fewer variants per load"
        )

    best: tuple[tuple[Any, ...], _Outcome, tuple[int, ...], int, str, bool] | None = None
    baseline: _Outcome | None = None
    checked = 0
    for idx in itertools.product(*variant_ranges):
        loads = base + [replace(ld, existing=False) for p, i in zip(proposed, idx, strict=True)
                        for ld in p.variants[i].loads]
        v_cost = sum(p.variants[i].extra_cost_usd for p, i in zip(proposed, idx, strict=True))
        n_var = sum(1 for i in idx if i != 0)
        for s_i, (svc, up) in enumerate(services):
            for so_i, solar in enumerate(solar_opts):
                for use_ems in ems_opts:
                    out = _evaluate(dwelling, loads, svc, up is not None, use_ems, solar, inverter_output_amps,
                                    backfeed_rule, edition, existing_hvac_in_a, ems_min_amps, margin_amps,
                                    measured, continuous_new_load_at_125)
                    checked += 1
                    if out is None:
                        continue
                    if baseline is None and s_i == 0 and solar == "none" and not use_ems and n_var == 0:
                        baseline = out
                    if not out.feasible:
                        continue
                    cost = v_cost + (up.cost_usd if up else 0.0)
                    cost += (costs.ems_usd or 0.0) if use_ems else 0.0
                    cost += {"none": 0.0, "derate": costs.derate_main_usd or 0.0,
                             "supply_side": costs.supply_side_usd or 0.0}[solar]
                    n_changes = n_var + int(use_ems) + int(solar != "none") + int(up is not None)
                    key = (round(cost, 2), n_changes, svc.service_amps, idx, so_i, int(use_ems))
                    if best is None or key < best[0]:
                        best = (key, out, idx, s_i, solar, use_ems)
    assert baseline is not None
    return _build(proposed, services, baseline, best, checked, costs, inverter_output_amps, backfeed_rule)


def _describe(calc: LoadCalcResult) -> str:
    word = "fits with" if calc.fits else "over by"
    return (f"{calc.method}: {calc.total_va:,.0f} VA = {calc.amps:.1f} A on a {calc.service_amps:g} A "
            f"service ({word} {abs(calc.headroom_amps):.1f} A)")


def _build(
    proposed: Sequence[ProposedLoad],
    services: list[tuple[Service, ServiceUpgrade | None]],
    baseline: _Outcome,
    best: tuple[tuple[Any, ...], _Outcome, tuple[int, ...], int, str, bool] | None,
    checked: int,
    costs: RemedyCosts,
    inverter_amps: float,
    rule: str,
) -> Remedy:
    wanted = tuple((p.name, p.variants[0].label) for p in proposed)
    reasons = [f"As proposed: {_describe(baseline.calc)}."]
    if baseline.backfeed is not None:
        b = baseline.backfeed
        reasons.append(
            f"Solar/battery output {b.inverter_output_amps:g} A vs {b.max_inverter_amps:g} A allowed by the "
            f"{rule} % rule ({b.section}): {'fits' if b.fits else 'does not fit'}."
        )
    if best is None:
        reasons.append("No combination of the variants and remedies offered fits; ask an electrician about a "
                       "larger service or other options.")
        return Remedy(False, True, None, wanted, None, baseline.service, None, None, False, baseline.calc,
                      baseline.backfeed, (), tuple(reasons), checked)
    key, out, idx, s_i, solar, use_ems = best
    up = services[s_i][1]
    choices = tuple((p.name, p.variants[i].label) for p, i in zip(proposed, idx, strict=True))
    changes: list[str] = []
    for p, i in zip(proposed, idx, strict=True):
        if i != 0:
            v = p.variants[i]
            changes.append(f"{p.name}: use '{v.label}' instead of '{p.variants[0].label}' "
                           f"(extra cost ${v.extra_cost_usd:,.0f}).")
    if use_ems and out.ems is not None:
        managed = [r.load_name for r in out.calc.rows if r.note.startswith("managed by")]
        changes.append(
            f"Add an energy management system limiting {', '.join(managed)} to "
            f"{out.ems.setpoint_va / out.service.volts:g} A ({out.ems.setpoint_va:,.0f} VA), counted as the load "
            f"under 220.70/750.30 (${costs.ems_usd or 0:,.0f})."
        )
    if solar == "derate":
        changes.append(f"Derate the main breaker to {out.derated:g} A so the busbar accepts {inverter_amps:g} A of "
                       f"inverter output (${costs.derate_main_usd or 0:,.0f}).")
    if solar == "supply_side":
        changes.append(f"Connect the solar/battery on the supply side of the main (705.11) "
                       f"(${costs.supply_side_usd or 0:,.0f}).")
    if up is not None:
        changes.append(f"Upgrade the service to {up.service_amps:g} A (${up.cost_usd:,.0f}); a new service is "
                       "checked with the 220.82 calculation.")
    needed = bool(changes)
    if not needed:
        reasons.append("No change needed: the plan fits as proposed.")
    else:
        reasons.append(f"Cheapest remedy of {checked} combinations checked (${key[0]:,.2f}):")
        reasons += ["  - " + c for c in changes]
        reasons.append(f"With these changes: {_describe(out.calc)}.")
        if up is None and len(services) > 1:
            reasons.append(f"Service upgrades offered cost from "
                           f"${min(u.cost_usd for _, u in services[1:] if u):,.0f}.")
    return Remedy(True, needed, float(key[0]), choices, out.ems, out.service, up, out.derated,
                  solar == "supply_side", out.calc, out.backfeed, tuple(changes), tuple(reasons), checked)
