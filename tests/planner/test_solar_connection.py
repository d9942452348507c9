"""Solar and battery connections: the code's rules for the inverters the plan actually adds.

NEC 2023 705.12(B)(3)(2) (the 120 % rule): 1.25 x inverter output current + the main breaker
<= 1.2 x the busbar rating. 705.11: a supply-side connection does not use the busbar.
705.13: a power control system limits the output current the busbar sees. 230.79(C): a one-family
service is at least 100 A, so a 100 A main cannot be derated. Currents at 240 V; an array's AC
rating at a 1.2 DC/AC ratio (NREL PVWatts default, Dobos 2014, NREL/TP-6A20-62641).
"""

from __future__ import annotations

from types import SimpleNamespace

import pytest

from homeplan.catalog import performance
from homeplan.electrical.loads import Service
from homeplan.planner.solar_connection import connection_options


def ctx(solar_kw: float | None, battery_kwh: float | None):
    details = {}
    if solar_kw:
        details["solar"] = SimpleNamespace(kind="solar", size=solar_kw)
    if battery_kwh:
        details["battery"] = SimpleNamespace(kind="battery", size=battery_kwh)
    home = SimpleNamespace(solar=None, battery=None, electrical=SimpleNamespace(code_edition=2023))
    return SimpleNamespace(details=details, plan=SimpleNamespace(home=home))


def test_array_alone_is_checked_alone_and_gets_the_smallest_derate():
    c = ctx(11.5, 13.5)
    out = connection_options(c, Service(200), 120.0, ["solar", "battery"])
    solar = out[frozenset({"solar"})]
    amps = 11.5 / 1.2 * 1000 / 240                       # 39.93 A
    assert solar.inverter_amps == pytest.approx(amps)
    assert 1.25 * amps + 200 > 1.2 * 200                  # does not fit the 200 A panel as it is
    assert 1.25 * amps + 175 <= 1.2 * 200                 # a 175 A main does (240.6(A) size)
    assert (solar.kind, solar.derated_main_amps) == ("derated_main", 175.0)
    both = out[frozenset({"solar", "battery"})]
    battery_amps = performance()["battery_default_kw"] * 1000 / 240
    assert 1.25 * (amps + battery_amps) + 175 > 1.2 * 200  # the battery would need more
    assert both.kind in ("derated_main", "power_control") and both.derated_main_amps != 175.0


def test_a_100_amp_main_cannot_be_derated_so_the_supply_side_it_is():
    out = connection_options(ctx(8.5, None), Service(100), 60.0, ["solar"])
    conn = out[frozenset({"solar"})]
    assert 1.25 * (8.5 / 1.2 * 1000 / 240) + 100 > 1.2 * 100
    assert conn.kind == "supply_side" and conn.cost_usd == performance()["supply_side_usd"]


def test_power_control_when_the_load_leaves_no_room_to_derate():
    # 4 kW array fits by itself (1.25 x 13.9 + 200 <= 240); with the battery it does not, and a
    # 190 A calculated load cannot go under a smaller main: a power control system limits the
    # battery's output instead
    out = connection_options(ctx(4.0, 13.5), Service(200), 190.0, ["solar", "battery"])
    assert out[frozenset({"solar"})].kind == "panel"
    both = out[frozenset({"solar", "battery"})]
    assert both.kind == "power_control" and both.cost_usd == performance()["pcs_usd"]
    assert both.pcs_limit_amps == pytest.approx((1.2 * 200 - 200) / 1.25)
