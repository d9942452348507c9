"""The one safe way to read a file homeplan is given or a plan names.

A plan file comes from someone else, and so do the incentive and weather files it names. Each is
read the same way:

- only a regular file: a directory, a device (``/dev/zero``), a FIFO (which would block
  forever) or a socket is refused before it is opened, and again on the open file (the check
  and the read are on the same file even if the path is swapped meanwhile);
- a size cap per kind of file, checked on the open file and while reading (a file that grows
  past it is refused too);
- UTF-8 only, with the line and column of the first byte that is not;
- files a plan names are resolved relative to the plan's folder; a path that leads outside it
  (``../``, an absolute path, a symbolic link) is refused before anything is looked up, unless the
  user named that path themselves (``--allow-outside PATH`` or the app's prompt), so a shared plan
  cannot read other files on the machine, nor learn whether they exist.

References
----------
POSIX.1-2017 open() (O_NONBLOCK on a FIFO: the open returns at once), fstat() and S_ISREG;
RFC 3629 (UTF-8).
"""

from __future__ import annotations

import os
import stat
from collections.abc import Iterable
from dataclasses import dataclass, field
from pathlib import Path

from homeplan.errors import InputError, PlanRuleError, Problem

__all__ = [
    "INCENTIVES",
    "METER",
    "KINDS",
    "PLAN",
    "WEATHER",
    "FileKind",
    "OutsideFolderError",
    "PlanFolder",
    "as_folder",
    "decode_utf8",
    "read_bytes",
    "read_text",
]


@dataclass(frozen=True)
class FileKind:
    """A kind of file homeplan reads, with its size cap."""

    name: str
    label: str          # "plan file", used in messages
    max_bytes: int
    hint: str           # how to fix the wrong file

    @property
    def a_label(self) -> str:
        """The label with its article: "a plan file", "an incentive file"."""
        return ("an " if self.label[0] in "aeiou" else "a ") + self.label


PLAN = FileKind("plan", "plan file", 1024 * 1024, "is this the right file? A plan file is a few kilobytes of YAML")
INCENTIVES = FileKind("incentives", "incentive file", 1024 * 1024,
                      "an incentive file is a YAML list of programs; see docs/plan-format.md#incentives")
WEATHER = FileKind("weather", "weather file", 8 * 1024 * 1024,
                   "use an EPW (.epw), TMY3 (.csv) or TMY2 (.tm2) file of one typical year")
METER = FileKind("meter", "meter file", 64 * 1024 * 1024,
                 "use a Green Button file (XML or CSV) of interval readings from the utility")
KINDS = {k.name: k for k in (PLAN, INCENTIVES, WEATHER, METER)}

_NOT_REGULAR = (
    (stat.S_ISDIR, "is a folder"),
    (stat.S_ISFIFO, "is a named pipe (FIFO)"),
    (stat.S_ISCHR, "is a device"),
    (stat.S_ISBLK, "is a device"),
    (stat.S_ISSOCK, "is a socket"),
)
_FLAGS = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0) | getattr(os, "O_CLOEXEC", 0)


def _what(mode: int) -> str | None:
    """Why a file of this mode is not a regular file, or None when it is one."""
    if stat.S_ISREG(mode):
        return None
    return next((words for test, words in _NOT_REGULAR if test(mode)), "is not a regular file")


def read_bytes(path: str | os.PathLike, kind: FileKind, name: str | None = None) -> bytes:
    """The bytes of a regular file of at most ``kind.max_bytes``, or InputError saying why not.

    Parameters
    ----------
    path : path
        The file.
    kind : FileKind
        What the file should be (its cap and the words of the messages).
    name : str, optional
        How to name the file in messages (default: the path).
    """
    where = name or str(path)

    def refuse(message: str, hint: str = "") -> InputError:
        return InputError(Problem(where, 0, 0, message, hint))

    try:
        st = os.stat(path)
    except FileNotFoundError:
        raise refuse("file not found", "check the path") from None
    except OSError as exc:
        raise refuse(f"cannot read: {exc.strerror or exc}") from None
    why = _what(st.st_mode)
    if why:
        raise refuse(f"{why}, not {kind.a_label}", kind.hint)
    try:
        fd = os.open(path, _FLAGS)
    except OSError as exc:
        raise refuse(f"cannot read: {exc.strerror or exc}") from None
    try:
        st = os.fstat(fd)
        why = _what(st.st_mode)
        if why:  # swapped for something else since the check above
            raise refuse(f"{why}, not {kind.a_label}", kind.hint)
        if st.st_size > kind.max_bytes:
            raise refuse(f"the file is {st.st_size:,} bytes; {kind.a_label} may be at most "
                         f"{kind.max_bytes:,}", kind.hint)
        chunks: list[bytes] = []
        total = 0
        while True:
            chunk = os.read(fd, min(1 << 20, kind.max_bytes + 1 - total))
            if not chunk:
                break
            chunks.append(chunk)
            total += len(chunk)
            if total > kind.max_bytes:
                raise refuse(f"the file is more than {kind.max_bytes:,} bytes; that is more than "
                             f"{kind.a_label} may be", kind.hint)
    except OSError as exc:
        raise refuse(f"cannot read: {exc.strerror or exc}") from None
    finally:
        os.close(fd)
    return b"".join(chunks)


def decode_utf8(data: bytes, where: str, kind: FileKind) -> str:
    """UTF-8 text (a leading byte-order mark dropped), or InputError at the first bad byte."""
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        before = data[: exc.start]
        line = before.count(b"\n") + 1
        col = exc.start - (before.rfind(b"\n") + 1) + 1
        raise InputError(Problem(where, line, col, f"not UTF-8 text (byte 0x{data[exc.start]:02x}); "
                                 f"{kind.a_label} is UTF-8 text", "save the file as UTF-8")) from None
    return text.removeprefix("\ufeff")


def read_text(path: str | os.PathLike, kind: FileKind, name: str | None = None) -> str:
    """A regular file's UTF-8 text within the cap of its kind (see :func:`read_bytes`)."""
    where = name or str(path)
    return decode_utf8(read_bytes(path, kind, where), where, kind)


class OutsideFolderError(PlanRuleError):
    """A file the plan names lies outside the plan's folder and the user has not allowed it."""

    def __init__(self, loc: tuple, name: str, real: Path, kind: FileKind):
        self.real = real
        super().__init__(
            loc, f"the {kind.label} {name} is outside the plan's folder; homeplan reads files "
            "outside it only when you allow it",
            f"copy it next to the plan, or allow it: --allow-outside {real}")


@dataclass(frozen=True)
class PlanFolder:
    """The folder a plan's file paths are relative to, and the outside paths the user allowed.

    ``folder`` None means the current folder (a plan given without its file).
    """

    folder: Path | None = None
    allowed: frozenset[Path] = field(default_factory=frozenset)

    @classmethod
    def of(cls, folder: str | os.PathLike | None, allow: Iterable[str | os.PathLike] = ()) -> PlanFolder:
        """A PlanFolder; ``allow`` are paths (relative to the current folder) the user allowed."""
        return cls(Path(folder) if folder is not None else None,
                   frozenset(Path(os.path.realpath(p)) for p in allow))

    def allowing(self, path: str | os.PathLike) -> PlanFolder:
        """This folder with one more outside path allowed."""
        return PlanFolder(self.folder, self.allowed | {Path(os.path.realpath(path))})

    def resolve(self, name: str, loc: tuple, kind: FileKind) -> Path:
        """The path of a file the plan names at ``loc``; OutsideFolderError when not allowed.

        Nothing is looked up before the check but the plan's own folder and the symbolic links
        on the way, so the answer never depends on whether an outside file exists.
        """
        base = self.folder if self.folder is not None and str(self.folder) else Path(".")
        path = Path(name)
        full = path if path.is_absolute() else base / path
        real = Path(os.path.realpath(full))
        root = Path(os.path.realpath(base))
        if not real.is_relative_to(root) and real not in self.allowed:
            raise OutsideFolderError(loc, name, real, kind)
        return full

    def read(self, name: str, loc: tuple, kind: FileKind) -> tuple[Path, bytes]:
        """Resolve and read a named file; problems are PlanRuleErrors at ``loc`` in the plan."""
        path = self.resolve(name, loc, kind)
        try:
            return path, read_bytes(path, kind, name)
        except InputError as err:
            p = err.problems[0]
            raise PlanRuleError(loc, f"{kind.label} {name}: {p.message}", p.hint) from None


def as_folder(where: PlanFolder | str | os.PathLike | None) -> PlanFolder:
    """A PlanFolder from a folder path (nothing outside it allowed), or the one given."""
    return where if isinstance(where, PlanFolder) else PlanFolder.of(where)
