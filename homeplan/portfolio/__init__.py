"""Many homes at once: plan a portfolio of homes and add up what they do year by year.

Modules:

- ``inputs``: where the homes come from - a folder of plan files, or a CSV of homes (one row
  per home, columns naming keys of a template plan that fills in the rest);
- ``work``: plan one batch of homes in a worker (the single-home planner, with what homes of one
  place share kept once) and summarise each result as a :class:`~homeplan.portfolio.record.HomeRecord`;
- ``record``: the per-home figures kept (per year, per program, per step);
- ``store``: the SQLite results store (WAL, one writer, resumable);
- ``runner``: the driver - batches, a local process pool or a dask.distributed cluster,
  progress, interruption;
- ``rollup``: the sums per year, per program, per kind of work; CSV and Parquet export;
- ``page``: the summary page (HTML with SVG charts, in the printout's style);
- ``community``: the invented demo community generator.

Every home is planned by :func:`homeplan.planner.chain.plan_roadmap`, the same path a single
plan takes. All figures are planning estimates.
"""

from __future__ import annotations

__all__: list[str] = []
