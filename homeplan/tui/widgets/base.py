"""What every view receives, and the base class the views share."""

from __future__ import annotations

import textwrap
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING

from rich.text import Text
from textual.containers import Vertical

from homeplan.planner.lifecycle import plan_outlooks
from homeplan.report.sources import Sourced, assumption_sources
from homeplan.report.view import emergency_lines

if TYPE_CHECKING:
    from homeplan.plan.model import Plan
    from homeplan.result import PlanResult
    from homeplan.result.outlook import LifeOutlook

__all__ = ["View", "ViewData", "assumptions_text", "banner_text", "sources_text"]


@dataclass(frozen=True)
class ViewData:
    """The plan as edited now, and the latest planner result (possibly for an earlier edit)."""

    plan: Plan
    result: PlanResult | None
    path: Path
    moved: dict[str, int | None] = field(default_factory=dict)  # id -> year before the last re-plan
    changes: tuple[str, ...] = ()     # what the last re-plan changed, in words
    planning: bool = False
    error: str | None = None          # the last planner or edit error, in words
    unavailable: str | None = None    # why there is no planner at all
    _cache: dict = field(default_factory=dict, compare=False, repr=False)

    @property
    def outlooks(self) -> tuple[LifeOutlook, ...]:
        """End-of-life outlooks of the plan as edited (the result's, when it is for this plan)."""
        if "outlooks" not in self._cache:
            if self.result is not None and self.result.plan == self.plan:
                self._cache["outlooks"] = tuple(self.result.outlooks)
            else:
                self._cache["outlooks"] = tuple(plan_outlooks(self.plan))
        return self._cache["outlooks"]

    @property
    def roadmap(self):
        return self.result.roadmap if self.result is not None else None

    @property
    def infeasible(self) -> str | None:
        r = self.roadmap
        if r is not None and r.status == "infeasible":
            return r.infeasibility or "No roadmap meets every requirement with this budget."
        return None


def banner_text(data: ViewData) -> Text | None:
    """The one line (or two) about the planner's state that views show above their content."""
    if data.unavailable:
        return Text(f"Planner not available: {data.unavailable}. "
                    "The home and editing still work.", style="bold")
    if data.error:
        return Text(f"! {data.error}", style="bold")
    if data.infeasible:
        return Text(f"! No roadmap fits: {data.infeasible}", style="bold")
    if data.result is None:
        return Text("Planning... the roadmap appears here in a moment.", style="italic")
    urgent = emergency_lines(data.result.roadmap)
    if urgent:
        return Text("! " + " ".join(urgent), style="bold")
    return None


class View(Vertical):
    """A view of the plan; ``show`` is called with fresh data after every edit and re-plan."""

    title = "View"

    def show(self, data: ViewData) -> None:  # pragma: no cover - overridden
        raise NotImplementedError

    def focus_main(self) -> None:
        """Focus the view's main widget (called when the view is opened)."""
        for child in self.query("*"):
            if child.can_focus:
                child.focus()
                return

    def where_from(self, data: ViewData) -> Text:
        """Where this view's numbers come from (shown with the 'w' key)."""
        out = Text("Numbers on this view are computed by homeplan from your plan file and its "
                   "built-in price and equipment lists. They are planning estimates.\n")
        return out.append_text(assumptions_text(data))


SOURCES_WIDTH = 70
"""Width the sources panel's lines are wrapped to (with hanging indents); fits 80 columns."""


def sources_text(lines: Sequence[Sourced]) -> Text:
    """Figures with their sources: each figure's name and value on one line, "from ..." under
    it; the figures of one step under the step's name."""
    out = Text()
    group = None
    for x in lines:
        if x.group != group:
            group = x.group
            if group:
                out.append(f"{group}\n", style="bold underline")
        first = textwrap.wrap(f"{x.what}: {x.value}", SOURCES_WIDTH, initial_indent="  ",
                              subsequent_indent="      ")
        out.append(first[0][: len(x.what) + 3], style="bold")
        out.append("\n".join(first)[len(x.what) + 3:] + "\n")
        where = x.source if x.source.startswith("computed") else f"from {x.source}"
        out.append("\n".join(textwrap.wrap(where, SOURCES_WIDTH, initial_indent="    ",
                                           subsequent_indent="      ")) + "\n", style="italic")
    return out


def assumptions_text(data: ViewData) -> Text:
    """The assumptions behind the result, each with its source (the printout's lines), and the
    planner's notes."""
    out = Text()
    if data.result is not None:
        out.append("Assumptions behind these numbers:\n", style="bold")
        out.append_text(sources_text(assumption_sources(data.plan, data.result)))
    if data.result is not None and data.result.warnings:
        out.append("Notes from the planner:\n", style="bold")
        for w in data.result.warnings:
            out.append(f"  - {w}\n")
    return out
