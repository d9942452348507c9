"""Which upgrades apply to a home, and what must come before what.

The graph is a plain ``networkx.DiGraph`` whose nodes are candidate projects (data: the
``Candidate`` record) plus any-of group nodes, and whose edges carry ``kind``. It is built from
:func:`upgrade_order`, the same nodes and edges as plain data, which ``homeplan check`` reads
without loading networkx. Edge kinds:

- ``requires``: hard order, the head cannot be done before the tail (a charger before the car);
- ``better_before``: soft order worth following (air sealing before sizing a heat pump; the roof
  before solar when the roof has less life left than the panels);
- ``any_of``: from an alternative to a group node, and from the group node to the project that
  needs one of the alternatives (panel upgrade OR service upgrade OR load management OR a
  lower-power variant, whichever the capacity check finds enough).

References
----------
NEC 2023 Articles 220 and 625 for why large new loads may need a capacity remedy;
common practice, no source: air sealing before heat pump sizing, roof before solar.
"""

from __future__ import annotations

import difflib
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

from homeplan import catalog
from homeplan.errors import PlanRuleError
from homeplan.plan.fuels import HOME_FUELS, appliance_fuel
from homeplan.plan.model import Appliance, Plan
from homeplan.planner import lifecycle

__all__ = [
    "CAPACITY_GROUP",
    "INSTALL_ORDER",
    "REMEDY_COMBINATIONS",
    "MILESTONE_FOR_FUEL",
    "Candidate",
    "UpgradeOrder",
    "any_of_groups",
    "build_graph",
    "candidates",
    "dual_fuel_backup",
    "heat_pump_variant",
    "install_order",
    "layers",
    "prerequisites_closure",
    "project_nodes",
    "to_dot",
    "upgrade_order",
]

HEATING_KINDS = ("furnace", "boiler", "central_ac", "room_ac", "baseboard")
CAPACITY_GROUP = "any_of:capacity"
LOWER_POWER = "lower_power_variants"
MILESTONE_FOR_FUEL = {"gas": "close_gas", "propane": "remove_propane_tank", "oil": "remove_oil_tank"}
REMEDY_COMBINATIONS = 50_000
"""How many mixes of the new loads' variants and service remedies the capacity stage weighs at
most (its limit for :func:`homeplan.electrical.remedies.find_remedy`); a plan with more is refused
here, where ``check`` sees it."""

INSTALL_ORDER: dict[str, int] = {
    "panel_upgrade": 0, "service_upgrade": 0, "load_management": 0, "panel_space": 0,
    "roof": 1, "envelope": 2, "heat_pump": 3, "heat_pump_water_heater": 4, "induction_range": 5,
    "heat_pump_dryer": 6, "ev_charger": 7, "ev": 8, "solar": 9, "battery": 10,
    "close_gas": 20, "remove_propane_tank": 20, "remove_oil_tank": 20,
}
"""Safe order of work within a year, by upgrade kind: room on the service first, the roof before
anything goes on it, the building shell before the equipment sized for it, the new heat source
and appliances before the fuel they replace is shut off, the charger before the car (common
practice, no source). The upgrade graph's own edges come first (:func:`install_order`)."""


@dataclass(frozen=True)
class Candidate:
    """A project that applies to this home."""

    id: str
    kind: str
    label: str
    replaces: tuple[str, ...] = ()       # keys of appliances/vehicles it replaces
    variant: str | None = None           # default variant for this home
    cautions: tuple[str, ...] = ()
    milestone: bool = False
    notes: tuple[str, ...] = field(default_factory=tuple)


def _has_ducts(plan: Plan) -> bool:
    if plan.home.has_ducts is not None:
        return plan.home.has_ducts
    return any(a.kind in ("furnace", "central_ac", "heat_pump") for a in plan.appliances)


def heat_pump_variant(plan: Plan, design_temp_f: float | None) -> str:
    """Default heat pump variant: ductless without ducts, cold-climate below 5 F design."""
    if not _has_ducts(plan):
        return "ductless"
    if design_temp_f is not None and design_temp_f < 5:
        return "cold_climate"
    return "ducted"


def candidates(plan: Plan) -> list[Candidate]:
    """The projects that apply to this home, in a stable order."""
    kinds = catalog.upgrade_kinds()
    out: list[Candidate] = []

    def add(cid: str, kind: str, **kw) -> None:
        k = kinds[kind]
        label = kw.pop("label", k.label)
        out.append(Candidate(cid, kind, label, cautions=k.cautions, milestone=k.milestone, **kw))

    apps = plan.appliances
    # a new heat pump replaces the heating and cooling equipment there is, an old heat pump
    # included - but a fuel-burning furnace or boiler kept as its dual-fuel backup stays
    kept = dual_fuel_backup(plan)
    heating = [a for a in apps if a.kind in (*HEATING_KINDS, "heat_pump", "mini_split") and a is not kept]
    add("heat_pump", "heat_pump", replaces=tuple(a.key for a in heating),
        variant=heat_pump_variant(plan, plan.home.climate.heating_design_f))

    def add_for(a, kind: str, variant: str) -> None:  # one per appliance; a second one is named
        cid = _unique(out, kind, a.key)
        extra = {} if cid == kind else {"label": f"{kinds[kind].label} (replaces {a.key})"}
        add(cid, kind, replaces=(a.key,), variant=variant, **extra)

    for a in apps:
        fuel = appliance_fuel(a)
        if a.kind == "water_heater" and lifecycle.appliance_type(a) != "heat_pump":
            add_for(a, "heat_pump_water_heater", "v240")
        elif a.kind in ("range", "cooktop") and fuel in HOME_FUELS:
            add_for(a, "induction_range", "full")
        elif a.kind == "dryer" and (fuel in HOME_FUELS or (fuel == "electric" and a.type != "heat_pump")):
            # a resistance dryer swapped for a heat pump one also frees room on the service
            add_for(a, "heat_pump_dryer", "v120")
    ev_ids = []
    for i, v in enumerate(plan.vehicles):
        if v.fuel != "electric":
            key = plan.vehicle_key(i)
            ev_ids.append(f"ev:{key}")
            what = v.name or (f"the {v.fuel.replace('_', '-')} {v.body}" if not v.id else key)
            add(f"ev:{key}", "ev", replaces=(key,), label=f"Electric vehicle (replaces {what})")
    if ev_ids and not any(v.fuel == "electric" for v in plan.vehicles):
        add("ev_charger", "ev_charger", variant="a40")  # a home with an EV already has a charger
    roof = plan.home.roof
    if plan.home.solar is None and not (roof is not None and roof.usable_area_ft2 == 0):
        add("solar", "solar")
    if plan.home.battery is None:
        add("battery", "battery")
    if plan.home.envelope != "tight":
        add("envelope", "envelope")
    if roof is not None and roof.year_installed is not None:
        o = lifecycle.roof_outlook(roof, plan.first_year, plan.budget.horizon_years)
        if o.replace_by_year <= plan.first_year + plan.budget.horizon_years + 5:
            add("roof", "roof", replaces=("roof",))
    for remedy in ("panel_upgrade", "service_upgrade", "load_management"):
        add(remedy, remedy)
    if plan.home.electrical.free_spaces is not None:  # known: the new circuits must find room
        add("panel_space", "panel_space")
    replaced = {key for c in out for key in c.replaces}
    for fuel, milestone in MILESTONE_FOR_FUEL.items():
        on_fuel = [a for a in apps if appliance_fuel(a) == fuel]
        # a fuel is closed only when every appliance on it can be replaced
        if on_fuel and all(a.key in replaced for a in on_fuel):
            add(milestone, milestone)
    return out


def dual_fuel_backup(plan: Plan) -> Appliance | None:
    """The fuel-burning furnace or boiler kept as the new heat pump's backup, when the plan asks
    for it (``options.heat_pump.backup: existing``) and the home has one."""
    opt = plan.options.get("heat_pump")
    if opt is None or opt.backup != "existing":
        return None
    return next((a for a in plan.appliances if a.kind in ("furnace", "boiler")
                 and appliance_fuel(a) in HOME_FUELS), None)


def _unique(existing: list[Candidate], base: str, key: str) -> str:
    ids = {c.id for c in existing}
    return base if base not in ids else f"{base}:{key}"


@dataclass(frozen=True)
class UpgradeOrder:
    """The upgrade graph as plain data, checked: what :func:`build_graph` turns into a networkx
    graph. ``check`` needs no more than this, and so does not load networkx."""

    candidates: tuple[Candidate, ...]
    groups: Mapping[str, Mapping[str, Any]]             # any-of group node -> its attributes
    edges: Mapping[tuple[str, str], Mapping[str, str]]  # (before, after) -> kind, why; in the order added

    @property
    def project_ids(self) -> list[str]:
        return [c.id for c in self.candidates]


def upgrade_order(plan: Plan) -> UpgradeOrder:
    """The projects of the upgrade graph, its any-of groups and its edges (see the module
    docstring for their kinds), in the order :func:`build_graph` adds them.

    Raises PlanRuleError for unknown project ids in the plan's choices and for cycles that the
    user's extra order creates, naming the cycle.
    """
    kinds = catalog.upgrade_kinds()
    cands = candidates(plan)
    ids = {c.id for c in cands}
    by_kind: dict[str, list[str]] = {}
    for c in cands:
        by_kind.setdefault(c.kind, []).append(c.id)
    edges: dict[tuple[str, str], dict[str, str]] = {}
    groups: dict[str, dict[str, Any]] = {}

    def edge(a: str, b: str, kind: str, why: str) -> None:
        if a in ids and b in ids and a != b:
            edges[a, b] = {"kind": kind, "why": why}

    for c in cands:
        k = kinds[c.kind]
        for req in k.requires:
            for r in by_kind.get(req, []):
                edge(r, c.id, "requires", f"{kinds[req].label} comes before {k.label.lower()}")
        for bb in k.better_before:
            for r in by_kind.get(bb, []):
                edge(r, c.id, "better_before", f"{kinds[bb].label} is better done before {k.label.lower()}")
    # battery with existing solar needs no new array
    if plan.home.solar is not None and "battery" in ids:
        edges.pop(("solar", "battery"), None)
    # the roof before solar: hard when the roof is near its end, soft when it has less life than panels
    if "roof" in ids and "solar" in ids and plan.home.roof is not None:
        o = lifecycle.roof_outlook(plan.home.roof, plan.first_year)
        left = o.expected_end_year - plan.first_year
        if left < 10:
            edge("roof", "solar", "requires",
                 f"the roof has about {left} years left; replace it before adding panels")
        elif left < kinds["solar"].life_years:
            edge("roof", "solar", "better_before",
                 f"the roof has about {left} years left, less than the panels' "
                 f"{kinds['solar'].life_years:.0f}")
        else:
            edges.pop(("roof", "solar"), None)
    # closing a fuel needs every appliance on that fuel replaced
    for fuel, milestone in MILESTONE_FOR_FUEL.items():
        if milestone not in ids:
            continue
        for c in cands:
            if c.milestone:
                continue
            for key in c.replaces:
                a = next((x for x in plan.appliances if x.key == key), None)
                if a is not None and appliance_fuel(a) == fuel:
                    edge(c.id, milestone, "requires", f"the {a.key.replace('_', ' ')} burns {fuel}")
    # any-of capacity alternatives for the big new loads
    remedies = [r for r in ("panel_upgrade", "service_upgrade", "load_management") if r in ids]
    loads = [c.id for c in cands if kinds[c.kind].capacity_load]
    if remedies and loads:
        groups[CAPACITY_GROUP] = {"kind": "any_of", "label": "enough electrical capacity",
                                  "alternatives": (*remedies, LOWER_POWER)}
        for r in remedies:
            edges[r, CAPACITY_GROUP] = {"kind": "any_of", "why": "one way to make room on the service"}
        for load in loads:
            edges[CAPACITY_GROUP, load] = {"kind": "any_of",
                                           "why": "needs room on the service if the load calculation says so"}
    PlanRuleError.gather(_apply_user_order(edges, plan, ids) + _check_choice_ids(plan, ids))
    _check_option_variants(plan, {c.id: c.kind for c in cands})
    _check_capacity_choices(plan, cands)
    order = UpgradeOrder(tuple(cands), groups, edges)
    hard = [e for e, d in edges.items() if d["kind"] != "any_of"]
    if _has_cycle(ids, hard):
        # networkx names the cycle; only a plan whose order makes one gets here
        import networkx as nx

        cycle = nx.find_cycle(_hard_graph(nx, order))
        names = " -> ".join([u for u, _ in cycle] + [cycle[0][0]])
        raise PlanRuleError(("choices", "require_before"), f"the order makes a cycle: {names}",
                            "remove one of these entries from choices.require_before")
    return order


def _has_cycle(nodes: set[str], edges: list[tuple[str, str]]) -> bool:
    """Whether the directed edges make a cycle: Kahn's algorithm (A. B. Kahn, "Topological
    sorting of large networks", CACM 5(11), 1962) removes every node once the graph has none."""
    into = dict.fromkeys(nodes, 0)
    out: dict[str, list[str]] = {n: [] for n in nodes}
    for u, v in edges:
        out[u].append(v)
        into[v] += 1
    ready = [n for n, k in into.items() if k == 0]
    seen = 0
    while ready:
        n = ready.pop()
        seen += 1
        for v in out[n]:
            into[v] -= 1
            if into[v] == 0:
                ready.append(v)
    return seen < len(into)


def _hard_graph(nx, order: UpgradeOrder):
    """The hard order as networkx searches it for a cycle: the edges in the order the upgrade
    graph lists them (by their first project, as added), then the other projects. The cycle
    networkx names follows this order."""
    place = {n: i for i, n in enumerate([*order.project_ids, *order.groups])}
    hard = sorted((e for e, d in order.edges.items() if d["kind"] != "any_of"), key=lambda e: place[e[0]])
    g = nx.DiGraph(hard)
    g.add_nodes_from(order.project_ids)
    return g


def build_graph(plan: Plan):
    """The upgrade graph for this home: a networkx ``DiGraph`` of :func:`upgrade_order` (see the
    module docstring for node and edge kinds).

    Raises PlanRuleError for unknown project ids in the plan's choices and for cycles that the
    user's extra order creates, naming the cycle.
    """
    import networkx as nx

    order = upgrade_order(plan)
    g = nx.DiGraph()
    for c in order.candidates:
        g.add_node(c.id, candidate=c, kind="project")
    for n, attrs in order.groups.items():
        g.add_node(n, **attrs)
    for (u, v), attrs in order.edges.items():
        g.add_edge(u, v, **attrs)
    return g


def _suggest(name: str, ids: set[str], what: str = "projects for this home") -> str:
    close = difflib.get_close_matches(name, sorted(ids), n=1, cutoff=0.5)
    return f"did you mean '{close[0]}'?" if close else f"{what}: {', '.join(sorted(ids))}"


def _apply_user_order(edges: dict[tuple[str, str], dict[str, str]], plan: Plan,
                      ids: set[str]) -> list[PlanRuleError]:
    """Add the user's order to the graph; the unknown ids it names, as errors (all of them)."""
    errors = []
    for after, befores in plan.choices.require_before.items():
        if after not in ids:
            errors.append(PlanRuleError(("choices", "require_before", after),
                                        f"unknown project '{after}'", _suggest(after, ids)))
            continue
        for i, before in enumerate(befores):
            if before not in ids:
                errors.append(PlanRuleError(("choices", "require_before", after, i),
                                            f"unknown project '{before}'", _suggest(before, ids)))
                continue
            edges[before, after] = {"kind": "requires", "why": "your choice"}
    return errors


def _check_capacity_choices(plan: Plan, cands: list[Candidate]) -> None:
    """The capacity stage weighs every mix of the new loads' variants with every remedy; refuse
    a plan with more mixes than it checks (a dozen water heaters), saying how to cut them."""
    kinds = catalog.upgrade_kinds()
    mixes = 1
    for c in cands:
        k = kinds[c.kind]
        if k.capacity_load and c.id not in plan.choices.exclude:
            opt = plan.options.get(c.id)
            mixes *= 1 if (opt is not None and opt.variant) else max(1, len(k.variants))
    most = REMEDY_COMBINATIONS
    remedies_per_mix = 12  # service as is or upgraded, x 3 solar connections, x with/without EMS
    if mixes * remedies_per_mix > most:
        raise PlanRuleError(("appliances",), f"the new electric loads can be chosen in {mixes:,} ways, "
                            f"more than the capacity check weighs ({most // remedies_per_mix:,})",
                            "choose the variant of some projects under options (e.g. options: "
                            "{heat_pump_water_heater: {variant: v240}}), exclude some, or list fewer appliances")


def _check_option_variants(plan: Plan, kind_of: dict[str, str]) -> None:
    """A variant named in the plan's options must be one the project's kind has."""
    kinds = catalog.upgrade_kinds()
    for pid, opt in plan.options.items():
        if opt.variant is None or pid not in kind_of:
            continue
        known = {v.id for v in kinds[kind_of[pid]].variants}
        if opt.variant not in known:
            raise PlanRuleError(("options", pid, "variant"), f"'{opt.variant}' is not a variant of {pid}",
                                _suggest(opt.variant, known, f"variants of {pid}") if known
                                else f"{pid} has no variants; remove the key")


def _check_choice_ids(plan: Plan, ids: set[str]) -> list[PlanRuleError]:
    """Every pin, exclusion, option and failed appliance that names nothing in the home, and
    every pin outside the plan's years."""
    errors = []
    for pid in plan.choices.pins:
        if pid not in ids:
            errors.append(PlanRuleError(("choices", "pins", pid), f"unknown project '{pid}'",
                                        _suggest(pid, ids)))
    for i, pid in enumerate(plan.choices.exclude):
        if pid not in ids:
            errors.append(PlanRuleError(("choices", "exclude", i), f"unknown project '{pid}'",
                                        _suggest(pid, ids)))
    for pid in plan.options:
        if pid not in ids:
            errors.append(PlanRuleError(("options", pid), f"unknown project '{pid}'", _suggest(pid, ids)))
    keys = {a.key for a in plan.appliances}
    for i, key in enumerate(plan.choices.failed_now):
        if key not in keys:
            errors.append(PlanRuleError(("choices", "failed_now", i), f"unknown appliance '{key}'",
                                        _suggest(key, keys, "appliances in the plan")))
    last = plan.first_year + plan.budget.horizon_years - 1
    for pid, year in plan.choices.pins.items():
        if pid in ids and not plan.first_year <= year <= last:
            errors.append(PlanRuleError(("choices", "pins", pid),
                                        f"{pid} is pinned to {year}, outside the plan's years "
                                        f"{plan.first_year}-{last}", "pick a year inside the horizon"))
    return errors


def prerequisites_closure(g, pid: str) -> set[str]:
    """Every project that must be done before ``pid`` (transitively, hard order only)."""
    out: set[str] = set()
    stack = [pid]
    while stack:
        n = stack.pop()
        for u, _, d in g.in_edges(n, data=True):
            if d["kind"] == "requires" and u not in out and g.nodes[u].get("kind") == "project":
                out.add(u)
                stack.append(u)
    return out


def install_order(g, ranks: Mapping[str, float], urgent: frozenset[str] = frozenset()) -> list[str]:
    """The items of ``ranks`` (project id -> rank, e.g. from :data:`INSTALL_ORDER`) in a safe
    order: every "requires" and "better before" edge of the graph between two of them is kept,
    and otherwise lower ranks come first (then ids, for a stable answer). An ``urgent`` project
    (an emergency replacement) does not wait for "better before" work."""
    import networkx as nx

    h = nx.DiGraph()
    h.add_nodes_from(ranks)
    h.add_edges_from((u, v) for u, v, d in g.edges(data=True)
                     if u in ranks and v in ranks and (d["kind"] == "requires" or (
                         d["kind"] == "better_before" and v not in urgent)))
    return list(nx.lexicographical_topological_sort(h, key=lambda n: (ranks[n], n)))


def project_nodes(g) -> list[str]:
    return [n for n, d in g.nodes(data=True) if d.get("kind") == "project"]


def layers(g) -> list[list[str]]:
    """Topological layers of the projects over hard and soft order (any-of groups flattened)."""
    import networkx as nx

    h = nx.DiGraph()
    h.add_nodes_from(project_nodes(g))
    for u, v, d in g.edges(data=True):
        if d["kind"] in ("requires", "better_before"):
            h.add_edge(u, v)
    return [sorted(layer) for layer in nx.topological_generations(h)]


def any_of_groups(g) -> dict[str, dict]:
    """Group node -> {alternatives, needed_by}."""
    out = {}
    for n, d in g.nodes(data=True):
        if d.get("kind") == "any_of":
            out[n] = {"label": d["label"], "alternatives": list(d["alternatives"]),
                      "needed_by": sorted(g.successors(n))}
    return out


def to_dot(g) -> str:
    """Graphviz DOT text of the graph (solid: requires, dashed: better before, dotted: any of)."""
    style = {"requires": "solid", "better_before": "dashed", "any_of": "dotted"}
    lines = ["digraph upgrades {", '  rankdir=LR;', '  node [shape=box, fontname="Helvetica"];']
    for n, d in g.nodes(data=True):
        label = d["candidate"].label if d.get("kind") == "project" else f"one of: {', '.join(d['alternatives'])}"
        shape = "" if d.get("kind") == "project" else ", shape=diamond"
        lines.append(f'  "{_dot_escape(n)}" [label="{_dot_escape(label)}"{shape}];')
    for u, v, d in g.edges(data=True):
        lines.append(f'  "{_dot_escape(u)}" -> "{_dot_escape(v)}" [style={style[d["kind"]]}, '
                     f'tooltip="{_dot_escape(d.get("why", ""))}"];')
    lines.append("}")
    return "\n".join(lines) + "\n"


def _dot_escape(text: str) -> str:
    return str(text).replace("\\", "\\\\").replace('"', '\\"').replace("\n", " ")
