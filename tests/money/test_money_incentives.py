"""Incentive engine checks against the published rules of the programs.

Expected values are worked by hand from: 26 USC 25C and 25D as amended by Pub. L. 117-169 and
the limits listed in the IRS Instructions for Form 5695 (2023), Part II; 42 USC 18795a (IRA
s.50122, high-efficiency electric home rebates); and the end dates set by Pub. L. 119-21 (2025).
Subsection letters and anything marked so are from memory.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import replace
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from homeplan.money.incentives import (
    Household,
    IncentiveDataError,
    Purchase,
    evaluate,
    parse_catalog,
    parse_program,
    read_catalog,
)

ROOT = Path(__file__).resolve().parents[2]
FEDERAL = ROOT / "sample_homes" / "incentives" / "federal_2023_2025_example.yaml"
DEMO = ROOT / "sample_homes" / "incentives" / "demoland_invented.yaml"


@pytest.fixture(scope="module")
def federal() -> dict[str, object]:
    return {p.id: p for p in read_catalog(FEDERAL)}


def _d(text: str) -> dt.date:
    return dt.date.fromisoformat(text)


def _paid(result, project_id: str, program_id: str) -> float:
    return sum(
        a.paid_usd
        for a in result.awards
        if a.project_id == project_id and a.program_id == program_id
    )


# ------------------------------------------------------------------ 25C


def test_25c_one_year(federal) -> None:
    items = [
        Purchase("hp", "heat_pump", 16_000, _d("2024-05-01")),
        Purchase("panel", "panel_upgrade", 3_500, _d("2024-05-01"), panel_amps=200),
        Purchase("attic", "envelope", 2_000, _d("2024-06-01")),
    ]
    res = evaluate(items, [federal["us_25c_2023_2025"]], Household())
    # IRS Instructions for Form 5695 (2023), Part II limits: heat pumps $2,000 a year; other items $1,200 a year, a panelboard at most $600
    # -> 2,000 + min(600 + 30 % x 2,000, 1,200) = 3,200
    assert res.total_paid_usd == pytest.approx(3_200)
    assert _paid(res, "hp", "us_25c_2023_2025") == pytest.approx(
        2_000
    )  # 26 USC 25C(b)(5) (letter from memory): $2,000 a year for heat pumps
    assert _paid(res, "panel", "us_25c_2023_2025") == pytest.approx(600)  # Form 5695 (2023): $600 an item
    assert _paid(res, "attic", "us_25c_2023_2025") == pytest.approx(600)  # 26 USC 25C(a): 30 % x 2,000
    hp = res.for_item("hp")[0]
    assert any("capped at $2,000 per year" in n for n in hp.notes)
    # credits arrive after filing, the following spring (26 USC 6072(a): April 15)
    assert hp.payments[0].on == _d("2025-04-15")


def test_25c_split_over_two_tax_years_pays_more(federal) -> None:
    prog = federal["us_25c_2023_2025"]
    same_year = [
        Purchase("hp", "heat_pump", 16_000, _d("2024-03-01")),
        Purchase("hpwh", "heat_pump_water_heater", 5_000, _d("2024-09-01")),
    ]
    split = [
        Purchase("hp", "heat_pump", 16_000, _d("2024-03-01")),
        Purchase("hpwh", "heat_pump_water_heater", 5_000, _d("2025-02-01")),
    ]
    one = evaluate(same_year, [prog], Household()).total_paid_usd
    two = evaluate(split, [prog], Household()).total_paid_usd
    # IRS Instructions for Form 5695 (2023), Part II limits: $2,000 a year shared by heat pumps and heat pump water heaters; the limits
    # apply per tax year (26 USC 25C(b))
    assert one == pytest.approx(2_000)
    assert two == pytest.approx(2_000 + 1_500)  # 30 % x 5,000 = 1,500 in the second year
    assert two > one


def test_25c_expiry(federal) -> None:
    prog = federal["us_25c_2023_2025"]
    before = evaluate([Purchase("hp", "heat_pump", 16_000, _d("2025-12-15"))], [prog], Household())
    after = evaluate([Purchase("hp", "heat_pump", 16_000, _d("2026-01-05"))], [prog], Household())
    # Pub. L. 119-21 (2025): no 25C credit for property placed in service after 2025-12-31 ->
    # $2,000 on 2025-12-15, $0 on 2026-01-05
    assert before.total_paid_usd == pytest.approx(2_000)
    assert after.total_paid_usd == 0
    assert any("expired 2025-12-31" in n for n in after.awards[0].notes)


def test_25c_panel_conditions(federal) -> None:
    prog = federal["us_25c_2023_2025"]
    small = [
        Purchase("hp", "heat_pump", 16_000, _d("2024-05-01")),
        Purchase("panel", "panel_upgrade", 3_500, _d("2024-05-01"), panel_amps=150),
    ]
    alone = [
        Purchase("hp", "heat_pump", 16_000, _d("2023-05-01")),
        Purchase("panel", "panel_upgrade", 3_500, _d("2024-05-01"), panel_amps=200),
    ]
    # 26 USC 25C(d) (from memory): a panelboard qualifies with a load capacity of at least 200 A
    # and when installed in conjunction with qualifying property
    r_small = evaluate(small, [prog], Household())
    assert _paid(r_small, "panel", prog.id) == 0
    assert any("200 A" in n for n in r_small.for_item("panel")[0].notes)
    r_alone = evaluate(alone, [prog], Household())
    assert _paid(r_alone, "panel", prog.id) == 0
    assert any("same year" in n for n in r_alone.for_item("panel")[0].notes)


# ------------------------------------------------------------------ 25C items with their own caps
# Cases worked by hand with the limits the IRS Instructions for Form 5695 (2023), Part II, list
# for the energy efficient home improvement credit: 30 % of cost; $1,200 a year in total for
# everything but heat pumps, within which exterior windows and skylights at most $600, any
# exterior door $250 and all doors $500, any item of qualified energy property (central air
# conditioner, panelboard) $600, home energy audits $150; heat pumps and heat pump water heaters
# $2,000 a year on their own. (The instructions list these limits; the cases are ours.)


def test_25c_doors_250_each_500_in_total(federal) -> None:
    prog = federal["us_25c_2023_2025"]
    doors = [Purchase(f"door{i}", "exterior_door", cost, _d("2024-05-01"))
             for i, cost in enumerate((1_000, 700, 500))]
    res = evaluate(doors, [prog], Household())
    # 30 % = 300, 210, 150 -> $250 a door: 250, 210, 150 = 610 -> $500 for all doors
    assert [_paid(res, f"door{i}", prog.id) for i in range(3)] == [
        pytest.approx(250), pytest.approx(210), pytest.approx(40)]
    assert res.total_paid_usd == pytest.approx(500)
    # the door limits are per tax year: the same doors a year later earn another $500
    later = [replace(d, project_id=d.project_id + "b", installed_on=_d("2025-05-01")) for d in doors]
    assert evaluate(doors + later, [prog], Household()).total_paid_usd == pytest.approx(1_000)


def test_25c_windows_600_a_year_and_central_ac_600(federal) -> None:
    prog = federal["us_25c_2023_2025"]
    items = [Purchase("win1", "windows", 1_500, _d("2024-04-01")),
             Purchase("win2", "windows", 1_500, _d("2024-09-01")),
             Purchase("ac", "central_ac", 5_000, _d("2024-06-01"))]
    res = evaluate(items, [prog], Household())
    # windows: 30 % x 3,000 = 900 -> $600 for the year (450 + 150); central A/C: 1,500 -> $600
    assert _paid(res, "win1", prog.id) + _paid(res, "win2", prog.id) == pytest.approx(600)
    assert _paid(res, "ac", prog.id) == pytest.approx(600)
    assert res.total_paid_usd == pytest.approx(1_200)


def test_25c_all_items_in_one_year(federal) -> None:
    prog = federal["us_25c_2023_2025"]
    items = [Purchase("hp", "heat_pump", 16_000, _d("2024-05-01")),
             Purchase("win", "windows", 3_000, _d("2024-05-01")),
             Purchase("ac", "central_ac", 5_000, _d("2024-05-01")),
             Purchase("attic", "envelope", 2_000, _d("2024-05-01")),
             Purchase("audit", "energy_audit", 800, _d("2024-02-01"))]
    res = evaluate(items, [prog], Household())
    # other items: windows 600 + A/C 600 + insulation 600 + audit min(240, 150) = 1,950
    #   -> $1,200 for the year; heat pump 30 % x 16,000 -> $2,000 on its own -> $3,200
    assert res.total_paid_usd == pytest.approx(3_200)
    assert _paid(res, "hp", prog.id) == pytest.approx(2_000)
    assert sum(_paid(res, k, prog.id) for k in ("win", "ac", "attic", "audit")) == pytest.approx(1_200)


def test_25c_service_upgrade_is_a_panelboard(federal) -> None:
    prog = federal["us_25c_2023_2025"]
    items = [Purchase("hp", "heat_pump", 16_000, _d("2024-05-01")),
             Purchase("svc", "service_upgrade", 9_000, _d("2024-05-01"), panel_amps=200)]
    # a service upgrade replaces the panelboard: 30 % x 9,000 -> $600 an item
    assert _paid(evaluate(items, [prog], Household()), "svc", prog.id) == pytest.approx(600)


def test_unknown_purchase_kind_is_an_error() -> None:
    # an unknown kind used to earn a silent $0; now it says what is wrong and what to use
    with pytest.raises(ValueError, match="unknown project kind 'hot_tub'.*use one of"):
        Purchase("spa", "hot_tub", 9_000, _d("2025-05-01"))


# ------------------------------------------------------------------ 50122 tiers


def _three_items(day: str = "2025-03-01") -> list[Purchase]:
    return [
        Purchase("hp", "heat_pump", 16_000, _d(day)),
        Purchase("panel", "panel_upgrade", 3_500, _d(day), panel_amps=200),
        Purchase("attic", "envelope", 2_000, _d(day)),
    ]


def test_50122_tier_80_to_150(federal) -> None:
    res = evaluate(_three_items(), [federal["us_50122_heehra"]], Household(ami_pct=120))
    # 42 USC 18795a (80-150 % AMI: 50 % of cost within the per-item caps; heat pump $8,000,
    # panel $4,000, insulation and air sealing $1,600): 8,000 + 1,750 + 1,000 = 10,750
    assert _paid(res, "hp", "us_50122_heehra") == pytest.approx(8_000)
    assert _paid(res, "panel", "us_50122_heehra") == pytest.approx(1_750)
    assert _paid(res, "attic", "us_50122_heehra") == pytest.approx(1_000)
    assert res.total_paid_usd == pytest.approx(10_750)
    # point of sale: the rebate arrives on the paid (install) date and lowers the up-front spend
    assert res.for_item("hp")[0].payments[0].on == _d("2025-03-01")
    assert res.point_of_sale_usd("hp") == pytest.approx(8_000)


def test_50122_tier_below_80(federal) -> None:
    items = [*_three_items(), Purchase("hpwh", "heat_pump_water_heater", 4_000, _d("2025-04-01"))]
    res = evaluate(items, [federal["us_50122_heehra"]], Household(ami_pct=60))
    # 42 USC 18795a: below 80 % AMI up to 100 % of cost within the per-item caps
    assert _paid(res, "hp", "us_50122_heehra") == pytest.approx(8_000)  # cap $8,000
    assert _paid(res, "panel", "us_50122_heehra") == pytest.approx(3_500)  # 100 % (cap $4,000)
    assert _paid(res, "attic", "us_50122_heehra") == pytest.approx(1_600)  # cap $1,600
    # HPWH cap $1,750, but the household cap $14,000 leaves 14,000 - 13,100 = 900
    assert _paid(res, "hpwh", "us_50122_heehra") == pytest.approx(900)
    assert res.total_paid_usd == pytest.approx(14_000)  # 42 USC 18795a: household cap $14,000
    assert any("lifetime cap" in n for n in res.for_item("hpwh")[0].notes)


def test_50122_service_upgrade_allowance(federal) -> None:
    prog = federal["us_50122_heehra"]
    item = [Purchase("svc", "service_upgrade", 9_000, _d("2025-03-01"), panel_amps=200)]
    # 42 USC 18795a: an electric load service center upgrade up to $4,000; a service upgrade
    # includes one. 80-150 % AMI: 50 % x 9,000 = 4,500 -> $4,000; below 80 %: 100 % -> $4,000
    assert evaluate(item, [prog], Household(ami_pct=120)).total_paid_usd == pytest.approx(4_000)
    assert evaluate(item, [prog], Household(ami_pct=60)).total_paid_usd == pytest.approx(4_000)
    small = [Purchase("svc", "service_upgrade", 6_000, _d("2025-03-01"), panel_amps=200)]
    assert evaluate(small, [prog], Household(ami_pct=120)).total_paid_usd == pytest.approx(3_000)


def test_50122_above_150_gets_nothing(federal) -> None:
    res = evaluate(_three_items(), [federal["us_50122_heehra"]], Household(ami_pct=151))
    # 42 USC 18795a: households above 150 % AMI are not eligible
    assert res.total_paid_usd == 0
    assert all(any("outside the program's tiers" in n for n in a.notes) for a in res.awards)


def test_50122_needs_income(federal) -> None:
    res = evaluate(_three_items(), [federal["us_50122_heehra"]], Household())
    assert res.total_paid_usd == 0  # 42 USC 18795a tiers by AMI: no income given -> cannot qualify
    assert any("area median income" in n for n in res.awards[0].notes)


# ------------------------------------------------------------------ stacking


def test_credit_computed_on_cost_minus_rebate(federal) -> None:
    items = [Purchase("hpwh", "heat_pump_water_heater", 4_000, _d("2025-03-01"))]
    progs = [federal["us_25c_2023_2025"], federal["us_50122_heehra"]]  # order must not matter
    res = evaluate(items, progs, Household(ami_pct=120))
    rebate = _paid(res, "hpwh", "us_50122_heehra")
    credit = _paid(res, "hpwh", "us_25c_2023_2025")
    # 42 USC 18795a: 50 % x 4,000 = 2,000 -> capped at $1,750 for a heat pump water heater
    assert rebate == pytest.approx(1_750)
    # From memory (IRS guidance on the energy credits): a rebate lowers the cost the credit is
    # figured on: 30 % x (4,000 - 1,750) = 675 (not 1,200)
    assert credit == pytest.approx(675)
    assert res.for_item("hpwh")[1].basis_usd == pytest.approx(2_250)


def test_grant_family_pays_once(federal) -> None:
    raw = {
        "id": "second_federal_grant",
        "name": "Another federal grant (invented for the test)",
        "administrator": "invented",
        "kind": "point_of_sale_rebate",
        "kinds": ["heat_pump"],
        "rate_pct": 50,
        "grant_family": "us_federal_grant",
    }
    progs = [federal["us_50122_heehra"], parse_program(raw)]
    res = evaluate(_three_items()[:1], progs, Household(ami_pct=120))
    # 42 USC 18795a (from memory): no rebate for an upgrade another federal grant pays for
    assert _paid(res, "hp", "us_50122_heehra") == pytest.approx(8_000)
    assert _paid(res, "hp", "second_federal_grant") == 0
    assert any("same grant family" in n for n in res.for_item("hp")[1].notes)


# ------------------------------------------------------------------ tax liability (25D)


def _solar() -> list[Purchase]:
    return [Purchase("pv", "solar", 30_000, _d("2025-06-01"), size_kw=8)]


def test_25d_carryforward_limited_by_liability(federal) -> None:
    res = evaluate(_solar(), [federal["us_25d_2023_2025"]], Household(tax_liability_usd=5_000))
    award = res.awards[0]
    # 26 USC 25D(a) 30 %, 25D(c) carryforward, 26 USC 26(a) liability limit, by hand:
    # $30,000 -> $9,000 earned, $5,000 used in the first tax year, the rest carried
    assert award.earned_usd == pytest.approx(9_000)
    assert [(p.on, p.amount_usd) for p in award.payments] == [
        (_d("2026-04-15"), pytest.approx(5_000)),  # tax year 2025, filed spring 2026
        (_d("2027-04-15"), pytest.approx(4_000)),  # carried to tax year 2026 (25D(c))
    ]
    assert award.lost_usd == 0
    assert any("carried forward" in n for n in award.notes)


def test_nonrefundable_without_carryforward_loses_the_rest() -> None:
    raw = dict(
        id="no_carry",
        name="25D-shaped credit without carryforward (invented for the test)",
        administrator="invented",
        kind="tax_credit",
        kinds=["solar"],
        rate_pct=30,
        ends="2025-12-31",
    )
    res = evaluate(_solar(), [parse_program(raw)], Household(tax_liability_usd=5_000))
    award = res.awards[0]
    # 26 USC 26(a): nonrefundable credit limited to liability; no carryforward -> rest lost
    assert award.paid_usd == pytest.approx(5_000)
    assert award.lost_usd == pytest.approx(4_000)


def test_25d_unlimited_liability_and_expiry(federal) -> None:
    prog = federal["us_25d_2023_2025"]
    res = evaluate(_solar(), [prog], Household())
    assert res.total_paid_usd == pytest.approx(9_000)  # 26 USC 25D(a): 30 % x 30,000
    late = [Purchase("pv", "solar", 30_000, _d("2026-02-01"), size_kw=8)]
    assert evaluate(late, [prog], Household()).total_paid_usd == 0  # Pub. L. 119-21: no 25D credit after 2025-12-31


def test_25d_small_battery_not_eligible(federal) -> None:
    items = [Purchase("bat", "battery", 9_000, _d("2025-06-01"), size_kwh=2.5)]
    res = evaluate(items, [federal["us_25d_2023_2025"]], Household())
    assert res.total_paid_usd == 0  # Form 5695 (2023) line 5a: battery of at least 3 kWh


# ------------------------------------------------------------------ timing, demo catalog


def test_rebate_later_and_performance_timing() -> None:
    progs = {p.id: p for p in read_catalog(DEMO)}
    items = [
        Purchase("hp", "heat_pump", 12_000, _d("2026-04-10")),
        Purchase("bat", "battery", 13_500, _d("2026-05-01"), size_kwh=13.5),
    ]
    res = evaluate(
        items, [progs["demo_utility_hp_rebate"], progs["demo_utility_battery_payment"]], Household()
    )
    hp = res.for_item("hp")[0]
    # invented demo program: 25 % capped at $1,500, paid 75 days after installation
    assert hp.paid_usd == pytest.approx(1_500)
    assert hp.payments[0].on == _d("2026-04-10") + dt.timedelta(days=75)
    bat = res.for_item("bat")[0]
    # invented demo program: $150/kWh x 13.5 kWh = 2,025 (< 30 % of cost = 4,050, < $3,000 cap)
    assert bat.paid_usd == pytest.approx(2_025)


def test_catalog_files_are_valid_and_demo_says_invented() -> None:
    demo = read_catalog(DEMO)
    assert len(demo) >= 6
    assert {
        "heat_pump",
        "heat_pump_water_heater",
        "panel_upgrade",
        "ev_charger",
        "solar",
        "battery",
    } <= set().union(*(p.kinds for p in demo))
    assert len({p.ends.year for p in demo if p.ends}) >= 3  # windows end in various years
    assert "INVENTED" in DEMO.read_text(encoding="utf-8")[:300]
    # every invented program says so in its own name, so every view that shows the name does
    assert all(p.name.endswith(" (invented)") and "invented" in p.administrator for p in demo)
    assert all(p.source == "invented demo" for p in demo)
    fed = {p.id: p for p in read_catalog(FEDERAL)}
    assert fed["us_25c_2023_2025"].ends == _d("2025-12-31")  # Pub. L. 119-21 (2025)
    assert fed["us_25d_2023_2025"].ends == _d("2025-12-31")  # Pub. L. 119-21 (2025)
    assert fed["us_50122_heehra"].ends is None  # 42 USC 18795a was not repealed by Pub. L. 119-21 (from memory)


# ------------------------------------------------------------------ bad data


def _base(**extra: object) -> dict[str, object]:
    raw: dict[str, object] = {
        "id": "bad_one",
        "name": "Bad record",
        "administrator": "test",
        "kind": "point_of_sale_rebate",
        "kinds": ["heat_pump"],
        "rate_pct": 50,
    }
    raw.update(extra)
    return raw


def test_overlapping_tiers_rejected() -> None:
    raw = _base(
        tiers=[{"ami_min_pct": 0, "ami_max_pct": 100}, {"ami_min_pct": 80, "ami_max_pct": 150}]
    )
    with pytest.raises(IncentiveDataError) as err:
        parse_program(raw)
    msg = str(err.value)
    assert "bad_one" in msg and "tiers[1]" in msg and "overlap" in msg and "Fix:" in msg
    assert err.value.field == "tiers[1]"


def test_negative_cap_rejected() -> None:
    with pytest.raises(IncentiveDataError) as err:
        parse_program(_base(per_item_cap_usd=-5))
    assert "per_item_cap_usd" in str(err.value) and "below zero" in str(err.value)
    with pytest.raises(IncentiveDataError) as err:
        parse_program(_base(yearly_caps=[{"name": "g", "kinds": ["heat_pump"], "cap_usd": -1}]))
    assert "yearly_caps[0].cap_usd" in str(err.value)


def test_end_before_start_rejected() -> None:
    with pytest.raises(IncentiveDataError) as err:
        parse_program(_base(starts="2027-01-01", ends="2026-12-31"))
    msg = str(err.value)
    assert "'ends'" in msg and "before start 2027-01-01" in msg and "YYYY-MM-DD" in msg


@pytest.mark.parametrize(
    ("extra", "field"),
    [
        ({"kinds": ["hot_tub"]}, "kinds[0]"),
        ({"kind": "free_money"}, "kind"),
        ({"rate_pct": 130}, "rate_pct"),
        ({"capp_usd": 10}, "capp_usd"),
        ({"kind": "rebate_later"}, "paid_after_days"),
        ({"kind": "performance_per_kw"}, "rate_usd_per_unit"),
        ({"ends": "soon"}, "ends"),
        (
            {
                "yearly_caps": [
                    {
                        "name": "g",
                        "kinds": ["heat_pump"],
                        "cap_usd": 100,
                        "sub_caps_usd": {"heat_pump": 200},
                    }
                ]
            },
            "yearly_caps[0].sub_caps_usd.heat_pump",
        ),
    ],
)
def test_other_bad_fields_named(extra: dict[str, object], field: str) -> None:
    with pytest.raises(IncentiveDataError) as err:
        parse_program(_base(**extra))
    assert err.value.field == field
    assert err.value.program_id == "bad_one"


def test_duplicate_ids_rejected() -> None:
    with pytest.raises(IncentiveDataError, match="used twice"):
        parse_catalog({"programs": [_base(), _base()]})


# ------------------------------------------------------------------ properties

_ALL = (*read_catalog(FEDERAL), *read_catalog(DEMO))
_KINDS = sorted(set().union(*(p.kinds for p in _ALL)))

_purchase = st.builds(
    Purchase,
    project_id=st.text("abcdefgh", min_size=1, max_size=4),
    kind=st.sampled_from(_KINDS),
    cost_usd=st.floats(0, 60_000, allow_nan=False),
    installed_on=st.dates(dt.date(2023, 1, 1), dt.date(2030, 12, 31)),
    panel_amps=st.sampled_from([None, 100, 150, 200, 400]),
    size_kw=st.one_of(st.none(), st.floats(0, 20)),
    size_kwh=st.one_of(st.none(), st.floats(0, 40)),
    fuel_switch=st.booleans(),
)
_household = st.builds(
    Household,
    ami_pct=st.one_of(st.none(), st.floats(0, 300)),
    tax_liability_usd=st.one_of(st.none(), st.floats(0, 20_000)),
    state_tax_liability_usd=st.one_of(st.none(), st.floats(0, 5_000)),
)


@settings(max_examples=150, deadline=None)
@given(items=st.lists(_purchase, max_size=8), household=_household)
def test_properties_never_above_cost_never_negative_caps_respected(items, household) -> None:
    items = [replace(p, project_id=f"{i}-{p.project_id}") for i, p in enumerate(items)]
    res = evaluate(items, _ALL, household)
    by_item: dict[str, float] = {}
    for a in res.awards:
        assert a.earned_usd >= 0 and a.paid_usd >= 0
        assert all(p.amount_usd >= 0 for p in a.payments)
        assert a.paid_usd <= a.earned_usd + 0.01
        by_item[a.project_id] = by_item.get(a.project_id, 0.0) + a.earned_usd
    for it in items:
        assert by_item.get(it.project_id, 0.0) <= it.cost_usd + 0.01  # never more than the cost
    # yearly group caps, recomputed from the awards themselves
    progs = {p.id: p for p in _ALL}
    kinds = {it.project_id: it.kind for it in items}
    sums: dict[tuple[str, str, int], float] = {}
    for a in res.awards:
        for g in progs[a.program_id].yearly_caps:
            if kinds[a.project_id] in g.kinds:
                key = (a.program_id, g.name, a.tax_year)
                sums[key] = sums.get(key, 0.0) + a.earned_usd
    for (pid, name, _year), used in sums.items():
        cap = next(g.cap_usd for g in progs[pid].yearly_caps if g.name == name)
        assert used <= cap + 0.01
    for use in res.cap_uses:
        assert use.used_usd <= use.limit_usd + 0.01
    # a tax year's credits never exceed that year's federal / state liability (26 USC 26(a))
    for level, limit in (
        ("federal", household.tax_liability_usd),
        ("state", household.state_tax_liability_usd),
    ):
        if limit is None:
            continue
        per_year: dict[int, float] = {}
        for a in res.awards:
            if a.program_kind.startswith("tax_credit") and progs[a.program_id].tax_level == level:
                for p in a.payments:
                    per_year[p.on.year] = per_year.get(p.on.year, 0.0) + p.amount_usd
        assert all(v <= limit + 0.01 for v in per_year.values())


def test_state_credit_limited_by_state_liability() -> None:
    progs = {p.id: p for p in read_catalog(DEMO)}
    items = [Purchase("pv", "solar", 30_000, _d("2026-06-01"), size_kw=8)]
    hh = Household(tax_liability_usd=0, state_tax_liability_usd=1_200)
    res = evaluate(items, [progs["demo_state_solar_storage_credit"]], hh)
    award = res.awards[0]
    # invented demo program: 15 % of 30,000 = 4,500, capped at $3,000, 5-year carryforward,
    # paid May 1; the state liability of $1,200 a year spreads it over three tax years
    assert award.earned_usd == pytest.approx(3_000)
    assert [(p.on, p.amount_usd) for p in award.payments] == [
        (_d("2027-05-01"), pytest.approx(1_200)),
        (_d("2028-05-01"), pytest.approx(1_200)),
        (_d("2029-05-01"), pytest.approx(600)),
    ]


def test_gas_closure_alias() -> None:
    raw = _base(kinds=["gas_closure"], rate_pct=100, per_item_cap_usd=500)
    prog = parse_program(raw)
    assert prog.kinds == frozenset({"close_gas"})  # upgrade id in data/upgrades.yaml
    res = evaluate([Purchase("gas", "close_gas", 800, _d("2026-01-01"))], [prog], Household())
    assert res.total_paid_usd == pytest.approx(500)  # 100 % capped at $500 (invented test program)


def test_incentives_by_install_year_for_the_scheduler(federal) -> None:
    from homeplan.money.incentives import incentives_by_install_year

    hp = Purchase("hp", "heat_pump", 16_000, _d("2024-07-01"))
    costs = {2024: 16_000, 2025: 16_400, 2026: 16_800}
    progs = [federal["us_25c_2023_2025"], federal["us_50122_heehra"]]
    got = incentives_by_install_year(hp, costs, progs, Household(ami_pct=200))
    # 25C (Form 5695 limits): $2,000 a year while it lasts, claimed on the return filed the next
    # spring (26 USC 6072(a)); $0 after 2025-12-31 (Pub. L. 119-21);
    # > 150 % AMI gets no 50122 rebate
    assert got[2024].later_usd == pytest.approx(2_000)
    assert got[2024].by_arrival_year == ((2025, pytest.approx(2_000)),)
    assert got[2025].total_usd == pytest.approx(2_000)
    assert got[2026].total_usd == 0
    assert any("expired 2025-12-31" in n for n in got[2026].notes)
    # a panel earns the 25C $600 only with qualifying property in the same year (26 USC 25C(d),
    # from memory)
    panel = Purchase("panel", "panel_upgrade", 3_500, _d("2024-07-01"), panel_amps=200)
    alone = incentives_by_install_year(panel, {2025: 3_500}, progs, Household(ami_pct=200))
    with_hp = incentives_by_install_year(
        panel, {2025: 3_500}, progs, Household(ami_pct=200), companions=[hp]
    )
    assert alone[2025].total_usd == 0
    assert with_hp[2025].total_usd == pytest.approx(600)


def test_lifetime_cap_counts_prior_use(federal) -> None:
    hh = Household(ami_pct=60, prior_use_usd={"us_50122_heehra": 13_000})
    res = evaluate(_three_items()[:1], [federal["us_50122_heehra"]], hh)
    # 42 USC 18795a: household cap $14,000, of which $13,000 already received -> $1,000 left
    assert res.total_paid_usd == pytest.approx(1_000)
    use = next(c for c in res.cap_uses if c.cap == "household lifetime")
    assert use.used_usd == pytest.approx(14_000) and use.limit_usd == 14_000


def test_30c_charger_ends_mid_2026(federal) -> None:
    prog = federal["us_30c_home_charger"]
    june = evaluate([Purchase("evse", "ev_charger", 2_000, _d("2026-06-30"))], [prog], Household())
    july = evaluate([Purchase("evse", "ev_charger", 2_000, _d("2026-07-01"))], [prog], Household())
    # 26 USC 30C: 30 % up to $1,000 for personal-use property (from memory); none placed in
    # service after 2026-06-30 (Pub. L. 119-21)
    assert june.total_paid_usd == pytest.approx(600)
    assert july.total_paid_usd == 0


def test_point_of_sale_rebate_then_credit_on_the_rest(federal) -> None:
    items = [Purchase("hpwh", "heat_pump_water_heater", 4_000, _d("2025-03-01"))]
    progs = [federal["us_50122_heehra"], federal["us_25c_2023_2025"]]
    res = evaluate(items, progs, Household(ami_pct=120))
    by_program = {a.program_id: a for a in res.awards}
    # 42 USC 18795a $1,750 at the point of sale; 25C 30 % of (4,000 - 1,750) = 675 next spring
    rebate, credit = by_program["us_50122_heehra"], by_program["us_25c_2023_2025"]
    assert rebate.at_point_of_sale and rebate.paid_usd == pytest.approx(1_750)
    assert credit.paid_usd == pytest.approx(675)
    assert [p.on.year for p in credit.payments if p.amount_usd > 0] == [2026]


def test_program_totals_and_caps_in_words(federal) -> None:
    from homeplan.money.incentives import describe_caps, program_totals

    prog = federal["us_25c_2023_2025"]
    # 26 USC 25C(a) 30 %; IRS Instructions for Form 5695 (2023), Part II limits: $2,000 a year heat pumps, $1,200 others, panel $600
    words = describe_caps(prog)
    assert (
        "30 % of cost" in words
        and "$2,000 a year" in words
        and "panel_upgrade up to $600" in words
        and "exterior_door at most $500 a year" in words
    )
    items = [
        Purchase("hp", "heat_pump", 16_000, _d("2024-05-01")),
        Purchase("hpwh", "heat_pump_water_heater", 5_000, _d("2025-02-01")),
    ]
    res = evaluate(items, [prog, federal["us_25d_2023_2025"]], Household())
    (total,) = program_totals(res, [prog, federal["us_25d_2023_2025"]])
    # 25C by hand: $2,000 for 2024 (paid spring 2025), 30 % x 5,000 = $1,500 for 2025
    assert total.paid_by_year == {2025: pytest.approx(2_000), 2026: pytest.approx(1_500)}
    assert total.ends == "2025-12-31"


def test_error_points_at_record_and_key_path() -> None:
    bad_tier = _base(
        id="second",
        tiers=[{"ami_min_pct": 0, "ami_max_pct": 100}, {"ami_min_pct": 80, "ami_max_pct": 150}],
    )
    with pytest.raises(IncentiveDataError) as err:
        parse_catalog({"programs": [_base(), bad_tier]})
    assert err.value.index == 1 and err.value.program_id == "second"
    assert err.value.keys == (1, "tiers", 1)
    with pytest.raises(IncentiveDataError) as err:
        parse_catalog([_base(yearly_caps=[{"name": "g", "kinds": ["heat_pump"], "cap_usd": -1}])])
    assert err.value.keys == (0, "yearly_caps", 0, "cap_usd")


def test_purchase_kind_alias() -> None:
    prog = parse_program(_base(kinds=["close_gas"], rate_pct=100, per_item_cap_usd=500))
    res = evaluate([Purchase("gas", "gas_closure", 800, _d("2026-01-01"))], [prog], Household())
    assert res.total_paid_usd == pytest.approx(500)  # 100 % capped at $500 (invented test program)
