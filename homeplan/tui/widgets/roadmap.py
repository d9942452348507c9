"""The roadmap: one column per year, one row per project, steps as blocks, totals underneath."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.widgets import DataTable, Static

from homeplan.catalog import cautions as caution_texts
from homeplan.report.sources import catalog_source_words, step_sources
from homeplan.report.words import cost_source_words, size_words
from homeplan.tui.actions import bindings
from homeplan.tui.format import ESTIMATES, kusd_fit, trunc, usd, when, wrap_labels
from homeplan.tui.widgets.base import (
    View,
    ViewData,
    assumptions_text,
    banner_text,
    sources_text,
)

if TYPE_CHECKING:
    from homeplan.result import ProjectInfo
    from homeplan.result.roadmap import Step

__all__ = ["RoadmapView", "Row", "Timeline", "project_rows", "row_details"]

TOTAL_ROWS = (
    ("_spend", "Projects cost", "Installed cost of the year's projects, before any incentive."),
    ("_back", "Incentives in", "Incentive money reaching you that year (point-of-sale discounts "
     "count in the project year; rebates and tax credits when they arrive)."),
    ("_net", "Out of pocket", "Projects cost minus incentives arriving that year."),
    ("_bills", "Bill savings", "Your energy bills compared with doing nothing, that year."),
    ("_ahead", "Ahead of like-for-like", "Running total: money you are ahead (+) or behind (-) "
     "compared with replacing each thing like-for-like when it is due, counting projects, "
     "incentives, loans and bills."),
)


@dataclass(frozen=True)
class Row:
    """One project row: its step (if scheduled), its catalog info, and how the user set it."""

    id: str
    label: str
    step: Step | None
    info: ProjectInfo | None
    pinned: int | None
    excluded: bool


def project_rows(data: ViewData) -> list[Row]:
    """Scheduled projects by year, then those outside the horizon, then those left out."""
    rm = data.roadmap
    steps = {s.project_id: s for s in (rm.steps if rm else ())}
    infos = {p.id: p for p in (data.result.projects if data.result else ())}
    pins = dict(data.plan.choices.pins)
    excluded = set(data.plan.choices.exclude)
    ids = list(steps) + [pid for pid in infos if pid not in steps]
    ids += [pid for pid in (*pins, *excluded) if pid not in ids]
    rows = []
    for pid in ids:
        step, info = steps.get(pid), infos.get(pid)
        label = step.label if step else info.label if info else pid
        rows.append(Row(pid, label, step, info, pins.get(pid), pid in excluded))
    order = {pid: i for i, pid in enumerate(ids)}
    rows.sort(key=lambda r: (r.excluded, r.step is None, r.step.year if r.step else 0, order[r.id]))
    return rows


def _money_lines(step: Step) -> list[str]:
    pos = sum(i.amount_usd for i in step.incentives if i.kind == "point_of_sale")
    lines = [f"Installed cost {usd(step.cost_usd)} before incentives."]
    if pos:
        lines.append(f"Discount at the point of sale {usd(pos)}: you pay {usd(step.cost_usd - pos)} "
                     f"in {step.year}.")
    for inc in step.incentives:
        if inc.kind == "point_of_sale":
            continue
        lines.append(f"Then {usd(inc.amount_usd)} {inc.kind.replace('_', ' ')} from {inc.program}, "
                     f"arriving {when(inc.arrives)}.")
    lines.append(f"Net after all incentives: {usd(step.net_cost_usd)}.")
    if step.avoided_usd > 0:  # the comparison a household decides on
        lines.append(f"It takes the place of a like-for-like replacement due that year (about "
                     f"{usd(step.avoided_usd)}): {usd(step.incremental_cost_usd)} beyond it.")
    if step.financed_usd:
        lines.append(f"Paid by a loan: {usd(step.financed_usd)}.")
    return lines


def row_details(data: ViewData, row: Row) -> Text:
    """Everything about one project row, in words (reasons come from the engine)."""
    out = Text()
    rm = data.roadmap
    when = f"{row.step.year}" if row.step else "not in the plan"
    out.append(f"{row.label}", style="bold")
    out.append(f"  -  {when}")
    if row.id in data.moved:
        was = data.moved[row.id]
        out.append(f"   (was {was if was is not None else 'not in the plan'})", style="reverse")
    out.append("\n")
    info = row.info
    if row.step and (row.step.variant or row.step.size):
        out.append(", ".join(x for x in (row.step.variant, row.step.size) if x) + "\n")
    elif info and info.variant_label:
        out.append(", ".join(x for x in (info.variant_label, size_words(info.size, info.size_unit))
                             if x) + "\n")
    if row.pinned is not None:
        out.append(f"You pinned it to {row.pinned} (r releases it).\n")
    if row.excluded:
        out.append("You left it out (r releases it).\n")
    if row.step and rm is not None:
        for line in _money_lines(row.step):
            out.append(line + "\n")
        if row.step.reasons:
            out.append("Why this year:\n", style="bold")
            for reason in row.step.reasons:
                out.append(f"  - {reason}\n")
    elif info is not None:
        out.append(f"Cost today about {usd(info.cost_usd)} before incentives "
                   f"({cost_source_words(info.cost_source)}).\n")
        if not row.excluded:
            out.append("The planner did not place it within the horizon; p pins it to a year.\n")
        why = next((x.reason for x in (rm.left_out if rm is not None else ()) if x.project_id == row.id), None)
        if why:
            out.append("Why not: ", style="bold")
            out.append(why + "\n")
    texts = caution_texts(data.plan.home.electrical.code_edition)
    shown = row.step.cautions if row.step else tuple(texts[c] for c in (info.cautions if info else ())
                                                       if c in texts)
    for text in shown:
        out.append("Caution: ", style="bold")
        out.append(text + "\n")
    return out


class Timeline(DataTable):
    """The year grid. Cursor on a year cell: p pins the project to that year."""

    BINDINGS = bindings("roadmap")


class RoadmapView(View):
    title = "Roadmap"
    data: ViewData | None = None
    rows: list[Row] = []
    _width_key = 0
    _columns: tuple = ()
    show_all = False
    hidden_count = 0
    _legend = Text()

    def compose(self) -> ComposeResult:
        yield Static("", id="roadmap-banner", classes="banner")
        yield Static("", id="roadmap-legend", classes="legend")
        table = Timeline(id="timeline", cursor_type="cell", zebra_stripes=False, cell_padding=0)
        yield table
        with VerticalScroll(id="roadmap-details", classes="details"):
            yield Static("", id="roadmap-detail-text")

    def on_mount(self) -> None:
        self.rows: list[Row] = []
        self.data: ViewData | None = None
        self._width_key = 0
        self._columns: tuple = ()
        self.show_all = False
        self.hidden_count = 0

    # ----------------------------------------------------------------- drawing

    def _layout(self, n_years: int = 10) -> tuple[int, int]:
        width = self.app.size.width
        year_w = 7 if width >= 110 else 6 if width >= 95 else 5
        label_w = max(16, min(40, width - n_years * year_w - 3))
        return label_w, year_w

    def show(self, data: ViewData) -> None:
        self.data = data
        banner = self.query_one("#roadmap-banner", Static)
        text = banner_text(data)
        banner.update(text or "")
        banner.display = text is not None
        legend = Text()
        legend.append(" 6.2k ", style="reverse")
        legend.append(" step, net $  ")
        legend.append("░", style="dim")
        legend.append(" was  ")
        legend.append("▲", style="bold")
        legend.append(" pinned  ")
        legend.append("✕", style="bold")
        legend.append(" left out  ")
        self._legend = legend
        self._draw()

    def _draw(self) -> None:
        data = self.data
        if data is None:
            return
        table = self.query_one(Timeline)
        keep_row = table.cursor_row
        keep_col = table.cursor_column
        key_before = self.rows[keep_row].id if 0 <= keep_row < len(self.rows) else None
        rm = data.roadmap
        plan = data.plan
        first = rm.first_year if rm else plan.first_year
        horizon = rm.horizon_years if rm else plan.budget.horizon_years
        years = list(range(first, first + horizon))
        label_w, year_w = self._layout(len(years))
        self._width_key = self.app.size.width
        columns = (tuple(years), label_w, year_w)
        if columns == self._columns:
            table.clear()  # same grid: keep the columns, redraw the rows
        else:
            table.clear(columns=True)
            table.add_column(Text("Project", style="bold"), width=label_w, key="label")
            for y in years:
                table.add_column(Text(str(y).rjust(year_w), style="bold"), width=year_w,
                                 key=str(y))
            self._columns = columns
        rows = project_rows(data)
        hidden = [r for r in rows if r.step is None and r.pinned is None and not r.excluded
                  and r.id not in data.moved]
        self.rows = rows if self.show_all else [r for r in rows if r not in hidden]
        self.hidden_count = 0 if self.show_all else len(hidden)
        names = wrap_labels([r.label for r in self.rows], label_w - 3)
        for row, name in zip(self.rows, names, strict=True):
            mark = "▲ " if row.pinned is not None else "✕ " if row.excluded else "  "
            label = Text(mark + name.replace("\n", "\n  ") + " ",
                         style="dim" if row.excluded or row.step is None else "")
            cells: list[Text] = [label]
            moved_from = data.moved.get(row.id, "absent") if row.id in data.moved else "absent"
            for y in years:
                if row.step is not None and row.step.year == y:
                    style = "reverse bold" if row.id in data.moved else "reverse"
                    text = kusd_fit(row.step.net_cost_usd, year_w - 1)
                    cells.append(Text(text.rjust(year_w - 1) + " ", style=style))
                elif moved_from == y:
                    cells.append(Text("░" * (year_w - 1) + " ", style="dim"))
                elif row.pinned == y:
                    cells.append(Text("▲".rjust(year_w - 1) + " "))
                else:
                    cells.append(Text("·".rjust(year_w - 1) + " ", style="dim"))
            table.add_row(*cells, key=row.id, height=name.count("\n") + 1)
        if rm is not None:
            totals = {t.year: t for t in rm.years}
            base = rm.baseline("like_for_like") or rm.baseline("do_nothing")
            base_cum = {t.year: t.cumulative_usd for t in base.years} if base else {}
            for key, label, _ in TOTAL_ROWS:
                cells = [Text("Σ " + trunc(label, label_w - 3) + " ", style="bold")]
                for y in years:
                    t = totals.get(y)
                    if t is None:
                        cells.append(Text("".rjust(year_w)))
                        continue
                    value = {
                        "_spend": t.spend_usd,
                        "_back": t.incentives_usd,
                        "_net": t.net_usd,
                        "_bills": t.bill_savings_usd,
                        "_ahead": (base_cum[y] - t.cumulative_usd) if y in base_cum else None,
                    }[key]
                    text = kusd_fit(value, year_w - 1)
                    if key == "_ahead" and value is not None and value > 0:
                        text = kusd_fit(value, year_w - 2)
                        text = "+" + text
                    cells.append(Text(text.rjust(year_w - 1) + " "))
                table.add_row(*cells, key=key)
        ids = [r.id for r in self.rows]
        if key_before in ids:
            target = ids.index(key_before)
        else:
            target = min(max(keep_row, 0), max(table.row_count - 1, 0))
        if table.row_count:
            table.move_cursor(row=target, column=max(keep_col, 0), animate=False, scroll=False)
        legend = self._legend.copy()
        if self.hidden_count:
            legend.append(f"v: {self.hidden_count} more  ")
        legend.append(ESTIMATES.split(" - ")[0].lower(), style="italic")
        self.query_one("#roadmap-legend", Static).update(legend)
        self._update_details()

    def on_resize(self) -> None:
        if self.data is not None and self.app.size.width != self._width_key:
            self._draw()

    def toggle_all(self) -> None:
        self.show_all = not self.show_all
        self._draw()

    # ----------------------------------------------------------------- selection

    def current_row(self) -> Row | None:
        table = self.query_one(Timeline)
        i = table.cursor_row
        return self.rows[i] if 0 <= i < len(self.rows) else None

    def current_year(self) -> int | None:
        table = self.query_one(Timeline)
        col = table.cursor_column
        if col <= 0 or self.data is None:
            return None
        rm = self.data.roadmap
        first = rm.first_year if rm else self.data.plan.first_year
        return first + col - 1

    def on_data_table_cell_highlighted(self) -> None:
        self._update_details()

    def _update_details(self) -> None:
        if self.data is None:
            return
        text_widget = self.query_one("#roadmap-detail-text", Static)
        row = self.current_row()
        if row is not None:
            text_widget.update(row_details(self.data, row))
            return
        table = self.query_one(Timeline)
        i = table.cursor_row - len(self.rows)
        if 0 <= i < len(TOTAL_ROWS) and table.cursor_row < table.row_count:
            _, label, explain = TOTAL_ROWS[i]
            text_widget.update(Text.assemble((label, "bold"), " (per year, US dollars, k = "
                                             "thousand)\n", explain))
        else:
            text_widget.update(Text("Move to a project to see its details and reasons.",
                                    style="italic"))

    def focus_main(self) -> None:
        self.query_one(Timeline).focus()

    def where_from(self, data: ViewData) -> Text:
        out = Text()
        row = self.current_row()
        if row is not None and row.step is not None:
            out.append_text(sources_text(step_sources(row.step, row.info, data.plan)))
        elif row is not None and row.info is not None:
            out.append(f"{row.info.label}: ", style="bold")
            out.append(f"today's price {usd(row.info.cost_usd)}\n")
            out.append(f"    from {catalog_source_words(row.info.cost_source)}\n", style="italic")
        out.append_text(assumptions_text(data))
        out.append("Step years come from the scheduler; reasons are its own explanation.")
        return out
