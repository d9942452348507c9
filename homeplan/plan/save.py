"""Save plan documents atomically, keeping the user's comments, key order, links and a backup.

Writing a file (the plan, or an output such as a printout):

- the new text goes to a temporary file beside the real file, is flushed and fsynced, then
  renamed over it (atomic on POSIX); the folder is fsynced so the rename survives a power cut;
- a symbolic link stays a link: the file it points to is replaced, beside itself;
- a file with hard links is rewritten in place (every name keeps the same file), after the
  backup is complete;
- the previous version is kept as ``NAME.bak``, itself written to a temporary file and renamed,
  so a crash leaves the old backup or the new one, never an empty or partial one;
- temporary files are named ``.NAME.<pid>.<random>.homeplan.tmp``; one whose process is gone
  (a save that was killed) is removed by the next save of the same file;
- a new file gets the permissions the user's umask gives (the kernel applies it); an existing
  file keeps its permissions;
- a read-only file is not written unless the caller says so (:class:`ReadOnlyFileError`).

References
----------
POSIX.1-2017 rename(): "If the link named by the new argument exists, it shall be removed and
old renamed to new ... atomic"; open() with O_CREAT (mode modified by the umask); fsync(2).
"""

from __future__ import annotations

import contextlib
import errno
import hashlib
import io
import os
import re
import secrets
import stat
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from homeplan.errors import InputError, Problem

__all__ = [
    "ChangedOnDiskError",
    "DiskStamp",
    "ReadOnlyFileError",
    "delete_in",
    "disk_stamp",
    "dump_text",
    "save_document",
    "set_in",
    "stale_temp_files",
    "write_atomic",
]

TEMP_SUFFIX = ".homeplan.tmp"
_USER_ERRORS = {errno.EACCES, errno.EPERM, errno.EROFS, errno.ENOENT, errno.ENOTDIR, errno.EISDIR,
                errno.ENAMETOOLONG, errno.ELOOP}


class ReadOnlyFileError(InputError):
    """The file to write is read-only; the caller asks the user before writing it anyway."""


class ChangedOnDiskError(InputError):
    """The file changed on disk since it was read (another program edited it)."""


@dataclass(frozen=True)
class DiskStamp:
    """What a file was when it was read or written: time, size and content hash."""

    mtime_ns: int
    size: int
    sha256: str


def disk_stamp(path: str | os.PathLike) -> DiskStamp | None:
    """The stamp of a file now (None when there is no such regular file)."""
    try:
        with open(path, "rb") as fh:
            st = os.fstat(fh.fileno())
            if not stat.S_ISREG(st.st_mode):
                return None
            digest = hashlib.sha256(fh.read()).hexdigest()
    except OSError:
        return None
    return DiskStamp(st.st_mtime_ns, st.st_size, digest)


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


def _refused(path: Path, exc: OSError) -> Exception:
    """An OSError as the user's problem (a path they can change) or as it is (a full disk)."""
    if exc.errno in _USER_ERRORS:
        return InputError(Problem(str(path), 0, 0, f"cannot write here: {exc.strerror or exc}",
                                  "choose a file in a folder you can write to"))
    return exc


def _pid_alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    return True


def stale_temp_files(target: str | os.PathLike) -> list[Path]:
    """homeplan's own temporary files for ``target`` (and its backup) whose process is gone."""
    real = Path(target)
    pattern = re.compile(rf"\.{re.escape(real.name)}(?:\.bak)?\.(\d+)\.[0-9a-f]+{re.escape(TEMP_SUFFIX)}")
    out = []
    try:
        names = os.listdir(real.parent if str(real.parent) else ".")
    except OSError:
        return []
    for name in names:
        m = pattern.fullmatch(name)
        if m and (int(m.group(1)) != os.getpid()) and not _pid_alive(int(m.group(1))):
            out.append(real.with_name(name))
    return out


def _temp_for(real: Path) -> tuple[Path, int]:
    """A new temporary file beside ``real`` (mode 0666 less the umask), open for writing."""
    tmp = real.with_name(f".{real.name}.{os.getpid()}.{secrets.token_hex(4)}{TEMP_SUFFIX}")
    fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_CLOEXEC", 0), 0o666)
    return tmp, fd


def _write_all(fd: int, data: bytes) -> None:
    view = memoryview(data)
    while view:
        n = os.write(fd, view)
        view = view[n:]


def _replace_with(real: Path, data: bytes, like: os.stat_result | None, mode: int | None = None) -> None:
    """Write ``data`` to a temporary file beside ``real`` and rename it over ``real``: with the
    permissions (and owner, when allowed) of ``like``, else ``mode``, else the umask's."""
    tmp, fd = _temp_for(real)
    try:
        try:
            if like is not None:
                os.fchmod(fd, stat.S_IMODE(like.st_mode))
                with contextlib.suppress(OSError):  # keep the owner when allowed (root)
                    os.fchown(fd, like.st_uid, like.st_gid)
            elif mode is not None:
                os.fchmod(fd, stat.S_IMODE(mode))
            _write_all(fd, data)
            os.fsync(fd)
        finally:
            os.close(fd)
        os.replace(tmp, real)
    except BaseException:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(tmp)
        raise


def write_atomic(path: str | os.PathLike, text: str, backup: bool = True, *,
                 replace_readonly: bool = False, mode: int | None = None) -> Path:
    """Write ``text`` to ``path`` atomically; keep the previous file as ``path.bak``.

    Parameters
    ----------
    path : path
        The file; a symbolic link is followed (the link stays), a device such as
        ``/dev/stdout`` is written to as it is.
    text : str
        The new content (UTF-8, LF line ends).
    backup : bool
        Keep the previous version as ``NAME.bak`` (beside the real file).
    replace_readonly : bool
        Write even if the file is read-only (the user said so).
    mode : int or None
        Permissions of a new file (e.g. those of the plan it was saved from); None gives the
        umask's. An existing file keeps its own.

    Returns
    -------
    pathlib.Path
        ``path`` as given.

    Raises
    ------
    ReadOnlyFileError
        The file is read-only and ``replace_readonly`` is false.
    InputError
        The folder does not exist or cannot be written (permission, read-only file system).
    OSError
        The system failed otherwise (a full disk): the old file is untouched.
    """
    target = Path(path)
    real = Path(os.path.realpath(target))
    data = text.encode("utf-8")
    if not real.parent.is_dir():
        raise InputError(Problem(str(target), 0, 0, "the folder does not exist", "create it first"))
    try:
        st: os.stat_result | None = os.stat(real)
    except FileNotFoundError:
        st = None
    except OSError as exc:
        raise _refused(target, exc) from None
    if st is not None and stat.S_ISDIR(st.st_mode):
        raise InputError(Problem(str(target), 0, 0, "is a folder", "give a file name"))
    if st is not None and not stat.S_ISREG(st.st_mode):  # /dev/stdout, a FIFO: write as is
        try:
            with open(real, "wb") as fh:
                fh.write(data)
        except OSError as exc:
            raise _refused(target, exc) from None
        return target
    if st is not None and not replace_readonly and (not st.st_mode & 0o222 or not os.access(real, os.W_OK)):
        raise ReadOnlyFileError(Problem(str(target), 0, 0, "the file is read-only; it was not changed",
                                        "make it writable, or write to another file"))
    for stale in stale_temp_files(real):
        with contextlib.suppress(OSError):
            os.unlink(stale)
    try:
        if st is not None and backup:
            with open(real, "rb") as fh:
                old = fh.read()
            bak = real.with_name(real.name + ".bak")
            _replace_with(bak, old, st)
        if st is not None and st.st_nlink > 1:  # hard links: the same file under every name
            _rewrite_in_place(real, data)
        else:
            _replace_with(real, data, st, mode)
        _fsync_dir(real.parent)
    except OSError as exc:
        raise _refused(target, exc) from None
    return target


def _rewrite_in_place(real: Path, data: bytes) -> None:
    """New content in the same file (its hard links see it): written whole, then cut to size.

    A temporary copy is written first, so a full disk fails before the file is touched.
    """
    tmp, fd = _temp_for(real)
    try:
        try:
            _write_all(fd, data)
            os.fsync(fd)
        finally:
            os.close(fd)
        fd = os.open(real, os.O_WRONLY | getattr(os, "O_CLOEXEC", 0))
        try:
            done = 0
            while done < len(data):
                done += os.pwrite(fd, data[done:], done)
            os.ftruncate(fd, len(data))
            os.fsync(fd)
        finally:
            os.close(fd)
    finally:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(tmp)


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


def save_document(path: str | os.PathLike, document: Any, backup: bool = True, *,
                  replace_readonly: bool = False, mode: int | None = None) -> Path:
    """Write a round-trip document (see :func:`write_atomic`)."""
    return write_atomic(path, dump_text(document), backup=backup, replace_readonly=replace_readonly,
                        mode=mode)


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
    """Remove the key or list item at a path, keeping the user's comments where they belong.

    In the round-trip document a comment above a key is stored with whatever comes before it:
    the previous key, or the last value nested inside it. Removing an item naively would take
    the comment above the *next* key along with it. Here the comment lines that followed the
    removed item move to the item before it (or, for the first item, above the next one; for
    the only item, after its section), and the comment above the removed item goes with it.
    """
    chain: list[tuple[Any, Any]] = []  # (container, key) from the top down to the item
    node = document
    for part in loc:
        chain.append((node, part))
        node = node[part]
    container, key = chain[-1]
    if isinstance(container, dict) and key not in container:
        return
    following = _split_tail(*_tail_of(container, key))[1]
    keys = list(container.keys()) if isinstance(container, dict) else list(range(len(container)))
    at = keys.index(key)
    before = keys[at - 1] if at > 0 else None
    after = keys[at + 1] if at + 1 < len(keys) else None
    if before is not None:  # the comment above the removed item goes with it
        holder = _tail_of(container, before)
        eol, above = _split_tail(*holder)
        if above:
            _set_tail(*holder, eol, "" if after is not None else following)
            if after is None:
                following = ""
    del container[key]
    if not following.strip():
        return
    if after is not None:
        _set_before(container, after if isinstance(container, dict) else at, following)
    elif before is not None:
        _set_tail(*_tail_of(container, before), _split_tail(*_tail_of(container, before))[0], following)
    elif len(chain) > 1:  # the section is empty now: the lines go after the section itself
        parent, pkey = chain[-2]
        eol, rest = _split_tail(parent, pkey)
        _set_tail(parent, pkey, eol, following + rest)


def _slot(container: Any) -> int:
    return 2 if isinstance(container, dict) else 0  # ruamel: maps keep it in 2, lists in 0


def _tail_of(container: Any, key: Any) -> tuple[Any, Any]:
    """Where the comment lines after an item are stored: its deepest last block value."""
    while True:
        value = container[key]
        if isinstance(value, dict | list) and len(value) and hasattr(value, "fa") \
                and not value.fa.flow_style():
            container, key = value, (list(value.keys())[-1] if isinstance(value, dict) else len(value) - 1)
        else:
            return container, key


def _split_tail(container: Any, key: Any) -> tuple[str, str]:
    """(the end-of-line comment of an item, the comment lines that follow it)."""
    ca = getattr(container, "ca", None)
    items = ca.items.get(key) if ca is not None else None
    token = items[_slot(container)] if items else None
    if token is None:
        return "", ""
    text = token.value
    if text.startswith("#"):
        eol, _, rest = text.partition("\n")
        return eol, rest
    return "", text.removeprefix("\n")


def _set_tail(container: Any, key: Any, eol: str, following: str) -> None:
    from ruamel.yaml.error import CommentMark
    from ruamel.yaml.tokens import CommentToken

    if not hasattr(container, "ca"):
        return
    items = container.ca.items.setdefault(key, [None, None, None, None])
    old = items[_slot(container)]
    if not eol and not following:
        items[_slot(container)] = None
        return
    mark = old.start_mark if old is not None else CommentMark(0)
    items[_slot(container)] = CommentToken(eol + "\n" + following, mark)


def _set_before(container: Any, key: Any, following: str) -> None:
    """Put comment lines above an item (the first one of its section)."""
    from ruamel.yaml.error import CommentMark
    from ruamel.yaml.tokens import CommentToken

    if not hasattr(container, "ca"):
        return
    items = container.ca.items.setdefault(key, [None, None, None, None])
    lines = following.rstrip("\n").split("\n")
    tokens = [CommentToken(line.lstrip(" ") + "\n", CommentMark(len(line) - len(line.lstrip(" "))))
              for line in lines]
    items[1] = tokens + list(items[1] or [])
