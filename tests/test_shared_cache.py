"""Homes of one place share their weather year and solar geometry; results do not change.

Checks of the project's own behaviour (a cache must be invisible): every sample home planned
alone and planned after other homes with one shared cache gives the same result, field by field.
"""

from __future__ import annotations

import copy
from dataclasses import replace

import pytest

from homeplan import PlannerCache, plan_roadmap
from homeplan.energy.simulate import SiteCache
from homeplan.energy.solar import SolarSite
from homeplan.plan.load import load_plan, validate_document
from homeplan.plan.save import set_in
from homeplan.planner.diskstore import DiskStore
from homeplan.planner.shared import SharedCache, place_key

from .conftest import ROOT, SAMPLES


def _same(result):
    """The result without the solver's wall time (the one field that is a measurement)."""
    return replace(result, solver=replace(result.solver, seconds=0.0)) if result.solver else result


def _variant(path, **values):
    loaded = load_plan(path)
    doc = copy.deepcopy(loaded.document)
    for dotted, v in values.items():
        set_in(doc, tuple(dotted.split("__")), v)
    plan, _ = validate_document(doc, str(path))
    return plan


@pytest.fixture(scope="module")
def homes():
    cold = ROOT / "sample_homes" / "cold_gas_100a.yaml"
    plans = [(load_plan(p).plan, p.parent) for p in SAMPLES]
    # two more homes in the first sample's place: another size and another roof direction
    plans.append((_variant(cold, home__floor_area_ft2=1400), cold.parent))
    plans.append((_variant(cold, home__roof__azimuth_deg=135, budget__usd_per_year=5000), cold.parent))
    return plans


def test_sharing_changes_no_result(homes):
    alone = [_same(plan_roadmap(plan, folder, PlannerCache())) for plan, folder in homes]
    shared = SharedCache()
    order = [*range(len(homes)), *range(len(homes) - 1, -1, -1)]  # each place met again later
    for i in order:
        plan, folder = homes[i]
        assert _same(plan_roadmap(plan, folder, PlannerCache(shared=shared))) == alone[i], plan.home.name


def test_one_place_one_weather_year(homes):
    shared = SharedCache()
    cold, _, _, _, _, small, turned = homes
    a = shared.place(cold[0], cold[1])
    assert shared.place(small[0], small[1]) is a          # same place, another home
    assert shared.place(turned[0], turned[1]) is a
    other = homes[1]
    assert shared.place(other[0], other[1]) is not a      # another climate
    assert place_key(cold[0], cold[1]) != place_key(other[0], other[1])


def test_places_kept_are_bounded(homes):
    shared = SharedCache(max_places=2)
    first = shared.place(*homes[0])
    shared.place(*homes[1])
    shared.place(*homes[2])
    assert shared.place(*homes[0]) is not first           # the oldest place was dropped


def test_a_solar_site_belongs_to_its_weather(homes):
    shared = SharedCache()
    a = shared.place(*homes[0])
    b = shared.place(*homes[1])
    SiteCache(a.weather, solar=a.solar)
    with pytest.raises(ValueError, match="same weather"):
        SiteCache(a.weather, solar=SolarSite(b.weather))


def test_a_shared_place_reads_its_weather_year_through_the_disk_store(homes, tmp_path):
    plan, folder = homes[0]
    assert plan.home.climate.weather_file is None  # a generated year: the store keeps it
    alone = _same(plan_roadmap(plan, folder, PlannerCache()))
    store = DiskStore(tmp_path)
    shared = SharedCache()
    got = _same(plan_roadmap(plan, folder, PlannerCache(store=store, shared=shared)))
    assert got == alone
    assert list(tmp_path.glob("*.npz")) or list(tmp_path.rglob("*.npz"))  # the year was kept
    again = _same(plan_roadmap(plan, folder, PlannerCache(store=DiskStore(tmp_path), shared=SharedCache())))
    assert again == alone  # read back from the store
