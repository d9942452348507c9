"""The driver of a portfolio run: batches of homes out to workers, their records into the store.

Homes are sent in batches (homes of one place together, so a batch computes its place's weather
year and solar geometry once) to one of three executors with the same interface:

- a local process pool (the default; ``concurrent.futures.ProcessPoolExecutor`` on a
  ``forkserver`` context whose server has imported the planner once, so workers start warm);
- a dask.distributed cluster (``--scheduler tcp://HOST:PORT``): the same function, submitted
  with ``Client.submit``; homeplan must be installed on the workers, and the input (a folder of
  plans, or the template's incentive files) readable there at the same path;
- this process (``workers=0``), for debugging.

At most two batches per worker are in flight and the input is read page by page, so the
driver's memory does not grow with the number of homes; each finished batch is written in one
transaction. If a worker dies the run stops (:class:`WorkerLost`) with every finished home
stored; a run resumed later plans only the homes not yet stored.
"""

from __future__ import annotations

import concurrent.futures as cf
import math
import multiprocessing
import time
from collections.abc import Callable, Iterator
from dataclasses import dataclass
from typing import Any, Protocol

from homeplan.portfolio.inputs import HomeInput, Source
from homeplan.portfolio.store import Store
from homeplan.portfolio.work import Batch, plan_batch

__all__ = [
    "DaskExecutor",
    "InProcessExecutor",
    "PoolExecutor",
    "Progress",
    "RunOutcome",
    "WorkerLost",
    "batch_size_for",
    "batches",
    "make_executor",
    "run",
]

MAX_BATCH = 200
"""The most homes in one task (hundreds: a task's scheduling cost is then negligible)."""
BATCHES_PER_WORKER = 4
"""Aim for at least this many batches per worker, so that the last ones end together."""


PRELOAD = ("homeplan.portfolio.work", "pandas", "scipy.optimize", "scipy.signal", "scipy.stats",
           "scipy.sparse", "pvlib")
"""Imported once by the pool's fork server, so that every worker starts with them loaded (the
planner imports the heavy ones only when first used)."""


class WorkerLost(RuntimeError):
    """A worker process (or a dask worker) died: the homes it held are not stored."""


@dataclass(frozen=True)
class Progress:
    """Where a run stands: homes stored by this run and in all, how many this run will plan,
    errors so far, the time since the run started and the recent rate (homes per second)."""

    stored_now: int
    to_plan: int
    stored_total: int
    total: int
    problems: int
    elapsed_s: float
    rate_per_s: float | None

    @property
    def left_s(self) -> float | None:
        """Estimated seconds until this run's homes are all planned (None: not known yet)."""
        if not self.rate_per_s:
            return None
        return (self.to_plan - self.stored_now) / self.rate_per_s


@dataclass(frozen=True)
class RunOutcome:
    """What a run did: homes stored by it, homes it was asked to plan, and the seconds taken."""

    stored: int
    to_plan: int
    seconds: float


class Executor(Protocol):
    parallel: int

    def submit(self, batch: Batch) -> Any: ...

    def wait_any(self, futures: list[Any]) -> list[Any]: ...

    def result(self, future: Any) -> list: ...

    def close(self, cancel: bool = False) -> None: ...


class InProcessExecutor:
    """Plans each batch in this process when it is submitted (for debugging and small tests)."""

    parallel = 1

    def submit(self, batch: Batch) -> cf.Future:
        f: cf.Future = cf.Future()
        f.set_result(plan_batch(batch))
        return f

    def wait_any(self, futures: list[cf.Future]) -> list[cf.Future]:
        return futures[:1]

    def result(self, future: cf.Future) -> list:
        return future.result()

    def close(self, cancel: bool = False) -> None:  # noqa: ARG002 - nothing to stop
        return None


class PoolExecutor:
    """A local pool of worker processes."""

    def __init__(self, workers: int) -> None:
        ctx = multiprocessing.get_context("forkserver")
        ctx.set_forkserver_preload(list(PRELOAD))
        self.parallel = workers
        self.pool = cf.ProcessPoolExecutor(max_workers=workers, mp_context=ctx)

    def submit(self, batch: Batch) -> cf.Future:
        try:
            return self.pool.submit(plan_batch, batch)
        except cf.process.BrokenProcessPool as exc:
            raise WorkerLost(f"a worker process stopped ({exc})") from None

    def wait_any(self, futures: list[cf.Future]) -> list[cf.Future]:
        done, _ = cf.wait(futures, return_when=cf.FIRST_COMPLETED)
        return list(done)

    def result(self, future: cf.Future) -> list:
        try:
            return future.result()
        except cf.process.BrokenProcessPool as exc:
            raise WorkerLost(f"a worker process stopped unexpectedly ({exc})") from None

    def close(self, cancel: bool = False) -> None:
        """Stop the pool; ``cancel``: now, without waiting for the batches being planned (their
        homes are planned again on resume)."""
        if cancel:
            # the executor has no public way to stop busy workers before Python 3.14
            # (terminate_workers); without it, exiting would wait for their batches to end
            for proc in list(getattr(self.pool, "_processes", {}).values()):
                proc.terminate()
        self.pool.shutdown(wait=not cancel, cancel_futures=cancel)


class DaskExecutor:
    """A dask.distributed cluster, by its scheduler's address."""

    def __init__(self, address: str, timeout_s: float = 20.0) -> None:
        # dask.distributed takes about half a second to import: only for runs that use it
        from distributed import Client, as_completed

        try:
            self.client = Client(address, timeout=timeout_s, set_as_default=False)
        except (OSError, TimeoutError) as exc:
            raise ConnectionError(f"cannot reach the dask scheduler at {address} ({exc})") from None
        self.parallel = max(1, sum(self.client.nthreads().values()))
        self._live: set[Any] = set()
        self._finished = as_completed(loop=self.client.loop)

    def submit(self, batch: Batch) -> Any:
        f = self.client.submit(plan_batch, batch, pure=False)
        self._live.add(f)
        self._finished.add(f)
        return f

    def wait_any(self, futures: list[Any]) -> list[Any]:  # noqa: ARG002 - they were all submitted here
        return [next(self._finished)]

    def result(self, future: Any) -> list:
        from distributed import KilledWorker

        self._live.discard(future)
        try:
            return future.result()
        except KilledWorker as exc:
            raise WorkerLost(f"a dask worker died while planning ({exc})") from None

    def close(self, cancel: bool = False) -> None:
        if cancel and self._live:
            self.client.cancel(list(self._live))
        self._live.clear()
        self.client.close()


def make_executor(workers: int, scheduler: str | None) -> Executor:
    """The executor a run asks for: a dask cluster, this process (0 workers) or a pool."""
    if scheduler:
        return DaskExecutor(scheduler)
    if workers <= 0:
        return InProcessExecutor()
    return PoolExecutor(workers)


def batch_size_for(to_plan: int, parallel: int, most: int = MAX_BATCH) -> int:
    """Homes per batch: enough batches to keep every worker busy to the end, at most ``most``."""
    return max(1, min(most, math.ceil(to_plan / max(1, parallel * BATCHES_PER_WORKER))))


def batches(homes: Iterator[HomeInput], size: int, make: Callable[[tuple[HomeInput, ...]], Batch],
            limit: int | None = None) -> Iterator[Batch]:
    """Consecutive homes in batches of ``size``, a new batch at each new place; at most
    ``limit`` homes in all."""
    chunk: list[HomeInput] = []
    for n, h in enumerate(homes):
        if limit is not None and n >= limit:
            break
        if chunk and (len(chunk) >= size or h.group != chunk[-1].group):
            yield make(tuple(chunk))
            chunk = []
        chunk.append(h)
    if chunk:
        yield make(tuple(chunk))


def run(source: Source, store: Store, executor: Executor, *, limit: int | None = None,
        batch_size: int = MAX_BATCH, progress: Callable[[Progress], None] | None = None) -> RunOutcome:
    """Plan the homes of ``source`` not yet in ``store`` (at most ``limit``), storing each batch
    as it finishes; ``progress`` is called after each batch.

    Raises
    ------
    WorkerLost
        A worker died; the homes finished before are stored.
    KeyboardInterrupt
        Passed on after the executor is stopped; the homes finished before are stored.
    """
    counts = store.counts()
    pending = counts["total"] - counts["done"]
    to_plan = pending if limit is None else min(limit, pending)
    size = batch_size_for(to_plan, executor.parallel, batch_size)

    def make(items: tuple[HomeInput, ...]) -> Batch:
        return Batch(kind=source.kind, items=items, template=source.template,
                     source_name=str(source.path), base_dir=str(source.base_dir),
                     columns=source.columns)

    # a limited run plans the first homes of the input (all places), not the first place's
    upto = store.nth_pending(limit) if limit is not None else None
    todo = batches(store.pending(upto=upto), size, make, limit)
    start = time.perf_counter()
    recent: list[tuple[float, int]] = [(start, 0)]
    stored = problems = 0
    in_flight: list[Any] = []

    def fill() -> None:
        while len(in_flight) < 2 * executor.parallel:
            batch = next(todo, None)
            if batch is None:
                return
            in_flight.append(executor.submit(batch))

    finished = False
    try:
        fill()
        while in_flight:
            for f in executor.wait_any(in_flight):
                in_flight.remove(f)
                records = executor.result(f)
                stored += store.write(records)
                problems += sum(1 for r in records if r.status in ("error", "failed"))
                now = time.perf_counter()
                recent.append((now, stored))
                window = [p for p in recent if now - p[0] <= 60.0] or recent[-2:]
                recent[:] = window
                t0, n0 = window[0]
                rate = (stored - n0) / (now - t0) if now > t0 and stored > n0 else None
                if progress is not None:
                    progress(Progress(stored, to_plan, counts["done"] + stored, counts["total"],
                                      problems, now - start, rate))
            fill()
        finished = True
    finally:
        executor.close(cancel=not finished)
    return RunOutcome(stored, to_plan, time.perf_counter() - start)
