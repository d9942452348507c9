"""Electrical capacity of the home in every state of the roadmap, and the remedy the plan uses.

The loads come from the plan's appliances (defaults in ``data/existing_loads.csv``) or from the
explicit load list an installer entered; new loads from the upgrade variants in
``data/upgrades.yaml``. The electrical engine (:mod:`homeplan.electrical`) does the code
arithmetic; this module only assembles its inputs and turns its answers into scheduling
constraints and into the breakdowns the views show.

References
----------
NEC 2023 (2020 selectable) 220.83 existing dwelling, 220.82 new service, 220.70/750.30 energy
management, 705.12(B) load-side solar connection, 625.42 EV charging.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field, replace

from homeplan import catalog
from homeplan.catalog import existing_load_row, performance
from homeplan.electrical.loads import Dwelling, Ems, Load, Service
from homeplan.electrical.nec220 import (
    LoadCalcResult,
    MeasuredDemand,
    nec220_82,
    nec220_83,
    nec220_87,
)
from homeplan.electrical.nec705 import backfeed_check
from homeplan.electrical.remedies import (
    ProposedLoad,
    Remedy,
    RemedyCosts,
    ServiceUpgrade,
    Variant,
    find_remedy,
)
from homeplan.electrical.tables import practice
from homeplan.electrical.upgrade_loads import loads_for_upgrade
from homeplan.plan.fuels import appliance_fuel
from homeplan.plan.model import Plan
from homeplan.planner.candidates import REMEDY_COMBINATIONS
from homeplan.planner.context import Context
from homeplan.planner.lifecycle import appliance_type
from homeplan.planner.projects import ProjectDetail, with_variant
from homeplan.planner.solar_connection import (
    Connection,
    cheapest_connection,
    connection_options,
    inverter_amps,
)
from homeplan.result.figures import CapacityRow, CapacityState

__all__ = [
    "REMEDY_PROJECTS",
    "CapacityModel",
    "CapacityPlan",
    "breaker_spaces",
    "existing_loads",
    "measured_demand",
    "other_method_capacity",
    "plan_capacity",
    "project_loads",
    "refit_connections",
    "state_capacity",
]

LOAD_KINDS = {"general": "appliance", "appliance": "appliance", "range": "range", "dryer": "dryer",
              "water_heater": "water_heater", "heating": "heating", "cooling": "cooling",
              "heat_pump": "heat_pump_compressor", "supplemental_heat": "supplemental_heat",
              "ev_charger": "ev_charger", "motor": "motor", "other": "other"}


def existing_loads(plan: Plan) -> list[Load]:
    """The home's fixed loads today, each named after the appliance it belongs to."""
    e = plan.home.electrical
    if e.loads:
        return [Load(name=ld.name, va=ld.va, category=LOAD_KINDS[ld.kind or "appliance"],
                     volts=ld.voltage_v, continuous=ld.continuous, source="entered by you")
                for ld in e.loads]
    out = []
    for a in plan.appliances:
        fuel = appliance_fuel(a)
        r = existing_load_row(a.kind, fuel, appliance_type(a) if a.kind == "water_heater" else "")
        if r is None:
            continue
        va = None
        if a.nameplate_va:
            va = a.nameplate_va
        elif r["va"]:
            va = float(r["va"])
        elif r["va_per_ton"]:
            tons = (a.capacity_btuh or 36000.0) / 12000.0
            va = float(r["va_per_ton"]) * tons
        elif r["va_per_ft2"]:
            va = float(r["va_per_ft2"]) * plan.home.floor_area_ft2
        elif a.kind == "furnace" and a.capacity_btuh:
            va = a.capacity_btuh / 3.41214
        if not va:
            continue
        out.append(Load(name=f"{a.key} ({a.kind.replace('_', ' ')})", va=va, category=r["category"],
                        volts=int(r["volts"]), continuous=r["continuous"] == "true",
                        source="your nameplate" if a.nameplate_va else r["source"]))
        if a.kind == "heat_pump":  # existing heat pumps usually carry strips that can run with them
            out.append(Load(name=f"{a.key} strips 10 kW", va=10000.0, category="supplemental_heat",
                            source="assumed 10 kW strips (from memory: a common size; 41.7 A at 240 V)"))
    r = existing_load_row("dishwasher")
    out.append(Load(name="dishwasher (assumed)", va=float(r["va"]), category="appliance", volts=120,
                    source=r["source"]))
    if any(v.fuel == "electric" for v in plan.vehicles):
        r = existing_load_row("ev_charger", "electric")
        out.append(Load(name="EV charger (existing)", va=float(r["va"]), category="ev_charger",
                        continuous=True, source=r["source"]))
    return out


def _names_for(keys: tuple[str, ...], loads: list[Load]) -> tuple[str, ...]:
    prefixes = tuple(f"{k} " for k in keys)
    return tuple(ld.name for ld in loads if ld.name.startswith(prefixes))


def project_loads(d: ProjectDetail, name: str) -> tuple[Load, ...]:
    """The new loads of one project as it will be installed (variant, size, backup heat)."""
    k = catalog.upgrade_kinds()[d.kind]
    if not k.capacity_load:
        return ()
    v = k.variant(d.variant)
    if v is None:
        return ()
    if k.category == "heating":
        # backup the variant does not bring can run with the compressor (not interlocked)
        interlocked = v.strips_interlocked and d.backup_kw <= (v.strips_kw or 0.0)
        return loads_for_upgrade("heating", name=name, va_per_ton=v.va_per_ton, tons=d.size,
                                 strips_kw=d.backup_kw, strips_interlocked=interlocked)
    if k.category == "vehicles":
        return loads_for_upgrade("vehicles", name=name, amps=v.amps)
    volts = 120 if (v.va or 0) <= 1920 else 240
    return loads_for_upgrade(k.category, name=name, va=v.va, volts=volts)


def _service(plan: Plan) -> Service:
    e = plan.home.electrical
    return Service(service_amps=e.service_amps, busbar_amps=e.busbar_rating_amps,
                   main_breaker_amps=e.main_rating_amps, volts=e.voltage_v)


def _dwelling(plan: Plan) -> Dwelling:
    e = plan.home.electrical
    return Dwelling(plan.home.floor_area_ft2, max(e.small_appliance_circuits, 2), max(e.laundry_circuits, 1))


@dataclass(frozen=True)
class CapacityModel:
    """Linear capacity data for the scheduler plus the remedy behind it.

    ``use``: amps each load project adds to today's calculated load (alone; negative when it
    frees room, e.g. a resistance dryer swapped for a heat pump one); ``provided``: amps of room
    the chosen remedy project makes; ``excluded``: remedy projects the plan does not use.
    """

    base_headroom: float
    method: str = "220.83"        # how the existing service is checked: "220.83" or "220.87"
    use: dict[str, float] = field(default_factory=dict)
    provided: dict[str, float] = field(default_factory=dict)
    excluded: frozenset[str] = frozenset()
    notes: tuple[str, ...] = ()
    remedy: Remedy | None = None
    remedy_project: str | None = None
    variant_notes: dict[str, str] = field(default_factory=dict)
    ems_setpoint_va: float | None = None
    connections: dict[frozenset[str], Connection] = field(default_factory=dict)

    def connection(self, pv: set[str] | frozenset[str]) -> Connection | None:
        """The connection of a set of new solar and battery projects (None for none)."""
        return self.connections.get(frozenset(pv)) if pv else None


@dataclass(frozen=True)
class CapacityPlan:
    """The capacity stage's answer: the model, and the projects as the remedy leaves them (a
    lower-power variant where it chose one, the solar connection's cost added)."""

    model: CapacityModel
    details: dict[str, ProjectDetail]
    sizes: dict[str, tuple[ProjectDetail, ...]] = field(default_factory=dict)


REMEDY_PROJECTS = ("panel_upgrade", "service_upgrade", "load_management")


def plan_capacity(ctx: Context) -> CapacityPlan:
    """Choose the cheapest remedy for the end state and express capacity linearly.

    The remedy depends on the home, the options and the exclusions, not on the budget: it is
    computed once per such content and kept in the planner's cache.
    """
    plan = ctx.plan
    key = "capacity:" + json.dumps([{k: v.model_dump(mode="json") for k, v in plan.options.items()},
                                    sorted(plan.choices.exclude), sorted(ctx.details)], sort_keys=True)
    return ctx.cache.memo(key, lambda: _plan_capacity(ctx))


def _plan_capacity(ctx: Context) -> CapacityPlan:
    plan = ctx.plan
    details = dict(ctx.details)
    notes: list[str] = []
    variant_notes: dict[str, str] = {}
    edition = plan.home.electrical.code_edition
    kinds = catalog.upgrade_kinds()
    dwelling, service = _dwelling(plan), _service(plan)
    base = existing_loads(plan)
    measured = measured_demand(plan)
    cont = plan.home.electrical.continuous_loads_at_125
    today = nec220_83(dwelling, base, service, edition=edition)
    if today.headroom_amps < 0:
        notes.append(
            f"by the load calculation the home already uses {today.amps:.0f} A of its "
            f"{today.service_amps:.0f} A service: have an electrician check it; new electric loads "
            "are planned only with a remedy")
    load_pids = [pid for pid, d in details.items() if kinds[d.kind].capacity_load
                 and pid not in plan.choices.exclude]
    proposed = []
    for pid in load_pids:
        d = details[pid]
        k = kinds[d.kind]
        fixed = plan.options.get(pid) is not None and plan.options[pid].variant is not None
        family = [v.id for v in k.variants if v.id != d.variant]
        if d.kind == "heat_pump":  # only the backup-strip choices change the electrical load
            family = [v for v in family if v.startswith("ducted") and d.variant.startswith("ducted")]
        variants = [d.variant] + ([] if fixed else family)
        vs = []
        for vid in variants:
            alt = with_variant(d, plan, ctx.basis, vid) if vid != d.variant else d
            vs.append(Variant(label=vid, loads=project_loads(alt, pid),
                              extra_cost_usd=max(0.0, alt.cost_today_usd - d.cost_today_usd)))
        proposed.append(ProposedLoad(name=pid, variants=tuple(vs),
                                     replaces=_names_for(d.candidate.replaces, base)))
    offered = {pid for pid in REMEDY_PROJECTS if pid in details and pid not in plan.choices.exclude}
    p = performance()
    upgrades: tuple[ServiceUpgrade, ...] = ()
    if "service_upgrade" in offered and service.service_amps < p["service_upgrade_new_amps"]:
        upgrades = (ServiceUpgrade(p["service_upgrade_new_amps"], details["service_upgrade"].cost_today_usd),)
    costs = RemedyCosts(
        ems_usd=details["load_management"].cost_today_usd if "load_management" in offered else None,
        service_upgrades=upgrades, ems_min_setpoint_amps=p["ems_min_setpoint_amps"],
    )
    # the loads decide the service; the solar and battery connection is decided for each set of
    # them the plan may end with (solar_connection.py). With a measured peak, the existing
    # service is checked both ways and the method that needs the cheaper remedy is used.
    remedy = find_remedy(dwelling, base, service, proposed, costs, edition=edition,
                         max_combinations=REMEDY_COMBINATIONS)
    method = "220.83"
    if measured is not None:
        by_peak = find_remedy(dwelling, base, service, proposed, costs, edition=edition,
                              max_combinations=REMEDY_COMBINATIONS, measured=measured,
                              continuous_new_load_at_125=cont)
        if _remedy_cost(by_peak) < _remedy_cost(remedy):
            remedy, method = by_peak, "220.87"
            today = nec220_87(measured, [], service, edition=edition, continuous_new_load_at_125=cont)
    if not remedy.fits:
        notes.append("even the largest remedy on offer does not make every electric load fit the "
                     "service; the plan keeps the loads that fit (see the power view)")
    for name, vid in remedy.choices:
        if name in details and vid != details[name].variant:
            details[name] = with_variant(details[name], plan, ctx.basis, vid)
            variant_notes[name] = (f"{details[name].variant_label}: a lower-power choice that "
                                   f"fits the {service.service_amps:g} A service")
    chosen = None
    ems_setpoint_va = None
    if remedy.service_upgrade is not None:
        chosen = "service_upgrade"
    elif remedy.ems is not None:
        chosen = "load_management"
        ems_setpoint_va = remedy.ems.setpoint_va
    pv = [pid for pid, d in details.items() if d.kind in ("solar", "battery")
          and pid not in plan.choices.exclude]
    # a derated main must still carry the end state's load on today's panel
    load_amps = float(remedy.calc.amps) if remedy.service_upgrade is None else None
    connections = connection_options(ctx.with_details(details), service, load_amps, pv)
    _add_connection_costs(details, connections)
    sizes = _sizes_with_connections(ctx, details, connections, service, load_amps)
    for pid, options in sizes.items():  # the largest that connects stands in until the optimiser chooses
        if not any(o.size == details[pid].size for o in options):
            details[pid] = max(options, key=lambda o: o.size)
    # linear use per load: its amps against today's home, one at a time
    use: dict[str, float] = {}
    for pid in load_pids:
        d = details[pid]
        if method == "220.87":
            after = nec220_87(measured, project_loads(d, pid), service, edition=edition,
                              continuous_new_load_at_125=cont)
        else:
            after = nec220_83(dwelling, _apply(base, d.candidate.replaces, project_loads(d, pid)), service,
                              edition=edition)
        use[pid] = float(after.amps - today.amps)  # negative: a swap that frees room
    provided: dict[str, float] = {}
    if chosen == "service_upgrade":
        # the larger service is checked by 220.82, which counts the new loads together more
        # lightly than the sum of their 220.83 increments: the room it makes is what lets the
        # end state fit exactly (at least the difference of the ratings)
        end_fits_exactly = (sum(use.values()) + float(today.amps) - float(service.limit_amps)
                            + float(remedy.service.limit_amps - remedy.calc.amps))
        provided[chosen] = max(float(remedy.service.limit_amps - service.limit_amps), end_fits_exactly)
    elif chosen == "load_management":
        all_loads = list(base)
        for pid in load_pids:
            d = details[pid]
            all_loads = _apply(all_loads, d.candidate.replaces, project_loads(d, pid))
        plain = (nec220_87(measured, [ld for ld in all_loads if not ld.existing], service, edition=edition,
                           continuous_new_load_at_125=cont) if method == "220.87"
                 else nec220_83(dwelling, all_loads, service, edition=edition))
        provided[chosen] = max(0.0, float(plain.amps - remedy.calc.amps))
    if chosen is None and remedy.needed is False:
        how = " (by your measured peak, NEC 220.87)" if method == "220.87" else ""
        notes.append(f"the service carries every planned electric load{how}: no panel or service upgrade "
                     "needed")
    model = CapacityModel(
        base_headroom=max(float(today.headroom_amps), 0.0), method=method, use=use, provided=provided,
        excluded=frozenset(r for r in REMEDY_PROJECTS if r in details and r != chosen),
        notes=tuple(notes), remedy=remedy, remedy_project=chosen, variant_notes=variant_notes,
        ems_setpoint_va=ems_setpoint_va, connections=connections,
    )
    return CapacityPlan(model, details, sizes)


def refit_connections(ctx: Context, model: CapacityModel) -> CapacityModel:
    """The model with the solar and battery connections found again for the sizes the optimiser
    chose (``ctx.details``): the cheapest connection of each set the plan may end with."""
    plan = ctx.plan
    pv = [pid for pid, d in ctx.details.items() if d.kind in ("solar", "battery")
          and pid not in plan.choices.exclude]
    remedy = model.remedy
    load_amps = float(remedy.calc.amps) if remedy is not None and remedy.service_upgrade is None else None
    return replace(model, connections=connection_options(ctx, _service(plan), load_amps, pv))


def _sizes_with_connections(ctx: Context, details: dict[str, ProjectDetail],
                            connections: dict[frozenset[str], Connection], service: Service,
                            load_amps: float | None) -> dict[str, tuple[ProjectDetail, ...]]:
    """Each size option of the solar and battery projects with the cost of its own connection
    (an array pays its connection, a battery what it adds to the array's); sizes that no
    connection the code allows can take are dropped: the NEC 705.12 / 705.11 limit after
    remedies.

    References
    ----------
    NEC 2023 705.11, 705.12(B), 705.13 (via :mod:`homeplan.planner.solar_connection`).
    """
    out: dict[str, tuple[ProjectDetail, ...]] = {}
    solar = [pid for s in connections for pid in s if details[pid].kind == "solar"][:1]
    for pid, options in ctx.sizes.items():
        if pid not in details or pid in ctx.plan.choices.exclude:
            continue
        kept = []
        for alt in options:
            trial = ctx.with_details({**details, pid: alt})
            if alt.kind == "solar":
                conn = cheapest_connection(trial, frozenset({pid}), service, load_amps)
                extra = conn.cost_usd
            else:
                conn = cheapest_connection(trial, frozenset({pid, *solar}), service, load_amps)
                extra = conn.cost_usd - (connections[frozenset(solar)].cost_usd if solar else 0.0)
            if not conn.fits:
                continue
            if extra > 0 and not alt.quoted:
                alt = replace(alt, cost_today_usd=alt.cost_today_usd + extra,
                              cost_source=f"{alt.cost_source}; plus its connection to the service")
            kept.append(alt)
        if len(kept) > 1:
            out[pid] = tuple(kept)
    return out


def _remedy_cost(remedy: Remedy) -> tuple[float, int]:
    """What a remedy costs (infinite when nothing on offer makes the loads fit), then how many
    changes it makes to the plan as wanted."""
    cost = float("inf") if not remedy.fits or remedy.cost_usd is None else float(remedy.cost_usd)
    return cost, len(remedy.changes)


def measured_demand(plan: Plan) -> MeasuredDemand | None:
    """The plan's measured peak for NEC 220.87, when it gives one and the method applies.

    A 30-day recording may miss the season's heating or cooling: the larger of the home's
    heating or cooling nameplate is added (220.87 exception, the conservative reading). Homes
    with solar or a battery are left to 220.83: the meter does not see the load they supply.

    References
    ----------
    NEC 2023 220.87 and its exception.
    """
    e = plan.home.electrical
    if e.peak_demand_kw is None or plan.home.solar is not None or plan.home.battery is not None:
        return None
    hvac = [ld.va for ld in existing_loads(plan)
            if ld.category in ("heating", "cooling", "heat_pump_compressor", "supplemental_heat")]
    seasonal = (max(hvac) if hvac else 0.0) if e.peak_demand_period == "30_days" else None
    return MeasuredDemand(e.peak_demand_kw, e.peak_demand_period, seasonal)


def _add_connection_costs(details: dict[str, ProjectDetail],
                          connections: dict[frozenset[str], Connection]) -> None:
    """The array pays for its own connection, the battery for what it adds to it."""
    solar = [pid for s in connections for pid in s if details[pid].kind == "solar"]
    for pid in {p for s in connections for p in s}:
        d = details[pid]
        if d.quoted:
            continue
        if d.kind == "solar":
            extra = connections[frozenset({pid})].cost_usd
        else:
            with_solar = frozenset({pid, *solar[:1]})
            alone = connections[frozenset(solar[:1])].cost_usd if solar else 0.0
            extra = connections[with_solar].cost_usd - alone
        if extra > 0:
            details[pid] = replace(d, cost_today_usd=d.cost_today_usd + extra,
                                   cost_source=f"{d.cost_source}; plus its connection to the service")


def _apply(loads: list[Load], replaces: tuple[str, ...], new: tuple[Load, ...]) -> list[Load]:
    gone = set(_names_for(replaces, loads))
    return [ld for ld in loads if ld.name not in gone] + [replace(ld, existing=False) for ld in new]


def state_capacity(ctx: Context, model: CapacityModel, done: set[str], label: str,
                   year: int | None) -> CapacityState:
    """The exact load calculation of the home with ``done`` projects."""
    plan = ctx.plan
    edition = plan.home.electrical.code_edition
    kinds = catalog.upgrade_kinds()
    dwelling, service = _dwelling(plan), _service(plan)
    loads = existing_loads(plan)
    for pid in sorted(done, key=lambda p: ctx.details[p].kind if p in ctx.details else p):
        d = ctx.details.get(pid)
        if d is None or not kinds[d.kind].capacity_load:
            continue
        loads = _apply(loads, d.candidate.replaces, project_loads(d, d.label))
    remedy_note = None
    ems = None
    if model.remedy_project and model.remedy_project in done:
        if model.remedy_project == "service_upgrade" and model.remedy is not None:
            service = Service(service_amps=model.remedy.service.service_amps,
                              busbar_amps=model.remedy.service.busbar_amps,
                              main_breaker_amps=model.remedy.service.service_amps, volts=service.volts)
            remedy_note = f"service upgraded to {service.service_amps:g} A"
        elif model.remedy_project == "load_management" and model.ems_setpoint_va:
            ems = Ems(model.ems_setpoint_va, name="Load management device")
            loads = [replace(ld, ems_controlled=True) if ld.ems_eligible and not ld.existing else ld
                     for ld in loads]
            remedy_note = f"load management holds managed loads to {model.ems_setpoint_va / 240:.0f} A"
    if ems is not None and not any(ld.ems_controlled for ld in loads):
        ems = None
    pv = {p for p in done if p in ctx.details and ctx.details[p].kind in ("solar", "battery")}
    inverter = inverter_amps(ctx, pv)
    conn = model.connection(pv)
    notes: list[str] = []
    if conn is not None and conn.kind == "derated_main" and conn.derated_main_amps is not None \
            and conn.derated_main_amps < service.limit_amps:
        service = Service(service_amps=service.service_amps, busbar_amps=service.busbar_amps,
                          main_breaker_amps=conn.derated_main_amps, volts=service.volts)
        remedy_note = (remedy_note + "; " if remedy_note else "") + conn.words
    measured = measured_demand(plan) if model.method == "220.87" else None
    if remedy_note and "upgraded" in remedy_note:
        calc = nec220_82(dwelling, loads, service, edition=edition)
    elif measured is not None:
        calc = nec220_87(measured, [ld for ld in loads if not ld.existing], service, edition=edition, ems=ems,
                         continuous_new_load_at_125=plan.home.electrical.continuous_loads_at_125)
    else:
        calc = nec220_83(dwelling, loads, service, edition=edition, ems=ems)
    fits = bool(calc.fits)
    if inverter > 0:
        supply_side = conn is not None and conn.kind == "supply_side"
        pcs = conn.pcs_limit_amps if conn is not None and conn.kind == "power_control" else None
        bf = backfeed_check(service, inverter, rule="supply_side" if supply_side else "120",
                            pcs_limit_amps=pcs, edition=edition)
        notes.append(f"{bf.section}: {inverter:.0f} A of solar/battery inverter output; "
                     + ("supply-side connection" if supply_side else
                        f"the panel accepts {bf.max_inverter_amps:.0f} A by the 120 % rule")
                     + (f"; a power control system limits it to {pcs:.0f} A" if pcs else "")
                     + ("" if bf.fits else " - DOES NOT FIT"))
        fits = fits and bool(bf.fits)
    state = _state(calc, label, year, remedy_note, tuple(calc.notes) + tuple(notes))
    return replace(state, fits=fits, near_limit=state.near_limit and fits) if fits != state.fits else state


def _state(calc: LoadCalcResult, label: str, year: int | None, remedy: str | None,
           notes: tuple[str, ...]) -> CapacityState:
    """A load calculation result as the views show it (no factor for rows inside a group)."""
    rows = tuple(CapacityRow(r.load_name, float(r.va), None if r.factor is None else float(r.factor),
                             None if r.counted_va is None else float(r.counted_va), r.section)
                 for r in calc.rows)
    pct = 100.0 * float(calc.amps) / float(calc.service_amps)
    return CapacityState(label=label, year=year, method=calc.method, total_va=float(calc.total_va),
                         amps=float(calc.amps), service_amps=float(calc.service_amps),
                         headroom_amps=float(calc.headroom_amps), fits=bool(calc.fits), rows=rows,
                         remedy=remedy, notes=notes, load_pct=round(pct, 1),
                         near_limit=bool(calc.fits) and pct > practice("near_limit_pct"))


def other_method_capacity(ctx: Context, model: CapacityModel, done: set[str],
                          year: int | None) -> CapacityState:
    """The state checked by the method the plan does not use: NEC 220.87 from the measured peak
    when the plan uses 220.83, and the reverse - shown beside it, an inspector may accept either.

    References
    ----------
    NEC 2023 220.83 and 220.87 (either may show that an existing service carries added loads).
    """
    e = ctx.plan.home.electrical
    when = "today" if year is None else str(year)
    if model.method == "220.87":
        state = state_capacity(ctx, replace(model, method="220.83"), done,
                               f"{when}, by the 220.83 calculation", year)
        return replace(state, notes=state.notes + (
            "the alternative to the measured-peak method the plan uses: an inspector may accept either",))
    label = f"{when}, from your measured peak"
    measured = measured_demand(ctx.plan)
    if measured is None:
        return CapacityState(label=label, year=year, method="NEC 220.87 (not used)", total_va=None,
                             amps=None, service_amps=float(e.service_amps), headroom_amps=None, fits=True,
                             notes=("NEC 220.87 is not used for a home with solar or a battery: the meter "
                                    "does not see the load they supply",))
    probe = replace(model, method="220.87")
    state = state_capacity(ctx, probe, done, label, year)
    return replace(state, notes=state.notes + (
        "an alternative to the 220.83 calculation: an inspector may accept either",))


def breaker_spaces(ctx: Context, d: ProjectDetail, model: CapacityModel | None = None) -> int:
    """Breaker spaces a project's new circuits take in the panel, less those its removal of old
    electric loads frees (negative: it frees more than it takes). A 240 V circuit takes two
    spaces, a 120 V one takes one; solar or a battery connected in the panel takes a two-pole
    backfeed breaker (none on the supply side).

    References
    ----------
    Common practice, no source (a double-pole breaker takes two spaces of a residential panel);
    NEC 2023 705.12(B) (load-side connection through a breaker in the panel).
    """
    if d.kind in ("solar", "battery"):
        conn = model.connection({d.id}) if model is not None else None
        return 0 if conn is not None and conn.kind == "supply_side" else 2
    if not catalog.upgrade_kinds()[d.kind].capacity_load:
        return 0
    today = existing_loads(ctx.plan)
    gone = set(_names_for(d.candidate.replaces, today))
    freed = sum(2 if ld.volts >= 208 else 1 for ld in today if ld.name in gone)
    return sum(2 if ld.volts >= 208 else 1 for ld in project_loads(d, d.label)) - freed
