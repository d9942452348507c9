"""The fuel vocabulary: the names plan files and results use, and the energy engine's names.

Plan files name an appliance's fuel ``gas``, ``propane``, ``oil``, ``electric`` or ``wood`` and a
vehicle's ``gasoline``, ``diesel``, ``hybrid``, ``plug_in_hybrid`` or ``electric``; bills and
results are keyed ``electricity``, ``gas``, ``propane``, ``oil``, ``gasoline`` and ``diesel``,
with the unit in energy keys (``gas_therm``, ``oil_gal``). The energy engine uses its own names
(``natural_gas``, ``heating_oil``, ``electricity``). Every translation between them is here, so
that no module keeps a private copy.

References
----------
US EIA, "Units and calculators explained" (trade units: therm of natural gas, gallon of propane,
heating oil, gasoline and diesel; kWh of electricity).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from homeplan.plan.model import Appliance

__all__ = [
    "BILL_FUELS",
    "DEFAULT_APPLIANCE_FUEL",
    "ENGINE_FUEL",
    "FOSSIL_FUELS",
    "GASOLINE_VEHICLES",
    "HOME_FUELS",
    "TANK_FUELS",
    "UNIT_KEY",
    "VEHICLE_FUELS",
    "appliance_fuel",
    "bill_fuel",
    "engine_fuel",
    "vehicle_fuel",
]

HOME_FUELS: tuple[str, ...] = ("gas", "propane", "oil")
"""Combustion fuels delivered to the house (a gas service or a tank); closing one is a milestone."""

TANK_FUELS: tuple[str, ...] = ("propane", "oil")
"""Home fuels kept in a tank on the property (priced per gallon; the tank is removed at the end)."""

VEHICLE_FUELS: tuple[str, ...] = ("gasoline", "diesel")
"""Combustion fuels of the household's cars."""

FOSSIL_FUELS: tuple[str, ...] = HOME_FUELS + VEHICLE_FUELS
"""Every fossil fuel a household buys: the money that electrification stops."""

BILL_FUELS: tuple[str, ...] = ("electricity", *FOSSIL_FUELS)
"""Keys of the bills by fuel in every result (``YearTotals.bills_usd`` and energy summaries)."""

ENGINE_FUEL: dict[str, str] = {
    "gas": "natural_gas", "propane": "propane", "oil": "heating_oil", "electric": "electricity",
    "electricity": "electricity", "gasoline": "gasoline", "diesel": "diesel",
}
"""Plan or bill fuel name -> the energy engine's fuel name."""

_BILL_FUEL: dict[str, str] = {
    "electricity": "electricity", "natural_gas": "gas", "propane": "propane", "heating_oil": "oil",
    "gasoline": "gasoline", "diesel": "diesel",
}

UNIT_KEY: dict[str, str] = {
    "electricity": "electricity_kwh", "natural_gas": "gas_therm", "propane": "propane_gal",
    "heating_oil": "oil_gal", "gasoline": "gasoline_gal", "diesel": "diesel_gal",
}
"""Energy engine fuel name -> the result's energy key (unit in the name)."""

DEFAULT_APPLIANCE_FUEL: dict[str, str] = {
    "furnace": "gas", "boiler": "gas", "water_heater": "gas", "range": "gas", "cooktop": "gas",
    "wall_oven": "electric", "dryer": "electric", "central_ac": "electric", "room_ac": "electric",
    "heat_pump": "electric", "mini_split": "electric", "baseboard": "electric",
}
"""The fuel of an appliance whose plan entry does not name one (common practice, no source:
the usual fuel of each kind in US homes that still burn gas)."""


def engine_fuel(name: str) -> str:
    """The energy engine's name of a plan or bill fuel (``gas`` -> ``natural_gas``)."""
    return ENGINE_FUEL[name]


def bill_fuel(engine_name: str) -> str | None:
    """The result's bill key of an engine fuel (``heating_oil`` -> ``oil``); None if unbilled."""
    return _BILL_FUEL.get(engine_name)


def appliance_fuel(appliance: Appliance) -> str:
    """The fuel an appliance burns: the plan's value, else the usual fuel of its kind."""
    return appliance.fuel or DEFAULT_APPLIANCE_FUEL.get(appliance.kind, "electric")


def vehicle_fuel(fuel: str) -> str:
    """The fuel a vehicle buys at the pump: hybrids burn gasoline; ``electric`` stays."""
    return "gasoline" if fuel in GASOLINE_VEHICLES else fuel


GASOLINE_VEHICLES: tuple[str, ...] = ("gasoline", "hybrid", "plug_in_hybrid")
"""Vehicle fuels (plan file) of cars that fill up with gasoline."""
