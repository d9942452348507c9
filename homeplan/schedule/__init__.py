"""Scheduling: the roadmap result types, the abstract scheduling problem, its MILP and
brute-force solvers, and plain-words explanations.

Importing this package is cheap: scipy is imported only inside the functions that solve.
"""

from homeplan.schedule.roadmap import (
    SCHEMA_VERSION,
    Baseline,
    IncentiveLine,
    Milestone,
    Roadmap,
    Step,
    YearTotals,
)

__all__ = [
    "SCHEMA_VERSION",
    "Baseline",
    "IncentiveLine",
    "Milestone",
    "Roadmap",
    "Step",
    "YearTotals",
]
