"""A content-keyed store on disk for what a home's plan computes before it plans.

The built-in typical year of a site (temperature fit, sky model and solar position) and the
solar output per kWdc of each array shape on that weather are the costliest steps of a first
plan (with pvlib's import, about a second of CPU) and depend only on the site, so they are kept
between runs in the user's cache folder (``platformdirs.user_cache_dir("homeplan")``, or
``HOMEPLAN_CACHE_DIR``). A second run of the same or an edited plan of that home reads them back.

Rules kept by the store:

- Keys are SHA-256 of the inputs, the homeplan version and the source of the modules that
  compute the entry (and the pvlib version), so an entry never outlives the code that made it.
- Entries are numpy ``.npz`` archives of plain arrays (read with ``allow_pickle=False``) written
  to a temporary file in the same folder and moved in place with ``os.replace``: concurrent
  writers each write a whole file, a reader never sees half of one.
- A corrupt, truncated or wrongly shaped entry is removed and computed again; any error of the
  store itself (a read-only folder, a full disk) only means the value is computed, never that
  the plan fails.
- The folder is kept under a size cap (default 256 MB, ``HOMEPLAN_CACHE_MAX_MB``) by removing
  the least recently used entries.

References
----------
numpy ``.npz`` format: numpy.lib.format (NEP 1); POSIX ``rename(2)`` atomic replacement, as
exposed by Python's ``os.replace``.
"""

from __future__ import annotations

import contextlib
import functools
import hashlib
import json
import os
import tempfile
from collections.abc import Callable
from dataclasses import asdict, dataclass
from importlib import metadata
from pathlib import Path

import numpy as np

from homeplan import __version__
from homeplan.energy import solar
from homeplan.energy import weather as wx
from homeplan.energy.weather import ClimateNormals, Weather

__all__ = ["DEFAULT_MAX_MB", "DiskStore", "default_store"]

DEFAULT_MAX_MB = 256.0
_SUFFIX = ".npz"
_HOURS = 8760


def _code_fingerprint() -> str:
    """Hash of the code that makes the entries: the weather and solar modules' source and
    pvlib's version."""
    h = hashlib.sha256()
    for module in (wx, solar):
        h.update(Path(module.__file__).read_bytes())
    with contextlib.suppress(metadata.PackageNotFoundError):
        h.update(metadata.version("pvlib").encode())
    return h.hexdigest()


@dataclass(frozen=True)
class DiskStore:
    """The store in ``folder`` (created on first write), kept under ``max_mb`` megabytes.

    Attributes
    ----------
    folder : pathlib.Path
        Where the entries live.
    max_mb : float
        Size cap of the folder's entries, MB.
    """

    folder: Path
    max_mb: float = DEFAULT_MAX_MB

    @functools.cached_property
    def code(self) -> str:
        """Fingerprint of the code that makes the entries (read once per store)."""
        return _code_fingerprint()

    def _path(self, kind: str, key: str) -> Path:
        return self.folder / f"{kind}-{key}{_SUFFIX}"

    def read(self, kind: str, key: str, names: tuple[str, ...]) -> dict[str, np.ndarray] | None:
        """The arrays of an entry, or None when it is missing or unusable (then removed).

        Parameters
        ----------
        kind : str
            Entry kind (part of the file name).
        key : str
            Content key (hex digest).
        names : tuple of str
            Arrays the entry must hold.

        Returns
        -------
        dict of str to numpy.ndarray or None
            The arrays, or None.
        """
        path = self._path(kind, key)
        try:
            with np.load(path, allow_pickle=False) as data:
                out = {n: np.array(data[n]) for n in names}
        except FileNotFoundError:
            return None
        except Exception:  # noqa: BLE001 - any unreadable entry is a miss, and is removed
            with contextlib.suppress(OSError):
                path.unlink()
            return None
        with contextlib.suppress(OSError):
            os.utime(path)  # recently used: the last to be evicted
        return out

    def write(self, kind: str, key: str, arrays: dict[str, np.ndarray]) -> None:
        """Store an entry atomically; errors of the store are ignored (the value is recomputed).

        Parameters
        ----------
        kind : str
            Entry kind.
        key : str
            Content key (hex digest).
        arrays : dict of str to numpy.ndarray
            Plain numeric arrays to keep.
        """
        tmp = None
        try:
            self.folder.mkdir(parents=True, exist_ok=True)
            fd, tmp = tempfile.mkstemp(prefix=".tmp-", suffix=_SUFFIX, dir=self.folder)
            with os.fdopen(fd, "wb") as fh:
                np.savez(fh, **arrays)
                fh.flush()
                os.fsync(fh.fileno())
            os.replace(tmp, self._path(kind, key))
            tmp = None
            self._trim()
        except OSError:
            pass
        finally:
            if tmp is not None:
                with contextlib.suppress(OSError):
                    os.unlink(tmp)

    def _trim(self) -> None:
        """Remove the least recently used entries until the folder is under its cap."""
        entries = []
        for p in self.folder.glob(f"*{_SUFFIX}"):
            with contextlib.suppress(OSError):
                st = p.stat()
                entries.append((st.st_mtime, st.st_size, p))
        total = sum(size for _, size, _ in entries)
        cap = self.max_mb * 1e6
        for _, size, p in sorted(entries):
            if total <= cap:
                break
            with contextlib.suppress(OSError):
                p.unlink()
                total -= size

    def keep_array(self, parts: tuple, make: Callable[[], np.ndarray]) -> np.ndarray:
        """An hourly array (8760 values) stored under the content key ``parts``, or ``make()``'s,
        stored. Used as the solar model's :data:`~homeplan.energy.solar.ArrayKeeper`.

        Parameters
        ----------
        parts : tuple
            What the array is made from (JSON-able values and digests).
        make : callable
            Makes the array when the store does not hold it.

        Returns
        -------
        numpy.ndarray
            The array (8760 values).
        """
        key = hashlib.sha256(json.dumps(
            {"parts": parts, "version": __version__, "code": self.code},
            sort_keys=True, default=str).encode()).hexdigest()
        got = self.read("hourly", key, ("values",))
        if got is not None and got["values"].shape == (_HOURS,) and np.isfinite(got["values"]).all():
            return got["values"]
        values = np.asarray(make(), dtype=float)
        self.write("hourly", key, {"values": values})
        return values

    def weather_year(self, normals: ClimateNormals) -> Weather:
        """The built-in typical year for ``normals``, from the store or made and stored.

        Parameters
        ----------
        normals : homeplan.energy.weather.ClimateNormals
            The site's climate numbers.

        Returns
        -------
        homeplan.energy.weather.Weather
            The same year :func:`homeplan.energy.weather.synthetic_weather` returns.
        """
        key = hashlib.sha256(json.dumps(
            {"normals": asdict(normals), "version": __version__, "code": self.code},
            sort_keys=True, default=str).encode()).hexdigest()
        names = (*wx.SYNTHETIC_HOURLY_KEYS, *wx.SUN_KEYS)
        got = self.read("weather", key, names)
        if got is not None and all(a.shape == (_HOURS,) for a in got.values()):
            try:
                return wx.synthetic_year(normals, got, {k: got[k] for k in wx.SUN_KEYS})
            except ValueError:  # an entry that does not make a valid year: made again below
                pass
        w = wx.synthetic_weather(normals)
        if w.sun is not None:
            self.write("weather", key, {**{k: getattr(w, k) for k in wx.SYNTHETIC_HOURLY_KEYS},
                                        **{k: np.asarray(w.sun[k], float) for k in wx.SUN_KEYS}})
        return w


def default_store() -> DiskStore:
    """The user's store: ``HOMEPLAN_CACHE_DIR`` or the platform's user cache folder, capped at
    ``HOMEPLAN_CACHE_MAX_MB`` (default 256 MB).

    Returns
    -------
    DiskStore
        The store (its folder is created on first write).
    """
    folder = os.environ.get("HOMEPLAN_CACHE_DIR")
    if not folder:
        import platformdirs

        folder = platformdirs.user_cache_dir("homeplan", appauthor=False)
    try:
        max_mb = float(os.environ.get("HOMEPLAN_CACHE_MAX_MB", DEFAULT_MAX_MB))
    except ValueError:
        max_mb = DEFAULT_MAX_MB
    return DiskStore(Path(folder), max_mb if max_mb > 0 else DEFAULT_MAX_MB)
