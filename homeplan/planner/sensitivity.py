"""Which assumptions move the roadmap's net present value most.

Each assumption of ``homeplan/data/sensitivity.csv`` (discount rate, each fuel's escalation, the
equipment cost level, learning rates, the incentive programs, the weather, the budget) is set to
its low and then its high value, the home is re-planned, and the NPV against doing nothing is
read. The assumptions are ranked by the swing between the two (the bars of a tornado chart).
Re-planning, not re-pricing the same roadmap, answers "what is the best plan worth if this
assumption is wrong" - and the budget can only be judged that way.

References
----------
Tornado diagrams (one-way sensitivity analysis): R. T. Clemen, "Making Hard Decisions", ch. 5
(from memory); NIST Handbook 135, ch. 7 (sensitivity analysis of life-cycle costs).
"""

from __future__ import annotations

import csv
from collections.abc import Iterator
from dataclasses import dataclass
from functools import cache
from importlib import resources
from pathlib import Path
from typing import Any

from homeplan.plan.fuels import BILL_FUELS
from homeplan.plan.load import LoadedPlan
from homeplan.plan.model import Plan
from homeplan.planner.adjust import Adjustments
from homeplan.planner.chain import plan_roadmap
from homeplan.planner.context import PlannerCache
from homeplan.result.plan_result import PlanResult
from homeplan.result.sensitivity import Sensitivity, SensitivityRow

__all__ = ["Case", "cases", "sensitivity", "settings"]

FUEL_WORDS = {"electricity": "Electricity", "gas": "Gas", "propane": "Propane", "oil": "Heating oil",
              "gasoline": "Gasoline", "diesel": "Diesel"}


@cache
def settings() -> dict[str, dict[str, str]]:
    """The rows of ``data/sensitivity.csv`` by key (each with its source)."""
    text = resources.files("homeplan.data").joinpath("sensitivity.csv").read_text(encoding="utf-8")
    rows = {r["key"]: dict(r) for r in csv.DictReader(text.splitlines())}
    for key, r in rows.items():
        if not r.get("source"):
            raise ValueError(f"sensitivity.csv: {key} has no source")
    return rows


@dataclass(frozen=True)
class Case:
    """One assumption at one setting: the plan changed, and any adjustment between stages."""

    key: str
    label: str
    side: str                       # "low" or "high"
    setting: str                    # the setting in words
    plan: Plan
    adjust: Adjustments = Adjustments()
    own_cache: bool = False         # the home's basis changes: plan it with a fresh cache
    source: str = ""


def _set(plan: Plan, changes: dict[tuple[str, ...], Any]) -> Plan:
    data = plan.model_dump(mode="python")
    for path, value in changes.items():
        node = data
        for key in path[:-1]:
            node = node[key]
        node[path[-1]] = value
    return Plan.model_validate(data)


def _escalation_pct(plan: Plan, fuel: str) -> float:
    """The plan's yearly escalation of a bill fuel, percent (as the planner reads it)."""
    pr = plan.prices
    block = getattr(pr, fuel)
    if block.escalation_pct is not None:
        return block.escalation_pct
    return pr.inflation_pct + (pr.fossil_extra_escalation_pct if fuel != "electricity" else 0.0)


def cases(plan: Plan, result: PlanResult) -> Iterator[Case]:
    """Every assumption's low and high case for this plan (those that apply to it)."""
    s = settings()
    for side in ("low", "high"):
        r = s["discount_rate"]
        yield Case("discount_rate", r["label"], side, r[f"{side}_label"],
                   _set(plan, {("budget", "discount_rate_pct"): float(r[side])}), source=r["source"])
    fuels = set(result.energy_before.bills_usd) | set(result.energy_after.bills_usd)
    for fuel in (f for f in BILL_FUELS if f in fuels):
        r = s["escalation"]
        base = _escalation_pct(plan, fuel)
        for side in ("low", "high"):
            value = max(base + float(r[side]), -19.0)
            yield Case(f"escalation:{fuel}", f"{FUEL_WORDS[fuel]} {r['label']}", side,
                       f"{value:g} % a year, {r[f'{side}_label']}",
                       _set(plan, {("prices", fuel, "escalation_pct"): value}), source=r["source"])
    r = s["cost_level"]
    for side in ("low", "high"):
        yield Case("cost_level", r["label"], side, r[f"{side}_label"],
                   _set(plan, {("prices", "cost_level"): r[side]}), source=r["source"])
    r = s["learning"]
    for side in ("low", "high"):
        yield Case("learning", r["label"], side, r[f"{side}_label"], plan,
                   Adjustments(learning_factor=float(r[side])), own_cache=True, source=r["source"])
    if plan.incentives or plan.incentive_files:
        r = s["incentives"]
        yield Case("incentives", r["label"], "low", r["low_label"],
                   _set(plan, {("incentives",): [], ("incentive_files",): []}), source=r["source"])
        yield Case("incentives", r["label"], "high", r["high_label"], plan, source=r["source"])
    r = s["weather"]
    for side in ("low", "high"):
        yield Case("weather", r["label"], side, r[f"{side}_label"], plan,
                   Adjustments(weather_shift_f=float(r[side])), own_cache=True, source=r["source"])
    r = s["budget"]
    b = plan.budget
    for side in ("low", "high"):
        f = float(r[side])
        changes: dict[tuple[str, ...], Any] = {("budget", "usd_per_year"): b.usd_per_year * f}
        if b.by_year:
            changes[("budget", "by_year")] = {y: v * f for y, v in b.by_year.items()}
        yield Case("budget", r["label"], side, r[f"{side}_label"], _set(plan, changes), source=r["source"])


def sensitivity(plan: Plan | LoadedPlan, result: PlanResult, base_dir: Path | str | None = None,
                cache: PlannerCache | None = None) -> Sensitivity:
    """Rank the assumptions by how far their low and high settings move the NPV.

    Parameters
    ----------
    plan : Plan or LoadedPlan
        The plan as planned.
    result : PlanResult
        Its result (the base NPV, and which fuels the home buys).
    base_dir : path, optional
        The folder the plan's file paths are relative to (default: the loaded file's).
    cache : PlannerCache, optional
        The plan's cache (re-used for the assumptions that leave the home's basis alone).

    Returns
    -------
    Sensitivity
        The rows ranked by swing, largest first; an assumption whose case has no roadmap is
        left out with a note.
    """
    if isinstance(plan, LoadedPlan):
        base_dir = base_dir or plan.base_dir
        plan = plan.plan
    shared = cache or PlannerCache()
    npv: dict[tuple[str, str], float] = {}
    info: dict[str, Case] = {}
    labels: dict[tuple[str, str], str] = {}
    notes: list[str] = []
    for case in cases(plan, result):
        # a case that changes the home's basis gets a cache of its own; what the disk store
        # keeps (weather years, solar output, content-keyed) it may still share
        own = PlannerCache(store=shared.store) if case.own_cache else shared
        r = plan_roadmap(case.plan, base_dir, own, case.adjust)
        info.setdefault(case.key, case)
        labels[(case.key, case.side)] = case.setting
        if r.roadmap.status != "ok":
            notes.append(f"{case.label.lower()} at {case.setting}: no roadmap fits, left out")
            continue
        npv[(case.key, case.side)] = r.roadmap.npv_usd
    rows = [SensitivityRow(key, c.label, labels[(key, "low")], labels[(key, "high")],
                           npv[(key, "low")], npv[(key, "high")], c.source)
            for key, c in info.items() if (key, "low") in npv and (key, "high") in npv]
    rows.sort(key=lambda row: -row.swing_usd)
    return Sensitivity(result.roadmap.npv_usd, tuple(rows), tuple(dict.fromkeys(notes)))
