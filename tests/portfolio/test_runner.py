"""Running a portfolio: the single-home engine for every home; a local pool, a dask cluster and
this process give identical homes; a run stopped anywhere resumes with no home lost or counted
twice.

These check the portfolio's own promises (same engine, same results, exactly once) against the
single-home path and against a run made in one go.
"""

from __future__ import annotations

import os
import random
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import pytest

from homeplan import PlannerCache, plan_roadmap
from homeplan.portfolio.inputs import iter_inputs, open_source, plan_of_row
from homeplan.portfolio.record import home_record
from homeplan.portfolio.runner import (
    DaskExecutor,
    InProcessExecutor,
    PoolExecutor,
    batch_size_for,
    run,
)
from homeplan.portfolio.store import Store, store_path

from .conftest import HOMES, new_store, stored


def test_every_home_is_planned_by_the_single_home_path(community, straight_run):
    source = open_source(*community)
    with Store.open(straight_run, readonly=True) as store:
        for item in list(iter_inputs(source))[:3]:
            plan = plan_of_row(str(source.path), source.template, item.home_id, item.payload,
                               source.columns)
            alone = plan_roadmap(plan, source.base_dir, PlannerCache())
            expected = home_record(item.seq, item.home_id, plan, alone, str(source.base_dir))
            row = store.home(item.seq)
            assert row["status"] == "ok"
            assert row["npv_usd"] == expected.npv_usd
            assert row["plan_json"] == expected.plan_json
            assert store.home_years(item.seq) == list(expected.years)
            # the peaks are the single-home roadmap's meter peaks; added = minus doing nothing
            nothing = {y.year: y for y in alone.roadmap.baseline("do_nothing").years}
            for got, y in zip(store.home_years(item.seq), alone.roadmap.years, strict=True):
                assert y.peak_demand_winter_kw is not None
                assert (got.peak_demand_winter_kw, got.peak_demand_summer_kw) == (
                    y.peak_demand_winter_kw, y.peak_demand_summer_kw)
                assert got.added_winter_kw == pytest.approx(
                    y.peak_demand_winter_kw - nothing[y.year].peak_demand_winter_kw, abs=0.006)


def test_every_home_is_stored_once(straight_run):
    with Store.open(straight_run, readonly=True) as store:
        c = store.counts()
        assert c["total"] == c["done"] == HOMES
        seqs = [row[0] for row in store.homes(("seq",))]
        assert seqs == list(range(HOMES))


def test_a_local_pool_gives_the_same_homes(community, straight_run, tmp_path):
    source = open_source(*community)
    with new_store(source, tmp_path) as store:
        out = run(source, store, PoolExecutor(2), batch_size=3)
    assert out.stored == HOMES
    assert stored(store_path(tmp_path)) == stored(straight_run)


def test_a_dask_cluster_gives_the_same_homes(community, straight_run, tmp_path):
    from distributed import LocalCluster

    source = open_source(*community)
    with LocalCluster(n_workers=1, processes=False, dashboard_address=None) as cluster, \
            new_store(source, tmp_path) as store:
        out = run(source, store, DaskExecutor(cluster.scheduler_address), batch_size=3)
    assert out.stored == HOMES
    assert stored(store_path(tmp_path)) == stored(straight_run)


def test_a_limited_run_then_a_resumed_one_give_the_same_homes(community, straight_run, tmp_path):
    source = open_source(*community)
    with new_store(source, tmp_path) as store:
        first = run(source, store, InProcessExecutor(), limit=4)
        assert first.stored == 4 and store.counts()["done"] == 4
        assert [r[0] for r in store.homes(("seq",))] == [0, 1, 2, 3]   # the first homes, all places
        second = run(source, store, InProcessExecutor())
        assert second.stored == HOMES - 4
        assert run(source, store, InProcessExecutor()).stored == 0      # nothing left to do
    assert stored(store_path(tmp_path)) == stored(straight_run)


def test_a_home_already_stored_is_not_stored_again(straight_run, tmp_path):
    copy = tmp_path / "copy.sqlite"
    src = sqlite3.connect(straight_run)
    dst = sqlite3.connect(copy)
    src.backup(dst)
    src.close()
    dst.close()
    from homeplan.portfolio.record import failed_record

    with Store.open(copy) as store:
        assert store.write([failed_record(0, "again", "failed", "a second delivery")]) == 0
        assert store.home(0)["status"] == "ok"
    assert stored(copy) == stored(straight_run)


def test_batches_keep_every_worker_busy():
    assert batch_size_for(1000, 2) == 125
    assert batch_size_for(10_000, 2) == 200      # hundreds of homes per task at most
    assert batch_size_for(3, 8) == 1


# ------------------------------------------------------------------ killed and resumed


def _cli(*args: str) -> list[str]:
    return [sys.executable, "-m", "homeplan.cli", "portfolio", *args]


def _done(path: Path) -> int:
    try:
        conn = sqlite3.connect(f"{path.as_uri()}?mode=ro", uri=True, timeout=5)
        try:
            return conn.execute("SELECT COUNT(*) FROM homes").fetchone()[0]
        finally:
            conn.close()
    except sqlite3.Error:
        return 0


def _wait_for_homes(path: Path, proc: subprocess.Popen, at_least: int, timeout_s: float = 120) -> int:
    end = time.monotonic() + timeout_s
    while time.monotonic() < end and proc.poll() is None:
        n = _done(path) if path.exists() else 0
        if n >= at_least:
            return n
        time.sleep(0.05)
    return _done(path) if path.exists() else 0


def _resume(community, folder: Path) -> None:
    """What ``--resume`` does, in this process (the command's own checks are tested with it)."""
    source = open_source(*community)
    with Store.open(store_path(folder)) as store:
        assert store.meta()["fingerprint"] == source.fingerprint()
        assert store.meta()["inputs_complete"]
        run(source, store, InProcessExecutor())


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_run_killed_at_a_random_point_resumes_to_the_same_result(community, straight_run, tmp_path, seed):
    """The driver (planning in its own process) is killed with SIGKILL a random time after its
    first homes are stored - mid-batch, mid-write or between the two - then resumed."""
    rng = random.Random(seed)
    folder = tmp_path / "run"
    proc = subprocess.Popen(_cli(str(community[0]), "--template", str(community[1]), "-o", str(folder),
                                 "--workers", "0", "--batch-size", "2", "--quiet"),
                            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    try:
        _wait_for_homes(store_path(folder), proc, 1)
        time.sleep(rng.uniform(0.0, 1.5))
        proc.send_signal(signal.SIGKILL)
    finally:
        proc.wait(timeout=60)
    at_kill = _done(store_path(folder))
    assert 0 < at_kill <= HOMES
    _resume(community, folder)
    assert stored(store_path(folder)) == stored(straight_run)


def _alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state != "Z"


def _grandchildren(pid: int) -> list[int]:
    """The pool's workers: children of the fork server, itself a child of the run."""
    children: dict[int, list[int]] = {}
    for d in Path("/proc").iterdir():
        if d.name.isdigit():
            try:
                ppid = int((d / "stat").read_text().rsplit(")", 1)[1].split()[1])
            except (OSError, IndexError, ValueError):
                continue
            children.setdefault(ppid, []).append(int(d.name))
    return [g for c in children.get(pid, []) for g in children.get(c, [])]


@pytest.mark.skipif(not Path("/proc").is_dir(), reason="finds the worker processes in /proc")
def test_a_killed_worker_stops_the_run_and_resume_finishes_it(community, straight_run, tmp_path):
    folder = tmp_path / "run"
    proc = subprocess.Popen(_cli(str(community[0]), "--template", str(community[1]), "-o", str(folder),
                                 "--workers", "2", "--batch-size", "1", "--quiet"),
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    try:
        assert _wait_for_homes(store_path(folder), proc, 1) >= 1
        workers = _grandchildren(proc.pid)
        assert workers, "no worker processes found"
        os.kill(workers[0], signal.SIGKILL)
        _, err = proc.communicate(timeout=120)
    finally:
        if proc.poll() is None:
            proc.kill()
    assert proc.returncode == 1, err
    assert "worker process stopped" in err and "--resume" in err
    assert _done(store_path(folder)) < HOMES
    _resume(community, folder)
    assert stored(store_path(folder)) == stored(straight_run)


def test_ctrl_c_stops_at_once_and_resume_finishes(community, straight_run, tmp_path):
    """SIGINT to the command alone (not to its workers): it stops its busy workers, says how to
    go on, exits with 130; nothing half-stored."""
    folder = tmp_path / "run"
    proc = subprocess.Popen(_cli(str(community[0]), "--template", str(community[1]), "-o", str(folder),
                                 "--workers", "2", "--batch-size", "3", "--quiet"),
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    try:
        assert _wait_for_homes(store_path(folder), proc, 1) >= 1
        workers = _grandchildren(proc.pid)
        proc.send_signal(signal.SIGINT)
        _, err = proc.communicate(timeout=30)
    finally:
        if proc.poll() is None:
            proc.kill()
    assert proc.returncode == 130, err
    assert "Stopped:" in err and "--resume" in err
    time.sleep(1.0)
    assert workers and not [p for p in workers if _alive(p)]
    _resume(community, folder)
    assert stored(store_path(folder)) == stored(straight_run)


def test_a_cancelled_pool_stops_its_busy_workers(community):
    """Closing with cancel does not wait for a long batch to end."""
    from homeplan.portfolio.work import Batch

    source = open_source(*community)
    items = tuple(iter_inputs(source)) * 20                    # a batch of about 30 s of work
    batch = Batch(source.kind, items, source.template, str(source.path), str(source.base_dir),
                  source.columns)
    pool = PoolExecutor(1)
    future = pool.submit(batch)
    time.sleep(3.0)                                            # the worker is planning
    workers = [p.pid for p in pool.pool._processes.values()]
    start = time.monotonic()
    pool.close(cancel=True)
    assert time.monotonic() - start < 5.0
    time.sleep(0.5)
    assert workers and not [p for p in workers if _alive(p)]
    assert future.done()
