"""Energy: monthly energy by fuel before and after, electricity use against solar, emissions."""

from __future__ import annotations

from typing import TYPE_CHECKING

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.widgets import Static

from homeplan.report.fmt import peak_demand_kw
from homeplan.report.sources import energy_sources
from homeplan.report.view import bill_fit_lines
from homeplan.tui.format import ESTIMATES, bar, fuel_label, num, usd
from homeplan.tui.widgets.base import View, ViewData, assumptions_text, banner_text, sources_text

if TYPE_CHECKING:
    from homeplan.result import EnergySummary

__all__ = ["EnergyView", "balance_text", "emissions_text", "monthly_table"]

MONTHS = "JFMAMJJASOND"


def _compact(v: float) -> str:
    if v >= 9950:
        return f"{v / 1000:.0f}k"
    if v >= 1000:
        return f"{v / 1000:.1f}k"
    return f"{v:.0f}"


def monthly_table(before: EnergySummary, after: EnergySummary) -> Table:
    """Months down, fuels across (now and after the plan side by side)."""
    t = Table(box=None, padding=(0, 1, 0, 0), show_edge=False, header_style="bold")
    skip = ("solar", "grid_")
    keys = [k for k in before.monthly if not k.startswith(skip)]
    keys += [k for k in after.monthly if k not in keys and not k.startswith(skip)]
    solar = next((k for k in after.monthly if k.startswith("solar")), None)
    t.add_column("\n", no_wrap=True)
    for key in keys:
        t.add_column(fuel_label(key) + "\nnow", justify="right", no_wrap=True)
        t.add_column("\nafter", justify="right", no_wrap=True, style="bold")
    if solar:
        t.add_column("Solar\nafter", justify="right", no_wrap=True)
    names = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")

    def cell(summary: EnergySummary, key: str, i: int) -> str:
        values = summary.monthly.get(key)
        return _compact(values[i]) if values is not None else "0"  # fuel no longer used

    for i, m in enumerate(names):
        row = [m]
        for key in keys:
            row += [cell(before, key, i), cell(after, key, i)]
        if solar:
            row.append(cell(after, solar, i))
        t.add_row(*row)
    total = ["Year"]
    for key in keys:
        for summary in (before, after):
            values = summary.monthly.get(key)
            total.append(_compact(summary.annual.get(key, sum(values or ()))) if values else "0")
    if solar:
        total.append(_compact(after.annual.get(solar, sum(after.monthly[solar]))))
    t.add_row(*total, style="bold")
    return t


def balance_text(after: EnergySummary, width: int) -> Text:
    """Monthly electricity use against solar production after the plan."""
    out = Text()
    use = after.monthly.get("electricity_kwh")
    solar = next((v for k, v in after.monthly.items() if k.startswith("solar")), None)
    if use is None:
        return out
    out.append("Electricity use (█) against solar production (▒) after the plan, kWh per month\n",
               style="bold")
    top = max(max(use), max(solar) if solar else 0)
    bar_w = max(10, (width - 24) // 2)
    for i, m in enumerate(("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct",
                           "Nov", "Dec")):
        s = solar[i] if solar else 0.0
        out.append(f"{m} {bar(use[i], top, bar_w):<{bar_w}}", style="bold")
        out.append(f" {bar(s, top, bar_w).replace('█', '▒'):<{bar_w}}")
        out.append(f" {use[i] - s:+,.0f}\n")
    out.append("(last column: use minus solar; negative means more produced than used)\n",
               style="italic")
    made, sent = after.annual.get("solar_kwh", 0.0), after.annual.get("grid_export_kwh", 0.0)
    if made > 0:
        out.append(f"Solar makes {made:,.0f} kWh a year: {made - sent:,.0f} used at home, {sent:,.0f} "
                   f"exported ({sent / made * 100:.0f} %).\n")
    return out


def emissions_text(data: ViewData) -> Text:
    rm = data.roadmap
    out = Text()
    if rm is None or not rm.years:
        return out
    out.append("Emissions per year, tonnes CO2e\n", style="bold")
    top = max(t.emissions_kg for t in rm.years) or 1.0
    base = rm.baseline("do_nothing")
    base_by = {t.year: t.emissions_kg for t in base.years} if base else {}
    for t in rm.years:
        out.append(f"{t.year} {bar(t.emissions_kg, top, 24):<24} {t.emissions_kg / 1000:5.1f}")
        if t.year in base_by:
            out.append(f"   (doing nothing {base_by[t.year] / 1000:.1f})", style="dim")
        out.append("\n")
    return out


class EnergyView(View):
    title = "Energy"

    def compose(self) -> ComposeResult:
        yield Static("", id="energy-banner", classes="banner")
        with VerticalScroll(id="energy-scroll"):
            yield Static("", id="energy-monthly")
            yield Static("", id="energy-balance")
            yield Static("", id="energy-emissions")
            yield Static("", id="energy-bills")

    def show(self, data: ViewData) -> None:
        banner = self.query_one("#energy-banner", Static)
        text = banner_text(data)
        banner.update(text or "")
        banner.display = text is not None
        width = self.app.size.width
        if data.result is None:
            for wid in ("#energy-monthly", "#energy-balance", "#energy-emissions", "#energy-bills"):
                self.query_one(wid, Static).update("")
            return
        before, after = data.result.energy_before, data.result.energy_after
        head = Text("Energy by month in a typical weather year: now and after the whole plan\n",
                    style="bold")
        self.query_one("#energy-monthly", Static).update(_stack(head, monthly_table(before, after)))
        self.query_one("#energy-balance", Static).update(balance_text(after, width))
        self.query_one("#energy-emissions", Static).update(emissions_text(data))
        bills = Text()
        bills.append("Bills in a typical year  ", style="bold")
        bills.append(f"now {usd(sum(before.bills_usd.values()))}, after "
                     f"{usd(sum(after.bills_usd.values()))}; peak demand now "
                     f"{num(peak_demand_kw(before), 'kW', 1)}, after {num(peak_demand_kw(after), 'kW', 1)}; "
                     f"emissions now {before.emissions_kg / 1000:.1f} t, after "
                     f"{after.emissions_kg / 1000:.1f} t CO2e.\n")
        fits = bill_fit_lines(data.result.roadmap)
        if fits:
            bills.append("Model of today's home against your bills\n", style="bold")
            for line in fits:
                bills.append(f"  {line}\n")
        bills.append(ESTIMATES, style="italic")
        self.query_one("#energy-bills", Static).update(bills)

    def where_from(self, data: ViewData) -> Text:
        """The yearly totals with their method, then the assumptions."""
        out = Text()
        if data.result is not None:
            out.append_text(sources_text(energy_sources(data.result)))
        return out.append_text(assumptions_text(data))

    def focus_main(self) -> None:
        self.query_one("#energy-scroll").focus()


def _stack(*parts):
    from rich.console import Group

    return Group(*parts)
