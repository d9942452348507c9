"""Keep the files a plan names reachable when the plan is saved in another folder.

A plan names incentive files and a weather file by paths relative to its own folder. Saved as a
new file somewhere else, those paths would point at nothing; :func:`rebase_paths` rewrites each
relative path so that it names the same file from the new folder (absolute paths stay as they
are). The document is changed in place, comments and key order kept.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path
from typing import Any

__all__ = ["PATH_KEYS", "Rebased", "rebase_paths"]

PATH_KEYS: tuple[tuple[str, ...], ...] = (("incentive_files",), ("home", "climate", "weather_file"))
"""Where a plan names files: a list of paths or a single path."""


@dataclass(frozen=True)
class Rebased:
    """One path rewritten: where in the plan, what it was and what it is now."""

    key: str
    before: str
    after: str


def _rebase(value: str, old_dir: Path, new_dir: Path) -> str:
    if not value or Path(value).is_absolute():
        return value
    target = os.path.normpath(os.path.join(os.path.abspath(old_dir), value))
    return Path(os.path.relpath(target, os.path.abspath(new_dir))).as_posix()


def rebase_paths(document: Any, old_dir: str | os.PathLike, new_dir: str | os.PathLike) -> list[Rebased]:
    """Rewrite the plan's relative file paths from ``old_dir`` to ``new_dir`` (in place).

    Returns the paths that changed (none when both folders are the same).
    """
    old, new = Path(old_dir), Path(new_dir)
    if os.path.abspath(old) == os.path.abspath(new) or not isinstance(document, dict):
        return []
    done: list[Rebased] = []
    for keys in PATH_KEYS:
        parent: Any = document
        for k in keys[:-1]:
            parent = parent.get(k) if isinstance(parent, dict) else None
        if not isinstance(parent, dict) or keys[-1] not in parent:
            continue
        value = parent[keys[-1]]
        name = ".".join(keys)
        if isinstance(value, str):
            after = _rebase(value, old, new)
            if after != value:
                parent[keys[-1]] = after
                done.append(Rebased(name, value, after))
        elif isinstance(value, list):
            for i, item in enumerate(value):
                if isinstance(item, str):
                    after = _rebase(item, old, new)
                    if after != item:
                        value[i] = after
                        done.append(Rebased(name, item, after))
    return done
