"""Power: the service load calculation today and after each step, headroom, the remedy chosen."""

from __future__ import annotations

from typing import TYPE_CHECKING

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.widgets import DataTable, Static

from homeplan.catalog import cautions
from homeplan.report.fmt import service_verdict
from homeplan.report.sources import capacity_sources
from homeplan.report.words import load_words, short_words
from homeplan.tui.format import num, trunc, wrap_cell
from homeplan.tui.widgets.base import View, ViewData, assumptions_text, banner_text, sources_text

if TYPE_CHECKING:
    from homeplan.result import CapacityState

__all__ = ["PowerView", "caution_text", "state_details"]


def caution_text(edition: int = 2023) -> Text:
    out = Text()
    out.append("Safety: ", style="bold")
    texts = cautions(edition)
    out.append(texts["electrical"] + " " + texts["code_edition"])
    out.append(" Load figures here are planning estimates.", style="italic")
    return out


def state_details(state: CapacityState, width: int) -> Text:
    out = Text()
    out.append(f"{state.label}", style="bold")
    out.append(f"  ({state.method})\n")
    if not state.applies:  # a method that does not apply to this home: say why
        for n in state.notes:
            out.append(f"- {n}\n")
        return out
    name_w = max(18, min(40, width - 44))
    prefix = " ".join(state.method.split()[:2]) + " "  # "NEC 2023 "
    out.append("Each load in VA (volt-amperes, about watts); the code counts a share of some.\n",
               style="italic")
    out.append(f"{'Load':<{name_w}} {'rated':>8} {'share':>7} {'counted':>9}  code section\n",
               style="bold")
    for r in state.rows:
        factor = "" if r.factor is None else f"{r.factor * 100:.0f} %"
        counted = "" if r.counted_va is None else f"{r.counted_va:,.0f}"
        out.append(f"{trunc(load_words(r.name), name_w):<{name_w}} {r.va:>8,.0f} {factor:>7} "
                   f"{counted:>9}  {r.section.removeprefix(prefix)}\n")
    out.append(f"{'Total':<{name_w}} {'':>8} {'':>7} {state.total_va:>9,.0f}  "
               f"= {state.amps:.0f} A on a {state.service_amps:.0f} A service: "
               f"{service_verdict(state.fits, state.near_limit, state.load_pct)}\n", style="bold")
    if state.remedy:
        out.append("Remedy: ", style="bold")
        out.append(state.remedy + "\n")
    for n in state.notes:
        out.append(f"- {n}\n")
    return out


class PowerView(View):
    title = "Power"
    states: tuple[CapacityState, ...] = ()

    def compose(self) -> ComposeResult:
        yield Static("", id="power-banner", classes="banner")
        yield DataTable(id="power-table", cursor_type="row")
        with VerticalScroll(id="power-details", classes="details"):
            yield Static("", id="power-detail-text")
        yield Static(caution_text(), id="power-caution", classes="caution")

    def on_mount(self) -> None:
        self.states: tuple[CapacityState, ...] = ()

    def show(self, data: ViewData) -> None:
        self.query_one("#power-caution", Static).update(
            caution_text(data.plan.home.electrical.code_edition))
        banner = self.query_one("#power-banner", Static)
        text = banner_text(data)
        banner.update(text or "")
        banner.display = text is not None
        table = self.query_one("#power-table", DataTable)
        keep = table.cursor_row
        table.clear(columns=True)
        wide = self.app.size.width >= 100
        when_w = 34 if wide else max(24, self.app.size.width - 46)  # the numbers take about 44
        table.add_column("When", width=when_w, key="when")
        for key, label in (("load", "Load A"), ("service", "Service A"), ("head", "Headroom A"),
                           ("fits", "Fits")):
            table.add_column(Text(label, justify="right"), key=key)
        if wide:
            table.add_column("Remedy", key="remedy")
        self.states = data.result.capacity if data.result is not None else ()
        for i, s in enumerate(self.states):
            fits = (Text("NO", style="bold reverse") if not s.fits else
                    Text(f"near {s.load_pct:.0f}%", style="bold") if s.near_limit else Text("yes"))
            label = wrap_cell(s.label if len(s.label) <= when_w else short_words(s.label), when_w)
            table.add_row(Text(label),
                          Text(num(s.amps), justify="right"),
                          Text(num(s.service_amps), justify="right"),
                          Text(num(s.headroom_amps), justify="right",
                               style="" if s.headroom_amps is None or s.headroom_amps >= 0 else "bold"),
                          fits, *([Text(trunc(s.remedy or "-", 40))] if wide else []), key=str(i),
                          height=label.count("\n") + 1)
        if self.states:
            table.move_cursor(row=min(max(keep, 0), len(self.states) - 1), animate=False,
                              scroll=False)
        self._details()

    def on_data_table_row_highlighted(self) -> None:
        self._details()

    def _details(self) -> None:
        i = self.query_one("#power-table", DataTable).cursor_row
        widget = self.query_one("#power-detail-text", Static)
        if 0 <= i < len(self.states):
            widget.update(state_details(self.states[i], self.app.size.width))
        else:
            widget.update(Text("The load calculation appears when the plan is ready. "
                               "All figures are planning estimates.", style="italic"))

    def focus_main(self) -> None:
        self.query_one("#power-table").focus()

    def where_from(self, data: ViewData) -> Text:
        """The row under the cursor, each figure with its source, then the assumptions."""
        out = Text()
        i = self.query_one("#power-table", DataTable).cursor_row
        if 0 <= i < len(self.states):
            out.append_text(sources_text(capacity_sources(self.states[i])))
        out.append("The load calculation follows the method named on each row (NEC article "
                   "220). A licensed electrician must confirm it before any work.\n")
        return out.append_text(assumptions_text(data))
