"""The results of a portfolio run: one SQLite file, written as homes finish, readable meanwhile.

Layout (tables):

- ``meta``: what the run is (input, template, the input's fingerprint, options, versions);
- ``inputs``: every home of the input, in order (``seq``), with its id, where it is written, what
  a worker needs to rebuild it, and a problem found before planning (a duplicate id);
- ``homes``: one row per home planned or refused (``status``: ok, infeasible, error, failed),
  with its key figures and its plan (JSON, for the app);
- ``home_years``, ``home_steps``, ``home_programs``: each planned home's years, steps and
  incentive payments.

One writer (the driver) and any number of readers: the file is in WAL mode, so the app can read
a run while it goes on. Each batch of homes is written in one transaction, a home's rows all
together or not at all, and a home already stored is never stored again (its ``seq`` is the
key): a run stopped at any point - Ctrl-C, a killed worker, a crash, a power cut - resumes with
no home lost or counted twice. ``synchronous=NORMAL``: a power cut may undo the last commits,
never corrupt the file; those homes are planned again on resume.

References
----------
SQLite documentation: "Write-Ahead Logging" (https://sqlite.org/wal.html), "Atomic Commit In
SQLite" (https://sqlite.org/atomiccommit.html), PRAGMA synchronous.
"""

from __future__ import annotations

import contextlib
import json
import sqlite3
from collections.abc import Iterable, Iterator
from dataclasses import astuple, fields
from pathlib import Path
from typing import Any

from homeplan.errors import InputError, Problem
from homeplan.portfolio.inputs import HomeInput
from homeplan.portfolio.record import HomeRecord, ProgramRow, StepRow, YearRow

__all__ = ["STORE_NAME", "Store", "store_path"]

STORE_NAME = "portfolio.sqlite"
SCHEMA_VERSION = 1

_HOME_COLUMNS = [f.name for f in fields(HomeRecord) if f.name not in ("years", "steps", "programs")]
_YEAR_COLUMNS = [f.name for f in fields(YearRow)]
_STEP_COLUMNS = [f.name for f in fields(StepRow)]
_PROGRAM_COLUMNS = [f.name for f in fields(ProgramRow)]

_SQL_TYPE = {"int": "INTEGER", "float": "REAL", "str": "TEXT", "bool": "INTEGER"}


def _columns(cls: type, skip: tuple[str, ...] = ()) -> str:
    out = []
    for f in fields(cls):
        if f.name in skip:
            continue
        t = str(f.type).split("|")[0].strip()
        out.append(f"{f.name} {_SQL_TYPE.get(t, 'TEXT')}")
    return ", ".join(out)


SCHEMA = f"""
CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE inputs (seq INTEGER PRIMARY KEY, home_id TEXT NOT NULL, source TEXT NOT NULL,
    payload TEXT NOT NULL, grp TEXT NOT NULL DEFAULT '', problem TEXT);
CREATE INDEX inputs_order ON inputs (grp, seq);
CREATE INDEX inputs_id ON inputs (home_id);
CREATE TABLE homes ({_columns(HomeRecord, ("seq", "years", "steps", "programs"))},
    seq INTEGER PRIMARY KEY REFERENCES inputs (seq),
    CHECK (status IN ('ok', 'infeasible', 'error', 'failed')));
CREATE TABLE home_years (seq INTEGER NOT NULL REFERENCES homes (seq), {_columns(YearRow)},
    PRIMARY KEY (seq, year)) WITHOUT ROWID;
CREATE TABLE home_steps (seq INTEGER NOT NULL REFERENCES homes (seq), {_columns(StepRow)},
    PRIMARY KEY (seq, project_id)) WITHOUT ROWID;
CREATE TABLE home_programs (seq INTEGER NOT NULL REFERENCES homes (seq), {_columns(ProgramRow)},
    PRIMARY KEY (seq, program_id, year)) WITHOUT ROWID;
"""


def store_path(results: str | Path) -> Path:
    """The store inside a results folder (or the file itself when a ``.sqlite`` file is named)."""
    p = Path(results)
    return p if p.suffix == ".sqlite" else p / STORE_NAME


class Store:
    """A portfolio's results file (see the module docstring). Use as a context manager."""

    def __init__(self, conn: sqlite3.Connection, path: Path, readonly: bool) -> None:
        self.conn = conn
        self.path = path
        self.readonly = readonly

    # ------------------------------------------------------------------ opening

    @classmethod
    def create(cls, path: str | Path, meta: dict[str, Any]) -> Store:
        """A new store at ``path`` (its folder is created). Refuses to touch an existing one."""
        p = Path(path)
        if p.exists():
            raise InputError(Problem(str(p), 0, 0, "already holds a portfolio run",
                                     "add --resume to go on with it, or give another results folder"))
        p.parent.mkdir(parents=True, exist_ok=True)
        conn = cls._connect(p)
        with conn:
            conn.executescript(SCHEMA)
            conn.executemany("INSERT INTO meta VALUES (?, ?)",
                             [(k, json.dumps(v)) for k, v in {**meta, "schema": SCHEMA_VERSION}.items()])
        return cls(conn, p, readonly=False)

    @classmethod
    def open(cls, path: str | Path, readonly: bool = False) -> Store:
        """An existing store; ``readonly`` for viewers (they may read while a run writes)."""
        p = Path(path)
        if not p.is_file():
            raise InputError(Problem(str(p), 0, 0, "no portfolio results here",
                                     "run 'homeplan portfolio INPUT -o RESULTS' first"))
        try:
            conn = cls._connect(p, readonly)
            version = conn.execute("SELECT value FROM meta WHERE key = 'schema'").fetchone()
        except sqlite3.DatabaseError as exc:
            raise InputError(Problem(str(p), 0, 0, f"not a portfolio results file ({exc})")) from None
        if version is None or json.loads(version[0]) != SCHEMA_VERSION:
            conn.close()
            raise InputError(Problem(str(p), 0, 0, "made by another version of homeplan",
                                     "start a new run with this version"))
        return cls(conn, p, readonly)

    @staticmethod
    def _connect(p: Path, readonly: bool = False) -> sqlite3.Connection:
        if readonly:
            conn = sqlite3.connect(f"{p.resolve().as_uri()}?mode=ro", uri=True, timeout=30.0)
        else:
            conn = sqlite3.connect(p, timeout=30.0)
            conn.execute("PRAGMA journal_mode=WAL")
            conn.execute("PRAGMA synchronous=NORMAL")
        conn.execute("PRAGMA foreign_keys=ON")
        return conn

    def close(self) -> None:
        with contextlib.suppress(sqlite3.Error):
            if not self.readonly:
                self.conn.execute("PRAGMA optimize")
        self.conn.close()

    def __enter__(self) -> Store:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    # ------------------------------------------------------------------ the run

    def meta(self) -> dict[str, Any]:
        return {k: json.loads(v) for k, v in self.conn.execute("SELECT key, value FROM meta")}

    def set_meta(self, **values: Any) -> None:
        with self.conn:
            self.conn.executemany("INSERT OR REPLACE INTO meta VALUES (?, ?)",
                                  [(k, json.dumps(v)) for k, v in values.items()])

    def add_inputs(self, items: Iterable[HomeInput]) -> int:
        """Record every home of the input (streamed, one transaction); then mark each id used
        by an earlier row as a problem of the later rows. Returns the number of homes."""
        n = 0

        def rows() -> Iterator[tuple]:
            nonlocal n
            for it in items:
                n += 1
                yield (it.seq, it.home_id, it.source, it.payload, it.group, it.problem)

        with self.conn:
            self.conn.executemany("INSERT INTO inputs VALUES (?, ?, ?, ?, ?, ?)", rows())
            self.conn.execute("""
                UPDATE inputs SET problem = source || ': the id ' || home_id || ' is used by '
                    || (SELECT f.source FROM inputs f WHERE f.home_id = inputs.home_id
                        ORDER BY f.seq LIMIT 1) || ' too (give each home its own id)'
                WHERE problem IS NULL AND seq > (SELECT MIN(f.seq) FROM inputs f
                                                 WHERE f.home_id = inputs.home_id)""")
        return n

    def nth_pending(self, n: int) -> int | None:
        """The input position (``seq``) of the n-th home not yet stored, in input order (None:
        fewer are left)."""
        row = self.conn.execute(
            """SELECT i.seq FROM inputs i WHERE NOT EXISTS (SELECT 1 FROM homes h WHERE h.seq = i.seq)
               ORDER BY i.seq LIMIT 1 OFFSET ?""", (n - 1,)).fetchone()
        return None if row is None else row[0]

    def pending(self, page: int = 500, upto: int | None = None) -> Iterator[HomeInput]:
        """Homes of the input not yet stored (those up to input position ``upto``), homes of one
        place together, in input order within a place. Read page by page (memory does not grow
        with the number of homes)."""
        last: tuple[str, int] = ("", -1)
        bound = upto if upto is not None else 2**62
        while True:
            rows = self.conn.execute(
                """SELECT i.seq, i.home_id, i.source, i.payload, i.grp, i.problem FROM inputs i
                   WHERE (i.grp, i.seq) > (?, ?) AND i.seq <= ?
                     AND NOT EXISTS (SELECT 1 FROM homes h WHERE h.seq = i.seq)
                   ORDER BY i.grp, i.seq LIMIT ?""", (*last, bound, page)).fetchall()
            if not rows:
                return
            for seq, home_id, source, payload, grp, problem in rows:
                yield HomeInput(seq, home_id, source, payload, grp, problem)
            last = (rows[-1][4], rows[-1][0])

    def write(self, records: Iterable[HomeRecord]) -> int:
        """Store finished homes in one transaction; a home already stored is left as it is.
        Returns the number of homes newly stored."""
        stored = 0
        cols = ", ".join(_HOME_COLUMNS)
        marks = ", ".join("?" * len(_HOME_COLUMNS))
        with self.conn:
            for r in records:
                cur = self.conn.execute(f"INSERT OR IGNORE INTO homes ({cols}) VALUES ({marks})",
                                        [getattr(r, c) for c in _HOME_COLUMNS])
                if cur.rowcount != 1:
                    continue
                stored += 1
                self.conn.executemany(
                    f"INSERT INTO home_years VALUES (?, {', '.join('?' * len(_YEAR_COLUMNS))})",
                    [(r.seq, *astuple(y)) for y in r.years])
                self.conn.executemany(
                    f"INSERT INTO home_steps VALUES (?, {', '.join('?' * len(_STEP_COLUMNS))})",
                    [(r.seq, *astuple(s)) for s in r.steps])
                self.conn.executemany(
                    f"INSERT INTO home_programs VALUES (?, {', '.join('?' * len(_PROGRAM_COLUMNS))})",
                    [(r.seq, *astuple(p)) for p in r.programs])
        return stored

    # ------------------------------------------------------------------ reading

    def counts(self) -> dict[str, int]:
        """Homes in the input (``total``), stored (``done``) and stored by status."""
        total = self.conn.execute("SELECT COUNT(*) FROM inputs").fetchone()[0]
        out = {"total": total, "done": 0, "ok": 0, "infeasible": 0, "error": 0, "failed": 0}
        for status, n in self.conn.execute("SELECT status, COUNT(*) FROM homes GROUP BY status"):
            out[status] = n
            out["done"] += n
        return out

    def homes(self, columns: tuple[str, ...] = ("seq", "home_id", "status", "message")) -> Iterator[tuple]:
        """Stored homes in input order (only the columns asked for)."""
        for c in columns:
            if c not in ("seq", *_HOME_COLUMNS):
                raise ValueError(f"no column {c!r} in homes")
        yield from self.conn.execute(f"SELECT {', '.join(columns)} FROM homes ORDER BY seq")

    def home(self, seq: int) -> dict[str, Any] | None:
        """One stored home with all its columns, by its place in the input."""
        cur = self.conn.execute("SELECT * FROM homes WHERE seq = ?", (seq,))
        row = cur.fetchone()
        if row is None:
            return None
        return dict(zip([d[0] for d in cur.description], row, strict=True))

    def home_years(self, seq: int) -> list[YearRow]:
        """A stored home's years, as the worker made them."""
        cur = self.conn.execute(f"SELECT {', '.join(_YEAR_COLUMNS)} FROM home_years WHERE seq = ? "
                                "ORDER BY year", (seq,))
        flags = {f.name for f in fields(YearRow) if f.type == "bool"}
        return [YearRow(**{c: bool(v) if c in flags else v for c, v in zip(_YEAR_COLUMNS, row, strict=True)})
                for row in cur]
