"""Read YAML from an untrusted file: checked on the event stream first, then built with the line
and column of every key and value.

PyYAML's C parser (libyaml) gives the stream of events - scalars, aliases, the start and end of
each section and list - with their positions, fast and without recursion. :func:`check_events`
walks that stream once with a counter and a small stack, and stops at the first event that
breaks a limit, before any document is built:

- the depth of nesting (a file of 100,000 ``[`` is refused at the first one too many);
- the number of values, and how many of them aliases (``*name``) repeat (the "billion laughs"
  bomb is refused as soon as its expansion passes the limit);
- tags: only YAML's plain ones, so no object is ever constructed from the file;
- the length of one value, the digits of a number, one document per file;
- characters YAML does not allow in a stream (control characters), with their line and column;
- a time limit, checked while reading.

:func:`build` then turns the same text into plain Python values (dicts, lists, str, int, float,
bool, None, dates), non-recursively, resolving plain scalars as YAML 1.2's core schema does (the
round-trip library that saves plan files, ruamel.yaml, reads them the same way, dates included).
Each section and list it returns carries ``lc``, the 0-based line and column of every key, value
and item, for messages that say FILE:LINE:COL. Duplicate keys and keys that are sections or lists
are refused where they stand.

References
----------
YAML 1.2.2 (2021): sections 5.1 (the printable character set), 6.9 (tags), 7.1 (alias nodes),
10.3 (the core schema: null, bool, int, float); the YAML timestamp type (yaml.org/type/timestamp).
"Billion laughs" entity expansion: CWE-776.
"""

from __future__ import annotations

import datetime as dt
import re
import time
from dataclasses import dataclass
from typing import Any

from homeplan.errors import InputError, Problem
from homeplan.plan.text import clean

__all__ = [
    "INCENTIVE_LIMITS",
    "PLAN_LIMITS",
    "MarkedList",
    "MarkedMap",
    "Positions",
    "YamlLimits",
    "build",
    "check_events",
    "position",
    "read_yaml",
]


@dataclass(frozen=True)
class YamlLimits:
    """What one YAML file may hold."""

    max_depth: int = 32              # sections and lists inside each other
    max_values: int = 20_000         # every scalar, section and list, aliases expanded
    max_alias_values: int = 5_000    # of those, the ones aliases repeat
    max_scalar_chars: int = 65_536   # one value
    max_number_digits: int = 40      # a number (Python refuses ints of more than 4,300 digits)
    max_seconds: float = 2.0         # reading the events


PLAN_LIMITS = YamlLimits()
INCENTIVE_LIMITS = YamlLimits(max_values=50_000)

_PLAIN_TAGS = {f"tag:yaml.org,2002:{t}"
               for t in ("str", "int", "float", "bool", "null", "map", "seq", "timestamp")}
# YAML 1.2.2 section 5.1: c-printable (plus the byte-order mark, allowed anywhere) is x09, x0A,
# x0D, x20-x7E, x85, xA0-xD7FF, xE000-xFFFD and x10000-x10FFFF; these are the characters left.
# Written as the few ranges outside it: the negated class of the wide ranges takes about 7 ms to
# compile at import (PyYAML's reader compiles that class too, but only commands that read YAML
# import it; `schema` and `--help` do not)
_NOT_PRINTABLE = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x84\x86-\x9f\ud800-\udfff\ufffe\uffff]")


class Positions:
    """0-based (line, column) of a section's keys and values, or a list's items."""

    __slots__ = ("items", "keys", "start", "values")

    def __init__(self, start: tuple[int, int]):
        self.start = start
        self.keys: dict[Any, tuple[int, int]] = {}
        self.values: dict[Any, tuple[int, int]] = {}
        self.items: list[tuple[int, int]] = []

    def key(self, k: Any) -> tuple[int, int]:
        return self.keys.get(k, self.start)

    def value(self, k: Any) -> tuple[int, int]:
        return self.values.get(k, self.keys.get(k, self.start))

    def item(self, i: int) -> tuple[int, int]:
        return self.items[i] if 0 <= i < len(self.items) else self.start

    def __deepcopy__(self, memo: dict) -> Positions:  # positions never change: share them
        return self


class MarkedMap(dict):
    """A YAML section as a dict, with ``lc`` (its :class:`Positions`)."""

    lc: Positions


class MarkedList(list):
    """A YAML list, with ``lc`` (its :class:`Positions`)."""

    lc: Positions


def _yaml():
    import yaml  # PyYAML: its C parser when libyaml is there (it is in PyYAML's wheels)

    return yaml, getattr(yaml, "CSafeLoader", yaml.SafeLoader)


def _problem(name: str, mark: Any, message: str, hint: str = "") -> InputError:
    line, col = (mark.line + 1, mark.column + 1) if mark is not None else (0, 0)
    return InputError(Problem(name, line, col, message, hint))


def _syntax_error(name: str, exc: Exception) -> InputError:
    """A YAML error as a located problem; its words only, never the text of the file."""
    mark = getattr(exc, "problem_mark", None) or getattr(exc, "context_mark", None)
    words = getattr(exc, "problem", None) or getattr(exc, "reason", None) or type(exc).__name__
    position = getattr(exc, "position", None)
    if mark is None and position is not None:  # a reader error: a character YAML does not allow
        return InputError(Problem(name, 0, 0, f"YAML cannot read this file: {clean(words)[:80]}"))
    if "nesting depth" in str(words):  # libyaml's own limit, met while looking ahead
        return _problem(name, mark, "sections and lists nested too deep",
                        "a plan file needs a few levels; is this the right file?")
    return _problem(name, mark, f"YAML syntax error: {clean(words)[:80]}", "fix the YAML syntax at this place")


def _check_characters(text: str, name: str) -> None:
    m = _NOT_PRINTABLE.search(text)
    if m is None:
        return
    line = text.count("\n", 0, m.start()) + 1
    col = m.start() - (text.rfind("\n", 0, m.start()) + 1) + 1
    raise InputError(Problem(name, line, col, f"the character U+{ord(m.group()):04X} (a control character) "
                             "is not allowed in a YAML file", "remove it (inside double quotes it can be "
                             "written as an escape, e.g. \\x01)"))


def _full_tag(tag: str | None) -> str | None:
    if tag and tag.startswith("!!"):
        return f"tag:yaml.org,2002:{tag[2:]}"
    return tag


def check_events(text: str, name: str, limits: YamlLimits = PLAN_LIMITS) -> None:
    """Walk the YAML event stream once; raise InputError at the first event past a limit.

    Non-recursive: a counter for the depth and a stack of open sections (each with its anchor and
    the number of values it holds so far, to know what an alias to it would repeat).
    """
    _check_characters(text, name)
    yaml, loader = _yaml()
    ev = yaml.events
    deadline = time.monotonic() + limits.max_seconds
    sizes: dict[str, int] = {}           # anchor -> values it stands for
    stack: list[list[Any]] = []          # [anchor, values so far]
    total = repeated = documents = 0
    try:
        for n, event in enumerate(yaml.parse(text, Loader=loader)):
            if n % 1024 == 0 and time.monotonic() > deadline:
                raise _problem(name, event.start_mark, f"reading the file took more than "
                               f"{limits.max_seconds:g} s", "plan files are small; is this the right file?")
            if isinstance(event, ev.DocumentStartEvent):
                documents += 1
                if documents > 1:
                    raise _problem(name, event.start_mark, "a second YAML document ('---') in the file",
                                   "keep one document per file")
                continue
            if isinstance(event, ev.AliasEvent):
                if event.anchor not in sizes:
                    open_ = any(a == event.anchor for a, _ in stack)
                    raise _problem(name, event.start_mark,
                                   f"the alias *{clean(event.anchor)} refers to " +
                                   ("the section that holds it" if open_ else "no anchor before it"),
                                   "define &name before using *name, outside the section it names")
                size = sizes[event.anchor]
                total += size
                repeated += size
                if stack:
                    stack[-1][1] += size
                if repeated > limits.max_alias_values:
                    raise _problem(name, event.start_mark,
                                   f"aliases (*name) repeat more than {limits.max_alias_values:,} values",
                                   "write the values out, or use fewer aliases")
            elif isinstance(event, ev.ScalarEvent | ev.MappingStartEvent | ev.SequenceStartEvent):
                tag = _full_tag(event.tag)
                if tag and tag != "!" and tag not in _PLAIN_TAGS:
                    raise _problem(name, event.start_mark, f"the tag {clean(tag)[:60]} is not allowed",
                                   "plain values only; remove the tag")
                total += 1
                if isinstance(event, ev.ScalarEvent):
                    _check_scalar(event, name, limits)
                    if event.anchor:
                        sizes[event.anchor] = 1
                    if stack:
                        stack[-1][1] += 1
                else:
                    if len(stack) >= limits.max_depth:
                        raise _problem(name, event.start_mark,
                                       f"sections and lists nested more than {limits.max_depth} deep",
                                       "a plan file needs a few levels; is this the right file?")
                    stack.append([event.anchor, 1])
            elif isinstance(event, ev.MappingEndEvent | ev.SequenceEndEvent):
                anchor, count = stack.pop()
                if anchor:
                    sizes[anchor] = count
                if stack:
                    stack[-1][1] += count
            if total > limits.max_values:
                raise _problem(name, event.start_mark, f"the file holds more than {limits.max_values:,} "
                               "values", "a plan file holds a few hundred; is this the right file?")
    except yaml.YAMLError as exc:
        raise _syntax_error(name, exc) from None


def _check_scalar(event: Any, name: str, limits: YamlLimits) -> None:
    value = event.value
    if len(value) > limits.max_scalar_chars:
        raise _problem(name, event.start_mark, f"a value of {len(value):,} characters (at most "
                       f"{limits.max_scalar_chars:,})", "shorten it")
    if not event.style and len(value) > limits.max_number_digits and _INT.fullmatch(value):
        raise _problem(name, event.start_mark, f"a number of {len(value):,} digits",
                       f"write an ordinary number, of at most {limits.max_number_digits} digits")


# ------------------------------------------------------------------------------ building

_NULL = re.compile(r"~|null|Null|NULL|")
_BOOL = {"true": True, "True": True, "TRUE": True, "false": False, "False": False, "FALSE": False}
_INT = re.compile(r"[-+]?(?:0b[01_]+|0o[0-7_]+|0x[0-9a-fA-F_]+|[0-9][0-9_]*)")
_FLOAT = re.compile(r"[-+]?(?:[0-9][0-9_]*\.[0-9_]*(?:[eE][-+]?[0-9]+)?|[0-9][0-9_]*[eE][-+]?[0-9]+"
                    r"|\.[0-9_]+(?:[eE][-+]?[0-9]+)?)")
_SPECIAL_FLOAT = {".inf": float("inf"), ".Inf": float("inf"), ".INF": float("inf"),
                  ".nan": float("nan"), ".NaN": float("nan"), ".NAN": float("nan")}
_DATE = re.compile(r"([0-9]{4})-([0-9]{2})-([0-9]{2})")
_DATETIME = re.compile(r"([0-9]{4})-([0-9]{1,2})-([0-9]{1,2})(?:[Tt]|[ \t]+)([0-9]{1,2}):([0-9]{2}):([0-9]{2})"
                       r"(?:\.([0-9]*))?(?:[ \t]*(Z|[-+][0-9]{1,2}(?::?[0-9]{2})?))?")


class _Bad(Exception):
    def __init__(self, message: str, hint: str):
        super().__init__(message)
        self.message, self.hint = message, hint


def _int(text: str) -> int:
    t = text.replace("_", "")
    sign = -1 if t.startswith("-") else 1
    t = t.lstrip("+-")
    for prefix, base in (("0b", 2), ("0o", 8), ("0x", 16)):
        if t.startswith(prefix):
            return sign * int(t[2:], base)
    return sign * int(t)


def _timestamp(m: re.Match) -> dt.datetime:
    year, month, day, hour, minute, second = (int(g) for g in m.groups()[:6])
    fraction = (m.group(7) or "")[:6].ljust(6, "0")
    tz = None
    if m.group(8):
        if m.group(8) == "Z":
            tz = dt.UTC
        else:
            sign = -1 if m.group(8)[0] == "-" else 1
            hh, _, mm = m.group(8)[1:].partition(":")
            if not mm and len(hh) > 2:
                hh, mm = hh[:-2], hh[-2:]
            tz = dt.timezone(sign * dt.timedelta(hours=int(hh), minutes=int(mm or 0)))
    return dt.datetime(year, month, day, hour, minute, second, int(fraction), tzinfo=tz)


def _resolve_plain(text: str) -> Any:
    """A plain (unquoted) scalar as YAML 1.2's core schema reads it, plus dates and times."""
    if _NULL.fullmatch(text):
        return None
    if text in _BOOL:
        return _BOOL[text]
    if _INT.fullmatch(text):
        return _int(text)
    if _FLOAT.fullmatch(text):
        return float(text.replace("_", ""))
    if text.lstrip("+-") in _SPECIAL_FLOAT:
        value = _SPECIAL_FLOAT[text.lstrip("+-")]
        return -value if text.startswith("-") else value
    m = _DATE.fullmatch(text)
    if m:
        try:
            return dt.date(*(int(g) for g in m.groups()))
        except ValueError:
            raise _Bad(f"{text} is not a valid date (no such day in the calendar)", "write a real date, YYYY-MM-DD") from None
    m = _DATETIME.fullmatch(text)
    if m:
        try:
            return _timestamp(m)
        except ValueError:
            raise _Bad(f"{text} is not a valid date and time",
                       "write YYYY-MM-DD HH:MM:SS") from None
    return text


def _tagged(tag: str, text: str) -> Any:
    """A scalar with an explicit plain tag (``!!int 12``)."""
    kind = tag.rsplit(":", 1)[-1]
    if kind == "str":
        return text
    value = _resolve_plain(text)
    wanted = {"int": int, "float": float, "bool": bool, "null": type(None),
              "timestamp": (dt.date, dt.datetime)}[kind]
    if kind == "float" and isinstance(value, int) and not isinstance(value, bool):
        value = float(value)
    if not isinstance(value, wanted) or (kind == "int" and isinstance(value, bool)):
        raise _Bad(f"'{clean(text)[:40]}' is not a {kind}", f"write a {kind} or remove the tag !!{kind}")
    return value


def _scalar(event: Any) -> Any:
    tag = _full_tag(event.tag)
    if tag == "!":  # the non-specific tag: a string (YAML 1.2.2 section 6.9.1)
        return event.value
    if tag:
        return _tagged(tag, event.value)
    if not event.style and (not event.implicit or event.implicit[0]):  # plain ("" or None)
        return _resolve_plain(event.value)
    return event.value


_MISSING = object()


def build(text: str, name: str) -> Any:
    """The document of ``text`` as plain values with positions (call :func:`check_events` first).

    Raises InputError for a value that cannot be read (a date not in the calendar), a duplicate
    key, or a key that is a section or a list - each at its line and column.
    """
    yaml, loader = _yaml()
    ev = yaml.events
    anchors: dict[str, Any] = {}
    stack: list[list[Any]] = []   # [container, anchor, pending key, its position]
    root: Any = None

    def add(value: Any, mark: Any) -> None:
        nonlocal root
        pos = (mark.line, mark.column)
        if not stack:
            root = value
            return
        frame = stack[-1]
        container = frame[0]
        if isinstance(container, list):
            container.append(value)
            container.lc.items.append(pos)
        elif frame[2] is _MISSING:
            if isinstance(value, dict | list):
                raise _problem(name, mark, "a key that is a section or a list",
                               "keys are plain words such as 'home' or 'budget'")
            if value in container:
                raise _problem(name, mark, f"duplicate key: '{clean(value)[:60]}' is given twice in this "
                               "section", "keep one of the two")
            frame[2], frame[3] = value, pos
        else:
            key = frame[2]
            container[key] = value
            container.lc.keys[key] = frame[3]
            container.lc.values[key] = pos
            frame[2] = _MISSING

    try:
        for event in yaml.parse(text, Loader=loader):
            if isinstance(event, ev.ScalarEvent):
                try:
                    value = _scalar(event)
                except _Bad as bad:
                    raise _problem(name, event.start_mark, bad.message, bad.hint) from None
                if event.anchor:
                    anchors[event.anchor] = value
                add(value, event.start_mark)
            elif isinstance(event, ev.AliasEvent):
                if event.anchor not in anchors:
                    raise _problem(name, event.start_mark, f"the alias *{clean(event.anchor)} refers to "
                                   "no anchor before it", "define &name before using *name")
                add(anchors[event.anchor], event.start_mark)
            elif isinstance(event, ev.MappingStartEvent | ev.SequenceStartEvent):
                container: Any = MarkedMap() if isinstance(event, ev.MappingStartEvent) else MarkedList()
                container.lc = Positions((event.start_mark.line, event.start_mark.column))
                stack.append([container, event.anchor, _MISSING, None, event.start_mark])
            elif isinstance(event, ev.MappingEndEvent | ev.SequenceEndEvent):
                container, anchor, _, _, mark = stack.pop()
                if anchor:
                    anchors[anchor] = container
                add(container, mark)
    except yaml.YAMLError as exc:
        raise _syntax_error(name, exc) from None
    return root


def read_yaml(text: str, name: str, limits: YamlLimits = PLAN_LIMITS) -> Any:
    """Check then build: the document of an untrusted YAML text, with positions."""
    check_events(text, name, limits)
    return build(text, name)


def position(doc: Any, loc: tuple) -> tuple[int, int]:
    """1-based line and column of the value at a path of keys and indices in a built document
    (as far down the path as it exists; (1, 1) for the top)."""
    line, col = 1, 1
    node = doc
    for part in loc:
        lc = getattr(node, "lc", None)
        if isinstance(node, dict) and part in node:
            if lc is not None:
                line, col = (v + 1 for v in lc.value(part))
            node = node[part]
        elif isinstance(node, list) and isinstance(part, int) and 0 <= part < len(node):
            if lc is not None:
                line, col = (v + 1 for v in lc.item(part))
            node = node[part]
        else:
            break
    return line, col
