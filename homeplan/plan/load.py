"""Load a plan file safely and report every problem at once with its line and column.

Plan files travel between installers and homeowners, so they are treated as untrusted:
a size limit, strict UTF-8, only the plain YAML tags (no object construction), a limit on
alias expansion (the "billion laughs" bomb), duplicate keys refused, and a format version
that is migrated when older and refused when newer.
"""

from __future__ import annotations

import copy
import difflib
import os
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from homeplan.errors import InputError, PlanRuleError, Problem
from homeplan.plan import migrate
from homeplan.plan.checks import rule_problems
from homeplan.plan.model import FORMAT_VERSION, Plan
from homeplan.plan.save import set_in
from homeplan.units import SI_KEYS

__all__ = [
    "MAX_FILE_BYTES",
    "LoadedPlan",
    "load_plan",
    "load_plan_text",
    "parse_document",
    "read_text",
    "scan_safety",
    "validate_document",
]

MAX_FILE_BYTES = 2 * 1024 * 1024
MAX_EXPANDED_NODES = 200_000
_PLAIN_TAGS = {
    f"tag:yaml.org,2002:{t}"
    for t in ("str", "int", "float", "bool", "null", "map", "seq", "timestamp", "binary")
}


@dataclass(frozen=True)
class LoadedPlan:
    """A validated plan together with the document it came from (for round-trip saving)."""

    plan: Plan
    document: Any  # ruamel CommentedMap, comments and order kept
    path: Path
    migrated_from: int | None = None

    @property
    def base_dir(self) -> Path:
        """The folder that paths in the plan (weather and incentive files) are relative to."""
        return self.path.parent

    def locate(self, err: PlanRuleError) -> InputError:
        """The rules the plan breaks (the error and those found with it), as problems at the
        line and column of their keys in the file."""
        pos = _Positions(self.document, {})
        found = [Problem(str(self.path), *pos.locate(e.loc, on_key=True), e.message, e.hint)
                 for e in err.every]
        return InputError(sorted(dict.fromkeys(found), key=lambda p: (p.line, p.col)))

    def with_values(self, values: Mapping[tuple, Any]) -> LoadedPlan:
        """This plan with values set at paths of keys (e.g. command-line overrides), validated
        again; the file is not touched. Raises InputError when the result is not valid."""
        if not values:
            return self
        doc = copy.deepcopy(self.document)
        for loc, value in values.items():
            set_in(doc, loc, value)
        plan, migrated_from = validate_document(doc, str(self.path))
        return LoadedPlan(plan=plan, document=doc, path=self.path, migrated_from=migrated_from)


def read_text(path: Path) -> str:
    """Read a user file as UTF-8 within the size limit, or raise InputError saying why not."""
    name = str(path)
    try:
        size = path.stat().st_size
    except FileNotFoundError:
        raise InputError(Problem(name, 0, 0, "file not found", "check the path")) from None
    except OSError as exc:
        raise InputError(Problem(name, 0, 0, f"cannot read: {exc.strerror}")) from None
    if path.is_dir():
        raise InputError(Problem(name, 0, 0, "is a directory, not a plan file"))
    if size > MAX_FILE_BYTES:
        raise InputError(
            Problem(name, 0, 0, f"file is {size:,} bytes; plan files are limited to "
                    f"{MAX_FILE_BYTES:,}", "is this the right file?")
        )
    data = path.read_bytes()
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        before = data[: exc.start]
        line = before.count(b"\n") + 1
        col = exc.start - (before.rfind(b"\n") + 1) + 1
        raise InputError(
            Problem(name, line, col, f"not UTF-8 text (byte 0x{data[exc.start]:02x})",
                    "save the file as UTF-8")
        ) from None
    if text.startswith("\ufeff"):
        text = text[1:]
    if not text.strip():
        raise InputError(Problem(name, 1, 1, "the file is empty", "start from a sample in sample_homes/"))
    return text


def _yaml():
    from ruamel.yaml import YAML

    y = YAML(typ="rt")
    y.allow_duplicate_keys = False
    y.preserve_quotes = True
    return y


def _mark_problem(name: str, exc: Exception, what: str) -> Problem:
    mark = getattr(exc, "problem_mark", None) or getattr(exc, "context_mark", None)
    problem = getattr(exc, "problem", None) or str(exc).splitlines()[0]
    line, col = (mark.line + 1, mark.column + 1) if mark is not None else (0, 0)
    return Problem(name, line, col, f"{what}: {problem}", "fix the YAML syntax at this place")


def scan_safety(text: str, name: str) -> None:
    """Refuse non-plain tags and alias bombs before anything is constructed."""
    from ruamel.yaml import YAML
    from ruamel.yaml import events as ev
    from ruamel.yaml.error import MarkedYAMLError

    sizes: dict[str, int] = {}
    stack: list[list[Any]] = []  # [anchor, count]
    total = 0
    try:
        for event in YAML(typ="rt").parse(text):
            if isinstance(event, ev.AliasEvent):
                n = sizes.get(event.anchor, 1)
                total += n
                if stack:
                    stack[-1][1] += n
            elif isinstance(event, ev.ScalarEvent | ev.MappingStartEvent | ev.SequenceStartEvent):
                tag = getattr(event, "tag", None)
                tag = getattr(tag, "value", tag)
                if tag and tag.startswith("!!"):
                    tag = f"tag:yaml.org,2002:{tag[2:]}"
                if tag and tag not in _PLAIN_TAGS:
                    m = event.start_mark
                    raise InputError(
                        Problem(name, m.line + 1, m.column + 1, f"the tag {tag} is not allowed",
                                "plan files hold plain values only; remove the tag")
                    )
                total += 1
                if isinstance(event, ev.ScalarEvent):
                    if event.anchor:
                        sizes[event.anchor] = 1
                    if stack:
                        stack[-1][1] += 1
                else:
                    stack.append([event.anchor, 1])
            elif isinstance(event, ev.MappingEndEvent | ev.SequenceEndEvent):
                anchor, count = stack.pop()
                if anchor:
                    sizes[anchor] = count
                if stack:
                    stack[-1][1] += count
            if total > MAX_EXPANDED_NODES:
                m = event.start_mark
                raise InputError(
                    Problem(name, m.line + 1, m.column + 1,
                            f"aliases expand to more than {MAX_EXPANDED_NODES:,} values",
                            "remove the repeated aliases (*name); plan files are small")
                )
    except MarkedYAMLError as exc:
        raise InputError(_mark_problem(name, exc, "YAML syntax error")) from None


def parse_document(text: str, name: str) -> Any:
    """Parse YAML text into a round-trip document after the safety scan."""
    from ruamel.yaml.constructor import DuplicateKeyError
    from ruamel.yaml.error import MarkedYAMLError

    scan_safety(text, name)
    try:
        doc = _yaml().load(text)
    except DuplicateKeyError as exc:
        raise InputError(
            Problem(name, exc.problem_mark.line + 1, exc.problem_mark.column + 1,
                    f"duplicate key: {exc.problem.strip()}", "keep one of the two")
        ) from None
    except MarkedYAMLError as exc:
        raise InputError(_mark_problem(name, exc, "YAML error")) from None
    except ValueError as exc:  # a value YAML reads as a date but that is no date (2027-02-30)
        line, col = _bad_date_position(text)
        raise InputError(Problem(name, line, col, f"not a valid date: {exc}", "write YYYY-MM-DD")) from None
    return doc


def _bad_date_position(text: str) -> tuple[int, int]:
    """Line and column of the first YYYY-MM-DD that is not a calendar date (0, 0 if none)."""
    import datetime as dt
    import re

    for n, line in enumerate(text.splitlines(), 1):
        for m in re.finditer(r"\b(\d{4})-(\d{1,2})-(\d{1,2})\b", line):
            try:
                dt.date(int(m.group(1)), int(m.group(2)), int(m.group(3)))
            except ValueError:
                return n, m.start() + 1
    return 0, 0


# ------------------------------------------------------------------------- positions


class _Positions:
    """Find the line and column of a path of keys/indices inside a ruamel document."""

    def __init__(self, doc: Any, renamed: dict[tuple, str]):
        self.doc = doc
        self.renamed = renamed

    def locate(self, loc: tuple, on_key: bool = False) -> tuple[int, int]:
        node = self.doc
        line, col = 1, 1
        path: tuple = ()
        for part in loc:
            key = self.renamed.get((*path, part), part)
            path = (*path, part)
            lc = getattr(node, "lc", None)
            if isinstance(node, dict):
                if key not in node:
                    key = _int_or(key)
                if key not in node:
                    break
                if lc is not None:
                    container = isinstance(node[key], dict | list)
                    pos = lc.key(key) if on_key or container else lc.value(key)
                    line, col = pos[0] + 1, pos[1] + 1
                node = node[key]
            elif isinstance(node, list) and isinstance(part, int) and 0 <= part < len(node):
                if lc is not None:
                    pos = lc.item(part)
                    line, col = pos[0] + 1, pos[1] + 1
                node = node[part]
            else:
                break
        return line, col


def _int_or(value: Any) -> Any:
    try:
        return int(value)
    except (TypeError, ValueError):
        return value


# ------------------------------------------------------------------------- conversion


def to_plain(node: Any, path: tuple, renamed: dict[tuple, str], problems: list[str]) -> Any:
    """Copy a document into plain dicts/lists, converting SI keys to internal units."""
    if isinstance(node, dict):
        out: dict[Any, Any] = {}
        for key, value in node.items():
            skey = key
            if isinstance(key, str) and key in SI_KEYS:
                target, convert = SI_KEYS[key]
                if target in node:
                    problems.append(f"{'.'.join(map(str, (*path, key)))}|both {key} and {target} given|keep one")
                    continue
                renamed[(*path, target)] = key
                skey = target
                if isinstance(value, int | float) and not isinstance(value, bool):
                    value = convert(float(value))
                elif isinstance(value, list):
                    value = [convert(float(v)) if isinstance(v, int | float) else v for v in value]
            out[skey] = to_plain(value, (*path, skey), renamed, problems)
        return out
    if isinstance(node, list):
        return [to_plain(v, (*path, i), renamed, problems) for i, v in enumerate(node)]
    if isinstance(node, str):
        return str(node)
    return node


# ------------------------------------------------------------------------- validation


def _allowed_keys(loc: tuple) -> list[str]:
    """The keys the model allows at a location (for 'did you mean')."""
    from pydantic import BaseModel

    model: Any = Plan
    for part in loc:
        if isinstance(part, int) or model is None:
            continue
        field = model.model_fields.get(part) if isinstance(model, type) and issubclass(model, BaseModel) else None
        if field is None:
            return []
        model = _inner_model(field.annotation)
    if isinstance(model, type) and issubclass(model, BaseModel):
        return list(model.model_fields)
    return []


def _inner_model(annotation: Any) -> Any:
    from typing import get_args

    from pydantic import BaseModel

    if isinstance(annotation, type) and issubclass(annotation, BaseModel):
        return annotation
    for arg in get_args(annotation):
        found = _inner_model(arg)
        if found is not None:
            return found
    return None


def _describe(err: dict, allowed: list[str]) -> tuple[str, str]:
    """Turn one pydantic error into (message, how to fix)."""
    kind = err["type"]
    loc = [p for p in err["loc"] if p not in ("[key]",)]
    field = str(loc[-1]) if loc else "plan"
    value = err.get("input")
    ctx = err.get("ctx") or {}
    if isinstance(value, bool) and kind in ("int_type", "float_type", "greater_than_equal", "greater_than"):
        return f"{field} must be a number, not {str(value).lower()}", "write digits, e.g. 100"
    if kind == "extra_forbidden":
        close = difflib.get_close_matches(field, allowed, n=1, cutoff=0.6)
        hint = f"did you mean '{close[0]}'?" if close else f"allowed here: {', '.join(allowed)}"
        return f"unknown key '{field}'", hint
    if kind == "missing":
        return f"missing required key '{field}'", f"add '{field}:' to this section; see docs/plan-format.md"
    if kind == "literal_error":
        expected = ctx.get("expected", "")
        close = difflib.get_close_matches(str(value), [e.strip(" '") for e in str(expected).replace(" or ", ", ").split(", ")], n=1)
        hint = f"did you mean '{close[0]}'?" if close else f"use one of {expected}"
        return f"'{value}' is not a valid {field}", hint
    if kind in ("greater_than", "greater_than_equal", "less_than", "less_than_equal"):
        bound = next(iter(ctx.values()), "")
        words = {"greater_than": "more than", "greater_than_equal": "at least",
                 "less_than": "less than", "less_than_equal": "at most"}[kind]
        hint = "check the value and its unit"
        if field in ("afue", "uef") and isinstance(value, int | float) and value > 5:
            hint = f"write it as a fraction: {value / 100:.2f} for {value} %"
        return f"{field} is {value}, but it must be {words} {bound}", hint
    if kind == "finite_number":
        return f"{field} must be a finite number, not {value!r}", "write an ordinary number"
    if kind in ("int_parsing", "float_parsing", "int_type", "float_type", "int_from_float"):
        what = "a whole number" if kind.startswith("int") else "a number"
        return f"{field} must be {what}, not {value!r}", "write digits only, without units or commas"
    if kind in ("bool_parsing", "bool_type"):
        return f"{field} must be true or false, not {value!r}", "write true or false"
    if kind in ("dict_type", "model_type", "model_attributes_type"):
        return f"{field} must be a section of keys, not {type(value).__name__}", "indent its keys under it"
    if kind == "list_type":
        return f"{field} must be a list, not {type(value).__name__}", "write one '- item' per line"
    if kind in ("too_short", "too_long"):
        return f"{field}: {err['msg'].lower()}", "monthly lists have 12 values, January to December"
    if kind in ("date_from_datetime_parsing", "date_parsing", "date_type"):
        return f"{field} must be a date, not {value!r}", "write YYYY-MM-DD"
    if kind == "string_pattern_mismatch":
        return f"{field} '{value}' is not a valid id", "use lower-case letters, digits and _"
    if kind in ("string_type",):
        return f"{field} must be text, not {value!r}", "put it in quotes"
    if kind == "value_error":
        msg = err["msg"].removeprefix("Value error, ")
        if ": " in msg:
            what, fix = msg.split(": ", 1)
            return what, fix
        return msg, ""
    return f"{field}: {err['msg']}", ""


def validate_document(doc: Any, name: str) -> tuple[Plan, int | None]:
    """Validate a parsed document; raise InputError with every problem located."""
    from pydantic import ValidationError

    if not isinstance(doc, dict):
        kind = "a list" if isinstance(doc, list) else f"a single value ({doc!r})"
        raise InputError(
            Problem(name, 1, 1, f"the top level is {kind}, not a section of keys",
                    "a plan file starts with keys such as 'home:' and 'budget:'")
        )
    version = doc.get("format_version", FORMAT_VERSION)
    migrated_from = None
    renamed: dict[tuple, str] = {}
    pos = _Positions(doc, renamed)
    if not isinstance(version, int) or isinstance(version, bool):
        line, col = pos.locate(("format_version",))
        raise InputError(Problem(name, line, col, f"format_version must be a whole number, not {version!r}",
                                 f"this homeplan writes format_version: {FORMAT_VERSION}"))
    if version > FORMAT_VERSION:
        line, col = pos.locate(("format_version",))
        raise InputError(
            Problem(name, line, col,
                    f"this file uses plan format {version}, made by a newer homeplan; this "
                    f"homeplan reads formats up to {FORMAT_VERSION}",
                    "update homeplan (pip install -U homeplan) or ask the sender for an older format")
        )
    if version < 1:
        line, col = pos.locate(("format_version",))
        raise InputError(Problem(name, line, col, f"format_version {version} does not exist",
                                 f"use format_version: {FORMAT_VERSION}"))
    conversion_problems: list[str] = []
    plain = to_plain(doc, (), renamed, conversion_problems)
    if version < FORMAT_VERSION:
        plain = migrate.upgrade(plain, version)
        migrated_from = version
    problems: list[Problem] = []
    for text in conversion_problems:
        dotted, msg, hint = text.split("|")
        line, col = pos.locate(tuple(_int_or(p) for p in dotted.split(".")), on_key=True)
        problems.append(Problem(name, line, col, msg, hint))
    try:
        plan = Plan.model_validate(plain)
    except ValidationError as exc:
        for err in exc.errors():
            loc = tuple(err["loc"])
            loc = tuple(p for p in loc if p != "[key]")
            on_key = err["type"] in ("extra_forbidden",)
            if err["type"] == "missing":
                line, col = pos.locate(loc[:-1], on_key=True)
            else:
                line, col = pos.locate(loc, on_key=on_key)
            allowed = _allowed_keys(loc[:-1]) if err["type"] == "extra_forbidden" else []
            message, hint = _describe(err, allowed)
            where = ".".join(str(p) for p in loc[:-1])
            if where and err["type"] in ("missing", "extra_forbidden", "value_error"):
                message = f"{message} in {where}"
            problems.append(Problem(name, line, col, message, hint))
        plan = None
    if plan is not None:
        for loc, message, hint in rule_problems(plan):
            line, col = pos.locate(loc)
            problems.append(Problem(name, line, col, message, hint))
    if problems:
        problems = sorted(dict.fromkeys(problems), key=lambda p: (p.line, p.col))  # each once
        raise InputError(problems)
    assert plan is not None
    return plan, migrated_from


def load_plan(path: str | os.PathLike) -> LoadedPlan:
    """Read, check and validate a plan file. Raises InputError listing every problem."""
    p = Path(path)
    text = read_text(p)
    doc = parse_document(text, str(p))
    plan, migrated_from = validate_document(doc, str(p))
    return LoadedPlan(plan=plan, document=doc, path=p, migrated_from=migrated_from)


def load_plan_text(text: str, name: str = "<plan>") -> LoadedPlan:
    """Validate plan text held in memory (used by tests and the app's editors)."""
    if not text.strip():
        raise InputError(Problem(name, 1, 1, "the file is empty", "start from a sample in sample_homes/"))
    doc = parse_document(text, name)
    plan, migrated_from = validate_document(doc, name)
    return LoadedPlan(plan=plan, document=doc, path=Path(name), migrated_from=migrated_from)
