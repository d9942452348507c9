"""The roadmap's order of work is one a licensed installer would follow.

Rules checked on every sample home (common practice, no source; NFPA 54 (2024) 7.4 and 9.3
require gas piping to be kept serving its appliances or capped, so a service is closed only
when nothing is left on it):
- a fuel's service is closed, or its tank removed, only after every appliance on that fuel is
  replaced (by an upgrade or like for like), earlier in the list or in an earlier year;
- room on the service (panel, service upgrade, load management) comes before the new loads of
  the same year;
- each step names what it replaces: the appliance, vehicle or roof ids of the plan file.
"""

from __future__ import annotations

import pytest

from homeplan import load_plan, plan_roadmap
from homeplan.catalog import upgrade_kinds
from homeplan.plan.fuels import appliance_fuel
from homeplan.planner.candidates import MILESTONE_FOR_FUEL
from tests.conftest import SAMPLES

CLOSES = {m: fuel for fuel, m in MILESTONE_FOR_FUEL.items()}


@pytest.fixture(scope="module", params=SAMPLES, ids=[p.stem for p in SAMPLES])
def planned(request):
    loaded = load_plan(request.param)
    return loaded.plan, plan_roadmap(loaded)


def test_fuel_closed_only_after_its_last_appliance(planned):
    plan, result = planned
    steps = result.roadmap.steps
    closures = [(i, s) for i, s in enumerate(steps) if s.project_id in CLOSES]
    for i, closure in closures:
        fuel = CLOSES[closure.project_id]
        on_fuel = {a.key for a in plan.appliances if appliance_fuel(a) == fuel}
        replaced_before = {key for s in steps[:i] for key in s.replaces}
        assert on_fuel <= replaced_before, (closure.project_id, on_fuel - replaced_before)


def test_the_samples_close_a_fuel():
    """Guard: the order test above has closures to check (most samples end fully electric)."""
    closing = 0
    for path in SAMPLES:
        closing += any(s.project_id in CLOSES for s in plan_roadmap(load_plan(path)).roadmap.steps)
    assert closing >= 3


def test_room_on_the_service_before_the_loads_of_its_year(planned):
    _, result = planned
    kinds = upgrade_kinds()
    steps = result.roadmap.steps
    for i, s in enumerate(steps):
        info = result.project(s.project_id)
        if info is None or not kinds[info.kind].capacity_remedy:
            continue
        same_year_loads_before = [t.project_id for t in steps[:i] if t.year == s.year
                                  and result.project(t.project_id) is not None
                                  and kinds[result.project(t.project_id).kind].capacity_load]
        assert same_year_loads_before == [], (s.project_id, same_year_loads_before)


def test_steps_name_what_they_replace(planned):
    plan, result = planned
    keys = {a.key for a in plan.appliances} | {plan.vehicle_key(i) for i in range(len(plan.vehicles))}
    keys |= {"roof"}
    for s in result.roadmap.steps:
        info = result.project(s.project_id)
        expected = info.replaces if info is not None else (s.project_id.split(":", 1)[1],)
        assert s.replaces == tuple(expected)
        assert set(s.replaces) <= keys


def test_fuel_closed_within_a_year_of_its_last_appliance(planned):
    """Common practice, no source: an unused oil or propane tank is a leak and fire risk, and a
    gas service left open keeps its fixed charge - the fuel goes within a year of the last
    appliance on it (when that year is inside the plan)."""
    plan, result = planned
    road = result.roadmap
    for fuel, milestone in MILESTONE_FOR_FUEL.items():
        on_fuel = {a.key for a in plan.appliances if appliance_fuel(a) == fuel}
        electric = [s for s in road.steps if set(s.replaces) & on_fuel
                    and not s.project_id.startswith("like_for_like:")]
        if not on_fuel or {k for s in electric for k in s.replaces} & on_fuel != on_fuel:
            continue
        last = max(s.year for s in electric)
        if last + 1 > road.last_year:
            continue
        closing = [s.year for s in road.steps if s.project_id == milestone]
        assert closing and closing[0] <= last + 1, (milestone, last, closing)
