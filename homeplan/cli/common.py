"""What the commands share: one path from a plan file to its result, and the output date."""

from __future__ import annotations

import contextlib
import datetime as dt
import os
from collections.abc import Mapping, Sequence
from dataclasses import replace
from pathlib import Path
from typing import Any

from homeplan.errors import InputError, PlanRuleError, Problem
from homeplan.plan.files import INCENTIVES, METER, WEATHER, FileKind
from homeplan.plan.load import LoadedPlan, load_plan
from homeplan.planner.chain import plan_roadmap
from homeplan.planner.context import PlannerCache
from homeplan.planner.diskstore import default_store
from homeplan.planner.sensitivity import sensitivity
from homeplan.result.plan_result import PlanResult

__all__ = ["input_files", "load_and_plan", "now_utc", "planner_cache", "refuse_outputs_over_inputs",
           "with_sensitivity"]


def load_and_plan(path: str, values: Mapping[tuple, Any] | None = None, allow: Sequence[str] = (),
                  outputs: Sequence[str] = (), force: bool = False,
                  use_store: bool = True) -> tuple[LoadedPlan, PlanResult]:
    """Load a plan file, set command-line ``values`` (paths of keys), plan it.

    ``allow``: files outside the plan's folder the user lets it name. ``outputs``: files the
    command will write; one that is a file the command reads is refused unless ``force``.
    Every problem - in the file, in a value, or a rule the plan breaks - is an InputError located
    in the file (exit code 2). ``use_store`` False (``--no-cache``) keeps nothing on disk.
    """
    loaded = load_plan(path, allow=allow).with_values(values or {})
    if not force:
        refuse_outputs_over_inputs(loaded, outputs)
    return loaded, plan_roadmap(loaded, cache=planner_cache(use_store))


def planner_cache(use_store: bool = True) -> PlannerCache:
    """A planner cache backed by the user's disk store (or by nothing with ``use_store`` False)."""
    return PlannerCache(store=default_store() if use_store else None)


def input_files(loaded: LoadedPlan) -> list[Path]:
    """The files a command reads for this plan: the plan and the files it names."""
    plan = loaded.plan
    named: list[tuple[str, tuple, FileKind]] = [
        (n, ("incentive_files", i), INCENTIVES) for i, n in enumerate(plan.incentive_files)]
    if plan.home.climate.weather_file:
        named.append((plan.home.climate.weather_file, ("home", "climate", "weather_file"), WEATHER))
    if plan.usage is not None and plan.usage.weather_file:
        named.append((plan.usage.weather_file, ("usage", "weather_file"), WEATHER))
    if plan.usage is not None and plan.usage.meter_file:
        named.append((plan.usage.meter_file, ("usage", "meter_file"), METER))
    out = [loaded.path]
    for name, loc, kind in named:
        with contextlib.suppress(PlanRuleError):  # refused when it is read
            out.append(loaded.folder.resolve(name, loc, kind))
    return out


def refuse_outputs_over_inputs(loaded: LoadedPlan, outputs: Sequence[str | os.PathLike]) -> None:
    """InputError when an output would replace a file the command reads (same file, whatever
    the name: a symbolic or hard link counts)."""
    inputs = [p for p in input_files(loaded) if p.exists()]
    for out in outputs:
        if out in ("-", None) or not Path(out).exists():
            continue
        for src in inputs:
            with contextlib.suppress(OSError):
                if os.path.samefile(out, src):
                    raise InputError(Problem(str(out), 0, 0, f"this is {src}, a file this command reads; "
                                             "it was not overwritten", "write to another file, or add "
                                             "--force to replace it"))


def with_sensitivity(loaded: LoadedPlan, result: PlanResult, use_store: bool = True) -> PlanResult:
    """The result with its sensitivity ranking (the home re-planned about twenty times);
    ``use_store`` False (``--no-cache``) keeps nothing on disk."""
    if result.roadmap.status != "ok":
        return result
    return replace(result, sensitivity=sensitivity(loaded, result, cache=planner_cache(use_store)))


def now_utc() -> dt.datetime:
    """The time printed on outputs: ``SOURCE_DATE_EPOCH`` when set (reproducible outputs), else
    the clock.

    References
    ----------
    Reproducible Builds, "SOURCE_DATE_EPOCH" specification, version 1.1.
    """
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    if epoch:
        try:
            return dt.datetime.fromtimestamp(int(epoch), dt.UTC)
        except (ValueError, OverflowError, OSError):
            raise InputError(f"SOURCE_DATE_EPOCH must be a whole number of seconds, not {epoch!r}") from None
    return dt.datetime.now(dt.UTC)
