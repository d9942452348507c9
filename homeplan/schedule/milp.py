"""Mixed-integer model of a :class:`~homeplan.schedule.problem.Problem`, solved with HiGHS
through its own Python interface ``highspy`` (pinned to HiGHS 1.12, the version the agreement
benchmark graded; importing it costs about 10 ms where ``scipy.optimize`` and ``scipy.sparse`` cost
about 300), behind the small :class:`Solver` protocol.

Formulation (``P`` projects, ``T`` years, ``G`` capped incentive groups; indices as in
``problem.py``). Two linked binary families describe each project: ``x[p,t]`` "done in year
t" and ``D[p,t]`` "done by year t" with ``D[p,t] = D[p,t-1] + x[p,t]``. Money rows use x (they
stay pure knapsacks per year, so the solver's cover cuts apply); "done by" facts
(prerequisites, capacity, savings, interactions, targets) use D (rows of 2..P nonzeros instead
of up to P*T, and branching on "done by 2030 or not" splits the tree evenly). CPU seconds
measured on the benchmark instances (15 x 20, seeds 1-3), D alone vs linked x and D: max_npv
0.36-0.45 vs 0.25-0.39; no carryover 1.6 vs 0.4 (with D alone the budget rows lose their
knapsack form); all required 1.3-1.7 vs 0.9-1.0; min_emissions 2.8-3.5 vs 1.6-2.5.

Variables
    ``D[p,t]`` binary, columns ``0 .. P*T-1`` (``p*T + t``): upper bound 0 before the first
    allowed year. ``x[p,t]`` binary, the last ``P*T`` columns: upper bound 0 outside the
    allowed years (window, target year, pin; all years when excluded).
    ``z[g,t]`` continuous in ``[0, cap_g]``: capped incentive earned by group g in year t.
    ``L[t]`` continuous in ``[0, loan_limit]``: loan principal borrowed in year t (only when
    ``loan_limit_usd > 0``).
    ``c[t]`` continuous >= 0: money carried from year t to t+1 (only with carryover).
    ``w[i,t]`` continuous in ``[0, 1]``: both projects of interaction i done by t (the product
    ``D[a,t] D[b,t]``), only for NPV objectives.
    ``eta`` free and ``u[s] >= 0`` continuous, after the x columns: only for ``min_cost_cvar``
    (the value at risk and each scenario's loss beyond it).

Constraints (each a block of rows in one sparse matrix)
    link         ``D[p,t] - D[p,t-1] - x[p,t] = 0`` (so ``sum_t x[p,t] = D[p,T-1] <= 1``).
    required     ``D[p,T-1] >= 1`` when the project is mandatory, pinned, in a target, or the
                 objective project of ``earliest_gas_closure``.
    exclusive    ``sum_{p in group} D[p,T-1] <= 1`` (``== 1`` when ``exactly_one``).
    budget       for each t: ``c[t] - c[t-1] + spend_t + repay_t - savings_t - incentive_in_t
                 - L_t <= budget_t`` (without carryover the c terms are absent, so each year
                 stands alone). ``spend_t = sum_p cost[p,t] x[p,t]``;
                 ``savings_t = sum_p savings[p,t] D[p,t-1]`` (if ``savings_to_budget``);
                 ``incentive_in_t = sum_g z[g, t - lag_g]`` (groups with ``adds_to_budget``);
                 ``repay_t = a sum_{1 <= t-s <= n} L[s]`` (annuity factor a, term n).
    loan limit   ``sum_t L[t] <= loan_limit_usd``.
    incentive    ``z[g,t] <= sum_p rate[g,p] cost[p,t] x[p,t]`` (with ``z <= cap`` as a bound,
                 ``z = min(rate * cost, cap)`` at the optimum whenever z has value).
    prerequisite for each rule and t: ``D[A,t] <= sum_{B in any-of} D[B,t]`` (``D[B,t-1]``
                 when strict). This "done by" form is tighter in the LP relaxation than
                 ``x[A,t] <= sum_B D[B,t]`` and gives the same integer solutions.
    capacity     for each t: ``sum_p (use_p - provided_p) D[p,t] <= capacity_base``.
    spaces       the same with breaker spaces: ``sum_p (spaces_use_p - spaces_provided_p) D[p,t]
                 <= spaces_base``.
    per year     for each t: ``sum_p x[p,t] <= max_per_year``.
    follow-up    for each t: ``sum_{a in after} D[a,t] - D[p,t+k] <= |after| - 1`` (all done by t
                 forces p done by t + k).
    interaction  positive value: ``w <= D[a,t]``, ``w <= D[b,t]`` (maximising pushes w up to
                 the product); negative value: ``w >= D[a,t] + D[b,t] - 1`` (pushed down).
                 Exact for binary D (standard product linearisation).
    scenario     ``min_cost_cvar``, for each scenario s: ``u[s] + eta + NPV_s >= base_s``, i.e.
                 ``u[s] >= loss_s - eta`` with ``NPV_s`` the NPV's linear form with the
                 scenario's project values (Rockafellar & Uryasev 2000).

Objective (milp minimises; constants are added back when reporting)
    max_npv            ``-NPV`` with NPV as in ``problem.py``; the end-of-life term
                       ``-sum_t (1 - D[p,t]) pen[p,t] df[t]`` becomes the constant
                       ``-sum pen df`` plus ``sum_{t>=s} pen[p,t] df[t]`` on each ``x[p,s]``.
    min_emissions      ``-sum x[p,t] emissions_kg[p,t]``.
    min_out_of_pocket  nominal spend + penalties + loan interest - incentives - bill savings.
    min_cost_cvar      ``mean_s loss_s + risk_weight (eta + sum_s u[s] / (risk_tail S))``: the
                       expected loss is the NPV's form with the scenarios' mean project values.
    earliest_gas_closure  two solves: minimise ``sum_t t x[q,t]`` for the objective project q,
                       then force ``D[q,t*] = 1`` (done by the earliest year) and maximise NPV.

Solver settings: HiGHS presolve is off by default: on the benchmark instances it cost more CPU
than it saved in most cases (max_npv 0.47-0.70 s with it vs 0.25-0.39 s without).

Checks before an answer is believed: with presolve on, HiGHS has been seen to call a feasible
instance infeasible and to return a worse plan as optimal (a few in some thousands of random
instances). So when a solve with presolve reports no plan (infeasible, time limit without a
plan, error), or when the plan it returns does not hold up in the independent evaluator of
``problem.py`` (a violated constraint, or an objective better than the placement is really
worth), the stage is solved again with presolve off and that answer is used
(``Solution.presolve_retried``). ``benchmarks/bench_solver_agreement.py`` grades the product
settings against exhaustive enumeration.

References
----------
HiGHS MILP solver: Huangfu & Hall, "Parallelizing the dual revised simplex method", Math. Prog.
Comp. 10 (2018); HiGHS 1.12 options and ``Highs.passModel`` documentation (highs.dev).
R. T. Rockafellar, S. Uryasev, "Optimization of conditional value-at-risk", Journal of Risk 2
(2000) 21-41 (the linear scenario formulation of CVaR).
"""

from __future__ import annotations

import dataclasses
import time
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from typing import Any, Protocol

import numpy as np

from homeplan.schedule.problem import Problem, evaluate

__all__ = ["MilpSolver", "Solution", "Solver", "build_model", "solve"]


@dataclass(frozen=True)
class Solution:
    """Result of a solve.

    ``status``: ``optimal``; ``time_limit`` (a feasible plan, maybe not optimal);
    ``infeasible``; ``no_solution`` (limit reached before any feasible plan); ``error``.
    ``years``: calendar year per project id, or ``None`` (not done). ``objective_value`` is in
    the objective's natural sense (NPV USD, kg saved, calendar year, out-of-pocket USD);
    ``npv_usd`` is the NPV of the plan under the linear model (all objectives).

    Attributes
    ----------
    status : str
        Outcome, as listed above.
    years : dict of str to int or None
        Calendar year per project id (None = not done).
    objective_value : float or None
        Objective in its natural unit (USD, kg or calendar year).
    npv_usd : float or None
        Net present value of the plan, USD.
    solve_time_s : float
        Wall-clock solve time, s.
    mip_gap : float or None
        Relative MIP gap reported by the solver, fraction.
    loans_usd : tuple of float
        Borrowing per year, USD.
    incentives_usd : dict of str to tuple of float
        Capped incentive earned per group and year, USD.
    solver : str
        Name of the solver.
    message : str
        Solver message.
    presolve_retried : bool
        True when an answer found with presolve did not hold up and the solve was repeated
        without presolve (see the module notes).
    """

    status: str
    years: dict[str, int | None] = field(default_factory=dict)
    objective_value: float | None = None
    npv_usd: float | None = None
    solve_time_s: float = 0.0
    mip_gap: float | None = None
    loans_usd: tuple[float, ...] = ()
    incentives_usd: dict[str, tuple[float, ...]] = field(default_factory=dict)
    solver: str = ""
    message: str = ""
    presolve_retried: bool = False

    @property
    def feasible(self) -> bool:
        """True if the solution holds a plan (``optimal`` or ``time_limit``)."""
        return self.status in ("optimal", "time_limit")

    def done(self) -> dict[str, int]:
        """Only the projects that are done, by id.

        Returns
        -------
        dict of str to int
            Calendar year per project id.
        """
        return {k: v for k, v in self.years.items() if v is not None}


class Solver(Protocol):
    """Anything that can solve a :class:`Problem`."""

    def solve(self, problem: Problem) -> Solution:
        """Solve ``problem``.

        Parameters
        ----------
        problem : Problem
            The scheduling problem.

        Returns
        -------
        Solution
            Status, years and objective values.
        """
        ...


@dataclass(frozen=True)
class _Model:
    c: np.ndarray
    const: float
    integrality: np.ndarray
    lb: np.ndarray
    ub: np.ndarray
    a_start: np.ndarray  # the constraint matrix by columns (CSC): where each column starts,
    a_index: np.ndarray  # the row of each nonzero
    a_value: np.ndarray  # and its value
    row_lb: np.ndarray
    row_ub: np.ndarray
    n_x: int
    n_z: int
    n_l: int
    budget_rows: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=int))  # one a year
    x_col: int = 0  # the first "done in year" column
    start: tuple[np.ndarray, np.ndarray] | None = None  # columns and values of a starting plan

    @property
    def shape(self) -> tuple[int, int]:
        """Rows and columns of the constraint matrix."""
        return len(self.row_lb), len(self.c)


@dataclass(frozen=True)
class _Result:
    """What a HiGHS run returned: ``status`` 0 optimal, 1 a limit reached, 2 infeasible,
    3 unbounded, 4 anything else; ``x`` the plan's columns (None without a plan); ``fun`` the
    minimised objective without the model's constant; ``mip_gap`` the relative gap."""

    status: int
    x: np.ndarray | None
    fun: float | None
    mip_gap: float | None
    message: str


_STATUS_CODES = {"kOptimal": 0, "kTimeLimit": 1, "kIterationLimit": 1, "kSolutionLimit": 1,
                 "kInterrupt": 1, "kInfeasible": 2, "kUnbounded": 3}
"""HiGHS model status -> the codes of :class:`_Result` (the codes scipy.optimize.milp uses)."""


class _Rows:
    """Accumulates sparse rows."""

    def __init__(self) -> None:
        self.rows: list[int] = []
        self.cols: list[int] = []
        self.vals: list[float] = []
        self.lb: list[float] = []
        self.ub: list[float] = []

    def add(self, coefs: dict[int, float], lb: float, ub: float) -> None:
        r = len(self.lb)
        for col, v in coefs.items():
            if v != 0.0:
                self.rows.append(r)
                self.cols.append(col)
                self.vals.append(v)
        self.lb.append(lb)
        self.ub.append(ub)


def _objective(pr: Problem, kind: str) -> tuple[np.ndarray, np.ndarray, np.ndarray, float]:
    """Cost vectors (x as [P,T], z as [G,T], L as [T]) and constant, to be minimised."""
    np_, nt, ng = len(pr.projects), pr.n_years, len(pr.incentive_groups)
    cost = pr.matrix("cost_usd")
    pen = pr.matrix("undone_penalty_usd")
    cx = np.zeros((np_, nt))
    cz = np.zeros((ng, nt))
    cl = np.zeros(nt)
    const = 0.0
    if kind in ("max_npv", "min_cost_cvar"):
        max_lag = max((ig.arrives_after_years for ig in pr.incentive_groups), default=0)
        df = pr.discount_factors(extra_years=max_lag + 1)
        dfh = df[:nt]
        pen_d = pen * dfh[None, :]
        tail = np.cumsum(pen_d[:, ::-1], axis=1)[:, ::-1]  # sum_{t>=s}
        value = pr.matrix("value_usd") if kind == "max_npv" else pr.scenario_values().mean(axis=0)
        cx = -(value - cost * dfh[None, :] + tail)
        const = -float(pen_d.sum())  # NPV constant; minimised objective is -NPV
        for g, ig in enumerate(pr.incentive_groups):
            lag = ig.arrives_after_years
            cz[g] = -df[lag : lag + nt]
        cl = pr.loan_npv_cost_per_usd()
        if kind == "min_cost_cvar":  # expected loss: mean base cost - expected NPV
            return cx, cz, cl, -const + float(np.mean(pr.scenario_base_usd))
        return cx, cz, cl, -const
    if kind == "min_emissions":
        return -pr.matrix("emissions_kg"), cz, cl, 0.0
    if kind == "min_out_of_pocket":
        tail = np.cumsum(pen[:, ::-1], axis=1)[:, ::-1]
        sav = pr.matrix("savings_usd")
        sav_after = np.cumsum(sav[:, ::-1], axis=1)[:, ::-1] - sav  # sum_{t>s}
        cx = cost - tail - sav_after
        cz[:] = -1.0
        cl[:] = pr.loan_interest_per_usd()
        return cx, cz, cl, float(pen.sum())
    if kind == "earliest":
        q = pr.index(pr.objective_project)  # type: ignore[arg-type]
        cx[q] = np.arange(nt, dtype=float)
        return cx, cz, cl, 0.0
    raise ValueError(kind)


def build_model(
    pr: Problem, kind: str | None = None, latest_index: dict[int, int] | None = None
) -> _Model:
    """Build the sparse model (see module docstring). ``kind`` overrides the objective
    (``earliest`` = stage one of earliest closure); ``latest_index`` caps a project's year.

    Parameters
    ----------
    pr : Problem
        The problem.
    kind : str or None
        ``max_npv``, ``min_emissions``, ``min_out_of_pocket`` or ``earliest``; None takes
        the problem's objective.
    latest_index : dict of int to int or None
        Latest year index by project index.

    Returns
    -------
    _Model
        Objective (minimised), bounds, integrality and sparse constraint rows for
        HiGHS.

    Raises
    ------
    ValueError
        If ``kind`` is unknown.
    """
    kind = kind or ("max_npv" if pr.objective == "earliest_gas_closure" else pr.objective)
    np_, nt, ng = len(pr.projects), pr.n_years, len(pr.incentive_groups)
    n_x, n_z = np_ * nt, ng * nt
    n_l = nt if pr.loan_limit_usd > 0 else 0
    n_c = nt if pr.carryover else 0
    inter = pr.interactions if kind in ("max_npv", "min_cost_cvar") else ()
    n_w = len(inter) * nt
    n_h = n_x
    n_r = 1 + pr.n_scenarios if kind == "min_cost_cvar" else 0
    n = n_x + n_z + n_l + n_c + n_w + n_h + n_r

    def di(p: int, t: int) -> int:
        return p * nt + t

    def zi(g: int, t: int) -> int:
        return n_x + g * nt + t

    def li(t: int) -> int:
        return n_x + n_z + t

    def ci(t: int) -> int:
        return n_x + n_z + n_l + t

    def wi(i: int, t: int) -> int:
        return n_x + n_z + n_l + n_c + i * nt + t

    def xi(p: int, t: int) -> int:
        return n_x + n_z + n_l + n_c + n_w + p * nt + t

    def ri(s: int) -> int:  # eta is ri(0), u[s] is ri(s + 1)
        return n_x + n_z + n_l + n_c + n_w + n_h + s

    def add_x(coefs: dict[int, float], p: int, t: int, v: float) -> None:
        coefs[xi(p, t)] = coefs.get(xi(p, t), 0.0) + v

    def add_d(coefs: dict[int, float], p: int, t: int, v: float) -> None:
        if t >= 0:
            coefs[di(p, t)] = coefs.get(di(p, t), 0.0) + v

    lb = np.zeros(n)
    ub = np.ones(n)
    ub[n_x:] = np.inf
    rows = _Rows()
    inf = np.inf
    last = nt - 1
    # link D[p,t] - D[p,t-1] - x[p,t] = 0; x closed outside the allowed years
    for p in range(np_):
        allowed = set(pr.allowed_years(p))
        if latest_index and p in latest_index:
            allowed = {t for t in allowed if t <= latest_index[p]}
        for t in range(nt):
            link = {di(p, t): 1.0, xi(p, t): -1.0}
            if t > 0:
                link[di(p, t - 1)] = -1.0
            rows.add(link, 0.0, 0.0)
            if t not in allowed:
                ub[xi(p, t)] = 0.0
        first = min(allowed, default=nt)
        ub[di(p, 0) : di(p, 0) + first] = 0.0
        if pr.must_do(p):
            rows.add({di(p, last): 1.0}, 1.0, inf)
    for g, ig in enumerate(pr.incentive_groups):
        ub[zi(g, 0) : zi(g, 0) + nt] = [ig.cap_in(pr.first_year + t) for t in range(nt)]
    if n_l:
        ub[li(0) : li(0) + nt] = pr.loan_limit_usd
    if n_w:
        ub[wi(0, 0) : wi(0, 0) + n_w] = 1.0
    ub[xi(0, 0) : xi(0, 0) + n_h] = np.minimum(ub[xi(0, 0) : xi(0, 0) + n_h], 1.0)
    integrality = np.zeros(n)
    integrality[:n_x] = 1
    integrality[xi(0, 0) : xi(0, 0) + n_h] = 1

    # exclusive groups
    for gx in pr.exclusive_groups:
        coefs = {di(pr.index(m), last): 1.0 for m in gx.members}
        rows.add(coefs, 1.0 if gx.exactly_one else -inf, 1.0)
    # budget: c[t] - c[t-1] + spend + repay - savings - incentives - L <= budget
    cost = pr.matrix("cost_usd")
    sav = pr.matrix("savings_usd")
    a = pr.annuity_factor()
    budget_rows = np.arange(len(rows.lb), len(rows.lb) + nt)
    for t in range(nt):
        coefs: dict[int, float] = {}
        for p in range(np_):
            if cost[p, t]:
                add_x(coefs, p, t, cost[p, t])
            if pr.savings_to_budget and sav[p, t]:
                add_d(coefs, p, t - 1, -sav[p, t])
        for g, ig in enumerate(pr.incentive_groups):
            s = t - ig.arrives_after_years
            if ig.adds_to_budget and s >= 0:
                coefs[zi(g, s)] = coefs.get(zi(g, s), 0.0) - 1.0
        if n_l:
            coefs[li(t)] = -1.0
            for s in range(max(0, t - pr.loan_term_years), t):
                coefs[li(s)] = coefs.get(li(s), 0.0) + a
        if n_c:
            coefs[ci(t)] = 1.0
            if t > 0:
                coefs[ci(t - 1)] = -1.0
        rows.add(coefs, -inf, pr.budget_usd[t])
    if n_l:
        rows.add({li(t): 1.0 for t in range(nt)}, -inf, pr.loan_limit_usd)
    # capped incentives: z[g,t] <= sum_p rate cost x
    for g, ig in enumerate(pr.incentive_groups):
        for t in range(nt):
            coefs = {zi(g, t): 1.0}
            for pid, rate in ig.rates:
                add_x(coefs, pr.index(pid), t, -rate * cost[pr.index(pid), t])
            rows.add(coefs, -inf, 0.0)
    # prerequisites / any-of: D[A,t] <= sum_B D[B,t] (D[B,t-1] when strict)
    for r in pr.prerequisites:
        pa = pr.index(r.project)
        for t in range(nt):
            if ub[di(pa, t)] == 0.0:
                continue
            coefs = {di(pa, t): 1.0}
            for b in r.requires_any:
                add_d(coefs, pr.index(b), t - 1 if r.strict else t, -1.0)
            rows.add(coefs, -inf, 0.0)
    # capacity in every year's state
    if pr.capacity_base is not None:
        net = [p.capacity_use - p.capacity_provided for p in pr.projects]
        for t in range(nt):
            coefs = {di(p, t): net[p] for p in range(np_) if net[p]}
            rows.add(coefs, -inf, pr.capacity_base)
    # follow-ups: all of "after" done by t -> the project done by t + within
    for fu in pr.followups:
        pf = pr.index(fu.project)
        after = [pr.index(a) for a in fu.after]
        for t in range(nt - fu.within_years):
            coefs = {di(a, t): 1.0 for a in after}
            coefs[di(pf, t + fu.within_years)] = coefs.get(di(pf, t + fu.within_years), 0.0) - 1.0
            rows.add(coefs, -inf, float(len(after) - 1))
    # breaker spaces in every year's state
    if pr.spaces_base is not None:
        net = [p.spaces_use - p.spaces_provided for p in pr.projects]
        for t in range(nt):
            coefs = {di(p, t): net[p] for p in range(np_) if net[p]}
            rows.add(coefs, -inf, pr.spaces_base)
    # max per year
    if pr.max_per_year is not None:
        for t in range(nt):
            coefs = {}
            for p in range(np_):
                add_x(coefs, p, t, 1.0)
            rows.add(coefs, -inf, float(pr.max_per_year))

    # interactions: w = D[a,t] D[b,t]
    cw = np.zeros((len(inter), nt))
    for i, it in enumerate(inter):
        pa, pb = pr.index(it.a), pr.index(it.b)
        for t in range(nt):
            v = it.value_usd[t]
            cw[i, t] = -v
            if v > 0:
                rows.add({wi(i, t): 1.0, di(pa, t): -1.0}, -inf, 0.0)
                rows.add({wi(i, t): 1.0, di(pb, t): -1.0}, -inf, 0.0)
            elif v < 0:
                rows.add({wi(i, t): 1.0, di(pa, t): -1.0, di(pb, t): -1.0}, -1.0, inf)

    cx, cz, cl, const = _objective(pr, kind)
    cr = np.zeros(n_r)
    if n_r:
        _scenario_rows(pr, rows, cz, cl, cw, inter, (ri, xi, zi, li, wi), n_l)
        lb[ri(0)] = -np.inf
        cr[0] = pr.risk_weight
        cr[1:] = pr.risk_weight / (pr.risk_tail * pr.n_scenarios)
    r, k = np.asarray(rows.rows, dtype=np.int32), np.asarray(rows.cols, dtype=np.int32)
    order = np.lexsort((r, k))  # by column, then row (each row adds a column once)
    a_start = np.zeros(n, dtype=np.int32)
    a_start[1:] = np.cumsum(np.bincount(k, minlength=n))[:-1]
    c = np.concatenate([np.zeros(n_x), cz.ravel(), cl[:n_l], np.zeros(n_c), cw.ravel(), cx.ravel(), cr])
    return _Model(
        c, const, integrality, lb, ub, a_start, r[order], np.asarray(rows.vals, dtype=float)[order],
        np.array(rows.lb, dtype=float), np.array(rows.ub, dtype=float), n_x, n_z, n_l, budget_rows,
        xi(0, 0),
    )


def _with_start(pr: Problem, model: _Model, start: Mapping[str, int | None]) -> _Model:
    """The model with a starting plan (project id -> year or None) for the "done by" and "done in
    year" columns of the projects ``start`` names; the other columns are left to the solver."""
    nt = pr.n_years
    cols, vals = [], []
    for pid, year in start.items():
        if pid not in pr.ids:
            continue
        p = pr.index(pid)
        done_by = np.zeros(nt)
        if year is not None and 0 <= year - pr.first_year < nt:
            done_by[year - pr.first_year:] = 1.0
        cols += [np.arange(p * nt, (p + 1) * nt), np.arange(model.x_col + p * nt, model.x_col + (p + 1) * nt)]
        vals += [done_by, np.diff(done_by, prepend=0.0)]
    if not cols:
        return model
    return dataclasses.replace(model, start=(np.concatenate(cols).astype(np.int32), np.concatenate(vals)))


def _placed_years(pr: Problem, model: _Model, x: np.ndarray) -> dict[str, int | None]:
    """Calendar year per project id read from the solver's "done by" columns."""
    done_by = x[: model.n_x].reshape(len(pr.projects), pr.n_years) > 0.5
    years: dict[str, int | None] = {}
    for p, proj in enumerate(pr.projects):
        hit = np.flatnonzero(done_by[p])
        years[proj.id] = int(pr.first_year + hit[0]) if hit.size else None
    return years


def _holds_up(pr: Problem, model: _Model, res: Any, stage: str | None, gap: float) -> bool:
    """True when the plan in ``res`` is feasible in the independent evaluator and worth at least
    what the solver says (within the relative gap). The first stage of ``earliest_gas_closure``
    (a year index) is checked for feasibility only."""
    ev = evaluate(pr, _placed_years(pr, model, res.x))
    if ev.violations:
        return False
    if stage == "earliest":
        return True
    claimed = float(res.fun) + model.const  # minimised: -NPV, -kg saved or out-of-pocket USD
    if pr.objective == "earliest_gas_closure":
        true = -ev.npv_usd  # the second stage maximises NPV with the earliest year held
    elif pr.objective in ("min_out_of_pocket", "min_cost_cvar"):
        true = ev.objective_value
    else:
        true = -ev.objective_value
    return true <= claimed + max(gap, 1e-9) * max(1.0, abs(claimed)) + 1e-6


def _scenario_rows(pr: Problem, rows: _Rows, cz: np.ndarray, cl: np.ndarray, cw: np.ndarray,
                   inter: tuple, cols: tuple, n_l: int) -> None:
    """``u[s] + eta + NPV_s >= base_s`` for each scenario: ``NPV_s`` has the objective's
    z, L and w coefficients (negated: they are the minimised -NPV's) and the scenario's x values."""
    ri, xi, zi, li, wi = cols
    nt = pr.n_years
    max_lag = max((ig.arrives_after_years for ig in pr.incentive_groups), default=0)
    dfh = pr.discount_factors(extra_years=max_lag + 1)[:nt]
    pen_d = pr.matrix("undone_penalty_usd") * dfh[None, :]
    tail = np.cumsum(pen_d[:, ::-1], axis=1)[:, ::-1]
    common = -pr.matrix("cost_usd") * dfh[None, :] + tail
    k_pen = float(pen_d.sum())
    shared: dict[int, float] = {}
    for g in range(cz.shape[0]):
        for t in range(nt):
            shared[zi(g, t)] = -cz[g, t]
    for t in range(n_l):
        shared[li(t)] = -cl[t]
    for i in range(len(inter)):
        for t in range(nt):
            shared[wi(i, t)] = -cw[i, t]
    values = pr.scenario_values()
    for s in range(pr.n_scenarios):
        coefs = dict(shared)
        a = values[s] + common
        for p, t in zip(*np.nonzero(a), strict=True):
            coefs[xi(int(p), int(t))] = float(a[p, t])
        coefs[ri(0)] = 1.0
        coefs[ri(s + 1)] = 1.0
        rows.add(coefs, pr.scenario_base_usd[s] + k_pen, np.inf)


@dataclass(frozen=True)
class MilpSolver:
    """HiGHS through ``highspy``. ``mip_rel_gap`` 0 asks for a proven optimum; when the
    time limit stops the search with a plan in hand, the status is ``time_limit``.

    Attributes
    ----------
    time_limit_s : float
        Wall-clock limit of a solve, s.
    mip_rel_gap : float
        Relative MIP gap at which HiGHS stops, fraction.
    presolve : bool
        True to run HiGHS presolve.
    retry_without_presolve : bool
        With presolve on: solve a stage again without presolve when its answer does not hold up
        (see the module notes).
    node_limit : int or None
        Branch-and-bound nodes after which HiGHS stops (a limit that, unlike the clock, gives
        the same answer on a busy machine); None for no limit.
    """

    time_limit_s: float = 30.0
    mip_rel_gap: float = 1e-7
    presolve: bool = False
    retry_without_presolve: bool = True
    node_limit: int | None = None

    def _highs(self, model: _Model, time_limit_s: float, presolve: bool) -> _Result:
        import highspy

        h = highspy.Highs()
        for name, value in (("output_flag", False), ("time_limit", max(time_limit_s, 1e-3)),
                            ("mip_rel_gap", self.mip_rel_gap), ("presolve", "on" if presolve else "off")):
            h.setOptionValue(name, value)
        if self.node_limit is not None:
            h.setOptionValue("mip_max_nodes", int(self.node_limit))
        n_rows, n_cols = model.shape
        h.passModel(n_cols, n_rows, len(model.a_value), int(highspy.MatrixFormat.kColwise),
                    int(highspy.ObjSense.kMinimize), 0.0, model.c, model.lb, model.ub,
                    model.row_lb, model.row_ub, model.a_start, model.a_index, model.a_value,
                    model.integrality.astype(np.int32))
        if model.start is not None:  # a plan to start from: a good incumbent prunes the search
            h.setSolution(len(model.start[0]), model.start[0], model.start[1])
        h.run()
        status = h.getModelStatus()
        info = h.getInfo()
        code = _STATUS_CODES.get(status.name, 4)
        # a limit stops the search with or without a plan: a plan has a finite objective
        has_plan = code == 0 or (code == 1 and abs(info.objective_function_value) < highspy.kHighsInf)
        x = np.array(h.getSolution().col_value) if has_plan else None
        return _Result(code, x, info.objective_function_value if has_plan else None,
                       info.mip_gap if has_plan else None, f"HiGHS: {h.modelStatusToString(status)}")

    def _run(
        self, pr: Problem, model: _Model, time_limit_s: float, stage: str | None
    ) -> tuple[Any, bool]:
        """One stage's solve, repeated without presolve when the presolved answer is doubtful
        (the repeat gets the stage's time limit again). Returns the result and whether it was
        repeated."""
        res = self._highs(model, time_limit_s, self.presolve)
        if self.presolve and self.retry_without_presolve and (
            res.x is None or not _holds_up(pr, model, res, stage, self.mip_rel_gap)
        ):
            return self._highs(model, time_limit_s, False), True
        return res, False

    def solve(self, problem: Problem, start: Mapping[str, int | None] | None = None) -> Solution:
        """Solve ``problem`` (in two stages for ``earliest_gas_closure``).

        Parameters
        ----------
        problem : Problem
            The scheduling problem.
        start : mapping of str to int or None, optional
            A plan to start the search from (project id -> year, None: not done), e.g. the
            answer to a closely related problem; it changes how fast the optimum is found, not
            which optimum (within the gap).

        Returns
        -------
        Solution
            Status, years, objective value, NPV (USD), loans and incentives (USD per year).
        """
        pr = problem
        started = time.perf_counter()
        latest: dict[int, int] | None = None
        first_value: float | None = None
        first_stage_limited = False
        retried = False
        if pr.objective == "earliest_gas_closure":
            m1 = build_model(pr, "earliest")
            res1, retried = self._run(pr, m1, self.time_limit_s, "earliest")
            if res1.x is None:
                return self._failed(res1, time.perf_counter() - started, retried)
            q = pr.index(pr.objective_project)  # type: ignore[arg-type]
            dq = res1.x[q * pr.n_years : (q + 1) * pr.n_years]
            t_star = int(np.argmax(dq > 0.5))
            first_stage_limited = int(res1.status) != 0
            latest = {q: t_star}
            first_value = float(pr.first_year + t_star)
        model = build_model(pr, None, latest)
        if start and latest is None:
            model = _with_start(pr, model, start)
        remaining = self.time_limit_s - (time.perf_counter() - started)
        res, retried_now = self._run(pr, model, remaining, None)
        retried = retried or retried_now
        elapsed = time.perf_counter() - started
        if res.x is None:
            return self._failed(res, elapsed, retried)
        sol = dataclasses.replace(
            self._solution(pr, model, res, elapsed, first_value), presolve_retried=retried
        )
        if first_stage_limited:  # the earliest year itself is not proven
            sol = dataclasses.replace(sol, status="time_limit")
        return sol

    def feasible(self, problem: Problem) -> bool:
        """True when some plan meets every constraint of ``problem`` (its objective ignored).

        The constraints alone, with a zero objective, presolve off (the setting the presolve
        repeat trusts) and the first plan found taken: a few ms where a full solve takes tens to
        hundreds. A search stopped by the time limit before any plan counts as not feasible.

        Parameters
        ----------
        problem : Problem
            The scheduling problem.

        Returns
        -------
        bool
            True if a plan exists.
        """
        return self.feasible_with_extra_budget(problem)(0.0)

    def feasible_with_extra_budget(self, problem: Problem) -> Callable[[float], bool]:
        """A test of :meth:`feasible` for ``problem`` with ``extra_usd`` added to every year's
        budget: the model is built once and only the budget rows' bounds change between tests.

        Parameters
        ----------
        problem : Problem
            The scheduling problem.

        Returns
        -------
        callable
            ``test(extra_usd) -> bool``.
        """
        model = build_model(problem, "max_npv")  # every objective's constraints; w rows are free
        model = dataclasses.replace(model, c=np.zeros_like(model.c), const=0.0)

        def test(extra_usd: float) -> bool:
            trial = model
            if extra_usd:
                row_ub = model.row_ub.copy()
                row_ub[model.budget_rows] += extra_usd
                trial = dataclasses.replace(model, row_ub=row_ub)
            return self._highs(trial, self.time_limit_s, False).x is not None

        return test

    def _failed(self, res: Any, elapsed: float, retried: bool) -> Solution:
        status = {2: "infeasible", 1: "no_solution"}.get(int(res.status), "error")
        return Solution(status, solve_time_s=elapsed, solver="highs", message=str(res.message),
                        presolve_retried=retried)

    def _solution(
        self, pr: Problem, model: _Model, res: Any, elapsed: float, first_value: float | None
    ) -> Solution:
        nt = pr.n_years
        years = _placed_years(pr, model, res.x)
        zs = res.x[model.n_x : model.n_x + model.n_z].reshape(len(pr.incentive_groups), nt)
        loans = res.x[model.n_x + model.n_z : model.n_x + model.n_z + nt] if model.n_l else np.zeros(nt)
        value = float(res.fun) + model.const + 0.0  # + 0.0 turns -0.0 into 0.0
        kind_npv = pr.objective in ("max_npv", "earliest_gas_closure")
        npv = 0.0 - value if kind_npv else None
        if pr.objective in ("max_npv", "min_emissions"):
            objective_value = 0.0 - value
        elif pr.objective in ("min_out_of_pocket", "min_cost_cvar"):
            objective_value = value
        else:
            objective_value = first_value
        if npv is None:
            npv = evaluate(pr, years).npv_usd
        gap = getattr(res, "mip_gap", None)
        return Solution(
            status="optimal" if int(res.status) == 0 else "time_limit",
            years=years,
            objective_value=objective_value,
            npv_usd=npv,
            solve_time_s=elapsed,
            mip_gap=None if gap is None else float(gap),
            loans_usd=tuple(float(v) for v in loans),
            incentives_usd={
                ig.id: tuple(float(v) for v in zs[g]) for g, ig in enumerate(pr.incentive_groups)
            },
            solver="highs",
            message=str(res.message),
        )


def solve(problem: Problem, solver: Solver | None = None) -> Solution:
    """Solve ``problem`` with ``solver`` (default :class:`MilpSolver`).

    Parameters
    ----------
    problem : Problem
        The scheduling problem.
    solver : Solver or None
        The solver; None uses :class:`MilpSolver` defaults.

    Returns
    -------
    Solution
        Status, years and objective values.
    """
    return (solver or MilpSolver()).solve(problem)
