"""The home: what it has today, how old, when it is likely to give out; service, roof, bills."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.widgets import DataTable, Static

from homeplan.plan.fuels import FOSSIL_FUELS, TANK_FUELS
from homeplan.report.sources import PLAN_FILE, Sourced, catalog_source_words
from homeplan.tui.actions import bindings
from homeplan.tui.format import BLOCKS, num, usd, wrap_labels
from homeplan.tui.widgets.base import View, ViewData, assumptions_text, sources_text
from homeplan.units import display_area

if TYPE_CHECKING:
    from homeplan.result.outlook import LifeOutlook

__all__ = ["HomeView", "Inventory", "Item", "inventory", "risk_bar"]

RISK_TOP_PCT = 20.0  # a full block in the risk bar means a 20 % or higher chance that year
RISK_YEARS = 10


def risk_bar(yearly_pct: tuple[float, ...], years: int = RISK_YEARS) -> str:
    out = []
    for p in yearly_pct[:years]:
        level = 0 if p <= 0.05 else max(1, min(8, round(p / RISK_TOP_PCT * 8)))
        out.append(BLOCKS[level] if level else "·")
    return "".join(out)


@dataclass(frozen=True)
class Item:
    key: str
    group: str           # "appliance" | "vehicle" | "roof"
    index: int           # position in its list in the plan (-1 for the roof)
    label: str
    outlook: LifeOutlook | None
    fuel: str
    failed_now: bool


def inventory(data: ViewData) -> list[Item]:
    """The home's appliances, vehicles and roof, each named in words (never by its id; two of
    the same kind are told apart by the name the plan gives them). The roof is always listed:
    the plan may not describe it yet (e adds it)."""
    plan = data.plan
    outs = {o.key: o for o in data.outlooks}
    failed = set(plan.choices.failed_now)
    items = []
    for i, a in enumerate(plan.appliances):
        o = outs.get(a.key)
        label = (o.label if o else f"{a.fuel or ''} {a.kind.replace('_', ' ')}".strip())
        items.append(Item(a.key, "appliance", i, label[:1].upper() + label[1:], o,
                          o.fuel if o else (a.fuel or ""), a.key in failed))
    for i, v in enumerate(plan.vehicles):
        key = plan.vehicle_key(i)
        o = outs.get(key)
        name = v.name or f"{v.fuel.replace('_', ' ')} {v.body}"
        items.append(Item(key, "vehicle", i, name[:1].upper() + name[1:], o, v.fuel, False))
    o = outs.get("roof") if plan.home.roof is not None else None
    items.append(Item("roof", "roof", -1, "Roof" if plan.home.roof is not None
                      else "Roof (not described yet)", o, "", False))
    labels = [it.label for it in items]
    return [it if labels.count(it.label) == 1 else
            Item(it.key, it.group, it.index, f"{it.label} ({it.key.replace('_', ' ')})", it.outlook,
                 it.fuel, it.failed_now)
            for it in items]


class Inventory(DataTable):
    BINDINGS = bindings("home")


class HomeView(View):
    title = "Home"
    items: list[Item] = []
    data: ViewData | None = None

    def compose(self) -> ComposeResult:
        yield Static("", id="home-legend", classes="legend")
        yield Inventory(id="inventory", cursor_type="row")
        with VerticalScroll(id="home-info", classes="details"):
            yield Static("", id="home-info-text")

    def on_mount(self) -> None:
        self.items: list[Item] = []
        self.data: ViewData | None = None

    def show(self, data: ViewData) -> None:
        self.data = data
        table = self.query_one(Inventory)
        keep = table.cursor_row
        wide = self.app.size.width >= 100
        table.clear(columns=True)
        self.items = inventory(data)
        name_w = 30 if wide else 26
        table.add_column("Item", width=name_w, key="item")
        table.add_column("Age", key="age")
        table.add_column("Likely end", key="end")
        if wide:
            table.add_column(f"Replace by ({data.plan.choices.replace_at_risk_pct:.0f} % risk)",
                             key="replace")
        first = data.plan.first_year
        table.add_column(f"Risk {first % 100:02d}-{(first + RISK_YEARS - 1) % 100:02d}",
                         width=RISK_YEARS, key="risk")
        table.add_column("Note", key="note")
        names = wrap_labels([it.label for it in self.items], name_w - 3)
        for it, label in zip(self.items, names, strict=True):
            o = it.outlook
            fossil = it.fuel in FOSSIL_FUELS
            name = Text(("◆ " if fossil else "  ") + label.replace("\n", "\n  "))
            height = label.count("\n") + 1
            if o is None:
                note = "e: describe it" if it.group == "roof" else "electric"
                table.add_row(name, "-", "-", *(["-"] if wide else []), "", note, key=it.key,
                              height=height)
                continue
            age = f"{o.age_years:.0f}" + ("?" if o.install_year_assumed else "")
            if it.failed_now:
                note = Text("FAILED (what-if)", style="bold reverse")
            elif o.failed:
                note = Text("failing", style="bold")
            elif o.replace_by_year <= data.plan.first_year + 1:
                note = Text("replace soon", style="bold")
            else:
                note = Text("")
            cells = [name, age, str(o.expected_end_year)]
            if wide:
                cells.append(str(o.replace_by_year))
            table.add_row(*cells, risk_bar(o.hazard_pct), note, key=it.key, height=height)
        if self.items:
            table.move_cursor(row=min(max(keep, 0), len(self.items) - 1), animate=False, scroll=False)
        legend = Text()
        legend.append("◆", style="bold")
        legend.append(" burns fuel  ")
        legend.append("Risk each year, if it lasts that long (█ 20 %+)  ? age assumed")
        self.query_one("#home-legend", Static).update(legend)
        self.query_one("#home-info-text", Static).update(self._info(data))

    def _info(self, data: ViewData) -> Text:
        plan = data.plan
        h = plan.home
        e = h.electrical
        out = Text()
        out.append("Electrical service  ", style="bold")
        out.append(f"{e.service_amps} A, busbar {e.busbar_rating_amps} A, main breaker "
                   f"{e.main_rating_amps} A")
        if e.free_spaces is not None:
            out.append(f", {e.free_spaces} free breaker spaces")
        if data.result is not None and data.result.capacity:
            today = data.result.capacity[0]
            out.append(f"; calculated load today {today.amps:.0f} A, headroom "
                       f"{today.headroom_amps:.0f} A")
        out.append("\n")
        out.append("Roof  ", style="bold")
        if h.roof is None:
            out.append("not described: choose the Roof row and press e to describe it, so that "
                       "rooftop solar can be considered\n")
        else:
            r = h.roof
            out.append(f"{r.material.replace('_', ' ')}, installed {r.year_installed or 'year unknown'}")
            if r.usable_area_ft2 is not None:
                out.append(f", {display_area(r.usable_area_ft2, plan.display.units)} usable for panels")
            out.append(f", facing {r.azimuth_deg:.0f} deg, tilt {r.tilt_deg:.0f} deg\n")
        if h.solar is not None:
            out.append("Solar  ", style="bold")
            out.append(f"{h.solar.size_kw:g} kW already installed\n")
        out.append("Bills  ", style="bold")
        u = plan.usage
        parts = []
        if u is not None:
            if u.electricity is not None:
                kwh = u.electricity.annual_kwh or (sum(u.electricity.monthly_kwh or []) or None)
                parts.append(f"{num(kwh, 'kWh')} electricity")
            if u.gas is not None:
                th = u.gas.annual_therms or (sum(u.gas.monthly_therms or []) or None)
                parts.append(f"{num(th, 'therm')} gas")
            for fuel in TANK_FUELS:
                g = getattr(u, fuel)
                if g is not None:
                    gal = g.annual_gal or (sum(g.monthly_gal or []) or None)
                    parts.append(f"{num(gal, 'gal')} {fuel}")
        out.append((", ".join(parts) + f" a year ({u.year or 'year not given'})") if parts
                   else "none given: energy use is estimated from the home")
        if data.result is not None:
            bills = data.result.energy_before.bills_usd
            if bills:
                out.append(f"; modelled bills today {usd(sum(bills.values()))} a year")
        out.append("\n")
        b = plan.budget
        out.append("Budget  ", style="bold")
        out.append(f"{usd(b.usd_per_year)} a year from {plan.first_year} for {b.horizon_years} "
                   f"years" + (", unspent money carries over" if b.carryover else "") + "\n")
        out.append("Ages and end-of-life years are planning estimates from typical service lives.",
                   style="italic")
        return out

    def current_item(self) -> Item | None:
        i = self.query_one(Inventory).cursor_row
        return self.items[i] if 0 <= i < len(self.items) else None

    def focus_main(self) -> None:
        self.query_one(Inventory).focus()

    def where_from(self, data: ViewData) -> Text:
        """The selected item's figures with their sources, then the home's own inputs."""
        it = self.current_item()
        lines: list[Sourced] = []
        if it is not None and it.outlook is not None:
            o = it.outlook
            label = it.label
            lines.append(Sourced("Installed", str(o.install_year),
                                 "computed: assumed half-way through a typical life (your plan "
                                 "file gives no year)" if o.install_year_assumed else PLAN_FILE,
                                 label))
            lines.append(Sourced("Typical life", f"{o.median_life_years:.0f} years",
                                 catalog_source_words(o.source), label))
            lines.append(Sourced("Likely end", str(o.expected_end_year),
                                 "computed: the year it is more likely than not to have failed, "
                                 "from its age, the typical life and its condition", label))
            lines.append(Sourced("Replace by", str(o.replace_by_year),
                                 f"computed: the year the chance it has failed reaches "
                                 f"{o.risk_pct:.0f} % (the risk level in your plan file)", label))
            if o.hazard_pct and o.cumulative_failure_pct:
                n = min(RISK_YEARS, len(o.hazard_pct)) - 1
                lines.append(Sourced("Chance it fails",
                                     f"{o.hazard_pct[0]:.0f} % in {o.first_year}, {o.hazard_pct[n]:.0f} % in "
                                     f"{o.first_year + n} if it lasts that long; "
                                     f"{o.cumulative_failure_pct[n]:.0f} % that it has failed by the end of "
                                     f"{o.first_year + n}",
                                     "computed: from its age, the typical life and its condition", label))
        out = sources_text(lines)
        out.append("Electrical service, roof, bills and budget: ", style="bold")
        out.append("your plan file (the load today is computed as on the Power view).\n")
        return out.append_text(assumptions_text(data))
