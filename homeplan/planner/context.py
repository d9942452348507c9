"""What every stage of the planner shares for one plan, and the per-home cache behind it.

:class:`Context` is frozen: a stage that changes the projects (the capacity remedy choosing a
lower-power variant) returns a new context with :meth:`Context.with_details`; nothing is
attached to it on the fly. :class:`PlannerCache` keeps everything that depends only on the home
(weather year, solar geometry, heat-loss calibration, simulated states, incentive estimates),
so a re-plan after a budget or pin change costs a solve and a few look-ups.
"""

from __future__ import annotations

import hashlib
import json
import threading
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, field, replace
from pathlib import Path
from types import MappingProxyType
from typing import TYPE_CHECKING, Any, TypeVar

from homeplan.energy.simulate import EnergyResult, HomeEnergySpec
from homeplan.plan.files import PlanFolder
from homeplan.plan.model import Plan
from homeplan.planner.basis import HomeBasis, home_basis
from homeplan.planner.peaks import meter_peak
from homeplan.planner.projects import ProjectDetail
from homeplan.planner.shared import SharedCache
from homeplan.planner.states import (
    APPLY_ORDER,
    Choice,
    StateEnergy,
    simulate_state,
    state_spec,
    summarise_energy,
)
from homeplan.result.outlook import LifeOutlook

if TYPE_CHECKING:
    import networkx as nx

    from homeplan.planner.diskstore import DiskStore

__all__ = ["Context", "PlannerCache", "content_key"]

T = TypeVar("T")

# price settings the home's basis does not depend on (only today's prices enter the simulation):
# changing them keeps the cached basis and states
_NOT_IN_BASIS: dict[str, Any] = {
    "inflation_pct": True, "fossil_extra_escalation_pct": True, "cost_level": True, "uncertainty": True,
    **{f: {"escalation_pct"} for f in ("electricity", "gas", "propane", "oil", "gasoline", "diesel")},
}


def content_key(*parts: object) -> str:
    """A stable key for cached results: SHA-256 of the parts as sorted JSON."""
    text = json.dumps(parts, sort_keys=True, default=str)
    return hashlib.sha256(text.encode()).hexdigest()


class PlannerCache:
    """Per-home memo of the expensive, budget-independent parts. Thread-safe.

    One home at a time: asking for another home's basis drops everything kept for the last one.
    ``shared``, when given, holds what homes of one place have in common (weather year, solar
    geometry, incentive programs read from files; see :mod:`homeplan.planner.shared`): it is
    asked first, and it is kept when the home changes. A shared cache is not thread-safe: give
    each thread its own.
    With a ``store`` (:class:`~homeplan.planner.diskstore.DiskStore`), the built-in weather year
    is also kept on disk between runs (the command line and the app use the user's store unless
    ``--no-cache``; the library keeps nothing on disk by default).
    """

    def __init__(self, max_states: int = 512, store: DiskStore | None = None,
                 shared: SharedCache | None = None):
        self.store = store
        self._lock = threading.Lock()
        self._basis: dict[str, HomeBasis] = {}
        self._states: dict[tuple[str, frozenset[Choice]], StateEnergy] = {}
        self._memo: dict[str, Any] = {}
        self.max_states = max_states
        self.shared = shared

    def basis(self, plan: Plan, base_dir: PlanFolder | Path | None) -> tuple[str, HomeBasis]:
        """The home's basis (weather, heat loss, today's spec) and its content key."""
        key = content_key(plan.home.model_dump(mode="json"),
                          [a.model_dump(mode="json") for a in plan.appliances],
                          [v.model_dump(mode="json") for v in plan.vehicles],
                          plan.usage.model_dump(mode="json") if plan.usage else None,
                          plan.prices.model_dump(mode="json", exclude=_NOT_IN_BASIS), str(base_dir))
        with self._lock:
            hit = self._basis.get(key)
        if hit is None:
            store = self.store
            make_year = store.weather_year if store else None
            keep = store.keep_array if store else None
            place = None
            if self.shared is not None:
                p = self.shared.place(plan, base_dir, make_year, keep)
                place = (p.weather, p.note, p.solar)
            hit = home_basis(plan, base_dir, make_year, keep, place)
            with self._lock:
                self._basis = {key: hit}  # one home per cache: drop other homes
                self._states.clear()
                self._memo.clear()
        return key, hit

    def memo(self, key: str, make: Callable[[], T]) -> T:
        """Any other budget-independent result, by a content key (dropped with the home)."""
        with self._lock:
            hit = self._memo.get(key)
        if hit is None:
            hit = make()
            with self._lock:
                self._memo[key] = hit
        return hit

    def shared_memo(self, key: str, make: Callable[[], T]) -> T:
        """A result that depends only on what ``key`` names, not on the home (kept in the shared
        cache when there is one, else like :meth:`memo`)."""
        if self.shared is not None:
            return self.shared.memo(key, make)
        return self.memo(key, make)

    def state(self, basis_key: str, choices: frozenset[Choice],
              make: Callable[[], StateEnergy]) -> StateEnergy:
        """The summary of one simulated state of the home (kept for the last ``max_states``)."""
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


@dataclass(frozen=True, eq=False)
class Context:
    """One plan with its home basis, upgrade graph, end-of-life outlooks and sized projects."""

    plan: Plan
    base_dir: PlanFolder | Path | None
    cache: PlannerCache
    basis_key: str
    basis: HomeBasis
    graph: nx.DiGraph
    outlooks: Mapping[str, LifeOutlook]
    details: Mapping[str, ProjectDetail] = field(default_factory=lambda: MappingProxyType({}))

    def __post_init__(self) -> None:
        object.__setattr__(self, "outlooks", MappingProxyType(dict(self.outlooks)))
        object.__setattr__(self, "details", MappingProxyType(dict(self.details)))

    def with_details(self, details: Mapping[str, ProjectDetail]) -> Context:
        """The same plan with these projects (variant, size and cost of each)."""
        return replace(self, details=details)

    @property
    def first_year(self) -> int:
        return self.plan.first_year

    @property
    def years(self) -> list[int]:
        return list(range(self.first_year, self.first_year + self.plan.budget.horizon_years))

    def choice(self, pid: str) -> Choice:
        d = self.details[pid]
        return Choice(pid, d.kind, d.variant, d.size, d.candidate.replaces, d.backup_kw, d.backup_kind)

    def simulate(self, done: Iterable[str], label: str = "") -> EnergyResult:
        """The full simulated typical year (hourly arrays included) with the projects ``done``."""
        return simulate_state(self.basis, self.spec(done, label))

    def spec(self, done: Iterable[str], label: str = "") -> HomeEnergySpec:
        """The home's energy spec with the projects ``done``."""
        choices = sorted((self.choice(p) for p in done if p in self.details),
                         key=lambda c: APPLY_ORDER.get(c.kind, 50))
        return state_spec(self.basis, self.plan, choices, label=label)

    def energy(self, done: Iterable[str], label: str = "") -> StateEnergy:
        """What the roadmap needs from the typical year with the projects ``done`` (cached)."""
        done = frozenset(done)
        choices = frozenset(self.choice(p) for p in done if p in self.details)

        def make() -> StateEnergy:
            spec = self.spec(done, label)
            result = simulate_state(self.basis, spec)
            peak = meter_peak(self.basis.peak, spec, result) if self.basis.peak is not None else None
            return summarise_energy(result, label, peak)

        return self.cache.state(self.basis_key, choices, make)

    def escalation(self, fuel: str) -> float:
        """Yearly price change of a bill fuel (fraction): its own rate, else inflation (plus the
        plan's extra escalation for fossil fuels)."""
        pr = self.plan.prices
        block = {"electricity": pr.electricity, "gas": pr.gas, "propane": pr.propane, "oil": pr.oil,
                 "gasoline": pr.gasoline, "diesel": pr.diesel}[fuel]
        if block.escalation_pct is not None:
            return block.escalation_pct / 100.0
        extra = pr.fossil_extra_escalation_pct if fuel != "electricity" else 0.0
        return (pr.inflation_pct + extra) / 100.0
