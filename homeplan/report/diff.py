"""What changed between two plans, and between the roadmaps they produce, in plain words.

:func:`diff_inputs` walks both validated plans (``model_dump(mode="json")``) and lists every
changed, added or removed field, matching list items by their id (appliances, vehicles, loans,
incentive programs) rather than by position. :func:`diff_roadmaps` compares two roadmaps: steps
moved, added or dropped, milestones moved, net present value and totals. When exactly one input
that can affect the roadmap changed, each roadmap change gets a "because" naming it.

References
----------
None: a comparison of data; no physical or financial rule is applied here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from homeplan.plan.objectives import objective_words
from homeplan.report.table import usd

__all__ = [
    "Change",
    "RoadmapChange",
    "diff_inputs",
    "diff_roadmaps",
    "fmt_value",
    "label_for",
    "render_diff",
    "single_cause",
]

Path = tuple[Any, ...]

# Plain names for the fields people change most; others are named from their keys.
LABELS: dict[Path, str] = {
    ("budget", "usd_per_year"): "budget per year",
    ("budget", "first_year"): "first year",
    ("budget", "horizon_years"): "planning horizon (years)",
    ("budget", "carryover"): "carry unspent budget over",
    ("budget", "add_bill_savings"): "add bill savings to the budget",
    ("budget", "discount_rate_pct"): "discount rate",
    ("budget", "by_year"): "budgets by year",
    ("prices", "electricity", "usd_per_kwh"): "electricity price",
    ("prices", "electricity", "fixed_usd_per_month"): "electricity fixed charge",
    ("prices", "electricity", "export"): "solar export rule",
    ("prices", "gas", "usd_per_therm"): "gas price",
    ("prices", "gas", "fixed_usd_per_month"): "gas fixed charge",
    ("prices", "inflation_pct"): "inflation",
    ("prices", "fossil_extra_escalation_pct"): "fossil fuel price rise above inflation",
    ("prices", "grid_kg_co2_per_kwh"): "grid emissions",
    ("prices", "cost_level"): "cost level without quotes",
    ("home", "electrical", "service_amps"): "electrical service",
    ("home", "electrical", "busbar_amps"): "panel busbar",
    ("home", "floor_area_ft2"): "floor area",
    ("home", "envelope"): "envelope",
    ("choices", "objective"): "goal",
    ("choices", "all_electric_by"): "all-electric by",
    ("choices", "replace_at_risk_pct"): "replace at failure risk",
    ("choices", "max_projects_per_year"): "most projects a year",
    ("household", "ami_pct"): "income (% of area median)",
    ("provenance", "prepared_by"): "prepared by",
    ("provenance", "prepared_for"): "prepared for",
    ("provenance", "date"): "plan date",
    ("provenance", "notes"): "notes",
    ("provenance", "tool_version"): "made with homeplan",
    ("home", "name"): "home name",
}
# Sections that cannot change a roadmap: listed, but never offered as a "because".
NO_EFFECT = ("provenance", "advisor", "display", "format_version")
_UNIT_SUFFIXES = ("_usd", "_pct", "_ft2", "_btuh", "_kwh", "_kw", "_amps", "_gal", "_kg", "_deg",
                  "_f", "_v", "_va")
_IDENTITY = ("id", "name", "kind")


@dataclass(frozen=True)
class Change:
    path: Path
    kind: str            # "changed", "added", "removed"
    before: Any
    after: Any
    label: str

    @property
    def words(self) -> str:
        if self.kind == "added":
            return f"{self.label}: added ({_summary(self.after, self.path)})"
        if self.kind == "removed":
            return f"{self.label}: removed (was {_summary(self.before, self.path)})"
        return f"{self.label}: {fmt_value(self.before, self.path)} -> {fmt_value(self.after, self.path)}"

    @property
    def because(self) -> str:
        """A clause for "because ...": 'the budget rose to $9,000'."""
        label = self.label
        the = "" if label[:1].isupper() else "the "
        if self.path[-2:] == ("budget", "usd_per_year") or self.path == ("budget", "usd_per_year"):
            label, the = "budget", "the "
        if self.kind == "added":
            return f"{the}{label} was added"
        if self.kind == "removed":
            return f"{the}{label} was removed"
        b, a = self.before, self.after
        if _is_number(b) and _is_number(a):
            verb = "rose" if a > b else "fell"
            return f"{the}{label} {verb} to {fmt_value(a, self.path)}"
        return f"{the}{label} changed to {fmt_value(a, self.path)}"

    @property
    def affects_roadmap(self) -> bool:
        return not (self.path and self.path[0] in NO_EFFECT)


def _is_number(v: Any) -> bool:
    return isinstance(v, int | float) and not isinstance(v, bool)


def _field_words(key: str) -> str:
    k = key
    for suffix in _UNIT_SUFFIXES:
        if k.endswith(suffix) and len(k) > len(suffix):
            k = k[: -len(suffix)]
            break
    k = k.replace("usd_per_", "price per ").replace("_", " ")
    return k.strip()


def label_for(path: Path, context: list[str]) -> str:
    plain = tuple(p for p in path if not isinstance(p, int))
    if plain in LABELS and len(plain) == len(path):
        return LABELS[plain]
    last = str(path[-1]) if path else "plan"
    words = [c for c in context if c]
    if words and words[-1] == _field_words(last):  # a list of values names its own section
        words.pop()
    return " ".join([*words, _field_words(last)]).strip() or last


def fmt_value(v: Any, path: Path = ()) -> str:
    key = str(path[-1]) if path else ""
    if v is None:
        return "not set"
    if key == "objective" and isinstance(v, str):
        return objective_words(v).lower()
    if isinstance(v, bool):
        return "yes" if v else "no"
    if _is_number(v):
        if not math.isfinite(float(v)):
            return "n/a"
        if "usd_per_kwh" in key:
            return f"${v:.3f}/kWh"
        if "usd_per_therm" in key:
            return f"${v:.2f}/therm"
        if "usd_per_gal" in key:
            return f"${v:.2f}/gallon"
        if "usd" in key:
            return f"${v:,.0f}" if abs(v) >= 100 or float(v).is_integer() else f"${v:,.2f}"
        num = f"{v:,.0f}" if float(v).is_integer() or key.endswith("_year") or key == "year" else f"{v:,.4g}"
        if key.endswith("year") or key in ("first_year", "year_installed", "year_built"):
            num = str(int(v)) if float(v).is_integer() else str(v)
        for suffix, unit in (("_pct", " %"), ("_amps", " A"), ("_ft2", " ft2"), ("_f", " F"),
                             ("_btuh", " Btu/h"), ("_kwh", " kWh"), ("_kw", " kW"), ("_gal", " gal"),
                             ("_years", " years")):
            if key.endswith(suffix):
                return num + unit
        return num
    if isinstance(v, list):
        if all(not isinstance(x, dict | list) for x in v):
            shown = ", ".join(fmt_value(x) for x in v[:6])
            return f"[{shown}{', ...' if len(v) > 6 else ''}]"
        return f"{len(v)} items"
    if isinstance(v, dict):
        return _summary(v, path)
    return str(v)


def _summary(v: Any, path: Path) -> str:
    if not isinstance(v, dict):
        return fmt_value(v, path)
    parts = []
    for k, x in v.items():
        if x is None or isinstance(x, dict | list) or k in _IDENTITY:
            continue
        parts.append(f"{_field_words(k)} {fmt_value(x, (*path, k))}")
        if len(parts) == 4:
            break
    return ", ".join(parts) or "no details"


def _identity(item: Any, index: int) -> str:
    if isinstance(item, dict):
        for k in _IDENTITY:
            if isinstance(item.get(k), str) and item[k]:
                return item[k]
    return f"#{index + 1}"


def _walk(a: Any, b: Any, path: Path, context: list[str], out: list[Change]) -> None:
    if isinstance(a, dict) and isinstance(b, dict):
        for k in list(dict.fromkeys([*a.keys(), *b.keys()])):
            p = (*path, k)
            if k not in b:
                out.append(Change(p, "removed", a[k], None, label_for(p, context)))
            elif k not in a:
                out.append(Change(p, "added", None, b[k], label_for(p, context)))
            else:
                sub = context
                if isinstance(a[k], dict | list) or isinstance(b[k], dict | list):
                    sub = [*context, _field_words(str(k))] if (*path, k) not in LABELS else [LABELS[(*path, k)]]
                _walk(a[k], b[k], p, sub, out)
        return
    if isinstance(a, dict) != isinstance(b, dict) and (a is None or b is None):
        label = label_for(path, context[:-1]) if context else label_for(path, [])
        out.append(Change(path, "added" if a is None else "removed", a, b, label))
        return
    if (isinstance(a, list) and isinstance(b, list)
            and any(isinstance(x, dict) for x in [*a, *b])):
        ia = {_identity(x, i): x for i, x in enumerate(a)}
        ib = {_identity(x, i): x for i, x in enumerate(b)}
        base = context[:-1] if context else []
        group = context[-1] if context else ""
        singular = group[:-1] if group.endswith("s") else group
        for key in list(dict.fromkeys([*ia, *ib])):
            p = (*path, key)
            words = [*base, f"{singular} {key}".strip()]
            if key not in ib:
                out.append(Change(p, "removed", ia[key], None, " ".join(words)))
            elif key not in ia:
                out.append(Change(p, "added", None, ib[key], " ".join(words)))
            else:
                _walk(ia[key], ib[key], p, words, out)
        return
    if a != b:
        out.append(Change(path, "changed", a, b, label_for(path, context)))


def diff_inputs(plan_a: Any, plan_b: Any) -> list[Change]:
    """Changed/added/removed fields from plan A to plan B (validated content only)."""
    out: list[Change] = []
    _walk(plan_a.model_dump(mode="json"), plan_b.model_dump(mode="json"), (), [], out)
    return out


# ----------------------------------------------------------------------------- roadmaps


@dataclass(frozen=True)
class RoadmapChange:
    kind: str        # "moved", "added", "removed", "variant", "cost", "milestone", "npv", "total", "status"
    words: str
    subject: str = ""


def _lower_first(label: str) -> str:
    if len(label) > 1 and label[1:2].islower():
        return label[:1].lower() + label[1:]
    return label


def _money(v: float) -> str:
    """Rounded as a household reads it: $10 steps under $1,000, else $100 steps."""
    out = usd(v, 10 if abs(v) < 1000 else 100)
    return "$0" if out == "-$0" else out


def _signed(v: float) -> str:
    out = _money(v)
    return out if out.startswith("-") or out == "$0" else "+" + out


def diff_roadmaps(a: Any, b: Any, money_tolerance_usd: float = 50.0) -> list[RoadmapChange]:
    """Plain-words differences from roadmap A to roadmap B."""
    out: list[RoadmapChange] = []
    if a.status != b.status:
        out.append(RoadmapChange("status", "no roadmap fits any more" if b.status != "ok"
                                 else "a roadmap now fits the inputs"))
    sa = {s.project_id: s for s in a.steps}
    sb = {s.project_id: s for s in b.steps}
    for pid in list(dict.fromkeys([*sa, *sb])):
        x, y = sa.get(pid), sb.get(pid)
        name = _lower_first((y or x).label or pid)
        if x is None and y is not None:
            out.append(RoadmapChange("added", f"{name} added in {y.year}", pid))
            continue
        if y is None and x is not None:
            out.append(RoadmapChange("removed", f"{name} dropped (was {x.year})", pid))
            continue
        assert x is not None and y is not None
        if x.year != y.year:
            out.append(RoadmapChange("moved", f"{name} moved {x.year} -> {y.year}", pid))
        if x.variant != y.variant and (x.variant or y.variant):
            out.append(RoadmapChange("variant", f"{name}: {x.variant or 'default'} -> {y.variant or 'default'}", pid))
        # a moved step's cost follows its new year (escalation): only same-year changes are news
        if (x.year == y.year and _finite(x.net_cost_usd, y.net_cost_usd)
                and abs(y.net_cost_usd - x.net_cost_usd) >= money_tolerance_usd):
            out.append(RoadmapChange("cost", f"{name} costs you {_money(x.net_cost_usd)} -> "
                                     f"{_money(y.net_cost_usd)} after incentives", pid))
    step_words = {r.words.lower() for r in out}
    ma = {m.kind if m.kind != "other" else m.label: m for m in a.milestones}
    mb = {m.kind if m.kind != "other" else m.label: m for m in b.milestones}
    for k in list(dict.fromkeys([*ma, *mb])):
        x, y = ma.get(k), mb.get(k)
        name = _lower_first((y or x).label)
        if x is None and y is not None:
            out.append(RoadmapChange("milestone", f"{name} now in {y.year}", k))
        elif y is None and x is not None:
            out.append(RoadmapChange("milestone", f"{name} no longer reached (was {x.year})", k))
        elif x is not None and y is not None and x.year != y.year:
            words = f"{name} moved {x.year} -> {y.year}"
            if words.lower() not in step_words:  # e.g. the step "Close the gas service" itself
                out.append(RoadmapChange("milestone", words, k))
    if _finite(a.npv_usd, b.npv_usd) and abs(b.npv_usd - a.npv_usd) >= money_tolerance_usd:
        out.append(RoadmapChange("npv", f"net present value {_signed(b.npv_usd - a.npv_usd)} "
                                 f"({_money(a.npv_usd)} -> {_money(b.npv_usd)})"))
    ta, tb = sum(s.net_cost_usd for s in a.steps), sum(s.net_cost_usd for s in b.steps)
    if _finite(ta, tb) and abs(tb - ta) >= money_tolerance_usd:
        out.append(RoadmapChange("total", f"you pay {_signed(tb - ta)} in all "
                                 f"({_money(ta)} -> {_money(tb)} after incentives)"))
    return out


BECAUSE_KINDS = ("moved", "added", "removed", "variant", "status")
"""Roadmap changes that are decisions, so a single input change is named as their cause."""


def _finite(*values: float) -> bool:
    return all(v is not None and math.isfinite(float(v)) for v in values)


def single_cause(changes: list[Change]) -> Change | None:
    """The one input change that can explain the roadmap changes, if there is exactly one."""
    relevant = [c for c in changes if c.affects_roadmap]
    return relevant[0] if len(relevant) == 1 else None


def render_diff(name_a: str, name_b: str, inputs: list[Change], roadmap: list[RoadmapChange] | None,
                hash_a: str = "", hash_b: str = "") -> str:
    """The diff as plain text, inputs first, then the roadmap with a "because" where clear."""
    lines = [f"A: {name_a}" + (f"  (plan {hash_a})" if hash_a else ""),
             f"B: {name_b}" + (f"  (plan {hash_b})" if hash_b else ""), ""]
    if hash_a and hash_a == hash_b:
        lines.append("Same plan content (the hashes match); comments and layout may differ.")
    lines.append("Inputs:" if inputs else "Inputs: no changes")
    lines += [f"  {c.words}" for c in inputs]
    if roadmap is None:
        return "\n".join(lines) + "\n"
    lines.append("")
    lines.append("Roadmap:" if roadmap else "Roadmap: no changes")
    cause = single_cause(inputs)
    for r in roadmap:
        linked = cause is not None and r.kind in BECAUSE_KINDS
        lines.append(f"  {r.words}" + (f" because {cause.because}" if linked else ""))
    if roadmap and cause is None and len([c for c in inputs if c.affects_roadmap]) > 1:
        lines.append("  (several inputs changed, so no single cause is given)")
    return "\n".join(lines) + "\n"
