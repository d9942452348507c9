"""Errors that reach the user: each says where, what is wrong and how to fix it."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

__all__ = ["InputError", "PlanRuleError", "Problem"]


@dataclass(frozen=True)
class Problem:
    """One problem in an input file, located to the line and column (1-based)."""

    path: str
    line: int
    col: int
    message: str
    hint: str = ""

    def __str__(self) -> str:
        where = f"{self.path}:{self.line}:{self.col}" if self.line else self.path
        return f"{where}: {self.message}" + (f" ({self.hint})" if self.hint else "")


class InputError(Exception):
    """Bad input from the user: reported without a traceback, exit code 2."""

    def __init__(self, problems: list[Problem] | Problem | str):
        if isinstance(problems, str):
            problems = [Problem("", 0, 0, problems)]
        elif isinstance(problems, Problem):
            problems = [problems]
        self.problems: list[Problem] = list(problems)
        super().__init__("\n".join(str(p) for p in self.problems))


class PlanRuleError(ValueError):
    """A rule broken by a valid-looking plan (unknown project id, cycle in the order...).

    Carries the path of keys in the plan file (``loc``) so the edge that read the file can
    point at the line and column. A check that finds several broken rules raises one error
    carrying the others in ``more`` (see :meth:`gather`), so every one is reported at once.
    """

    def __init__(self, loc: tuple, message: str, hint: str = "",
                 more: Sequence[PlanRuleError] = ()):
        self.loc = loc
        self.message = message
        self.hint = hint
        self.more = tuple(more)
        text = f"{'.'.join(map(str, loc))}: {message}" + (f" ({hint})" if hint else "")
        if self.more:
            text += f" (and {len(self.more)} more: " + "; ".join(
                f"{'.'.join(map(str, e.loc))}: {e.message}" for e in self.more) + ")"
        super().__init__(text)

    @property
    def every(self) -> tuple[PlanRuleError, ...]:
        """This error and the ones found with it."""
        return (self, *(e for m in self.more for e in m.every))

    @classmethod
    def gather(cls, errors: Sequence[PlanRuleError]) -> None:
        """Raise the first error carrying the others (nothing when the list is empty)."""
        found = [e for err in errors for e in err.every]
        if found:
            first = found[0]
            raise cls(first.loc, first.message, first.hint, found[1:])
