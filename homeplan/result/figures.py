"""The figures of a planned home that the views show beside the roadmap.

Each is a small frozen dataclass with units in its field names. A figure that was not computed
is ``None`` (never NaN): a load-calculation method that does not apply to the home, a return
that has no rate because the cash flows never change sign.

References
----------
None: data containers. The numbers come from the energy, electrical and money engines, which
cite their sources.
"""

from __future__ import annotations

from dataclasses import dataclass

from homeplan.money.incentives import ProgramTotal

__all__ = [
    "CapacityRow",
    "CapacityState",
    "EnergySummary",
    "Finance",
    "HourlyProfile",
    "PlanReturns",
    "ProgramUse",
    "ProjectInfo",
    "SolarHedge",
    "SolverReport",
    "StepReturns",
]


@dataclass(frozen=True)
class ProjectInfo:
    """A candidate project as the views show it (whether or not the roadmap includes it)."""

    id: str
    kind: str
    label: str
    variant: str | None
    variant_label: str
    size: float
    size_unit: str
    cost_usd: float                # today's installed cost before incentives
    cost_source: str               # "your quote (contractor, date)" or the catalog source
    replaces: tuple[str, ...] = ()
    cautions: tuple[str, ...] = ()  # caution ids (homeplan.catalog.cautions())
    excluded: bool = False
    pinned_year: int | None = None


@dataclass(frozen=True)
class CapacityRow:
    """One line of a load calculation; ``factor`` and ``counted_va`` are None for a load that is
    counted inside a group (the group's line carries the factor)."""

    name: str
    va: float
    factor: float | None
    counted_va: float | None
    section: str


@dataclass(frozen=True)
class CapacityState:
    """The service load calculation for one state of the home.

    ``total_va``, ``amps``, ``headroom_amps`` and ``load_pct`` are None when the method does not
    apply to the home (the notes say why).
    """

    label: str                     # "today", "2028: after Heat pump"
    year: int | None
    method: str                    # e.g. "NEC 2023 220.83(B)"
    total_va: float | None
    amps: float | None
    service_amps: float
    headroom_amps: float | None
    fits: bool
    rows: tuple[CapacityRow, ...] = ()
    remedy: str | None = None      # what the plan does to make it fit, in words
    notes: tuple[str, ...] = ()
    load_pct: float | None = None  # calculated load as a share of the service rating, percent
    near_limit: bool = False       # fits, but above the near-limit share (electrical/data/practice.csv)

    @property
    def applies(self) -> bool:
        """Whether the method gave a result for this home."""
        return self.total_va is not None


@dataclass(frozen=True)
class EnergySummary:
    """A typical year of one state of the home.

    ``peak_kw`` (and its seasons) is the highest hourly average of the modelled year, the figure
    for energy; ``peak_demand_kw`` is the peak a meter would show: today's measured (or
    estimated) peak moved by the design-day demand of the state's big loads.
    """

    label: str
    monthly: dict[str, tuple[float, ...]]   # 'electricity_kwh', 'gas_therm', 'solar_kwh', ... 12 values
    annual: dict[str, float]                # same keys, annual totals
    bills_usd: dict[str, float]             # by fuel, including fixed charges
    emissions_kg: float
    peak_kw: float
    fuel_money_out_usd: float = 0.0         # money that leaves the household for fossil fuel
    peak_winter_kw: float = 0.0
    peak_summer_kw: float = 0.0
    backup_heat_hours: int = 0              # hours a year the heat pump's backup heat runs
    solar_kwh_per_kw: float = 0.0           # specific yield of the array, when there is one
    peak_demand_kw: float | None = None     # the peak a meter would show (see planner/peaks.py)
    peak_demand_winter_kw: float | None = None
    peak_demand_summer_kw: float | None = None


ProgramUse = ProgramTotal
"""How much one incentive program pays in this roadmap (program_id, name, kind, paid_by_year,
caps_note, ends): the money engine's own per-program total."""


@dataclass(frozen=True)
class PlanReturns:
    """The whole plan against doing nothing: its yearly cash flows and their returns."""

    flows_usd: tuple[float, ...]
    npv_vs_do_nothing_usd: float
    irr_pct: float | None
    simple_payback_years: float | None
    discounted_payback_years: float | None


@dataclass(frozen=True)
class StepReturns:
    """One step alone: its net cost up front, then its bill savings over its life."""

    first_year_savings_usd: float
    npv_over_life_usd: float
    irr_pct: float | None
    simple_payback_years: float | None
    discounted_payback_years: float | None


@dataclass(frozen=True)
class SolarHedge:
    """What the plan's solar (and battery) lock in per kWh, beside the utility's price."""

    lcoe_usd_per_kwh: float
    utility_levelised_usd_per_kwh: float
    utility_first_year_usd_per_kwh: float
    utility_last_year_usd_per_kwh: float
    life_years: int
    includes_battery: bool
    degradation_pct_per_year: float


@dataclass(frozen=True)
class Finance:
    """Household finance figures of a roadmap: the plan, each step (by project id), the solar."""

    plan: PlanReturns
    projects: dict[str, StepReturns]
    solar_hedge: SolarHedge | None = None


@dataclass(frozen=True)
class SolverReport:
    """How the schedule was found: the solver's status (``optimal``: proven within the relative
    gap; ``time_limit``: the best plan found when the time cap stopped the search), its wall time
    in seconds, the number of passes, the relative optimality gap it reported and whether a
    presolved answer had to be repeated without presolve."""

    status: str
    seconds: float
    passes: int
    mip_gap: float | None = None
    presolve_retried: bool = False

    def to_dict(self) -> dict[str, object]:
        """JSON-safe dict (the ``solver`` key of ``homeplan plan --json`` and the export)."""
        gap = self.mip_gap
        return {"status": self.status, "seconds": round(self.seconds, 4), "passes": self.passes,
                "mip_gap": None if gap is None or gap != gap else gap,
                "presolve_retried": self.presolve_retried}


@dataclass(frozen=True)
class HourlyProfile:
    """Hour-by-hour electricity of a typical year in one state of the home (8760 values, kW)."""

    label: str
    load_kw: tuple[float, ...]
    solar_kw: tuple[float, ...]
    grid_import_kw: tuple[float, ...]
    grid_export_kw: tuple[float, ...]
