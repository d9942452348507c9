"""Plain-words reasons for a solved schedule, and diagnosis of infeasible requests.

Reasons come from counterfactuals evaluated exactly with
:func:`~homeplan.schedule.problem.evaluate`: for a project done in year Y, each earlier year it
could have gone into (its window allows it) is tried with every other project left in place.

- every earlier year breaks the budget -> "waiting for budget";
- a prerequisite done in Y (or Y - 1 for a strict one) -> "after the panel upgrade";
- the service capacity would be exceeded -> "waiting for service capacity";
- earlier years already hold ``max_per_year`` projects -> "earlier years are already full";
- an earlier year is possible but the objective prefers Y and the cost falls ->
  "cheaper later: cost falls 6 %/yr" (geometric mean rate between the two years);
- the window starts in Y -> "as soon as it is available (Y)";
and, for why not later:
- ``latest_year`` is Y -> "before the rebate ends" (``Project.window_reason``);
- a target ends in Y -> "to be fully electric by Y";
- end-of-life data -> "before the water heater's likely failure (60 % by 2029)";
- a pin -> "pinned by you to 2028".

:func:`diagnose` relaxes one constraint family at a time to find the blocking ones, then
finds the smallest change: extra budget per year (bisection; feasibility is monotone in money),
or the earliest workable target year.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Callable
from dataclasses import dataclass

from homeplan.schedule.milp import MilpSolver, Solution, Solver
from homeplan.schedule.problem import FAMILIES, Problem, evaluate, evaluate_batch, placement_of

__all__ = ["Diagnosis", "diagnose", "diagnose_infeasible", "explain", "first_true", "minimum_extra_budget"]

_SOFT = {"window", "pin", "target"}


_VERBS = ("close ", "remove ", "replace ")


def _the(name: str) -> str:
    if name.lower().startswith("the "):
        return name
    if name.lower().startswith(_VERBS):  # "Close the gas service" -> "closing the gas service"
        verb, rest = name.split(" ", 1)
        return verb.lower()[:-1] + "ing " + rest
    return "the " + (name[:1].lower() + name[1:] if name[1:2].islower() or len(name) == 1 else name)


def _money(usd: float) -> str:
    return f"${usd:,.0f}"


def _violations_if_moved(
    problem: Problem, years: dict[str, int | None], pid: str, year: int | None,
    memo: dict | None = None,
) -> set[str]:
    if memo is not None and (pid, year) in memo:
        return memo[(pid, year)]
    moved = dict(years)
    moved[pid] = year
    return set(evaluate(problem, moved).violations)


def _all_moves(problem: Problem, years: dict[str, int | None]) -> dict[tuple[str, int | None], set[str]]:
    """Evaluate every 'move one project to another year (or out)' at once."""
    import numpy as np


    base = placement_of(problem, years)
    rows, keys = [], []
    for i, pid in enumerate(problem.ids):
        for t in range(-1, problem.n_years):
            row = base.copy()
            row[i] = t
            rows.append(row)
            keys.append((pid, None if t < 0 else problem.first_year + t))
    ev = evaluate_batch(problem, np.array(rows))
    return {k: {f for f in FAMILIES if ev[f][n]} for n, k in enumerate(keys)}


def _why_not_earlier(problem: Problem, years: dict[str, int | None], i: int, y: int,
                     memo: dict | None = None) -> list[str]:
    p = problem.projects[i]
    out: list[str] = []
    fy = problem.first_year
    t = y - fy
    # prerequisites done just before or in the same year
    for r in problem.prerequisites:
        if r.project != p.id:
            continue
        for b in r.requires_any:
            yb = years.get(b)
            if yb is not None and (yb == y - 1 or (yb == y and not r.strict)):
                out.append(f"after {_the(problem.project(b).name)}")
    if p.earliest_year is not None and p.earliest_year == y and y > fy:
        out.append(f"as soon as it is available ({y})")
    earlier = [s for s in range(t) if p.earliest_year is None or fy + s >= p.earliest_year]
    if not earlier:
        return out
    blocked = [(s, _violations_if_moved(problem, years, p.id, fy + s, memo) - _SOFT) for s in earlier]
    if all(v for _, v in blocked):
        nearest = blocked[-1][1]
        if "budget" in nearest:
            out.append("waiting for budget")
        if "capacity" in nearest:
            out.append("waiting for service capacity")
        if "spaces" in nearest:
            out.append("waiting for room in the panel")
        if "max_per_year" in nearest:
            out.append(
                f"earlier years are already full ({problem.max_per_year} projects a year at most)"
            )
        if "prerequisite" in nearest and not any(o.startswith("after ") for o in out):
            out.append("after its prerequisites")
        if "followup" in nearest and not out:  # only when nothing else holds it back
            for fu in problem.followups:
                if p.id in fu.after:
                    n = fu.within_years
                    out.append(f"done earlier, {_the(problem.project(fu.project).name)} would have to "
                               f"follow within {n} year{'s' if n != 1 else ''}")
                    break
        if not out:
            out.append("earlier years are blocked by the plan's other requirements")
        return out
    # an earlier year was possible: the objective chose this one
    feasible = [s for s, v in blocked if not v]
    s0 = feasible[0]
    c0, c1 = p.cost_usd[s0], p.cost_usd[t]
    if c0 > 0 and 0 < c1 < c0:
        rate = 1.0 - (c1 / c0) ** (1.0 / (t - s0))
        out.append(f"cheaper later: cost falls {rate * 100:.0f} %/yr")
    elif not out:
        needed_by = [
            problem.project(r.project).name
            for r in problem.prerequisites
            if p.id in r.requires_any and years.get(r.project) in (y, y + 1)
        ]
        partners = [
            problem.project(it.b if it.a == p.id else it.a).name
            for it in problem.interactions
            if p.id in (it.a, it.b)
            and any(v > 0 for v in it.value_usd)
            and years.get(it.b if it.a == p.id else it.a) == y
        ]
        if needed_by:
            out.append(f"just in time for {_the(needed_by[0])}")
        elif partners:
            out.append(f"together with {_the(partners[0])}: worth more once both are in")
        elif problem.discount_rate > 0 and c0 > 0 and c1 >= c0:
            out.append(
                f"paying later costs less in today's money "
                f"(discount rate {problem.discount_rate * 100:g} %)"
            )
        else:
            out.append(f"better overall in {y} than earlier")
    return out


def _why_not_later(problem: Problem, i: int, y: int) -> list[str]:
    p = problem.projects[i]
    out: list[str] = []
    fy = problem.first_year
    if p.latest_year is not None and p.latest_year == y:
        out.append(f"before {p.window_reason}" if p.window_reason else f"before the {y} deadline")
    for tg in problem.targets:
        if p.id in tg.project_ids and tg.by_year == y:
            out.append(f"to be {tg.label} by {y}")
    for fu in problem.followups:
        if fu.project == p.id and fu.label:
            out.append(fu.label)
    if p.failure_item and p.failure_prob_by_year:
        probs = p.failure_prob_by_year
        t = y - fy
        later = [s for s in range(t + 1, len(probs)) if probs[s] >= 0.5]
        s = later[0] if later else min(t + 1, len(probs) - 1)
        if s > t and probs[s] > 0:
            out.append(f"before {p.failure_item}'s likely failure ({probs[s] * 100:.0f} % by {fy + s})")
    return out


def explain(problem: Problem, solution: Solution) -> dict[str, tuple[str, ...]]:
    """Plain-words reasons per project id (done or not) for a feasible solution.

    Parameters
    ----------
    problem : Problem
        The problem.
    solution : Solution
        A feasible solution of ``problem``.

    Returns
    -------
    dict of str to tuple of str
        Reasons per project id.
    """
    years = {pid: solution.years.get(pid) for pid in problem.ids}
    # every single-project move of the solution, evaluated at once (vectorised)
    memo = _all_moves(problem, years)
    reasons: dict[str, tuple[str, ...]] = {}
    for i, p in enumerate(problem.projects):
        y = years[p.id]
        if y is None:
            reasons[p.id] = _why_not_done(problem, years, i, memo)
            continue
        if p.pinned_year is not None:
            reasons[p.id] = (p.pin_reason or f"pinned by you to {y}",)
            continue
        out = _why_not_earlier(problem, years, i, y, memo) + _why_not_later(problem, i, y)
        if not out and y == problem.first_year:
            out.append("right away: it is worth most done early")
        reasons[p.id] = tuple(dict.fromkeys(out))
    return reasons


def _why_not_done(problem: Problem, years: dict[str, int | None], i: int,
                  memo: dict | None = None) -> tuple[str, ...]:
    p = problem.projects[i]
    if p.excluded:
        return ("excluded by you",)
    allowed = problem.allowed_years(i)
    if not allowed:
        return ("its window is outside the planning horizon",)
    blocked = [_violations_if_moved(problem, years, p.id, problem.first_year + s, memo) for s in allowed]
    if any(not v for v in blocked):
        return ("not worth it within the horizon",)
    families = set().union(*blocked)
    words = {
        "budget": "no room in the budget",
        "prerequisite": "its prerequisites are not in the plan",
        "capacity": "not enough service capacity",
        "spaces": "no free breaker spaces",
        "max_per_year": "every year already has the most projects allowed",
        "exclusive": "an alternative was chosen instead",
    }
    return tuple(w for k, w in words.items() if k in families) or ("not possible with the rest of the plan",)


# -- infeasibility ---------------------------------------------------------------------------


@dataclass(frozen=True)
class Diagnosis:
    """Why a problem is infeasible and the smallest changes that fix it.

    ``blocking``: constraint families whose relaxation alone makes the problem feasible.
    ``extra_budget_usd_per_year``: smallest extra money per year (same for every year) found by
    bisection, rounded up to $10 (or, when the search ran out of time, an amount found to be
    enough); re-solving with it is feasible. ``target_year``: the earliest
    year every target can be moved to (all targets moved by the same number of years).

    Attributes
    ----------
    feasible : bool
        True if the request is feasible after all.
    message : str
        The diagnosis in plain words.
    blocking : tuple of str
        Blocking constraint families.
    conflicts : tuple of str
        Contradictions in the request itself, in plain words.
    extra_budget_usd_per_year : float or None
        Smallest extra budget that makes it feasible, USD per year.
    target_year : int or None
        Earliest workable target year, calendar year.
    """

    feasible: bool
    message: str
    blocking: tuple[str, ...] = ()
    conflicts: tuple[str, ...] = ()
    extra_budget_usd_per_year: float | None = None
    target_year: int | None = None


def _structural_conflicts(problem: Problem) -> list[str]:
    out: list[str] = []
    fy, ly = problem.first_year, problem.first_year + problem.n_years - 1
    for i, p in enumerate(problem.projects):
        if p.excluded and problem.must_do(i):
            out.append(f"{p.name} is excluded but also required (mandatory, pinned or in a target)")
        if p.pinned_year is not None:
            if not fy <= p.pinned_year <= ly:
                out.append(f"{p.name} is pinned to {p.pinned_year}, outside {fy}-{ly}")
            if p.earliest_year is not None and p.pinned_year < p.earliest_year:
                out.append(f"{p.name} is pinned to {p.pinned_year}, before it is available ({p.earliest_year})")
            if p.latest_year is not None and p.pinned_year > p.latest_year:
                out.append(f"{p.name} is pinned to {p.pinned_year}, after its window closes ({p.latest_year})")
        elif problem.must_do(i) and not problem.allowed_years(i):
            out.append(f"{p.name} is required but has no year it can be done in")
    for g in problem.exclusive_groups:
        required = [problem.project(m).name for m in g.members if problem.must_do(problem.index(m))]
        if len(required) > 1:
            out.append(f"only one of {', '.join(required)} may be done, but all are required")
    return out


def _relaxations(problem: Problem) -> dict[str, Callable[[Problem], Problem]]:
    big = sum(max(p.cost_usd) for p in problem.projects) + 1.0
    big += problem.loan_limit_usd * (1.0 + problem.loan_interest_per_usd())

    def no_windows(pr: Problem) -> Problem:
        return pr.replace(
            projects=tuple(dataclasses.replace(p, earliest_year=None, latest_year=None) for p in pr.projects)
        )

    def no_pins(pr: Problem) -> Problem:
        return pr.replace(projects=tuple(dataclasses.replace(p, pinned_year=None) for p in pr.projects))

    def no_mandatory(pr: Problem) -> Problem:
        return pr.replace(projects=tuple(dataclasses.replace(p, mandatory=False) for p in pr.projects))

    return {
        "budget": lambda pr: pr.replace(budget_usd=tuple(b + big for b in pr.budget_usd)),
        "target": lambda pr: pr.replace(targets=()),
        "capacity": lambda pr: pr.replace(capacity_base=None),
        "spaces": lambda pr: pr.replace(spaces_base=None),
        "followup": lambda pr: pr.replace(followups=()),
        "max_per_year": lambda pr: pr.replace(max_per_year=None),
        "prerequisite": lambda pr: pr.replace(prerequisites=()),
        "window": no_windows,
        "pin": no_pins,
        "mandatory": no_mandatory,
        "exclusive": lambda pr: pr.replace(
            exclusive_groups=tuple(dataclasses.replace(g, exactly_one=False) for g in pr.exclusive_groups)
        ),
    }


_NAMES = {
    "budget": "the yearly budget",
    "target": "the target year",
    "capacity": "the electrical service capacity",
    "spaces": "the free breaker spaces",
    "followup": "the follow-up of a fuel's last appliance",
    "max_per_year": "the limit on projects per year",
    "prerequisite": "the prerequisites",
    "window": "the incentive/availability windows",
    "pin": "the pinned years",
    "mandatory": "the required projects",
    "exclusive": "the choose-one-variant rule",
}


def _feasibility_problem(problem: Problem) -> Problem:
    """Same constraints, cheapest objective to solve (feasibility does not depend on it)."""
    if problem.objective == "earliest_gas_closure":
        q = problem.index(problem.objective_project)  # type: ignore[arg-type]
        projects = list(problem.projects)
        projects[q] = dataclasses.replace(projects[q], mandatory=True)
        return problem.replace(projects=tuple(projects), objective="max_npv", objective_project=None)
    if problem.objective == "min_cost_cvar":
        return problem.replace(objective="max_npv")
    return problem


def minimum_extra_budget(
    problem: Problem, feasible: Callable[[Problem], bool] | None = None, step_usd: float = 10.0,
    with_extra: Callable[[float], bool] | None = None, stop: Callable[[], bool] | None = None,
) -> float | None:
    """Smallest extra budget per year (multiple of ``step_usd``) that makes ``problem``
    feasible, by bisection, or ``None`` if even a very large budget does not.

    Parameters
    ----------
    problem : Problem
        The problem.
    feasible : callable or None
        Returns True if a :class:`Problem` is feasible.
    step_usd : float
        Resolution of the search, USD per year.
    with_extra : callable or None
        Instead of ``feasible``: returns True if ``problem`` with that many USD added to every
        year's budget is feasible (e.g. :meth:`MilpSolver.feasible_with_extra_budget`).
    stop : callable or None
        Asked before each step of the bisection: when it returns True the bisection stops and
        returns the smallest amount found to be enough so far.

    Returns
    -------
    float or None
        Extra budget, USD per year.
    """
    if with_extra is None:
        if feasible is None:
            raise TypeError("minimum_extra_budget needs feasible or with_extra")
        test = feasible

        def with_extra(e: float) -> bool:
            return test(problem.replace(budget_usd=tuple(b + e for b in problem.budget_usd)))

    hi = sum(max(p.cost_usd) for p in problem.projects) + 1.0
    hi += problem.loan_limit_usd * (1.0 + problem.loan_interest_per_usd())
    hi = step_usd * -(-hi // step_usd)
    if not with_extra(hi):
        return None
    lo = 0.0
    if with_extra(0.0):
        return 0.0
    while hi - lo > step_usd:
        if stop is not None and stop():
            break  # hi is known to be enough
        mid = step_usd * ((lo + hi) / 2 // step_usd)
        if mid <= lo:
            mid = lo + step_usd
        if mid >= hi:
            break
        if with_extra(mid):
            hi = mid
        else:
            lo = mid
    return hi


def first_true(lo: int, hi: int, test: Callable[[int], bool]) -> int | None:
    """The smallest ``k`` in ``lo..hi`` with ``test(k)`` true, for a test that stays true once it
    is (monotone); None when none is. Galloping search (``lo``, ``lo + 1``, ``lo + 3``, ... then
    bisection): about ``2 log2(k - lo)`` tests, few when the answer is near ``lo``, as it
    usually is."""
    below, step, k = lo - 1, 1, lo  # test(below) is false (or below is out of range)
    while k <= hi:
        if test(k):
            break
        below, k, step = k, k + step, step * 2
    else:
        if below >= hi or not test(hi):
            return None
        k = hi
    while k - below > 1:  # test(k) true, test(below) false
        mid = (below + k) // 2
        if test(mid):
            k = mid
        else:
            below = mid
    return k


class _OutOfTests(Exception):
    """The diagnosis used up its tests."""


def diagnose(problem: Problem, solver: Solver | None = None, max_tests: int = 30) -> Diagnosis:
    """Explain why ``problem`` is infeasible and the smallest change that makes it feasible.

    Near the edge of feasibility a test can be a hard problem of its own (tight budgets over
    30 years: seconds a test), so the search is bounded, and bounded by work rather than by the
    clock so that the same plan always gets the same words: at most ``max_tests`` feasibility
    tests after the first, each stopped after a number of branch-and-bound nodes (a test
    stopped that way counts as infeasible, so an amount reported is always enough). When the
    tests run out, the diagnosis reports what it has found and says that the search stopped.

    Parameters
    ----------
    problem : Problem
        The problem.
    solver : Solver or None
        Solver for the feasibility checks; None uses a fast :class:`MilpSolver` (20 nodes a
        test).
    max_tests : int
        Feasibility tests after the first.

    Returns
    -------
    Diagnosis
        Blocking families, conflicts and the smallest changes found.
    """
    solver = solver or MilpSolver(time_limit_s=10.0, mip_rel_gap=1.0, node_limit=20)
    base = _feasibility_problem(problem)
    done = [0]

    def counted() -> Solver:
        if done[0] >= max_tests:
            raise _OutOfTests
        done[0] += 1
        return solver

    def feasible(pr: Problem, s: Solver | None = None) -> bool:
        s = s or counted()
        # a solver that can test the constraints alone does so (a few ms a test); others solve
        check = getattr(s, "feasible", None)
        return bool(check(pr)) if check is not None else s.solve(pr).feasible

    if feasible(base, solver):  # always asked, whatever the time budget
        return Diagnosis(True, "The request is feasible.")
    conflicts = _structural_conflicts(problem)
    blocking: list[str] = []
    stopped = False
    try:
        for name, relax in _relaxations(base).items():
            if feasible(relax(base)):
                blocking.append(name)
    except _OutOfTests:
        stopped = True
    fixes: list[str] = []
    extra = None
    target_year = None
    if "budget" in blocking and not stopped:
        by_budget = hasattr(solver, "feasible_with_extra_budget")
        try:
            if by_budget:
                test = solver.feasible_with_extra_budget(base)  # type: ignore[attr-defined]

                def with_extra(e: float) -> bool:
                    counted()
                    return test(e)

                extra = minimum_extra_budget(base, with_extra=with_extra, stop=lambda: done[0] >= max_tests)
            else:
                extra = minimum_extra_budget(base, feasible, stop=lambda: done[0] >= max_tests)
        except _OutOfTests:
            stopped = True
        stopped = stopped or done[0] >= max_tests
        if extra is not None:
            lo_b, hi_b = min(base.budget_usd), max(base.budget_usd)
            now = _money(lo_b) if lo_b == hi_b else f"{_money(lo_b)}-{_money(hi_b)}"
            fixes.append(f"raise the budget by about {_money(extra)} a year (from {now} a year)")
    if "target" in blocking and base.targets and not stopped:
        last = base.first_year + base.n_years - 1

        def moved(k: int) -> tuple:
            return tuple(dataclasses.replace(t, by_year=min(t.by_year + k, last)) for t in base.targets)

        # a later target only loosens the problem: the fewest years by bisection
        try:
            k = first_true(1, base.n_years, lambda k: feasible(base.replace(targets=moved(k))))
        except _OutOfTests:
            stopped = True
        else:
            if k is None:
                fixes.append("drop the target (no year within the horizon works)")
            else:
                target_year = max(t.by_year for t in moved(k))
                for t in base.targets:
                    fixes.append(f"move the '{t.label}' target from {t.by_year} to {min(t.by_year + k, last)}")
    for name in blocking:
        if name not in ("budget", "target"):
            fixes.append(f"relax {_NAMES[name]}")
    if blocking:
        named = " or ".join(_NAMES[b] for b in blocking)
        msg = f"No plan meets every constraint: blocked by {named}."
    else:
        msg = "No plan meets every constraint, and no single constraint family is to blame."
    if conflicts:
        msg += " Conflicts: " + "; ".join(conflicts) + "."
    if fixes:
        msg += " Smallest changes that make it feasible: " + "; or ".join(fixes) + "."
    elif not blocking and not stopped:
        msg += " Several constraints must be relaxed together."
    if stopped:
        msg += (f" (The search for what to change stopped after {max_tests} tests: the "
                "changes named are enough, but there may be smaller ones or others.)")
    return Diagnosis(False, msg, tuple(blocking), tuple(conflicts), extra, target_year)


def diagnose_infeasible(problem: Problem, solver: Solver | None = None) -> str:
    """The diagnosis message only (see :func:`diagnose`).

    Parameters
    ----------
    problem : Problem
        The problem.
    solver : Solver or None
        Solver for the feasibility checks; None uses a fast :class:`MilpSolver`.

    Returns
    -------
    str
        The diagnosis in plain words.
    """
    return diagnose(problem, solver).message
