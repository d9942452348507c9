"""The first view: what do I do next, what does it cost me this year, how far from all-electric."""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.widgets import Static

from homeplan.plan.fuels import FOSSIL_FUELS, appliance_fuel
from homeplan.report.view import step_safety
from homeplan.tui.format import ESTIMATES, trunc, usd
from homeplan.tui.widgets.base import View, ViewData, banner_text

__all__ = [
    "OverviewView",
    "electric_text",
    "fossil_items",
    "next_text",
    "replaced_by_year",
    "this_year_text",
    "when",
]


def fossil_items(data: ViewData) -> list[str]:
    """Keys of the appliances and vehicles that burn fuel today (from the plan's own inputs)."""
    plan = data.plan
    keys = [a.key for a in plan.appliances if appliance_fuel(a) in FOSSIL_FUELS]
    keys += [plan.vehicle_key(i) for i, v in enumerate(plan.vehicles) if v.fuel != "electric"]
    return keys


def replaced_by_year(data: ViewData) -> dict[str, int]:
    """Item key -> the year a roadmap step replaces it."""
    out: dict[str, int] = {}
    if data.result is None:
        return out
    for s in data.result.roadmap.steps:
        info = data.result.project(s.project_id)
        for key in (info.replaces if info else ()):
            out.setdefault(key, s.year)
    return out


def next_text(data: ViewData, width: int = 80) -> Text:
    """The first year's steps, one line each, with what the household pays and gets back."""
    out = Text()
    rm = data.roadmap
    if rm is None or not rm.steps:
        out.append("Nothing scheduled yet." if rm is not None else "Waiting for the planner.",
                   style="italic")
        return out
    first_year = rm.steps[0].year
    now = rm.steps_in(first_year)
    label_w = max(16, min(36, width - 50))
    for s in now[:4]:
        pos = sum(i.amount_usd for i in s.incentives if i.kind == "point_of_sale")
        later = [i for i in s.incentives if i.kind != "point_of_sale"]
        out.append(f"{s.year} ")
        out.append(trunc(s.label, label_w).ljust(label_w), style="bold")
        out.append(f" {usd(s.cost_usd - pos):>8}")
        notes = []
        if pos:
            notes.append(f"{usd(pos)} off")
        notes += [f"+{usd(i.amount_usd)} {when(i.arrives)}" for i in later]
        if notes:
            out.append("  " + ", ".join(notes), style="italic")
        out.append("\n")
    if len(now) > 4:
        out.append(f"     and {len(now) - 4} more in {first_year}\n")
    if now[0].reasons:
        out.append("Why now: ", style="bold")
        out.append(f"{now[0].reasons[0]}\n")
    edition = data.plan.home.electrical.code_edition
    safety = "; ".join(dict.fromkeys(t for s in now for t in step_safety(s, edition).split("; ") if t))
    if safety:
        out.append("Safety: ", style="bold")
        out.append(f"{safety} (Roadmap, enter: the details)\n")
    after = [s for s in rm.steps if s.year > first_year]
    if after:
        shown = 3 if width >= 100 else 2
        out.append("Then: ", style="bold")
        out.append(", ".join(f"{s.label} ({s.year})" for s in after[:shown]))
        if len(after) > shown:
            out.append(f" and {len(after) - shown} more")
        out.append("\n")
    return out


def when(arrives) -> str:
    """A date as 'May 2027'; a year as itself."""
    if hasattr(arrives, "strftime"):
        return arrives.strftime("%b %Y")
    return str(arrives)


def this_year_text(data: ViewData) -> Text:
    out = Text()
    rm = data.roadmap
    plan = data.plan
    year = rm.first_year if rm else plan.first_year
    if rm is None or not rm.years:
        out.append(f"Budget {usd(plan.budget.usd_per_year)} a year from {year}.", style="italic")
        return out
    t = rm.years[0]
    steps = rm.steps_in(year)
    pos = sum(i.amount_usd for s in steps for i in s.incentives if i.kind == "point_of_sale")
    later = sum(i.amount_usd for s in steps for i in s.incentives if i.kind != "point_of_sale")
    out.append(f"{year}: ", style="bold")
    out.append(f"{usd(t.spend_usd - pos)} out of pocket", style="bold")
    budget = (plan.budget.by_year or {}).get(year, plan.budget.usd_per_year)
    out.append(f" (budget {usd(budget)})")
    if later:
        out.append(f"; {usd(later)} comes back later")
    out.append(".\n")
    if t.loan_payments_usd:
        out.append(f"Loan payments {usd(t.loan_payments_usd)}. ")
    saving = t.bill_savings_usd
    word = "less" if saving >= 0 else "more"
    out.append(f"Energy bills {usd(t.total_bills_usd)}, {usd(abs(saving))} {word} than doing "
               "nothing.\n")
    return out


def electric_text(data: ViewData, width: int) -> Text:
    out = Text()
    items = fossil_items(data)
    if not items:
        out.append("Already fully electric: nothing in the home burns fuel.", style="bold")
        return out
    done = replaced_by_year(data)
    rm = data.roadmap
    n_done = sum(1 for k in items if k in done)
    bar_w = max(10, min(30, width - 56))
    filled = round(bar_w * n_done / len(items))
    out.append("█" * filled, style="bold")
    out.append("░" * (bar_w - filled), style="dim")
    last = rm.last_year if rm else data.plan.first_year + data.plan.budget.horizon_years - 1
    out.append(f"  {n_done} of {len(items)} fuel-burning items replaced by {last}\n")
    if rm is not None:
        if rm.milestones:
            out.append(" · ".join(f"{m.year} {m.label.lower()}" for m in rm.milestones))
            out.append("\n")
        if not any(m.kind == "fully_electric" for m in rm.milestones):
            left = [k for k in items if k not in done]
            if left:
                out.append(f"Still burning fuel after {last}: {', '.join(left)}\n")
    return out


class OverviewView(View):
    title = "Next"

    def compose(self) -> ComposeResult:
        yield Static("", id="overview-banner", classes="banner")
        with VerticalScroll(id="overview-scroll"):
            yield Static("", id="next-box", classes="box")
            yield Static("", id="year-box", classes="box")
            yield Static("", id="electric-box", classes="box")
            yield Static(Text(ESTIMATES, style="italic"), classes="estimates")

    def on_mount(self) -> None:
        self.query_one("#next-box").border_title = "What to do next"
        self.query_one("#year-box").border_title = "What it costs this year"
        self.query_one("#electric-box").border_title = "How far from fully electric"

    def show(self, data: ViewData) -> None:
        banner = self.query_one("#overview-banner", Static)
        text = banner_text(data)
        banner.update(text or "")
        banner.display = text is not None
        width = self.app.size.width
        for wid, text in (("#next-box", next_text(data, width)), ("#year-box", this_year_text(data)),
                          ("#electric-box", electric_text(data, self.app.size.width))):
            text.rstrip()
            self.query_one(wid, Static).update(text)

    def focus_main(self) -> None:
        self.query_one("#overview-scroll").focus()
