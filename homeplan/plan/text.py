"""The one sanitiser for text that came from a file, before it reaches a terminal, the app or a
printout.

Plan files, incentive files and weather files travel between people, so any text in them may
hold terminal control sequences (an OSC 52 sequence sets the clipboard, CSI 2J clears the
screen), stray control characters, or bidirectional overrides that reorder what a reader sees.
:func:`clean` makes each of them visible instead of letting it act: a C0 control becomes its
Unicode control picture (ESC shows as ␛, so an escape sequence prints as harmless text), and a
C1 control, a bidirectional embedding, override or isolate, a line or paragraph separator (in
one-line text) and an unpaired surrogate become U+FFFD.

Every output path calls this one function: the command line's prints and messages, the app's
views and notices, and the printed summary and exports.

References
----------
ECMA-48, 5th edition (1991), "Control Functions for Coded Character Sets": C0 and C1 sets,
ESC (01/11) and CSI/OSC introducers.
Unicode Standard Annex #9, "Unicode Bidirectional Algorithm", section 2 (explicit formatting
characters LRE, RLE, PDF, LRO, RLO, LRI, RLI, FSI, PDI).
Unicode Standard, chapter 22, "Control Pictures" block (U+2400-U+243F).
N. Boucher and R. Anderson, "Trojan Source: Invisible Vulnerabilities", USENIX Security 2023
(CVE-2021-42574): bidirectional overrides reorder displayed text.
"""

from __future__ import annotations

import re

__all__ = ["BIDI_CONTROLS", "clean"]

REPLACEMENT = "\ufffd"
BIDI_CONTROLS = frozenset("\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069")
"""The explicit bidirectional formatting characters (Unicode UAX #9, section 2)."""


def _table(one_line: bool) -> dict[int, str]:
    table: dict[int, str] = {c: chr(0x2400 + c) for c in range(0x20)}  # C0 -> control pictures
    table[0x7F] = "\u2421"  # DEL -> ␡
    table.update({c: REPLACEMENT for c in range(0x80, 0xA0)})  # C1
    table.update({ord(c): REPLACEMENT for c in BIDI_CONTROLS})
    table.update({c: REPLACEMENT for c in range(0xD800, 0xE000)})  # unpaired surrogates
    if not one_line:
        for c in "\t\n":
            table.pop(ord(c))
        table[0x0D] = ""  # CR LF -> LF; a lone CR would move the cursor to the line start
        table[0x2028] = table[0x2029] = "\n"
    return table


_ONE_LINE = _table(True)
_MULTI_LINE = _table(False)
_BREAKS = re.compile("[\t\n\r\x0b\x0c\x85\u2028\u2029]+")


def clean(text: object, one_line: bool = True) -> str:
    """Text from a file made safe to show, with nothing hidden.

    Parameters
    ----------
    text : object
        The text (None gives ""; anything else is shown with ``str``).
    one_line : bool
        True (default): line breaks and tabs become single spaces and the ends are trimmed, for
        a name, a cell or a message. False: line breaks and tabs are kept (a block of output).

    Returns
    -------
    str
        The text with every control character, escape sequence introducer, bidirectional
        override and unpaired surrogate shown as a visible character instead.
    """
    s = "" if text is None else str(text)
    if one_line:
        return _BREAKS.sub(" ", s).translate(_ONE_LINE).strip()
    return s.translate(_MULTI_LINE)
