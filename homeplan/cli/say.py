"""Everything the commands print goes through :func:`say`: the one sanitiser
(:func:`homeplan.plan.text.clean`) sees every line before the terminal does, so a name, a path
or a message holding an escape sequence or a bidirectional override is shown, not obeyed."""

from __future__ import annotations

import sys
from typing import TextIO

from homeplan.plan.text import clean

__all__ = ["say"]


def say(text: object = "", *, err: bool = False, end: str = "\n", file: TextIO | None = None) -> None:
    """Print ``text`` (several lines allowed) to stdout, or stderr with ``err``, sanitised."""
    stream = file or (sys.stderr if err else sys.stdout)
    stream.write(clean(text, one_line=False) + end)
