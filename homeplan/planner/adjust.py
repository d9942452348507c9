"""What-if adjustments that no plan file field expresses: a warmer or colder weather year, faster or
slower learning. Used by the sensitivity ranking (:mod:`homeplan.planner.sensitivity`).

A weather shift moves every hour's temperature of the typical year and keeps the home's
calibrated heat loss and its design temperatures (equipment is sized as before; only the energy
use changes). A learning factor multiplies each project's learning rate per doubling (0 = prices
follow inflation only).

References
----------
ASHRAE Handbook - Fundamentals, ch. 19 (degree-day energy estimating: heating energy follows the
degree days of the year); T. P. Wright (1936) for the learning curve.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from homeplan.energy.simulate import SiteCache
from homeplan.planner.context import Context

__all__ = ["Adjustments"]


@dataclass(frozen=True)
class Adjustments:
    """A what-if applied between the planner's stages.

    Attributes
    ----------
    weather_shift_f : float
        Added to every hour's temperature of the typical year, F (positive = warmer).
    learning_factor : float
        Multiplies every learning rate of the catalog, dimensionless (>= 0).
    """

    weather_shift_f: float = 0.0
    learning_factor: float = 1.0

    def home(self, ctx: Context) -> Context:
        """After stage "home": the weather shifted (a basis of its own in the cache)."""
        if not self.weather_shift_f:
            return ctx
        b = ctx.basis
        w = b.weather
        shifted = replace(w, temp_f=w.temp_f + self.weather_shift_f, heating_design_f=w.heating_design_f,
                          cooling_design_f=w.cooling_design_f)
        # the home's keeper of solar output too: content-keyed by the weather, so the shifted
        # year's output is kept apart from the typical year's
        site = SiteCache(shifted, b.site.solar.keep)
        basis = replace(b, weather=shifted, site=site, base=replace(b.base, weather=shifted))
        return replace(ctx, basis=basis, basis_key=f"{ctx.basis_key}:weather{self.weather_shift_f:+g}")

    def projects(self, ctx: Context) -> Context:
        """After stage "projects": each learning rate scaled."""
        if self.learning_factor == 1.0:
            return ctx
        details = {}
        for pid, d in ctx.details.items():
            change = dict(d.cost_change or {})
            if change.get("kind") == "learning":
                change["learning_rate_pct"] = float(change["learning_rate_pct"]) * self.learning_factor
                d = replace(d, cost_change=change)
            details[pid] = d
        return ctx.with_details(details)
