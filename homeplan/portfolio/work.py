"""Plan one batch of homes: the work a process of the pool or a dask worker does.

:func:`plan_batch` is a plain function of its :class:`Batch` (picklable, no open files or
connections), so the same code runs in this process, in a local process pool and on a
dask.distributed cluster. Each home is planned by :func:`homeplan.planner.chain.plan_roadmap`,
the single-home path; one :class:`~homeplan.planner.shared.SharedCache` per batch keeps what
its homes have in common (the runner puts homes of one place in the same batch). A home that
cannot be planned is recorded with its error and the batch goes on.
"""

from __future__ import annotations

import json
import time
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any, Literal

from homeplan.errors import InputError, PlanRuleError
from homeplan.plan.load import load_plan
from homeplan.plan.model import Plan
from homeplan.planner.chain import plan_roadmap
from homeplan.planner.context import PlannerCache
from homeplan.planner.programs import load_programs
from homeplan.planner.shared import SharedCache
from homeplan.portfolio.inputs import HomeInput, plan_of_row
from homeplan.portfolio.record import HomeRecord, failed_record, home_record

__all__ = ["Batch", "plan_batch", "plan_home"]


@dataclass(frozen=True)
class Batch:
    """Homes to plan together, with what a worker needs to rebuild each of them.

    ``kind`` "plans": each item's payload is a plan file's path. "rows": each payload is a CSV
    row, applied to ``template`` (plain data) from the file ``source_name``, whose paths are
    relative to ``base_dir``.
    """

    kind: Literal["plans", "rows"]
    items: tuple[HomeInput, ...]
    template: Any = None
    source_name: str = ""
    base_dir: str = ""
    columns: tuple[str, ...] = ()


def _problems(err: InputError) -> str:
    return "; ".join(str(p) for p in err.problems)


def _programs(shared: SharedCache, plan: Plan, base_dir: Path) -> tuple:
    key = "portfolio-programs:" + json.dumps([plan.incentives, plan.incentive_files, str(base_dir)],
                                             sort_keys=True, default=str)
    try:
        return shared.memo(key, lambda: load_programs(plan, base_dir))
    except PlanRuleError:
        return ()


def plan_home(batch: Batch, item: HomeInput, shared: SharedCache) -> HomeRecord:
    """Plan one home of the batch; any problem becomes the record's status and message. The
    record carries the wall and CPU time it took."""
    cpu = time.process_time()
    record = _plan_home(batch, item, shared)
    return replace(record, cpu_seconds=round(time.process_time() - cpu, 4))


def _plan_home(batch: Batch, item: HomeInput, shared: SharedCache) -> HomeRecord:
    start = time.perf_counter()

    def took() -> float:
        return round(time.perf_counter() - start, 4)

    if item.problem:
        return failed_record(item.seq, item.home_id, "error", item.problem)
    try:
        if batch.kind == "plans":
            loaded = load_plan(item.payload)
            plan, base_dir = loaded.plan, loaded.base_dir
            result = plan_roadmap(loaded, cache=PlannerCache(shared=shared))
        else:
            plan = plan_of_row(batch.source_name, batch.template, item.home_id, item.payload, batch.columns)
            base_dir = Path(batch.base_dir)
            try:
                result = plan_roadmap(plan, base_dir, PlannerCache(shared=shared))
            except PlanRuleError as err:
                where = ".".join(map(str, err.loc))
                raise InputError(f"home {item.home_id}: {where}: {err.message}"
                                 + (f" ({err.hint})" if err.hint else "")) from None
    except InputError as err:
        return failed_record(item.seq, item.home_id, "error", _problems(err), took())
    except Exception as exc:  # noqa: BLE001 - a planner bug must not stop the other homes
        return failed_record(item.seq, item.home_id, "failed",
                             f"internal error: {type(exc).__name__}: {exc}", took())
    programs = _programs(shared, plan, base_dir)
    return home_record(item.seq, item.home_id, plan, result, str(base_dir), programs, took())


def plan_batch(batch: Batch) -> list[HomeRecord]:
    """Plan every home of the batch, in order; one record per home."""
    shared = SharedCache()
    return [plan_home(batch, item, shared) for item in batch.items]
