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

from homeplan.plan.objectives import canonical
from homeplan.result.meter import MeterSummary
from homeplan.result.risk import PriceRisk

__all__ = [
    "SCHEMA_VERSION",
    "Baseline",
    "BaselineKind",
    "BillFit",
    "Emergency",
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

SCHEMA_VERSION = "1.6"
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
Objective = Literal["best_value", "lowest_emissions", "home_fuel_off_soonest", "least_out_of_pocket", "risk_aware"]
"""As the plan file names it (homeplan.plan.objectives); schema 1.4 and older used max_npv,
min_emissions, earliest_gas_closure and min_out_of_pocket, and 1.5 min_cost_cvar, which
:meth:`Roadmap.from_dict` reads."""


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


def _opt_num(value: Any) -> float | None:
    return None if value is None else float(value)


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
    ``cautions`` are safety notes (see ``homeplan/data/cautions.yaml``); ``replaces`` are the ids
    of the appliances, vehicles or roof the step takes over (empty for additions). A heat pump
    step carries the loads it was sized for, its heating capacity at the design temperature and
    its nominal size in tons (None on other steps). Within a year the roadmap lists steps in the
    order the work is done.
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
    replaces: tuple[str, ...] = ()
    heating_load_btuh: float | None = None
    cooling_load_btuh: float | None = None
    capacity_at_design_btuh: float | None = None
    nominal_tons: float | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "incentives", _tuple(self.incentives))
        object.__setattr__(self, "reasons", _tuple(self.reasons))
        object.__setattr__(self, "cautions", _tuple(self.cautions))
        object.__setattr__(self, "replaces", _tuple(self.replaces))

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
            "replaces": list(self.replaces),
            "heating_load_btuh": _json_number(self.heating_load_btuh),
            "cooling_load_btuh": _json_number(self.cooling_load_btuh),
            "capacity_at_design_btuh": _json_number(self.capacity_at_design_btuh),
            "nominal_tons": _json_number(self.nominal_tons),
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
            replaces=tuple(data.get("replaces", ())),
            heating_load_btuh=_opt_num(data.get("heating_load_btuh")),
            cooling_load_btuh=_opt_num(data.get("cooling_load_btuh")),
            capacity_at_design_btuh=_opt_num(data.get("capacity_at_design_btuh")),
            nominal_tons=_opt_num(data.get("nominal_tons")),
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
    - ``peak_kw``: highest hourly average electricity demand of the modelled typical year in that
      year's state of the home (the energy model's figure).
    - ``peak_demand_kw``: the peak a meter would show in that state: today's measured (or
      estimated) peak moved by the design-day demand of the big electric loads;
      ``peak_demand_winter_kw`` and ``peak_demand_summer_kw`` are the two design days.
    - ``service_headroom_amps``: service rating minus the NEC 220.83 calculated load at year end
      (negative means over capacity).
    - ``energy``: energy use by fuel, unit in the key (``electricity_kwh``, ``gas_therm``...).
    - ``service_load_pct``: the NEC 220.83 calculated load as a percentage of the service rating
      at year end; ``service_near_limit``: it fits but above 90 % of the rating.
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
    service_load_pct: float | None = None
    service_near_limit: bool = False
    peak_demand_kw: float | None = None
    peak_demand_winter_kw: float | None = None
    peak_demand_summer_kw: float | None = None

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
            "service_load_pct": _json_number(self.service_load_pct),
            "service_near_limit": self.service_near_limit,
            "peak_demand_kw": _json_number(self.peak_demand_kw),
            "peak_demand_winter_kw": _json_number(self.peak_demand_winter_kw),
            "peak_demand_summer_kw": _json_number(self.peak_demand_summer_kw),
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
            )
        }
        pct = data.get("service_load_pct")
        return cls(
            year=int(data["year"]),
            bills_usd={k: _num(v) for k, v in data.get("bills_usd", {}).items()},
            energy={k: _num(v) for k, v in data.get("energy", {}).items()},
            service_load_pct=None if pct is None else float(pct),
            service_near_limit=bool(data.get("service_near_limit", False)),
            peak_demand_kw=_opt_num(data.get("peak_demand_kw")),
            peak_demand_winter_kw=_opt_num(data.get("peak_demand_winter_kw")),
            peak_demand_summer_kw=_opt_num(data.get("peak_demand_summer_kw")),
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
class Emergency:
    """A failed appliance that provides heat or hot water, replaced in the first plan year.

    ``step_id`` is the step the roadmap takes (the upgrade or the like-for-like replacement) at
    ``step_cost_usd`` after point-of-sale incentives; ``other_id`` the other way, at
    ``other_cost_usd`` (None when the catalog has no price for it). ``over_budget_usd`` is what
    the first year spends beyond its budget, paid ``from_savings_usd``, ``from_loan_usd`` (the
    plan's emergency loan, repaid from the next year) and ``unfunded_usd`` (neither covers it).
    """

    item: str
    label: str
    service: str
    year: int
    step_id: str
    step_label: str
    step_cost_usd: float
    other_id: str | None = None
    other_label: str = ""
    other_cost_usd: float | None = None
    over_budget_usd: float = 0.0
    from_savings_usd: float = 0.0
    from_loan_usd: float = 0.0
    unfunded_usd: float = 0.0

    def to_dict(self) -> dict[str, Any]:
        return {k: (_json_number(v) if isinstance(v, float) else v) for k, v in {
            "item": self.item, "label": self.label, "service": self.service, "year": self.year,
            "step_id": self.step_id, "step_label": self.step_label,
            "step_cost_usd": self.step_cost_usd, "other_id": self.other_id,
            "other_label": self.other_label, "other_cost_usd": self.other_cost_usd,
            "over_budget_usd": self.over_budget_usd, "from_savings_usd": self.from_savings_usd,
            "from_loan_usd": self.from_loan_usd, "unfunded_usd": self.unfunded_usd,
        }.items()}

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> Emergency:
        other = data.get("other_cost_usd")
        return cls(
            item=data["item"], label=data["label"], service=data["service"], year=int(data["year"]),
            step_id=data["step_id"], step_label=data["step_label"],
            step_cost_usd=_num(data["step_cost_usd"]), other_id=data.get("other_id"),
            other_label=data.get("other_label", ""),
            other_cost_usd=None if other is None else float(other),
            **{k: _num(data.get(k, 0.0)) for k in ("over_budget_usd", "from_savings_usd",
                                                    "from_loan_usd", "unfunded_usd")},
        )


@dataclass(frozen=True)
class BillFit:
    """How the model of today's home reproduces one fuel's bills.

    Amounts are yearly, in the fuel's trade ``unit`` (``kWh``, ``therm``, ``gal``), counted the
    way the bills count them (electricity net of solar when the bills are). ``modelled`` is the
    model under the weather of the billed year (the typical year when no weather file of the
    bill year is given); ``typical_year`` is the same home in the typical year, the figure the
    plan uses (the bills weather-normalised). ``heating``, ``cooling``, ``base`` and ``other`` split
    the modelled site use (base: water heating, cooking, drying and other plug loads; other:
    cars); ``solar`` is the production the electric bills net out (0 for bills of the whole
    use). The fit measures are ASHRAE Guideline 14's for monthly data (None for an annual
    total or tank deliveries); ``meets_guideline_14`` is None when they were not computed.
    """

    fuel: str
    unit: str
    billed: float
    modelled: float
    typical_year: float
    monthly: bool = False
    nmbe_pct: float | None = None
    cv_rmse_pct: float | None = None
    r2: float | None = None
    meets_guideline_14: bool | None = None
    heating: float = 0.0
    cooling: float = 0.0
    base: float = 0.0
    other: float = 0.0
    solar: float = 0.0
    method: str = ""

    @property
    def annual_error_pct(self) -> float:
        """Modelled against billed yearly use, % (positive: the model uses more; 0.01 % steps)."""
        return round((self.modelled / self.billed - 1.0) * 100.0, 2) + 0.0 if self.billed else 0.0

    def to_dict(self) -> dict[str, Any]:
        return {
            "fuel": self.fuel, "unit": self.unit,
            "billed": _json_number(self.billed), "modelled": _json_number(self.modelled),
            "typical_year": _json_number(self.typical_year), "monthly": self.monthly,
            "nmbe_pct": _json_number(self.nmbe_pct), "cv_rmse_pct": _json_number(self.cv_rmse_pct),
            "r2": _json_number(self.r2), "meets_guideline_14": self.meets_guideline_14,
            "heating": _json_number(self.heating), "cooling": _json_number(self.cooling),
            "base": _json_number(self.base), "other": _json_number(self.other),
            "solar": _json_number(self.solar), "method": self.method,
        }

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> BillFit:
        def opt(key: str) -> float | None:
            v = data.get(key)
            return None if v is None else float(v)

        return cls(
            fuel=data["fuel"], unit=data["unit"], billed=_num(data["billed"]),
            modelled=_num(data["modelled"]), typical_year=_num(data["typical_year"]),
            monthly=bool(data.get("monthly", False)), nmbe_pct=opt("nmbe_pct"),
            cv_rmse_pct=opt("cv_rmse_pct"), r2=opt("r2"),
            meets_guideline_14=data.get("meets_guideline_14"),
            heating=_num(data.get("heating", 0.0)), cooling=_num(data.get("cooling", 0.0)),
            base=_num(data.get("base", 0.0)), other=_num(data.get("other", 0.0)),
            solar=_num(data.get("solar", 0.0)), method=data.get("method", ""),
        )


@dataclass(frozen=True)
class Roadmap:
    """The full result of planning one home.

    ``npv_usd`` is the net present value of the plan relative to the do-nothing baseline
    (benefits minus costs, discounted to ``first_year``), computed from the full simulation, not
    from the solver's linear approximation. ``status`` is ``"ok"`` or ``"infeasible"``; when
    infeasible, ``infeasibility`` explains the blocking constraint and the smallest change that
    makes the request feasible, and ``steps`` is empty. ``assumptions`` records the inputs that
    shaped the result (discount rate, escalation, budget...) as JSON-safe values. ``price_risk``
    is the roadmap under sampled energy prices (None: not computed, e.g. an infeasible request);
    ``meter`` is what the plan's meter file said (None: the plan names none).
    """

    plan_name: str
    first_year: int
    horizon_years: int
    objective: Objective = "best_value"
    steps: tuple[Step, ...] = ()
    years: tuple[YearTotals, ...] = ()
    milestones: tuple[Milestone, ...] = ()
    baselines: tuple[Baseline, ...] = ()
    npv_usd: float = 0.0
    status: Status = "ok"
    infeasibility: str | None = None
    assumptions: dict[str, Any] = field(default_factory=dict)
    cautions: tuple[str, ...] = ()
    emergencies: tuple[Emergency, ...] = ()
    calibration: tuple[BillFit, ...] = ()
    price_risk: PriceRisk | None = None
    meter: MeterSummary | None = None
    schema_version: str = SCHEMA_VERSION

    def __post_init__(self) -> None:
        object.__setattr__(self, "emergencies", _tuple(self.emergencies))
        object.__setattr__(self, "calibration", _tuple(self.calibration))
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
            "emergencies": [e.to_dict() for e in self.emergencies],
            "calibration": [c.to_dict() for c in self.calibration],
            "price_risk": self.price_risk.to_dict() if self.price_risk else None,
            "meter": self.meter.to_dict() if self.meter else None,
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
            objective=canonical(data.get("objective", "best_value")),
            steps=tuple(Step.from_dict(s) for s in data.get("steps", ())),
            years=tuple(YearTotals.from_dict(y) for y in data.get("years", ())),
            milestones=tuple(Milestone.from_dict(m) for m in data.get("milestones", ())),
            baselines=tuple(Baseline.from_dict(b, i) for i, b in enumerate(data.get("baselines", ()))),
            npv_usd=_num(data.get("npv_usd", 0.0)),
            status=data.get("status", "ok"),
            infeasibility=data.get("infeasibility"),
            assumptions=dict(data.get("assumptions", {})),
            cautions=tuple(data.get("cautions", ())),
            emergencies=tuple(Emergency.from_dict(e) for e in data.get("emergencies", ())),
            calibration=tuple(BillFit.from_dict(c) for c in data.get("calibration", ())),
            price_risk=PriceRisk.from_dict(data["price_risk"]) if data.get("price_risk") else None,
            meter=MeterSummary.from_dict(data["meter"]) if data.get("meter") else None,
            schema_version=version,
        )
