"""Pre-2023 ratings (SEER, EER, HSPF) to the current ones, and seasonal energy from HSPF2/SEER2.

The conversion factors are checked against the standard levels DOE set for equipment made from
2023-01-01 (10 CFR 430.32(c)), which DOE stated in both the old metrics (test procedure
Appendix M) and the new ones (Appendix M1). The new-metric side is as listed in the FTC's
EnergyGuide ranges (16 CFR 305, Appendix H, 87 FR 57986); the old-metric side of each pair is
from memory of DOE's January 2017 direct final rule. DOE rounded its levels to 0.1, so a factor
agrees when it reproduces the paired level within 1 %.
"""

from __future__ import annotations

import numpy as np
import pint
import pytest

from homeplan.energy.ratings import (
    SYSTEMS,
    conversion_factor,
    eer2_from_eer,
    hspf2_from_hspf,
    seasonal_cooling_kwh,
    seasonal_heating_kwh,
    seer2_from_seer,
)

UREG = pint.UnitRegistry()


@pytest.mark.parametrize(("old", "new", "system", "what"), [
    (15.0, 14.3, "split", "split heat pump, national"),
    (14.0, 13.4, "split", "split air conditioner, north"),
    (15.0, 14.3, "split", "split air conditioner under 45,000 Btu/h, southeast and southwest"),
    (14.5, 13.8, "split", "split air conditioner of 45,000 Btu/h or more, southeast and southwest"),
    (14.0, 13.4, "single_package", "single-package air conditioner and heat pump"),
])
def test_seer_factor_reproduces_doe_paired_levels(old, new, system, what) -> None:
    assert seer2_from_seer(old, system) == pytest.approx(new, rel=0.01), what


@pytest.mark.parametrize(("old", "new", "system", "what"), [
    (8.8, 7.5, "split", "split heat pump"),
    (8.0, 6.7, "single_package", "single-package heat pump"),
])
def test_hspf_factor_reproduces_doe_paired_levels(old, new, system, what) -> None:
    assert hspf2_from_hspf(old, system) == pytest.approx(new, rel=0.01), what


@pytest.mark.parametrize(("old", "new", "system", "what"), [
    (12.2, 11.7, "split", "southwest split air conditioner under 45,000 Btu/h"),
    (11.7, 11.2, "split", "southwest split air conditioner of 45,000 Btu/h or more"),
    (10.2, 9.8, "split", "southwest split air conditioner with SEER 16 (SEER2 15.2) or more"),
    (11.0, 10.6, "single_package", "southwest single-package air conditioner"),
])
def test_eer_factor_reproduces_doe_paired_levels(old, new, system, what) -> None:
    assert eer2_from_eer(old, system) == pytest.approx(new, rel=0.01), what


def test_resnet_factor_table() -> None:
    # RESNET MINHERS Addendum 71 conversion factors (SEER2/SEER, HSPF2/HSPF)
    expected = {"split": (0.95, 0.85), "single_package": (0.96, 0.84),
                "small_duct_high_velocity": (1.00, 0.85), "space_constrained": (0.99, 0.85)}
    assert set(expected) == set(SYSTEMS)
    for system, (seer, hspf) in expected.items():
        assert conversion_factor("seer", system) == seer
        assert conversion_factor("hspf", system) == hspf


def test_bad_ratings_and_types_are_explained() -> None:
    with pytest.raises(ValueError, match="outside 3-15"):
        hspf2_from_hspf(85)  # a percentage or a typo, not an HSPF
    with pytest.raises(ValueError, match="unknown equipment type"):
        seer2_from_seer(14, "window")
    with pytest.raises(ValueError, match="no EER conversion"):
        eer2_from_eer(11, "space_constrained")
    with pytest.raises(ValueError, match="unknown rating"):
        conversion_factor("cop")


def test_seasonal_heating_energy_from_hspf2() -> None:
    # HSPF2 is Btu delivered per Wh used over the season (DOE Appendix M1), so by pint:
    # 30 MMBtu at 7.5 Btu/Wh = 4,000 kWh
    expected = (UREG.Quantity(30e6, "Btu") / UREG.Quantity(7.5, "Btu/Wh")).to("kWh").magnitude
    assert expected == pytest.approx(4_000)
    assert seasonal_heating_kwh(30e6, 7.5) == pytest.approx(expected, rel=1e-12)
    # the same as a seasonal COP of HSPF2 / 3.412 (NIST SP 811: 1 kWh = 3,412.14 Btu)
    cop = 7.5 / 3.41214
    assert seasonal_heating_kwh(30e6, 7.5) == pytest.approx(30e6 / 3412.14 / cop, rel=1e-5)
    # monthly heat in an array gives monthly kWh that add up to the season's
    months = np.array([8e6, 7e6, 5e6, 2e6, 0.0, 0.0, 0.0, 0.0, 0.0, 1e6, 3e6, 4e6])
    monthly = seasonal_heating_kwh(months, 7.5)
    assert monthly.shape == (12,) and monthly.sum() == pytest.approx(4_000)
    with pytest.raises(ValueError, match="HSPF2"):
        seasonal_heating_kwh(1e6, 0.0)
    with pytest.raises(ValueError, match="at least 0"):
        seasonal_heating_kwh(-1.0, 7.5)


def test_seasonal_cooling_energy_from_seer2() -> None:
    # SEER2 is Btu removed per Wh (DOE Appendix M1): 15 MMBtu at 14.3 Btu/Wh, by pint
    expected = (UREG.Quantity(15e6, "Btu") / UREG.Quantity(14.3, "Btu/Wh")).to("kWh").magnitude
    assert seasonal_cooling_kwh(15e6, 14.3) == pytest.approx(expected, rel=1e-12)
    with pytest.raises(ValueError, match="SEER2"):
        seasonal_cooling_kwh(1e6, float("nan"))
