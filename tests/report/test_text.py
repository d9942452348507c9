"""Text and Markdown summaries: terminal-safe and Markdown-safe user text.

References: ECMA-48 (control functions start with ESC 0x1B or C1 0x9B: they must not reach the
terminal from a plan file); CommonMark Spec 0.31.2 sections 2.4 (backslash escapes) and 6.6
(raw HTML).
"""

from __future__ import annotations

import datetime as dt
import re

from homeplan.plan.text import clean
from homeplan.report.fmt import money, money_signed
from homeplan.report.text import md, render_markdown, render_text
from homeplan.report.view import build_report
from tests.report.fixtures import make_plan, make_result


def test_control_characters_never_reach_the_terminal() -> None:
    # YAML double-quoted "\e" is ESC (YAML 1.2 section 5.7); "\x9b" is the C1 CSI.
    plan = make_plan(name='"Home\\e[2J\\e]0;pwned\\x07 \\x9b31m"')
    text = render_text(build_report(make_result(plan), today=dt.date(2026, 12, 1)))
    assert "\x1b" not in text and "\x07" not in text and "\x9b" not in text
    # shown visibly: ESC and BEL as their control pictures U+241B and U+2407 (Unicode chapter 22)
    assert "Home\u241b[2J\u241b]0;pwned\u2407 \ufffd31m" in text


def test_text_summary_has_every_section() -> None:
    text = render_text(build_report(make_result(), today=dt.date(2026, 12, 1)))
    for heading in ("The roadmap", "Steps", "Year by year", "Energy and emissions, before and after", "Electrical capacity",
                    "Key assumptions", "Safety"):
        assert f"\n{heading}\n" in text
    assert "2031: Gas service closed" in text and "<>" in text
    assert "prepared by Demo Energy Advisor (invented)" in text


def test_markdown_escapes_markup_and_links() -> None:
    assert md("<script>x</script>") == "&lt;script&gt;x&lt;/script&gt;"
    assert md("[click](http://e.example)") == "\\[click\\](http://e.example)"
    assert md("a|b *c* _d_ `e`") == "a\\|b \\*c\\* \\_d\\_ \\`e\\`"
    plan = make_plan(name="'<img src=x onerror=alert(1)> [x](javascript:alert(1)) | pipe'")
    out = render_markdown(build_report(make_result(plan), today=dt.date(2026, 12, 1)))
    # outside code blocks (where CommonMark shows text literally) no raw HTML and no live link
    prose = re.sub(r"```text\n.*?\n```", "", out, flags=re.S)
    assert "<img" not in prose
    assert not re.search(r"(?<!\\)\]\(javascript", prose)
    assert out.count("```") == 2


def test_money_rounded_for_households() -> None:
    # common practice, no source: whole dollars, $10 steps under $1,000, $100 steps above
    assert money(12_449.0) == "$12,400"
    assert money(12_451.0) == "$12,500"
    assert money(444.0) == "$440"
    assert money(-1_260.0) == "-$1,300"
    assert money(float("nan")) == "n/a"
    assert money(-3.0) == "$0"
    assert money_signed(1_200.0) == "+$1,200"
    assert money_signed(-40.0) == "-$40"


def test_clean_shows_controls_and_joins_lines() -> None:
    # NUL shown as its Unicode control picture U+2400 (Unicode chapter 22, Control Pictures)
    assert clean("a\nb\tc\x00d\u2028e") == "a b c\u2400d e"
    assert clean("  x  ") == "x"
