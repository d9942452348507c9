"""Money: cash flow per year and the running total, the plan beside the two baselines."""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.widgets import DataTable, Static

from homeplan.report.risk import risk_lines
from homeplan.report.sources import money_sources
from homeplan.report.view import comparison_lines
from homeplan.tui.format import ESTIMATES, kusd, spark, usd
from homeplan.tui.widgets.base import View, ViewData, assumptions_text, banner_text, sources_text

__all__ = ["MoneyView", "band_chart", "running_chart"]

BASELINES = (("do_nothing", "Do nothing"), ("like_for_like", "Like for like"))


def running_chart(data: ViewData, width: int) -> Text:
    """The running cost of each path as a row of bars on a shared scale, lowest is best."""
    rm = data.roadmap
    out = Text()
    if rm is None or not rm.years:
        return out
    series = [("This plan", [t.cumulative_usd for t in rm.years])]
    for name, label in BASELINES:
        b = rm.baseline(name)
        if b is not None and b.years:
            series.append((label, [t.cumulative_usd for t in b.years]))
    top = max((max(v) for _, v in series if v), default=0)
    label_w = 24
    out.append("Running total spent (projects + loans + bills), one bar per year\n", style="bold")
    for label, values in series:
        out.append(label.ljust(label_w)[:label_w])
        stretch = max(1, min(3, (width - label_w - 12) // max(len(values), 1)))
        out.append("".join(ch * stretch for ch in spark(values, top)),
                   style="bold" if label == "This plan" else "")
        out.append(f"  {usd(values[-1]) if values else '-'}\n")
    return out


def band_chart(data: ViewData, width: int) -> Text:
    """Each year's energy bills across the price paths, the plan above doing nothing: a line from
    P10 to P90 with the median marked, on one dollar scale."""
    rm = data.roadmap
    out = Text()
    risk = rm.price_risk if rm is not None else None
    if risk is None or not risk.years:
        return out
    label_w, value_w = 13, 7
    span = max(12, min(60, width - label_w - value_w - 8))
    lo = min(min(y.plan_bills_usd.p10, y.do_nothing_bills_usd.p10) for y in risk.years)
    hi = max(max(y.plan_bills_usd.p90, y.do_nothing_bills_usd.p90) for y in risk.years)
    scale = span / max(hi - lo, 1.0)

    def row(b) -> str:  # noqa: ANN001 - a Band
        cells = [" "] * (span + 1)
        a, c, m = (round((v - lo) * scale) for v in (b.p10, b.p90, b.p50))
        for i in range(a, c + 1):
            cells[i] = "─"
        cells[m] = "●"
        return "".join(cells)

    out.append(f"Energy bills each year across {risk.paths:,} price paths (─ P10 to P90, ● median)\n",
               style="bold")
    out.append(" " * label_w + kusd(lo).ljust(span - 4) + kusd(hi).rjust(5) + "\n", style="dim")
    for y in risk.years:
        out.append(f"{y.year} plan".ljust(label_w))
        out.append(row(y.plan_bills_usd), style="bold")
        out.append(f" {kusd(y.plan_bills_usd.p50):>{value_w}}\n")
        out.append("     nothing".ljust(label_w))
        out.append(row(y.do_nothing_bills_usd), style="dim")
        out.append(f" {kusd(y.do_nothing_bills_usd.p50):>{value_w}}\n")
    return out


class MoneyView(View):
    title = "Money"

    def compose(self) -> ComposeResult:
        yield Static("", id="money-banner", classes="banner")
        yield DataTable(id="money-table", cursor_type="row", zebra_stripes=True)
        with VerticalScroll(id="money-chart", classes="details"):
            yield Static("", id="money-chart-text")

    def show(self, data: ViewData) -> None:
        banner = self.query_one("#money-banner", Static)
        text = banner_text(data)
        banner.update(text or "")
        banner.display = text is not None
        table = self.query_one("#money-table", DataTable)
        keep = table.cursor_row
        table.clear(columns=True)
        rm = data.roadmap
        loans = rm is not None and any(t.loan_payments_usd for t in rm.years)
        columns = [("year", "Year"), ("spend", "Projects"), ("back", "Back"),
                   ("loan", "Loans"), ("bills", "Bills"), ("plan", "Plan Σ"),
                   ("none", "Nothing Σ"), ("lfl", "Like Σ"), ("ahead", "Ahead")]
        if not loans:
            columns.remove(("loan", "Loans"))
        for key, label in columns:
            table.add_column(Text(label, style="bold", justify="right"), key=key)
        if rm is not None:
            b = rm.baseline("do_nothing")
            nothing = {t.year: t for t in (b.years if b else ())}
            b = rm.baseline("like_for_like")
            lfl = {t.year: t for t in (b.years if b else ())}
            for t in rm.years:
                n, s = nothing.get(t.year), lfl.get(t.year)
                ref = s or n  # the comparison a household decides on; doing nothing without it
                ahead = (ref.cumulative_usd - t.cumulative_usd) if ref else None
                cells = [str(t.year), kusd(t.spend_usd), kusd(t.incentives_usd)]
                if loans:
                    cells.append(kusd(t.loan_payments_usd))
                cells += [kusd(t.total_bills_usd), kusd(t.cumulative_usd),
                          kusd(n.cumulative_usd) if n else "-", kusd(s.cumulative_usd) if s else "-",
                          ("+" if ahead and ahead > 0 else "") + kusd(ahead)]
                table.add_row(*(Text(c, justify="right") for c in cells), key=str(t.year))
            if table.row_count:
                table.move_cursor(row=min(max(keep, 0), table.row_count - 1), animate=False,
                                  scroll=False)
        chart = running_chart(data, self.app.size.width)
        if rm is not None:
            for what, value, _ in comparison_lines(data.result):  # like for like first
                chart.append(f"{what}: ", style="bold")
                chart.append(f"{value} (net present value, today's dollars)\n")
            chart.append("US dollars, k = thousand. Back: incentives arriving. Σ: running total "
                         "since the first year for this plan, doing nothing, and replacing each "
                         "thing with the same kind on the same fuel when it wears out (like for like). Ahead: like for "
                         "like minus this plan."
                         "\n")
            lines = risk_lines(rm)
            if lines:
                chart.append("\nPrice risk\n", style="bold")
                for line in lines:
                    chart.append(line + "\n")
                chart.append("\n")
                chart.append_text(band_chart(data, self.app.size.width))
        chart.append(ESTIMATES, style="italic")
        self.query_one("#money-chart-text", Static).update(chart)

    def where_from(self, data: ViewData) -> Text:
        """The year under the cursor, each figure with its source, then the assumptions."""
        out = Text()
        if data.result is not None and data.roadmap is not None:
            table = self.query_one("#money-table", DataTable)
            years = [t.year for t in data.roadmap.years]
            year = years[table.cursor_row] if 0 <= table.cursor_row < len(years) else None
            out.append_text(sources_text(money_sources(data.plan, data.result, year)))
        return out.append_text(assumptions_text(data))

    def focus_main(self) -> None:
        self.query_one("#money-table").focus()
