"""What a re-plan changed, in plain words: each step that moved, from when to when, and why.

:func:`change_list` compares the result before an edit with the result after it. For a step that
moved it gives the years, the planner's own reason for the new year, the incentives it gains or
loses (with the date a lost program closes), its cost after incentives, and - for a replacement
that comes later - the old appliance's chance of having failed by then. When nothing moved it
says so, naming what the edit was about ("nothing moved: the gas furnace is still replaced in
2029"). Every figure is read from the two results; nothing is recomputed.

References
----------
None: a comparison of two results.
"""

from __future__ import annotations

import datetime as dt
from typing import Any

from homeplan.plan.text import clean
from homeplan.report.fmt import money

__all__ = ["change_list", "closes_words"]


def closes_words(ends: str | None) -> str:
    """A program's closing date as "June 2029" (the text as given when it is not a date)."""
    if not ends:
        return ""
    try:
        return dt.date.fromisoformat(str(ends)[:10]).strftime("%B %Y")
    except ValueError:
        return clean(ends)


def _by_program(step: Any) -> dict[str, float]:
    out: dict[str, float] = {}
    for inc in step.incentives if step is not None else ():
        out[inc.program] = out.get(inc.program, 0.0) + inc.amount_usd
    return out


def _incentive_words(old_step: Any, new_step: Any, result: Any, old: Any = None) -> list[str]:
    # a program the new roadmap no longer uses is listed only in the old result
    ends = {p.name: p.ends for r in (old, result) if r is not None for p in getattr(r, "programs", ())}
    before, after = _by_program(old_step), _by_program(new_step)
    out = []
    for program in dict.fromkeys([*before, *after]):
        gap = after.get(program, 0.0) - before.get(program, 0.0)
        if abs(gap) < 5:
            continue
        if gap < 0:
            closes = closes_words(ends.get(program))
            out.append(f"loses {money(-gap)} of {clean(program)}"
                       + (f", which closes {closes}" if closes else ""))
        else:
            out.append(f"gains {money(gap)} from {clean(program)}")
    return out


def _risk_words(result: Any, step: Any) -> list[str]:
    """The chance that the most worn item the step replaces has failed by the step's year."""
    outlooks = {o.key: o for o in result.outlooks}
    best: tuple[float, str] | None = None
    for key in step.replaces:
        o = outlooks.get(key)
        if o is None or o.kind == "vehicle" or not o.cumulative_failure_pct:
            continue
        t = step.year - o.first_year
        if 0 <= t < len(o.cumulative_failure_pct) and (best is None or o.cumulative_failure_pct[t] > best[0]):
            best = (o.cumulative_failure_pct[t], clean(o.label))
    if best is None:
        return []
    return [f"the {best[1]}'s chance of having failed by then {best[0]:.0f} %"]


def _subject_words(result: Any, subject: str | None) -> str:
    """What the edit was about, and where the roadmap has it now."""
    if not subject:
        return ""
    outlooks = {o.key: o for o in result.outlooks}
    name = clean(outlooks[subject].label) if subject in outlooks else subject.replace("_", " ")
    step = next((s for s in result.roadmap.steps if subject in s.replaces), None)
    if step is None:
        return f"the {name} is still not replaced within the plan's years"
    return f"the {name} is still replaced in {step.year} ({clean(step.label).lower()})"


def change_list(old: Any, new: Any, subject: str | None = None) -> tuple[str, ...]:
    """Lines describing what moved between two results (old: before the edit).

    ``subject`` is the key of the appliance, vehicle or roof the edit was about, if any.
    Returns () when there is nothing to compare (no earlier result, or either is infeasible).
    """
    if old is None or old.roadmap.status != "ok" or new.roadmap.status != "ok":
        return ()
    before = {s.project_id: s for s in old.roadmap.steps}
    after = {s.project_id: s for s in new.roadmap.steps}
    lines: list[str] = []
    for pid in dict.fromkeys([*after, *before]):
        a, b = before.get(pid), after.get(pid)
        if a is not None and b is not None and a.year == b.year:
            continue
        if b is None:
            lines.append(f"{clean(a.label)}: no longer in the plan (was {a.year})"
                         + "".join(f"; {w}" for w in _incentive_words(a, None, new, old)))
            continue
        if a is None:
            why = clean(b.reasons[0]) if b.reasons else ""
            lines.append(f"{clean(b.label)}: now in {b.year}" + (f" ({why})" if why else "")
                         + f"; you pay {money(b.net_cost_usd)}")
            continue
        parts = [f"{clean(b.label)}: moved from {a.year} to {b.year}"]
        if "waiting for budget" in b.reasons and b.year > a.year:
            parts.append(f"the budget does not reach it before {b.year}")
        elif b.reasons:
            parts.append(clean(b.reasons[0]))
        parts += _incentive_words(a, b, new, old)
        gap = b.net_cost_usd - a.net_cost_usd
        if abs(gap) >= 5:
            parts.append(f"you pay {money(b.net_cost_usd)} ({money(abs(gap))} "
                         f"{'more' if gap > 0 else 'less'})")
        if b.year > a.year:
            parts += _risk_words(new, b)
        lines.append("; ".join(parts))
    if not lines:
        about = _subject_words(new, subject)
        lines.append("Nothing moved" + (f": {about}." if about else "."))
    return tuple(lines)
