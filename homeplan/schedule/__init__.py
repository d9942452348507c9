"""Scheduling: the roadmap result types, the abstract scheduling problem, its MILP and
brute-force solvers, and plain-words explanations.

Modules: ``roadmap`` (result types, JSON), ``problem`` (Problem, Project, constraint types,
exact ``evaluate``), ``milp`` (``MilpSolver``, ``Solution``, ``Solver`` protocol, ``solve``),
``bruteforce`` (tests only), ``explain`` (``explain``, ``diagnose``, ``diagnose_infeasible``),
``draft`` (``draft_roadmap``: solve + explain + package).

Importing this package is cheap: it loads only the result types; scipy is imported only inside
the functions that solve.
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
