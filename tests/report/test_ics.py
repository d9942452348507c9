"""iCalendar export checked by structure against RFC 5545.

References: RFC 5545 sections 3.1 (CRLF, 75-octet folding, continuation starts with one space),
3.3.4 (DATE), 3.3.5 (UTC DATE-TIME "Z"), 3.3.11 (TEXT escaping), 3.4 and 3.6 (BEGIN/END of
VCALENDAR and VEVENT), 3.6.1 (VEVENT: UID and DTSTAMP required, DTSTART required when there is
no METHOD... we always give it), 3.7.3 and 3.7.4 (PRODID and VERSION required).
"""

from __future__ import annotations

import datetime as dt
import re

import pytest

from homeplan.report.ics import escape_text, fold, render_ics
from tests.report.fixtures import make_plan, make_result

NOW = dt.datetime(2026, 12, 1, 12, 0, tzinfo=dt.UTC)


def unfold(text: str) -> list[str]:
    return text.replace("\r\n ", "").split("\r\n")[:-1]


def unescape(value: str) -> str:
    out, i = [], 0
    while i < len(value):
        if value[i] == "\\" and i + 1 < len(value):
            out.append("\n" if value[i + 1] in "nN" else value[i + 1])
            i += 2
        else:
            out.append(value[i])
            i += 1
    return "".join(out)


def hostile_calendar() -> str:
    plan = make_plan(name='"Semi;colon, comma\\\\back \\u00e9\\u00e9\\u00e9 \\U0001F600 long ' + "x" * 120 + '"')
    return render_ics(make_result(plan, label_suffix=", with; odd\\chars é" * 4), now=NOW)


def test_crlf_and_line_length() -> None:
    text = hostile_calendar()
    raw = text.encode("utf-8")
    assert raw.endswith(b"\r\n")
    assert b"\n" not in raw.replace(b"\r\n", b"")          # no bare LF
    assert b"\r" not in raw.replace(b"\r\n", b"")          # no bare CR
    for line in raw.split(b"\r\n")[:-1]:
        assert len(line) <= 75, line                        # RFC 5545 3.1
        line.decode("utf-8")                                # never splits a UTF-8 sequence


def test_begin_end_balanced_and_required_properties() -> None:
    lines = unfold(hostile_calendar())
    stack: list[str] = []
    events: list[dict[str, str]] = []
    cal_props: dict[str, str] = {}
    for line in lines:
        name, _, value = line.partition(":")
        if name == "BEGIN":
            stack.append(value)
            if value == "VEVENT":
                events.append({})
        elif name == "END":
            assert stack and stack.pop() == value
        elif stack == ["VCALENDAR"]:
            cal_props[name] = value
        elif stack == ["VCALENDAR", "VEVENT"]:
            events[-1][name.split(";")[0]] = value
    assert stack == []
    assert lines[0] == "BEGIN:VCALENDAR" and lines[-1] == "END:VCALENDAR"
    assert cal_props["VERSION"] == "2.0" and cal_props["PRODID"]
    assert events
    uids = [e["UID"] for e in events]
    assert len(set(uids)) == len(uids)
    for e in events:
        assert {"UID", "DTSTAMP", "DTSTART", "DTEND", "SUMMARY"} <= e.keys()
        assert re.fullmatch(r"\d{8}T\d{6}Z", e["DTSTAMP"])
        assert re.fullmatch(r"\d{8}", e["DTSTART"]) and re.fullmatch(r"\d{8}", e["DTEND"])
        start = dt.datetime.strptime(e["DTSTART"], "%Y%m%d").date()
        end = dt.datetime.strptime(e["DTEND"], "%Y%m%d").date()
        assert end - start == dt.timedelta(days=1)          # one all-day event
    assert any(line.startswith("DTSTART;VALUE=DATE:") for line in lines)


def test_reminders_cover_quotes_deadlines_and_replace_by() -> None:
    lines = unfold(render_ics(make_result(), now=NOW))
    summaries = [unescape(line.split(":", 1)[1]) for line in lines if line.startswith("SUMMARY:")]
    assert "Get quotes: Heat pump" in summaries
    assert any(s.startswith("Incentive closes: Invented utility rebate") for s in summaries)
    assert any(s.startswith("Claim on your 2028 tax return") for s in summaries)
    assert any(s.startswith("Replace-by year:") for s in summaries)
    starts = [line for line in lines if line.startswith("DTSTART")]
    # the heat pump is in 2028: quotes on 1 October 2027, three months before the year
    i = lines.index("SUMMARY:Get quotes: Heat pump")
    assert "DTSTART;VALUE=DATE:20271001" in lines[i - 3:i]
    assert "DTSTART;VALUE=DATE:20301231" in starts            # the rebate window closes


def test_text_escaping_round_trips() -> None:
    original = 'a,b;c\\d\ne "q"'
    esc = escape_text(original)
    assert esc == 'a\\,b\\;c\\\\d\\ne "q"'                   # RFC 5545 3.3.11
    assert unescape(esc) == original


def test_escaped_summary_round_trips_through_folding() -> None:
    lines = unfold(hostile_calendar())
    summary = next(line for line in lines if line.startswith("SUMMARY:Get quotes: Heat pump"))
    assert unescape(summary.split(":", 1)[1]).startswith("Get quotes: Heat pump, with; odd\\chars é")


def test_fold_exact_boundaries() -> None:
    assert fold("x" * 75) == "x" * 75
    folded = fold("x" * 76)
    assert folded == "x" * 75 + "\r\n x"
    multi = fold("é" * 40)                                  # 2 octets each
    assert all(len(p.encode()) <= 75 for p in multi.split("\r\n"))


def test_uids_stable_for_same_plan() -> None:
    a = [line for line in unfold(render_ics(make_result(), now=NOW)) if line.startswith("UID:")]
    b = [line for line in unfold(render_ics(make_result(), now=NOW + dt.timedelta(days=3)))
         if line.startswith("UID:")]
    assert a == b


def test_parses_with_icalendar_reference_parser() -> None:
    icalendar = pytest.importorskip("icalendar", reason="the icalendar package is not installed")
    cal = icalendar.Calendar.from_ical(hostile_calendar())
    events = [c for c in cal.walk() if c.name == "VEVENT"]
    assert events and all(e.get("UID") for e in events)
    assert any(str(e.get("SUMMARY")).startswith("Get quotes: Heat pump, with; odd") for e in events)
