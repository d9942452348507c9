"""Plain-text tables for the terminal: aligned columns, no colour, no dependencies."""

from __future__ import annotations

from collections.abc import Sequence

__all__ = ["text_table", "usd"]


def text_table(headers: Sequence[str], rows: Sequence[Sequence[object]], align: str | None = None) -> str:
    """Render rows as an aligned text table. ``align``: one char per column, 'l' or 'r'."""
    cells = [[str(h) for h in headers]] + [["" if c is None else str(c) for c in r] for r in rows]
    widths = [max(len(r[i]) for r in cells) for i in range(len(headers))]
    align = align or "l" * len(headers)
    out = []
    for n, r in enumerate(cells):
        parts = [c.rjust(w) if a == "r" else c.ljust(w) for c, w, a in zip(r, widths, align, strict=False)]
        out.append("  ".join(parts).rstrip())
        if n == 0:
            out.append("  ".join("-" * w for w in widths))
    return "\n".join(out)


def usd(value: float, round_to: int = 1) -> str:
    """Money as a household reads it: $12,400 (negative as -$1,200)."""
    v = round(value / round_to) * round_to
    return f"-${abs(v):,.0f}" if v < 0 else f"${v:,.0f}"
