"""Unit conversions against pint (a reference library from the package registry)."""

from __future__ import annotations

import pint
import pytest

from homeplan import units

ureg = pint.UnitRegistry()


def test_area_and_length():
    assert units.FT2_PER_M2 == pytest.approx((1 * ureg.m**2).to(ureg.ft**2).magnitude, rel=1e-12)
    assert units.M_PER_MILE == pytest.approx((1 * ureg.mile).to(ureg.m).magnitude, rel=1e-12)


def test_gallon():
    assert units.L_PER_GAL == pytest.approx((1 * ureg.gallon).to(ureg.liter).magnitude, rel=1e-12)


def test_energy():
    # pint's Btu is the International Table Btu: 1 kWh = 3412.14 Btu (EIA rounds to the same)
    assert units.BTU_PER_KWH == pytest.approx((1 * ureg.kWh).to(ureg.Btu).magnitude, rel=1e-6)
    assert units.KWH_PER_THERM == pytest.approx((1 * ureg.therm).to(ureg.kWh).magnitude, rel=1e-3)


def test_temperature():
    q = ureg.Quantity(-23.0, ureg.degC).to(ureg.degF).magnitude
    assert units.f_from_c(-23.0) == pytest.approx(q)
    assert units.c_from_f(units.f_from_c(12.5)) == pytest.approx(12.5)
