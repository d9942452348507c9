"""A small invented community and one complete run of it, shared by the portfolio tests."""

from __future__ import annotations

import shutil
import sqlite3
from pathlib import Path

import pytest

from homeplan.portfolio.community import write_community
from homeplan.portfolio.inputs import iter_inputs, open_source
from homeplan.portfolio.runner import InProcessExecutor, run
from homeplan.portfolio.store import Store, store_path

ROOT = Path(__file__).resolve().parents[2]
PROGRAMS = ROOT / "sample_homes" / "incentives" / "demoland_invented.yaml"
HOMES = 8
SEED = 4  # homes that plan quickly (about 0.2 s each), to keep the tests short

# what a stored home is, without the measured fields (the time it took)
TABLES = {
    "homes": "SELECT * FROM homes ORDER BY seq",
    "home_years": "SELECT * FROM home_years ORDER BY seq, year",
    "home_steps": "SELECT * FROM home_steps ORDER BY seq, project_id",
    "home_programs": "SELECT * FROM home_programs ORDER BY seq, program_id, year",
}


def stored(path: Path) -> dict[str, list[tuple]]:
    """Every stored row of a run (the planning times of each home left out)."""
    conn = sqlite3.connect(path)
    try:
        out = {}
        for name, sql in TABLES.items():
            cur = conn.execute(sql)
            cols = [d[0] for d in cur.description]
            keep = [i for i, c in enumerate(cols) if c not in ("seconds", "cpu_seconds")]
            out[name] = [tuple(row[i] for i in keep) for row in cur]
        return out
    finally:
        conn.close()


def new_store(source, folder: Path) -> Store:
    store = Store.create(store_path(folder), {"kind": source.kind, "fingerprint": source.fingerprint()})
    store.add_inputs(iter_inputs(source))
    store.set_meta(inputs_complete=True)
    return store


@pytest.fixture(scope="session")
def community(tmp_path_factory) -> tuple[Path, Path]:
    """homes.csv and template.yaml of a small invented community (its programs invented too)."""
    folder = tmp_path_factory.mktemp("community")
    shutil.copy(PROGRAMS, folder / "programs.yaml")
    return write_community(folder, HOMES, SEED, incentive_file="programs.yaml")


@pytest.fixture(scope="session")
def straight_run(community, tmp_path_factory) -> Path:
    """The community planned in one go in this process: the reference the other runs must match."""
    source = open_source(*community)
    folder = tmp_path_factory.mktemp("straight")
    with new_store(source, folder) as store:
        run(source, store, InProcessExecutor(), batch_size=4)
    return store_path(folder)
