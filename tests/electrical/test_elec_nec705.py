"""705.12 load-side backfeed limits and 705.11 supply side (invented panels)."""

from __future__ import annotations

import pytest

from homeplan.electrical import (
    ElectricalInputError,
    Service,
    backfeed_check,
    derated_main_options,
    max_inverter_amps,
)


@pytest.mark.parametrize(
    ("bus", "main", "amps", "kw"),
    [
        (100, 100, 16, 3.84),  # NEC 2023 705.12(B) 120 % rule (1.2 x bus - main) / 1.25, 240 V: 100/100 -> 16 A = 3.84 kW
        (125, 100, 40, 9.6),  # NEC 2023 705.12(B) 120 % rule (1.2 x bus - main) / 1.25, 240 V: 125/100 -> 40 A = 9.6 kW
        (150, 150, 24, 5.76),  # NEC 2023 705.12(B) 120 % rule (1.2 x bus - main) / 1.25, 240 V: 150/150 -> 24 A = 5.76 kW
        (200, 200, 32, 7.68),  # NEC 2023 705.12(B) 120 % rule (1.2 x bus - main) / 1.25, 240 V: 200/200 -> 32 A = 7.68 kW
    ],
)
def test_120_percent_rule_table(bus: int, main: int, amps: float, kw: float) -> None:
    assert max_inverter_amps(bus, main, rule="120") == pytest.approx(amps)
    r = backfeed_check(Service(main, busbar_amps=bus), amps, rule="120")
    assert r.max_inverter_kw == pytest.approx(kw)
    assert r.fits
    assert not backfeed_check(Service(main, busbar_amps=bus), amps + 0.5, rule="120").fits


def test_100_percent_rule_by_hand() -> None:
    # NEC 2023 705.12(B) 100 % rule: (225 - 200) / 1.25 = 20 A ; 200/200 -> 0 A
    assert max_inverter_amps(225, 200, rule="100") == pytest.approx(20)  # hand calculation
    assert max_inverter_amps(200, 200, rule="100") == pytest.approx(0)  # hand calculation


def test_sum_of_breakers_by_hand() -> None:
    # NEC 2023 705.12(B) sum of breakers: 200 A bus, load breakers 160 A -> 40 A breaker (240.6(A))
    # -> 40 / 1.25 = 32 A inverter
    assert max_inverter_amps(200, 200, rule="sum_of_breakers", load_breakers_amps=[50, 40, 30, 20, 20]) == (
        pytest.approx(32)  # hand calculation above
    )
    # 200 - 163 = 37 A room -> 35 A standard breaker -> 28 A
    assert max_inverter_amps(200, 200, rule="sum_of_breakers", load_breakers_amps=[50, 40, 30, 20, 20, 3]) == (
        pytest.approx(28)  # hand calculation above
    )
    with pytest.raises(ElectricalInputError, match="load_breakers_amps"):
        max_inverter_amps(200, 200, rule="sum_of_breakers")


def test_derated_main_by_hand() -> None:
    # NEC 2023 705.12(B), 120 % rule: 200 A bus with a 175 A main
    #   -> (1.2 x 200 - 175) / 1.25 = 52 A (12.48 kW)
    opts = derated_main_options(Service(200), calculated_load_amps=160, inverter_output_amps=40)
    first = opts[0]
    assert first.main_breaker_amps == 175  # next standard size below 200, NEC 2023 240.6(A)
    assert first.max_inverter_amps == pytest.approx(52)  # hand calculation above
    assert first.max_inverter_kw == pytest.approx(12.48)
    assert first.backfeed_fits and first.load_fits
    # 150 A main: (240 - 150) / 1.25 = 72 A, but a 160 A calculated load no longer fits
    opt150 = next(o for o in opts if o.main_breaker_amps == 150)
    assert opt150.max_inverter_amps == pytest.approx(72)  # hand calculation
    assert not opt150.load_fits
    # never below 100 A (NEC 2023 230.79(C))
    assert min(o.main_breaker_amps for o in opts) == 100


def test_supply_side_and_battery_counts() -> None:
    # 705.11 (memory): supply side limited by the service conductors, not the busbar
    svc = Service(100)
    r = backfeed_check(svc, [20.0, 24.0], rule="supply_side")
    assert r.fits and r.max_inverter_amps == 100
    # NEC 2023 705.12(B) (120 % rule) sums every power source's output current (battery inverters too):
    # 20 + 24 > 16
    assert not backfeed_check(svc, [20.0, 24.0], rule="120").fits
    # a power control system (705.13) limiting output to 16 A makes it fit
    assert backfeed_check(svc, [20.0, 24.0], rule="120", pcs_limit_amps=16).fits


def test_backfeed_bad_input() -> None:
    with pytest.raises(ElectricalInputError, match="busbar"):
        max_inverter_amps(100, 125)
    with pytest.raises(ElectricalInputError, match="inverter_output_amps"):
        backfeed_check(Service(100), -5)
    with pytest.raises(ElectricalInputError, match="rule"):
        backfeed_check(Service(100), 5, rule="110")
