"""Scheduling engine: the abstract scheduling problem, its MILP and brute-force solvers, and
plain-words explanations. It knows nothing of homes: projects, years, budgets and constraints.

Modules: ``problem`` (Problem, Project, constraint types, exact ``evaluate``), ``milp``
(``MilpSolver``, ``Solution``, ``Solver`` protocol, ``solve``), ``bruteforce`` (exhaustive search,
the tests' reference), ``explain`` (``explain``, ``diagnose``, ``diagnose_infeasible``).

Importing this package is cheap: scipy is imported only inside the functions that solve.
"""

__all__: list[str] = []
