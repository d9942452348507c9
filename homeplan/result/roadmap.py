"""Roadmap result types: what the planner hands to reports, the TUI and ``--json``.

Everything here is a small frozen dataclass. Sequences are stored as tuples (lists passed in are
converted), mappings as plain ``dict`` copies. ``Roadmap.to_dict()`` produces JSON-safe data
(only ``dict``/``list``/``str``/``int``/``float``/``bool``/``None``; NaN and infinities become
``None``; dates become ISO strings) following the versioned schema documented in
``docs/roadmap-json.md``. ``Roadmap.from_dict()`` reads it back.

Units follow the project rules: money in USD (``_usd``), mass of CO2e in kg (``_kg``), power in kW
(``_kw``), current in A (``_amps``). Energy maps are keyed by fuel with the unit in the key
(``electricity_kwh``, ``gas_therm``, ``propane_gal``, ``oil_gal``, ``gasoline_gal``, ``diesel_gal``).

References
----------
None: these are data containers; the numbers in them come from the energy, money and electrical
engines, which cite their sources.
"""

from __future__ import annotations

import datetime as _dt
import math
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from typing import Any, Literal

__all__ = [
    "SCHEMA_VERSION",
    "Baseline",
    "BaselineKind",
    "IncentiveKind",
    "IncentiveLine",
    "Milestone",
    "MilestoneKind",
    "Objective",
    "Roadmap",
    "Status",
    "Step",
    "YearTotals",
]

SCHEMA_VERSION = "1.2"
"""Version of the JSON produced by :meth:`Roadmap.to_dict`. Bump the minor part for added
fields, the major part for renamed/removed fields or changed meaning."""

IncentiveKind = Literal["point_of_sale", "rebate", "tax_credit", "utility_bill_credit", "loan", "other"]
MilestoneKind = Literal[
    "gas_service_closed",
    "last_gasoline_car",
    "fully_electric",
    "propane_tank_removed",
    "oil_tank_removed",
    "service_upgraded",
    "other",
]
BaselineKind = Literal["do_nothing", "like_for_like"]
Status = Literal["ok", "infeasible"]
Objective = Literal["max_npv", "min_emissions", "earliest_gas_closure", "min_out_of_pocket"]


def _tuple(items: Iterable[Any] | None) -> tuple[Any, ...]:
    return tuple(items) if items is not None else ()


def _json_number(value: float | int | None) -> float | int | None:
    if value is None:
        return None
    if isinstance(value, bool):
        return value
    if isinstance(value, int):
        return value
    value = float(value)
    return value if math.isfinite(value) else None


def _json_value(value: Any) -> Any:
    """Convert any nested value to JSON-safe data."""
    if value is None or isinstance(value, (str, bool)):
        return value
    if isinstance(value, (int, float)):
        return _json_number(value)
    if isinstance(value, (_dt.date, _dt.datetime)):
        return value.isoformat()
    if isinstance(value, Mapping):
        return {str(k): _json_value(v) for k, v in value.items()}
    if isinstance(value, (list, tuple, set, frozenset)):
        return [_json_value(v) for v in value]
    if hasattr(value, "item"):  # numpy scalar
        return _json_value(value.item())
    return str(value)


def _num(value: Any) -> float:
    return float("nan") if value is None else float(value)


@dataclass(frozen=True)
class IncentiveLine:
    """One incentive attached to a step.

    ``arrives`` is when the money reaches the household: a ``datetime.date`` when known, else a
    year (``int``; e.g. a tax credit arrives with the following spring's refund). ``kind`` says how
    (point of sale reduces the invoice; rebates and tax credits arrive later).
    """

    program: str
    amount_usd: float
    arrives: _dt.date | int
    kind: IncentiveKind = "rebate"

    def to_dict(self) -> dict[str, Any]:
        return {
            "program": self.program,
            "amount_usd": _json_number(self.amount_usd),
            "arrives": _json_value(self.arrives),
            "kind": self.kind,
        }

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> IncentiveLine:
        arrives = data["arrives"]
        if isinstance(arrives, str):
            arrives = _dt.date.fromisoformat(arrives)
        return cls(data["program"], _num(data["amount_usd"]), arrives, data.get("kind", "rebate"))


@dataclass(frozen=True)
class Step:
    """One project placed in one year of the roadmap.

    ``cost_usd`` is the installed price before any incentive; ``net_cost_usd`` is what the
    household pays after all incentives (whenever they arrive); ``financed_usd`` is the part paid
    by a loan. ``reasons`` are plain-words explanations of the year (see ``explain.py``);
    ``cautions`` are safety notes (see ``homeplan/data/cautions.yaml``).
    """

    project_id: str
    label: str
    year: int
    variant: str = ""
    size: str = ""
    cost_usd: float = 0.0
    incentives: tuple[IncentiveLine, ...] = ()
    net_cost_usd: float = 0.0
    financed_usd: float = 0.0
    reasons: tuple[str, ...] = ()
    cautions: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        object.__setattr__(self, "incentives", _tuple(self.incentives))
        object.__setattr__(self, "reasons", _tuple(self.reasons))
        object.__setattr__(self, "cautions", _tuple(self.cautions))

    @property
    def incentives_usd(self) -> float:
        return sum(i.amount_usd for i in self.incentives)

    def to_dict(self) -> dict[str, Any]:
        return {
            "project_id": self.project_id,
            "label": self.label,
            "year": self.year,
            "variant": self.variant,
            "size": self.size,
            "cost_usd": _json_number(self.cost_usd),
            "incentives": [i.to_dict() for i in self.incentives],
            "net_cost_usd": _json_number(self.net_cost_usd),
            "financed_usd": _json_number(self.financed_usd),
            "reasons": list(self.reasons),
            "cautions": list(self.cautions),
        }

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> Step:
        return cls(
            project_id=data["project_id"],
            label=data["label"],
            year=int(data["year"]),
            variant=data.get("variant", ""),
            size=data.get("size", ""),
            cost_usd=_num(data.get("cost_usd", 0.0)),
            incentives=tuple(IncentiveLine.from_dict(i) for i in data.get("incentives", ())),
            net_cost_usd=_num(data.get("net_cost_usd", 0.0)),
            financed_usd=_num(data.get("financed_usd", 0.0)),
            reasons=tuple(data.get("reasons", ())),
            cautions=tuple(data.get("cautions", ())),
        )


@dataclass(frozen=True)
class YearTotals:
    """Totals for one calendar year of a roadmap or baseline.

    - ``spend_usd``: installed cost of the projects done that year (before incentives).
    - ``incentives_usd``: incentive money arriving that year (by arrival, not by project year).
    - ``net_usd``: ``spend_usd - incentives_usd``, cash out of pocket on projects that year.
    - ``loan_payments_usd``: loan repayments due that year.
    - ``bills_usd``: energy bills by fuel (``electricity``, ``gas``, ``propane``, ``oil``,
      ``gasoline``), including fixed charges.
    - ``bill_savings_usd``: total bills of the do-nothing baseline minus this plan's total bills.
    - ``cumulative_usd``: running total of net spend + loan payments + bills since ``first_year``.
    - ``emissions_kg``: CO2e from all fuels that year.
    - ``peak_kw``: highest hourly electricity demand of the modelled typical year in that year's
      state of the home; ``peak_winter_kw`` and ``peak_summer_kw`` the same in December-February
      and June-August (what a grid planner adds up for many homes).
    - ``service_headroom_amps``: service rating minus the NEC 220.83 calculated load at year end
      (negative means over capacity).
    - ``energy``: energy use by fuel, unit in the key (``electricity_kwh``, ``gas_therm``...).
    """

    year: int
    spend_usd: float = 0.0
    incentives_usd: float = 0.0
    net_usd: float = 0.0
    loan_payments_usd: float = 0.0
    bills_usd: dict[str, float] = field(default_factory=dict)
    bill_savings_usd: float = 0.0
    cumulative_usd: float = 0.0
    emissions_kg: float = 0.0
    peak_kw: float = 0.0
    service_headroom_amps: float = 0.0
    energy: dict[str, float] = field(default_factory=dict)
    peak_winter_kw: float = 0.0
    peak_summer_kw: float = 0.0

    def __post_init__(self) -> None:
        object.__setattr__(self, "bills_usd", dict(self.bills_usd))
        object.__setattr__(self, "energy", dict(self.energy))

    @property
    def total_bills_usd(self) -> float:
        return sum(self.bills_usd.values())

    def to_dict(self) -> dict[str, Any]:
        return {
            "year": self.year,
            "spend_usd": _json_number(self.spend_usd),
            "incentives_usd": _json_number(self.incentives_usd),
            "net_usd": _json_number(self.net_usd),
            "loan_payments_usd": _json_number(self.loan_payments_usd),
            "bills_usd": _json_value(self.bills_usd),
            "bill_savings_usd": _json_number(self.bill_savings_usd),
            "cumulative_usd": _json_number(self.cumulative_usd),
            "emissions_kg": _json_number(self.emissions_kg),
            "peak_kw": _json_number(self.peak_kw),
            "service_headroom_amps": _json_number(self.service_headroom_amps),
            "energy": _json_value(self.energy),
            "peak_winter_kw": _json_number(self.peak_winter_kw),
            "peak_summer_kw": _json_number(self.peak_summer_kw),
        }

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> YearTotals:
        nums = {
            k: _num(data.get(k, 0.0))
            for k in (
                "spend_usd",
                "incentives_usd",
                "net_usd",
                "loan_payments_usd",
                "bill_savings_usd",
                "cumulative_usd",
                "emissions_kg",
                "peak_kw",
                "service_headroom_amps",
                "peak_winter_kw",
                "peak_summer_kw",
            )
        }
        return cls(
            year=int(data["year"]),
            bills_usd={k: _num(v) for k, v in data.get("bills_usd", {}).items()},
            energy={k: _num(v) for k, v in data.get("energy", {}).items()},
            **nums,
        )


@dataclass(frozen=True)
class Milestone:
    """A notable state change, e.g. ``kind="gas_service_closed"`` in 2031."""

    year: int
    label: str
    kind: MilestoneKind = "other"

    def to_dict(self) -> dict[str, Any]:
        return {"year": self.year, "label": self.label, "kind": self.kind}

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> Milestone:
        return cls(int(data["year"]), data["label"], data.get("kind", "other"))


@dataclass(frozen=True)
class Baseline:
    """A reference plan shown beside the roadmap.

    ``kind`` says which (``do_nothing``: keep today's home and pay for breakdowns as they come;
    ``like_for_like``: replace each item with the same kind on the same fuel at its likely end of
    life); ``name`` is the same in words, for display only - code looks baselines up by kind.
    """

    kind: BaselineKind
    name: str
    years: tuple[YearTotals, ...] = ()
    npv_usd: float = 0.0

    def __post_init__(self) -> None:
        object.__setattr__(self, "years", _tuple(self.years))

    def to_dict(self) -> dict[str, Any]:
        return {
            "kind": self.kind,
            "name": self.name,
            "years": [y.to_dict() for y in self.years],
            "npv_usd": _json_number(self.npv_usd),
        }

    @classmethod
    def from_dict(cls, data: Mapping[str, Any], position: int = 0) -> Baseline:
        """Read one baseline; files of schema 1.0 have no ``kind``: it follows from the
        documented order (doing nothing first, then like-for-like)."""
        kind = data.get("kind") or ("do_nothing" if position == 0 else "like_for_like")
        return cls(
            kind,
            data["name"],
            tuple(YearTotals.from_dict(y) for y in data.get("years", ())),
            _num(data.get("npv_usd", 0.0)),
        )


@dataclass(frozen=True)
class Roadmap:
    """The full result of planning one home.

    ``npv_usd`` is the net present value of the plan relative to the do-nothing baseline
    (benefits minus costs, discounted to ``first_year``), computed from the full simulation, not
    from the solver's linear approximation. ``status`` is ``"ok"`` or ``"infeasible"``; when
    infeasible, ``infeasibility`` explains the blocking constraint and the smallest change that
    makes the request feasible, and ``steps`` is empty. ``assumptions`` records the inputs that
    shaped the result (discount rate, escalation, budget...) as JSON-safe values.
    """

    plan_name: str
    first_year: int
    horizon_years: int
    objective: Objective = "max_npv"
    steps: tuple[Step, ...] = ()
    years: tuple[YearTotals, ...] = ()
    milestones: tuple[Milestone, ...] = ()
    baselines: tuple[Baseline, ...] = ()
    npv_usd: float = 0.0
    status: Status = "ok"
    infeasibility: str | None = None
    assumptions: dict[str, Any] = field(default_factory=dict)
    cautions: tuple[str, ...] = ()
    schema_version: str = SCHEMA_VERSION

    def __post_init__(self) -> None:
        object.__setattr__(self, "steps", tuple(sorted(_tuple(self.steps), key=lambda s: s.year)))
        object.__setattr__(self, "years", _tuple(self.years))
        object.__setattr__(self, "milestones", _tuple(self.milestones))
        object.__setattr__(self, "baselines", _tuple(self.baselines))
        object.__setattr__(self, "cautions", _tuple(self.cautions))
        object.__setattr__(self, "assumptions", dict(self.assumptions))

    @property
    def last_year(self) -> int:
        return self.first_year + self.horizon_years - 1

    def steps_in(self, year: int) -> tuple[Step, ...]:
        return tuple(s for s in self.steps if s.year == year)

    def baseline(self, kind: BaselineKind) -> Baseline | None:
        """The baseline of this kind (``do_nothing`` or ``like_for_like``), if the roadmap has one."""
        return next((b for b in self.baselines if b.kind == kind), None)

    def to_dict(self) -> dict[str, Any]:
        """JSON-safe dict following ``docs/roadmap-json.md`` (schema ``SCHEMA_VERSION``)."""
        return {
            "schema_version": self.schema_version,
            "plan_name": self.plan_name,
            "first_year": self.first_year,
            "horizon_years": self.horizon_years,
            "objective": self.objective,
            "status": self.status,
            "infeasibility": self.infeasibility,
            "npv_usd": _json_number(self.npv_usd),
            "steps": [s.to_dict() for s in self.steps],
            "years": [y.to_dict() for y in self.years],
            "milestones": [m.to_dict() for m in self.milestones],
            "baselines": [b.to_dict() for b in self.baselines],
            "assumptions": _json_value(self.assumptions),
            "cautions": list(self.cautions),
        }

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> Roadmap:
        """Read data produced by :meth:`to_dict` (same major schema version)."""
        version = str(data.get("schema_version", SCHEMA_VERSION))
        if version.split(".")[0] != SCHEMA_VERSION.split(".")[0]:
            raise ValueError(
                f"roadmap schema {version} is not readable by this version "
                f"(reads {SCHEMA_VERSION.split('.')[0]}.x)"
            )
        return cls(
            plan_name=data["plan_name"],
            first_year=int(data["first_year"]),
            horizon_years=int(data["horizon_years"]),
            objective=data.get("objective", "max_npv"),
            steps=tuple(Step.from_dict(s) for s in data.get("steps", ())),
            years=tuple(YearTotals.from_dict(y) for y in data.get("years", ())),
            milestones=tuple(Milestone.from_dict(m) for m in data.get("milestones", ())),
            baselines=tuple(Baseline.from_dict(b, i) for i, b in enumerate(data.get("baselines", ()))),
            npv_usd=_num(data.get("npv_usd", 0.0)),
            status=data.get("status", "ok"),
            infeasibility=data.get("infeasibility"),
            assumptions=dict(data.get("assumptions", {})),
            cautions=tuple(data.get("cautions", ())),
            schema_version=version,
        )
