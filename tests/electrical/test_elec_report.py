"""capacity_report over plan states (invented demo home)."""

from __future__ import annotations

import json

from homeplan.electrical import (
    Dwelling,
    MeasuredDemand,
    PlanState,
    Service,
    capacity_report,
    ev_charger_load,
    heat_pump_loads,
    nameplate_load,
)


def test_capacity_report_states() -> None:
    today = (nameplate_load("dishwasher"), nameplate_load("electric_dryer"))
    year2 = (*today, *heat_pump_loads(compressor_va=5760, strips_kw=5), ev_charger_load(32))
    states = [PlanState("today", today), PlanState("2028", year2, inverter_output_amps=20)]
    rep = capacity_report(Dwelling(1500), Service(100), states, measured=MeasuredDemand(6.0))
    json.dumps(rep)
    assert [e["state"] for e in rep] == ["today", "2028"]
    assert rep[0]["calc"]["case"] == "A" and rep[1]["calc"]["case"] == "B"
    # today by hand: other 4,500 + 3,000 + 1,500 + 1,200 + 5,000 = 15,200
    #   -> 8,000 + 0.4 x 7,200 = 10,880 VA (NEC 2023 220.83(A))
    assert abs(rep[0]["calc"]["total_va"] - 10880) < 1e-6  # hand calculation above
    # 220.87 today: 6,000 x 1.25 = 7,500 VA (NEC 2023 220.87); refused once solar is there
    assert abs(rep[0]["measured"]["total_va"] - 7500) < 1e-6
    assert "refused" in rep[1]["measured"]
    # 100/100 panel: 20 A inverter > 16 A (120 % rule, NEC 2023 705.12(B))
    assert rep[1]["backfeed"]["fits"] is False
    assert "AHJ" in rep[1]["caution"]


def test_loads_for_upgrade_and_tables_have_sources() -> None:
    import csv
    from importlib import resources

    import pytest

    from homeplan.electrical import ElectricalInputError, loads_for_upgrade

    hp = loads_for_upgrade("heating", name="Heat pump", va_per_ton=2300, tons=3, strips_kw=10,
                           strips_interlocked=True)
    assert [ld.category for ld in hp] == ["heat_pump_compressor", "supplemental_heat"]
    assert hp[0].va == pytest.approx(6900)  # 3 t x 2,300 VA/ton (NEC 2023 Informative Annex D, Example D2(c): 2.5 t = 24 A)
    assert hp[1].interlocked
    (ev,) = loads_for_upgrade("vehicles", name="Charger", amps=40)
    assert ev.va == pytest.approx(9600) and ev.continuous  # 40 A x 240 V = 9.6 kW; NEC 2023 625.42
    with pytest.raises(ElectricalInputError, match="va"):
        loads_for_upgrade("water", name="HPWH")
    with pytest.raises(ElectricalInputError, match="category"):
        loads_for_upgrade("solar", name="PV", va=5000)
    data = resources.files("homeplan.electrical").joinpath("data")
    for f in ("nameplates.csv", "code_factors.csv", "code_sections.csv", "standard_ocpd.csv", "practice.csv"):
        rows = list(csv.DictReader(data.joinpath(f).read_text("utf-8").splitlines()))
        assert rows and all(r["source"].strip() for r in rows), f
