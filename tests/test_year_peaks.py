"""Each year's winter and summer peaks come from that year's simulated home.

Checks computed from the result itself: the last year's state is the planned home, whose hourly
electricity the result also carries; the do-nothing years are today's home. Winter is
December-February and summer June-August, as the energy engine's hour grid defines them.
"""

from __future__ import annotations

import numpy as np
import pytest

from homeplan import PlannerCache, plan_roadmap
from homeplan.energy import timegrid
from homeplan.plan.load import load_plan
from homeplan.result import Roadmap

from .conftest import SAMPLES

MONTH = timegrid.hour_month()
WINTER = np.isin(MONTH, timegrid.WINTER_MONTHS)
SUMMER = np.isin(MONTH, timegrid.SUMMER_MONTHS)


@pytest.fixture(scope="module", params=SAMPLES[:3], ids=[p.name for p in SAMPLES[:3]])
def result(request):
    return plan_roadmap(load_plan(request.param), cache=PlannerCache())


def _peaks(profile):
    load = np.asarray(profile.load_kw)
    return float(load[WINTER].max()), float(load[SUMMER].max())


def test_last_year_peaks_are_the_planned_homes(result):
    rm = result.roadmap
    after = next(h for h in result.hourly if h.label == "after the plan")
    winter, summer = _peaks(after)
    last = rm.years[-1]
    assert last.peak_winter_kw == pytest.approx(winter, abs=0.01)
    assert last.peak_summer_kw == pytest.approx(summer, abs=0.01)
    assert max(last.peak_winter_kw, last.peak_summer_kw) <= last.peak_kw + 0.01


def test_doing_nothing_keeps_todays_peaks(result):
    today = next(h for h in result.hourly if h.label == "today")
    winter, summer = _peaks(today)
    for y in result.roadmap.baseline("do_nothing").years:
        assert y.peak_winter_kw == pytest.approx(winter, abs=0.01)
        assert y.peak_summer_kw == pytest.approx(summer, abs=0.01)


def test_peaks_survive_the_json_round_trip(result):
    rm = result.roadmap
    back = Roadmap.from_dict(rm.to_dict())
    assert [y.peak_winter_kw for y in back.years] == [y.peak_winter_kw for y in rm.years]
    old = rm.to_dict()
    for y in old["years"]:
        del y["peak_winter_kw"], y["peak_summer_kw"]
    assert all(y.peak_winter_kw == 0.0 for y in Roadmap.from_dict(old).years)  # older files
