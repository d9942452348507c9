"""Hourly typical-year weather: EPW and TMY3 readers and a synthetic typical-year generator.

All arrays are 8760 long (see :mod:`homeplan.energy.timegrid`). Temperature in F, irradiance in
W/m2, wind in m/s.
"""

from __future__ import annotations

import hashlib
import io
import math
import os
import tempfile
from collections.abc import Mapping
from dataclasses import dataclass, field, replace
from pathlib import Path

import numpy as np

from homeplan.energy import timegrid
from homeplan.energy.units import c_to_f

__all__ = [
    "ClimateNormals",
    "Weather",
    "WeatherFileError",
    "parse_epw_design_conditions",
    "read_epw",
    "read_tmy2",
    "read_tmy3",
    "read_weather",
    "read_weather_text",
    "SUN_KEYS",
    "SYNTHETIC_HOURLY_KEYS",
    "synthetic_weather",
    "synthetic_year",
]


class WeatherFileError(ValueError):
    """A weather file that was read but does not hold one usable typical year."""


def _as_year(name: str, values: object) -> np.ndarray:
    arr = np.array(values, dtype=float)
    if arr.shape != (timegrid.HOURS_PER_YEAR,):
        raise WeatherFileError(f"{name} must have {timegrid.HOURS_PER_YEAR} hourly values, got {arr.shape}")
    if not np.all(np.isfinite(arr)):
        raise WeatherFileError(f"{name} has missing values")
    arr.setflags(write=False)
    return arr


@dataclass(frozen=True, eq=False)
class Weather:
    """One typical year of hourly weather at a site.

    ``heating_design_f`` is the 99 % heating dry-bulb and ``cooling_design_f`` the 1 % cooling
    dry-bulb (ACCA Manual J convention); ``None`` means "take them from this year's hourly
    percentiles". Instances compare by identity so they can key per-home caches.

    Attributes
    ----------
    temp_f : numpy.ndarray
        Dry-bulb temperature of each hour, F (8760 values).
    ghi_wm2 : numpy.ndarray
        Global horizontal irradiance, W/m2 (8760 values).
    dni_wm2 : numpy.ndarray
        Direct normal irradiance, W/m2 (8760 values).
    dhi_wm2 : numpy.ndarray
        Diffuse horizontal irradiance, W/m2 (8760 values).
    wind_ms : numpy.ndarray
        Wind speed, m/s (8760 values).
    latitude_deg : float
        Latitude, degrees north.
    longitude_deg : float
        Longitude, degrees east.
    tz_offset_h : float
        Standard-time offset from UTC, hours.
    altitude_m : float
        Site elevation, m.
    heating_design_f : float or None
        99 % heating design dry-bulb, F.
    cooling_design_f : float or None
        1 % cooling design dry-bulb, F.
    source : str
        Where the hourly data came from.
    design_source : str
        Where the design temperatures came from.
    sun : mapping of str to numpy.ndarray or None
        Solar position at mid-hour (``apparent_zenith``, ``zenith``, ``azimuth``, degrees) when
        it was already computed for this site and year (the synthetic year needs it), so that
        the solar model does not compute it a second time; None to compute it when needed.

    Raises
    ------
    ValueError
        If an hourly array does not hold 8760 finite values.

    References
    ----------
    ASHRAE Handbook - Fundamentals, ch. 14 (climatic design conditions, 99 % / 1 % values).
    """

    temp_f: np.ndarray
    ghi_wm2: np.ndarray
    dni_wm2: np.ndarray
    dhi_wm2: np.ndarray
    wind_ms: np.ndarray
    latitude_deg: float
    longitude_deg: float
    tz_offset_h: float
    altitude_m: float = 0.0
    heating_design_f: float | None = None
    cooling_design_f: float | None = None
    source: str = ""
    design_source: str = field(default="")
    sun: Mapping[str, np.ndarray] | None = field(default=None, repr=False)

    def __post_init__(self) -> None:
        for name in ("temp_f", "ghi_wm2", "dni_wm2", "dhi_wm2", "wind_ms"):
            object.__setattr__(self, name, _as_year(name, getattr(self, name)))
        if self.heating_design_f is None or self.cooling_design_f is None:
            if self.heating_design_f is None:
                object.__setattr__(self, "heating_design_f", self.temp_percentile_f(1.0))
            if self.cooling_design_f is None:
                object.__setattr__(self, "cooling_design_f", self.temp_percentile_f(99.0))
            if not self.design_source:
                object.__setattr__(self, "design_source", "hourly percentiles of this year")

    def digest(self) -> str:
        """SHA-256 of the hourly values and the site: a content key for results made from them.

        Returns
        -------
        str
            Hex digest.
        """
        h = hashlib.sha256()
        for name in ("temp_f", "ghi_wm2", "dni_wm2", "dhi_wm2", "wind_ms"):
            h.update(np.ascontiguousarray(getattr(self, name), dtype=float).tobytes())
        h.update(repr((self.latitude_deg, self.longitude_deg, self.tz_offset_h,
                       self.altitude_m)).encode())
        return h.hexdigest()

    def temp_percentile_f(self, pct: float) -> float:
        """Hourly dry-bulb percentile (1.0 gives the 99 % heating value, 99.0 the 1 % cooling).

        Parameters
        ----------
        pct : float
            Percentile, percent (0-100).

        Returns
        -------
        float
            Dry-bulb temperature, F.

        References
        ----------
        ASHRAE Handbook - Fundamentals, ch. 14: the 99 % heating value is exceeded in 99 % of the
        8760 hours (colder in 88 h); the 1 % cooling value is exceeded in 88 h.
        """
        return float(np.percentile(self.temp_f, pct))

    @property
    def hdd65(self) -> float:
        """Heating degree-days base 65 F from daily mean temperatures.

        References
        ----------
        NOAA/NWS degree-day definition: sum over days of max(65 - T_mean, 0).
        """
        return float(np.maximum(65.0 - timegrid.daily_mean(self.temp_f), 0.0).sum())

    @property
    def cdd65(self) -> float:
        """Cooling degree-days base 65 F from daily mean temperatures.

        References
        ----------
        NOAA/NWS degree-day definition: sum over days of max(T_mean - 65, 0).
        """
        return float(np.maximum(timegrid.daily_mean(self.temp_f) - 65.0, 0.0).sum())

    def monthly_hdd65(self) -> np.ndarray:
        """HDD65 of each month (12 values), daily-mean method.

        Returns
        -------
        numpy.ndarray
            Heating degree-days base 65 F of each month, F-days (12 values).

        References
        ----------
        NOAA/NWS degree-day definition (as :attr:`hdd65`).
        """
        dd = np.maximum(65.0 - timegrid.daily_mean(self.temp_f), 0.0)
        starts = np.concatenate([[0], np.cumsum(timegrid.MONTH_DAYS)[:-1]])
        return np.add.reduceat(dd, starts)

    def times(self, mid_hour: bool = False):  # -> pandas.DatetimeIndex
        """Hour-start (or mid-hour) timestamps in local standard time for a non-leap year.

        Parameters
        ----------
        mid_hour : bool
            If True, the timestamps are at half past each hour.

        Returns
        -------
        pandas.DatetimeIndex
            8760 timestamps with a fixed UTC offset of ``tz_offset_h``.
        """
        import pandas as pd

        start = "2023-01-01 00:30" if mid_hour else "2023-01-01 00:00"
        tz = _fixed_tz(self.tz_offset_h)
        return pd.date_range(start, periods=timegrid.HOURS_PER_YEAR, freq="h", tz=tz)


def _fixed_tz(offset_h: float):  # -> datetime.timezone
    import datetime as dt

    return dt.timezone(dt.timedelta(hours=float(offset_h)))


# ---------------------------------------------------------------------------- file readers


def parse_epw_design_conditions(header_line: str) -> tuple[float, float] | None:
    """Return (99 % heating, 1 % cooling) dry-bulb in F from an EPW ``DESIGN CONDITIONS`` line.

    The line holds ``...,Heating,<coldest month>,<DB 99.6 %>,<DB 99 %>,...,Cooling,<hottest
    month>,<DB range>,<DB 0.4 %>,<MCWB 0.4 %>,<DB 1 %>,...`` in C. Returns None when absent.

    Parameters
    ----------
    header_line : str
        One header line of an EPW file.

    Returns
    -------
    tuple of (float, float) or None
        99 % heating and 1 % cooling dry-bulb, F; None when the line has no design conditions.

    References
    ----------
    EnergyPlus Auxiliary Programs, "Weather Converter Program", EPW header "DESIGN CONDITIONS";
    ASHRAE Handbook - Fundamentals (2009) climatic design conditions table layout.
    """
    parts = [p.strip() for p in header_line.strip().split(",")]
    if not parts or parts[0].upper() != "DESIGN CONDITIONS":
        return None
    try:
        ih = next(i for i, p in enumerate(parts) if p.lower() == "heating")
        ic = next(i for i, p in enumerate(parts) if p.lower() == "cooling")
        heat_c = float(parts[ih + 3])
        cool_c = float(parts[ic + 5])
    except (StopIteration, ValueError, IndexError):
        return None
    return c_to_f(heat_c), c_to_f(cool_c)


def _drop_feb29(data):  # pandas.DataFrame -> DataFrame
    if len(data) == 8784:
        idx = data.index
        data = data[~((idx.month == 2) & (idx.day == 29))]
    return data


def read_epw(path: str | Path) -> Weather:
    """Read an EnergyPlus EPW file with pvlib and parse its design-conditions header line.

    Parameters
    ----------
    path : str or pathlib.Path
        The EPW file.

    Returns
    -------
    Weather
        The typical year (F, W/m2, m/s) with the file's design temperatures when present.

    Raises
    ------
    ValueError
        If the file does not give 8760 finite hourly values.

    References
    ----------
    pvlib.iotools.read_epw (pvlib 0.16); EnergyPlus Auxiliary Programs, EPW data dictionary.
    """
    return _epw(Path(path).read_text(encoding="latin-1"), Path(path).name)


def _epw(text: str, name: str) -> Weather:
    """An EPW file's text (pvlib reads it from memory: no path, so never a URL)."""
    from pvlib.iotools import read_epw as _read

    data, meta = _read(io.StringIO(text))
    data = _drop_feb29(data)
    lines = text.split("\n", 2)
    design = parse_epw_design_conditions(lines[1]) if len(lines) > 1 else None
    heat_f, cool_f = design if design else (None, None)
    return _from_pvlib(data["temp_air"], data["ghi"], data["dni"], data["dhi"], data["wind_speed"], meta,
                       f"EPW {name}", heating_design_f=heat_f, cooling_design_f=cool_f,
                       design_source="EPW DESIGN CONDITIONS (ASHRAE 99 % / 1 %)" if design else "")


def _from_pvlib(temp_c, ghi, dni, dhi, wind, meta, source: str, **extra) -> Weather:
    """A Weather from the columns and metadata one of pvlib's readers returned."""
    site = {"latitude": (-90.0, 90.0), "longitude": (-180.0, 180.0), "TZ": (-14.0, 14.0)}
    for key, (low, high) in site.items():
        value = float(meta[key])
        if not low <= value <= high:  # also refuses NaN
            raise WeatherFileError(f"the file's {key} is {value}, outside {low:g} to {high:g}")
    return Weather(
        temp_f=c_to_f(temp_c.to_numpy(float)),
        ghi_wm2=ghi.to_numpy(float),
        dni_wm2=dni.to_numpy(float),
        dhi_wm2=dhi.to_numpy(float),
        wind_ms=wind.to_numpy(float),
        latitude_deg=float(meta["latitude"]),
        longitude_deg=float(meta["longitude"]),
        tz_offset_h=float(meta["TZ"]),
        altitude_m=float(meta.get("altitude", 0.0)),
        source=source,
        **extra,
    )


def read_tmy3(path: str | Path) -> Weather:
    """Read an NSRDB TMY3 CSV with pvlib; design temperatures come from its hourly percentiles.

    Parameters
    ----------
    path : str or pathlib.Path
        The TMY3 CSV file.

    Returns
    -------
    Weather
        The typical year (F, W/m2, m/s).

    Raises
    ------
    ValueError
        If the file does not give 8760 finite hourly values.

    References
    ----------
    pvlib.iotools.read_tmy3 (pvlib 0.16); Wilcox & Marion, "Users Manual for TMY3 Data Sets",
    NREL/TP-581-43156 (2008).
    """
    from pvlib.iotools import read_tmy3 as _read

    data, meta = _read(path if hasattr(path, "read") else str(path), map_variables=True)
    return _from_pvlib(data["temp_air"], data["ghi"], data["dni"], data["dhi"], data["wind_speed"], meta,
                       f"TMY3 {Path(getattr(path, 'name', None) or str(path)).name}")


def read_tmy2(path: str | Path) -> Weather:
    """Read an NSRDB TMY2 file with pvlib (dry-bulb and wind are stored in tenths).

    Parameters
    ----------
    path : str or pathlib.Path
        The TMY2 file.

    Returns
    -------
    Weather
        The typical year (F, W/m2, m/s).

    Raises
    ------
    ValueError
        If the file does not give 8760 finite hourly values.

    References
    ----------
    pvlib.iotools.read_tmy2 (pvlib 0.16); Marion & Urban, "User's Manual for TMY2s", NREL (1995).
    """
    from pvlib.iotools import read_tmy2 as _read

    data, meta = _read(str(path))
    return _from_pvlib(data["DryBulb"] / 10.0, data["GHI"], data["DNI"], data["DHI"], data["Wspd"] / 10.0,
                       meta, f"TMY2 {Path(path).name}")


def read_weather(path: str | Path) -> Weather:
    """Read EPW (``.epw``), TMY3 CSV (``.csv``) or TMY2 (``.tm2``) by extension.

    Parameters
    ----------
    path : str or pathlib.Path
        The weather file.

    Returns
    -------
    Weather
        The typical year (F, W/m2, m/s).

    Raises
    ------
    ValueError
        If the extension is not supported or the file does not give 8760 finite hourly values.
    """
    suffix = Path(path).suffix.lower()
    if suffix == ".epw":
        return read_epw(path)
    if suffix == ".csv":
        return read_tmy3(path)
    if suffix == ".tm2":
        return read_tmy2(path)
    raise ValueError(f"unsupported weather file type: {path} (use .epw, TMY3 .csv or .tm2)")


def read_weather_text(text: str, name: str) -> Weather:
    """Read the text of a weather file that the caller has already read safely.

    Parameters
    ----------
    text : str
        The file's text.
    name : str
        Its name; the extension tells the format: ``.epw``, TMY3 ``.csv`` or TMY2 ``.tm2``.

    Returns
    -------
    Weather
        The typical year (F, W/m2, m/s).

    Raises
    ------
    WeatherFileError
        If the extension is not one of these or the file does not give 8760 finite hourly
        values; pvlib's and pandas' own errors for a file that is not of its format.

    References
    ----------
    pvlib.iotools.read_epw, read_tmy3, read_tmy2 (pvlib 0.16).
    """
    suffix = Path(name).suffix.lower()
    if suffix == ".epw":
        return _epw(text, Path(name).name)
    if suffix == ".csv":
        buffer = io.StringIO(text)
        buffer.name = name
        return read_tmy3(buffer)
    if suffix == ".tm2":  # pvlib reads TMY2 by path only: a private copy of the text
        fd, tmp = tempfile.mkstemp(suffix=".tm2")
        try:
            with os.fdopen(fd, "w", encoding="utf-8") as fh:
                fh.write(text)
            w = read_tmy2(tmp)
        finally:
            os.unlink(tmp)
        return replace(w, source=f"TMY2 {Path(name).name}")
    raise WeatherFileError(f"the extension '{suffix or '(none)'}' is not a weather file type homeplan reads")


# ---------------------------------------------------------------------- synthetic weather


@dataclass(frozen=True)
class ClimateNormals:
    """The few climate numbers the synthetic generator needs (F, degree-days base 65 F).

    Attributes
    ----------
    latitude_deg : float
        Latitude, degrees north.
    longitude_deg : float
        Longitude, degrees east.
    hdd65 : float
        Heating degree-days base 65 F, F-days per year.
    cdd65 : float
        Cooling degree-days base 65 F, F-days per year.
    heating_design_f : float
        99 % heating design dry-bulb, F.
    cooling_design_f : float
        1 % cooling design dry-bulb, F.
    cloudiness : float
        Mean cloud cover, fraction (0-1).
    tz_offset_h : float or None
        Standard-time offset from UTC, hours; None takes longitude / 15.
    altitude_m : float
        Site elevation, m.
    """

    latitude_deg: float
    longitude_deg: float
    hdd65: float
    cdd65: float
    heating_design_f: float
    cooling_design_f: float
    cloudiness: float = 0.45
    tz_offset_h: float | None = None
    altitude_m: float = 0.0


def _seed(normals: ClimateNormals) -> int:
    key = repr(
        tuple(round(float(v), 3) if isinstance(v, float | int) else v for v in (
            normals.latitude_deg, normals.longitude_deg, normals.hdd65, normals.cdd65,
            normals.heating_design_f, normals.cooling_design_f, normals.cloudiness,
        ))
    )
    return int.from_bytes(hashlib.sha256(key.encode()).digest()[:8], "little")


def _ar1(rng: np.random.Generator, n: int, phi: float) -> np.ndarray:
    """Unit-variance AR(1) series ``y[i] = phi y[i-1] + e[i]`` (50 values of burn-in).

    A plain recursion over floats (about 9,000 values at most, a few ms): it spares the import
    of scipy.signal, whose ``lfilter`` computes the same sums in the same order.
    """
    eps = (rng.standard_normal(n + 50) * math.sqrt(1.0 - phi * phi)).tolist()
    acc = 0.0
    out = []
    for e in eps:
        acc = e + phi * acc
        out.append(acc)
    return np.asarray(out[50:])


@dataclass(frozen=True)
class _Components:
    season: np.ndarray
    diurnal: np.ndarray
    anomaly: np.ndarray
    cold: np.ndarray
    cloud_h: np.ndarray


def _components(normals: ClimateNormals, rng: np.random.Generator) -> _Components:
    # scipy.special holds what scipy.stats' norm.cdf and beta.ppf call, without scipy.stats'
    # import (about 0.4 s); scipy.optimize, needed for the fit below, loads it anyway.
    from scipy.special import betaincinv, ndtr

    n = timegrid.HOURS_PER_YEAR
    t_days = (np.arange(n) + 0.5) / 24.0
    hemi = 1.0 if normals.latitude_deg >= 0 else -1.0
    lag_days = 20.0  # coldest around 20 January in the northern hemisphere
    season = -hemi * np.cos(2 * np.pi * (t_days - lag_days) / 365.0)
    season_day = timegrid.daily_mean(season)

    # Daily cloud cover: AR(1) Gaussian mapped to a Beta distribution with the requested mean.
    mean_c = float(np.clip(normals.cloudiness, 0.02, 0.98))
    conc = 2.0
    u = ndtr(_ar1(rng, timegrid.DAYS_PER_YEAR, 0.6))
    cloud_day = betaincinv(mean_c * conc, (1 - mean_c) * conc, u)
    day_centres = np.arange(timegrid.DAYS_PER_YEAR) * 24 + 12.0
    hours = np.arange(n) + 0.5
    cloud_h = np.clip(
        np.interp(hours, day_centres, cloud_day) + 0.08 * _ar1(rng, n, 0.8), 0.0, 1.0
    )

    # Diurnal cycle: minimum near sunrise, maximum mid-afternoon; cloudy days have a smaller range.
    hod = timegrid.hour_of_day() + 0.5
    shape = np.cos(2 * np.pi * (hod - 15.0) / 24.0) + 0.1 * np.cos(4 * np.pi * (hod - 15.0) / 24.0)
    shape = (shape - shape.mean()) / (np.ptp(shape) / 2.0)
    range_mult = 1.3 - 0.6 * cloud_day
    range_mult = range_mult / range_mult.mean()
    diurnal = shape * np.repeat(range_mult, 24)

    # Day-to-day weather: AR(1) anomalies, larger in winter, smoothed to hours, plus hourly noise.
    z_day = _ar1(rng, timegrid.DAYS_PER_YEAR, 0.7) * (1.0 - 0.4 * season_day)
    # A typical year's months sit near their long-term means (TMY months are picked for it,
    # Hall et al. 1978): the day-to-day weather averages out within each month.
    month_of_day = timegrid.hour_month()[::24] - 1
    z_day = z_day - (np.bincount(month_of_day, z_day) / np.bincount(month_of_day))[month_of_day]
    z_h = np.interp(hours, day_centres, z_day) + 0.25 * _ar1(rng, n, 0.9)
    anomaly = z_h / z_h.std()
    # Cold outbreaks: an extra push on the cold side only (real winter anomalies skew cold).
    cold = np.minimum(anomaly, 0.0)
    cold = cold - cold.mean()
    return _Components(season, diurnal, anomaly, cold, cloud_h)


def _degree_days(temp_f: np.ndarray) -> tuple[float, float]:
    tm = temp_f.reshape(timegrid.DAYS_PER_YEAR, 24).mean(axis=1)
    return float(np.maximum(65.0 - tm, 0).sum()), float(np.maximum(tm - 65.0, 0).sum())


def _calibrate_temperature(normals: ClimateNormals, comp: _Components) -> np.ndarray:
    """Fit mean, seasonal amplitude, anomaly size, cold tail and diurnal half-range to four targets."""
    from scipy.optimize import least_squares

    def temp(p: np.ndarray) -> np.ndarray:
        mean, amp, sig, half_range, cold_tail = p
        return (mean + amp * comp.season + half_range * comp.diurnal + sig * comp.anomaly
                + cold_tail * comp.cold)

    h_scale = 0.01 * max(normals.hdd65, 300.0)
    c_scale = 0.01 * max(normals.cdd65, 300.0)

    def resid(p: np.ndarray) -> np.ndarray:
        t = temp(p)
        hdd, cdd = _degree_days(t)
        lo, hi = np.percentile(t, [1.0, 99.0])
        return np.array([
            (hdd - normals.hdd65) / h_scale,
            (cdd - normals.cdd65) / c_scale,
            (lo - normals.heating_design_f) / 0.5,
            (hi - normals.cooling_design_f) / 1.0,
            # Weak priors keep the fit realistic where targets leave freedom (from memory: US
            # daily-mean anomalies ~5 F std; cold tails a few F).
            (p[2] - 5.0) / 2.5,
            p[4] / 6.0,
        ])

    mean0 = 65.0 - (normals.hdd65 - normals.cdd65) / 365.0
    spread = max(normals.cooling_design_f - normals.heating_design_f, 10.0)
    x0 = np.array([mean0, spread * 0.3, spread * 0.1, spread * 0.1, 0.5])
    lb = np.array([-40.0, 0.0, 0.3, 1.0, 0.0])
    ub = np.array([110.0, 80.0, 30.0, 25.0, 30.0])
    fit = least_squares(resid, np.clip(x0, lb + 1e-6, ub - 1e-6), bounds=(lb, ub),
                        diff_step=1e-3, x_scale=np.array([5.0, 5.0, 2.0, 2.0, 2.0]), max_nfev=400)
    return temp(fit.x)


def synthetic_weather(normals: ClimateNormals) -> Weather:
    """A deterministic synthetic typical year calibrated to a site's climate normals.

    Temperature = mean + seasonal cosine + diurnal cycle (damped on cloudy days) + AR(1)
    day-to-day anomalies; the four free sizes are fitted by least squares so that HDD65 and
    CDD65 (daily-mean method) and the 1st/99th hourly percentiles match the targets. Irradiance is
    pvlib's Ineichen clear sky scaled by the Kasten-Czeplak cloud-cover factor and split into
    DNI/DHI with the Erbs model. The random generator is seeded from the inputs.

    Parameters
    ----------
    normals : ClimateNormals
        The site's climate targets.

    Returns
    -------
    Weather
        The synthetic typical year (F, W/m2, m/s) with the given design temperatures.

    References
    ----------
    Kasten, F. & Czeplak, G. (1980), Solar Energy 24:177-189 (GHI = GHI_clear (1 - 0.75 N^3.4)).
    Ineichen, P. & Perez, R. (2002), Solar Energy 73:151-157 (clear-sky model, via pvlib).
    Erbs, D. G., Klein, S. A. & Duffie, J. A. (1982), Solar Energy 28:293-302 (via pvlib).
    ASHRAE Handbook - Fundamentals, ch. 14 (99 % / 1 % design dry-bulb definitions).
    """
    from pvlib.irradiance import erbs
    from pvlib.location import Location

    rng = np.random.default_rng(_seed(normals))
    comp = _components(normals, rng)
    temp_f = _calibrate_temperature(normals, comp)

    tz = _tz_of(normals)
    import pandas as pd

    wx_tmp = _fixed_tz(tz)
    times = pd.date_range("2023-01-01 00:30", periods=timegrid.HOURS_PER_YEAR, freq="h", tz=wx_tmp)
    loc = Location(normals.latitude_deg, normals.longitude_deg, tz=tz,
                   altitude=normals.altitude_m)
    solpos = loc.get_solarposition(times)
    try:
        clear = loc.get_clearsky(times, model="ineichen", solar_position=solpos)
    except Exception:  # noqa: BLE001 - turbidity table unreadable: fall back to a simpler model
        clear = loc.get_clearsky(times, model="haurwitz", solar_position=solpos)
        clear["dni"] = 0.0
    ghi = clear["ghi"].to_numpy(float) * (1.0 - 0.75 * comp.cloud_h ** 3.4)
    ghi = np.nan_to_num(np.clip(ghi, 0.0, None))
    split = erbs(ghi, solpos["zenith"].to_numpy(float), times.day_of_year.to_numpy())
    dni = np.nan_to_num(np.clip(np.asarray(split["dni"], float), 0.0, None))
    dhi = np.nan_to_num(np.clip(np.asarray(split["dhi"], float), 0.0, None))

    wind = np.clip(3.5 * np.exp(0.35 * _ar1(rng, timegrid.HOURS_PER_YEAR, 0.9) - 0.06), 0.0, None)
    hourly = {"temp_f": temp_f, "ghi_wm2": ghi, "dni_wm2": dni, "dhi_wm2": dhi, "wind_ms": wind}
    sun = {k: solpos[k].to_numpy(float) for k in SUN_KEYS}
    return synthetic_year(normals, hourly, sun)


SYNTHETIC_HOURLY_KEYS = ("temp_f", "ghi_wm2", "dni_wm2", "dhi_wm2", "wind_ms")
SUN_KEYS = ("apparent_zenith", "zenith", "azimuth")


def _tz_of(normals: ClimateNormals) -> float:
    if normals.tz_offset_h is not None:
        return normals.tz_offset_h
    return float(round(normals.longitude_deg / 15.0))


def synthetic_year(
    normals: ClimateNormals, hourly: Mapping[str, np.ndarray], sun: Mapping[str, np.ndarray] | None
) -> Weather:
    """The :class:`Weather` of a synthetic year from its hourly arrays (as
    :func:`synthetic_weather` makes them, or as a store kept them).

    Parameters
    ----------
    normals : ClimateNormals
        The site's climate targets the arrays were made for.
    hourly : mapping of str to numpy.ndarray
        ``temp_f``, ``ghi_wm2``, ``dni_wm2``, ``dhi_wm2``, ``wind_ms`` (8760 values each).
    sun : mapping of str to numpy.ndarray or None
        Solar position at mid-hour (``apparent_zenith``, ``zenith``, ``azimuth``, degrees).

    Returns
    -------
    Weather
        The typical year with the normals' design temperatures.
    """
    return Weather(
        **{k: hourly[k] for k in SYNTHETIC_HOURLY_KEYS},
        latitude_deg=normals.latitude_deg,
        longitude_deg=normals.longitude_deg,
        tz_offset_h=_tz_of(normals),
        altitude_m=normals.altitude_m,
        heating_design_f=normals.heating_design_f,
        cooling_design_f=normals.cooling_design_f,
        source="synthetic typical year",
        design_source="climate normals given to the generator",
        sun=sun,
    )
