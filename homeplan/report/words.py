"""Plain words for what a result holds, shared by the app, the command line and the printout.

Words before jargon: sizes in kW with Btu/h beside them (never tons), incentive limits with the
upgrades named as a person would, cost sources as "a typical price" or "your quote", labels that
stay distinct when shortened. The trade's terms are explained once, in the glossary
(``homeplan/data/glossary.yaml``). Nothing here computes a figure; only unit conversions at the
edge (homeplan.units) and choice of words.

References
----------
NIST Special Publication 811 (2008), Appendix B: 1 ton of refrigeration = 12,000 Btu(IT)/h;
1 Btu(IT)/h = 0.29307107 W.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from functools import cache

from homeplan import catalog
from homeplan.units import display_size, heat_output_words

__all__ = [
    "caps_words",
    "cost_source_words",
    "distinct_labels",
    "fit_labels",
    "heat_output_words",
    "load_words",
    "short_words",
    "size_words",
]


def size_words(size: float, unit: str) -> str:
    """A project's size in plain units (:func:`homeplan.units.display_size`)."""
    return display_size(size, unit)


@cache
def _kind_words() -> tuple[tuple[re.Pattern, str], ...]:
    kinds = catalog.upgrade_kinds()
    ids = sorted(kinds, key=len, reverse=True)  # heat_pump_water_heater before heat_pump
    return tuple((re.compile(rf"(?<![a-z_]){re.escape(k)}(?![a-z_])"), kinds[k].label.lower())
                 for k in ids)


def caps_words(text: str) -> str:
    """An incentive program's limits with upgrade ids and abbreviations in words.

    "heat_pump up to $6,000; 90 % at 0 to 80 % AMI" ->
    "heat pump for heating and cooling up to $6,000; 90 % at 0 to 80 % of area median income".
    """
    out = text
    for pattern, words in _kind_words():
        out = pattern.sub(words, out)
    out = re.sub(r"(?<![A-Za-z0-9_])([a-z]+(?:_[a-z0-9]+)+)(?![A-Za-z0-9_])",  # other ids
                 lambda m: m.group(1).replace("_", " "), out)
    return re.sub(r"% AMI\b", "% of area median income", out)


def cost_source_words(source: str) -> str:
    """Where a project's price comes from, as a homeowner reads it: the quote they entered, or
    the catalog's typical price (its full reference stays in the catalog and the printout's
    assumptions)."""
    if source.startswith("your quote"):
        return source
    return "homeplan's typical installed price for this work (an estimate, not a quote)"


@cache
def _shorts() -> tuple[tuple[str, str], ...]:
    kinds = catalog.upgrade_kinds().values()
    return tuple(sorted(((k.label, k.short) for k in kinds if k.short), key=lambda p: -len(p[0])))


def short_words(text: str) -> str:
    """The text with each upgrade's label replaced by its short name from the catalog
    ("Electric vehicle (replaces 2012 sedan)" -> "EV for 2012 sedan")."""
    out = text
    for label, short in _shorts():
        out = out.replace(label, short)
    return re.sub(r"\bEV \(replaces ([^)]*)\)", r"EV for \1", out)


def fit_labels(labels: Sequence[str], width: int) -> list[str]:
    """Labels for a column ``width`` characters wide: as they are when they fit, else with the
    upgrades' short names, and only then cut (keeping each distinct)."""
    return distinct_labels([t if len(t) <= width else short_words(t) for t in labels], width)


def distinct_labels(labels: Sequence[str], width: int) -> list[str]:
    """Each label cut to ``width`` characters; labels that would then read the same keep their
    ends instead ("Electric vehicle (replac..." twice becomes "Electric…2012 sedan)" and
    "Electric…2017 wagon)")."""
    def cut(text: str) -> str:
        return text if len(text) <= width else text[: max(width - 1, 0)] + "…"

    out = [cut(t) for t in labels]
    for short in {s for s in out if out.count(s) > 1}:
        group = [i for i, s in enumerate(out) if s == short]
        if len({labels[i] for i in group}) == 1:
            continue  # the same text twice: nothing tells them apart
        head = max(3, width // 3)
        tail = width - head - 1
        for i in group:
            text = labels[i]
            if len(text) <= width:
                out[i] = text
                continue
            end = text[-tail:]
            if " " in end[:-1]:  # start the end on a whole word
                end = end[end.index(" ") + 1:]
            out[i] = text[:head].rstrip() + "…" + end
    return out


def load_words(name: str) -> str:
    """A load of the load calculation named in words: the planner names an existing appliance's
    load after its id ("ac (central ac)", "heat_pump strips 10 kW"); shown as "Central ac" and
    "Heat pump: backup electric heat 10 kW"."""
    m = re.fullmatch(r"([a-z][a-z0-9_]*) \((.+)\)", name)
    if m:
        key, inner = m.group(1).replace("_", " "), m.group(2)
        text = inner if key == inner or key in inner.split() else f"{inner} ({key})"
    else:
        m = re.fullmatch(r"([a-z][a-z0-9_]*) strips (.+)", name)
        text = f"{m.group(1).replace('_', ' ')}: backup electric heat {m.group(2)}" if m else name
    return text[:1].upper() + text[1:]
