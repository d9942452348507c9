"""Registration of the commands that use the engines (capacity, costs, plan, print, ...)."""

from __future__ import annotations


def register(command) -> None:
    """Add engine commands to the CLI; each imports its engine inside its function."""
