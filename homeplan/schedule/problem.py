"""The abstract scheduling problem and its exact evaluator.

A :class:`Problem` is independent of homes: it holds candidate projects with per-year numbers
(computed by the planner from the energy, money and electrical engines), yearly budgets and
the constraint families below. Solvers (``milp.py``, ``bruteforce.py``) place each project in one
year of the horizon or leave it out. :func:`evaluate` / :func:`evaluate_batch` compute, for any
placement, every constraint violation and every objective value *exactly as the MILP models them*;
the brute-force solver and the tests use them.

Indexing: ``T = len(budget_usd)`` years, index ``t = 0..T-1`` is calendar year ``first_year + t``.
A placement is an integer per project: the year index, or ``-1`` for "not done". All calendar
years in the public fields (``earliest_year``, ``pinned_year``, ``Target.by_year``) are calendar
years, not indices.

Semantics (shared by every solver):

- *done by t*: ``D[p,t] = 1`` if project p is done in a year ``<= t``.
- *spend*: ``spend[t] = sum_p cost_usd[p][t] * x[p,t]`` (costs after point-of-sale incentives).
- *money in* at t: ``budget_usd[t]``, plus (``savings_to_budget``) ``savings_usd[p][t]`` of every
  project done strictly before t, plus capped incentives of groups with ``adds_to_budget`` earned
  ``arrives_after_years`` earlier, plus loan principal ``L[t]`` minus repayments of earlier loans
  (annuity ``loan_rate`` over ``loan_term_years``, first payment the year after borrowing).
- *budget*: with ``carryover`` every prefix ``sum_{t<=y} (money in - spend) >= 0``; without it
  every year on its own (unspent money is lost). Total borrowing ``sum_t L[t] <= loan_limit_usd``.
- *end of life*: ``undone_penalty_usd[p][t]`` (expected emergency cost in year t) is paid for
  each year t in which p is not yet done (``1 - D[p,t]``); doing p in year t avoids year t's risk.
- *follow-ups*: once every project in ``after`` is done by t, ``project`` is done by
  ``t + within_years`` (a constraint only while that year is inside the horizon).
- *capped incentives*: group g earns ``min(cap_usd_per_year, sum_p rate_p * cost[p,t] x[p,t])``
  in year t (so two capped items in two years can earn two caps).
- *NPV* (objective ``max_npv``), discount factor ``df[t] = (1 + discount_rate) ** -t``::

      sum_p,t x[p,t] (value_usd[p][t] - cost_usd[p][t] df[t])
      + sum_g,t earned[g,t] df[t + arrives_after_years]
      - sum_p,t (1 - D[p,t]) undone_penalty_usd[p][t] df[t]
      - sum_t L[t] df[t] K,   K = max(0, PV at discount_rate of one dollar's repayments - 1)
      + sum_i,t D[a_i,t] D[b_i,t] interaction_value_usd[i][t]

  ``value_usd`` is already a present value (the caller discounts benefits).
- *emissions* (``min_emissions``): maximise ``sum x[p,t] emissions_kg[p][t]`` (lifetime kg saved).
- *out of pocket* (``min_out_of_pocket``), nominal, within the horizon: spend + penalties +
  loan interest (``L * (n a - 1)``) - capped incentives earned - bill savings ``savings_usd[p][t]``
  of years after completion.
- *earliest closure* (``earliest_gas_closure``): ``objective_project`` must be done; minimise its
  year, then (lexicographically) maximise NPV.
- *risk-aware* (``min_cost_cvar``), over ``S`` equally likely price scenarios: scenario s values
  each project by ``scenario_value_usd[s]`` (``value_usd`` where a project has none) and costs
  ``loss_s = scenario_base_usd[s] - NPV_s``, the household's total cost in present value (the
  base is what the home costs in that scenario before any project); minimise
  ``mean_s loss_s + risk_weight * CVaR_tail(loss)``, where ``CVaR_tail`` is the mean of the worst
  ``risk_tail`` share of the scenarios' losses (Rockafellar & Uryasev 2000; the MILP uses their
  linear form ``eta + sum_s u_s / (tail S)``, ``u_s >= loss_s - eta``, ``u_s >= 0``).

Loans: for a fixed placement the cheapest feasible borrowing is "just in time" (borrow only the
shortfall, in the year it occurs): borrowing later never raises any prefix of repayments and
every cost coefficient ``df[t] K`` is non-increasing in t. :func:`evaluate_batch` uses that rule;
the MILP chooses ``L`` freely and must reach the same optimum (the tests check it).

References
----------
Annuity payment ``a = r / (1 - (1 + r) ** -n)``: standard loan amortisation formula (e.g. Brealey,
Myers & Allen, *Principles of Corporate Finance*, ch. 2).
R. T. Rockafellar, S. Uryasev, "Optimization of conditional value-at-risk", Journal of Risk 2
(2000) 21-41 (CVaR of equally likely scenarios and its linear programming form).
"""

from __future__ import annotations

import dataclasses
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

__all__ = [
    "FAMILIES",
    "OBJECTIVES",
    "TOL_USD",
    "Evaluation",
    "ExclusiveGroup",
    "FollowUp",
    "IncentiveGroup",
    "Interaction",
    "Prerequisite",
    "Problem",
    "Project",
    "Target",
    "evaluate",
    "evaluate_batch",
    "objective_of",
    "placement_of",
    "years_from_sequence",
]

OBJECTIVES = ("max_npv", "min_emissions", "earliest_gas_closure", "min_out_of_pocket", "min_cost_cvar")
TOL_USD = 1e-6
"""Absolute tolerance for money comparisons in :func:`evaluate_batch` (scaled by magnitude)."""


def _floats(values: Iterable[float] | None) -> tuple[float, ...]:
    if values is None:
        return ()
    if type(values) is tuple and all(type(v) is float for v in values):
        return values  # already converted (a copy made by dataclasses.replace)
    return tuple(float(v) for v in values)


@dataclass(frozen=True)
class Project:
    """One candidate project. Per-year tuples have one entry per horizon year (empty = zeros).

    Attributes
    ----------
    id : str
        Unique project id.
    cost_usd : tuple of float
        Price if done in year t, after point-of-sale incentives, nominal USD.
    label : str
        Display name (empty = ``id``).
    value_usd : tuple of float
        Present value (at ``first_year``) of all benefits if done in year t, USD.
    emissions_kg : tuple of float
        Lifetime CO2e saved if done in year t, kg.
    savings_usd : tuple of float
        Bill savings realised in year t if done in an earlier year, nominal USD.
    undone_penalty_usd : tuple of float
        Expected cost in year t if not done by year t (end of life), nominal USD.
    mandatory : bool
        Must be done in some year.
    excluded : bool
        Must not be done.
    earliest_year : int or None
        First calendar year of the window (e.g. an incentive window).
    latest_year : int or None
        Last calendar year of the window.
    pinned_year : int or None
        Calendar year the project is fixed to.
    capacity_use : float
        Capacity added on the service, e.g. A (see ``Problem.capacity_base``).
    capacity_provided : float
        Capacity freed on the service, same unit.
    spaces_use : float
        Breaker spaces its new circuits take in the panel (see ``Problem.spaces_base``).
    spaces_provided : float
        Breaker spaces it makes (a subpanel, a new panel).
    failure_item : str
        For explanations only: the item that may fail ("the water heater").
    failure_prob_by_year : tuple of float
        For explanations only: cumulative failure probability by the end of year t, fraction.
    window_reason : str
        For explanations only: why the window ends ("the rebate ends").
    pin_reason : str
        For explanations only: replaces "pinned by you to Y" (e.g. "it failed: replaced in
        2026").
    scenario_value_usd : tuple of tuple of float
        ``min_cost_cvar`` only: ``value_usd`` in each price scenario (``[S][T]``; empty = the
        same in every scenario), USD.
    """

    id: str
    cost_usd: tuple[float, ...]
    label: str = ""
    value_usd: tuple[float, ...] = ()
    emissions_kg: tuple[float, ...] = ()
    savings_usd: tuple[float, ...] = ()
    undone_penalty_usd: tuple[float, ...] = ()
    mandatory: bool = False
    excluded: bool = False
    earliest_year: int | None = None
    latest_year: int | None = None
    pinned_year: int | None = None
    capacity_use: float = 0.0
    capacity_provided: float = 0.0
    spaces_use: float = 0.0
    spaces_provided: float = 0.0
    failure_item: str = ""
    failure_prob_by_year: tuple[float, ...] = ()
    window_reason: str = ""
    pin_reason: str = ""
    scenario_value_usd: tuple[tuple[float, ...], ...] = ()

    def __post_init__(self) -> None:
        object.__setattr__(self, "scenario_value_usd", tuple(_floats(v) for v in self.scenario_value_usd))
        for name in (
            "cost_usd",
            "value_usd",
            "emissions_kg",
            "savings_usd",
            "undone_penalty_usd",
            "failure_prob_by_year",
        ):
            object.__setattr__(self, name, _floats(getattr(self, name)))

    @property
    def name(self) -> str:
        """Display name: ``label``, or ``id`` when there is no label."""
        return self.label or self.id


@dataclass(frozen=True)
class Prerequisite:
    """``project`` may only be done once at least one of ``requires_any`` is done: in the same
    or an earlier year, or (``strict``) an earlier year. One element = a plain prerequisite;
    several = an any-of group (panel upgrade OR load management).

    Attributes
    ----------
    project : str
        Id of the dependent project.
    requires_any : tuple of str
        Ids of the projects, one of which must be done first.
    strict : bool
        True if the prerequisite must be done in an earlier year.
    label : str
        Name of the rule in explanations.
    """

    project: str
    requires_any: tuple[str, ...]
    strict: bool = False
    label: str = ""

    def __post_init__(self) -> None:
        reqs = (self.requires_any,) if isinstance(self.requires_any, str) else self.requires_any
        object.__setattr__(self, "requires_any", tuple(reqs))


@dataclass(frozen=True)
class ExclusiveGroup:
    """At most one of ``members`` is done (variants of one project); exactly one if
    ``exactly_one``.

    Attributes
    ----------
    members : tuple of str
        Project ids of the group.
    exactly_one : bool
        True if exactly one must be done.
    label : str
        Name of the group in explanations.
    """

    members: tuple[str, ...]
    exactly_one: bool = False
    label: str = ""

    def __post_init__(self) -> None:
        object.__setattr__(self, "members", tuple(self.members))


@dataclass(frozen=True)
class IncentiveGroup:
    """An incentive with a yearly cap, e.g. a tax credit of 30 % up to $2,000 a year.

    ``rates`` maps project id -> share of its cost earned. Earned in year t:
    ``min(cap_usd_per_year, sum_p rate_p cost[p,t] x[p,t])``; the money arrives
    ``arrives_after_years`` later and, if ``adds_to_budget``, adds to that year's budget.
    ``active_years``: the calendar years the program pays in (its window); empty = every year.

    Attributes
    ----------
    id : str
        Unique group id.
    rates : tuple of (str, float)
        Project id and share of its cost earned, fraction.
    cap_usd_per_year : float
        Cap, USD per year.
    arrives_after_years : int
        Delay from earning to receiving the money, years.
    adds_to_budget : bool
        True if the money adds to the budget of the year it arrives.
    name : str
        Name of the incentive.
    active_years : tuple of int
        Calendar years the program pays in.
    """

    id: str
    rates: tuple[tuple[str, float], ...]
    cap_usd_per_year: float
    arrives_after_years: int = 1
    adds_to_budget: bool = False
    name: str = ""
    active_years: tuple[int, ...] = ()

    def cap_in(self, year: int) -> float:
        """The cap in a calendar year: 0 outside the program's window.

        Parameters
        ----------
        year : int
            Calendar year.

        Returns
        -------
        float
            Cap, USD.
        """
        return self.cap_usd_per_year if not self.active_years or year in self.active_years else 0.0

    def __post_init__(self) -> None:
        rates = self.rates.items() if isinstance(self.rates, Mapping) else self.rates
        object.__setattr__(self, "rates", tuple((str(k), float(v)) for k, v in rates))
        object.__setattr__(self, "active_years", tuple(int(y) for y in self.active_years))


@dataclass(frozen=True)
class Interaction:
    """Extra present value ``value_usd[t]`` in each year t in which *both* projects are done
    (by t): positive for synergy (solar is worth more once the heat pump and EV exist), negative
    for overlap (insulation lowers the heat pump's savings). Enters the NPV only.

    Attributes
    ----------
    a : str
        Id of the first project.
    b : str
        Id of the second project.
    value_usd : tuple of float
        Extra present value in each horizon year, USD.
    label : str
        Name of the interaction.
    """

    a: str
    b: str
    value_usd: tuple[float, ...]
    label: str = ""

    def __post_init__(self) -> None:
        object.__setattr__(self, "value_usd", _floats(self.value_usd))


@dataclass(frozen=True)
class Target:
    """Every project in ``project_ids`` done by calendar year ``by_year`` (e.g. fully electric).

    Attributes
    ----------
    project_ids : tuple of str
        Projects the target covers.
    by_year : int
        Calendar year by which they are done.
    label : str
        Name of the target, e.g. ``fully electric``.
    """

    project_ids: tuple[str, ...]
    by_year: int
    label: str = "fully electric"

    def __post_init__(self) -> None:
        object.__setattr__(self, "project_ids", tuple(self.project_ids))


@dataclass(frozen=True)
class FollowUp:
    """``project`` is done at most ``within_years`` after every project in ``after`` is done
    (e.g. a fuel's tank removed soon after the last appliance on the fuel is replaced).

    Attributes
    ----------
    project : str
        The project that follows.
    after : tuple of str
        The projects it follows; until all of them are done it is free.
    within_years : int
        Years it may wait once they are, >= 0.
    label : str
        For explanations: why it follows (e.g. "the last oil appliance is gone").
    """

    project: str
    after: tuple[str, ...]
    within_years: int = 1
    label: str = ""

    def __post_init__(self) -> None:
        object.__setattr__(self, "after", tuple(self.after))
        if self.within_years < 0:
            raise ValueError("within_years must be >= 0")


@dataclass(frozen=True)
class Problem:
    """A scheduling problem over ``T = len(budget_usd)`` years starting at ``first_year``.

    See the module docstring for the exact meaning of every field. ``capacity_base`` ``None``
    means no capacity constraint; ``max_per_year`` ``None`` means no limit; ``loan_limit_usd``
    0 means no loans.

    Attributes
    ----------
    first_year : int
        Calendar year of t = 0.
    budget_usd : tuple of float
        Budget of each horizon year, USD.
    projects : tuple of Project
        The candidate projects.
    carryover : bool
        True if unspent money carries to the next year.
    discount_rate : float
        Discount rate, fraction per year (0.03 = 3 %).
    loan_limit_usd : float
        Total borrowing allowed, USD.
    loan_rate : float
        Loan interest rate, fraction per year.
    loan_term_years : int
        Loan term, years.
    savings_to_budget : bool
        True if bill savings add to later budgets.
    prerequisites : tuple of Prerequisite
        Prerequisite rules.
    exclusive_groups : tuple of ExclusiveGroup
        Choose-one groups.
    capacity_base : float or None
        Service capacity available, e.g. A.
    spaces_base : float or None
        Free breaker spaces in the panel (None: not known, no constraint).
    max_per_year : int or None
        Most projects in one year.
    incentive_groups : tuple of IncentiveGroup
        Incentives with yearly caps.
    targets : tuple of Target
        Done-by targets.
    interactions : tuple of Interaction
        Value of project pairs.
    followups : tuple of FollowUp
        Projects that must follow others within some years.
    objective : str
        One of :data:`OBJECTIVES`.
    objective_project : str or None
        Project whose year ``earliest_gas_closure`` minimises.
    scenario_base_usd : tuple of float
        ``min_cost_cvar``: the home's total cost in each price scenario before any project
        (present value, USD); its length is the number of scenarios S.
    risk_weight : float
        ``min_cost_cvar``: weight of the CVaR beside the expected cost, dimensionless.
    risk_tail : float
        ``min_cost_cvar``: share of the worst scenarios the CVaR averages, fraction in (0, 1].

    Raises
    ------
    ValueError
        For malformed data (see :meth:`validate`).
    """

    first_year: int
    budget_usd: tuple[float, ...]
    projects: tuple[Project, ...]
    carryover: bool = True
    discount_rate: float = 0.0
    loan_limit_usd: float = 0.0
    loan_rate: float = 0.0
    loan_term_years: int = 10
    savings_to_budget: bool = False
    prerequisites: tuple[Prerequisite, ...] = ()
    exclusive_groups: tuple[ExclusiveGroup, ...] = ()
    capacity_base: float | None = None
    spaces_base: float | None = None
    max_per_year: int | None = None
    incentive_groups: tuple[IncentiveGroup, ...] = ()
    targets: tuple[Target, ...] = ()
    interactions: tuple[Interaction, ...] = ()
    followups: tuple[FollowUp, ...] = ()
    objective: str = "max_npv"
    objective_project: str | None = None
    scenario_base_usd: tuple[float, ...] = ()
    risk_weight: float = 1.0
    risk_tail: float = 0.1

    def __post_init__(self) -> None:
        object.__setattr__(self, "budget_usd", _floats(self.budget_usd))
        object.__setattr__(self, "scenario_base_usd", _floats(self.scenario_base_usd))
        for name in (
            "projects",
            "prerequisites",
            "exclusive_groups",
            "incentive_groups",
            "targets",
            "interactions",
        ):
            object.__setattr__(self, name, tuple(getattr(self, name)))
        self.validate()

    # -- basic facts ---------------------------------------------------------------------
    @property
    def n_scenarios(self) -> int:
        """Number of price scenarios, S (0: none)."""
        return len(self.scenario_base_usd)

    @property
    def n_years(self) -> int:
        """Number of horizon years, T."""
        return len(self.budget_usd)

    @property
    def years(self) -> tuple[int, ...]:
        """Calendar years of the horizon."""
        return tuple(range(self.first_year, self.first_year + self.n_years))

    @cached_property
    def ids(self) -> tuple[str, ...]:
        """Project ids, in project order."""
        return tuple(p.id for p in self.projects)

    @cached_property
    def _positions(self) -> dict[str, int]:
        return {pid: i for i, pid in enumerate(self.ids)}

    def index(self, project_id: str) -> int:
        """Position of a project.

        Parameters
        ----------
        project_id : str
            Project id.

        Returns
        -------
        int
            Index into ``projects``.

        Raises
        ------
        ValueError
            If there is no such project.
        """
        try:
            return self._positions[project_id]
        except KeyError:
            raise ValueError(f"{project_id!r} is not a project of this problem") from None

    def project(self, project_id: str) -> Project:
        """A project by id.

        Parameters
        ----------
        project_id : str
            Project id.

        Returns
        -------
        Project
            The project.

        Raises
        ------
        ValueError
            If there is no such project.
        """
        return self.projects[self.index(project_id)]

    def validate(self) -> None:
        """Raise ``ValueError`` for malformed data (not for infeasible requests).

        Raises
        ------
        ValueError
            If the horizon is empty, the objective is unknown, ids repeat or are unknown,
            per-year tuples have the wrong length, or a setting needs another one.
        """
        n = self.n_years
        if n < 1:
            raise ValueError("the horizon needs at least one year (budget_usd is empty)")
        if self.objective not in OBJECTIVES:
            raise ValueError(f"unknown objective {self.objective!r}; choose one of {OBJECTIVES}")
        ids = self.ids
        if len(set(ids)) != len(ids):
            raise ValueError("project ids must be unique")
        for p in self.projects:
            for name in ("cost_usd", "value_usd", "emissions_kg", "savings_usd", "undone_penalty_usd"):
                values = getattr(p, name)
                if values and len(values) != n:
                    raise ValueError(f"{p.id}.{name} has {len(values)} values, expected {n}")
            if len(p.cost_usd) != n:
                raise ValueError(f"{p.id}.cost_usd has {len(p.cost_usd)} values, expected {n}")
        known = set(ids)
        refs: list[str] = []
        for r in self.prerequisites:
            refs += [r.project, *r.requires_any]
        for g in self.exclusive_groups:
            refs += list(g.members)
        for ig in self.incentive_groups:
            refs += [k for k, _ in ig.rates]
        for tg in self.targets:
            refs += list(tg.project_ids)
        for fu in self.followups:
            refs += [fu.project, *fu.after]
        for it in self.interactions:
            refs += [it.a, it.b]
            if len(it.value_usd) != n:
                raise ValueError(f"interaction {it.a}+{it.b} has {len(it.value_usd)} values, expected {n}")
        if self.objective_project is not None:
            refs.append(self.objective_project)
        unknown = sorted(set(refs) - known)
        if unknown:
            raise ValueError(f"unknown project ids referenced: {unknown}")
        if self.objective == "earliest_gas_closure" and self.objective_project is None:
            raise ValueError("objective earliest_gas_closure needs objective_project")
        if self.loan_limit_usd > 0 and self.loan_term_years < 1:
            raise ValueError("loan_term_years must be >= 1")
        n_s = self.n_scenarios
        if self.objective == "min_cost_cvar" and n_s == 0:
            raise ValueError("objective min_cost_cvar needs scenario_base_usd (one per scenario)")
        if not 0 < self.risk_tail <= 1 or self.risk_weight < 0:
            raise ValueError("risk_tail must be in (0, 1] and risk_weight >= 0")
        for p in self.projects:
            if p.scenario_value_usd and (len(p.scenario_value_usd) != n_s
                                         or any(len(v) != n for v in p.scenario_value_usd)):
                raise ValueError(f"{p.id}.scenario_value_usd must be {n_s} x {n} values")

    def replace(self, **changes: object) -> Problem:
        """A copy with fields changed (``dataclasses.replace``).

        Parameters
        ----------
        **changes : object
            New field values.

        Returns
        -------
        Problem
            The validated copy.

        Raises
        ------
        ValueError
            If the copy is malformed.
        """
        return dataclasses.replace(self, **changes)  # type: ignore[arg-type]

    def with_project(self, project_id: str, **changes: object) -> Problem:
        """A copy with one project's fields changed, e.g. ``with_project("hpwh",
        pinned_year=2026, pin_reason="it failed: replaced now")`` for "what if X fails now".

        Parameters
        ----------
        project_id : str
            Project id.
        **changes : object
            New field values of the project.

        Returns
        -------
        Problem
            The validated copy.

        Raises
        ------
        ValueError
            If there is no such project or the copy is malformed.
        """
        i = self.index(project_id)
        projects = list(self.projects)
        projects[i] = dataclasses.replace(projects[i], **changes)  # type: ignore[arg-type]
        return self.replace(projects=tuple(projects))

    def with_extra_budget(self, extra_usd_per_year: float) -> Problem:
        """A copy with the same extra money added to every year's budget.

        Parameters
        ----------
        extra_usd_per_year : float
            Extra budget, USD per year.

        Returns
        -------
        Problem
            The copy.
        """
        return self.replace(budget_usd=tuple(b + extra_usd_per_year for b in self.budget_usd))

    # -- arrays --------------------------------------------------------------------------
    def matrix(self, name: str) -> np.ndarray:
        """``[P, T]`` array of a per-year project field (zeros where empty).

        Parameters
        ----------
        name : str
            Per-year field of :class:`Project`, e.g. ``cost_usd``.

        Returns
        -------
        numpy.ndarray
            Values in the field's unit (USD, kg or fraction), shape ``[P, T]``.
        """
        out = np.zeros((len(self.projects), self.n_years))
        for i, p in enumerate(self.projects):
            values = getattr(p, name)
            if values:
                out[i] = values
        return out

    def scenario_values(self) -> np.ndarray:
        """``[S, P, T]`` array of each project's value in each scenario (``value_usd`` where a
        project has no scenario values).

        Returns
        -------
        numpy.ndarray
            Present values, USD, shape ``[S, P, T]``.
        """
        base = self.matrix("value_usd")
        out = np.repeat(base[None, :, :], self.n_scenarios, axis=0)
        for i, p in enumerate(self.projects):
            if p.scenario_value_usd:
                out[:, i, :] = np.asarray(p.scenario_value_usd)
        return out

    def discount_factors(self, extra_years: int = 0) -> np.ndarray:
        """Discount factors ``(1 + discount_rate) ** -t`` from t = 0.

        Parameters
        ----------
        extra_years : int
            Years beyond the horizon to include.

        Returns
        -------
        numpy.ndarray
            Factors, dimensionless (``T + extra_years`` values).
        """
        t = np.arange(self.n_years + extra_years, dtype=float)
        return (1.0 + self.discount_rate) ** -t

    def annuity_factor(self) -> float:
        """Yearly repayment per dollar borrowed (``a = r / (1 - (1 + r)^-n)``, ``1/n`` at r=0).

        Returns
        -------
        float
            Repayment, USD per year per USD borrowed.
        """
        r, n = self.loan_rate, max(self.loan_term_years, 1)
        return 1.0 / n if r == 0 else r / (1.0 - (1.0 + r) ** -n)

    def loan_npv_cost_per_usd(self) -> np.ndarray:
        """``df[t] * K`` per dollar borrowed in year t (see module docstring), length T.

        Returns
        -------
        numpy.ndarray
            NPV cost, USD per USD borrowed (T values).
        """
        a, n = self.annuity_factor(), self.loan_term_years
        k = sum(a * (1.0 + self.discount_rate) ** -j for j in range(1, n + 1)) - 1.0
        return self.discount_factors() * max(k, 0.0)

    def loan_interest_per_usd(self) -> float:
        """Nominal interest paid per dollar borrowed (``n a - 1``).

        Returns
        -------
        float
            Interest, USD per USD borrowed.
        """
        return self.loan_term_years * self.annuity_factor() - 1.0

    def allowed_years(self, i: int) -> tuple[int, ...]:
        """Year indices project i may be done in (windows, pins, exclusions, targets).

        Parameters
        ----------
        i : int
            Project index.

        Returns
        -------
        tuple of int
            Year indices (0 = ``first_year``).
        """
        p = self.projects[i]
        if p.excluded:
            return ()
        lo, hi = 0, self.n_years - 1
        if p.earliest_year is not None:
            lo = max(lo, p.earliest_year - self.first_year)
        if p.latest_year is not None:
            hi = min(hi, p.latest_year - self.first_year)
        for tg in self.targets:
            if p.id in tg.project_ids:
                hi = min(hi, tg.by_year - self.first_year)
        if p.pinned_year is not None:
            t = p.pinned_year - self.first_year
            return (t,) if lo <= t <= hi else ()
        return tuple(range(lo, hi + 1))

    def must_do(self, i: int) -> bool:
        """Whether project i must be done (mandatory, pinned, in a target, or the objective
        project of ``earliest_gas_closure``).

        Parameters
        ----------
        i : int
            Project index.

        Returns
        -------
        bool
            True if the project must be done.
        """
        p = self.projects[i]
        if p.mandatory or p.pinned_year is not None:
            return True
        if self.objective == "earliest_gas_closure" and p.id == self.objective_project:
            return True
        return any(p.id in tg.project_ids for tg in self.targets)


@dataclass(frozen=True)
class Evaluation:
    """Exact evaluation of one placement. ``violations`` names each violated constraint family
    (empty = feasible). ``loans_usd`` is the just-in-time borrowing per year.

    Attributes
    ----------
    years : dict of str to int or None
        Calendar year per project id (None = not done).
    violations : tuple of str
        Violated constraint families.
    npv_usd : float
        Net present value, USD.
    emissions_saved_kg : float
        Lifetime CO2e saved, kg.
    out_of_pocket_usd : float
        Nominal out-of-pocket cost within the horizon, USD.
    objective_value : float
        Objective in its natural unit (USD, kg or calendar year).
    loans_usd : tuple of float
        Borrowing per year, USD.
    incentives_usd : dict of str to tuple of float
        Capped incentive earned per group and year, USD.
    money_left_usd : tuple of float
        Money left after each year, USD.
    risk_cost_usd : float or None
        Expected cost plus ``risk_weight`` times its CVaR over the scenarios, USD (None: the
        problem has no scenarios).
    """

    years: dict[str, int | None]
    violations: tuple[str, ...]
    npv_usd: float
    emissions_saved_kg: float
    out_of_pocket_usd: float
    objective_value: float
    loans_usd: tuple[float, ...] = ()
    incentives_usd: dict[str, tuple[float, ...]] = field(default_factory=dict)
    money_left_usd: tuple[float, ...] = ()
    risk_cost_usd: float | None = None

    @property
    def feasible(self) -> bool:
        """True if no constraint family is violated."""
        return not self.violations


FAMILIES = (
    "window",
    "pin",
    "exclusion",
    "mandatory",
    "budget",
    "prerequisite",
    "exclusive",
    "capacity",
    "spaces",
    "max_per_year",
    "target",
    "followup",
    "objective_project",
)


def evaluate_batch(problem: Problem, placements: np.ndarray) -> dict[str, np.ndarray]:
    """Evaluate ``N`` placements at once. ``placements`` is ``[N, P]`` of year indices (-1 = not
    done). Returns arrays of length N: one boolean per constraint family in :data:`FAMILIES`
    (True = violated), ``feasible``, ``npv_usd``, ``emissions_kg``, ``out_of_pocket_usd``,
    ``year_index`` (of ``objective_project``, or -1), ``loans_usd`` ``[N, T]``,
    ``money_left_usd`` ``[N, T]`` (carry after each year, or unspent money without carryover)
    and ``incentives_usd`` ``[N, G, T]``; with scenarios also ``scenario_cost_usd`` ``[N, S]``
    (``loss_s``) and ``risk_cost_usd`` (expected loss + ``risk_weight`` x CVaR).

    Parameters
    ----------
    problem : Problem
        The problem.
    placements : numpy.ndarray
        Year index per project, ``[N, P]`` (or ``[P]`` for one placement); -1 = not done.

    Returns
    -------
    dict of str to numpy.ndarray
        The arrays named above: money in USD, emissions in kg, years as indices.
    """
    pr = problem
    y = np.asarray(placements, dtype=np.int64)
    if y.ndim == 1:
        y = y[None, :]
    n, np_ = y.shape
    nt = pr.n_years
    t_idx = np.arange(nt)
    x = (y[:, :, None] == t_idx[None, None, :]).astype(float)  # [N,P,T]
    done_by = ((y[:, :, None] >= 0) & (y[:, :, None] <= t_idx[None, None, :])).astype(float)
    done = y >= 0
    cost = pr.matrix("cost_usd")
    scale = 1.0 + float(np.abs(cost).sum()) + float(np.abs(pr.budget_usd).sum())
    tol = TOL_USD * scale
    out: dict[str, np.ndarray] = {}

    # windows, pins, exclusions, mandatory
    win = np.zeros(n, bool)
    pin = np.zeros(n, bool)
    exc = np.zeros(n, bool)
    man = np.zeros(n, bool)
    for i, p in enumerate(pr.projects):
        yi = y[:, i]
        lo = (p.earliest_year - pr.first_year) if p.earliest_year is not None else 0
        hi = (p.latest_year - pr.first_year) if p.latest_year is not None else nt - 1
        hi = min(hi, nt - 1)
        win |= done[:, i] & ((yi < lo) | (yi > hi))
        win |= yi >= nt
        if p.pinned_year is not None:
            pin |= yi != p.pinned_year - pr.first_year
        if p.excluded:
            exc |= done[:, i]
        if p.mandatory:
            man |= ~done[:, i]
    out.update(window=win, pin=pin, exclusion=exc, mandatory=man)

    # capped incentives
    groups = pr.incentive_groups
    earned = np.zeros((n, len(groups), nt))
    for g, ig in enumerate(groups):
        base = np.zeros((n, nt))
        for pid, rate in ig.rates:
            i = pr.index(pid)
            base += rate * cost[i][None, :] * x[:, i, :]
        caps = np.array([ig.cap_in(pr.first_year + t) for t in range(nt)])
        earned[:, g, :] = np.minimum(base, caps[None, :])
    out["incentives_usd"] = earned

    # money in and budget with just-in-time loans
    spend = np.einsum("npt,pt->nt", x, cost)
    savings = pr.matrix("savings_usd")
    done_before = np.concatenate([np.zeros((n, np_, 1)), done_by[:, :, :-1]], axis=2)
    savings_in = np.einsum("npt,pt->nt", done_before, savings)
    money_in = np.tile(np.asarray(pr.budget_usd), (n, 1))
    if pr.savings_to_budget:
        money_in = money_in + savings_in
    for g, ig in enumerate(groups):
        if ig.adds_to_budget:
            lag = ig.arrives_after_years
            if lag < nt:
                money_in[:, lag:] += earned[:, g, : nt - lag]
    a = pr.annuity_factor()
    repay = np.zeros((n, nt + pr.loan_term_years + 1))
    loans = np.zeros((n, nt))
    left = np.zeros((n, nt))
    carry = np.zeros(n)
    for t in range(nt):
        avail = money_in[:, t] - repay[:, t] + (carry if pr.carryover else 0.0)
        short = spend[:, t] - avail
        borrow = np.where(short > tol, short, 0.0)
        loans[:, t] = borrow
        for k in range(1, pr.loan_term_years + 1):
            repay[:, t + k] += a * borrow
        left[:, t] = avail + borrow - spend[:, t]
        carry = left[:, t]
    out["budget"] = loans.sum(axis=1) > pr.loan_limit_usd + tol
    out["loans_usd"] = loans
    out["money_left_usd"] = left

    # prerequisites and any-of groups
    pre = np.zeros(n, bool)
    for r in pr.prerequisites:
        ia = pr.index(r.project)
        ya = y[:, ia]
        ok = np.zeros(n, bool)
        for b in r.requires_any:
            yb = y[:, pr.index(b)]
            ok |= (yb >= 0) & ((yb < ya) if r.strict else (yb <= ya))
        pre |= (ya >= 0) & ~ok
    out["prerequisite"] = pre

    # exclusive groups
    ex = np.zeros(n, bool)
    for gx in pr.exclusive_groups:
        count = sum(done[:, pr.index(m)].astype(int) for m in gx.members)
        ex |= (count != 1) if gx.exactly_one else (count > 1)
    out["exclusive"] = ex

    # capacity
    if pr.capacity_base is not None:
        net = np.array([p.capacity_use - p.capacity_provided for p in pr.projects])
        used = np.einsum("npt,p->nt", done_by, net)
        cap_tol = 1e-9 * (1.0 + abs(pr.capacity_base) + float(np.abs(net).sum()))
        out["capacity"] = (used > pr.capacity_base + cap_tol).any(axis=1)
    else:
        out["capacity"] = np.zeros(n, bool)

    # breaker spaces, the same way
    if pr.spaces_base is not None:
        net = np.array([p.spaces_use - p.spaces_provided for p in pr.projects])
        used = np.einsum("npt,p->nt", done_by, net)
        out["spaces"] = (used > pr.spaces_base + 1e-9).any(axis=1)
    else:
        out["spaces"] = np.zeros(n, bool)

    # max per year
    if pr.max_per_year is not None:
        out["max_per_year"] = (x.sum(axis=1) > pr.max_per_year).any(axis=1)
    else:
        out["max_per_year"] = np.zeros(n, bool)

    # targets
    tg_bad = np.zeros(n, bool)
    for tg in pr.targets:
        by = tg.by_year - pr.first_year
        for pid in tg.project_ids:
            yi = y[:, pr.index(pid)]
            tg_bad |= (yi < 0) | (yi > by)
    out["target"] = tg_bad

    # follow-ups: once every "after" project is done by t, the project is done by t + within
    fu_bad = np.zeros(n, bool)
    for fu in pr.followups:
        last = np.max(np.stack([np.where(y[:, pr.index(a)] < 0, nt, y[:, pr.index(a)])
                                for a in fu.after]), axis=0)
        yp = y[:, pr.index(fu.project)]
        due = last + fu.within_years
        fu_bad |= (last < nt) & (due < nt) & ((yp < 0) | (yp > due))
    out["followup"] = fu_bad

    # objective project
    if pr.objective_project is not None:
        yo = y[:, pr.index(pr.objective_project)]
        out["year_index"] = yo
        out["objective_project"] = (yo < 0) if pr.objective == "earliest_gas_closure" else np.zeros(n, bool)
    else:
        out["year_index"] = np.full(n, -1)
        out["objective_project"] = np.zeros(n, bool)

    feasible = np.ones(n, bool)
    for fam in FAMILIES:
        feasible &= ~out[fam]
    out["feasible"] = feasible

    # objective values
    max_lag = max((ig.arrives_after_years for ig in groups), default=0)
    df = pr.discount_factors(extra_years=max_lag + 1)
    dfh = df[:nt]
    value = pr.matrix("value_usd")
    pen = pr.matrix("undone_penalty_usd")
    npv = np.einsum("npt,pt->n", x, value - cost * dfh[None, :])
    npv -= np.einsum("npt,pt->n", 1.0 - done_by, pen * dfh[None, :])
    for g, ig in enumerate(groups):
        lag = ig.arrives_after_years
        npv += earned[:, g, :] @ df[lag : lag + nt]
    npv -= loans @ pr.loan_npv_cost_per_usd()
    for it in pr.interactions:
        both = done_by[:, pr.index(it.a), :] * done_by[:, pr.index(it.b), :]
        npv += both @ np.asarray(it.value_usd)
    out["npv_usd"] = npv
    if pr.n_scenarios:
        spread = pr.scenario_values() - value[None, :, :]  # [S,P,T]
        npv_s = npv[:, None] + np.einsum("npt,spt->ns", x, spread)
        loss = np.asarray(pr.scenario_base_usd)[None, :] - npv_s
        out["scenario_cost_usd"] = loss
        out["risk_cost_usd"] = loss.mean(axis=1) + pr.risk_weight * _cvar(loss, pr.risk_tail)
    out["emissions_kg"] = np.einsum("npt,pt->n", x, pr.matrix("emissions_kg"))
    oop = spend.sum(axis=1) + np.einsum("npt,pt->n", 1.0 - done_by, pen)
    oop += loans.sum(axis=1) * pr.loan_interest_per_usd()
    oop -= earned.sum(axis=(1, 2))
    oop -= savings_in.sum(axis=1)
    out["out_of_pocket_usd"] = oop
    return out


def _cvar(losses: np.ndarray, tail: float) -> np.ndarray:
    """Mean of the worst ``tail`` share of equally likely losses (last axis): the ``floor(k)``
    largest count fully, the next by ``k - floor(k)``, over ``k = tail S`` (Rockafellar & Uryasev
    2000, the minimum over eta of ``eta + sum (L - eta)^+ / k``)."""
    s = losses.shape[-1]
    k = tail * s
    whole = int(np.floor(k + 1e-9))
    worst = -np.sort(-losses, axis=-1)
    total = worst[..., :whole].sum(axis=-1)
    if whole < s and k - whole > 1e-9:
        total = total + (k - whole) * worst[..., whole]
    return total / k


def objective_of(problem: Problem, ev: Mapping[str, np.ndarray]) -> np.ndarray:
    """The objective value in its natural sense: NPV USD (higher is better), kg saved (higher),
    calendar year of ``objective_project`` (lower), out-of-pocket USD (lower), risk-aware cost
    USD (lower).

    Parameters
    ----------
    problem : Problem
        The problem.
    ev : mapping of str to numpy.ndarray
        Result of :func:`evaluate_batch`.

    Returns
    -------
    numpy.ndarray
        Objective value of each placement (USD, kg or calendar year).
    """
    obj = problem.objective
    if obj == "max_npv":
        return ev["npv_usd"]
    if obj == "min_emissions":
        return ev["emissions_kg"]
    if obj == "min_out_of_pocket":
        return ev["out_of_pocket_usd"]
    if obj == "min_cost_cvar":
        return ev["risk_cost_usd"]
    return ev["year_index"].astype(float) + problem.first_year


def placement_of(problem: Problem, years: Mapping[str, int | None]) -> np.ndarray:
    """Calendar years by project id -> ``[P]`` array of year indices (-1 = not done).

    Parameters
    ----------
    problem : Problem
        The problem.
    years : mapping of str to int or None
        Calendar year per project id (None or missing = not done).

    Returns
    -------
    numpy.ndarray
        Year index per project, int64.
    """
    return np.array(
        [
            -1 if years.get(pid) is None else int(years[pid]) - problem.first_year  # type: ignore[operator]
            for pid in problem.ids
        ],
        dtype=np.int64,
    )


def evaluate(problem: Problem, years: Mapping[str, int | None]) -> Evaluation:
    """Evaluate one placement given as calendar year (or None) per project id.

    Parameters
    ----------
    problem : Problem
        The problem.
    years : mapping of str to int or None
        Calendar year per project id (None or missing = not done).

    Returns
    -------
    Evaluation
        Violations and objective values (USD, kg).
    """
    ev = evaluate_batch(problem, placement_of(problem, years)[None, :])
    violations = tuple(f for f in FAMILIES if ev[f][0])
    return Evaluation(
        years={pid: years.get(pid) for pid in problem.ids},
        violations=violations,
        npv_usd=float(ev["npv_usd"][0]),
        emissions_saved_kg=float(ev["emissions_kg"][0]),
        out_of_pocket_usd=float(ev["out_of_pocket_usd"][0]),
        objective_value=float(objective_of(problem, ev)[0]),
        loans_usd=tuple(float(v) for v in ev["loans_usd"][0]),
        incentives_usd={
            ig.id: tuple(float(v) for v in ev["incentives_usd"][0, g])
            for g, ig in enumerate(problem.incentive_groups)
        },
        money_left_usd=tuple(float(v) for v in ev["money_left_usd"][0]),
        risk_cost_usd=float(ev["risk_cost_usd"][0]) if "risk_cost_usd" in ev else None,
    )


def years_from_sequence(problem: Problem, values: Sequence[int | None]) -> dict[str, int | None]:
    """Helper: list of calendar years (or None) in project order -> dict by id.

    Parameters
    ----------
    problem : Problem
        The problem.
    values : sequence of int or None
        Calendar year of each project, in project order.

    Returns
    -------
    dict of str to int or None
        Calendar year per project id.

    Raises
    ------
    ValueError
        If there are not exactly as many values as projects.
    """
    return dict(zip(problem.ids, values, strict=True))
