"""What the commands share: one path from a plan file to its result, and the output date."""

from __future__ import annotations

import datetime as dt
import os
from collections.abc import Mapping
from dataclasses import replace
from typing import Any

from homeplan.errors import InputError
from homeplan.plan.load import LoadedPlan, load_plan
from homeplan.planner.chain import plan_roadmap
from homeplan.planner.context import PlannerCache
from homeplan.planner.diskstore import default_store
from homeplan.planner.sensitivity import sensitivity
from homeplan.result.plan_result import PlanResult

__all__ = ["load_and_plan", "now_utc", "planner_cache", "with_sensitivity"]


def load_and_plan(path: str, values: Mapping[tuple, Any] | None = None,
                  use_store: bool = True) -> tuple[LoadedPlan, PlanResult]:
    """Load a plan file, set command-line ``values`` (paths of keys), plan it.

    Every problem - in the file, in a value, or a rule the plan breaks - is an InputError located
    in the file (exit code 2). ``use_store`` False (``--no-cache``) keeps nothing on disk.
    """
    loaded = load_plan(path).with_values(values or {})
    return loaded, plan_roadmap(loaded, cache=planner_cache(use_store))


def planner_cache(use_store: bool = True) -> PlannerCache:
    """A planner cache backed by the user's disk store (or by nothing with ``use_store`` False)."""
    return PlannerCache(store=default_store() if use_store else None)


def with_sensitivity(loaded: LoadedPlan, result: PlanResult) -> PlanResult:
    """The result with its sensitivity ranking (the home re-planned about twenty times)."""
    if result.roadmap.status != "ok":
        return result
    return replace(result, sensitivity=sensitivity(loaded, result, cache=planner_cache()))


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
