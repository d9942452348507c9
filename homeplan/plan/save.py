"""Save plan documents atomically, keeping the user's comments, key order and a backup.

The new text is written to a temporary file in the same directory, flushed and fsynced, then
renamed over the target (atomic on POSIX); the directory is fsynced so the rename survives a
power cut. The previous file is kept as ``NAME.bak``. A crash at any point leaves either the
old file or the new one, never half of either.

References
----------
POSIX.1-2017 rename(): "If the link named by the new argument exists, it shall be removed and
old renamed to new ... atomic"; fsync(2).
"""

from __future__ import annotations

import contextlib
import io
import os
import shutil
import tempfile
from pathlib import Path
from typing import Any

from homeplan.errors import InputError, Problem

__all__ = ["delete_in", "dump_text", "save_document", "set_in", "write_atomic"]


def dump_text(document: Any) -> str:
    """Serialise a round-trip document (comments and order kept)."""
    from ruamel.yaml import YAML

    y = YAML(typ="rt")
    y.preserve_quotes = True
    y.indent(mapping=2, sequence=4, offset=2)
    y.width = 4096  # never re-wrap the user's lines
    buf = io.StringIO()
    y.dump(document, buf)
    return buf.getvalue()


def write_atomic(path: str | os.PathLike, text: str, backup: bool = True) -> Path:
    """Write ``text`` to ``path`` atomically; keep the previous file as ``path.bak``."""
    target = Path(path)
    directory = target.parent if str(target.parent) else Path(".")
    if not directory.is_dir():
        raise InputError(Problem(str(target), 0, 0, "the folder does not exist", "create it first"))
    fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=directory)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
            fh.flush()
            os.fsync(fh.fileno())
        if target.exists():
            if backup:
                shutil.copy2(target, target.with_name(target.name + ".bak"))
            shutil.copymode(target, tmp_name)
        os.replace(tmp_name, target)
        _fsync_dir(directory)
    except BaseException:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(tmp_name)
        raise
    return target


def _fsync_dir(directory: Path) -> None:
    try:
        fd = os.open(directory, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def save_document(path: str | os.PathLike, document: Any, backup: bool = True) -> Path:
    return write_atomic(path, dump_text(document), backup=backup)


def set_in(document: Any, loc: tuple, value: Any) -> None:
    """Set a value at a path of keys/indices, creating sections as needed (order kept)."""
    from ruamel.yaml.comments import CommentedMap

    node = document
    for part in loc[:-1]:
        if isinstance(node, list):
            node = node[part]
            continue
        if part not in node or node[part] is None:
            node[part] = CommentedMap()
        node = node[part]
    last = loc[-1]
    if isinstance(node, list):
        node[last] = value
    else:
        node[last] = value


def delete_in(document: Any, loc: tuple) -> None:
    node = document
    for part in loc[:-1]:
        node = node[part]
    if isinstance(node, list) or loc[-1] in node:
        del node[loc[-1]]
