"""Load a plan file safely and report every problem at once with its line and column.

Plan files travel between installers and homeowners, so they are treated as untrusted. The file
is read by :mod:`homeplan.plan.files` (a regular file only, a size cap, UTF-8 only) and its YAML
by :mod:`homeplan.plan.yamlread` (PyYAML's C parser: the event stream is checked for depth,
aliases, tags and sizes before anything is built; duplicate keys refused; positions kept for
every key). The app's editor, which must keep the user's comments, builds its round-trip document
with ruamel.yaml only after the same checks passed (:func:`parse_roundtrip`). A format version
older than this homeplan's is migrated, a newer one refused. Every string from the file passes
the one sanitiser (:func:`homeplan.plan.text.clean`) on its way into the model.
"""

from __future__ import annotations

import copy
import difflib
import os
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from homeplan.errors import InputError, PlanRuleError, Problem
from homeplan.plan import migrate
from homeplan.plan.checks import rule_problems
from homeplan.plan.files import PLAN, PlanFolder
from homeplan.plan.files import read_text as read_file_text
from homeplan.plan.model import FORMAT_VERSION, Plan
from homeplan.plan.save import set_in
from homeplan.plan.text import clean
from homeplan.plan.yamlread import PLAN_LIMITS, read_yaml
from homeplan.units import SI_KEYS

__all__ = [
    "MAX_FILE_BYTES",
    "LoadedPlan",
    "load_for_editing",
    "load_plan",
    "load_plan_text",
    "parse_document",
    "parse_roundtrip",
    "read_text",
    "validate_document",
]

MAX_FILE_BYTES = PLAN.max_bytes


@dataclass(frozen=True)
class LoadedPlan:
    """A validated plan together with the document it came from.

    ``document`` holds the file's values with the position of every key (for messages);
    ``allow`` are the paths outside the plan's folder the user allowed it to name.
    """

    plan: Plan
    document: Any
    path: Path
    migrated_from: int | None = None
    allow: tuple[Path, ...] = ()

    @property
    def base_dir(self) -> Path:
        """The folder that paths in the plan (weather and incentive files) are relative to."""
        return self.path.parent

    @property
    def folder(self) -> PlanFolder:
        """The plan's folder and the outside paths allowed (how named files are read)."""
        return PlanFolder.of(self.base_dir, self.allow)

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
        return LoadedPlan(plan=plan, document=doc, path=self.path, migrated_from=migrated_from,
                          allow=self.allow)


def read_text(path: str | os.PathLike) -> str:
    """Read a plan file (a regular file, within the size cap, UTF-8), or raise InputError."""
    name = str(path)
    text = read_file_text(path, PLAN, name)
    if not text.strip():
        raise InputError(Problem(name, 1, 1, "the file is empty", "start from a sample in sample_homes/"))
    return text


def parse_document(text: str, name: str) -> Any:
    """The plan's YAML as plain values with positions, after the safety checks."""
    return read_yaml(text, name, PLAN_LIMITS)


def parse_roundtrip(text: str, name: str) -> Any:
    """The plan's YAML as a round-trip document (comments and key order kept, for editing).

    The text passes the same checks and is read once by :func:`parse_document`'s reader first,
    so every problem is reported the same way; only then does ruamel.yaml build its document.
    """
    from ruamel.yaml.error import YAMLError

    read_yaml(text, name, PLAN_LIMITS)
    try:
        return _roundtrip_yaml().load(text)
    except YAMLError as exc:  # the checks above accept only what both readers read
        mark = getattr(exc, "problem_mark", None)
        line, col = (mark.line + 1, mark.column + 1) if mark is not None else (0, 0)
        raise InputError(Problem(name, line, col, "the round-trip reader cannot read this YAML: "
                                 f"{clean(getattr(exc, 'problem', '') or type(exc).__name__)[:80]}",
                                 "simplify the YAML at this place")) from None


def _roundtrip_yaml():
    from ruamel.yaml import YAML

    y = YAML(typ="rt")
    y.allow_duplicate_keys = False
    y.preserve_quotes = True
    return y


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
            skey = clean(key, one_line=False) if isinstance(key, str) else key
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
        return clean(node, one_line=False)
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
    if kind in ("too_short", "too_long") and field.startswith("monthly_"):
        return f"{field}: {err['msg'].lower()}", "monthly lists have 12 values, January to December"
    if kind == "too_long":
        most = ctx.get("max_length", "")
        return f"{field} lists {ctx.get('actual_length', 'too many')} items; at most {most}", \
            "a plan describes one home: keep the ones that matter for the plan"
    if kind == "too_short":
        return f"{field}: {err['msg'].lower()}", "add the missing items"
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


def load_plan(path: str | os.PathLike, allow: Iterable[str | os.PathLike] = ()) -> LoadedPlan:
    """Read, check and validate a plan file. Raises InputError listing every problem.

    ``allow`` names files outside the plan's folder that the plan may name (the user's say-so).
    """
    return _load(Path(path), allow, parse_document)


def load_for_editing(path: str | os.PathLike, allow: Iterable[str | os.PathLike] = ()) -> LoadedPlan:
    """Like :func:`load_plan`, with a round-trip document (comments and key order kept) that
    :func:`homeplan.plan.save.save_document` writes back."""
    return _load(Path(path), allow, parse_roundtrip)


def _load(p: Path, allow: Iterable[str | os.PathLike], parse: Callable[[str, str], Any]) -> LoadedPlan:
    """Read ``p`` safely, parse it with ``parse`` (text, name) and validate it."""
    doc = parse(read_text(p), str(p))
    plan, migrated_from = validate_document(doc, str(p))
    return LoadedPlan(plan=plan, document=doc, path=p, migrated_from=migrated_from,
                      allow=tuple(Path(a) for a in allow))


def load_plan_text(text: str, name: str = "<plan>") -> LoadedPlan:
    """Validate plan text held in memory (used by tests and the app's editors)."""
    if not text.strip():
        raise InputError(Problem(name, 1, 1, "the file is empty", "start from a sample in sample_homes/"))
    doc = parse_document(text, name)
    plan, migrated_from = validate_document(doc, name)
    return LoadedPlan(plan=plan, document=doc, path=Path(name), migrated_from=migrated_from)
