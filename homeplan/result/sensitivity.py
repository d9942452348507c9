"""Which assumptions move a roadmap's net present value most: each at a low and a high setting.

References
----------
None: data containers. The figures come from :mod:`homeplan.planner.sensitivity`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

__all__ = ["Sensitivity", "SensitivityRow"]


@dataclass(frozen=True)
class SensitivityRow:
    """One assumption re-planned at a low and a high setting.

    Attributes
    ----------
    key : str
        Assumption id, e.g. ``discount_rate`` or ``escalation:gas``.
    label : str
        The assumption in words.
    low_label : str
        The low setting in words.
    high_label : str
        The high setting in words.
    low_npv_usd : float
        Net present value against doing nothing at the low setting, USD.
    high_npv_usd : float
        The same at the high setting, USD.
    source : str
        Where the two settings come from.
    """

    key: str
    label: str
    low_label: str
    high_label: str
    low_npv_usd: float
    high_npv_usd: float
    source: str = ""

    @property
    def swing_usd(self) -> float:
        """How far apart the two settings put the NPV, USD."""
        return abs(self.high_npv_usd - self.low_npv_usd)

    def to_dict(self) -> dict[str, Any]:
        return {"key": self.key, "label": self.label, "low_label": self.low_label,
                "high_label": self.high_label, "low_npv_usd": round(self.low_npv_usd, 2),
                "high_npv_usd": round(self.high_npv_usd, 2), "swing_usd": round(self.swing_usd, 2),
                "source": self.source}


@dataclass(frozen=True)
class Sensitivity:
    """The assumptions ranked by how much they move the NPV (largest swing first).

    Attributes
    ----------
    base_npv_usd : float
        The roadmap's NPV as planned, USD.
    rows : tuple of SensitivityRow
        One per assumption, ranked.
    notes : tuple of str
        Assumptions left out and why.
    """

    base_npv_usd: float
    rows: tuple[SensitivityRow, ...]
    notes: tuple[str, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        return {"base_npv_usd": round(self.base_npv_usd, 2), "rows": [r.to_dict() for r in self.rows],
                "notes": list(self.notes)}
