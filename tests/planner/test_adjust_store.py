"""A warmer or colder weather year (the sensitivity's weather case) keeps its solar output in the
disk store apart from the typical year's, and it is the output of the shifted year.

The reference is the solar model without any store: pvlib's PVWatts chain run on the shifted year
directly (hot cells lose output: PVWatts' temperature coefficient, pvlib
``pvsystem.pvwatts_dc``). The sample home is invented.
"""

from __future__ import annotations

import numpy as np

from homeplan import PlannerCache
from homeplan.energy.simulate import SiteCache
from homeplan.plan.load import load_plan
from homeplan.planner.adjust import Adjustments
from homeplan.planner.chain import prepare_home
from homeplan.planner.diskstore import DiskStore
from homeplan.planner.states import roof_array

from ..conftest import ROOT


def test_shifted_year_output_is_kept_under_its_own_key(tmp_path) -> None:
    loaded = load_plan(ROOT / "sample_homes" / "minimal.yaml")
    store = DiskStore(tmp_path)
    ctx = prepare_home(loaded.plan, loaded.base_dir, PlannerCache(store=store))
    warm = Adjustments(weather_shift_f=9.0).home(ctx)
    array = roof_array(loaded.plan, 1.0)
    typical = ctx.basis.site.pv_ac_kw(array)
    files_before = {p for p in tmp_path.rglob("*") if p.is_file()}
    shifted = warm.basis.site.pv_ac_kw(array)
    files_after = {p for p in tmp_path.rglob("*") if p.is_file()}
    assert len(files_after - files_before) == 1  # the shifted year's output, stored on its own
    reference = SiteCache(warm.basis.weather).pv_ac_kw(array)  # no store: computed afresh
    np.testing.assert_allclose(shifted, reference, rtol=0, atol=1e-12)
    assert shifted.sum() < typical.sum()  # 9 F warmer: hotter cells, less output
