"""Price risk and sensitivity in the printout and on the command line (presentation only: the
figures are the fixture's invented ones, checked for being shown, rounded and escaped)."""

from __future__ import annotations

import re
from dataclasses import replace

from homeplan.report.charts import band_chart_svg, nice_ticks, tornado_svg
from homeplan.report.html import render_html
from homeplan.report.risk import risk_lines, risk_view, sensitivity_view
from homeplan.report.text import render_markdown, render_text, tornado_text
from homeplan.report.view import build_report
from homeplan.result.sensitivity import Sensitivity, SensitivityRow

from .fixtures import make_result


def _with_sensitivity(result):
    rows = (SensitivityRow("discount_rate", "Discount rate", "1 % a year", "7 % a year", 9800.0, 2100.0),
            SensitivityRow("weather", "Weather <b>", "2 F warmer", "2 F colder", 6000.0, 6900.0))
    return replace(result, sensitivity=Sensitivity(6400.0, rows))


def test_risk_is_in_every_format() -> None:
    result = _with_sensitivity(make_result())
    report = build_report(result)
    assert report.risk is not None and report.sensitivity is not None
    text, md, html = render_text(report), render_markdown(report), render_html(report)
    for out in (text, md, html):
        assert "Price risk" in out and "What moves the result" in out
        assert "$61,000" in out          # the plan's median total cost, rounded to $100
        assert "72 %" in out             # beats like-for-like
        assert "11.0 c/kWh" in out       # the solar's locked-in cost
    # the yearly bills and money out, the price bands, the tornado
    assert html.count('<svg xmlns="http://www.w3.org/2000/svg" class="chart"') == 3
    assert "Weather &lt;b&gt;" in html and "Weather <b>" not in html


def test_risk_lines_say_nothing_when_not_computed() -> None:
    result = make_result()
    road = replace(result.roadmap, price_risk=None)
    assert risk_lines(road) == () and risk_view(road) is None
    assert build_report(replace(result, roadmap=road)).risk is None
    assert sensitivity_view(result) is None


def test_band_chart_draws_one_band_and_median_per_series() -> None:
    view = risk_view(make_result().roadmap)
    svg = band_chart_svg(view.series, "bills")
    assert svg.count("<polygon") == len(view.series) == 2
    assert svg.count("<polyline") == 2
    # every P90 point sits above (smaller y than) its P10 point
    poly = re.search(r'<polygon points="([^"]+)"', svg).group(1).split()
    n = len(view.series[0].years)
    upper = [float(p.split(",")[1]) for p in poly[:n]]
    lower = [float(p.split(",")[1]) for p in reversed(poly[n:])]
    assert all(u <= lo + 1e-9 for u, lo in zip(upper, lower, strict=True))


def test_tornado_has_the_widest_swing_first_and_both_settings() -> None:
    view = sensitivity_view(_with_sensitivity(make_result()))
    assert [b.label for b in view.bars] == ["Discount rate", "Weather <b>"]
    svg = tornado_svg(view.bars, view.base_usd, "npv")
    assert svg.count("<rect") == 4
    text = tornado_text(view.base_usd, view.bars)
    first = text.splitlines()[0]
    assert first.startswith("Discount rate") and "<" in first and ">" in first


def test_ticks_cover_the_range() -> None:
    for lo, hi in ((8900, 26100), (-13550, -3965), (0.2, 0.9), (2300, 15400)):
        t = nice_ticks(lo, hi)
        assert t[0] <= lo and t[-1] >= hi and len(t) <= 8
