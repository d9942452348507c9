"""Where the homes of a portfolio come from: a folder of plan files, or a CSV of homes.

**A folder**: every ``*.yaml`` / ``*.yml`` file directly in it is one home (sub-folders, such as
one holding incentive catalogs, are not read). The home's id is the file name without its
extension. Each file is read and checked exactly as ``homeplan check`` reads it.

**A CSV of homes with a template plan**: the first line names the columns; one row per home.
The column ``id`` (required) names the home. Every other column is a path of keys into the
template plan, written with dots: ``home.floor_area_ft2``, ``home.electrical.service_amps``,
``household.ami_pct``. An item of a list (``appliances``, ``vehicles``) is named by its ``id``:
``appliances.heating.fuel`` sets the fuel of the appliance whose id is ``heating`` (an item
that is not in the template is added). A cell

- left empty keeps the template's value;
- holding ``none`` removes that key or item (``appliances.cooling`` = ``none``: the home has no
  such appliance; ``home.roof`` = ``none``: no roof data);
- otherwise is read as a number, ``true`` / ``false``, a list in brackets (``[1, 2, 3]``) or
  text, in the unit its key names.

Each row with the template is then checked exactly as a plan file is. A row that breaks a rule
is recorded with the message (at the CSV's line and column) and the run goes on.
"""

from __future__ import annotations

import copy
import csv
import difflib
import hashlib
import json
import os
from collections.abc import Iterator, Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Literal

from homeplan.errors import InputError, Problem
from homeplan.plan.load import load_plan, validate_document
from homeplan.plan.model import Plan

__all__ = [
    "ID_COLUMN",
    "NONE",
    "CellError",
    "HomeInput",
    "Source",
    "apply_cells",
    "iter_inputs",
    "open_source",
    "parse_cell",
    "plain",
    "plan_of_row",
]

ID_COLUMN = "id"
NONE = "none"
MAX_CSV_BYTES = 512 * 1024 * 1024
PLAN_SUFFIXES = (".yaml", ".yml")


@dataclass(frozen=True)
class HomeInput:
    """One home to plan: its place in the input (``seq``), its id, where it is written
    (``source``: a file, or a CSV line), what a worker needs to rebuild it (``payload``: the
    plan file's path, or the row's non-empty cells as JSON), and a problem found before planning
    (a duplicate or missing id)."""

    seq: int
    home_id: str
    source: str
    payload: str
    group: str = ""
    problem: str | None = None


@dataclass(frozen=True)
class Source:
    """A portfolio's input, opened and checked (the homes themselves are read lazily)."""

    kind: Literal["plans", "rows"]
    path: Path
    template_path: Path | None = None
    template: Any = None            # the template document as plain dicts and lists
    columns: tuple[str, ...] = ()

    @property
    def base_dir(self) -> Path:
        """The folder that the template's file paths (incentive, weather files) are relative to."""
        return (self.template_path or self.path).parent

    def fingerprint(self) -> str:
        """SHA-256 of the input as it is now: the CSV's and template's bytes, or the folder's
        plan files by name, size and modification time. A resumed run must see the same."""
        h = hashlib.sha256()
        if self.kind == "rows":
            for p in (self.path, self.template_path):
                assert p is not None
                with p.open("rb") as fh:
                    for chunk in iter(lambda fh=fh: fh.read(1 << 20), b""):
                        h.update(chunk)
                h.update(b"\0")
        else:
            for p in _plan_files(self.path):
                st = p.stat()
                h.update(f"{p.name}\0{st.st_size}\0{st.st_mtime_ns}\n".encode())
        return h.hexdigest()


def plain(node: Any) -> Any:
    """A parsed YAML document as plain dicts, lists and scalars (comments dropped)."""
    if isinstance(node, Mapping):
        return {str(k) if not isinstance(k, int) else k: plain(v) for k, v in node.items()}
    if isinstance(node, list | tuple):
        return [plain(v) for v in node]
    if isinstance(node, str):
        return str(node)
    return node


def _plan_files(folder: Path) -> list[Path]:
    return sorted(p for p in folder.iterdir()
                  if p.suffix.lower() in PLAN_SUFFIXES and p.is_file() and not p.name.startswith("."))


def open_source(path: str | os.PathLike, template: str | os.PathLike | None = None) -> Source:
    """Open a folder of plan files, or a CSV of homes with its template plan.

    Raises
    ------
    InputError
        The input does not exist, is empty, or a CSV's header names a key the plan format does
        not have (located at the CSV's first line); a template that is not a valid plan.
    """
    p = Path(path)
    if not p.exists():
        raise InputError(Problem(str(p), 0, 0, "not found", "give a folder of plan files or a CSV of homes"))
    if p.is_dir():
        if template is not None:
            raise InputError(Problem(str(p), 0, 0, "a folder of plans takes no --template",
                                     "the template fills in the rows of a CSV of homes"))
        if not _plan_files(p):
            raise InputError(Problem(str(p), 0, 0, "no plan files (*.yaml) in this folder",
                                     "put one plan file per home in it, or give a CSV of homes"))
        return Source("plans", p)
    if p.suffix.lower() != ".csv":
        raise InputError(Problem(str(p), 0, 0, "not a folder or a .csv file",
                                 "give a folder of plan files, or a CSV of homes with --template PLAN"))
    if template is None:
        raise InputError(Problem(str(p), 0, 0, "a CSV of homes needs a template plan",
                                 "add --template PLAN: the plan that fills in what the columns do not"))
    if p.stat().st_size > MAX_CSV_BYTES:
        raise InputError(Problem(str(p), 0, 0, f"larger than {MAX_CSV_BYTES:,} bytes", "split it"))
    loaded = load_plan(template)
    columns = _read_header(p)
    return Source("rows", p, Path(template), plain(loaded.document), columns)


def _reader(fh) -> Iterator[list[str]]:
    return csv.reader(fh, strict=True)


def _read_header(path: Path) -> tuple[str, ...]:
    try:
        with path.open(encoding="utf-8-sig", newline="") as fh:
            header = next(_reader(fh), None)
    except UnicodeDecodeError:
        raise InputError(Problem(str(path), 1, 1, "not UTF-8 text", "save the CSV as UTF-8")) from None
    except csv.Error as exc:
        raise InputError(Problem(str(path), 1, 1, f"not a readable CSV: {exc}")) from None
    if not header:
        raise InputError(Problem(str(path), 1, 1, "the file is empty",
                                 "the first line names the columns: id, then paths of plan keys"))
    columns = tuple(h.strip() for h in header)
    problems = []
    if ID_COLUMN not in columns:
        problems.append(Problem(str(path), 1, 1, "no 'id' column", "add a column 'id' naming each home"))
    seen: set[str] = set()
    for i, col in enumerate(columns, 1):
        if col in seen:
            problems.append(Problem(str(path), 1, i, f"the column '{col}' is given twice", "keep one"))
        seen.add(col)
        if col == ID_COLUMN:
            continue
        top = col.split(".")[0]
        if not col or any(not part for part in col.split(".")):
            problems.append(Problem(str(path), 1, i, f"'{col}' is not a path of keys",
                                    "write keys joined by dots, e.g. home.floor_area_ft2"))
        elif top not in Plan.model_fields:
            close = difflib.get_close_matches(top, list(Plan.model_fields), n=1)
            hint = f"did you mean '{close[0]}'?" if close else "columns start with a plan section, e.g. home."
            problems.append(Problem(str(path), 1, i, f"unknown plan section '{top}' in column '{col}'", hint))
    if problems:
        raise InputError(problems)
    return columns


def iter_inputs(source: Source) -> Iterator[HomeInput]:
    """The homes of the input, in order, read lazily (a CSV is streamed, never held whole).

    Rows with a missing id get the problem here; duplicate ids are found by the store, which
    sees every id (see :mod:`homeplan.portfolio.store`).
    """
    if source.kind == "plans":
        for seq, p in enumerate(_plan_files(source.path)):
            yield HomeInput(seq, p.stem, p.name, str(p.resolve()))
        return
    columns = source.columns
    id_at = columns.index(ID_COLUMN)
    name = str(source.path)
    with source.path.open(encoding="utf-8-sig", newline="") as fh:
        reader = _reader(fh)
        next(reader)
        seq = 0
        while True:
            try:
                row = next(reader)
            except StopIteration:
                return
            except csv.Error as exc:
                raise InputError(Problem(name, reader.line_num, 1, f"not a readable CSV row: {exc}",
                                         "check the quotes on this line")) from None
            if not any(c.strip() for c in row):
                continue  # blank lines are not homes
            line = reader.line_num
            problem = None
            if len(row) != len(columns):
                problem = (f"{name}:{line}:1: the row has {len(row)} cells, the header {len(columns)} "
                           "(check the commas and quotes on this line)")
            home_id = row[id_at].strip() if id_at < len(row) else ""
            if not home_id and problem is None:
                problem = f"{name}:{line}:{id_at + 1}: the row has no id (give each home an id)"
            cells = {c: v for c, v in zip(columns, row, strict=False) if c != ID_COLUMN and v.strip()}
            group = json.dumps(sorted((c, v) for c, v in cells.items()
                                      if c.startswith(("home.location.", "home.climate."))))
            payload = json.dumps({"line": line, "cells": cells}, separators=(",", ":"))
            yield HomeInput(seq, home_id or f"(line {line})", f"{source.path.name} line {line}",
                            payload, group, problem)
            seq += 1


def parse_cell(text: str) -> Any:
    """A cell's value: a number, true/false, a bracketed list (JSON) or text; ``none`` is
    :data:`NONE` (remove)."""
    t = text.strip()
    low = t.lower()
    if low == NONE:
        return NONE
    if low in ("true", "false"):
        return low == "true"
    try:
        return int(t)
    except ValueError:
        pass
    try:
        v = float(t)
    except ValueError:
        pass
    else:
        if v == v and abs(v) != float("inf"):
            return v
        raise ValueError(f"{t!r} is not a finite number")
    if t.startswith("["):
        try:
            return json.loads(t)
        except json.JSONDecodeError as exc:
            raise ValueError(f"{t!r} is not a list like [1, 2, 3] ({exc.msg})") from None
    return t


LIST_SECTIONS = {("appliances",), ("vehicles",), ("home", "electrical", "loads"), ("budget", "loans")}
"""Sections that are lists of items (named by id in a column); created empty when missing."""


def _child(node: Any, part: str, create: bool, path: tuple[str, ...] = ()) -> tuple[Any, Any] | None:
    """(container, key or index) of ``part`` inside ``node`` (at ``path``); lists are searched by
    item id."""
    if isinstance(node, dict):
        if part not in node or node[part] is None:
            if not create:
                return None
            node[part] = [] if (*path, part) in LIST_SECTIONS else {}
        return node, part
    if isinstance(node, list):
        for i, item in enumerate(node):
            if isinstance(item, dict) and (item.get("id") or item.get("kind")) == part:
                return node, i
        if part.isdigit() and int(part) < len(node):
            return node, int(part)
        if not create:
            return None
        node.append({"id": part})
        return node, len(node) - 1
    return None


class CellError(ValueError):
    """A cell that cannot be applied: its column and what is wrong."""

    def __init__(self, column: str, message: str):
        super().__init__(f"{column}: {message}")
        self.column = column
        self.message = message


def apply_cells(template: Any, cells: Mapping[str, str]) -> dict:
    """The template with a row's cells applied (a new document; the template is not changed).

    Raises
    ------
    CellError
        A cell that cannot be applied (with its column).
    """
    values: dict[str, Any] = {}
    for column, text in cells.items():
        try:
            values[column] = parse_cell(text)
        except ValueError as exc:
            raise CellError(column, str(exc)) from None
    removed = [c for c, v in values.items() if v == NONE]
    for column in removed:
        inside = next((c for c, v in values.items() if v != NONE and c.startswith(column + ".")), None)
        if inside is not None:
            raise CellError(column, f"the row removes '{column}' and sets '{inside}' inside it")
    doc = copy.deepcopy(template)
    for column, value in values.items():
        if value == NONE:
            continue
        parts = column.split(".")
        node: Any = doc
        for i, part in enumerate(parts[:-1]):
            found = _child(node, part, create=True, path=tuple(parts[:i]))
            if found is None:
                raise CellError(column, f"'{part}' is a value, not a section")
            container, key = found
            node = container[key]
            if not isinstance(node, dict | list):
                raise CellError(column, f"'{part}' is a value, not a section")
        if isinstance(node, list):
            raise CellError(column, "this names a list: name one of its items by id")
        node[parts[-1]] = value
    for column in removed:
        node = doc
        found = None
        for part in column.split("."):
            found = _child(node, part, create=False)
            if found is None:
                break
            container, key = found
            node = container[key]
        if found is not None:
            container, key = found
            del container[key]
    return doc


def plan_of_row(source_name: str, template: Any, home_id: str, payload: str,
                columns: tuple[str, ...] = ()) -> Plan:
    """Validate one CSV row applied to the template; every problem is located at the row's line
    (and the column's position when the problem is in one cell).

    Raises
    ------
    InputError
        The row breaks a rule of the plan format (the same rules as a plan file).
    """
    data = json.loads(payload)
    line, cells = data["line"], data["cells"]

    def col_of(column: str) -> int:
        return columns.index(column) + 1 if column in columns else 1

    try:
        doc = apply_cells(template, cells)
    except CellError as exc:
        raise InputError(Problem(source_name, line, col_of(exc.column), f"home {home_id}: {exc.message}",
                                 f"column {exc.column}")) from None
    try:
        plan, _ = validate_document(doc, source_name)
    except InputError as err:
        raise InputError([Problem(source_name, line, 1, f"home {home_id}: {p.message}", p.hint)
                          for p in err.problems]) from None
    return plan
