"""From a plan to a roadmap: the one function every view calls.

    plan -> graph -> home basis (weather, heat loss) -> projects (variant, size, cost)
         -> energy value of each project -> scheduling problem (MILP) -> solution
         -> full simulation and exact incentives of the chosen plan -> PlanResult

The scheduler sees linear approximations (each project's value measured against the home as it
will be when the project is done); after solving, the chosen plan is re-simulated year by year
and its incentives re-evaluated with the exact rules, and those are the numbers shown. The
values are refreshed once from the first solution's order (solar is worth more once the heat
pump and the EV exist) and the problem re-solved.

``PipelineCache`` keeps everything that depends only on the home (weather year, solar geometry,
heat-loss calibration, simulated states), so a re-plan after a budget or pin change costs one
solve and a few cached look-ups.
"""

from __future__ import annotations

import hashlib
import json
import threading
from dataclasses import dataclass
from pathlib import Path

from homeplan import catalog, graph, lifecycle
from homeplan.graph import MILESTONE_FOR_FUEL
from homeplan.home_energy import Choice, HomeBasis, home_basis, state_spec
from homeplan.plan.model import Plan
from homeplan.projects import ProjectDetail, detail, like_for_like_cost, replaced_fuels
from homeplan.result import EnergySummary, PlanResult, ProjectInfo

OBJECTIVE = {"npv": "max_npv", "emissions": "min_emissions", "gas_off_early": "earliest_gas_closure",
             "out_of_pocket": "min_out_of_pocket"}
"""Plan-file objective -> scheduler objective."""


def _key(*parts) -> str:
    text = json.dumps(parts, sort_keys=True, default=str)
    return hashlib.sha256(text.encode()).hexdigest()


class PipelineCache:
    """Per-home memo of the expensive, budget-independent parts. Thread-safe."""

    def __init__(self, max_states: int = 512):
        self._lock = threading.Lock()
        self._basis: dict[str, HomeBasis] = {}
        self._states: dict[tuple, object] = {}
        self._memo: dict[str, object] = {}
        self.max_states = max_states

    def basis(self, plan: Plan, base_dir: Path | None) -> tuple[str, HomeBasis]:
        key = _key(plan.home.model_dump(mode="json"), [a.model_dump(mode="json") for a in plan.appliances],
                   [v.model_dump(mode="json") for v in plan.vehicles],
                   plan.usage.model_dump(mode="json") if plan.usage else None,
                   plan.prices.model_dump(mode="json"), str(base_dir))
        with self._lock:
            hit = self._basis.get(key)
        if hit is None:
            hit = home_basis(plan, base_dir)
            with self._lock:
                self._basis = {key: hit}  # one home per cache: drop other homes
                self._states.clear()
                self._memo.clear()
        return key, hit

    def memo(self, key: str, make):
        """Any other budget-independent result, by a content key (dropped with the home)."""
        with self._lock:
            hit = self._memo.get(key)
        if hit is None:
            hit = make()
            with self._lock:
                self._memo[key] = hit
        return hit

    def state(self, basis_key: str, choices: frozenset, make):
        k = (basis_key, choices)
        with self._lock:
            hit = self._states.get(k)
        if hit is None:
            hit = make()
            with self._lock:
                if len(self._states) >= self.max_states:
                    self._states.pop(next(iter(self._states)))
                self._states[k] = hit
        return hit


@dataclass(frozen=True)
class StateEnergy:
    """What the roadmap needs from one simulated state (annual figures at today's prices)."""

    bills_usd: dict[str, float]        # by plan fuel name: electricity, gas, propane, oil, gasoline
    units: dict[str, float]            # electricity_kwh, gas_therm, ...
    emissions_kg: float
    peak_kw: float
    summary: EnergySummary


PLAN_FUEL = {"electricity": "electricity", "natural_gas": "gas", "propane": "propane",
             "heating_oil": "oil", "gasoline": "gasoline", "diesel": "diesel"}
UNIT_KEY = {"electricity": "electricity_kwh", "natural_gas": "gas_therm", "propane": "propane_gal",
            "heating_oil": "oil_gal", "gasoline": "gasoline_gal", "diesel": "diesel_gal"}


def summarise_energy(result, label: str) -> StateEnergy:
    monthly = {UNIT_KEY[f]: tuple(float(x) for x in v) for f, v in result.monthly_units.items()
               if f in UNIT_KEY}
    monthly["solar_kwh"] = tuple(float(x) for x in result.monthly_solar_kwh)
    monthly["grid_import_kwh"] = tuple(float(x) for x in result.monthly_grid_import_kwh)
    monthly["grid_export_kwh"] = tuple(float(x) for x in result.monthly_grid_export_kwh)
    annual = {k: float(sum(v)) for k, v in monthly.items()}
    bills = {PLAN_FUEL[f]: float(v.sum()) for f, v in result.monthly_bills_usd.items() if f in PLAN_FUEL}
    emissions = float(sum(result.emissions_kg.values()))
    money_out = sum(v for f, v in bills.items() if f in ("gas", "propane", "oil", "gasoline", "diesel"))
    summary = EnergySummary(label=label, monthly=monthly, annual=annual, bills_usd=bills,
                            emissions_kg=emissions, peak_kw=float(result.peak_kw),
                            fuel_money_out_usd=money_out, peak_winter_kw=float(result.peak_winter_kw),
                            peak_summer_kw=float(result.peak_summer_kw),
                            backup_heat_hours=int(result.backup_heat_hours))
    units = {UNIT_KEY[f]: float(v.sum()) for f, v in result.monthly_units.items() if f in UNIT_KEY}
    return StateEnergy(bills_usd=bills, units=units, emissions_kg=emissions,
                       peak_kw=float(result.peak_kw), summary=summary)


# ------------------------------------------------------------------------------ context


@dataclass
class Context:
    """Everything the pipeline steps share for one plan."""

    plan: Plan
    base_dir: Path | None
    cache: PipelineCache
    basis_key: str
    basis: HomeBasis
    g: object
    details: dict[str, ProjectDetail]
    outlooks: dict[str, lifecycle.LifeOutlook]
    notes: list[str]

    @property
    def first_year(self) -> int:
        return self.plan.first_year

    @property
    def years(self) -> list[int]:
        return list(range(self.first_year, self.first_year + self.plan.budget.horizon_years))

    def choice(self, pid: str) -> Choice:
        d = self.details[pid]
        return Choice(pid, d.kind, d.variant, d.size, d.candidate.replaces)

    def simulate(self, done, label: str = ""):
        """The full simulated typical year (hourly arrays included) with the projects ``done``."""
        from homeplan.home_energy import simulate_state

        choices = sorted((self.choice(p) for p in done if p in self.details),
                         key=lambda c: APPLY_ORDER.get(c.kind, 50))
        return simulate_state(self.basis, state_spec(self.basis, self.plan, choices, label=label))

    def energy(self, done: frozenset[str] | set[str], label: str = "") -> StateEnergy:
        """What the roadmap needs from the typical year with the projects ``done`` (cached)."""
        choices = frozenset(self.choice(p) for p in done if p in self.details)
        return self.cache.state(self.basis_key, choices,
                                lambda: summarise_energy(self.simulate(done, label), label))

    def escalation(self, fuel: str) -> float:
        """Yearly price change of a fuel (fraction)."""
        pr = self.plan.prices
        block = {"electricity": pr.electricity, "gas": pr.gas, "propane": pr.propane, "oil": pr.oil,
                 "gasoline": pr.gasoline, "diesel": pr.diesel}[fuel]
        if block.escalation_pct is not None:
            return block.escalation_pct / 100.0
        extra = pr.fossil_extra_escalation_pct if fuel != "electricity" else 0.0
        return (pr.inflation_pct + extra) / 100.0


APPLY_ORDER = {"envelope": 0, "heat_pump": 1, "heat_pump_water_heater": 2, "induction_range": 3,
                "heat_pump_dryer": 4, "ev": 5, "solar": 6, "battery": 7, "close_gas": 8,
                "remove_propane_tank": 8, "remove_oil_tank": 8}


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


def build_context(plan: Plan, base_dir: Path | None, cache: PipelineCache) -> Context:
    g = graph.build_graph(plan)
    basis_key, basis = cache.basis(plan, base_dir)
    outlooks = {o.key: o for o in lifecycle.plan_outlooks(plan, max(plan.budget.horizon_years, 10))}
    cands = [g.nodes[n]["candidate"] for n in graph.project_nodes(g)]
    ctx = Context(plan, base_dir, cache, basis_key, basis, g, {}, outlooks,
                  [basis.weather_note, *basis.notes])
    # solar is sized to the electrified home's use (every other project done)
    electrified = {c.id for c in cands if c.kind not in ("solar", "battery", "roof") and
                   not catalog.upgrade_kinds()[c.kind].capacity_remedy}
    provisional = {c.id: detail(plan, c, basis, 0.0, 1.0) for c in cands if c.kind != "solar"}
    ctx.details = provisional
    load_kwh = ctx.energy(frozenset(electrified)).units.get("electricity_kwh", 0.0)
    yield_kwh = specific_yield(basis, plan)
    for c in cands:
        if c.kind == "solar":
            ctx.details[c.id] = detail(plan, c, basis, load_kwh, yield_kwh)
    ctx.details = {c.id: ctx.details[c.id] for c in cands}
    return ctx


def specific_yield(basis: HomeBasis, plan: Plan) -> float:
    """kWh AC per kW DC per year on this roof (pvlib PVWatts via the energy engine)."""
    from homeplan.energy.solar import SolarArraySpec

    roof = plan.home.roof
    spec = SolarArraySpec(dc_kw=1.0, tilt_deg=roof.tilt_deg if roof else 25.0,
                          azimuth_deg=roof.azimuth_deg if roof else 180.0)
    return float(basis.site.pv_ac_kw(spec).sum())


# ------------------------------------------------------------------------------ entry point


def plan_roadmap(plan: Plan, base_dir: Path | str | None = None,
                 cache: PipelineCache | None = None) -> PlanResult:
    """The roadmap for a plan, with everything the views show.

    Raises :class:`homeplan.errors.PlanRuleError` for rules the plan breaks (unknown project id,
    cycle in the user's order, unreadable weather file). An infeasible request is not an error:
    the roadmap's status says so and explains what would make it feasible.
    """
    from homeplan.plan_schedule import schedule
    from homeplan.roadmap_build import build_result

    cache = cache or PipelineCache()
    ctx = build_context(plan, Path(base_dir) if base_dir else None, cache)
    outcome = schedule(ctx)
    return build_result(ctx, outcome)


def project_infos(ctx: Context) -> tuple[ProjectInfo, ...]:
    ch = ctx.plan.choices
    return tuple(
        ProjectInfo(
            id=d.id, kind=d.kind, label=d.label, variant=d.variant, variant_label=d.variant_label,
            size=d.size, size_unit=d.size_unit, cost_usd=d.cost_today_usd, cost_source=d.cost_source,
            replaces=d.candidate.replaces, cautions=d.candidate.cautions,
            excluded=d.id in ch.exclude, pinned_year=ch.pins.get(d.id),
        )
        for d in ctx.details.values()
    )


def fossil_projects(ctx: Context) -> list[str]:
    """Projects that take the home off a combustion fuel (appliances, cars, fuel milestones)."""
    out = []
    for pid, d in ctx.details.items():
        if d.kind == "ev" or d.kind in MILESTONE_FOR_FUEL.values() or replaced_fuels(ctx.plan, d.candidate) & {"gas", "propane", "oil"}:
            out.append(pid)
    return out


def lfl_cost(ctx: Context, key: str) -> float:
    """Like-for-like replacement cost today of an appliance by its key (0 if unknown)."""
    a = next((x for x in ctx.plan.appliances if x.key == key), None)
    if a is None:
        return 0.0
    return like_for_like_cost(a.kind, lifecycle.appliance_fuel(a), ctx.plan.prices.cost_level)


def breakdown_cost(ctx: Context, key: str, t: int, item_cost_usd: float | None = None) -> float:
    """Expected cost in year index t of the item ``key`` breaking that year (year-t dollars).

    The chance it fails in that year (given it works today, Weibull) times an emergency
    like-for-like replacement, less the share of that replacement still unused at the end of
    the horizon (straight-line, NIST Handbook 135). The same figure is the scheduler's penalty
    for leaving the item in place and the roadmap's expected breakdown cost, so the two agree.
    """
    o = ctx.outlooks.get(key)
    if o is None or o.kind == "vehicle" or t >= len(o.yearly_failure_pct):
        return 0.0
    T = len(ctx.years)
    cost = (item_cost_usd if item_cost_usd is not None else lfl_cost(ctx, key))
    cost *= (1 + ctx.plan.prices.inflation_pct / 100.0) ** t
    rate = ctx.plan.budget.discount_rate_pct
    unused = max(0.0, 1.0 - (T - t) / max(o.median_life_years, 1.0))
    return o.yearly_failure_pct[t] / 100.0 * cost * (1.0 - unused * discount(rate, T) / discount(rate, t))


def replaceable_items(ctx: Context) -> dict[str, tuple[str, float | None]]:
    """Item key -> (project that replaces it, item cost override) for every appliance or roof a
    candidate project replaces."""
    out: dict[str, tuple[str, float | None]] = {}
    for pid, d in ctx.details.items():
        for key in d.candidate.replaces:
            if key in ctx.outlooks and ctx.outlooks[key].kind != "vehicle":
                out[key] = (pid, d.cost_today_usd if key == "roof" else None)
    return out


def discount(rate_pct: float, t: float) -> float:
    return (1.0 + rate_pct / 100.0) ** -t
