"""The HTML summary: self-contained, and user text can never become markup or script.

References: WHATWG HTML Living Standard (tokenisation; what an element, attribute and event
handler are), W3C CSP Level 3 (the policy carried in the page). The parser used to inspect the
output is Python's standard html.parser, independent of the code under test.
"""

from __future__ import annotations

import datetime as dt
import re
from html.parser import HTMLParser

from homeplan.report.html import render_html
from homeplan.report.view import build_report
from tests.report.fixtures import HOSTILE, LONG, make_plan, make_result

ALLOWED_TAGS = {
    "html", "head", "meta", "title", "style", "body", "header", "p", "h1", "h2", "h3", "section",
    "dl", "dt", "dd", "ul", "li", "span", "div", "b", "table", "thead", "tbody", "tfoot", "tr", "th",
    "td", "footer", "code", "svg", "rect", "text", "line", "g", "path", "polygon", "polyline", "circle",
}


class Collector(HTMLParser):
    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.tags: list[tuple[str, list[tuple[str, str | None]]]] = []
        self.data: list[str] = []
        self.style: list[str] = []
        self._in_style = False

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, attrs))
        self._in_style = tag == "style"

    def handle_endtag(self, tag):
        if tag == "style":
            self._in_style = False

    def handle_data(self, data):
        (self.style if self._in_style else self.data).append(data)


def parse(html: str) -> Collector:
    c = Collector()
    c.feed(html)
    c.close()
    return c


def hostile_html() -> str:
    result = make_result(make_plan(**HOSTILE), hostile_labels=True)
    return render_html(build_report(result, today=dt.date(2026, 12, 1)))


def test_hostile_text_never_becomes_markup() -> None:
    c = parse(hostile_html())
    tags = {t for t, _ in c.tags}
    assert tags <= ALLOWED_TAGS, tags - ALLOWED_TAGS
    assert "script" not in tags and "img" not in tags and "textarea" not in tags
    for tag, attrs in c.tags:
        for name, value in attrs:
            assert not name.startswith("on"), (tag, name)      # no event handlers
            assert "javascript:" not in (value or "").lower()
            assert "<" not in (value or "")
    # exactly one style element: ours
    assert sum(1 for t, _ in c.tags if t == "style") == 1


def test_hostile_text_is_shown_as_text() -> None:
    text = "".join(parse(hostile_html()).data)
    assert '<script>alert("by")</script>' in text
    assert "<img src=x onerror=alert(1)> & Co" in text
    assert "<script>alert('step')</script> =1+1" in text
    assert "</textarea><svg onload=alert(2)>" in text


def test_no_raw_angle_brackets_from_user_text() -> None:
    html = hostile_html()
    for raw in ("<script", "<img", "<svg onload", "</title><", "<b>Bold", "<style>body"):
        assert raw not in html
    assert "&lt;script&gt;" in html


def test_user_text_stays_out_of_css() -> None:
    c = parse(hostile_html())
    css = "".join(c.style)
    assert "evil" not in css and "alert" not in css and "display:none" not in css.replace(" ", "")


def test_very_long_name_is_escaped_and_shortened_in_heading() -> None:
    html = hostile_html()
    h1 = re.search(r"<h1>(.*?)</h1>", html, re.S)
    assert h1 is not None and len(h1.group(1)) < 400
    assert LONG[:60] in html  # still present in full elsewhere (title, tooltip)


def test_self_contained_no_network() -> None:
    html = render_html(build_report(make_result(), today=dt.date(2026, 12, 1)))
    assert not re.search(r"(?i)(src|href)\s*=", html.replace('xmlns="http://www.w3.org/2000/svg"', ""))
    assert "@import" not in html and "url(" not in html and "@font-face" not in html
    assert "http-equiv=\"Content-Security-Policy\"" in html and "default-src &#x27;none&#x27;" in html
    assert "@page" in html and "break-inside: avoid" in html and "break-after: avoid" in html


def test_page_shows_every_section_and_the_footer() -> None:
    result = make_result()
    html = render_html(build_report(result, today=dt.date(2026, 12, 1)))
    text = " ".join(parse(html).data)
    for heading in ("At a glance", "The roadmap", "Steps", "Year by year",
                    "Energy and emissions, before and after", "Electrical capacity", "Key assumptions",
                    "Safety"):
        assert heading in text
    assert "Demo Energy Advisor (invented)" in text and "2026-12-01" in text
    from homeplan.plan.hashing import content_hash

    assert content_hash(result.plan) in text
    # the legend names each colour used; the milestone is marked
    assert "Panel and service work" in text and "Milestone" in text
    assert html.count('class="step"') == len(result.roadmap.steps)
    assert html.count('class="milestone"') == len(result.roadmap.milestones)


def test_infeasible_roadmap_says_so_and_draws_no_bars() -> None:
    import dataclasses

    result = make_result(steps=[])
    road = dataclasses.replace(result.roadmap, status="infeasible",
                               infeasibility="the budget is $2,000 a year short <b>in 2027</b>")
    html = render_html(build_report(dataclasses.replace(result, roadmap=road), today=dt.date(2026, 12, 1)))
    text = " ".join(parse(html).data)
    assert "No roadmap fits these inputs." in text and "<b>in 2027</b>" in text
    assert 'class="step"' not in html and "No steps in this roadmap." in text


def test_long_horizon_year_labels_do_not_overlap() -> None:
    from homeplan.report.svg import timeline_svg
    from homeplan.report.view import Timeline

    svg = timeline_svg(Timeline(2027, 2056, (), ()))
    labels = re.findall(r'<text x="([\d.]+)" y="\d+" text-anchor="middle"[^>]*>(\d{4})</text>', svg)
    xs = [float(x) for x, _ in labels]
    assert len(labels) < 30 and all(b - a >= 38 for a, b in zip(xs, xs[1:], strict=False))
