"""The printable page in a real browser: headless Chromium renders it to PNG and to PDF.

Needs Debian packages ``chromium`` and (for the text and page checks) ``poppler-utils``; on a
developer's machine without them the tests are skipped with a clear reason, but under continuous
integration (``CI`` set, as ``.ci/run`` does) a missing tool is a failure: ``.ci/run`` installs
them, so a skip there would hide a test that did not run. The expected page count (6 on Letter, 5 on A4) is
what the layout gives the invented fixture plan: page 1 holds the home, timeline and steps; blocks are kept whole
where they fit (CSS Fragmentation Module Level 3) without forced breaks, so no page before the
last is half empty. It must hold on both US Letter (Chromium's default) and A4 (ISO 216).

References: PNG specification (ISO/IEC 15948) for the signature and IHDR; PDF 1.7 (ISO
32000-1) for the /Type /Page objects counted when pdfinfo is missing.
"""

from __future__ import annotations

import datetime as dt
import os
import re
import shutil
import struct
import subprocess
from html.parser import HTMLParser
from pathlib import Path

import pytest

from homeplan.plan.hashing import content_hash
from homeplan.report.html import render_html
from homeplan.report.view import build_report
from tests.report.fixtures import HOSTILE, make_plan, make_result

pytestmark = pytest.mark.browser

FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync"]
TODAY = dt.date(2026, 12, 1)


def in_ci() -> bool:
    """True under continuous integration (``CI`` set to anything but empty, 0 or false)."""
    return os.environ.get("CI", "").strip().lower() not in ("", "0", "false", "no")


def missing(what: str) -> None:
    """Skip on a developer's machine; fail under CI, where the tool must be there."""
    if in_ci():
        pytest.fail(f"{what} - under CI this is a failure, not a skip (.ci/run installs it)")
    pytest.skip(what)


def chromium() -> str:
    for cand in ("/usr/bin/chromium", shutil.which("chromium"), shutil.which("chromium-browser")):
        if cand and os.access(cand, os.X_OK):
            return cand
    missing("Chromium is not installed (Debian: apt-get install chromium)")
    raise AssertionError("unreachable")


def run_chromium(tmp: Path, *args: str) -> subprocess.CompletedProcess:
    cmd = [chromium(), *FLAGS, f"--user-data-dir={tmp / 'profile'}", *args]
    proc = subprocess.run(cmd, capture_output=True, text=True, timeout=180)
    assert proc.returncode == 0, proc.stderr[-2000:]
    return proc


def to_pdf(tmp: Path, html: Path, pdf: Path) -> None:
    run_chromium(tmp, "--no-pdf-header-footer", f"--print-to-pdf={pdf}", html.as_uri())
    assert pdf.exists() and pdf.read_bytes().startswith(b"%PDF-")


def pdf_pages(pdf: Path) -> int:
    if shutil.which("pdfinfo"):
        out = subprocess.run(["pdfinfo", str(pdf)], capture_output=True, text=True, check=True).stdout
        return int(re.search(r"^Pages:\s+(\d+)", out, re.M).group(1))
    return len(re.findall(rb"/Type\s*/Page(?![s\w])", pdf.read_bytes()))


def pdf_size_pts(pdf: Path) -> tuple[float, float] | None:
    if not shutil.which("pdfinfo"):
        return None
    out = subprocess.run(["pdfinfo", str(pdf)], capture_output=True, text=True, check=True).stdout
    m = re.search(r"^Page size:\s+([\d.]+) x ([\d.]+) pts", out, re.M)
    return (float(m.group(1)), float(m.group(2))) if m else None


def pdf_text(pdf: Path) -> str | None:
    if not shutil.which("pdftotext"):
        return None
    return subprocess.run(["pdftotext", "-layout", str(pdf), "-"], capture_output=True, text=True,
                          check=True).stdout


def write_page(tmp: Path, name: str, result, paper: str | None = None) -> Path:
    html = render_html(build_report(result, today=TODAY))
    if paper:  # the same page forced onto another paper size
        html = html.replace("</style>", f"@page {{ size: {paper}; }}</style>", 1)
    path = tmp / name
    path.write_text(html, encoding="utf-8")
    return path


@pytest.mark.parametrize("paper,size_pts,n_pages", [(None, (612.0, 792.0), 6),    # US Letter 8.5 x 11 in
                                                    ("A4", (595.92, 842.88), 5)])  # ISO 216: 210 x 297 mm
def test_pdf_pages_and_text(tmp_path: Path, paper, size_pts, n_pages) -> None:
    result = make_result()
    page = write_page(tmp_path, "summary.html", result, paper)
    pdf = tmp_path / "summary.pdf"
    to_pdf(tmp_path, page, pdf)
    assert pdf_pages(pdf) == n_pages
    size = pdf_size_pts(pdf)
    if size is None:
        missing("pdfinfo (poppler-utils) is not installed: page size not checked")
    assert size == pytest.approx(size_pts, abs=1.5)
    text = pdf_text(pdf)
    if text is None:
        missing("pdftotext (poppler-utils) not installed: page count checked, text not")
    pages = [p for p in text.split("\f") if p.strip()]
    assert len(pages) == n_pages
    # the first page is the one for the fridge: the home, the timeline and the steps
    assert "At a glance" in pages[0] and "The roadmap" in pages[0] and "Heat pump" in pages[0]
    assert f"page 1 of {n_pages}" in pages[0]                             # the page margin box
    flat = " ".join(text.split())
    order = ["At a glance", "Against replacing like for like", "Against doing nothing", "The roadmap",
             "Steps", "Bills and money out, year by year", "Fuel still bought", "Year by year", "Price risk",
             "Energy and emissions, before and after", "Electrical capacity", "Key assumptions",
             "Safety", "Words used in this summary", "Plan content hash"]
    positions, at = [], 0
    for h in order:  # each heading after the one before (step lines also say "Safety:")
        at = flat.find(h, at)
        positions.append(at)
    assert -1 not in positions, dict(zip(order, positions, strict=True))
    assert f"Plan content hash {content_hash(result.plan)}" in flat
    assert "Prepared by Demo Energy Advisor (invented)" in " ".join(pages[-1].split())
    for page in pages[:-1]:  # no half-empty pages before the last one
        assert len([line for line in page.splitlines() if line.strip()]) >= 25


def test_screenshot_png(tmp_path: Path) -> None:
    page = write_page(tmp_path, "summary.html", make_result())
    png = tmp_path / "summary.png"
    run_chromium(tmp_path, f"--screenshot={png}", "--window-size=900,1400", "--hide-scrollbars",
                 page.as_uri())
    data = png.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    width, height = struct.unpack(">II", data[16:24])
    assert (width, height) == (900, 1400)
    assert len(data) > 20_000  # a drawn page, not a blank image


class _Dom(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.tags: list[tuple[str, list]] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, attrs))


def test_hostile_plan_renders_safely(tmp_path: Path) -> None:
    result = make_result(make_plan(**HOSTILE), hostile_labels=True)
    page = write_page(tmp_path, "hostile.html", result)
    # The DOM after the browser has parsed the page (and run any script it would run).
    dom = run_chromium(tmp_path, "--dump-dom", page.as_uri()).stdout
    parsed = _Dom()
    parsed.feed(dom)
    tags = {t for t, _ in parsed.tags}
    assert "script" not in tags and "img" not in tags and "textarea" not in tags
    assert not any(name.startswith("on") for _, attrs in parsed.tags for name, _ in attrs)
    assert "&lt;script&gt;alert(\"by\")&lt;/script&gt;" in dom  # shown as text
    pdf = tmp_path / "hostile.pdf"
    to_pdf(tmp_path, page, pdf)
    assert 5 <= pdf_pages(pdf) <= 7  # the very long name wraps, nothing breaks the layout
    text = pdf_text(pdf)
    if text is None:
        missing("pdftotext (poppler-utils) not installed: the hostile text was not checked")
    assert '<script>alert("by")</script>' in text
    assert "=HYPERLINK" in text


def test_missing_browser_is_a_failure_under_ci(monkeypatch) -> None:
    """Under CI a missing Chromium fails the test; on a developer's machine it is skipped."""
    monkeypatch.setattr(os, "access", lambda *_args: False)
    monkeypatch.setattr(shutil, "which", lambda _name: None)
    monkeypatch.setenv("CI", "true")
    with pytest.raises(pytest.fail.Exception, match="failure, not a skip"):
        chromium()
    monkeypatch.setenv("CI", "")
    with pytest.raises(pytest.skip.Exception, match="Chromium is not installed"):
        chromium()
