"""How the solar and battery the plan may add connect to the service, and what that costs.

For every set of new inverters the plan could end with (the array alone, the battery alone when
the home has solar already, both), the cheapest connection that the code allows is found:
the panel as it is (the 120 % rule), a power control system that keeps the battery's output
within the panel's allowance, a derated main breaker (which must still carry the home's
calculated load), or a supply-side connection. The array's project pays for its own connection;
the battery's project pays what it adds. The roadmap then checks each year's state with the
connection of the inverters it actually has.

References
----------
NEC 2023 705.12(B) (120 % rule, derated main), 705.11 (supply-side connection), 705.13 (power
control systems), 230.79(C) (one-family service at least 100 A).
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import combinations

from homeplan.catalog import performance
from homeplan.electrical.loads import Service
from homeplan.electrical.nec705 import backfeed_check, derated_main_options
from homeplan.planner.context import Context

__all__ = ["Connection", "connection_options", "inverter_amps"]


@dataclass(frozen=True)
class Connection:
    """The connection of one set of new inverters (plus any the home has already).

    ``kind``: ``panel`` (fits the busbar as it is), ``power_control`` (705.13 limit),
    ``derated_main`` or ``supply_side``.
    """

    projects: frozenset[str]
    inverter_amps: float
    kind: str
    cost_usd: float
    derated_main_amps: float | None = None
    pcs_limit_amps: float | None = None

    @property
    def words(self) -> str:
        if self.kind == "derated_main":
            return f"main breaker derated to {self.derated_main_amps:g} A for the solar connection (NEC 705.12(B))"
        if self.kind == "supply_side":
            return "supply-side solar connection (NEC 705.11): the panel's busbar cannot take the backfeed"
        if self.kind == "power_control":
            return (f"a power control system keeps solar and battery output to {self.pcs_limit_amps:.0f} A, "
                    "what the panel accepts (NEC 705.13)")
        return "connects to the panel within its 120 % allowance (NEC 705.12(B))"


def inverter_amps(ctx: Context, pids: set[str] | frozenset[str]) -> float:
    """Inverter output current of the new solar and battery ``pids`` and of any the home has, A
    (an array's AC rating at a 1.2 DC/AC ratio, the PVWatts default; a battery at its power)."""
    p = performance()
    amps = 0.0
    for pid in pids:
        d = ctx.details[pid]
        if d.kind == "solar":
            amps += d.size / 1.2 * 1000.0 / 240.0
        elif d.kind == "battery":
            amps += p["battery_default_kw"] * d.size / p["battery_default_kwh"] * 1000 / 240
    h = ctx.plan.home
    if h.solar is not None:
        amps += (h.solar.inverter_kw or h.solar.size_kw / 1.2) * 1000.0 / 240.0
    if h.battery is not None:
        amps += h.battery.power_kw * 1000.0 / 240.0
    return amps


def _cheapest(ctx: Context, projects: frozenset[str], service: Service,
              load_amps: float | None) -> Connection:
    p = performance()
    edition = ctx.plan.home.electrical.code_edition
    amps = inverter_amps(ctx, projects)
    if backfeed_check(service, amps, rule="120", edition=edition).fits:
        return Connection(projects, amps, "panel", 0.0)
    options: list[Connection] = []
    kinds = {ctx.details[pid].kind for pid in projects}
    if "battery" in kinds:
        # a listed power control system limits the battery's output: only the rest must fit
        solar_only = frozenset(pid for pid in projects if ctx.details[pid].kind == "solar")
        rest = inverter_amps(ctx, solar_only) if solar_only else inverter_amps(ctx, frozenset())
        check = backfeed_check(service, amps, rule="120", edition=edition)
        if rest <= check.max_inverter_amps + 1e-9:
            options.append(Connection(projects, amps, "power_control", p["pcs_usd"],
                                      pcs_limit_amps=check.max_inverter_amps))
    derates = derated_main_options(service, load_amps, amps, rule="120", edition=edition) \
        if load_amps is not None else []
    for opt in derates:
        if opt.backfeed_fits and opt.load_fits:
            options.append(Connection(projects, amps, "derated_main", p["derate_main_usd"],
                                      derated_main_amps=float(opt.main_breaker_amps)))
            break
    if backfeed_check(service, amps, rule="supply_side", edition=edition).fits:
        options.append(Connection(projects, amps, "supply_side", p["supply_side_usd"]))
    order = {"power_control": 0, "derated_main": 1, "supply_side": 2}
    if not options:  # nothing on offer makes it fit: the supply side, flagged in the state checks
        return Connection(projects, amps, "supply_side", p["supply_side_usd"])
    return min(options, key=lambda c: (c.cost_usd, order[c.kind]))


def connection_options(ctx: Context, service: Service, load_amps: float | None,
                       pv: list[str]) -> dict[frozenset[str], Connection]:
    """The cheapest connection of every non-empty set of the solar and battery projects ``pv``.

    ``load_amps`` is the calculated load the main breaker must carry at the end of the plan (a
    derated main must still carry it); None when the panel will not stay (no derate offered).
    """
    out: dict[frozenset[str], Connection] = {}
    for n in range(1, len(pv) + 1):
        for combo in combinations(sorted(pv), n):
            s = frozenset(combo)
            out[s] = _cheapest(ctx, s, service, load_amps)
    return out
