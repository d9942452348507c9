"""Named options inside one plan file: the plan with an option's changes merged in.

An option (``alternatives:`` in the file) holds plan sections in the file's own form. Its
mappings are merged key by key into the plan (``budget: {usd_per_year: 15000}`` changes the
budget only); any other value - a list, a number, a string - replaces the plan's. The merged
document keeps each key's line and column in the file (the option's keys point into the
option), so a bad value in an option is reported where it is written.
"""

from __future__ import annotations

from typing import Any

from homeplan.errors import InputError, Problem
from homeplan.plan.load import LoadedPlan, validate_document
from homeplan.plan.yamlread import MarkedMap, Positions

__all__ = ["BASE_NAME", "merged_document", "option", "options"]

BASE_NAME = "As planned"
"""What the plan itself is called beside its options."""


def _copy_position(dst: Any, src: Any, key: Any) -> None:
    lc_src, lc_dst = getattr(src, "lc", None), getattr(dst, "lc", None)
    if isinstance(lc_src, Positions) and isinstance(lc_dst, Positions):  # a file as read
        if key in lc_src.keys:
            lc_dst.keys[key] = lc_src.keys[key]
        if key in lc_src.values:
            lc_dst.values[key] = lc_src.values[key]
    elif lc_src is not None and lc_dst is not None and key in (getattr(lc_src, "data", None) or {}):
        lc_dst.add_kv_line_col(key, lc_src.data[key])  # a document being edited (round trip)


def _new_map(like: Any) -> Any:
    """An empty section of the same kind as ``like`` (positions start where it starts)."""
    if isinstance(like, MarkedMap):
        out = MarkedMap()
        out.lc = Positions(like.lc.start)
        return out
    # ruamel.yaml only for a document being edited in the app, which already loaded it
    from ruamel.yaml.comments import CommentedMap

    return CommentedMap()


def _merge(base: Any, over: Any) -> Any:
    if not (isinstance(base, dict) and isinstance(over, dict)):
        return over
    out = _new_map(base)
    for key, value in base.items():
        out[key] = value
        _copy_position(out, base, key)
    for key, value in over.items():
        out[key] = _merge(base[key], value) if key in base else value
        _copy_position(out, over, key)
    return out


def _base_document(doc: Any) -> Any:
    """The document without its options (positions kept)."""
    top = _new_map(doc)
    for key, value in doc.items():
        if key != "alternatives":
            top[key] = value
            _copy_position(top, doc, key)
    return top


def merged_document(loaded: LoadedPlan, index: int) -> Any:
    """The plan file's document with option ``index``'s changes merged in (no ``alternatives``)."""
    changes = loaded.document["alternatives"][index].get("changes") or {}
    return _merge(_base_document(loaded.document), changes)


def option(loaded: LoadedPlan, index: int) -> LoadedPlan:
    """The plan with option ``index`` applied, validated; a problem is reported at its place in
    the file and names the option."""
    alt = loaded.plan.alternatives[index]
    doc = merged_document(loaded, index)
    try:
        plan, migrated = validate_document(doc, str(loaded.path))
    except InputError as exc:
        raise InputError([Problem(p.path, p.line, p.col, f"option '{alt.name}': {p.message}", p.hint)
                          for p in exc.problems]) from None
    return LoadedPlan(plan=plan, document=doc, path=loaded.path, migrated_from=migrated, allow=loaded.allow)


def options(loaded: LoadedPlan) -> list[tuple[str, LoadedPlan]]:
    """The plan as planned, then each of its options, by name."""
    out = [(BASE_NAME, loaded)] if not loaded.plan.alternatives else [(BASE_NAME, LoadedPlan(
        plan=loaded.plan.model_copy(update={"alternatives": []}), document=_base_document(loaded.document),
        path=loaded.path, migrated_from=loaded.migrated_from, allow=loaded.allow))]
    out += [(a.name, option(loaded, i)) for i, a in enumerate(loaded.plan.alternatives)]
    return out
