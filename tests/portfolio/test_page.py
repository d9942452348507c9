"""The summary page: one self-contained, escaped HTML file with SVG charts, in the printout's
style; rendered by headless Chromium when it is installed.

References: WHATWG HTML Living Standard (parsing); W3C SVG 1.1 (the chart elements).
"""

from __future__ import annotations

import re
import subprocess
from html.parser import HTMLParser

import pytest

from homeplan.portfolio.page import render_page
from homeplan.portfolio.rollup import rollup
from homeplan.portfolio.store import Store
from tests.report.test_browser import FLAGS, chromium

HOSTILE = '<script>alert("x")</script> & "quotes"'


class _Tags(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.tags: list[str] = []
        self.text: list[str] = []
        self.policy = ""

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        a = dict(attrs)
        if tag == "meta" and a.get("http-equiv") == "Content-Security-Policy":
            self.policy = a.get("content", "")

    def handle_data(self, data):
        self.text.append(data)


@pytest.fixture(scope="module")
def page(straight_run):
    with Store.open(straight_run, readonly=True) as store:
        r = rollup(store)
    return r, render_page(r, printed="2026-12-01 00:00 UTC", problems=[("h9", "error", HOSTILE)])


def test_the_page_is_self_contained_and_escaped(page):
    _, html = page
    parser = _Tags()
    parser.feed(html)
    assert "script" not in parser.tags and HOSTILE in "".join(parser.text)
    assert parser.policy.startswith("default-src 'none'")
    assert not re.search(r"(src|href)=\"https?:", html)


def test_the_page_has_a_chart_per_question_and_the_method(page):
    r, html = page
    assert html.count('<svg xmlns="http://www.w3.org/2000/svg" class="chart"') == 4
    for y in r.years:
        assert f">{y['year']}<" in html
    assert "Rusck 1956" in html and "Planning estimates" in html
    assert "licensed" in html.lower() or "qualified" in html.lower()


@pytest.mark.browser
def test_chromium_renders_the_page(page, tmp_path):
    _, html = page
    path = tmp_path / "summary.html"
    path.write_text(html, encoding="utf-8")
    png = tmp_path / "page.png"
    proc = subprocess.run([chromium(), *FLAGS, f"--user-data-dir={tmp_path / 'profile'}",
                           "--window-size=900,1800", f"--screenshot={png}", path.as_uri()],
                          capture_output=True, text=True, timeout=180)
    assert proc.returncode == 0, proc.stderr[-2000:]
    data = png.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"          # PNG signature (ISO/IEC 15948)
    width, height = int.from_bytes(data[16:20], "big"), int.from_bytes(data[20:24], "big")
    assert (width, height) == (900, 1800)
