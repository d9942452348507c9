"""Exhaustive enumeration of a :class:`Problem` (small instances only; used by the tests).

Every project takes each year it may be done in (``Problem.allowed_years``: window, target,
pin, exclusion) or "not done" (unless it must be done). All combinations are decoded in mixed
radix in chunks, evaluated at once with :func:`~homeplan.schedule.problem.evaluate_batch` (which
checks every constraint family and computes every objective exactly), and the best feasible one
is kept. Ties keep the first combination found. For ``earliest_gas_closure`` the order is
lexicographic: earliest year of the objective project, then highest NPV.

This shares no code with the MILP model, so agreement between the two is evidence that both are
right.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass

import numpy as np

from homeplan.schedule.milp import Solution
from homeplan.schedule.problem import Problem, evaluate_batch, objective_of

__all__ = ["BruteForceSolver"]


@dataclass(frozen=True)
class BruteForceSolver:
    """Enumerates at most ``max_combinations`` placements (raises ``ValueError`` beyond).

    Attributes
    ----------
    max_combinations : int
        Largest number of placements enumerated.
    chunk : int
        Placements evaluated per batch.
    """

    max_combinations: int = 2_000_000
    chunk: int = 100_000

    def options(self, problem: Problem) -> list[np.ndarray]:
        """Year indices each project may take, with -1 (not done) unless it must be done.

        Parameters
        ----------
        problem : Problem
            The problem.

        Returns
        -------
        list of numpy.ndarray
            One int64 array of year indices per project.
        """
        opts = []
        for i in range(len(problem.projects)):
            years = list(problem.allowed_years(i))
            if not problem.must_do(i):
                years = [-1, *years]
            opts.append(np.array(years, dtype=np.int64))
        return opts

    def solve(self, problem: Problem) -> Solution:
        """Best feasible placement by exhaustive search.

        Parameters
        ----------
        problem : Problem
            The problem.

        Returns
        -------
        Solution
            ``optimal`` with years, objective value and NPV (USD), or ``infeasible``.

        Raises
        ------
        ValueError
            If there are more than ``max_combinations`` placements.
        """
        started = time.perf_counter()
        opts = self.options(problem)
        sizes = [len(o) for o in opts]
        total = math.prod(sizes)
        if total > self.max_combinations:
            raise ValueError(f"{total} combinations is too many for brute force")
        best_key: tuple[float, float] | None = None
        best: tuple[np.ndarray, float, float] | None = None
        sign = -1.0 if problem.objective in ("max_npv", "min_emissions") else 1.0
        lexi = problem.objective == "earliest_gas_closure"
        for start in range(0, total, self.chunk):
            idx = np.arange(start, min(total, start + self.chunk), dtype=np.int64)
            cols = []
            rem = idx
            for o in opts:
                cols.append(o[rem % len(o)])
                rem = rem // len(o)
            placements = np.stack(cols, axis=1) if cols else np.zeros((len(idx), 0), np.int64)
            ev = evaluate_batch(problem, placements)
            feas = np.flatnonzero(ev["feasible"])
            if feas.size == 0:
                continue
            obj = objective_of(problem, ev)[feas]
            npv = ev["npv_usd"][feas]
            if lexi:
                order = np.lexsort((-npv, obj))
                k = int(order[0])
                key = (float(obj[k]), float(-npv[k]))
            else:
                k = int(np.argmin(sign * obj))
                key = (float(sign * obj[k]), 0.0)
            if best_key is None or key < best_key:
                best_key = key
                best = (placements[feas[k]].copy(), float(obj[k]), float(npv[k]))
        elapsed = time.perf_counter() - started
        if best is None:
            return Solution("infeasible", solve_time_s=elapsed, solver="bruteforce")
        placement, value, npv = best
        years = {
            p.id: (None if placement[i] < 0 else int(problem.first_year + placement[i]))
            for i, p in enumerate(problem.projects)
        }
        return Solution(
            "optimal",
            years=years,
            objective_value=value,
            npv_usd=npv,
            solve_time_s=elapsed,
            solver="bruteforce",
            message=f"{total} combinations",
        )
