"""Errors that reach the user: each says where, what is wrong and how to fix it."""

from __future__ import annotations

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
    point at the line and column.
    """

    def __init__(self, loc: tuple, message: str, hint: str = ""):
        self.loc = loc
        self.message = message
        self.hint = hint
        super().__init__(f"{'.'.join(map(str, loc))}: {message}" + (f" ({hint})" if hint else ""))
