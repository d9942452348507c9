"""Equipment given with pre-2023 ratings: converted once, used as the current ratings, said so.

The conversions themselves are checked against DOE's paired standard levels in
tests/energy/test_energy_ratings.py; here only that the plan's SEER and HSPF reach the home's
model as the SEER2 and HSPF2 the library gives, that an EER (or EER2) sets the summer peak
demand, and that giving both is an error.
"""

from __future__ import annotations

import pytest

from homeplan.energy.ratings import hspf2_from_hspf, seer2_from_seer
from homeplan.errors import InputError
from homeplan.plan.load import load_plan_text
from homeplan.planner.basis import home_basis

HOME = """\
home:
  climate: {hdd65: 5000, heating_design_f: 10, cdd65: 1200, cooling_design_f: 92}
  floor_area_ft2: 1600
  electrical: {service_amps: 200}
appliances:
  - {kind: heat_pump, year_installed: 2012, capacity_btuh: 36000, RATINGS}
budget: {usd_per_year: 8000, first_year: 2027}
"""


def _basis(ratings: str):
    return home_basis(load_plan_text(HOME.replace("RATINGS", ratings)).plan)


def test_old_ratings_are_used_as_their_current_equivalents() -> None:
    old = _basis("seer: 14, hspf: 8.2")
    new = _basis(f"seer2: {seer2_from_seer(14)}, hspf2: {hspf2_from_hspf(8.2)}")
    # SEER 14 -> SEER2 13.3 and HSPF 8.2 -> HSPF2 6.97 (split-system factors 0.95 and 0.85)
    assert old.base.cooling.seer2 == pytest.approx(13.3)
    assert old.base.heating.seer2 == pytest.approx(13.3)
    assert old.base.heating.cop_47 == pytest.approx(new.base.heating.cop_47)
    assert old.base.heating.cop_5 == pytest.approx(new.base.heating.cop_5)
    assert any("SEER 14 (a pre-2023 rating) is counted as SEER2 13.3" in n for n in old.notes)
    assert any("HSPF 8.2 (a pre-2023 rating) is counted as HSPF2 7.0" in n for n in old.notes)
    assert not any("pre-2023" in n for n in new.notes)


def test_both_old_and_new_rating_is_an_error() -> None:
    with pytest.raises(InputError) as info:
        load_plan_text(HOME.replace("RATINGS", "seer: 14, seer2: 13.4"), "p.yaml")
    (p,) = info.value.problems
    assert "both seer" in p.message and "label" in str(p) and p.line == 6


def test_an_old_eer_sets_the_summer_peak_as_its_eer2() -> None:
    # EER2 is the full-load cooling efficiency at 95 F in Btu/h per W (DOE 10 CFR 430 Subpart B
    # Appendix M1), so a single-speed unit of 36,000 Btu/h draws 36,000 / EER2 W on the design
    # day. EER 11 counts as EER2 11 x 11.7 / 12.2: the ratio of DOE's paired 2023 southwest
    # levels for split air conditioners, 11.7 EER2 and 12.2 EER (10 CFR 430.32(c)).
    old = _basis("seer: 14, hspf: 8.2, eer: 11")
    assert old.peak.today.cooling_kw == pytest.approx(36000 / (11 * 11.7 / 12.2) / 1000, rel=2e-3)
    assert any("EER 11 (a pre-2023 rating) is counted as EER2 10.6" in n for n in old.notes)
    given = _basis("seer2: 13.3, hspf2: 7, eer2: 12")
    assert given.peak.today.cooling_kw == pytest.approx(36000 / 12 / 1000)  # 3.0 kW, by definition
    # without an EER2 the peak uses the typical 0.8 x SEER2 (from memory: AHRI directory listings)
    unknown = _basis("seer2: 13.3, hspf2: 7")
    assert unknown.peak.today.cooling_kw == pytest.approx(36000 / (13.3 * 0.8) / 1000)


def test_both_eer_and_eer2_is_an_error() -> None:
    with pytest.raises(InputError) as info:
        load_plan_text(HOME.replace("RATINGS", "eer: 11, eer2: 10.5"), "p.yaml")
    (p,) = info.value.problems
    assert "both eer" in p.message and p.line == 6
