"""The first view: what do I do next, what does it cost me this year, what fuel is still bought."""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.widgets import Static

from homeplan.report.fmt import money_short
from homeplan.report.fossil import fossil_lines
from homeplan.report.sources import step_sources
from homeplan.report.view import step_safety
from homeplan.tui.format import ESTIMATES, usd, when, wrap_labels
from homeplan.tui.widgets.base import View, ViewData, assumptions_text, banner_text, sources_text

__all__ = ["OverviewView", "changes_text", "fuel_text", "next_text", "this_year_text"]


def changes_text(data: ViewData) -> Text:
    """The last re-plan's change list (from :func:`homeplan.report.changes.change_list`)."""
    out = Text()
    for line in data.changes:
        out.append("• ")
        out.append(line + "\n")
    out.rstrip()
    return out


def next_text(data: ViewData, width: int = 80) -> Text:
    """The first year's steps, one line each: what the household pays after every incentive
    (the step's net cost, as on every view) and how the incentives arrive."""
    out = Text()
    rm = data.roadmap
    if rm is None or not rm.steps:
        out.append("Nothing scheduled yet." if rm is not None else "Waiting for the planner.",
                   style="italic")
        return out
    first_year = rm.steps[0].year
    now = rm.steps_in(first_year)
    label_w = max(16, min(36, width - 54))
    labels = wrap_labels([s.label for s in now[:4]], label_w)
    out.append(f"{'':5}{'':{label_w}} {'you pay':>8}  incentives\n", style="dim")
    for s, label in zip(now[:4], labels, strict=False):
        pos = sum(i.amount_usd for i in s.incentives if i.kind == "point_of_sale")
        later = [i for i in s.incentives if i.kind != "point_of_sale"]
        lines = label.split("\n")
        out.append(f"{s.year} ")
        for more in lines[:-1]:  # a long label's first lines, then its last beside the figures
            out.append(more, style="bold")
            out.append(f"\n{'':5}")
        out.append(lines[-1].ljust(label_w), style="bold")
        out.append(f" {usd(s.net_cost_usd):>8}")
        notes = []
        if pos:
            notes.append(f"{usd(pos)} off")
        notes += [f"{usd(i.amount_usd)} back {when(i.arrives)}" for i in later]
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


def this_year_text(data: ViewData) -> Text:
    """The first year's money as the roadmap totals it: out of pocket (the year's ``net_usd``,
    as on the Roadmap and Money views), projects and incentives in, bills."""
    out = Text()
    rm = data.roadmap
    plan = data.plan
    year = rm.first_year if rm else plan.first_year
    if rm is None or not rm.years:
        out.append(f"Budget {usd(plan.budget.usd_per_year)} a year from {year}.", style="italic")
        return out
    t = rm.years[0]
    out.append(f"{year}: ", style="bold")
    out.append(f"{usd(t.net_usd)} out of pocket", style="bold")
    budget = (plan.budget.by_year or {}).get(year, plan.budget.usd_per_year)
    out.append(f" (budget {usd(budget)}): projects {usd(t.spend_usd)}, less {usd(t.incentives_usd)}"
               " of incentives arriving this year.\n")
    if t.loan_payments_usd:
        out.append(f"Loan payments {usd(t.loan_payments_usd)}. ")
    saving = t.bill_savings_usd
    word = "less" if saving >= 0 else "more"
    out.append(f"Energy bills {usd(t.total_bills_usd)}, {usd(abs(saving))} {word} than doing "
               "nothing.\n")
    return out


def fuel_text(data: ViewData, width: int) -> Text:
    """One line per fossil fuel: what it costs each year it is still bought, and when its
    service, tank or last car goes."""
    out = Text()
    result = data.result
    if result is None:
        out.append("Waiting for the planner.", style="italic")
        return out
    lines = fossil_lines(result)
    if not lines:
        out.append("Already fully electric: the household buys no gas, oil, propane or gasoline.",
                   style="bold")
        return out
    years = lines[0].years
    last = max((ln.last_year or years[0]) for ln in lines)
    shown = [y for y in years if y <= min(last + 1, years[-1])]
    label_w, cell = 12, 5
    long = width >= 100
    end_w = 24 if long else 14
    room = max(1, (width - 8 - label_w - end_w) // cell)
    cut = len(shown) > room
    shown = shown[:room]
    out.append(" " * label_w + "".join(f"{y:>{cell}}" for y in shown) + (" …" if cut else ""),
               style="dim")
    out.append("\n")
    for ln in lines:
        out.append(ln.label.ljust(label_w), style="bold")
        for y in shown:
            cost = ln.costs_usd[ln.years.index(y)]
            out.append(f"{money_short(cost) if cost > 0.5 else '·':>{cell}}",
                       style="" if cost > 0.5 else "dim")
        out.append("  " + ln.ending(long) + "\n")
    out.append("US dollars a year (k = thousand), fixed charges included; · no longer bought.",
               style="italic")
    fully = next((m for m in data.roadmap.milestones if m.kind == "fully_electric"), None)
    if fully is not None:
        out.append(f" Fully electric in {fully.year}.", style="italic")
    return out


class OverviewView(View):
    title = "Next"

    def compose(self) -> ComposeResult:
        yield Static("", id="overview-banner", classes="banner")
        with VerticalScroll(id="overview-scroll"):
            yield Static("", id="changes-box", classes="box")
            yield Static("", id="next-box", classes="box")
            yield Static("", id="year-box", classes="box")
            yield Static("", id="electric-box", classes="box")
            yield Static(Text(ESTIMATES, style="italic"), classes="estimates")

    def on_mount(self) -> None:
        self.query_one("#changes-box").border_title = "What your last change did"
        self.query_one("#next-box").border_title = "What to do next"
        self.query_one("#year-box").border_title = "What it costs this year"
        self.query_one("#electric-box").border_title = "Fuel still bought, and when it stops"

    def where_from(self, data: ViewData) -> Text:
        """The first year's steps, each figure with its source, then the assumptions."""
        out = Text()
        rm = data.roadmap
        if rm is not None and rm.steps and data.result is not None:
            infos = {p.id: p for p in data.result.projects}
            for s in rm.steps_in(rm.steps[0].year):
                out.append_text(sources_text(step_sources(s, infos.get(s.project_id), data.plan)))
        return out.append_text(assumptions_text(data))

    def show(self, data: ViewData) -> None:
        banner = self.query_one("#overview-banner", Static)
        text = banner_text(data)
        banner.update(text or "")
        banner.display = text is not None
        width = self.app.size.width
        changes = self.query_one("#changes-box", Static)
        changes.display = bool(data.changes) and not data.planning
        changes.update(changes_text(data))
        for wid, text in (("#next-box", next_text(data, width)), ("#year-box", this_year_text(data)),
                          ("#electric-box", fuel_text(data, width))):
            text.rstrip()
            self.query_one(wid, Static).update(text)

    def focus_main(self) -> None:
        self.query_one("#overview-scroll").focus()
