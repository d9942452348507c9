"""Migrate plan files written in older formats to the current one.

Each step is a pure function from the plain data of format N to format N + 1, registered in
``STEPS``. Format 1 is the first published format, so the registry is empty today; the next
format change adds its step here and a test with a file of the old format.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from homeplan.plan.model import FORMAT_VERSION

__all__ = ["Step", "upgrade"]

Step = Callable[[dict[str, Any]], dict[str, Any]]

STEPS: dict[int, Step] = {}
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
