"""Save plan documents atomically, keeping the user's comments, key order and a backup.

The new text is written to a temporary file in the same directory, flushed and fsynced, then
renamed over the target (atomic on POSIX); the directory is fsynced so the rename survives a
power cut. The previous file is kept as ``NAME.bak``. A crash at any point leaves either the
old file or the new one, never half of either. A new file gets the permissions the user's umask
gives (or ``mode``, e.g. those of the plan it was saved from); an existing file keeps its own.

References
----------
POSIX.1-2017 rename(): "If the link named by the new argument exists, it shall be removed and
old renamed to new ... atomic"; open() with O_CREAT (the mode is modified by the umask); fsync(2).
"""

from __future__ import annotations

import contextlib
import io
import os
import secrets
import shutil
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


def _new_temp(directory: Path, name: str) -> tuple[int, Path]:
    """A new temporary file beside the target, created 0666 less the umask (as any new file)."""
    while True:
        tmp = directory / f".{name}.{secrets.token_hex(4)}.tmp"
        try:
            return os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666), tmp
        except FileExistsError:
            continue


def write_atomic(path: str | os.PathLike, text: str, backup: bool = True,
                 mode: int | None = None) -> Path:
    """Write ``text`` to ``path`` atomically; keep the previous file as ``path.bak``.

    A new file gets ``mode`` when given, else the umask's permissions; an existing file keeps
    its own.
    """
    target = Path(path)
    directory = target.parent if str(target.parent) else Path(".")
    if not directory.is_dir():
        raise InputError(Problem(str(target), 0, 0, "the folder does not exist", "create it first"))
    fd, tmp_name = _new_temp(directory, target.name)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as fh:
            if mode is not None and not target.exists():
                os.fchmod(fh.fileno(), mode)
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


def save_document(path: str | os.PathLike, document: Any, backup: bool = True,
                  mode: int | None = None) -> Path:
    """Write a round-trip document (see :func:`write_atomic`)."""
    return write_atomic(path, dump_text(document), backup=backup, mode=mode)


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
