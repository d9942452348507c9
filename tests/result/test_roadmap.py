"""Roadmap result types: JSON-safe, versioned, round-trip (docs/roadmap-json.md).

These are data containers, not calculations; the checks compare against the JSON standard
(RFC 8259: no NaN/Infinity) via ``json.dumps(allow_nan=False)``. The home is invented.
"""

from __future__ import annotations

import datetime as dt
import json
import pathlib
import subprocess
import sys

import pytest

from homeplan.result import (
    SCHEMA_VERSION,
    Baseline,
    IncentiveLine,
    Milestone,
    Roadmap,
    Step,
    YearTotals,
)


def sample() -> Roadmap:
    step = Step(
        "hpwh",
        "Heat pump water heater",
        2027,
        size="50 gal",
        cost_usd=4200.0,
        incentives=[
            IncentiveLine("Invented Utility rebate", 700.0, dt.date(2027, 9, 1), "rebate"),
            IncentiveLine("Invented tax credit", 1200.0, 2028, "tax_credit"),
        ],
        net_cost_usd=2300.0,
        reasons=["before the water heater's likely failure (60 % by 2029)"],
        cautions=["Gas line capping is work for a licensed professional."],
    )
    year = YearTotals(
        2027,
        spend_usd=4200.0,
        incentives_usd=700.0,
        net_usd=3500.0,
        bills_usd={"electricity": 1500.0, "gas": 600.0},
        peak_kw=float("nan"),
        service_headroom_amps=float("inf"),
        energy={"electricity_kwh": 9000.0, "gas_therm": 400.0},
    )
    return Roadmap(
        "Demo bungalow (invented)",
        2026,
        10,
        steps=[step, Step("panel", "Panel upgrade", 2026, cost_usd=3000.0)],
        years=[year],
        milestones=[Milestone(2030, "Gas service closed", "gas_service_closed")],
        baselines=[Baseline("do_nothing", "do nothing", [YearTotals(2026)], 0.0)],
        npv_usd=8200.0,
        assumptions={"discount_rate": 0.03, "budget_usd": (5000, 5000)},
    )


def test_to_dict_is_strict_json_and_round_trips() -> None:
    r = sample()
    text = json.dumps(r.to_dict(), allow_nan=False)  # RFC 8259 forbids NaN/Infinity
    data = json.loads(text)
    assert data["schema_version"] == SCHEMA_VERSION
    assert data["years"][0]["peak_kw"] is None  # NaN -> null
    assert data["years"][0]["service_headroom_amps"] is None  # inf -> null
    assert data["steps"][0]["year"] == 2026  # steps ordered by year
    assert data["steps"][1]["incentives"][0]["arrives"] == "2027-09-01"
    assert data["steps"][1]["incentives"][1]["arrives"] == 2028
    back = Roadmap.from_dict(data)
    assert back.steps == r.steps
    assert back.milestones == r.milestones
    assert back.years[0].bills_usd == {"electricity": 1500.0, "gas": 600.0}
    assert back.steps[1].incentives_usd == pytest.approx(1900.0)


def test_every_documented_key_is_produced() -> None:
    doc = (pathlib.Path(__file__).parents[2] / "docs" / "roadmap-json.md").read_text()
    d = sample().to_dict()
    for key in list(d) + list(d["steps"][0]) + list(d["years"][0]):
        assert f"`{key}`" in doc, key


def test_other_major_version_is_refused() -> None:
    data = sample().to_dict()
    data["schema_version"] = "2.0"
    with pytest.raises(ValueError, match="schema 2.0"):
        Roadmap.from_dict(data)


def test_lists_become_tuples_and_types_are_frozen() -> None:
    r = sample()
    assert isinstance(r.steps[1].reasons, tuple)
    with pytest.raises(AttributeError):
        r.npv_usd = 1.0  # type: ignore[misc]


def test_importing_schedule_does_not_import_scipy() -> None:
    code = (
        "import sys, homeplan.schedule, homeplan.schedule.problem, homeplan.schedule.milp, "
        "homeplan.schedule.explain, homeplan.schedule.bruteforce, homeplan.result; "
        "print('scipy' in sys.modules, 'textual' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.split() == ["False", "False"]


def test_baselines_are_found_by_kind_and_old_files_get_kinds_by_position() -> None:
    r = sample()
    assert r.baseline("do_nothing") is r.baselines[0] and r.baseline("like_for_like") is None
    data = r.to_dict()
    assert data["baselines"][0]["kind"] == "do_nothing"
    # a schema 1.0 file has no kind: docs/roadmap-json.md lists doing nothing first, then
    # like-for-like
    old = {**data, "schema_version": "1.0",
           "baselines": [{k: v for k, v in b.items() if k != "kind"} for b in data["baselines"] * 2]}
    back = Roadmap.from_dict(old)
    assert [b.kind for b in back.baselines] == ["do_nothing", "like_for_like"]
