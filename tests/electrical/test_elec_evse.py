"""625.41/625.42 charger circuits, 220.57 charger VA and EMS setpoints."""

from __future__ import annotations

import pytest

from homeplan.electrical import (
    ElectricalInputError,
    ems_counted_va,
    ev_charger_load,
    evse_breaker_amps,
    evse_circuit,
    evse_load_va,
)


@pytest.mark.parametrize(
    ("charger", "breaker"),
    [
        (16, 20),  # NEC 2023 625.41 (125 % of 16 A) rounded up to a 240.6(A) standard size: 20 A
        (24, 30),  # NEC 2023 625.41 (125 % of 24 A) rounded up to a 240.6(A) standard size: 30 A
        (32, 40),  # NEC 2023 625.41 (125 % of 32 A) rounded up to a 240.6(A) standard size: 40 A
        (40, 50),  # NEC 2023 625.41 (125 % of 40 A) rounded up to a 240.6(A) standard size: 50 A
        (48, 60),  # NEC 2023 625.41 (125 % of 48 A) rounded up to a 240.6(A) standard size: 60 A
        (80, 100),  # NEC 2023 625.41 (125 % of 80 A) rounded up to a 240.6(A) standard size: 100 A
    ],
)
def test_charger_to_circuit_table(charger: int, breaker: int) -> None:
    assert evse_breaker_amps(charger) == breaker


def test_odd_charger_rounds_up_to_standard_size() -> None:
    # 30 A x 1.25 = 37.5 A -> 40 A (NEC 2023 240.6(A) standard sizes)
    assert evse_breaker_amps(30) == 40


@pytest.mark.parametrize(
    ("amps", "kw"),
    [(16, 3.84), (32, 7.68), (40, 9.6), (48, 11.52)],  # P = V x I at 240 V (Ohm's law)
)
def test_charger_load_va(amps: int, kw: float) -> None:
    ld = ev_charger_load(amps)
    assert ld.va == pytest.approx(kw * 1000)
    assert ld.continuous  # NEC 2023 625.42: continuous load


def test_standard_method_minimum_7200() -> None:
    # NEC 2023 220.57: larger of 7,200 VA or nameplate
    assert evse_load_va(16, method="standard", edition=2023) == pytest.approx(7200)
    assert evse_load_va(48, method="standard", edition=2023) == pytest.approx(11520)
    # optional methods and the 2020 edition use the nameplate (220.57 is new in NEC 2023)
    assert evse_load_va(16, method="optional", edition=2023) == pytest.approx(3840)
    assert evse_load_va(16, method="standard", edition=2020) == pytest.approx(3840)


def test_restricted_setting() -> None:
    # NEC 2023 625.42(B): a 48 A charger locked at 32 A is rated 32 A -> 40 A breaker, 7,680 VA
    c = evse_circuit(48, restricted_amps=32)
    assert c.rated_amps == 32
    assert c.breaker_amps == 40  # NEC 2023 625.41: 32 A x 1.25 = 40 A, a 240.6(A) standard size
    assert c.load_va == pytest.approx(7680)
    assert c.continuous_amps == pytest.approx(40)
    with pytest.raises(ElectricalInputError, match="restricted_amps"):
        evse_circuit(32, restricted_amps=40)


def test_ems_setpoint() -> None:
    # NEC 2023 220.70 / 750.30: the setpoint is the counted (continuous) load
    assert ems_counted_va(24) == pytest.approx(5760)
    assert ems_counted_va(24, continuous_at_125=True) == pytest.approx(7200)


def test_evse_bad_input() -> None:
    with pytest.raises(ElectricalInputError, match="charger_amps"):
        evse_breaker_amps(0)
    with pytest.raises(ElectricalInputError, match="volts"):
        ev_charger_load(32, volts=230)
    with pytest.raises(ElectricalInputError, match="method"):
        evse_load_va(32, method="fancy")
