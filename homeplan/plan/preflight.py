"""The cheap checks of a plan file and of the files it names, before anything heavy is imported.

Every command that reads a plan runs :func:`preflight` first: the file is read the one safe way
(:mod:`homeplan.plan.files`) and its YAML checked and built (:mod:`homeplan.plan.yamlread`), and
so are the incentive and weather files it names, with the plan's folder rule. None of this needs
the model, the planner or their libraries (pydantic, numpy, pvlib), so a hostile file - a device,
a pipe, an alias bomb, nesting 100,000 deep, 25 MB - is refused in a fraction of a second and a
few megabytes. The full load runs the same readers again and then validates.
"""

from __future__ import annotations

import os
from collections.abc import Iterable
from pathlib import Path
from typing import Any

from homeplan.errors import InputError, PlanRuleError, Problem
from homeplan.plan.files import INCENTIVES, METER, PLAN, WEATHER, PlanFolder, decode_utf8, read_text
from homeplan.plan.yamlread import INCENTIVE_LIMITS, PLAN_LIMITS, position, read_yaml

__all__ = ["incentive_records", "not_incentive_file", "preflight"]


def incentive_records(doc: Any) -> list | None:
    """The program records of an incentive file's document (a list of sections, or such a list
    under ``programs:``), or None when the document is not shaped like an incentive file."""
    records = doc.get("programs") if isinstance(doc, dict) else doc
    if isinstance(records, list) and all(isinstance(r, dict) for r in records):
        return records
    return None


def not_incentive_file(loc: tuple, name: str) -> PlanRuleError:
    """Say what the file is not, never what it holds: it may be any file at all."""
    return PlanRuleError(loc, f"{name} is not an incentive file (a YAML list of programs, or "
                         "'programs:' with that list)", "see docs/plan-format.md#incentives")


def _get(doc: Any, *keys: str) -> Any:
    for key in keys:
        if not isinstance(doc, dict):
            return None
        doc = doc.get(key)
    return doc


def preflight(path: str | os.PathLike, allow: Iterable[str | os.PathLike] = (), named: bool = True) -> None:
    """Raise InputError (located) when a plan file or a file it names is unsafe to read.

    Parameters
    ----------
    path : path
        The plan file.
    allow : paths
        Files outside the plan's folder the user lets it name.
    named : bool
        Also check the incentive and weather files the plan names (for commands that read them).
    """
    name = str(path)
    text = read_text(path, PLAN, name)
    if not text.strip():
        raise InputError(Problem(name, 1, 1, "the file is empty", "start from a sample in sample_homes/"))
    doc = read_yaml(text, name, PLAN_LIMITS)
    if not named:
        return
    folder = PlanFolder.of(Path(path).parent, allow)
    named: list[tuple[tuple, Any]] = []
    files = _get(doc, "incentive_files")
    if isinstance(files, list):
        named += [(("incentive_files", i), f) for i, f in enumerate(files)]
    named.append((("home", "climate", "weather_file"), _get(doc, "home", "climate", "weather_file")))
    named.append((("usage", "weather_file"), _get(doc, "usage", "weather_file")))
    named.append((("usage", "meter_file"), _get(doc, "usage", "meter_file")))
    for loc, file_name in named:
        if not isinstance(file_name, str):
            continue  # not a path: the model says so
        kind = INCENTIVES if loc[0] == "incentive_files" else METER if loc[-1] == "meter_file" else WEATHER
        try:
            _, data = folder.read(file_name, loc, kind)
            named_text = decode_utf8(data, file_name, kind)
            if kind is INCENTIVES and incentive_records(
                    read_yaml(named_text, file_name, INCENTIVE_LIMITS)) is None:
                raise not_incentive_file(loc, file_name)
        except PlanRuleError as err:
            line, col = position(doc, loc)
            raise InputError(Problem(name, line, col, err.message, err.hint)) from None
