"""Rooftop solar with pvlib: solar position, plane-of-array irradiance, SAPM cell temperature,
PVWatts DC model, system losses and PVWatts inverter clipping.

Weather-only quantities (sun position, POA irradiance, cell temperature) are computed once per
home in a :class:`SolarSite` and memoised per orientation; a state simulation then only scales a
per-kWdc AC profile by the array size.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from homeplan.energy._data import constant
from homeplan.energy.units import f_to_c

__all__ = [
    "ArrayKeeper",
    "SolarArraySpec",
    "SolarSite",
    "default_losses_pct",
    "pvwatts_dc_kw",
    "pvwatts_inverter_kw",
]


@dataclass(frozen=True)
class SolarArraySpec:
    """A fixed-tilt PV array of ``dc_kw`` (STC nameplate) facing ``azimuth_deg`` (180 = south).

    ``losses_pct`` None means pvlib's ``pvwatts_losses()`` defaults (14.08 %).
    ``gamma_pdc`` is the PVWatts "standard" module temperature coefficient (-0.37 %/C).

    Attributes
    ----------
    dc_kw : float
        DC nameplate at STC, kWdc.
    tilt_deg : float
        Tilt from horizontal, degrees.
    azimuth_deg : float
        Azimuth, degrees clockwise from north (180 = south).
    dc_ac_ratio : float
        DC nameplate / inverter AC rating, dimensionless.
    inverter_eff_nom : float
        Nominal inverter efficiency, fraction.
    gamma_pdc : float
        Module power temperature coefficient, 1/C.
    losses_pct : float or None
        System losses, percent; None uses pvlib's default.
    temp_model : str
        pvlib SAPM temperature model parameter set.
    transposition : str
        pvlib transposition model, e.g. ``haydavies`` or ``perez``.
    albedo : float
        Ground reflectance, fraction.

    References
    ----------
    Dobos, A. P. (2014), "PVWatts Version 5 Manual", NREL/TP-6A20-62641.
    """

    dc_kw: float
    tilt_deg: float = 25.0
    azimuth_deg: float = 180.0
    dc_ac_ratio: float = 1.2
    inverter_eff_nom: float = 0.96
    gamma_pdc: float = -0.0037
    losses_pct: float | None = None
    temp_model: str = "open_rack_glass_polymer"
    transposition: str = "haydavies"
    albedo: float = 0.25

    def shape_key(self) -> tuple:
        """Everything except the size: arrays with the same key share a per-kWdc profile.

        Returns
        -------
        tuple
            Orientation, inverter, loss and model fields (a cache key).
        """
        return (self.tilt_deg, self.azimuth_deg, self.dc_ac_ratio, self.inverter_eff_nom,
                self.gamma_pdc, self.losses_pct, self.temp_model, self.transposition, self.albedo)


ArrayKeeper = Callable[[tuple, Callable[[], np.ndarray]], np.ndarray]
"""``keep(parts, make)``: the array stored under the content key ``parts``, or ``make()``'s,
stored (a disk store passes its reader; the energy engine itself keeps nothing on disk)."""


def default_losses_pct() -> float:
    """PVWatts' default system losses combined as ``100 (1 - prod(1 - L_i / 100))`` (14.08 %),
    the formula of ``pvlib.pvsystem.pvwatts_losses`` with the categories in ``constants.csv``
    (computed here so that a plan whose solar output is stored on disk need not import pvlib).

    Returns
    -------
    float
        System losses, percent.

    References
    ----------
    Dobos (2014) NREL/TP-6A20-62641 (PVWatts default system losses).
    """
    keep = 1.0
    for name in _PVWATTS_LOSSES:
        keep *= 1.0 - constant(f"pvwatts_loss_{name}_pct") / 100.0
    return 100.0 * (1.0 - keep)


_PVWATTS_LOSSES = ("soiling", "shading", "snow", "mismatch", "wiring", "connections", "lid",
                   "nameplate_rating", "age", "availability")


def pvwatts_dc_kw(poa_wm2: np.ndarray, temp_cell_c: np.ndarray, pdc0_kw: float,
                  gamma_pdc: float) -> np.ndarray:
    """PVWatts DC power: P = G/1000 * Pdc0 * (1 + gamma (Tc - 25)).

    Parameters
    ----------
    poa_wm2 : numpy.ndarray
        Plane-of-array irradiance, W/m2.
    temp_cell_c : numpy.ndarray
        Cell temperature, C.
    pdc0_kw : float
        DC nameplate at STC, kW.
    gamma_pdc : float
        Module power temperature coefficient, 1/C.

    Returns
    -------
    numpy.ndarray
        DC power, kW (same shape as ``poa_wm2``).

    References
    ----------
    Dobos (2014) NREL/TP-6A20-62641, eq. 2; pvlib.pvsystem.pvwatts_dc.
    """
    return poa_wm2 * 0.001 * pdc0_kw * (1.0 + gamma_pdc * (temp_cell_c - 25.0))


def pvwatts_inverter_kw(pdc_kw: np.ndarray, pdc0_kw: float, eta_inv_nom: float = 0.96,
                        eta_inv_ref: float = 0.9637) -> np.ndarray:
    """PVWatts inverter: eta(zeta) = eta_nom/eta_ref (-0.0162 zeta - 0.0059/zeta + 0.9858),
    AC = min(eta * Pdc, eta_nom * Pdc0), floored at 0 (clipping at the AC rating).

    Parameters
    ----------
    pdc_kw : numpy.ndarray
        DC input power, kW.
    pdc0_kw : float
        Inverter DC input limit, kW (AC rating / nominal efficiency).
    eta_inv_nom : float
        Nominal inverter efficiency, fraction.
    eta_inv_ref : float
        Reference efficiency of the PVWatts efficiency curve, fraction.

    Returns
    -------
    numpy.ndarray
        AC power, kW (same shape as ``pdc_kw``).

    References
    ----------
    Dobos (2014) NREL/TP-6A20-62641, eq. 10-11; pvlib.inverter.pvwatts.
    """
    zeta = pdc_kw / pdc0_kw
    inv = np.divide(0.0059, zeta, out=np.zeros_like(zeta), where=zeta != 0)
    eta = eta_inv_nom / eta_inv_ref * (-0.0162 * zeta - inv + 0.9858)
    return np.maximum(np.minimum(eta * pdc_kw, eta_inv_nom * pdc0_kw), 0.0)


class SolarSite:
    """Per-home cache of weather-only solar quantities (built once, reused by every state).

    Holds the solar position (at mid-hour) and, memoised per array shape, plane-of-array
    irradiance, cell temperature and the AC output per kWdc. It depends on the weather only, so
    homes with the same weather year may share one.

    Parameters
    ----------
    weather : homeplan.energy.weather.Weather
        The home's typical-year weather.

    References
    ----------
    Reda & Andreas (2004) NREL SPA via pvlib.solarposition.get_solarposition;
    Hay & Davies (1980) / Perez et al. (1990) transposition via pvlib.irradiance.get_total_irradiance;
    King et al. (2004) SAND2004-3535 (SAPM cell temperature) via pvlib.temperature.sapm_cell.
    """

    def __init__(self, weather, keep: ArrayKeeper | None = None) -> None:
        # weather: homeplan.energy.weather.Weather
        self.weather = weather
        self.keep = keep
        self._solpos: dict[str, np.ndarray] | None = None
        self._poa: dict[tuple, tuple[np.ndarray, np.ndarray]] = {}
        self._ac: dict[tuple, np.ndarray] = {}

    def solar_position(self) -> dict[str, np.ndarray]:
        """Apparent zenith, zenith and azimuth (deg) at mid-hour; also extraterrestrial DNI and
        relative airmass.

        Returns
        -------
        dict of str to numpy.ndarray
            ``apparent_zenith``, ``zenith``, ``azimuth`` (degrees), ``dni_extra`` (W/m2) and
            ``airmass`` (dimensionless), 8760 values each.
        """
        if self._solpos is None:
            from pvlib import atmosphere, irradiance, solarposition

            w = self.weather
            times = w.times(mid_hour=True)
            if w.sun is not None:  # computed with the same times and site when the year was made
                sp = w.sun
            else:
                sp = solarposition.get_solarposition(times, w.latitude_deg, w.longitude_deg,
                                                     altitude=w.altitude_m)
                sp = {k: sp[k].to_numpy(float) for k in ("apparent_zenith", "zenith", "azimuth")}
            app = sp["apparent_zenith"]
            self._solpos = {
                "apparent_zenith": app,
                "zenith": sp["zenith"],
                "azimuth": sp["azimuth"],
                "dni_extra": np.asarray(irradiance.get_extra_radiation(times), float),
                "airmass": np.asarray(atmosphere.get_relative_airmass(app), float),
            }
        return self._solpos

    def poa_and_cell_temp(self, spec: SolarArraySpec) -> tuple[np.ndarray, np.ndarray]:
        """(POA global W/m2, cell temperature C) for the array's orientation and mounting.

        Parameters
        ----------
        spec : SolarArraySpec
            The array (its size is not used).

        Returns
        -------
        poa : numpy.ndarray
            Plane-of-array global irradiance, W/m2 (8760 values, read-only).
        temp_cell : numpy.ndarray
            Cell temperature, C (8760 values, read-only).
        """
        key = (spec.tilt_deg, spec.azimuth_deg, spec.transposition, spec.albedo, spec.temp_model)
        if key not in self._poa:
            from pvlib.irradiance import get_total_irradiance
            from pvlib.temperature import TEMPERATURE_MODEL_PARAMETERS, sapm_cell

            w = self.weather
            sp = self.solar_position()
            poa = get_total_irradiance(
                spec.tilt_deg, spec.azimuth_deg, sp["apparent_zenith"], sp["azimuth"],
                w.dni_wm2, w.ghi_wm2, w.dhi_wm2, dni_extra=sp["dni_extra"],
                airmass=sp["airmass"], albedo=spec.albedo, model=spec.transposition,
            )
            g = np.nan_to_num(np.clip(np.asarray(poa["poa_global"], float), 0.0, None))
            params = TEMPERATURE_MODEL_PARAMETERS["sapm"][spec.temp_model]
            tc = np.asarray(sapm_cell(g, f_to_c(w.temp_f), w.wind_ms, **params), float)
            g.setflags(write=False)
            tc.setflags(write=False)
            self._poa[key] = (g, tc)
        return self._poa[key]

    def ac_kw_per_kwdc(self, spec: SolarArraySpec) -> np.ndarray:
        """Hourly AC output (kW = kWh per hour) per kWdc of nameplate for this array shape.

        Parameters
        ----------
        spec : SolarArraySpec
            The array (its size is not used).

        Returns
        -------
        numpy.ndarray
            AC output of each hour, kW/kWdc (8760 values, read-only).
        """
        key = spec.shape_key()
        if key not in self._ac:

            def make() -> np.ndarray:
                g, tc = self.poa_and_cell_temp(spec)
                losses = default_losses_pct() if spec.losses_pct is None else spec.losses_pct
                pdc = pvwatts_dc_kw(g, tc, 1.0, spec.gamma_pdc) * (1.0 - losses / 100.0)
                pdc0_inv = 1.0 / spec.dc_ac_ratio / spec.inverter_eff_nom
                return pvwatts_inverter_kw(pdc, pdc0_inv, spec.inverter_eff_nom)

            if self.keep is not None:  # kept between runs: pvlib is not even imported then
                losses = default_losses_pct() if spec.losses_pct is None else spec.losses_pct
                ac = np.array(self.keep(("solar_ac_kw_per_kwdc", self.weather.digest(),
                                         key, losses), make), dtype=float)
            else:
                ac = make()
            ac.setflags(write=False)
            self._ac[key] = ac
        return self._ac[key]

    def ac_kw(self, spec: SolarArraySpec) -> np.ndarray:
        """Hourly AC output of the array in kW: the cached per-kWdc profile times ``dc_kw``.

        Parameters
        ----------
        spec : SolarArraySpec
            The array.

        Returns
        -------
        numpy.ndarray
            AC output of each hour, kW (8760 values).
        """
        return self.ac_kw_per_kwdc(spec) * spec.dc_kw

    def specific_yield_kwh_per_kwdc(self, spec: SolarArraySpec) -> float:
        """Annual AC kWh per kWdc.

        Parameters
        ----------
        spec : SolarArraySpec
            The array (its size is not used).

        Returns
        -------
        float
            Specific yield, kWh/kWdc per year.
        """
        return float(self.ac_kw_per_kwdc(spec).sum())
