"""Small formatting helpers shared by every printed view: money and numbers.

Text from a file is made safe by the one sanitiser, :func:`homeplan.plan.text.clean`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from homeplan.report.table import usd

__all__ = [
    "Table",
    "energy_key_words",
    "finite",
    "money",
    "money_short",
    "money_signed",
    "number",
    "pct",
    "peak_demand_kw",
    "service_verdict",
    "short",
    "tonnes",
]

@dataclass(frozen=True)
class Table:
    """A small table of a printed view, already in words."""

    headers: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    align: str            # per column: 'l' left, 'r' right (numbers), 'n' left and never wrapped,
                          # 'w' left and given the room (the reasons)
    total: tuple[str, ...] | None = None        # a closing row, shown emphasised
    note: str = ""


def short(text: str, limit: int) -> str:
    """Cut long text to ``limit`` characters with an ellipsis."""
    return text if len(text) <= limit else text[: max(limit - 3, 1)].rstrip() + "..."


def service_verdict(fits: bool, near_limit: bool = False, load_pct: float | None = None) -> str:
    """How a load calculation ends, in words: "fits", "fits, near its limit (98 % of the rating)"
    or "DOES NOT FIT"."""
    if not fits:
        return "DOES NOT FIT"
    if near_limit and load_pct is not None:
        return f"fits, near its limit ({load_pct:.0f} % of the rating)"
    return "fits"


def finite(value: float | None) -> bool:
    return value is not None and isinstance(value, int | float) and math.isfinite(value)


def money(value: float | None) -> str:
    """Money the way a household reads it: nearest $10 under $1,000, else nearest $100.

    Not computed (None/NaN) shows as "n/a".
    """
    if not finite(value):
        return "n/a"
    assert value is not None
    step = 10 if abs(value) < 1000 else 100
    out = usd(value, step)
    return "$0" if out == "-$0" else out


def money_short(value: float | None) -> str:
    """The same amount as :func:`money`, compact for narrow cells: 550, 1.6k, 24k, 0.

    Rounded as :func:`money` rounds (nearest $10 under $1,000, else $100), then shortened, so a
    cell and a sentence about the same figure agree; a non-zero amount never shows as 0.
    """
    if not finite(value):
        return "-"
    assert value is not None
    step = 10 if abs(value) < 1000 else 100
    v = round(value / step) * step
    if v == 0:
        return "0"
    if abs(v) < 1000:
        s = f"{abs(v):,.0f}"
    elif abs(value) < 9950:
        s = f"{abs(value) / 1000:.1f}k"
    else:
        s = f"{abs(value) / 1000:,.0f}k"
    return ("-" if v < 0 else "") + s


def money_signed(value: float | None) -> str:
    """Money with an explicit sign: +$1,200 / -$300 / $0."""
    out = money(value)
    if out in ("n/a", "$0") or out.startswith("-"):
        return out
    return "+" + out


def number(value: float | None, digits: int = 0, unit: str = "") -> str:
    if not finite(value):
        return "n/a"
    assert value is not None
    s = f"{value:,.{digits}f}"
    if s.startswith("-") and float(s.replace(",", "")) == 0:
        s = s[1:]
    return f"{s} {unit}".strip()


def peak_demand_kw(summary: object) -> float:
    """The peak demand to show for an energy summary: the meter's kind when known, else the
    highest hourly average."""
    meter = getattr(summary, "peak_demand_kw", None)
    return float(meter) if meter is not None else float(getattr(summary, "peak_kw", 0.0))


def tonnes(kg: float | None) -> str:
    """Mass of CO2e in tonnes with one decimal."""
    return "n/a" if not finite(kg) else number(kg / 1000.0, 1, "t")  # type: ignore[operator]


def pct(value: float | None, digits: int = 1) -> str:
    if not finite(value):
        return "n/a"
    assert value is not None
    s = f"{value:.{digits}f}".rstrip("0").rstrip(".") if digits else f"{value:.0f}"
    return f"{s} %"


_UNIT_WORDS = {"kwh": "kWh", "therm": "therms", "gallon": "gallons", "gal": "gallons", "kg": "kg"}


def energy_key_words(key: str) -> tuple[str, str]:
    """'electricity_kwh' -> ('Electricity', 'kWh'); 'gas_therm' -> ('Gas', 'therms')."""
    head, _, unit = key.rpartition("_")
    if not head or unit not in _UNIT_WORDS:
        return key.replace("_", " ").capitalize(), ""
    return head.replace("_", " ").capitalize(), _UNIT_WORDS[unit]
