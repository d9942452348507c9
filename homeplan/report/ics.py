"""An iCalendar file of reminders for a roadmap: quotes, incentive deadlines, replace-by dates.

All events are all-day (``DTSTART;VALUE=DATE``) and transparent (they do not block time).
UIDs are derived from the plan's content hash and the event's subject, so re-exporting the same
plan gives the same UIDs (a calendar updates the events instead of duplicating them), while a
changed plan gives new ones.

Events:
- "Get quotes": about three months before the year of each step (1 October of the year before).
- Incentive deadlines: the day a program used by the roadmap closes, and for tax credits a
  reminder to claim them with the tax return of the year the work was done (1 February).
- Replace-by dates: 1 January of the year each appliance's failure risk reaches the plan's
  chosen level (``choices.replace_at_risk_pct``).

References
----------
RFC 5545, Internet Calendaring and Scheduling Core Object Specification (iCalendar):
3.1 (content lines: CRLF, folding at 75 octets, a fold is CRLF + one space), 3.3.4 (DATE),
3.3.5 (DATE-TIME, UTC form), 3.3.11 (TEXT escaping of backslash, semicolon, comma and
newline), 3.6.1 (VEVENT), 3.7.3 (PRODID), 3.7.4 (VERSION), 3.8.4.7 (UID), 3.8.7.2 (DTSTAMP).
"""

from __future__ import annotations

import datetime as dt
import hashlib
from dataclasses import dataclass
from typing import Any

from homeplan.plan.hashing import content_hash
from homeplan.plan.text import clean
from homeplan.report.fmt import money

__all__ = ["Reminder", "escape_text", "fold", "reminders", "render_ics"]

PRODID = "-//homeplan//electrification roadmap//EN"


@dataclass(frozen=True)
class Reminder:
    key: str              # stable identity within one plan, used for the UID
    day: dt.date
    summary: str
    description: str
    category: str         # "quotes", "incentive", "replace"


def escape_text(text: str) -> str:
    """RFC 5545 3.3.11 TEXT: backslash, semicolon, comma escaped; newlines as \\n."""
    text = clean(text, one_line=False).replace("\r\n", "\n").replace("\r", "\n")
    return (text.replace("\\", "\\\\").replace(";", "\\;").replace(",", "\\,")
            .replace("\n", "\\n"))


def _units(line: str) -> list[str]:
    """Characters, with a backslash escape kept together with the character it escapes."""
    units: list[str] = []
    i = 0
    while i < len(line):
        n = 2 if line[i] == "\\" and i + 1 < len(line) else 1
        units.append(line[i:i + n])
        i += n
    return units


def fold(line: str) -> str:
    """Fold a content line to at most 75 octets per physical line.

    A UTF-8 sequence is never split (RFC 5545 3.1 asks for that), and neither is a TEXT escape
    such as ``\\n`` (allowed by the RFC, but some readers stumble on it).
    """
    out: list[str] = []
    current = b""
    for unit in _units(line):
        b = unit.encode("utf-8")
        if len(current) + len(b) > 75:
            out.append(current.decode("utf-8"))
            current = b" "        # a continuation line starts with one space, which counts
        current += b
    out.append(current.decode("utf-8"))
    return "\r\n".join(out)


def reminders(result: Any, today: dt.date | None = None) -> list[Reminder]:
    """Every reminder the roadmap implies, in date order.

    With ``today``, a "get quotes" date that has already passed for a step still to come is
    moved to ``today`` (a reminder in the past would never be seen).
    """
    road = result.roadmap
    out: list[Reminder] = []
    replaced_in: dict[str, int] = {}
    for s in road.steps:
        info = result.project(s.project_id)
        for key in info.replaces if info is not None else ():
            replaced_in.setdefault(key, s.year)
    for s in road.steps:
        label = clean(s.label) or clean(s.project_id)
        detail = ", ".join(x for x in (clean(s.variant), clean(s.size)) if x)
        lines = [f"The roadmap puts {label}" + (f" ({detail})" if detail else "") + f" in {s.year}.",
                 f"Budget: {money(s.cost_usd)} before incentives, {money(s.net_cost_usd)} after."]
        if s.incentives:
            lines.append("Incentives: " + "; ".join(f"{clean(i.program)} {money(i.amount_usd)}"
                                                     for i in s.incentives))
        if s.reasons:
            lines.append("Why then: " + "; ".join(clean(r) for r in s.reasons))
        lines.extend(f"Safety: {clean(c)}" for c in s.cautions)
        lines.append("Ask two or three licensed contractors for written quotes, permits included.")
        quote_day = dt.date(s.year - 1, 10, 1)
        if today is not None and quote_day < today <= dt.date(s.year, 12, 31):
            quote_day = today
        out.append(Reminder(f"quotes-{s.project_id}-{s.year}", quote_day,
                            f"Get quotes: {label}", "\n".join(lines), "quotes"))
        for i in s.incentives:
            if i.kind == "tax_credit":
                out.append(Reminder(
                    f"claim-{s.project_id}-{clean(i.program)}-{s.year}", dt.date(s.year + 1, 2, 1),
                    f"Claim on your {s.year} tax return: {clean(i.program)}",
                    f"{label} done in {s.year}: about {money(i.amount_usd)} from {clean(i.program)}. "
                    "Keep the invoice and the product certificate.", "incentive"))
    for p in result.programs:
        if not p.ends:
            continue
        try:
            ends = dt.date.fromisoformat(str(p.ends))
        except ValueError:
            continue
        paid = sum(p.paid_by_year.values())
        out.append(Reminder(f"deadline-{p.program_id}", ends, f"Incentive closes: {clean(p.name)}",
                            f"Last day of {clean(p.name)} ({clean(p.kind).replace('_', ' ')}). "
                            f"It pays about {money(paid)} in this roadmap. Check the current "
                            "terms: programs change.", "incentive"))
    for o in result.outlooks:
        if o.replace_by_year < road.first_year or o.replace_by_year > road.last_year:
            continue
        planned = replaced_in.get(o.key)
        plan_note = (f" The roadmap replaces it in {planned}." if planned is not None
                     else " The roadmap does not replace it yet: decide what you would install if it failed.")
        out.append(Reminder(f"replace-{o.key}", dt.date(o.replace_by_year, 1, 1),
                            f"Replace-by year: {clean(o.label)}",
                            f"By {o.replace_by_year} the chance that the {clean(o.label)} needs "
                            f"replacing reaches {o.risk_pct:.0f} %.{plan_note}", "replace"))
    return sorted(out, key=lambda r: (r.day, r.category, r.key))


def _uid(plan_hash: str, key: str) -> str:
    return f"{hashlib.sha256(f'{plan_hash}:{key}'.encode()).hexdigest()[:24]}@homeplan"


def render_ics(result: Any, now: dt.datetime | None = None) -> str:
    """The calendar as text with CRLF line ends, every line folded to 75 octets."""
    plan_hash = result.content_hash or content_hash(result.plan)
    now = (now or dt.datetime.now(dt.UTC)).astimezone(dt.UTC)
    stamp = now.strftime("%Y%m%dT%H%M%SZ")
    name = clean(result.plan.home.name) or clean(result.roadmap.plan_name) or "home"
    lines = ["BEGIN:VCALENDAR", "VERSION:2.0", f"PRODID:{PRODID}", "CALSCALE:GREGORIAN",
             "METHOD:PUBLISH", f"X-WR-CALNAME:{escape_text(f'Electrification roadmap: {name}')}"]
    for r in reminders(result, today=now.date()):
        lines += [
            "BEGIN:VEVENT",
            f"UID:{_uid(plan_hash, r.key)}",
            f"DTSTAMP:{stamp}",
            f"DTSTART;VALUE=DATE:{r.day.strftime('%Y%m%d')}",
            f"DTEND;VALUE=DATE:{(r.day + dt.timedelta(days=1)).strftime('%Y%m%d')}",
            f"SUMMARY:{escape_text(r.summary)}",
            f"DESCRIPTION:{escape_text(r.description + f' (plan {plan_hash})')}",
            f"CATEGORIES:{escape_text(r.category)}",
            "TRANSP:TRANSPARENT",
            "END:VEVENT",
        ]
    lines.append("END:VCALENDAR")
    return "".join(fold(line) + "\r\n" for line in lines)
