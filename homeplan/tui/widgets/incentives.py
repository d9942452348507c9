"""Incentives: the programs this roadmap uses, what each pays per year, caps and end dates."""

from __future__ import annotations

from typing import TYPE_CHECKING

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.widgets import DataTable, Static

from homeplan.report.sources import program_sources
from homeplan.report.words import caps_words
from homeplan.tui.actions import bindings
from homeplan.tui.format import ESTIMATES, kusd, usd, wrap_cell
from homeplan.tui.widgets.base import View, ViewData, assumptions_text, banner_text, sources_text

if TYPE_CHECKING:
    from homeplan.result import ProgramUse

__all__ = ["IncentivesView", "ProgramTable", "program_details"]


def program_details(p: ProgramUse) -> Text:
    out = Text()
    out.append(p.name, style="bold")
    out.append(f"  ({p.kind.replace('_', ' ')})\n")
    total = sum(p.paid_by_year.values())
    out.append(f"Pays {usd(total)} in this roadmap")
    years = [f"{y}: {usd(v)}" for y, v in sorted(p.paid_by_year.items()) if v]
    if years:
        out.append(" - " + ", ".join(years))
    out.append(".\n")
    if p.caps_note:
        out.append(f"How much it pays: {caps_words(p.caps_note)}\n")
    out.append(f"Closes: {p.ends}\n" if p.ends else "No closing date announced.\n")
    return out


class ProgramTable(DataTable):
    BINDINGS = bindings("incentives")


class IncentivesView(View):
    title = "Incentives"
    programs: tuple[ProgramUse, ...] = ()
    _data: ViewData | None = None

    def compose(self) -> ComposeResult:
        yield Static("", id="incentives-banner", classes="banner")
        yield ProgramTable(id="incentives-table", cursor_type="row")
        with VerticalScroll(id="incentives-details", classes="details"):
            yield Static("", id="incentives-detail-text")

    def on_mount(self) -> None:
        self.programs: tuple[ProgramUse, ...] = ()

    def show(self, data: ViewData) -> None:
        banner = self.query_one("#incentives-banner", Static)
        text = banner_text(data)
        banner.update(text or "")
        banner.display = text is not None
        table = self.query_one("#incentives-table", DataTable)
        keep = table.cursor_row
        table.clear(columns=True)
        self.programs = data.result.programs if data.result is not None else ()
        years = sorted({y for p in self.programs for y, v in p.paid_by_year.items() if v})
        # the name takes what the money columns leave (Total, one per year, Ends, cell padding),
        # so that names - and their "(invented)" mark - show whole where the screen allows
        room = self.app.size.width - (9 + 8 * len(years) + 13 + 6)
        name_w = max(18, min(40, room))
        table.add_column("Program", width=name_w, key="name")
        table.add_column(Text("Total", justify="right"), key="total")
        for y in years:
            table.add_column(Text(str(y), justify="right"), key=str(y))
        table.add_column("Ends", key="ends")
        for i, p in enumerate(self.programs):
            name = wrap_cell(p.name, name_w)
            cells = [Text(name),
                     Text(kusd(sum(p.paid_by_year.values())), justify="right", style="bold")]
            cells += [Text(kusd(p.paid_by_year.get(y, 0.0)) if p.paid_by_year.get(y) else "·",
                           justify="right") for y in years]
            cells.append(Text(p.ends or "-"))
            table.add_row(*cells, key=str(i), height=name.count("\n") + 1)
        if self.programs:
            table.move_cursor(row=min(max(keep, 0), len(self.programs) - 1), animate=False,
                              scroll=False)
        self._details(data)
        self._data = data

    def on_data_table_row_highlighted(self) -> None:
        if getattr(self, "_data", None) is not None:
            self._details(self._data)

    def _details(self, data: ViewData) -> None:
        i = self.query_one("#incentives-table", DataTable).cursor_row
        widget = self.query_one("#incentives-detail-text", Static)
        if 0 <= i < len(self.programs):
            body = program_details(self.programs[i])
        elif data.result is not None:
            body = Text("No incentive program applies to this roadmap.\n")
        else:
            body = Text()
        body.append(ESTIMATES + " Programs change: check each one before you count on it.",
                    style="italic")
        widget.update(body)

    def where_from(self, data: ViewData) -> Text:
        """The program under the cursor, each figure with its source, then the assumptions."""
        out = Text()
        i = self.query_one("#incentives-table", DataTable).cursor_row
        if 0 <= i < len(self.programs):
            out.append_text(sources_text(program_sources(data.plan, self.programs[i])))
        return out.append_text(assumptions_text(data))

    def focus_main(self) -> None:
        self.query_one("#incentives-table").focus()
