"""Bad electrical input raises ElectricalInputError naming the field - never a wrong answer."""

from __future__ import annotations

import math

import pytest

from homeplan.electrical import (
    Dwelling,
    ElectricalInputError,
    Ems,
    Load,
    MeasuredDemand,
    Service,
    nameplate_load,
    nec220_82,
    nec220_83,
)


def test_error_is_a_value_error() -> None:
    assert issubclass(ElectricalInputError, ValueError)


@pytest.mark.parametrize(
    ("kwargs", "field"),
    [
        ({"service_amps": 100, "busbar_amps": 80}, "busbar_amps"),  # busbar below the main
        ({"service_amps": 100, "main_breaker_amps": 125}, "main_breaker_amps"),  # main above service
        ({"service_amps": 100, "volts": 230}, "volts"),  # unknown voltage
        ({"service_amps": -100}, "service_amps"),
        ({"service_amps": 0}, "service_amps"),
        ({"service_amps": math.nan}, "service_amps"),
    ],
)
def test_bad_service(kwargs: dict, field: str) -> None:
    with pytest.raises(ElectricalInputError, match=field) as exc:
        Service(**kwargs)
    assert exc.value.field == field


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"name": "Heater", "va": -1500, "category": "heating"}, r"va.*>= 0"),
        ({"name": "Heater", "va": math.inf, "category": "heating"}, "va"),
        ({"name": "Heater", "va": 1500, "category": "sauna"}, "category"),
        ({"name": "Heater", "va": 1500, "category": "heating", "volts": 277}, "volts"),
        ({"name": "", "va": 1500, "category": "heating"}, "name"),
        ({"name": "Heater", "va": 1500, "category": "heating", "heating_units": 0}, "heating_units"),
        ({"name": "Heater", "va": "1500", "category": "heating"}, "number"),
    ],
)
def test_bad_load(kwargs: dict, match: str) -> None:
    with pytest.raises(ElectricalInputError, match=match):
        Load(**kwargs)


def test_bad_dwelling() -> None:
    with pytest.raises(ElectricalInputError, match="floor_area_ft2"):
        Dwelling(0)
    with pytest.raises(ElectricalInputError, match=r"210\.11"):
        Dwelling(1500, small_appliance_circuits=1)
    with pytest.raises(ElectricalInputError, match="laundry_circuits"):
        Dwelling(1500, laundry_circuits=0)


def test_220_82_needs_100a_service() -> None:
    # NEC 2023 220.82(A) / 230.79(C): one-family service of 100 A or more
    with pytest.raises(ElectricalInputError, match="service_amps"):
        nec220_82(Dwelling(1000), [], Service(60))


def test_unknown_edition_and_options() -> None:
    with pytest.raises(ElectricalInputError, match="edition"):
        nec220_83(Dwelling(1000), [], Service(100), edition=2017)
    with pytest.raises(ElectricalInputError, match="case"):
        nec220_83(Dwelling(1000), [], Service(100), case="C")
    with pytest.raises(ElectricalInputError, match="existing_hvac_in_a"):
        nec220_83(Dwelling(1000), [], Service(100), existing_hvac_in_a="half")


def test_duplicate_names_and_ems_mismatch() -> None:
    dw = nameplate_load("dishwasher")
    with pytest.raises(ElectricalInputError, match="duplicate"):
        nec220_83(Dwelling(1000), [dw, dw], Service(100))
    managed = Load("Charger", 7680, "ev_charger", continuous=True, ems_controlled=True)
    with pytest.raises(ElectricalInputError, match="ems"):
        nec220_83(Dwelling(1000), [managed], Service(100))
    with pytest.raises(ElectricalInputError, match="ems"):
        nec220_83(Dwelling(1000), [dw], Service(100), ems=Ems(5000))
    with pytest.raises(ElectricalInputError, match="setpoint"):
        Ems(0)


def test_bad_measured_demand() -> None:
    with pytest.raises(ElectricalInputError, match="peak_kw"):
        MeasuredDemand(-1)
    with pytest.raises(ElectricalInputError, match="period"):
        MeasuredDemand(5, period="6_months")
    with pytest.raises(ElectricalInputError, match="basis"):
        MeasuredDemand(5, basis="daily")


def test_unknown_nameplate_key() -> None:
    with pytest.raises(ElectricalInputError, match="nameplate"):
        nameplate_load("jacuzzi")
