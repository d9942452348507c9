"""Migrate plan files written in older formats to the current one.

Each step is a pure function from the plain data of format N to format N + 1, registered in
``STEPS``. A step may change the mapping it is given in place (the app migrates the round-trip
document itself this way, so comments and key order survive) and returns it.

- 1 -> 2: the objectives were renamed to one name each (``npv`` -> ``best_value``,
  ``emissions`` -> ``lowest_emissions``, ``gas_off_early`` -> ``home_fuel_off_soonest``,
  ``out_of_pocket`` -> ``least_out_of_pocket``).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from homeplan.plan.model import FORMAT_VERSION
from homeplan.plan.objectives import ALIASES

__all__ = ["STEPS", "Step", "upgrade", "upgrade_document"]

Step = Callable[[dict[str, Any]], dict[str, Any]]



def _objective_names(data: dict[str, Any]) -> dict[str, Any]:
    """Format 1 -> 2: one name per objective."""
    choices = data.get("choices")
    if isinstance(choices, dict) and isinstance(choices.get("objective"), str):
        old = choices["objective"]
        if old in ALIASES:
            choices["objective"] = ALIASES[old]
    return data


STEPS: dict[int, Step] = {1: _objective_names}
"""from_version -> function converting that version's data to from_version + 1."""


def upgrade(
    data: dict[str, Any], from_version: int, steps: dict[int, Step] | None = None,
    to_version: int = FORMAT_VERSION,
) -> dict[str, Any]:
    """Apply the migration steps from ``from_version`` up to ``to_version``.

    Raises KeyError naming the missing step when the chain is broken (a programming error,
    caught by the tests, never a user error).
    """
    steps = STEPS if steps is None else steps
    version = from_version
    while version < to_version:
        if version not in steps:
            raise KeyError(f"no migration from plan format {version} to {version + 1}")
        data = steps[version](dict(data))
        version += 1
    data["format_version"] = to_version
    return data


def upgrade_document(document: Any, from_version: int) -> None:
    """Migrate a round-trip document in place (comments and key order kept), so that saving it
    writes the current format."""
    version = from_version
    while version < FORMAT_VERSION:
        STEPS[version](document)
        version += 1
    if "format_version" in document:
        document["format_version"] = FORMAT_VERSION
    else:
        document.insert(0, "format_version", FORMAT_VERSION)
