"""The disk store of weather years: the same year back, and safe against what disks do.

The reference for "the same year" is the generator itself (the store must be invisible); the
rest checks the store's rules: a corrupt entry is made again, a folder that cannot be written
is no error, the size cap holds, concurrent writers leave a readable entry, ``--no-cache``
leaves nothing behind.
"""

from __future__ import annotations

import concurrent.futures
import contextlib
import io
import os
import stat

import numpy as np
import pytest

from homeplan.cli import main
from homeplan.energy import weather as wx
from homeplan.planner import diskstore
from homeplan.planner.diskstore import DiskStore
from tests.conftest import SAMPLES

# Invented climate numbers of a cold site (demo values, no real place).
NORMALS = wx.ClimateNormals(latitude_deg=44.0, longitude_deg=-90.0, hdd65=7200.0, cdd65=600.0,
                            heating_design_f=-8.0, cooling_design_f=87.0, cloudiness=0.5)
ARRAYS = (*wx.SYNTHETIC_HOURLY_KEYS,)


@pytest.fixture(scope="module")
def reference() -> wx.Weather:
    return wx.synthetic_weather(NORMALS)


def _same(a: wx.Weather, b: wx.Weather) -> None:
    for k in ARRAYS:
        np.testing.assert_array_equal(getattr(a, k), getattr(b, k))
    for k in wx.SUN_KEYS:
        np.testing.assert_array_equal(a.sun[k], b.sun[k])
    assert (a.tz_offset_h, a.heating_design_f, a.cooling_design_f, a.source) == (
        b.tz_offset_h, b.heating_design_f, b.cooling_design_f, b.source)


def _entries(folder) -> list:
    return sorted(folder.glob("weather-*.npz"))


def test_second_read_comes_from_disk(tmp_path, reference, monkeypatch) -> None:
    store = DiskStore(tmp_path)
    _same(store.weather_year(NORMALS), reference)
    assert len(_entries(tmp_path)) == 1

    def not_again(_normals):
        raise AssertionError("the year was made again instead of read")

    monkeypatch.setattr(wx, "synthetic_weather", not_again)
    _same(store.weather_year(NORMALS), reference)


def test_other_climate_numbers_are_another_entry(tmp_path) -> None:
    store = DiskStore(tmp_path)
    store.weather_year(NORMALS)
    warmer = wx.ClimateNormals(**{**NORMALS.__dict__, "hdd65": 5200.0})
    w = store.weather_year(warmer)
    assert len(_entries(tmp_path)) == 2
    assert abs(w.hdd65 - 5200.0) < abs(w.hdd65 - 7200.0)


def test_code_change_makes_the_entry_stale(tmp_path, monkeypatch) -> None:
    store = DiskStore(tmp_path)
    store.weather_year(NORMALS)
    monkeypatch.setattr(diskstore, "_code_fingerprint", lambda: "another version of the code")
    DiskStore(tmp_path).weather_year(NORMALS)  # the next run, with other code
    assert len(_entries(tmp_path)) == 2


@pytest.mark.parametrize("damage", ["truncated", "garbage", "empty", "wrong_shape"])
def test_damaged_entry_is_made_again(tmp_path, reference, damage) -> None:
    store = DiskStore(tmp_path)
    store.weather_year(NORMALS)
    (entry,) = _entries(tmp_path)
    data = entry.read_bytes()
    if damage == "truncated":
        entry.write_bytes(data[: len(data) // 2])
    elif damage == "garbage":
        entry.write_bytes(os.urandom(len(data)))
    elif damage == "empty":
        entry.write_bytes(b"")
    else:
        np.savez(entry, **{k: np.zeros(10) for k in (*ARRAYS, *wx.SUN_KEYS)})
    _same(store.weather_year(NORMALS), reference)
    (entry,) = _entries(tmp_path)  # replaced by a good one
    with np.load(entry, allow_pickle=False) as d:
        assert d["temp_f"].shape == (8760,)


def test_folder_that_cannot_be_written_is_no_error(tmp_path, reference) -> None:
    if os.geteuid() == 0:
        folder = tmp_path / "a-file-not-a-folder"
        folder.write_text("x")  # even root cannot make entries inside a file
    else:
        folder = tmp_path / "locked"
        folder.mkdir()
        folder.chmod(stat.S_IRUSR | stat.S_IXUSR)
    _same(DiskStore(folder).weather_year(NORMALS), reference)


def test_size_cap_removes_least_recently_used(tmp_path) -> None:
    store = DiskStore(tmp_path, max_mb=1e-6)  # smaller than one entry
    store.weather_year(NORMALS)
    assert _entries(tmp_path) == []  # the cap holds even against the newest entry
    roomy = DiskStore(tmp_path, max_mb=100.0)
    for hdd in (5000.0, 6000.0, 7000.0):
        roomy.weather_year(wx.ClimateNormals(**{**NORMALS.__dict__, "hdd65": hdd}))
    sizes = [p.stat().st_size for p in _entries(tmp_path)]
    assert len(sizes) == 3
    first = min(_entries(tmp_path), key=lambda p: p.stat().st_mtime)
    DiskStore(tmp_path, max_mb=2.5 * max(sizes) / 1e6)._trim()
    left = _entries(tmp_path)
    assert len(left) == 2 and first not in left
    assert not list(tmp_path.glob(".tmp-*"))  # no temporary file left behind


def test_concurrent_writers_leave_one_readable_entry(tmp_path, reference) -> None:
    store = DiskStore(tmp_path)
    with concurrent.futures.ThreadPoolExecutor(4) as pool:
        years = list(pool.map(lambda _: store.weather_year(NORMALS), range(4)))
    for w in years:
        _same(w, reference)
    assert len(_entries(tmp_path)) == 1 and not list(tmp_path.glob(".tmp-*"))
    _same(store.weather_year(NORMALS), reference)


def _plan(argv: list[str]) -> int:
    out = io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(io.StringIO()):
        try:
            return main(argv) or 0
        except SystemExit as stop:
            return int(stop.code or 0)


@pytest.mark.slow
def test_no_cache_keeps_nothing_and_the_default_keeps_the_year(tmp_path, monkeypatch) -> None:
    monkeypatch.setenv("HOMEPLAN_CACHE_DIR", str(tmp_path))
    sample = next(p for p in SAMPLES if "weather_file" not in p.read_text())
    assert _plan(["--no-cache", "plan", str(sample), "--json"]) == 0
    assert _plan(["plan", str(sample), "--json", "--no-cache"]) == 0
    assert _entries(tmp_path) == []
    assert _plan(["plan", str(sample), "--json"]) == 0
    assert len(_entries(tmp_path)) == 1


def test_solar_output_is_kept_and_read_back(tmp_path) -> None:
    from homeplan.energy.solar import SolarArraySpec, SolarSite, default_losses_pct

    w = wx.synthetic_weather(NORMALS)
    spec = SolarArraySpec(dc_kw=6.0, tilt_deg=30.0, azimuth_deg=190.0)
    plain = SolarSite(w).ac_kw_per_kwdc(spec)
    store = DiskStore(tmp_path)
    first = SolarSite(w, store.keep_array).ac_kw_per_kwdc(spec)
    assert len(list(tmp_path.glob("hourly-*.npz"))) == 1

    def not_again() -> np.ndarray:
        raise AssertionError("made again instead of read")

    parts = ("solar_ac_kw_per_kwdc", w.digest(), spec.shape_key(), default_losses_pct())
    again = DiskStore(tmp_path).keep_array(parts, not_again)
    np.testing.assert_array_equal(first, plain)
    np.testing.assert_array_equal(again, plain)
