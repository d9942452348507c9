"""The household's own meter data: interval electricity use in the Green Button formats.

Reads the open Green Button "Download My Data" files - ESPI XML (an Atom feed of UsagePoint,
MeterReading, ReadingType and IntervalBlock entries) and the utilities' CSV - at 15-minute or
hourly resolution, into one :class:`IntervalSeries` of delivered energy (kWh) on a standard-time
clock. A bad or partial file raises :class:`MeterFileError` naming the line; missing intervals are
reported as gaps and never filled. Writers for both formats exist so that a series round-trips
(the tests, and the invented example file, use them).

From a series: the peak demand (highest average kW over an interval, the figure NEC 220.87
asks for when the interval is 15 minutes), daily and monthly totals of complete days and months,
and a degree-day change-point model of daily use (base load, heating and cooling response).

References
----------
NAESB REQ.21, Energy Services Provider Interface (ESPI), the data model behind Green Button:
ReadingType (uom 72 = watt-hours, powerOfTenMultiplier, flowDirection 1 = delivered to the
customer), IntervalBlock / IntervalReading (timePeriod start in Unix seconds UTC, duration in
seconds, value), LocalTimeParameters (tzOffset, seconds) - code values from memory.
15 U.S.C. 260a (US daylight saving time: second Sunday of March to first Sunday of November,
at 2:00 a.m. local time), for the local clock times of CSV files.
NEC 2023 220.87: maximum demand is the highest average power over a 15-minute interval, over
one year, or at least 30 days of continuous recording.
ASHRAE Guideline 14-2014, change-point (degree-day) regression of daily use; M. Fels, "PRISM:
an introduction", Energy and Buildings 9 (1986) 5-18 (from memory).
"""

from __future__ import annotations

import csv
import datetime as dt
import io
from dataclasses import dataclass
from pathlib import Path
from xml.parsers import expat

import numpy as np

__all__ = [
    "INTERVALS_S",
    "ChangePoint",
    "Gap",
    "IntervalSeries",
    "MeterFileError",
    "change_point_fit",
    "change_point_search",
    "daily_kwh",
    "hourly_kwh",
    "monthly_kwh",
    "parse_green_button",
    "parse_green_button_csv",
    "parse_espi_xml",
    "peak_demand",
    "read_green_button",
    "write_espi_xml",
    "write_green_button_csv",
]

INTERVALS_S = (900, 3600)
"""Interval lengths read: 15 minutes and one hour, seconds."""

MAX_BYTES = 64 * 1024 * 1024
WH = 72          # ESPI UnitSymbolKind: watt-hours (from memory)
DELIVERED = 1    # ESPI FlowDirectionKind: forward, delivered to the customer (from memory)


class MeterFileError(ValueError):
    """A meter file that cannot be read as it is: where (line, column; 0 = the whole file),
    what is wrong and how to fix it."""

    def __init__(self, name: str, line: int, message: str, hint: str = "", col: int = 0):
        self.name, self.line, self.col, self.message, self.hint = name, line, col, message, hint
        where = f"{name}:{line}" if line else name
        super().__init__(f"{where}: {message}" + (f" ({hint})" if hint else ""))


@dataclass(frozen=True)
class Gap:
    """Missing readings between two present ones.

    Attributes
    ----------
    start_s : int
        Start of the first missing interval, Unix seconds (standard time clock, see
        :class:`IntervalSeries`).
    intervals : int
        Number of missing intervals.
    """

    start_s: int
    intervals: int


@dataclass(frozen=True, eq=False)
class IntervalSeries:
    """Delivered electricity by interval.

    ``start_s`` are interval starts in seconds on the local *standard-time* clock expressed as
    Unix seconds (``utc_s + tz_offset_s``): days and months of it are local days and months
    without daylight saving shifts.

    Attributes
    ----------
    start_s : numpy.ndarray
        Start of each present interval, seconds (int64, ascending, no repeats).
    kwh : numpy.ndarray
        Energy delivered in each interval, kWh.
    interval_s : int
        Interval length, s (900 or 3600).
    tz_offset_s : int
        Offset of local standard time from UTC, s (e.g. -18000 for US Eastern).
    name : str
        Where the readings came from.
    """

    start_s: np.ndarray
    kwh: np.ndarray
    interval_s: int
    tz_offset_s: int = 0
    name: str = ""

    @property
    def total_kwh(self) -> float:
        """Energy of every present interval, kWh."""
        return float(self.kwh.sum())

    @property
    def gaps(self) -> tuple[Gap, ...]:
        """Missing intervals between the first and the last reading."""
        step = np.diff(self.start_s)
        where = np.flatnonzero(step > self.interval_s)
        return tuple(Gap(int(self.start_s[i] + self.interval_s), int(step[i] // self.interval_s - 1))
                     for i in where)

    @property
    def span_days(self) -> float:
        """Days from the first interval's start to the last one's end."""
        if not self.start_s.size:
            return 0.0
        return float(self.start_s[-1] + self.interval_s - self.start_s[0]) / 86400.0


# ----------------------------------------------------------------------------- XML


@dataclass
class _Node:
    tag: str
    line: int
    col: int
    attrs: dict
    children: list
    text: str = ""

    def find(self, tag: str) -> _Node | None:
        return next((c for c in self.children if c.tag == tag), None)

    def iter(self, tag: str):  # noqa: ANN201 - a generator of nodes
        for c in self.children:
            if c.tag == tag:
                yield c
            yield from c.iter(tag)


def _parse_tree(text: str, name: str) -> _Node:
    parser = expat.ParserCreate(namespace_separator=" ")
    root = _Node("#document", 0, 0, {}, [])
    stack = [root]

    def start(tag: str, attrs: dict) -> None:
        node = _Node(tag.rsplit(" ", 1)[-1], parser.CurrentLineNumber, parser.CurrentColumnNumber + 1, attrs, [])
        stack[-1].children.append(node)
        stack.append(node)

    def end(_tag: str) -> None:
        stack.pop()

    def chars(data: str) -> None:
        stack[-1].text += data

    def entity(*_args: object) -> None:  # no entities: a meter file is data from outside
        raise MeterFileError(name, parser.CurrentLineNumber, "entity declarations are not allowed in a meter file",
                             "download the file again from the utility")

    parser.StartElementHandler, parser.EndElementHandler, parser.CharacterDataHandler = start, end, chars
    parser.SetParamEntityParsing(expat.XML_PARAM_ENTITY_PARSING_NEVER)
    parser.EntityDeclHandler = entity
    try:
        parser.Parse(text, True)
    except expat.ExpatError as exc:
        raise MeterFileError(name, exc.lineno, f"not well-formed XML ({expat.ErrorString(exc.code)})",
                             "download the file again from the utility", exc.offset + 1) from None
    return root


def _int(node: _Node | None, name: str, what: str, at: _Node) -> int:
    if node is None:
        raise MeterFileError(name, at.line, f"{at.tag} has no {what}", "every reading needs a start, a duration "
                             "and a value", at.col)
    try:
        return int(node.text.strip())
    except ValueError:
        raise MeterFileError(name, node.line, f"{what} is {node.text.strip()!r}, not a whole number",
                             col=node.col) from None


def _links(entry: _Node) -> dict[str, list[str]]:
    out: dict[str, list[str]] = {}
    for link in entry.children:
        if link.tag == "link" and link.attrs.get("href"):
            out.setdefault(link.attrs.get("rel", ""), []).append(link.attrs["href"].rstrip("/"))
    return out


def parse_espi_xml(text: str, name: str = "meter.xml") -> IntervalSeries:
    """Read a Green Button ESPI XML document: the delivered electricity readings.

    Parameters
    ----------
    text : str
        The XML document.
    name : str
        The file's name, for messages.

    Returns
    -------
    IntervalSeries
        Delivered energy by interval, kWh, on the local standard-time clock.

    Raises
    ------
    MeterFileError
        For malformed XML, readings without a start, duration or value, a unit that is not
        watt-hours, an interval other than 15 minutes or an hour, mixed intervals, a repeated
        interval, several delivered-electricity series, or no readings at all.

    References
    ----------
    NAESB REQ.21 (ESPI): ReadingType, IntervalBlock, IntervalReading, LocalTimeParameters.
    """
    root = _parse_tree(text, name)
    entries = list(root.iter("entry"))
    reading_types: dict[str, _Node] = {}
    blocks_of: dict[str, str] = {}       # IntervalBlock collection href -> ReadingType href
    blocks: list[tuple[_Node, list[str]]] = []
    tz = 0
    for entry in entries:
        content = entry.find("content")
        if content is None:
            continue
        links = _links(entry)
        for item in content.children:
            if item.tag == "ReadingType":
                for href in links.get("self", []) or [f"#{len(reading_types)}"]:
                    reading_types[href] = item
            elif item.tag == "MeterReading":
                related = links.get("related", [])
                rt = [h for h in related if "/ReadingType/" in h]
                for h in related:
                    if h.endswith("/IntervalBlock") and rt:
                        blocks_of[h] = rt[0]
            elif item.tag == "IntervalBlock":
                blocks.append((item, links.get("up", []) + links.get("self", [])))
            elif item.tag == "LocalTimeParameters":
                off = item.find("tzOffset")
                if off is not None:
                    tz = _int(off, name, "tzOffset", item)
    if not entries:  # not a feed: bare IntervalBlocks (and perhaps one ReadingType)
        blocks = [(b, []) for b in root.iter("IntervalBlock")]
        reading_types = {f"#{i}": r for i, r in enumerate(root.iter("ReadingType"))}
        off = next(root.iter("tzOffset"), None)
        tz = _int(off, name, "tzOffset", off) if off is not None else 0
    if not blocks:
        raise MeterFileError(name, 0, "no IntervalBlock with readings in the file",
                             "export interval (15-minute or hourly) usage, not a bill summary")

    def reading_type_of(hrefs: list[str]) -> _Node | None:
        for h in hrefs:
            up = h if h.endswith("/IntervalBlock") else h.rsplit("/", 1)[0]
            if up in blocks_of and blocks_of[up] in reading_types:
                return reading_types[blocks_of[up]]
        return next(iter(reading_types.values())) if len(reading_types) == 1 else None

    chosen: dict[int, list[_Node]] = {}
    kinds: dict[int, _Node | None] = {}
    for block, hrefs in blocks:
        rt = reading_type_of(hrefs)
        if rt is None and len(reading_types) > 1:
            raise MeterFileError(name, block.line, "cannot tell which reading type this IntervalBlock has",
                                 "keep one meter reading per file, or the feed's links", block.col)
        flow = rt.find("flowDirection") if rt is not None else None
        if flow is not None and int(flow.text.strip() or DELIVERED) != DELIVERED:
            continue  # energy sent back to the grid: not the household's use
        key = id(rt)
        kinds[key] = rt
        chosen.setdefault(key, []).append(block)
    if len(chosen) > 1:
        lines = sorted(k.line for k in kinds.values() if k is not None)
        raise MeterFileError(name, lines[-1] if lines else 0, "the file holds more than one series of delivered "
                             "electricity", "export one meter at a time")
    if not chosen:
        raise MeterFileError(name, 0, "no readings of electricity delivered to the home",
                             "the file holds only energy sent to the grid")
    (key, found), = chosen.items()
    rt = kinds[key]
    scale_wh = 1.0
    if rt is not None:
        uom = rt.find("uom")
        if uom is not None and _int(uom, name, "uom", rt) != WH:
            raise MeterFileError(name, uom.line, f"unit code {uom.text.strip()} is not watt-hours ({WH})",
                                 "homeplan reads electricity use in watt-hours", uom.col)
        power = rt.find("powerOfTenMultiplier")
        if power is not None:
            scale_wh = 10.0 ** _int(power, name, "powerOfTenMultiplier", rt)
    starts: list[int] = []
    values: list[float] = []
    where: list[int] = []
    duration = None
    for block in found:
        for r in block.iter("IntervalReading"):
            period = r.find("timePeriod")
            if period is None:
                raise MeterFileError(name, r.line, "IntervalReading has no timePeriod",
                                     "every reading needs a start and a duration", r.col)
            start = _int(period.find("start"), name, "start", period)
            dur = _int(period.find("duration"), name, "duration", period)
            value = r.find("value")
            if value is None:
                raise MeterFileError(name, r.line, "IntervalReading has no value", "the reading is incomplete", r.col)
            try:
                v = float(value.text.strip())
            except ValueError:
                raise MeterFileError(name, value.line, f"value {value.text.strip()!r} is not a number",
                                     col=value.col) from None
            if dur not in INTERVALS_S:
                raise MeterFileError(name, period.line, f"interval of {dur} s",
                                     "homeplan reads 15-minute (900 s) or hourly (3600 s) readings", period.col)
            if duration is None:
                duration = dur
            elif dur != duration:
                raise MeterFileError(name, period.line, f"mixes {duration} s and {dur} s intervals",
                                     "export one resolution at a time", period.col)
            if not np.isfinite(v) or v < 0:
                raise MeterFileError(name, value.line, f"value {v:g} is not a delivered amount of energy",
                                     col=value.col)
            starts.append(start + tz)
            values.append(v * scale_wh / 1000.0)
            where.append(r.line)
    return _series(np.array(starts, dtype=np.int64), np.array(values), int(duration), tz, name, where)


def _series(starts: np.ndarray, kwh: np.ndarray, interval_s: int, tz: int, name: str,
            lines: list[int]) -> IntervalSeries:
    if not starts.size:
        raise MeterFileError(name, 0, "no interval readings in the file")
    order = np.argsort(starts, kind="stable")
    s = starts[order]
    repeated = np.flatnonzero(np.diff(s) == 0)
    if repeated.size:
        i = order[repeated[0] + 1]
        when = dt.datetime.fromtimestamp(int(s[repeated[0]]), dt.UTC).strftime("%Y-%m-%d %H:%M")
        raise MeterFileError(name, lines[i], f"a second reading for the interval starting {when}",
                             "keep one reading per interval")
    off_grid = np.flatnonzero((s - s[0]) % interval_s)
    if off_grid.size:
        raise MeterFileError(name, lines[order[off_grid[0]]], "a reading starts between intervals",
                             "intervals must follow each other without overlap")
    return IntervalSeries(s, kwh[order], interval_s, tz, name)


def write_espi_xml(series: IntervalSeries, title: str = "Interval usage (invented)") -> str:
    """A minimal Green Button ESPI feed of the series (one UsagePoint, one delivered series in
    watt-hours, one IntervalBlock per local day).

    Parameters
    ----------
    series : IntervalSeries
        Delivered energy by interval, kWh.
    title : str
        Title of the feed.

    Returns
    -------
    str
        The XML document.

    References
    ----------
    NAESB REQ.21 (ESPI) element names and codes (uom 72, flowDirection 1), from memory.
    """
    base = "https://example.invalid/espi/1_1/resource/Subscription/1/UsagePoint/1"
    esc = title.replace("&", "&amp;").replace("<", "&lt;")
    out = ['<?xml version="1.0" encoding="UTF-8"?>',
           '<feed xmlns="http://www.w3.org/2005/Atom" xmlns:espi="http://naesb.org/espi">',
           f"<title>{esc}</title>",
           f'<entry><link rel="self" href="{base}/MeterReading/1"/>'
           f'<link rel="related" href="{base}/MeterReading/1/IntervalBlock"/>'
           '<link rel="related" href="https://example.invalid/espi/1_1/resource/ReadingType/1"/>'
           "<content><espi:MeterReading/></content></entry>",
           '<entry><link rel="self" href="https://example.invalid/espi/1_1/resource/ReadingType/1"/>'
           "<content><espi:ReadingType><espi:accumulationBehaviour>4</espi:accumulationBehaviour>"
           "<espi:commodity>1</espi:commodity><espi:flowDirection>1</espi:flowDirection>"
           f"<espi:intervalLength>{series.interval_s}</espi:intervalLength><espi:kind>12</espi:kind>"
           "<espi:powerOfTenMultiplier>0</espi:powerOfTenMultiplier><espi:uom>72</espi:uom>"
           "</espi:ReadingType></content></entry>",
           "<entry><content><espi:LocalTimeParameters>"
           f"<espi:tzOffset>{series.tz_offset_s}</espi:tzOffset></espi:LocalTimeParameters></content></entry>"]
    utc = series.start_s - series.tz_offset_s
    days = (series.start_s // 86400).astype(np.int64)
    for k, day in enumerate(np.unique(days)):
        idx = np.flatnonzero(days == day)
        out.append(f'<entry><link rel="self" href="{base}/MeterReading/1/IntervalBlock/{k + 1}"/>'
                   f'<link rel="up" href="{base}/MeterReading/1/IntervalBlock"/><content>'
                   '<IntervalBlock xmlns="http://naesb.org/espi">')
        out.append(f"<interval><duration>{len(idx) * series.interval_s}</duration>"
                   f"<start>{int(utc[idx[0]])}</start></interval>")
        for i in idx:
            out.append(f"<IntervalReading><timePeriod><duration>{series.interval_s}</duration>"
                       f"<start>{int(utc[i])}</start></timePeriod>"
                       f"<value>{round(float(series.kwh[i]) * 1000)}</value></IntervalReading>")
        out.append("</IntervalBlock></content></entry>")
    out.append("</feed>")
    return "\n".join(out) + "\n"


# ----------------------------------------------------------------------------- CSV


def _us_dst_bounds(year: int) -> tuple[dt.datetime, dt.datetime]:
    """Local clock times when US daylight saving time starts and ends (15 U.S.C. 260a)."""
    march = dt.date(year, 3, 1)
    second_sunday = march + dt.timedelta(days=(6 - march.weekday()) % 7 + 7)
    nov = dt.date(year, 11, 1)
    first_sunday = nov + dt.timedelta(days=(6 - nov.weekday()) % 7)
    return (dt.datetime.combine(second_sunday, dt.time(2)), dt.datetime.combine(first_sunday, dt.time(1)))


_HEADER_START = ("date",)
_KWH_UNITS = {"kwh": 1.0, "wh": 0.001}


def _standard_clock(local: list[dt.datetime], dst: bool) -> list[dt.datetime]:
    """Local clock times (as a US meter prints them) on the standard-time clock: an hour back
    while daylight saving time is on; the repeated hour at its end counts once as each."""
    if not dst:
        return local
    out = []
    seen_repeat: set[dt.datetime] = set()
    for t in local:
        start, end = _us_dst_bounds(t.year)
        in_dst = start <= t < end
        if end <= t < end + dt.timedelta(hours=1):
            # the hour after 1:00 a.m. on the last day happens twice: daylight time first
            in_dst = t not in seen_repeat
            seen_repeat.add(t)
        out.append(t - dt.timedelta(hours=1) if in_dst else t)
    return out


def parse_green_button_csv(text: str, name: str = "meter.csv", us_daylight_saving: bool = True) -> IntervalSeries:
    """Read a Green Button CSV export: a header row with ``DATE``, ``START TIME`` and a usage
    column (``USAGE`` with a ``UNITS`` column, or ``IMPORT (kWh)``), one row per interval.

    Lines before the header (account, address) are skipped; rows of other kinds (``TYPE`` other
    than electric usage) are ignored. Times are the local clock; with ``us_daylight_saving``
    the clock is taken to follow US daylight saving time and is converted to standard time.

    Parameters
    ----------
    text : str
        The CSV text.
    name : str
        The file's name, for messages.
    us_daylight_saving : bool
        True if the printed times follow US daylight saving time.

    Returns
    -------
    IntervalSeries
        Delivered energy by interval, kWh, on the local standard-time clock (``tz_offset_s``
        0: the file gives no offset from UTC).

    Raises
    ------
    MeterFileError
        For a missing header, a row with a bad date, time or number, an interval other than 15
        minutes or an hour, mixed intervals, a repeated interval, or no readings.

    References
    ----------
    15 U.S.C. 260a (US daylight saving time).
    """
    rows = list(csv.reader(io.StringIO(text)))
    header_at = next((i for i, r in enumerate(rows)
                      if r and r[0].strip().lower().lstrip("\ufeff") in ("type", "date")
                      and any(c.strip().lower() == "start time" for c in r)), None)
    if header_at is None:
        raise MeterFileError(name, 0, "no header row with DATE and START TIME",
                             "export interval usage from the utility's Green Button page")
    cols = [c.strip().lower() for c in rows[header_at]]
    try:
        c_date, c_start = cols.index("date"), cols.index("start time")
    except ValueError:
        raise MeterFileError(name, header_at + 1, "the header needs DATE and START TIME") from None
    c_end = cols.index("end time") if "end time" in cols else None
    c_type = cols.index("type") if "type" in cols else None
    if "usage" in cols:
        c_use, c_units = cols.index("usage"), (cols.index("units") if "units" in cols else None)
    elif "import (kwh)" in cols:
        c_use, c_units = cols.index("import (kwh)"), None
    else:
        raise MeterFileError(name, header_at + 1, "no USAGE or IMPORT (kWh) column")
    local: list[dt.datetime] = []
    kwh: list[float] = []
    lines: list[int] = []
    durations: set[int] = set()
    for n, row in enumerate(rows[header_at + 1:], start=header_at + 2):
        if not row or not any(c.strip() for c in row):
            continue
        if c_type is not None and "usage" not in row[c_type].lower():
            continue
        if len(row) <= max(c_date, c_start, c_use):
            raise MeterFileError(name, n, "the row has too few columns")
        try:
            day = dt.date.fromisoformat(row[c_date].strip())
            start = dt.time.fromisoformat(row[c_start].strip().rjust(5, "0"))
        except ValueError:
            raise MeterFileError(name, n, f"date {row[c_date]!r} or time {row[c_start]!r} is not readable",
                                 "write YYYY-MM-DD and HH:MM") from None
        try:
            v = float(row[c_use].strip().replace(",", ""))
        except ValueError:
            raise MeterFileError(name, n, f"usage {row[c_use]!r} is not a number") from None
        unit = row[c_units].strip().lower() if c_units is not None and len(row) > c_units else "kwh"
        if unit not in _KWH_UNITS:
            raise MeterFileError(name, n, f"unit {unit!r} is not energy", "homeplan reads kWh or Wh of electricity")
        if not np.isfinite(v) or v < 0:
            raise MeterFileError(name, n, f"usage {v:g} is not a delivered amount of energy")
        if c_end is not None and len(row) > c_end and row[c_end].strip():
            try:
                end = dt.time.fromisoformat(row[c_end].strip().rjust(5, "0"))
            except ValueError:
                raise MeterFileError(name, n, f"end time {row[c_end]!r} is not readable") from None
            span = ((end.hour * 60 + end.minute + 1) - (start.hour * 60 + start.minute)) % 1440
            durations.add(span * 60)
        local.append(dt.datetime.combine(day, start))
        kwh.append(v * _KWH_UNITS[unit])
        lines.append(n)
    if not local:
        raise MeterFileError(name, 0, "no usage rows under the header")
    clock = _standard_clock(local, us_daylight_saving)
    epoch = dt.datetime(1970, 1, 1)
    starts = np.array([int((t - epoch).total_seconds()) for t in clock], dtype=np.int64)
    if len(durations) > 1:
        raise MeterFileError(name, lines[0], f"mixes intervals of {sorted(d // 60 for d in durations)} minutes",
                             "export one resolution at a time")
    interval = durations.pop() if durations else int(np.min(np.diff(np.unique(starts)))) if len(starts) > 1 else 3600
    if interval not in INTERVALS_S:
        raise MeterFileError(name, lines[0], f"intervals of {interval // 60} minutes",
                             "homeplan reads 15-minute or hourly readings")
    return _series(starts, np.array(kwh), interval, 0, name, lines)


def write_green_button_csv(series: IntervalSeries, us_daylight_saving: bool = True) -> str:
    """The series as a Green Button CSV (local clock times, US daylight saving when asked).

    Parameters
    ----------
    series : IntervalSeries
        Delivered energy by interval, kWh.
    us_daylight_saving : bool
        Print the times on the US daylight saving clock.

    Returns
    -------
    str
        The CSV text.

    References
    ----------
    15 U.S.C. 260a (US daylight saving time).
    """
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["Name", "Invented household"])
    w.writerow(["Service", "Service 1 (invented)"])
    w.writerow([])
    w.writerow(["TYPE", "DATE", "START TIME", "END TIME", "USAGE", "UNITS", "NOTES"])
    epoch = dt.datetime(1970, 1, 1)
    step = dt.timedelta(seconds=series.interval_s - 60)
    for s, v in zip(series.start_s.tolist(), series.kwh.tolist(), strict=True):
        t = epoch + dt.timedelta(seconds=s)
        if us_daylight_saving:
            start, end = _us_dst_bounds(t.year)
            if start <= t < end:  # daylight time, in standard-clock terms
                t += dt.timedelta(hours=1)
        w.writerow(["Electric usage", t.date().isoformat(), t.strftime("%H:%M"), (t + step).strftime("%H:%M"),
                    f"{v:.3f}", "kWh", ""])
    return buf.getvalue()


def read_green_button(path: str | Path, us_daylight_saving: bool = True) -> IntervalSeries:
    """Read a Green Button file, XML or CSV by its content.

    Parameters
    ----------
    path : str or pathlib.Path
        The file.
    us_daylight_saving : bool
        For CSV: the printed times follow US daylight saving time.

    Returns
    -------
    IntervalSeries
        Delivered energy by interval, kWh.

    Raises
    ------
    MeterFileError
        If the file is missing, too large, not UTF-8, or not a readable Green Button file.
    """
    p = Path(path)
    try:
        data = p.read_bytes() if p.stat().st_size <= MAX_BYTES else None
    except OSError as exc:
        raise MeterFileError(str(p), 0, f"cannot read the meter file ({exc.strerror})",
                             "give a path relative to the plan file") from None
    if data is None:
        raise MeterFileError(str(p), 0, f"the file is larger than {MAX_BYTES // 2**20} MB", "is this the right file?")
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise MeterFileError(str(p), 0, "not UTF-8 text", "download the file again") from None
    return parse_green_button(text, str(p), us_daylight_saving)


def parse_green_button(text: str, name: str = "meter", us_daylight_saving: bool = True) -> IntervalSeries:
    """A Green Button file's text, XML or CSV by its content.

    Parameters
    ----------
    text : str
        The file's text.
    name : str
        The file's name, for messages.
    us_daylight_saving : bool
        For CSV: the printed times follow US daylight saving time.

    Returns
    -------
    IntervalSeries
        Delivered energy by interval, kWh.

    Raises
    ------
    MeterFileError
        If the text is not a readable Green Button file.
    """
    if text.lstrip().startswith("<"):
        return parse_espi_xml(text, name)
    return parse_green_button_csv(text, name, us_daylight_saving)


# ----------------------------------------------------------------------------- figures


def peak_demand(series: IntervalSeries, last_days: float | None = None) -> tuple[float, int]:
    """Highest average power over one interval: the interval's kWh over its hours.

    Parameters
    ----------
    series : IntervalSeries
        Delivered energy by interval, kWh.
    last_days : float or None
        Only the intervals of the last ``last_days`` days (None: all).

    Returns
    -------
    kw : float
        Peak demand, kW.
    start_s : int
        Start of the peak interval, seconds (standard-time clock).

    References
    ----------
    NEC 2023 220.87 (maximum demand as the highest average kW over a 15-minute interval).
    """
    keep = np.ones(series.kwh.size, bool)
    if last_days is not None:
        keep = series.start_s >= series.start_s[-1] + series.interval_s - last_days * 86400
    kw = series.kwh[keep] / (series.interval_s / 3600.0)
    i = int(np.argmax(kw))
    return float(kw[i]), int(series.start_s[keep][i])


def _per_day(series: IntervalSeries) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    day = series.start_s // 86400
    days, inv = np.unique(day, return_inverse=True)
    kwh = np.bincount(inv, weights=series.kwh)
    count = np.bincount(inv)
    return days, kwh, count == 86400 // series.interval_s


def daily_kwh(series: IntervalSeries) -> tuple[tuple[dt.date, ...], np.ndarray]:
    """Energy of each complete day (every interval present), kWh; incomplete days are left out.

    Parameters
    ----------
    series : IntervalSeries
        Delivered energy by interval, kWh.

    Returns
    -------
    dates : tuple of datetime.date
        The complete days (local standard time).
    kwh : numpy.ndarray
        Their energy, kWh.
    """
    days, kwh, complete = _per_day(series)
    epoch = dt.date(1970, 1, 1)
    return tuple(epoch + dt.timedelta(days=int(d)) for d in days[complete]), kwh[complete]


def monthly_kwh(series: IntervalSeries) -> dict[tuple[int, int], float]:
    """Energy of each complete calendar month (every interval present), kWh.

    Parameters
    ----------
    series : IntervalSeries
        Delivered energy by interval, kWh.

    Returns
    -------
    dict of (int, int) to float
        (year, month) -> energy, kWh, complete months only.
    """
    days, kwh, complete = _per_day(series)
    epoch = dt.date(1970, 1, 1)
    totals: dict[tuple[int, int], list[float]] = {}
    counts: dict[tuple[int, int], int] = {}
    for d, k, ok in zip(days.tolist(), kwh.tolist(), complete.tolist(), strict=True):
        date = epoch + dt.timedelta(days=d)
        key = (date.year, date.month)
        totals.setdefault(key, []).append(k)
        counts[key] = counts.get(key, 0) + (1 if ok else 0)
    out = {}
    for (y, m), values in totals.items():
        n = (dt.date(y + (m == 12), m % 12 + 1, 1) - dt.date(y, m, 1)).days
        if counts[(y, m)] == n:
            out[(y, m)] = float(sum(values))
    return out


def hourly_kwh(series: IntervalSeries) -> tuple[np.ndarray, np.ndarray]:
    """Energy of each complete clock hour (every interval present), placed on the hours of a
    365-day year (0 = 1 January 00:00, standard time) so that it lines up with a typical-year
    simulation; 29 February is left out.

    Parameters
    ----------
    series : IntervalSeries
        Delivered energy by interval, kWh.

    Returns
    -------
    hour_of_year : numpy.ndarray
        Index of each complete hour in a 365-day year, 0..8759 (int64; a year of readings that
        spans two calendar years can give an index twice).
    kwh : numpy.ndarray
        Their energy, kWh.
    """
    hour = series.start_s // 3600
    hours, inv = np.unique(hour, return_inverse=True)
    kwh = np.bincount(inv, weights=series.kwh)
    complete = np.bincount(inv) == 3600 // series.interval_s
    hours, kwh = hours[complete], kwh[complete]
    stamps = (hours * 3600).astype("datetime64[s]")
    year_start = stamps.astype("datetime64[Y]")
    day = (stamps.astype("datetime64[D]") - year_start.astype("datetime64[D]")).astype(np.int64)
    leap = (year_start.astype(np.int64) + 1970) % 4 == 0   # 1901-2099: every fourth year
    feb29 = leap & (day == 59)
    day = np.where(leap & (day > 59), day - 1, day)
    index = day * 24 + (hours % 24)
    return index[~feb29], kwh[~feb29]


@dataclass(frozen=True)
class ChangePoint:
    """Daily use against daily heating and cooling degree days: ``kwh = base + h HDD + c CDD``.

    Attributes
    ----------
    base_kwh_per_day : float
        Use on a day with no heating or cooling, kWh per day.
    heating_kwh_per_f_day : float
        Extra use per heating degree day (base 65 F), kWh per F-day.
    cooling_kwh_per_f_day : float
        Extra use per cooling degree day (base 65 F), kWh per F-day.
    r2 : float
        Coefficient of determination, dimensionless.
    days : int
        Days in the fit.
    heating_balance_f : float
        Base temperature of the heating degree days (the heating change point), F.
    cooling_balance_f : float
        Base temperature of the cooling degree days (the cooling change point), F.
    sse : float
        Sum of squared residuals, kWh^2.
    """

    base_kwh_per_day: float
    heating_kwh_per_f_day: float
    cooling_kwh_per_f_day: float
    r2: float
    days: int
    heating_balance_f: float = 65.0
    cooling_balance_f: float = 65.0
    sse: float = 0.0

    @property
    def base_load_kw(self) -> float:
        """The base use as a steady power, kW."""
        return self.base_kwh_per_day / 24.0


def change_point_fit(kwh_per_day: np.ndarray, mean_temp_f: np.ndarray, balance_f: float = 65.0,
                     cooling_balance_f: float | None = None) -> ChangePoint:
    """Least-squares fit of daily use on heating and cooling degree days (fixed balance points);
    a slope is dropped (0) when the days hold no degree days of its kind, or when it comes out
    negative (use that falls as it gets colder is not a heating response), and the rest refitted.

    Parameters
    ----------
    kwh_per_day : numpy.ndarray
        Energy of each day, kWh.
    mean_temp_f : numpy.ndarray
        Mean outdoor temperature of each day, F.
    balance_f : float
        Base temperature of the heating degree days (and of the cooling ones unless
        ``cooling_balance_f`` is given), F.
    cooling_balance_f : float or None
        Base temperature of the cooling degree days, F (None: ``balance_f``).

    Returns
    -------
    ChangePoint
        Base, slopes and fit.

    Raises
    ------
    ValueError
        If fewer than 7 days are given.

    References
    ----------
    ASHRAE Guideline 14-2014, multivariable degree-day models (from memory); Fels (1986), PRISM.
    """
    y = np.asarray(kwh_per_day, float)
    t = np.asarray(mean_temp_f, float)
    if y.size < 7:
        raise ValueError("need at least 7 complete days")
    cool_f = balance_f if cooling_balance_f is None else cooling_balance_f
    hdd = np.maximum(balance_f - t, 0.0)
    cdd = np.maximum(t - cool_f, 0.0)
    use = [hdd.sum() > 1.0, cdd.sum() > 1.0]
    while True:
        x = np.column_stack([np.ones_like(y)] + [c for c, u in zip((hdd, cdd), use, strict=True) if u])
        coef, *_ = np.linalg.lstsq(x, y, rcond=None)
        slopes = iter(coef[1:])
        signs = [(float(next(slopes)) if u else 0.0) for u in use]
        if all(v >= 0 for v in signs):
            break
        use = [u and v >= 0 for u, v in zip(use, signs, strict=True)]  # a falling response is not physical
    pred = x @ coef
    sse = float(((y - pred) ** 2).sum())
    ss_tot = float(((y - y.mean()) ** 2).sum())
    r2 = max(1.0 - sse / ss_tot, 0.0) if ss_tot > 0 else 0.0
    it = iter(coef[1:])
    h = float(next(it)) if use[0] else 0.0
    c = float(next(it)) if use[1] else 0.0
    return ChangePoint(float(coef[0]), h, c, r2, int(y.size), float(balance_f), float(cool_f), sse)


def change_point_search(kwh_per_day: np.ndarray, mean_temp_f: np.ndarray,
                        heating_f: tuple[float, float] = (45.0, 70.0),
                        cooling_f: tuple[float, float] = (55.0, 80.0), step_f: float = 1.0) -> ChangePoint:
    """The change-point model of daily use with its balance points fitted: every heating and
    cooling base temperature on a grid (the cooling one not below the heating one) is fitted by
    :func:`change_point_fit` and the pair with the least squared error kept (a variable-base
    degree-day model). Of equal fits (days that cannot tell the balance points apart, e.g. a
    winter month colder than every base tried) the one nearest the conventional 65 F is kept.

    Parameters
    ----------
    kwh_per_day : numpy.ndarray
        Energy of each day, kWh.
    mean_temp_f : numpy.ndarray
        Mean outdoor temperature of each day, F.
    heating_f : tuple of float
        Lowest and highest heating base temperature tried, F.
    cooling_f : tuple of float
        Lowest and highest cooling base temperature tried, F.
    step_f : float
        Grid step, F.

    Returns
    -------
    ChangePoint
        Base, slopes, balance points and fit.

    Raises
    ------
    ValueError
        If fewer than 7 days are given.

    References
    ----------
    ASHRAE Guideline 14-2014, change-point (3P, 4P, 5P) models of energy use against outdoor
    temperature (from memory); Fels (1986), PRISM (the reference temperature fitted to the data).
    """
    t = np.asarray(mean_temp_f, float)
    best: ChangePoint | None = None
    heat_grid = np.arange(heating_f[0], heating_f[1] + step_f / 2, step_f)
    cool_grid = np.arange(cooling_f[0], cooling_f[1] + step_f / 2, step_f)
    def conventional(f: ChangePoint) -> float:
        return abs(f.heating_balance_f - 65.0) + abs(f.cooling_balance_f - 65.0)

    for tc in cool_grid:
        for th in heat_grid[heat_grid <= tc]:
            fit = change_point_fit(kwh_per_day, t, float(th), float(tc))
            tol = 1e-9 * max(best.sse if best else 0.0, 1.0)
            if (best is None or fit.sse < best.sse - tol
                    or (fit.sse <= best.sse + tol and conventional(fit) < conventional(best))):
                best = fit
    return best if best is not None else change_point_fit(kwh_per_day, t, heating_f[0], cooling_f[1])
