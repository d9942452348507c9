"""Presentation helpers: money and numbers as a household reads them, tiny text charts.

Formatting only: every number comes from the engine's result; nothing here computes physics or
money rules.
"""

from __future__ import annotations

import textwrap
from collections.abc import Sequence

from homeplan.report.fmt import money, money_short
from homeplan.report.words import short_words

__all__ = [
    "BLOCKS",
    "ESTIMATES",
    "INVENTED",
    "bar",
    "fuel_label",
    "kusd",
    "kusd_fit",
    "num",
    "spark",
    "trunc",
    "trunc_words",
    "wrap_cell",
    "wrap_labels",
    "usd",
    "when",
]

BLOCKS = " ▁▂▃▄▅▆▇█"
ESTIMATES = "Planning estimates - confirm with licensed professionals who see the home."


def usd(value: float | None) -> str:
    """Money as every view shows it (:func:`homeplan.report.fmt.money`): $12,400, -$1,200;
    "-" when not computed."""
    if value is None or value != value:
        return "-"
    return money(value)


def kusd(value: float | None) -> str:
    """The same figure compact for narrow cells (:func:`homeplan.report.fmt.money_short`)."""
    return money_short(value)


def kusd_fit(value: float | None, width: int) -> str:
    """kusd() shortened to at most ``width`` characters (whole thousands when needed)."""
    text = kusd(value)
    if len(text) > width and value is not None and value == value:
        text = f"{value / 1000:,.0f}k"
    return text if len(text) <= width else ("-" if value < 0 else "") + "…"


def num(value: float | None, unit: str = "", digits: int = 0) -> str:
    if value is None or value != value:
        return "-"
    text = f"{value:,.{digits}f}"
    return f"{text} {unit}" if unit else text


def spark(values: Sequence[float], top: float | None = None) -> str:
    """One character per value, heights scaled to ``top`` (default: the largest value)."""
    if not values:
        return ""
    top = top if top is not None else max(values)
    if top <= 0:
        return "▁" * len(values)
    out = []
    for v in values:
        level = 0 if v <= 0 else max(1, min(8, round(v / top * 8)))
        out.append(BLOCKS[level])
    return "".join(out)


def bar(value: float, top: float, width: int) -> str:
    """A horizontal bar of ``width`` cells with eighth-cell resolution."""
    if top <= 0 or value <= 0:
        return ""
    cells = value / top * width
    full = int(cells)
    rest = int(round((cells - full) * 8))
    partial = "▏▎▍▌▋▊▉"[rest - 1] if 0 < rest < 8 else ""
    return "█" * min(full, width) + (partial if full < width else "")


INVENTED = " (invented)"
"""The mark of invented demo names: kept when a name is cut to fit, so it always shows."""


def trunc(text: str, width: int) -> str:
    if len(text) <= width:
        return text
    if text.endswith(INVENTED) and width > len(INVENTED) + 3:
        head = text[: -len(INVENTED)]
        return head[: width - len(INVENTED) - 1] + "…" + INVENTED
    return text[: max(0, width - 1)] + "…"


def trunc_words(text: str, width: int) -> str:
    """``text`` in ``width`` characters, shortened after a whole word (at a space or hyphen)
    and marked with "…"; the "(invented)" mark of demo names is kept. A word is cut only when
    not even the first one fits."""
    if len(text) <= width:
        return text
    tail = INVENTED if text.endswith(INVENTED) and width > len(INVENTED) + 3 else ""
    head = text[: -len(tail)] if tail else text
    room = width - len(tail) - 1
    cut = max(head.rfind(" ", 0, room + 1), head.rfind("-", 0, room))
    if cut <= 0:
        return trunc(text, width)
    keep = head[: cut + 1] if head[cut] == "-" else head[:cut]
    return keep.rstrip(" ,;:") + "…" + tail


def wrap_cell(text: str, width: int, max_lines: int = 2) -> str:
    """Text for a table cell ``width`` wide: on up to ``max_lines`` lines broken at spaces
    (the row is made that tall), cut only beyond them."""
    lines = textwrap.wrap(text, width) or [""]
    if len(lines) > max_lines:
        lines = [*lines[: max_lines - 1], trunc(" ".join(lines[max_lines - 1:]), width)]
    return "\n".join(lines)


def wrap_labels(labels: Sequence[str], width: int, max_lines: int = 3) -> list[str]:
    """Labels for a table column ``width`` wide, each on as many lines as it needs (up to
    ``max_lines``, broken at spaces): as written when they fit on one line, else with the
    upgrades' short names ("EV for ..."), so that two long labels never read the same."""
    return [wrap_cell(t if len(t) <= width else short_words(t), width, max_lines) for t in labels]


def fuel_label(key: str) -> str:
    """'electricity_kwh' -> 'Electricity (kWh)'."""
    if "_" not in key:
        return key.capitalize()
    name, unit = key.rsplit("_", 1)
    unit = {"kwh": "kWh", "therm": "therm", "gallon": "gal", "gal": "gal"}.get(unit, unit)
    return f"{name.replace('_', ' ').capitalize()} ({unit})"


def when(arrives) -> str:
    """A date as 'May 2027'; a year as itself."""
    if hasattr(arrives, "strftime"):
        return arrives.strftime("%b %Y")
    return str(arrives)
