"""Energy, bills and emissions engine: an hourly typical-year model of a home in any plan state.

Entry point: :func:`homeplan.energy.simulate.simulate` with a
:class:`homeplan.energy.simulate.HomeEnergySpec` and a per-home
:class:`homeplan.energy.simulate.SiteCache`. Modules import numpy only; pandas, scipy and pvlib
are imported inside the functions that need them.
"""

__all__: list[str] = []
