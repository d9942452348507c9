"""Incentive programs as data, and what they pay for a set of purchases.

A program is a plain record (parsed from a dict such as one loaded from YAML) - never code.
:func:`parse_program` / :func:`parse_catalog` validate records and raise
:class:`IncentiveDataError` naming the program, the field and how to fix it.
:func:`evaluate` applies every program to every purchase and returns, per purchase and
program, the amount, when the cash arrives, the caps used and plain-words notes.

Rules applied by :func:`evaluate`, in order, for each purchase and each program covering its kind
--------------------------------------------------------------------------------------------------
1. Eligibility window: the purchase's installed date (``window_basis: placed_in_service``) or
   paid date (``window_basis: paid``) must fall between ``starts`` and ``ends`` (inclusive).
2. Income tiers: if the program has tiers, the household's % of area median income (AMI)
   picks the tier; its rate and caps replace the program's. No tier -> not eligible.
3. Conditions: ``no_fuel_switching``, ``min_panel_amps`` (panel/service upgrades),
   ``min_battery_kwh`` (batteries), ``requires_same_year`` (kind -> kinds that must be
   installed in the same tax year, e.g. a panel upgrade with a heat pump).
4. Stacking: a program with a ``grant_family`` pays nothing for a purchase another program of
   the same family already pays for (earlier programs in the list win). Rebates and
   performance payments are applied before tax credits; a credit's cost basis is the cost
   minus the rebates flagged ``reduces_credit_basis``.
5. Amount: ``rate_pct`` of the basis (or ``rate_usd_per_unit`` x size for performance
   payments, optionally limited to ``rate_pct`` of cost), then the per-item cap, the yearly
   group caps and their sub-caps (reset each tax year), the household lifetime cap, and never
   more than what is still unpaid on the purchase.
6. Tax credits: limited by the household's tax liability each year (non-carryforward credits
   first, then carried credits oldest first, then new carryforward credits); unused
   carryforward credit moves to the next tax year, unused nonrefundable credit is lost.
   Credits arrive on ``credit_paid_on`` (month-day, default 04-15) of the following year.
   Point-of-sale rebates arrive on the paid date; rebates paid later and performance payments
   ``paid_after_days`` after it.

References
----------
26 USC 25C (energy efficient home improvement credit, as amended by Pub. L. 117-169 s.13301):
    30 %, yearly caps that reset each tax year, $600 panel sub-cap, nonrefundable.
26 USC 25D (residential clean energy credit): 30 %, carryforward of unused credit (25D(c)).
26 USC 26(a): nonrefundable personal credits are limited by tax liability.
26 USC 6072(a): individual returns are due the 15th day of the 4th month after the tax year
    (hence "the following spring", default 04-15).
42 USC 18795a (IRA s.50122 high-efficiency electric home rebates): per-item caps, household
    cap, income tiers by % of AMI.
IRS Notice 2013-70 / IRS FAQ on energy credits (from memory): rebates and subsidies reduce the
    cost basis on which a credit is computed.
Pub. L. 119-21 (2025): 25C/25D end after 2025-12-31.
"""

from __future__ import annotations

import datetime as dt
import math
import re
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from types import MappingProxyType
from typing import Any

__all__ = [
    "CREDIT_KINDS",
    "KIND_ALIASES",
    "PANEL_KINDS",
    "PERFORMANCE_KINDS",
    "PROGRAM_KINDS",
    "PROJECT_KINDS",
    "TAX_LEVELS",
    "WINDOW_BASES",
    "Award",
    "CapGroup",
    "CapUse",
    "Conditions",
    "Household",
    "IncentiveDataError",
    "IncentiveResult",
    "IncomeTier",
    "Payment",
    "Program",
    "ProgramTotal",
    "Purchase",
    "YearIncentive",
    "describe_caps",
    "evaluate",
    "incentives_by_install_year",
    "parse_catalog",
    "parse_program",
    "program_totals",
    "read_catalog",
]

PROJECT_KINDS: frozenset[str] = frozenset(
    {
        "heat_pump",
        "heat_pump_water_heater",
        "induction_range",
        "heat_pump_dryer",
        "panel_upgrade",
        "service_upgrade",
        "wiring",
        "load_management",
        "ev_charger",
        "ev",
        "solar",
        "battery",
        "envelope",
        "energy_audit",
        "roof",
        "close_gas",
        "remove_propane_tank",
        "remove_oil_tank",
        "windows",
        "exterior_door",
        "central_ac",
    }
)
"""Project kinds a program may cover: the upgrade ids of ``homeplan/data/upgrades.yaml`` plus
``wiring`` and ``energy_audit`` (items some programs pay for separately) and ``windows``,
``exterior_door`` (one purchase per door) and ``central_ac``, which the planner does not propose
but a household's own purchases may include (26 USC 25C caps them on their own)."""

KIND_ALIASES: Mapping[str, str] = MappingProxyType({"gas_closure": "close_gas"})
"""Other names accepted in catalogs and purchases, mapped to the project kind."""

PROJECT_KINDS = PROJECT_KINDS | frozenset(KIND_ALIASES)

PROGRAM_KINDS: tuple[str, ...] = (
    "point_of_sale_rebate",
    "rebate_later",
    "tax_credit",
    "tax_credit_carryforward",
    "performance_per_kw",
    "performance_per_kwh",
)
CREDIT_KINDS: frozenset[str] = frozenset({"tax_credit", "tax_credit_carryforward"})
PERFORMANCE_KINDS: frozenset[str] = frozenset({"performance_per_kw", "performance_per_kwh"})
WINDOW_BASES: tuple[str, ...] = ("placed_in_service", "paid")
TAX_LEVELS: tuple[str, ...] = ("federal", "state")
PANEL_KINDS: frozenset[str] = frozenset({"panel_upgrade", "service_upgrade"})


class IncentiveDataError(ValueError):
    """An incentive program record is invalid.

    Attributes ``program_id`` and ``field`` (a dotted path such as ``tiers[1].ami_min_pct``),
    ``index`` (position of the record in the catalog list, set by :func:`parse_catalog`) and
    :attr:`keys` let a loader point at the line and column of the offending value.

    Parameters
    ----------
    program_id : str
        Id of the program at fault (``?`` when it has none).
    field_path : str
        Dotted path of the field, e.g. ``tiers[1].ami_min_pct``.
    problem : str
        What is wrong.
    fix : str
        How to fix it.
    index : int or None
        Position of the record in the catalog list.
    """

    def __init__(
        self, program_id: str, field_path: str, problem: str, fix: str, index: int | None = None
    ) -> None:
        self.program_id = program_id
        self.field = field_path
        self.problem = problem
        self.fix = fix
        self.index = index
        super().__init__(
            f"incentive program '{program_id}', field '{field_path}': {problem}. Fix: {fix}."
        )

    @property
    def keys(self) -> tuple[str | int, ...]:
        """Key path inside the catalog list: (index, "tiers", 1, "ami_min_pct")."""
        parts: list[str | int] = [] if self.index is None else [self.index]
        for token in re.findall(r"[^.\[\]]+|\[\d+\]", self.field):
            parts.append(int(token[1:-1]) if token.startswith("[") else token)
        return tuple(parts)


# --------------------------------------------------------------------------- records


@dataclass(frozen=True)
class CapGroup:
    """A yearly aggregate cap shared by several kinds, reset each tax year.

    ``sub_caps_usd`` holds (kind, cap) pairs: a yearly cap for one kind inside the group
    (26 USC 25C(b)(2)(C): $600 for a panel inside the $1,200 group).

    Attributes
    ----------
    name : str
        Name of the group.
    kinds : frozenset of str
        Project kinds sharing the cap.
    cap_usd : float
        Cap, USD per tax year.
    sub_caps_usd : tuple of (str, float)
        Caps of single kinds inside the group, USD per tax year.
    """

    name: str
    kinds: frozenset[str]
    cap_usd: float
    sub_caps_usd: tuple[tuple[str, float], ...] = ()

    def sub_cap_usd(self, kind: str) -> float | None:
        """The group's yearly sub-cap of one kind.

        Parameters
        ----------
        kind : str
            Project kind.

        Returns
        -------
        float or None
            Sub-cap, USD per tax year; None when the kind has none.
        """
        for k, cap in self.sub_caps_usd:
            if k == kind:
                return cap
        return None


@dataclass(frozen=True)
class IncomeTier:
    """An income tier by % of area median income: [ami_min_pct, ami_max_pct).

    ``includes_max`` makes the upper bound inclusive (42 USC 18795a: "not more than 150
    percent"). ``None`` fields inherit the program's values.

    Attributes
    ----------
    ami_min_pct : float
        Lower bound, percent of area median income.
    ami_max_pct : float or None
        Upper bound, percent of area median income; None = no upper bound.
    rate_pct : float or None
        Share of the cost paid, percent.
    includes_max : bool
        True if the upper bound is inclusive.
    per_item_cap_usd : float or None
        Cap per purchase, USD.
    per_kind_caps_usd : tuple of (str, float) or None
        Cap per purchase by project kind, USD.
    lifetime_cap_usd : float or None
        Household lifetime cap, USD.
    """

    ami_min_pct: float
    ami_max_pct: float | None
    rate_pct: float | None = None
    includes_max: bool = False
    per_item_cap_usd: float | None = None
    per_kind_caps_usd: tuple[tuple[str, float], ...] | None = None
    lifetime_cap_usd: float | None = None

    def contains(self, ami_pct: float) -> bool:
        """Whether a household income falls in this tier.

        Parameters
        ----------
        ami_pct : float
            Household income, percent of area median income.

        Returns
        -------
        bool
            True if the income is within the tier's bounds.
        """
        if ami_pct < self.ami_min_pct:
            return False
        if self.ami_max_pct is None:
            return True
        return ami_pct <= self.ami_max_pct if self.includes_max else ami_pct < self.ami_max_pct

    def label(self) -> str:
        """The tier in words.

        Returns
        -------
        str
            E.g. ``80 to 150 % AMI``.
        """
        if self.ami_max_pct is None:
            return f"{self.ami_min_pct:g} % AMI and above"
        return f"{self.ami_min_pct:g} to {self.ami_max_pct:g} % AMI"


@dataclass(frozen=True)
class Conditions:
    """Eligibility conditions on a purchase (None / False = no condition).

    Attributes
    ----------
    min_panel_amps : float or None
        Smallest panel rating accepted for panel and service upgrades, A.
    min_battery_kwh : float or None
        Smallest battery accepted, kWh.
    no_fuel_switching : bool
        True if purchases that replace a fossil-fuel appliance are excluded.
    requires_same_year : tuple of (str, frozenset of str)
        Kind -> kinds one of which must be installed in the same tax year.
    """

    min_panel_amps: float | None = None
    min_battery_kwh: float | None = None
    no_fuel_switching: bool = False
    requires_same_year: tuple[tuple[str, frozenset[str]], ...] = ()

    def required_with(self, kind: str) -> frozenset[str] | None:
        """Kinds that must be installed in the same tax year as ``kind``.

        Parameters
        ----------
        kind : str
            Project kind.

        Returns
        -------
        frozenset of str or None
            The partner kinds; None when ``kind`` has no such condition.
        """
        for k, others in self.requires_same_year:
            if k == kind:
                return others
        return None


@dataclass(frozen=True)
class Program:
    """One incentive program, as data. See the module docstring for how fields are applied.

    Attributes
    ----------
    id : str
        Short unique id.
    name : str
        Program name.
    administrator : str
        Who runs the program.
    kind : str
        One of :data:`PROGRAM_KINDS`.
    kinds : frozenset of str
        Project kinds covered.
    rate_pct : float or None
        Share of the cost paid, percent.
    rate_usd_per_unit : float or None
        Performance payment, USD per kW or USD per kWh.
    per_item_cap_usd : float or None
        Cap per purchase, USD.
    per_kind_caps_usd : tuple of (str, float)
        Cap per purchase by project kind, USD.
    yearly_caps : tuple of CapGroup
        Caps shared by several kinds, USD per tax year.
    lifetime_cap_usd : float or None
        Household lifetime cap, USD.
    tiers : tuple of IncomeTier
        Income tiers by percent of area median income.
    starts : datetime.date or None
        First eligible date.
    ends : datetime.date or None
        Last eligible date.
    window_basis : str
        Date checked against the window: ``placed_in_service`` or ``paid``.
    conditions : Conditions
        Eligibility conditions.
    grant_family : str or None
        Family of programs that do not stack.
    reduces_credit_basis : bool
        True if this rebate lowers the cost basis of tax credits.
    paid_after_days : int
        Delay from payment to the rebate or performance payment, days.
    credit_paid_on : tuple of (int, int)
        Month and day a credit arrives in the year after the tax year.
    carryforward_years : int or None
        Years unused credit may be carried forward; None = no limit.
    tax_level : str
        ``federal`` or ``state``.
    source : str
        Where the program's rules come from.
    notes : str
        Free-text notes.
    """

    id: str
    name: str
    administrator: str
    kind: str
    kinds: frozenset[str]
    rate_pct: float | None = None
    rate_usd_per_unit: float | None = None
    per_item_cap_usd: float | None = None
    per_kind_caps_usd: tuple[tuple[str, float], ...] = ()
    yearly_caps: tuple[CapGroup, ...] = ()
    lifetime_cap_usd: float | None = None
    tiers: tuple[IncomeTier, ...] = ()
    starts: dt.date | None = None
    ends: dt.date | None = None
    window_basis: str = "placed_in_service"
    conditions: Conditions = field(default_factory=Conditions)
    grant_family: str | None = None
    reduces_credit_basis: bool = True
    paid_after_days: int = 0
    credit_paid_on: tuple[int, int] = (4, 15)
    carryforward_years: int | None = None
    tax_level: str = "federal"
    source: str = ""
    notes: str = ""

    @property
    def is_credit(self) -> bool:
        """True for tax credits (``tax_credit`` or ``tax_credit_carryforward``)."""
        return self.kind in CREDIT_KINDS


@dataclass(frozen=True)
class Purchase:
    """One purchase (an installed project). ``size_kw`` / ``size_kwh`` feed performance
    payments and conditions (battery capacity in kWh); ``fuel_switch`` is True when it
    replaces a fossil-fuel appliance.

    Attributes
    ----------
    project_id : str
        Id of the project.
    kind : str
        Project kind (aliases in :data:`KIND_ALIASES` are mapped to their kind).
    cost_usd : float
        Cost, USD.
    installed_on : datetime.date
        Date placed in service.
    paid_on : datetime.date or None
        Date paid; None = ``installed_on``.
    panel_amps : float or None
        Panel rating of a panel or service upgrade, A.
    size_kw : float or None
        Size, kW.
    size_kwh : float or None
        Size (battery capacity), kWh.
    fuel_switch : bool
        True if it replaces a fossil-fuel appliance.

    Raises
    ------
    ValueError
        If ``cost_usd`` is negative, or ``kind`` is not one of :data:`PROJECT_KINDS` (an unknown
        kind is an error, never a silent $0).
    """

    project_id: str
    kind: str
    cost_usd: float
    installed_on: dt.date
    paid_on: dt.date | None = None
    panel_amps: float | None = None
    size_kw: float | None = None
    size_kwh: float | None = None
    fuel_switch: bool = False

    def __post_init__(self) -> None:
        object.__setattr__(self, "kind", KIND_ALIASES.get(self.kind, self.kind))
        if self.kind not in PROJECT_KINDS:
            raise ValueError(f"purchase {self.project_id!r}: unknown project kind {self.kind!r} "
                             f"(no program can pay for it; use one of: "
                             f"{', '.join(sorted(PROJECT_KINDS))})")
        if self.cost_usd < 0:
            raise ValueError(f"purchase {self.project_id!r}: cost_usd cannot be negative")

    @property
    def paid_date(self) -> dt.date:
        """Date paid: ``paid_on``, or ``installed_on`` when not given."""
        return self.paid_on or self.installed_on


@dataclass(frozen=True)
class Household:
    """Household facts used by incentives.

    ``tax_liability_usd`` / ``state_tax_liability_usd``: yearly federal / state income tax
    before credits (None = no limit); ``*_by_year_usd``: overrides by tax year;
    ``prior_use_usd``: amounts already received from programs with lifetime caps, by program id.

    Attributes
    ----------
    ami_pct : float or None
        Household income, percent of area median income.
    tax_liability_usd : float or None
        Federal income tax before credits, USD per tax year.
    state_tax_liability_usd : float or None
        State income tax before credits, USD per tax year.
    tax_liability_by_year_usd : mapping of int to float
        Federal liability by tax year, USD.
    state_tax_liability_by_year_usd : mapping of int to float
        State liability by tax year, USD.
    prior_use_usd : mapping of str to float
        Amounts already received by program id, USD.
    """

    ami_pct: float | None = None
    tax_liability_usd: float | None = None
    state_tax_liability_usd: float | None = None
    tax_liability_by_year_usd: Mapping[int, float] = field(default_factory=dict)
    state_tax_liability_by_year_usd: Mapping[int, float] = field(default_factory=dict)
    prior_use_usd: Mapping[str, float] = field(default_factory=dict)

    def liability_usd(self, year: int, level: str = "federal") -> float | None:
        """Income tax liability before credits in one tax year.

        Parameters
        ----------
        year : int
            Tax year.
        level : str
            ``federal`` or ``state``.

        Returns
        -------
        float or None
            Liability, USD; None = no limit.
        """
        if level == "state":
            return self.state_tax_liability_by_year_usd.get(year, self.state_tax_liability_usd)
        return self.tax_liability_by_year_usd.get(year, self.tax_liability_usd)


@dataclass(frozen=True)
class Payment:
    """One payment of incentive cash.

    Attributes
    ----------
    on : datetime.date
        Date the cash arrives.
    amount_usd : float
        Amount, USD.
    """

    on: dt.date
    amount_usd: float


@dataclass(frozen=True)
class Award:
    """What one program gives for one purchase.

    ``earned_usd`` is after rates, caps and stacking; ``paid_usd`` is what actually arrives
    (after the tax-liability limit, summed over ``payments``); ``lost_usd`` is earned credit
    that can never be used; ``carried_unused_usd`` is carryforward still unused at the end.

    Attributes
    ----------
    project_id : str
        Id of the purchase.
    program_id : str
        Id of the program.
    program_kind : str
        Kind of the program.
    tax_year : int
        Tax year of the purchase.
    basis_usd : float
        Cost basis, USD.
    earned_usd : float
        Amount earned, USD.
    paid_usd : float
        Amount that arrives, USD.
    payments : tuple of Payment
        The payments.
    lost_usd : float
        Credit that can never be used, USD.
    carried_unused_usd : float
        Carryforward still unused at the end of the horizon, USD.
    notes : tuple of str
        Reasons and caps in plain words.
    """

    project_id: str
    program_id: str
    program_kind: str
    tax_year: int
    basis_usd: float
    earned_usd: float
    paid_usd: float
    payments: tuple[Payment, ...]
    lost_usd: float = 0.0
    carried_unused_usd: float = 0.0
    notes: tuple[str, ...] = ()

    @property
    def at_point_of_sale(self) -> bool:
        """True for a point-of-sale rebate (taken off the invoice)."""
        return self.program_kind == "point_of_sale_rebate"


@dataclass(frozen=True)
class CapUse:
    """How much of one cap was used: ``tax_year`` is None for lifetime caps.

    Attributes
    ----------
    program_id : str
        Id of the program.
    cap : str
        Name of the cap.
    tax_year : int or None
        Tax year of a yearly cap.
    limit_usd : float
        The cap, USD.
    used_usd : float
        Amount used, USD.
    """

    program_id: str
    cap: str
    tax_year: int | None
    limit_usd: float
    used_usd: float


@dataclass(frozen=True)
class IncentiveResult:
    """What :func:`evaluate` found: one award per purchase and program, and the caps used.

    Attributes
    ----------
    awards : tuple of Award
        One award per (purchase, program covering its kind).
    cap_uses : tuple of CapUse
        Caps used, by program and tax year.
    """

    awards: tuple[Award, ...]
    cap_uses: tuple[CapUse, ...]

    @property
    def total_paid_usd(self) -> float:
        """Incentive cash paid over every award, USD."""
        return sum(a.paid_usd for a in self.awards)

    def for_item(self, project_id: str) -> tuple[Award, ...]:
        """The awards of one purchase.

        Parameters
        ----------
        project_id : str
            Id of the purchase.

        Returns
        -------
        tuple of Award
            Its awards, USD.
        """
        return tuple(a for a in self.awards if a.project_id == project_id)

    def point_of_sale_usd(self, project_id: str) -> float:
        """Rebates taken off the invoice: they reduce what must be paid up front.

        Parameters
        ----------
        project_id : str
            Id of the purchase.

        Returns
        -------
        float
            Point-of-sale rebates, USD.
        """
        return sum(a.paid_usd for a in self.for_item(project_id) if a.at_point_of_sale)

# --------------------------------------------------------------------------- parsing

_FIELDS = {
    "id",
    "name",
    "administrator",
    "kind",
    "kinds",
    "rate_pct",
    "rate_usd_per_unit",
    "per_item_cap_usd",
    "per_kind_caps_usd",
    "yearly_caps",
    "lifetime_cap_usd",
    "tiers",
    "starts",
    "ends",
    "window_basis",
    "conditions",
    "grant_family",
    "reduces_credit_basis",
    "paid_after_days",
    "credit_paid_on",
    "carryforward_years",
    "tax_level",
    "source",
    "notes",
}
_GROUP_FIELDS = {"name", "kinds", "cap_usd", "sub_caps_usd"}
_TIER_FIELDS = {
    "ami_min_pct",
    "ami_max_pct",
    "includes_max",
    "rate_pct",
    "per_item_cap_usd",
    "per_kind_caps_usd",
    "lifetime_cap_usd",
}
_CONDITION_FIELDS = {"min_panel_amps", "min_battery_kwh", "no_fuel_switching", "requires_same_year"}


class _Reader:
    """Small helper carrying the program id for error messages."""

    def __init__(self, program_id: str) -> None:
        self.pid = program_id

    def fail(self, path: str, problem: str, fix: str) -> IncentiveDataError:
        return IncentiveDataError(self.pid, path, problem, fix)

    def check_fields(self, raw: Mapping[str, Any], allowed: set[str], path: str) -> None:
        unknown = sorted(set(raw) - allowed)
        if unknown:
            where = f"{path}.{unknown[0]}" if path else unknown[0]
            raise self.fail(
                where,
                f"unknown field '{unknown[0]}'",
                f"use one of: {', '.join(sorted(allowed))}",
            )

    def text(self, raw: Mapping[str, Any], key: str, path: str, required: bool = True) -> str:
        value = raw.get(key)
        if value is None or (isinstance(value, str) and not value.strip()):
            if required:
                raise self.fail(path, "is missing", f"give '{key}' as a short text")
            return ""
        if not isinstance(value, str):
            raise self.fail(path, f"expected text, got {value!r}", "write it as text")
        return value.strip()

    def number(
        self, raw: Mapping[str, Any], key: str, path: str, *, allow_none: bool = True,
        most: float = 1e12,
    ) -> float | None:
        value = raw.get(key)
        if value is None:
            if allow_none:
                return None
            raise self.fail(path, "is missing", "give a number")
        if isinstance(value, bool) or not isinstance(value, int | float):
            raise self.fail(path, f"expected a number, got {value!r}", "write a plain number")
        number = float(value)
        if not math.isfinite(number):
            raise self.fail(path, f"is {number:g}", "write an ordinary number")
        if number < 0:
            raise self.fail(path, f"is below zero ({number:g})", "use a value of 0 or more")
        if number > most:
            raise self.fail(path, f"is {number:,.0f}, more than {most:,.0f}", "check the value and its unit")
        return number

    def flag(self, raw: Mapping[str, Any], key: str, path: str, default: bool) -> bool:
        value = raw.get(key, default)
        if value is None:
            return default
        if not isinstance(value, bool):
            raise self.fail(path, f"expected true or false, got {value!r}", "write true or false")
        return value

    def kind_set(self, value: Any, path: str) -> frozenset[str]:
        if isinstance(value, str):
            value = [value]
        if not isinstance(value, list | tuple) or not value:
            raise self.fail(path, "expected a non-empty list of project kinds", _kinds_fix())
        out = set()
        for i, k in enumerate(value):
            k = KIND_ALIASES.get(k, k)
            if k not in PROJECT_KINDS:
                raise self.fail(f"{path}[{i}]", f"unknown project kind {k!r}", _kinds_fix())
            out.add(k)
        return frozenset(out)

    def kind_caps(self, value: Any, path: str) -> tuple[tuple[str, float], ...]:
        if value is None:
            return ()
        if not isinstance(value, Mapping):
            raise self.fail(path, "expected a mapping of project kind to cap", "write kind: amount")
        out = []
        for k in value:
            kind = KIND_ALIASES.get(k, k)
            if kind not in PROJECT_KINDS:
                raise self.fail(f"{path}.{k}", f"unknown project kind {k!r}", _kinds_fix())
            number = self.number(value, k, f"{path}.{k}", allow_none=False)
            assert number is not None
            out.append((str(kind), number))
        return tuple(out)

    def date(self, raw: Mapping[str, Any], key: str, path: str) -> dt.date | None:
        value = raw.get(key)
        if value is None:
            return None
        if isinstance(value, dt.datetime):
            return value.date()
        if isinstance(value, dt.date):
            return value
        if isinstance(value, str):
            try:
                return dt.date.fromisoformat(value.strip())
            except ValueError:
                pass
        raise self.fail(path, f"expected a date, got {value!r}", "write it as YYYY-MM-DD")


def _kinds_fix() -> str:
    return "use one of: " + ", ".join(sorted(PROJECT_KINDS))


def parse_program(raw: Mapping[str, Any]) -> Program:
    """Validate one program record (a dict as loaded from YAML) and build a :class:`Program`.

    Parameters
    ----------
    raw : mapping of str to Any
        The record (rates in percent, caps in USD, dates as YYYY-MM-DD).

    Returns
    -------
    Program
        The validated program.

    Raises
    ------
    IncentiveDataError
        naming the program, the field (dotted path) and how to fix it: unknown fields or
        kinds, negative rates or caps, end before start, overlapping income tiers, missing
        rates, sub-caps above their group cap.
    """
    if not isinstance(raw, Mapping):
        raise IncentiveDataError("?", "", f"expected a mapping, got {raw!r}", "write key: value")
    pid = raw.get("id")
    if not isinstance(pid, str) or not pid.strip():
        raise IncentiveDataError(
            str(raw.get("name", "?")), "id", "is missing", "give each program a short unique id"
        )
    pid = pid.strip()
    r = _Reader(pid)
    r.check_fields(raw, _FIELDS, "")

    kind = r.text(raw, "kind", "kind")
    if kind not in PROGRAM_KINDS:
        raise r.fail(
            "kind", f"unknown program kind {kind!r}", "use one of: " + ", ".join(PROGRAM_KINDS)
        )
    kinds = r.kind_set(raw.get("kinds"), "kinds")

    rate_pct = r.number(raw, "rate_pct", "rate_pct")
    rate_unit = r.number(raw, "rate_usd_per_unit", "rate_usd_per_unit")
    if kind in PERFORMANCE_KINDS:
        if rate_unit is None:
            raise r.fail(
                "rate_usd_per_unit",
                f"is missing for a {kind} program",
                "give the payment per kW (performance_per_kw) or per kWh (performance_per_kwh)",
            )
    elif rate_pct is None and not _as_list(raw, "tiers", r):
        raise r.fail(
            "rate_pct", "is missing", "give the share of cost paid, in percent (30 for 30 %)"
        )
    if rate_pct is not None and rate_pct > 100:
        raise r.fail("rate_pct", f"is above 100 ({rate_pct:g})", "give a percent between 0 and 100")

    groups = []
    for i, g in enumerate(_as_list(raw, "yearly_caps", r)):
        path = f"yearly_caps[{i}]"
        if not isinstance(g, Mapping):
            raise r.fail(path, "expected a mapping", "write name, kinds, cap_usd")
        r.check_fields(g, _GROUP_FIELDS, path)
        cap = r.number(g, "cap_usd", f"{path}.cap_usd", allow_none=False)
        assert cap is not None
        gkinds = r.kind_set(g.get("kinds"), f"{path}.kinds")
        subs = r.kind_caps(g.get("sub_caps_usd"), f"{path}.sub_caps_usd")
        for k, sub in subs:
            if k not in gkinds:
                raise r.fail(
                    f"{path}.sub_caps_usd.{k}",
                    f"'{k}' is not one of the group's kinds",
                    "add it to the group's kinds or remove the sub-cap",
                )
            if sub > cap:
                raise r.fail(
                    f"{path}.sub_caps_usd.{k}",
                    f"sub-cap ${sub:,.0f} is above the group cap ${cap:,.0f}",
                    "make the sub-cap no larger than the group cap",
                )
        groups.append(CapGroup(str(g.get("name") or f"group {i + 1}"), gkinds, cap, subs))

    tiers = _parse_tiers(raw, r)
    if rate_pct is None and kind not in PERFORMANCE_KINDS:
        for i, t in enumerate(tiers):
            if t.rate_pct is None:
                raise r.fail(
                    f"tiers[{i}].rate_pct",
                    "is missing and the program has no rate_pct",
                    "give rate_pct on the program or on every tier",
                )

    starts = r.date(raw, "starts", "starts")
    ends = r.date(raw, "ends", "ends")
    if starts and ends and ends < starts:
        raise r.fail(
            "ends",
            f"end {ends.isoformat()} is before start {starts.isoformat()}",
            "check the dates; write them as YYYY-MM-DD with ends on or after starts",
        )
    basis = raw.get("window_basis", "placed_in_service")
    if basis not in WINDOW_BASES:
        raise r.fail("window_basis", f"unknown value {basis!r}", "use placed_in_service or paid")

    conditions = _parse_conditions(raw.get("conditions"), r)

    paid_after = r.number(raw, "paid_after_days", "paid_after_days", most=3660)  # ten years
    if kind == "rebate_later" and paid_after is None:
        raise r.fail(
            "paid_after_days",
            "is missing for a rebate paid later",
            "give the typical days from payment to the rebate cheque (e.g. 60)",
        )
    credit_paid_on = _parse_month_day(raw.get("credit_paid_on", "04-15"), r)
    carry = r.number(raw, "carryforward_years", "carryforward_years")
    if carry is not None and kind != "tax_credit_carryforward":
        raise r.fail(
            "carryforward_years",
            f"only applies to tax_credit_carryforward, not {kind}",
            "remove it or change the kind",
        )
    tax_level = raw.get("tax_level", "federal")
    if tax_level not in TAX_LEVELS:
        raise r.fail("tax_level", f"unknown value {tax_level!r}", "use federal or state")
    family = raw.get("grant_family")
    if family is not None and not isinstance(family, str):
        raise r.fail("grant_family", f"expected text, got {family!r}", "write a short family name")

    return Program(
        id=pid,
        name=r.text(raw, "name", "name"),
        administrator=r.text(raw, "administrator", "administrator"),
        kind=kind,
        kinds=kinds,
        rate_pct=rate_pct,
        rate_usd_per_unit=rate_unit,
        per_item_cap_usd=r.number(raw, "per_item_cap_usd", "per_item_cap_usd"),
        per_kind_caps_usd=r.kind_caps(raw.get("per_kind_caps_usd"), "per_kind_caps_usd"),
        yearly_caps=tuple(groups),
        lifetime_cap_usd=r.number(raw, "lifetime_cap_usd", "lifetime_cap_usd"),
        tiers=tiers,
        starts=starts,
        ends=ends,
        window_basis=str(basis),
        conditions=conditions,
        grant_family=family,
        reduces_credit_basis=r.flag(raw, "reduces_credit_basis", "reduces_credit_basis", True),
        paid_after_days=int(paid_after or 0),
        credit_paid_on=credit_paid_on,
        carryforward_years=None if carry is None else int(carry),
        tax_level=str(tax_level),
        source=r.text(raw, "source", "source", required=False),
        notes=r.text(raw, "notes", "notes", required=False),
    )


def _as_list(raw: Mapping[str, Any], key: str, r: _Reader) -> list[Any]:
    value = raw.get(key)
    if value is None:
        return []
    if not isinstance(value, list | tuple):
        raise r.fail(key, "expected a list", f"write {key} as a list (items starting with '-')")
    return list(value)


def _parse_tiers(raw: Mapping[str, Any], r: _Reader) -> tuple[IncomeTier, ...]:
    tiers = []
    for i, t in enumerate(_as_list(raw, "tiers", r)):
        path = f"tiers[{i}]"
        if not isinstance(t, Mapping):
            raise r.fail(path, "expected a mapping", "write ami_min_pct, ami_max_pct, rate_pct")
        r.check_fields(t, _TIER_FIELDS, path)
        lo = r.number(t, "ami_min_pct", f"{path}.ami_min_pct")
        hi = r.number(t, "ami_max_pct", f"{path}.ami_max_pct")
        lo = 0.0 if lo is None else lo
        if hi is not None and hi <= lo:
            raise r.fail(
                f"{path}.ami_max_pct",
                f"upper bound {hi:g} % is not above lower bound {lo:g} %",
                "make ami_max_pct larger than ami_min_pct",
            )
        rate = r.number(t, "rate_pct", f"{path}.rate_pct")
        if rate is not None and rate > 100:
            raise r.fail(f"{path}.rate_pct", f"is above 100 ({rate:g})", "give a percent 0-100")
        caps = t.get("per_kind_caps_usd")
        tiers.append(
            IncomeTier(
                ami_min_pct=lo,
                ami_max_pct=hi,
                rate_pct=rate,
                includes_max=r.flag(t, "includes_max", f"{path}.includes_max", False),
                per_item_cap_usd=r.number(t, "per_item_cap_usd", f"{path}.per_item_cap_usd"),
                per_kind_caps_usd=None
                if caps is None
                else r.kind_caps(caps, f"{path}.per_kind_caps_usd"),
                lifetime_cap_usd=r.number(t, "lifetime_cap_usd", f"{path}.lifetime_cap_usd"),
            )
        )
    ordered = sorted(enumerate(tiers), key=lambda it: it[1].ami_min_pct)
    for (_, a), (j, b) in zip(ordered, ordered[1:], strict=False):
        a_hi = float("inf") if a.ami_max_pct is None else a.ami_max_pct
        if a_hi > b.ami_min_pct or (a_hi == b.ami_min_pct and a.includes_max):
            raise r.fail(
                f"tiers[{j}]",
                f"tiers {a.label()} and {b.label()} overlap",
                "make each tier start at or above the previous tier's ami_max_pct "
                "(upper bounds are exclusive unless includes_max is true)",
            )
    return tuple(t for _, t in ordered)


def _parse_conditions(raw: Any, r: _Reader) -> Conditions:
    if raw is None:
        return Conditions()
    if not isinstance(raw, Mapping):
        raise r.fail("conditions", "expected a mapping", "write condition: value pairs")
    r.check_fields(raw, _CONDITION_FIELDS, "conditions")
    req_raw = raw.get("requires_same_year") or {}
    if not isinstance(req_raw, Mapping):
        raise r.fail(
            "conditions.requires_same_year",
            "expected a mapping of kind to the kinds it must be installed with",
            "write e.g. panel_upgrade: [heat_pump, heat_pump_water_heater]",
        )
    req = []
    for k, others in req_raw.items():
        if k not in PROJECT_KINDS:
            raise r.fail(
                f"conditions.requires_same_year.{k}", f"unknown project kind {k!r}", _kinds_fix()
            )
        req.append((str(k), r.kind_set(others, f"conditions.requires_same_year.{k}")))
    return Conditions(
        min_panel_amps=r.number(raw, "min_panel_amps", "conditions.min_panel_amps"),
        min_battery_kwh=r.number(raw, "min_battery_kwh", "conditions.min_battery_kwh"),
        no_fuel_switching=r.flag(raw, "no_fuel_switching", "conditions.no_fuel_switching", False),
        requires_same_year=tuple(req),
    )


def _parse_month_day(value: Any, r: _Reader) -> tuple[int, int]:
    try:
        month, day = (int(p) for p in str(value).split("-"))
        dt.date(2001, month, day)
    except (ValueError, TypeError):
        raise r.fail(
            "credit_paid_on", f"expected MM-DD, got {value!r}", 'write e.g. "04-15" in quotes'
        ) from None
    return month, day


def parse_catalog(raw: Mapping[str, Any] | Sequence[Mapping[str, Any]]) -> tuple[Program, ...]:
    """Parse a catalog: ``{"programs": [...]}`` or a plain list of program records.

    Parameters
    ----------
    raw : mapping of str to Any, or sequence of mapping
        The catalog.

    Returns
    -------
    tuple of Program
        The programs, in catalog order.

    Raises
    ------
    IncentiveDataError
        For an invalid record or a duplicate id.
    """
    records = raw.get("programs") if isinstance(raw, Mapping) else raw
    if not isinstance(records, list | tuple):
        raise IncentiveDataError(
            "?", "programs", "expected a list of programs", "write programs: [...]"
        )
    programs: list[Program] = []
    seen: set[str] = set()
    for index, rec in enumerate(records):
        try:
            prog = parse_program(rec)
        except IncentiveDataError as exc:
            raise IncentiveDataError(
                exc.program_id, exc.field, exc.problem, exc.fix, index=index
            ) from None
        if prog.id in seen:
            raise IncentiveDataError(
                prog.id, "id", "the id is used twice", "give each program its own id", index=index
            )
        seen.add(prog.id)
        programs.append(prog)
    return tuple(programs)


def read_catalog(path: str | Path) -> tuple[Program, ...]:
    """Read and parse a YAML catalog file (an edge helper; the core uses parse_catalog).

    Parameters
    ----------
    path : str or pathlib.Path
        The YAML file.

    Returns
    -------
    tuple of Program
        The programs, in file order.

    Raises
    ------
    IncentiveDataError
        For an invalid record or a duplicate id.
    """
    from ruamel.yaml import YAML

    data = YAML(typ="safe").load(Path(path).read_text(encoding="utf-8"))
    return parse_catalog(data or {})


# --------------------------------------------------------------------------- evaluation


def _floor_cents(x: float) -> float:
    """Round down to whole cents (amounts never exceed a cap or liability by rounding)."""
    if x == float("inf"):
        return x
    return math.floor(x * 100.0 + 1e-6) / 100.0


def _usd(x: float) -> str:
    return f"${x:,.0f}"


@dataclass
class _Draft:
    """Mutable working record inside evaluate() only."""

    item: Purchase
    program: Program
    tax_year: int
    basis_usd: float
    earned_usd: float
    notes: list[str]
    payments: list[Payment] = field(default_factory=list)
    lost_usd: float = 0.0
    carried_usd: float = 0.0


def _ineligible_reason(
    item: Purchase, prog: Program, items: Sequence[Purchase]
) -> str | None:
    when = item.installed_on if prog.window_basis == "placed_in_service" else item.paid_date
    word = "installed" if prog.window_basis == "placed_in_service" else "paid"
    if prog.starts and when < prog.starts:
        return f"not yet open: starts {prog.starts.isoformat()} ({word} {when.isoformat()})"
    if prog.ends and when > prog.ends:
        return f"expired {prog.ends.isoformat()} ({word} {when.isoformat()})"
    c = prog.conditions
    if c.no_fuel_switching and item.fuel_switch:
        return "the program excludes fuel switching"
    if (
        c.min_panel_amps is not None
        and item.kind in PANEL_KINDS
        and (item.panel_amps is None or item.panel_amps < c.min_panel_amps)
    ):
        have = "unknown" if item.panel_amps is None else f"{item.panel_amps:g} A"
        return f"needs a panel of at least {c.min_panel_amps:g} A (this one: {have})"
    if (
        c.min_battery_kwh is not None
        and item.kind == "battery"
        and (item.size_kwh is None or item.size_kwh < c.min_battery_kwh)
    ):
        have = "unknown" if item.size_kwh is None else f"{item.size_kwh:g} kWh"
        return f"needs a battery of at least {c.min_battery_kwh:g} kWh (this one: {have})"
    partners = c.required_with(item.kind)
    if partners is not None and not any(
        o.kind in partners and o.installed_on.year == item.installed_on.year and o is not item
        for o in items
    ):
        return "must be installed in the same year as one of: " + ", ".join(sorted(partners))
    return None


def _tier_for(prog: Program, household: Household) -> tuple[IncomeTier | None, str | None]:
    if not prog.tiers:
        return None, None
    if household.ami_pct is None:
        return None, "needs the household income as % of area median income (AMI)"
    for tier in prog.tiers:
        if tier.contains(household.ami_pct):
            return tier, None
    return None, f"household income {household.ami_pct:g} % of AMI is outside the program's tiers"


def evaluate(
    items: Iterable[Purchase],
    programs: Iterable[Program],
    household: Household,
    *,
    carry_horizon_years: int = 40,
) -> IncentiveResult:
    """Apply every program to every purchase (rules in the module docstring).

    Parameters
    ----------
    items : iterable of Purchase
        Purchases; evaluated in order of installed date (then input order), which decides
        who uses a shared yearly cap first.
    programs : iterable of Program
        Programs in priority order (earlier wins inside a grant family).
    household : Household
        AMI %, yearly tax liability (USD), prior use of lifetime caps (USD).
    carry_horizon_years : int
        How many tax years after the last purchase a carried credit is followed before being
        reported as unused, years.

    Returns
    -------
    IncentiveResult
        One :class:`Award` per (purchase, program covering its kind), zero amounts included
        with the reason in ``notes``, and the caps used per tax year (USD).

    References
    ----------
    See the module docstring: 26 USC 25C, 25D, 26(a), 6072(a); 42 USC 18795a.
    """
    ordered = sorted(enumerate(items), key=lambda it: (it[1].installed_on, it[0]))
    item_list = [it for _, it in ordered]
    progs = list(programs)
    phase1 = [p for p in progs if not p.is_credit]
    phase2 = [p for p in progs if p.is_credit]

    drafts: list[_Draft] = []
    paid_on_item: dict[int, float] = {}  # id(item) -> total awarded so far
    basis_cut: dict[int, float] = {}  # id(item) -> rebates lowering the credit basis
    families: dict[tuple[int, str], str] = {}  # (id(item), family) -> program id
    group_used: dict[tuple[str, str, int], float] = {}
    sub_used: dict[tuple[str, str, str, int], float] = {}
    life_used: dict[str, float] = {
        p.id: float(household.prior_use_usd.get(p.id, 0.0)) for p in progs
    }
    life_limit: dict[str, float] = {}

    for phase in (phase1, phase2):
        for item in item_list:
            for prog in phase:
                if item.kind not in prog.kinds:
                    continue
                drafts.append(
                    _award_one(
                        item,
                        prog,
                        household,
                        item_list,
                        paid_on_item,
                        basis_cut,
                        families,
                        group_used,
                        sub_used,
                        life_used,
                        life_limit,
                    )
                )

    for level in TAX_LEVELS:
        level_drafts = [d for d in drafts if d.program.tax_level == level]
        _apply_tax_liability(level_drafts, household, level, carry_horizon_years)

    awards = tuple(
        Award(
            project_id=d.item.project_id,
            program_id=d.program.id,
            program_kind=d.program.kind,
            tax_year=d.tax_year,
            basis_usd=round(d.basis_usd, 2),
            earned_usd=round(d.earned_usd, 2),
            paid_usd=round(sum(p.amount_usd for p in d.payments), 2),
            payments=tuple(d.payments),
            lost_usd=round(d.lost_usd, 2),
            carried_unused_usd=round(d.carried_usd, 2),
            notes=tuple(d.notes),
        )
        for d in drafts
    )
    cap_uses = _cap_uses(progs, group_used, sub_used, life_used, life_limit)
    return IncentiveResult(awards=awards, cap_uses=cap_uses)


def _award_one(
    item: Purchase,
    prog: Program,
    household: Household,
    items: Sequence[Purchase],
    paid_on_item: dict[int, float],
    basis_cut: dict[int, float],
    families: dict[tuple[int, str], str],
    group_used: dict[tuple[str, str, int], float],
    sub_used: dict[tuple[str, str, str, int], float],
    life_used: dict[str, float],
    life_limit: dict[str, float],
) -> _Draft:
    when = item.installed_on if prog.window_basis == "placed_in_service" else item.paid_date
    year = when.year
    notes: list[str] = []
    basis = item.cost_usd
    cut = basis_cut.get(id(item), 0.0) if prog.is_credit else 0.0
    if cut > 0:
        basis = max(0.0, item.cost_usd - cut)
    draft = _Draft(item, prog, year, basis, 0.0, notes)

    reason = _ineligible_reason(item, prog, items)
    tier, tier_reason = _tier_for(prog, household)
    reason = reason or tier_reason
    if reason is None and prog.grant_family:
        other = families.get((id(item), prog.grant_family))
        if other is not None:
            reason = f"already paid by {other} (same grant family '{prog.grant_family}')"
    if reason:
        notes.append(reason)
        return draft
    if cut > 0:
        notes.append(f"cost basis {_usd(basis)}: cost less {_usd(cut)} of rebates")

    rate = prog.rate_pct
    per_item = prog.per_item_cap_usd
    kind_caps = prog.per_kind_caps_usd
    lifetime = prog.lifetime_cap_usd
    if tier is not None:
        notes.append(f"income tier {tier.label()}")
        rate = tier.rate_pct if tier.rate_pct is not None else rate
        per_item = tier.per_item_cap_usd if tier.per_item_cap_usd is not None else per_item
        kind_caps = tier.per_kind_caps_usd if tier.per_kind_caps_usd is not None else kind_caps
        lifetime = tier.lifetime_cap_usd if tier.lifetime_cap_usd is not None else lifetime

    if prog.kind in PERFORMANCE_KINDS:
        size = item.size_kw if prog.kind == "performance_per_kw" else item.size_kwh
        unit = "kW" if prog.kind == "performance_per_kw" else "kWh"
        if size is None:
            notes.append(f"needs the size in {unit} to compute the payment")
            return draft
        amount = size * float(prog.rate_usd_per_unit or 0.0)
        if rate is not None and basis * rate / 100.0 < amount:
            amount = basis * rate / 100.0
            notes.append(f"limited to {rate:g} % of cost")
    else:
        amount = basis * float(rate or 0.0) / 100.0

    cap = dict(kind_caps).get(item.kind, per_item)
    if cap is not None and amount > cap:
        amount = cap
        notes.append(f"capped at {_usd(cap)} per item")

    for group in prog.yearly_caps:
        if item.kind not in group.kinds:
            continue
        gkey = (prog.id, group.name, year)
        left = max(0.0, group.cap_usd - group_used.get(gkey, 0.0))
        sub = group.sub_cap_usd(item.kind)
        if sub is not None:
            skey = (prog.id, group.name, item.kind, year)
            sub_left = max(0.0, sub - sub_used.get(skey, 0.0))
            if amount > sub_left:
                amount = sub_left
                notes.append(
                    f"capped at {_usd(sub)} per year for {item.kind} ({group.name}, {year})"
                )
        if amount > left:
            amount = left
            notes.append(f"capped at {_usd(group.cap_usd)} per year ({group.name}, {year})")

    if lifetime is not None:
        life_limit[prog.id] = lifetime
        left = max(0.0, lifetime - life_used.get(prog.id, 0.0))
        if amount > left:
            amount = left
            notes.append(f"household lifetime cap of {_usd(lifetime)} reached")

    unpaid = max(0.0, item.cost_usd - paid_on_item.get(id(item), 0.0))
    if amount > unpaid:
        amount = unpaid
        notes.append("limited to the part of the cost not already paid by other programs")
    amount = _floor_cents(max(0.0, amount))

    # record cap use
    for group in prog.yearly_caps:
        if item.kind in group.kinds:
            gkey = (prog.id, group.name, year)
            group_used[gkey] = group_used.get(gkey, 0.0) + amount
            if group.sub_cap_usd(item.kind) is not None:
                skey = (prog.id, group.name, item.kind, year)
                sub_used[skey] = sub_used.get(skey, 0.0) + amount
    life_used[prog.id] = life_used.get(prog.id, 0.0) + amount
    paid_on_item[id(item)] = paid_on_item.get(id(item), 0.0) + amount
    if amount > 0 and prog.grant_family:
        families[(id(item), prog.grant_family)] = prog.id
    if amount > 0 and not prog.is_credit and prog.reduces_credit_basis:
        basis_cut[id(item)] = basis_cut.get(id(item), 0.0) + amount

    draft.earned_usd = amount
    if not prog.is_credit and amount > 0:
        on = item.paid_date
        if prog.kind != "point_of_sale_rebate":
            on = on + dt.timedelta(days=prog.paid_after_days)
        draft.payments.append(Payment(on, round(amount, 2)))
    return draft


def _apply_tax_liability(
    drafts: list[_Draft], household: Household, level: str, horizon_years: int
) -> None:
    """Limit credits of one tax level (federal or state) by that year's tax liability;
    carry forward where the program allows.

    References
    ----------
    26 USC 26(a) (nonrefundable credits limited by tax liability); 26 USC 25D(c) (carryforward).
    Order within a year (non-carryforward credits first, then carried, then new carryforward
    credits) follows the IRS Form 5695 credit limit worksheets (from memory).
    """
    credits = [d for d in drafts if d.program.is_credit and d.earned_usd > 0]
    if not credits:
        return
    first = min(d.tax_year for d in credits)
    last = max(d.tax_year for d in credits) + horizon_years
    carry: list[tuple[_Draft, int]] = []  # (draft, year earned)
    remaining: dict[int, float] = {}
    for year in range(first, last + 1):
        limit = household.liability_usd(year, level)
        left = float("inf") if limit is None else max(0.0, limit)
        this_year = [d for d in credits if d.tax_year == year]
        ordered = [d for d in this_year if d.program.kind == "tax_credit"]
        ordered += [d for d, _ in carry]
        ordered += [d for d in this_year if d.program.kind == "tax_credit_carryforward"]
        for d in this_year:
            remaining[id(d)] = d.earned_usd
        next_carry: list[tuple[_Draft, int]] = []
        for d in ordered:
            want = remaining[id(d)]
            use = min(want, _floor_cents(left))
            left -= use
            remaining[id(d)] = round(want - use, 2)
            if use > 0:
                m, day = d.program.credit_paid_on
                d.payments.append(Payment(dt.date(year + 1, m, day), round(use, 2)))
                if year > d.tax_year:
                    d.notes.append(f"{_usd(use)} carried forward and used in tax year {year}")
            rest = remaining[id(d)]
            if rest <= 1e-9:
                continue
            if d.program.kind == "tax_credit":
                d.lost_usd = rest
                d.notes.append(
                    f"limited by tax liability: {_usd(rest)} lost (this credit cannot be carried forward)"
                )
                continue
            cap_years = d.program.carryforward_years
            if cap_years is not None and year - d.tax_year >= cap_years:
                d.lost_usd = rest
                d.notes.append(f"{_usd(rest)} lost: carryforward limited to {cap_years} years")
                continue
            if year == d.tax_year:
                d.notes.append(f"limited by tax liability in {year}: {_usd(rest)} carried forward")
            next_carry.append((d, d.tax_year))
        carry = next_carry
        if not carry and year >= max(d.tax_year for d in credits):
            break
    for d, _ in carry:
        d.carried_usd = remaining[id(d)]
        d.notes.append(f"{_usd(d.carried_usd)} still carried forward at the end of the horizon")


def _cap_uses(
    progs: Sequence[Program],
    group_used: Mapping[tuple[str, str, int], float],
    sub_used: Mapping[tuple[str, str, str, int], float],
    life_used: Mapping[str, float],
    life_limit: Mapping[str, float],
) -> tuple[CapUse, ...]:
    limits = {(p.id, g.name): g for p in progs for g in p.yearly_caps}
    out = [
        CapUse(pid, name, year, limits[(pid, name)].cap_usd, round(used, 2))
        for (pid, name, year), used in sorted(group_used.items())
    ]
    for (pid, name, kind, year), used in sorted(sub_used.items()):
        sub = limits[(pid, name)].sub_cap_usd(kind)
        out.append(CapUse(pid, f"{name}: {kind}", year, float(sub or 0.0), round(used, 2)))
    for pid, limit in sorted(life_limit.items()):
        out.append(
            CapUse(pid, "household lifetime", None, limit, round(life_used.get(pid, 0.0), 2))
        )
    return tuple(out)


# --------------------------------------------------------------------------- scheduler helper


@dataclass(frozen=True)
class YearIncentive:
    """What one project would receive if installed in ``year`` on its own.

    ``point_of_sale_usd`` comes off the invoice; ``later_usd`` arrives afterwards (rebates paid
    later, performance payments, tax credits) with its arrival years in ``by_arrival_year``.

    Attributes
    ----------
    year : int
        Calendar year of installation.
    cost_usd : float
        Cost in that year, USD.
    point_of_sale_usd : float
        Point-of-sale rebates, USD.
    later_usd : float
        Incentives that arrive afterwards, USD.
    by_arrival_year : tuple of (int, float)
        (calendar year, USD) of the later incentives.
    notes : tuple of str
        Reasons and caps in plain words.
    """

    year: int
    cost_usd: float
    point_of_sale_usd: float
    later_usd: float
    by_arrival_year: tuple[tuple[int, float], ...]
    notes: tuple[str, ...]

    @property
    def total_usd(self) -> float:
        """Point-of-sale and later incentives together, USD."""
        return self.point_of_sale_usd + self.later_usd


def incentives_by_install_year(
    purchase: Purchase,
    cost_by_year_usd: Mapping[int, float],
    programs: Sequence[Program],
    household: Household,
    *,
    companions: Sequence[Purchase] = (),
) -> dict[int, YearIncentive]:
    """Coefficients per (project, year) for the scheduler: the incentives ``purchase`` earns if
    installed in each year of ``cost_by_year_usd`` (same month and day, that year's cost).

    ``companions`` are purchases assumed installed in the same year (e.g. the heat pump a panel
    credit requires); they are moved with it and use caps first, so the figure is what the
    project adds. Yearly caps shared with other projects of the plan are NOT seen here: the
    scheduler models them (e.g. ``schedule.problem.IncentiveGroup``) or the final plan is
    re-checked with :func:`evaluate`.

    Parameters
    ----------
    purchase : Purchase
        The project; its installed date gives the month and day.
    cost_by_year_usd : mapping of int to float
        Cost if installed in each calendar year, USD.
    programs : sequence of Program
        Programs in priority order.
    household : Household
        Household facts.
    companions : sequence of Purchase
        Purchases installed in the same year as ``purchase``.

    Returns
    -------
    dict of int to YearIncentive
        Incentives by calendar year of installation, USD.
    """
    out: dict[int, YearIncentive] = {}
    for year, cost in sorted(cost_by_year_usd.items()):
        moved = [_moved(c, year) for c in companions]
        item = _moved(purchase, year, cost)
        res = evaluate([*moved, item], programs, household)
        mine = res.for_item(item.project_id)
        pos = sum(a.paid_usd for a in mine if a.at_point_of_sale)
        arrivals: dict[int, float] = {}
        for a in mine:
            if a.at_point_of_sale:
                continue
            for p in a.payments:
                arrivals[p.on.year] = arrivals.get(p.on.year, 0.0) + p.amount_usd
        notes = tuple(f"{a.program_id}: {n}" for a in mine for n in a.notes)
        out[year] = YearIncentive(
            year=year,
            cost_usd=cost,
            point_of_sale_usd=round(pos, 2),
            later_usd=round(sum(arrivals.values()), 2),
            by_arrival_year=tuple(sorted(arrivals.items())),
            notes=notes,
        )
    return out


def _moved(p: Purchase, year: int, cost_usd: float | None = None) -> Purchase:
    def shift(d: dt.date) -> dt.date:
        day = 28 if (d.month, d.day) == (2, 29) else d.day
        return dt.date(year + (d.year - p.installed_on.year), d.month, day)

    return Purchase(
        project_id=p.project_id,
        kind=p.kind,
        cost_usd=p.cost_usd if cost_usd is None else cost_usd,
        installed_on=shift(p.installed_on),
        paid_on=None if p.paid_on is None else shift(p.paid_on),
        panel_amps=p.panel_amps,
        size_kw=p.size_kw,
        size_kwh=p.size_kwh,
        fuel_switch=p.fuel_switch,
    )


# --------------------------------------------------------------------------- per-project summary


# --------------------------------------------------------------------------- per-program summary


@dataclass(frozen=True)
class ProgramTotal:
    """What one program pays in a result (same fields as ``homeplan.result.ProgramUse``).

    Attributes
    ----------
    program_id : str
        Id of the program.
    name : str
        Program name.
    kind : str
        Program kind.
    paid_by_year : dict of int to float
        Cash paid by calendar year, USD.
    caps_note : str
        Rate and caps in plain words.
    ends : str or None
        Last eligible date, ISO format.
    """

    program_id: str
    name: str
    kind: str
    paid_by_year: dict[int, float]
    caps_note: str = ""
    ends: str | None = None


def describe_caps(program: Program) -> str:
    """The program's rate and caps in plain words, e.g. "30 % of cost; $2,000 a year for
    heat_pump, heat_pump_water_heater".

    Parameters
    ----------
    program : Program
        The program.

    Returns
    -------
    str
        Rate (percent or USD per unit) and caps (USD), separated by ``; ``.
    """
    parts: list[str] = []
    if program.kind in PERFORMANCE_KINDS:
        unit = "kW" if program.kind == "performance_per_kw" else "kWh"
        parts.append(f"${program.rate_usd_per_unit:,.0f} per {unit}")
        if program.rate_pct is not None:
            parts.append(f"at most {program.rate_pct:g} % of cost")
    elif program.rate_pct is not None:
        parts.append(f"{program.rate_pct:g} % of cost")
    for tier in program.tiers:
        if tier.rate_pct is not None:
            parts.append(f"{tier.rate_pct:g} % at {tier.label()}")
    if program.per_item_cap_usd is not None:
        parts.append(f"up to {_usd(program.per_item_cap_usd)} per item")
    for kind, cap in program.per_kind_caps_usd:
        parts.append(f"{kind} up to {_usd(cap)}")
    for g in program.yearly_caps:
        parts.append(f"{_usd(g.cap_usd)} a year for {', '.join(sorted(g.kinds))}")
        for kind, cap in g.sub_caps_usd:
            parts.append(f"{kind} at most {_usd(cap)} a year")
    if program.lifetime_cap_usd is not None:
        parts.append(f"household cap {_usd(program.lifetime_cap_usd)}")
    return "; ".join(parts)


def program_totals(
    result: IncentiveResult, programs: Iterable[Program]
) -> tuple[ProgramTotal, ...]:
    """Per program that pays something: cash by calendar year, caps in words, end date.

    Parameters
    ----------
    result : IncentiveResult
        What :func:`evaluate` found.
    programs : iterable of Program
        The programs, in the order wanted.

    Returns
    -------
    tuple of ProgramTotal
        One row per program that pays something, USD by calendar year.
    """
    out = []
    for prog in programs:
        by_year: dict[int, float] = {}
        for a in result.awards:
            if a.program_id != prog.id:
                continue
            for p in a.payments:
                by_year[p.on.year] = by_year.get(p.on.year, 0.0) + p.amount_usd
        if not any(by_year.values()):
            continue
        out.append(
            ProgramTotal(
                program_id=prog.id,
                name=prog.name,
                kind=prog.kind,
                paid_by_year=dict(sorted(by_year.items())),
                caps_note=describe_caps(prog),
                ends=None if prog.ends is None else prog.ends.isoformat(),
            )
        )
    return tuple(out)
