"""Presentation helpers: money and numbers as a household reads them, tiny text charts.

Formatting only: every number comes from the engine's result; nothing here computes physics or
money rules.
"""

from __future__ import annotations

from collections.abc import Sequence

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
    "usd",
]

BLOCKS = " ▁▂▃▄▅▆▇█"
ESTIMATES = "Planning estimates - confirm with licensed professionals who see the home."


def usd(value: float | None) -> str:
    """$12,400 (rounded to $100 from $10,000, to $10 below); negative as -$1,200."""
    if value is None or value != value:
        return "-"
    step = 100 if abs(value) >= 10_000 else 10
    v = round(value / step) * step
    return f"-${abs(v):,.0f}" if v < 0 else f"${v:,.0f}"


def kusd(value: float | None) -> str:
    """Compact money for narrow cells: 6.2k, 12k, -900, 0."""
    if value is None or value != value:
        return "-"
    a = abs(value)
    if a < 50:
        return "0"
    if a < 1000:
        s = f"{a:,.0f}"
    elif a < 9950:
        s = f"{a / 1000:.1f}k"
    else:
        s = f"{a / 1000:,.0f}k"
    return ("-" if value < 0 else "") + s


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


def fuel_label(key: str) -> str:
    """'electricity_kwh' -> 'Electricity (kWh)'."""
    if "_" not in key:
        return key.capitalize()
    name, unit = key.rsplit("_", 1)
    unit = {"kwh": "kWh", "therm": "therm", "gallon": "gal", "gal": "gal"}.get(unit, unit)
    return f"{name.replace('_', ' ').capitalize()} ({unit})"
