"""Upgrade graph per sample home: applicable projects, order, any-of groups, cycles."""

from __future__ import annotations

import networkx as nx
import pytest

from homeplan.errors import PlanRuleError
from homeplan.plan.load import load_plan, load_plan_text
from homeplan.planner import candidates as graph

from .conftest import ROOT, SAMPLES


def sample(name: str):
    return load_plan(ROOT / "sample_homes" / name).plan


@pytest.mark.parametrize("path", SAMPLES, ids=[p.name for p in SAMPLES])
def test_every_sample_builds_an_acyclic_graph(path):
    g = graph.build_graph(load_plan(path).plan)
    hard = nx.DiGraph((u, v) for u, v, d in g.edges(data=True) if d["kind"] != "any_of")
    assert nx.is_directed_acyclic_graph(hard)
    flat = [n for layer in graph.layers(g) for n in layer]
    assert sorted(flat) == sorted(graph.project_nodes(g))


def test_cold_gas_home():
    g = graph.build_graph(sample("cold_gas_100a.yaml"))
    ids = set(graph.project_nodes(g))
    assert {"heat_pump", "heat_pump_water_heater", "induction_range", "heat_pump_dryer",
            "ev:sedan", "ev:wagon", "ev_charger", "close_gas"} <= ids
    # a charger before the car (common practice, no source)
    assert g.edges["ev_charger", "ev:sedan"]["kind"] == "requires"
    # every gas appliance's replacement comes before closing the gas service
    for p in ("heat_pump", "heat_pump_water_heater", "induction_range", "heat_pump_dryer"):
        assert g.edges[p, "close_gas"]["kind"] == "requires"
    # air sealing before sizing the heat pump (common practice, no source)
    assert g.edges["envelope", "heat_pump"]["kind"] == "better_before"
    # cold climate (-10 F design) -> cold-climate heat pump variant
    assert g.nodes["heat_pump"]["candidate"].variant == "cold_climate"
    groups = graph.any_of_groups(g)
    assert set(groups[graph.CAPACITY_GROUP]["alternatives"]) >= {"panel_upgrade", "load_management"}


def test_old_roof_must_come_before_solar():
    g = graph.build_graph(sample("mild_propane_roof.yaml"))
    assert g.edges["roof", "solar"]["kind"] == "requires"
    assert "remove_propane_tank" in g and "close_gas" not in g


def test_existing_solar_home_has_no_new_array_but_a_battery():
    g = graph.build_graph(sample("newer_ac_small_solar.yaml"))
    assert "solar" not in g and "battery" in g
    assert not any(u == "solar" for u, _ in g.in_edges("battery"))


def test_no_ducts_gives_ductless():
    g = graph.build_graph(sample("oil_boiler_no_ducts.yaml"))
    assert g.nodes["heat_pump"]["candidate"].variant == "ductless"
    assert "remove_oil_tank" in g


USER_CYCLE = """\
home: {location: {latitude: 40, longitude: -90}, floor_area_ft2: 1500, electrical: {service_amps: 200}}
appliances: [{kind: furnace}]
budget: {usd_per_year: 5000}
choices:
  require_before:
    envelope: [solar]
    solar: [heat_pump]
"""


def test_user_order_cycle_is_named():
    plan = load_plan_text(USER_CYCLE).plan
    with pytest.raises(PlanRuleError) as info:
        graph.build_graph(plan)
    msg = str(info.value)
    assert "cycle" in msg and "envelope" in msg and "solar" in msg and "heat_pump" in msg


def test_unknown_pin_suggests():
    text = USER_CYCLE.replace("  require_before:\n    envelope: [solar]\n    solar: [heat_pump]\n", "  pins: {heat_pmp: 2028}\n")
    with pytest.raises(PlanRuleError, match="did you mean 'heat_pump'"):
        graph.build_graph(load_plan_text(text).plan)


def test_dot_export_is_valid_shape():
    dot = graph.to_dot(graph.build_graph(sample("cold_gas_100a.yaml")))
    assert dot.startswith("digraph upgrades {") and dot.rstrip().endswith("}")
    assert '"ev_charger" -> "ev:sedan"' in dot


@pytest.mark.parametrize("path", SAMPLES, ids=[p.name for p in SAMPLES])
def test_the_plain_order_is_the_graph(path):
    # check reads upgrade_order (no networkx); the planner and `homeplan graph` read the graph
    plan = load_plan(path).plan
    order, g = graph.upgrade_order(plan), graph.build_graph(plan)
    assert order.project_ids == graph.project_nodes(g)
    # the same edges in the same order: networkx lists them by their first node, each node's in
    # the order they were added
    place = {n: i for i, n in enumerate(g)}
    assert list(g.edges) == sorted(order.edges, key=lambda e: place[e[0]])
    assert all(g.edges[e] == dict(d) for e, d in order.edges.items())
    assert {n: dict(d) for n, d in order.groups.items()} == {
        n: d for n, d in g.nodes(data=True) if d.get("kind") == "any_of"}


def test_user_order_cycle_is_found_without_the_graph():
    with pytest.raises(PlanRuleError, match="the order makes a cycle: "):
        graph.upgrade_order(load_plan_text(USER_CYCLE).plan)


def test_cycle_test_agrees_with_networkx():
    # networkx.is_directed_acyclic_graph as the reference, on random small directed graphs
    import random

    rng = random.Random(7)
    seen = set()
    for _ in range(400):
        nodes = [f"n{i}" for i in range(rng.randint(1, 8))]
        edges = [(rng.choice(nodes), rng.choice(nodes)) for _ in range(rng.randint(0, 12))]
        edges = [(u, v) for u, v in edges if u != v]
        expected = not nx.is_directed_acyclic_graph(nx.DiGraph(edges)) if edges else False
        assert graph._has_cycle(set(nodes), edges) == expected, edges
        seen.add(expected)
    assert seen == {True, False}
