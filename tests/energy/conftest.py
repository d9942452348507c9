"""Shared fixtures for the energy tests: real TMY3 years shipped with pvlib and synthetic climates.

The synthetic climate normals are approximate values recalled from memory (99 % heating and 1 %
cooling design temperatures of the kind in the ASHRAE Handbook - Fundamentals (2021, ch. 14) climatic design
tables, degree days of the kind in NOAA normals); the demo homes built in these tests are invented.
"""

from __future__ import annotations

import os

import pytest

from homeplan.energy.weather import ClimateNormals, Weather, read_tmy3, synthetic_weather

# (lat, lon, HDD65, CDD65, 99 % heating F, 1 % cooling F, cloudiness) - from memory
CLIMATES: dict[str, ClimateNormals] = {
    # Minneapolis -10 F / 7,500 HDD65 (from memory); CDD, 1 % from memory
    "minneapolis": ClimateNormals(44.9, -93.2, 7500.0, 750.0, -10.0, 88.0, 0.5),
    # Boston 12 F / 5,600 HDD65 (from memory)
    "boston": ClimateNormals(42.4, -71.0, 5600.0, 750.0, 12.0, 88.0, 0.5),
    # Atlanta 26 F / 2,700 HDD65 (from memory)
    "atlanta": ClimateNormals(33.6, -84.4, 2700.0, 1800.0, 26.0, 92.0, 0.45),
    # Phoenix-like: ~950 HDD65, ~4,600 CDD65, 99 % 37 F, 1 % 107 F (from memory)
    "phoenix": ClimateNormals(33.4, -112.0, 950.0, 4600.0, 37.0, 107.0, 0.2),
}


def pvlib_data(name: str) -> str:
    import pvlib

    return os.path.join(os.path.dirname(pvlib.__file__), "data", name)


@pytest.fixture(scope="session")
def climates() -> dict[str, ClimateNormals]:
    """The synthetic-climate targets above."""
    return CLIMATES


@pytest.fixture(scope="session")
def pvlib_data_dir() -> str:
    """Folder of the data files shipped inside the pvlib wheel."""
    import pvlib

    return os.path.join(os.path.dirname(pvlib.__file__), "data")


@pytest.fixture(scope="session")
def greensboro() -> Weather:
    """pvlib/data/723170TYA.CSV: TMY3 Greensboro NC (36.1 N, 79.95 W)."""
    return read_tmy3(pvlib_data("723170TYA.CSV"))


@pytest.fixture(scope="session")
def sand_point() -> Weather:
    """pvlib/data/703165TY.csv: TMY3 Sand Point AK (55.3 N, 160.5 W)."""
    return read_tmy3(pvlib_data("703165TY.csv"))


@pytest.fixture(scope="session")
def synthetic() -> dict[str, Weather]:
    """Synthetic typical years for the four climates (built once per session)."""
    return {name: synthetic_weather(n) for name, n in CLIMATES.items()}
