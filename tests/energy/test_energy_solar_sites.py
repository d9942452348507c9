"""Solar yield at real sites: pvlib's ModelChain on the TMY files shipped with pvlib, the
built-in typical year at those sites' own normals, and shade.

The TMY files are NSRDB typical years (Wilcox & Marion 2008, NREL/TP-581-43156; Marion & Urban
1995 for TMY2) that ship inside the pvlib wheel: the outside reference here.
"""

from __future__ import annotations

import os

import numpy as np
import pandas as pd
import pytest

from homeplan.energy.solar import SolarArraySpec, SolarSite
from homeplan.energy.units import f_to_c
from homeplan.energy.weather import ClimateNormals, read_weather, synthetic_weather

SITES = ("723170TYA.CSV", "703165TY.csv", "12839.tm2")  # Greensboro NC, Sand Point AK, Miami FL

# Tolerances of the built-in typical year against the measured typical year at the same site
# (stated by the task): annual GHI within 2 %, annual array yield within 5 %.
GHI_TOL = 0.02
YIELD_TOL = 0.05


def _file(name: str) -> str:
    import pvlib

    return os.path.join(os.path.dirname(pvlib.__file__), "data", name)


def _mean_sky_cover(name: str) -> float:
    """The file's own mean total sky cover (TotCld, tenths) as a fraction."""
    import pvlib

    if name.endswith(".tm2"):
        data, _ = pvlib.iotools.read_tmy2(_file(name))
        return float(data["TotCld"].mean()) / 10.0
    data, _ = pvlib.iotools.read_tmy3(_file(name), map_variables=True)
    return float(data["TotCld (tenths)"].mean()) / 10.0


def _site_normals(w, cover: float) -> ClimateNormals:
    """The site's normals as a user would give them: taken from the measured year itself."""
    return ClimateNormals(w.latitude_deg, w.longitude_deg, w.hdd65, w.cdd65, float(w.heating_design_f),
                          float(w.cooling_design_f), cloudiness=cover, tz_offset_h=w.tz_offset_h,
                          altitude_m=w.altitude_m)


def _model_chain_ac_kwh(w, spec: SolarArraySpec) -> float:
    """pvlib's ModelChain with the PVWatts models (a reference implementation), annual AC kWh."""
    import pvlib

    times = w.times(mid_hour=True)  # hour-ending records: the sun at mid-hour
    loc = pvlib.location.Location(w.latitude_deg, w.longitude_deg, altitude=w.altitude_m)
    system = pvlib.pvsystem.PVSystem(
        surface_tilt=spec.tilt_deg, surface_azimuth=spec.azimuth_deg, albedo=spec.albedo,
        module_parameters={"pdc0": spec.dc_kw * 1000.0, "gamma_pdc": spec.gamma_pdc},
        inverter_parameters={"pdc0": spec.dc_kw * 1000.0 / spec.dc_ac_ratio / spec.inverter_eff_nom,
                             "eta_inv_nom": spec.inverter_eff_nom},
        temperature_model_parameters=pvlib.temperature.TEMPERATURE_MODEL_PARAMETERS["sapm"][
            "open_rack_glass_polymer"],
        losses_parameters={} if spec.shading_pct is None else {"shading": spec.shading_pct},
    )
    mc = pvlib.modelchain.ModelChain(system, loc, aoi_model="no_loss", spectral_model="no_loss",
                                     transposition_model="haydavies", losses_model="pvwatts")
    weather = pd.DataFrame({"ghi": w.ghi_wm2, "dni": w.dni_wm2, "dhi": w.dhi_wm2,
                            "temp_air": f_to_c(w.temp_f), "wind_speed": w.wind_ms}, index=times)
    mc.run_model(weather)
    return float(np.clip(mc.results.ac.fillna(0.0).to_numpy(), 0.0, None).sum()) / 1000.0


@pytest.mark.parametrize("spec", [SolarArraySpec(1.0, 25.0, 180.0), SolarArraySpec(6.0, 35.0, 200.0, 1.3)])
def test_project_yield_agrees_with_pvlib_model_chain_on_the_tmy3_file(spec):
    w = read_weather(_file("723170TYA.CSV"))
    ours = float(SolarSite(w).ac_kw(spec).sum())
    ref = _model_chain_ac_kwh(w, spec)
    # pvlib ModelChain (PVWatts DC, losses and inverter; Hay-Davies; SAPM cell temperature)
    assert ours == pytest.approx(ref, rel=0.005)


@pytest.mark.parametrize("name", SITES)
def test_built_in_typical_year_matches_the_measured_year_at_its_site(name):
    measured = read_weather(_file(name))
    made = synthetic_weather(_site_normals(measured, _mean_sky_cover(name)))
    # annual GHI of the NSRDB typical year shipped with pvlib
    assert made.ghi_wm2.sum() == pytest.approx(measured.ghi_wm2.sum(), rel=GHI_TOL)
    for tilt in (25.0, round(measured.latitude_deg)):
        spec = SolarArraySpec(1.0, tilt, 180.0)
        # the measured year's yield by pvlib's ModelChain, the same array
        ref = _model_chain_ac_kwh(measured, spec)
        assert SolarSite(made).specific_yield_kwh_per_kwdc(spec) == pytest.approx(ref, rel=YIELD_TOL)


def test_shade_lowers_the_yield_per_kw_by_its_share():
    w = read_weather(_file("723170TYA.CSV"))
    site = SolarSite(w)
    clear = site.specific_yield_kwh_per_kwdc(SolarArraySpec(1.0, shading_pct=0.0))
    shaded = site.specific_yield_kwh_per_kwdc(SolarArraySpec(1.0, shading_pct=40.0))
    # a 40 % shade loss takes about 40 % of the output (the inverter's efficiency curve and
    # clipping make it not exact); pvlib's ModelChain with the same shading loss agrees
    assert 1 - shaded / clear == pytest.approx(0.40, abs=0.01)
    assert shaded == pytest.approx(_model_chain_ac_kwh(w, SolarArraySpec(1.0, shading_pct=40.0)), rel=0.005)
    # no shade given: the PVWatts default shading loss (3 %) of pvlib.pvsystem.pvwatts_losses
    default = site.specific_yield_kwh_per_kwdc(SolarArraySpec(1.0))
    assert default / clear == pytest.approx(0.97, abs=0.002)


def test_monthly_shade_takes_only_its_months():
    w = read_weather(_file("723170TYA.CSV"))
    site = SolarSite(w)
    winter = (50.0, 50.0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 50.0)
    base = site.ac_kw(SolarArraySpec(1.0, shading_pct=0.0))
    shaded = site.ac_kw(SolarArraySpec(1.0, shading_monthly_pct=winter))
    starts = np.cumsum([0, 31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30]) * 24
    m0, m1 = np.add.reduceat(base, starts), np.add.reduceat(shaded, starts)
    assert m1[0] / m0[0] == pytest.approx(0.5, abs=0.01)
    np.testing.assert_allclose(m1[3:11], m0[3:11], rtol=1e-12)


def test_shade_outside_0_100_is_refused():
    with pytest.raises(ValueError, match="0-100"):
        SolarArraySpec(1.0, shading_pct=120.0)
    with pytest.raises(ValueError, match="12 values"):
        SolarArraySpec(1.0, shading_monthly_pct=(10.0, 20.0))
