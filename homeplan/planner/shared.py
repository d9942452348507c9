"""What many homes have in common, worked out once for all of them.

A :class:`~homeplan.planner.context.PlannerCache` keeps one home's work. When many homes are
planned one after another (a portfolio), much of the costliest budget-independent work is the
same for every home of one place: the typical weather year, the sun's position over it and the
plane-of-array irradiance of each roof orientation; and for every home naming the same files,
the incentive programs read from them. A :class:`SharedCache` keeps those, keyed by everything
they are computed from, and a ``PlannerCache(shared=...)`` asks it before computing them.

Sharing changes nothing in the results: each value is computed by the same function from the
same inputs as when a home is planned alone, only once. What depends on the home (heat loss,
bills, simulated states) stays in the home's own cache.

Not thread-safe: one worker process (or one thread) per shared cache. It keeps at most
``max_places`` weather years (the least recently used place is dropped first).
"""

from __future__ import annotations

import hashlib
import json
from collections import OrderedDict
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any, TypeVar

from homeplan.energy.solar import ArrayKeeper, SolarSite
from homeplan.energy.weather import ClimateNormals, Weather
from homeplan.plan.model import Plan
from homeplan.planner.basis import load_weather

__all__ = ["Place", "SharedCache", "place_key"]

T = TypeVar("T")


@dataclass(frozen=True, eq=False)
class Place:
    """The weather year of one place, its note, and its solar geometry (shared by its homes)."""

    weather: Weather
    note: str
    solar: SolarSite


def place_key(plan: Plan, base_dir: Path | None) -> str:
    """Everything :func:`~homeplan.planner.basis.load_weather` reads from a plan, as a key.

    The climate section, the location's coordinates and elevation, and - for a weather file -
    the folder it is relative to with the file's size and modification time.
    """
    h = plan.home
    loc = h.location
    where = (loc.latitude, loc.longitude, loc.elevation_ft) if loc is not None else None
    stamp = None
    if h.climate.weather_file:
        path = Path(h.climate.weather_file)
        if not path.is_absolute() and base_dir is not None:
            path = base_dir / path
        try:
            st = path.stat()
            stamp = (str(path), st.st_size, st.st_mtime_ns)
        except OSError:
            stamp = (str(path), None, None)
    text = json.dumps([h.climate.model_dump(mode="json"), where, stamp], sort_keys=True)
    return hashlib.sha256(text.encode()).hexdigest()


class SharedCache:
    """Weather years and solar geometry by place, and any other shared result by content key."""

    def __init__(self, max_places: int = 32) -> None:
        self.max_places = max_places
        self._places: OrderedDict[str, Place] = OrderedDict()
        self._memo: dict[str, Any] = {}

    def place(self, plan: Plan, base_dir: Path | None,
              make_year: Callable[[ClimateNormals], Weather] | None = None,
              keep: ArrayKeeper | None = None) -> Place:
        """The plan's weather year and solar geometry (computed once per place; ``make_year``:
        see :func:`~homeplan.planner.basis.load_weather`; ``keep``: see
        :class:`~homeplan.energy.simulate.SiteCache`)."""
        key = place_key(plan, base_dir)
        hit = self._places.get(key)
        if hit is None:
            weather, note = load_weather(plan, base_dir, make_year)
            hit = Place(weather, note, SolarSite(weather, keep))
            self._places[key] = hit
            while len(self._places) > self.max_places:
                self._places.popitem(last=False)
        else:
            self._places.move_to_end(key)
        return hit

    def memo(self, key: str, make: Callable[[], T]) -> T:
        """A result that depends only on what ``key`` names (e.g. the programs of some files)."""
        if key not in self._memo:
            self._memo[key] = make()
        return self._memo[key]
