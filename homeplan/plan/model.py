"""The plan file model: every section a plan file may hold, typed and validated.

Units live in the field names (``floor_area_ft2``, ``capacity_btuh``). The loader converts
SI spellings (``floor_area_m2``, ``heating_design_c``) to these internal units before validation,
so everything downstream sees one set of units: temperature F, area ft2, heat Btu/h, power kW,
energy kWh, fuels in their trade units (therm, gallon), money USD.

The models are frozen: a loaded plan is a snapshot. Edits go through the YAML document
(:mod:`homeplan.plan.document`) so that comments and key order survive, and are re-validated.
"""

from __future__ import annotations

import datetime as dt
from typing import Annotated, Any, Literal

from pydantic import BaseModel, ConfigDict, Field, field_validator, model_validator

from homeplan.plan.objectives import canonical

__all__ = [
    "FORMAT_VERSION",
    "Advisor",
    "Alternative",
    "Appliance",
    "Budget",
    "Choices",
    "Climate",
    "Display",
    "ElectricPrice",
    "ElectricUsage",
    "Electrical",
    "ElectricalLoad",
    "EmergencyFunds",
    "ExistingBattery",
    "ExistingSolar",
    "GallonPrice",
    "GallonUsage",
    "GasPrice",
    "GasUsage",
    "Home",
    "Household",
    "Loan",
    "Location",
    "Plan",
    "PriceUncertainty",
    "Prices",
    "ProjectOption",
    "Provenance",
    "Roof",
    "Section",
    "TimeOfUsePeriod",
    "Usage",
    "Vehicle",
]

FORMAT_VERSION = 2
"""The plan file format this homeplan writes. Older files are migrated on load
(:mod:`homeplan.plan.migrate`); format 2 renamed the objectives."""

Year = Annotated[int, Field(ge=1900, le=2100)]
Pct = Annotated[float, Field(ge=0, le=100)]
Money = Annotated[float, Field(ge=0, le=1e9)]
"""USD, zero or more; a billion dollars is past any one home (and keeps sums finite)."""


class Section(BaseModel):
    """Base for every section: unknown keys are errors, values are immutable."""

    model_config = ConfigDict(extra="forbid", frozen=True, populate_by_name=True, allow_inf_nan=False)


# ---------------------------------------------------------------- provenance and display


class Provenance(Section):
    """Who prepared the file, for whom and when; shown on shared plans and printouts."""

    prepared_by: str | None = Field(None, description="Person or company that prepared the plan.")
    prepared_for: str | None = Field(None, description="Household the plan is for.")
    date: dt.date | None = Field(None, description="Date the plan was prepared (YYYY-MM-DD).")
    tool_version: str | None = Field(None, description="homeplan version that wrote the file.")
    notes: str | None = Field(None, description="Free text for the other party.")


class Advisor(Section):
    """The advisor or contractor who prepared the plan: printed as a block on the summary, with
    the quote's date and how long it holds."""

    company: str | None = Field(None, description="Company name.")
    name: str | None = Field(None, description="The person to contact.")
    license_number: str | None = Field(None, description="Contractor or trade license number.")
    phone: str | None = None
    email: str | None = None
    website: str | None = None
    address: str | None = None
    quote_date: dt.date | None = Field(None, description="Date of the quote (YYYY-MM-DD).")
    quote_valid_days: int | None = Field(None, ge=1, le=730, description="Days the quote holds.")
    quote_valid_until: dt.date | None = Field(None, description="Last day the quote holds.")

    @model_validator(mode="after")
    def _one_validity(self) -> Advisor:
        if self.quote_valid_days is not None and self.quote_valid_until is not None:
            raise ValueError("give quote_valid_days or quote_valid_until, not both: keep one")
        if self.quote_valid_days is not None and self.quote_date is None:
            raise ValueError("quote_valid_days counts from quote_date: add quote_date")
        if (self.quote_valid_until is not None and self.quote_date is not None
                and self.quote_valid_until < self.quote_date):
            raise ValueError("quote_valid_until is before quote_date: check the dates")
        return self

    @property
    def valid_until(self) -> dt.date | None:
        """The last day the quote holds (from the date and the days, or as given)."""
        if self.quote_valid_until is not None:
            return self.quote_valid_until
        if self.quote_date is not None and self.quote_valid_days is not None:
            return self.quote_date + dt.timedelta(days=self.quote_valid_days)
        return None


class Display(Section):
    """How numbers are shown; the file itself always stores the units named in its keys."""

    units: Literal["us", "si"] = Field("us", description="us: F, ft2, Btu/h; si: C, m2, kW.")


# ---------------------------------------------------------------- the home


class Location(Section):
    latitude: float = Field(ge=-90, le=90, description="Decimal degrees, north positive.")
    longitude: float = Field(ge=-180, le=180, description="Decimal degrees, east positive.")
    elevation_ft: float | None = Field(None, ge=-1500, le=15000)
    timezone: str | None = Field(None, description="IANA name, e.g. America/Chicago.")
    place: str | None = Field(None, description="A name for the place, for display only.")


class Climate(Section):
    """Climate numbers; any that are missing come from the weather file or the location."""

    hdd65: float | None = Field(None, ge=0, le=20000, description="Heating degree days, base 65 F.")
    cdd65: float | None = Field(None, ge=0, le=10000, description="Cooling degree days, base 65 F.")
    heating_design_f: float | None = Field(
        None, ge=-60, le=70, description="99 % heating design dry-bulb temperature."
    )
    cooling_design_f: float | None = Field(
        None, ge=50, le=125, description="1 % cooling design dry-bulb temperature."
    )
    cloudiness: float | None = Field(
        None, ge=0, le=1, description="0 clear to 1 overcast; used by the built-in typical year."
    )
    weather_file: str | None = Field(
        None, description="Path to an EPW or TMY3 file, relative to the plan file."
    )


class ElectricalLoad(Section):
    """One load an installer knows from the nameplate."""

    name: str
    va: float = Field(gt=0, le=100000, description="Nameplate volt-amperes.")
    kind: (
        Literal[
            "general",
            "appliance",
            "range",
            "dryer",
            "water_heater",
            "heating",
            "cooling",
            "heat_pump",
            "supplemental_heat",
            "ev_charger",
            "motor",
            "other",
        ]
        | None
    ) = "appliance"
    continuous: bool = False
    voltage_v: Literal[120, 208, 240] = 240


class Electrical(Section):
    """The electrical service and main panel."""

    service_amps: int = Field(ge=30, le=1200, description="Rating of the service conductors.")
    busbar_amps: int | None = Field(
        None, ge=30, le=1200, description="Panel busbar rating (label inside the door)."
    )
    main_breaker_amps: int | None = Field(None, ge=30, le=1200)
    voltage_v: Literal[240, 208] = 240
    free_spaces: int | None = Field(None, ge=0, le=84, description="Empty breaker spaces.")
    peak_demand_kw: float | None = Field(
        None, gt=0, le=500, description="Highest 15-minute demand over the period measured."
    )
    peak_demand_period: Literal["12_months", "30_days"] = "12_months"
    continuous_loads_at_125: bool = Field(
        True, description="With a measured peak (NEC 220.87): count continuous new loads such as "
        "chargers at 125 % (the conservative reading; ask the inspector).")
    small_appliance_circuits: int = Field(2, ge=0, le=20)
    laundry_circuits: int = Field(1, ge=0, le=5)
    loads: list[ElectricalLoad] | None = Field(
        None, description="Explicit load list; replaces the loads derived from the appliances."
    )
    code_edition: Literal[2020, 2023, 2026] = 2023

    @property
    def main_rating_amps(self) -> int:
        """The main breaker's rating: as entered, else the service rating."""
        return self.main_breaker_amps or self.service_amps

    @property
    def busbar_rating_amps(self) -> int:
        """The busbar's rating: as entered, else the main breaker's (the panel is usually rated
        for its main; NEC 2023 705.12(B) reads the busbar's own label when it differs)."""
        return self.busbar_amps or self.main_rating_amps

    @model_validator(mode="after")
    def _panel_consistent(self) -> Electrical:
        if self.main_breaker_amps is not None and self.main_breaker_amps > self.service_amps:
            raise ValueError(
                f"main_breaker_amps {self.main_breaker_amps} is larger than service_amps "
                f"{self.service_amps}: the service rating is usually the main breaker's size (check both)"
            )
        bus = self.busbar_rating_amps
        main = self.main_rating_amps
        if bus < main:
            raise ValueError(
                f"busbar_amps {bus} is smaller than main_breaker_amps {main}: a busbar must be "
                "rated at least as high as the main breaker (check the panel label)"
            )
        return self


RoofMaterial = Literal["asphalt_shingle", "metal", "tile", "slate", "wood_shake", "membrane"]


class Roof(Section):
    year_installed: Year | None = None
    material: RoofMaterial = "asphalt_shingle"
    usable_area_ft2: float | None = Field(None, ge=0, le=20000, description="Area fit for panels.")
    tilt_deg: float = Field(22.6, ge=0, le=90, description="22.6 deg is a 5-in-12 pitch.")
    azimuth_deg: float = Field(180, ge=0, lt=360, description="Direction faced; 180 is south.")
    shading_pct: Pct = 0


class ExistingSolar(Section):
    size_kw: float = Field(gt=0, le=100, description="DC nameplate of the array.")
    inverter_kw: float | None = Field(None, gt=0, le=100, description="AC rating.")
    year_installed: Year | None = None
    tilt_deg: float | None = Field(None, ge=0, le=90)
    azimuth_deg: float | None = Field(None, ge=0, lt=360)


class ExistingBattery(Section):
    capacity_kwh: float = Field(gt=0, le=200)
    power_kw: float = Field(gt=0, le=50)
    year_installed: Year | None = None


class Home(Section):
    name: str | None = None
    location: Location | None = None
    climate: Climate = Climate()
    floor_area_ft2: float = Field(gt=100, le=30000, description="Conditioned floor area.")
    year_built: Year | None = None
    stories: int = Field(1, ge=1, le=5)
    occupants: int = Field(3, ge=1, le=20)
    has_ducts: bool | None = Field(None, description="Default: yes when a furnace or central AC exists.")
    envelope: Literal["leaky", "average", "tight"] = "average"
    electrical: Electrical
    roof: Roof | None = None
    solar: ExistingSolar | None = None
    battery: ExistingBattery | None = None

    @model_validator(mode="after")
    def _located(self) -> Home:
        c = self.climate
        if self.location is None and c.weather_file is None and (c.hdd65 is None or c.heating_design_f is None):
            raise ValueError(
                "the home needs a location (latitude/longitude), a climate.weather_file, or at "
                "least climate.hdd65 and climate.heating_design_f"
            )
        return self


# ---------------------------------------------------------------- appliances and vehicles

ApplianceKind = Literal[
    "furnace",
    "boiler",
    "central_ac",
    "room_ac",
    "heat_pump",
    "mini_split",
    "baseboard",
    "water_heater",
    "range",
    "cooktop",
    "wall_oven",
    "dryer",
]
Fuel = Literal["gas", "propane", "oil", "electric", "wood"]
VehicleFuel = Literal["gasoline", "diesel", "hybrid", "plug_in_hybrid", "electric"]
Condition = Literal["good", "fair", "poor", "failing", "failed"]


class Appliance(Section):
    """An appliance the home has today."""

    id: str | None = Field(None, pattern=r"^[a-z][a-z0-9_]*$", description="Defaults to the kind.")
    kind: ApplianceKind
    fuel: Fuel | None = Field(None, description="Default from the kind (e.g. furnace: gas).")
    type: Literal["storage", "tankless", "heat_pump", "resistance", "condensing", "vented"] | None = None
    year_installed: Year | None = Field(None, description="Unknown: assumed at mid-life.")
    afue: float | None = Field(None, gt=0.3, le=1.0, description="Furnace/boiler AFUE, 0-1.")
    uef: float | None = Field(None, gt=0.3, le=5.0, description="Water heater UEF.")
    seer2: float | None = Field(None, gt=5, le=40)
    hspf2: float | None = Field(None, gt=3, le=15)
    seer: float | None = Field(None, gt=5, le=40, description="A pre-2023 rating (equipment made "
                               "before 2023): converted to SEER2. Give seer or seer2, not both.")
    hspf: float | None = Field(None, gt=3, le=15, description="A pre-2023 rating: converted to "
                               "HSPF2. Give hspf or hspf2, not both.")
    eer2: float | None = Field(None, gt=4, le=30, description="Full-load cooling efficiency at 95 F "
                               "outdoors, Btu/Wh (sets the summer peak demand).")
    eer: float | None = Field(None, gt=4, le=30, description="A pre-2023 rating: converted to EER2. "
                              "Give eer or eer2, not both.")
    capacity_btuh: float | None = Field(None, gt=0, le=500000)
    tank_gal: float | None = Field(None, gt=0, le=200)
    nameplate_va: float | None = Field(None, gt=0, le=60000)
    condition: Condition = "good"
    problems: str | None = Field(None, description="Known problems, in words.")

    @property
    def key(self) -> str:
        return self.id or self.kind


class Vehicle(Section):
    id: str | None = Field(None, pattern=r"^[a-z][a-z0-9_]*$")
    name: str | None = None
    fuel: VehicleFuel = "gasoline"
    body: Literal["car", "suv", "truck"] = "car"
    mpg: float | None = Field(None, gt=5, le=150)
    kwh_per_mile: float | None = Field(None, gt=0.1, le=1.0)
    miles_per_year: float = Field(11000, ge=0, le=100000)
    year_acquired: Year | None = None
    model_year: Year | None = None
    replace_year: Year | None = Field(None, description="When the household plans to replace it.")


# ---------------------------------------------------------------- energy use (bills)


class ElectricUsage(Section):
    annual_kwh: float | None = Field(None, ge=0, le=500000)
    monthly_kwh: list[Annotated[float, Field(ge=0, le=500000)]] | None = Field(
        None, min_length=12, max_length=12, description="January to December."
    )
    bills_show: Literal["used", "net", "bought"] | None = Field(
        None,
        description="What the kWh on the bills are when the home has solar: 'net' (bought minus "
        "sent back, as under net metering), 'bought' (only what came from the grid; what was sent "
        "back is credited apart) or 'used' (the home's whole use). Without solar they are 'used'; "
        "with solar and no answer, 'net' is assumed.",
    )


class GasUsage(Section):
    annual_therms: float | None = Field(None, ge=0, le=50000)
    monthly_therms: list[Annotated[float, Field(ge=0, le=50000)]] | None = Field(
        None, min_length=12, max_length=12, description="January to December."
    )


class GallonUsage(Section):
    annual_gal: float | None = Field(None, ge=0, le=20000)
    monthly_gal: list[Annotated[float, Field(ge=0, le=20000)]] | None = Field(
        None, min_length=12, max_length=12, description="January to December (deliveries averaged)."
    )


class Usage(Section):
    """Energy use from the household's bills; used to calibrate the model."""

    year: Year | None = None
    weather_file: str | None = Field(
        None,
        description="EPW or TMY3-format file of the weather during the billed year, relative to "
        "the plan file; the bills are then weather-normalised to the typical year.",
    )
    meter_file: str | None = Field(
        None, description="Green Button interval data (ESPI XML or CSV, 15-minute or hourly), "
        "relative to the plan file: twelve complete months stand in for the electric bills, and "
        "a continuous 15-minute record gives the measured peak demand (NEC 220.87).")
    electricity: ElectricUsage | None = None
    gas: GasUsage | None = None
    propane: GallonUsage | None = None
    oil: GallonUsage | None = None


class Household(Section):
    ami_pct: float | None = Field(
        None, ge=0, le=1000, description="Household income as % of area median income (AMI)."
    )
    federal_tax_liability_usd: Money | None = Field(None, description="Typical yearly federal tax.")
    state_tax_liability_usd: Money | None = None


# ---------------------------------------------------------------- prices


class TimeOfUsePeriod(Section):
    name: str
    usd_per_kwh: float = Field(ge=0, le=5)
    start_hour: int = Field(ge=0, le=23)
    end_hour: int = Field(ge=1, le=24, description="Exclusive; 24 is midnight.")
    months: list[Annotated[int, Field(ge=1, le=12)]] = list(range(1, 13))
    weekdays_only: bool = False


class ElectricPrice(Section):
    usd_per_kwh: float = Field(0.17, ge=0, le=5, description="Flat rate, or off-peak base rate.")
    fixed_usd_per_month: Money = 12.0
    time_of_use: list[TimeOfUsePeriod] | None = None
    export: Literal["net_metering", "net_billing", "none"] = "net_metering"
    export_usd_per_kwh: float | None = Field(None, ge=0, le=5, description="For net billing.")
    escalation_pct: float | None = Field(None, ge=-20, le=50, description="Default: inflation.")


class GasPrice(Section):
    usd_per_therm: float = Field(1.45, ge=0, le=20)
    fixed_usd_per_month: Money = 15.0
    escalation_pct: float | None = Field(None, ge=-20, le=50)


class GallonPrice(Section):
    usd_per_gal: float = Field(ge=0, le=20)
    fixed_usd_per_month: Money = 0.0
    escalation_pct: float | None = Field(None, ge=-20, le=50)


def _gallon(price: float) -> Any:
    return Field(default_factory=lambda: GallonPrice(usd_per_gal=price))


class PriceUncertainty(Section):
    """How the price risk of a roadmap is sampled (homeplan/money/prices.py)."""

    paths: int = Field(2000, ge=100, le=100000, description="Number of sampled price paths.")
    seed: int = Field(1, ge=0, description="Seed of the paths: the same seed gives the same figures.")
    drift: Literal["plan", "history"] = Field(
        "plan", description="plan: paths centred on the plan's escalation; history: on the "
        "historic trend of each price.")
    volatility_factor: float = Field(
        1.0, ge=0, le=5, description="Multiplies the historic volatilities (0: one certain path).")


class Prices(Section):
    """Energy prices today and how they change; defaults are US averages (see data/prices.csv)."""

    electricity: ElectricPrice = ElectricPrice()
    gas: GasPrice = GasPrice()
    propane: GallonPrice = _gallon(2.55)
    oil: GallonPrice = _gallon(3.6)
    gasoline: GallonPrice = _gallon(3.1)
    diesel: GallonPrice = _gallon(3.7)
    inflation_pct: float = Field(2.5, ge=-5, le=30)
    fossil_extra_escalation_pct: float = Field(
        0.0, ge=-10, le=30, description="Added to inflation for gas, propane, oil and gasoline."
    )
    grid_kg_co2_per_kwh: float | None = Field(
        None, ge=0, le=1.5, description="Default: the US average in data/emission_factors.csv."
    )
    cost_level: Literal["low", "typical", "high"] = Field(
        "typical", description="Which catalog cost to use when there is no quote."
    )
    uncertainty: PriceUncertainty = PriceUncertainty()


# ---------------------------------------------------------------- budget and choices


class Loan(Section):
    name: str
    amount_usd: Money
    rate_pct: float = Field(ge=0, le=40)
    term_years: int = Field(ge=1, le=40)


class EmergencyFunds(Section):
    """How the household pays for an essential replacement (heat, hot water) beyond the year's
    budget: savings first, then a loan on these terms; what neither covers is over budget."""

    savings_usd: Money = Field(0, description="Savings that can go to an emergency replacement.")
    loan_rate_pct: float | None = Field(None, ge=0, le=40, description="Emergency loan rate.")
    loan_term_years: int | None = Field(None, ge=1, le=40, description="Emergency loan term.")

    @model_validator(mode="after")
    def _loan_complete(self) -> EmergencyFunds:
        if (self.loan_rate_pct is None) != (self.loan_term_years is None):
            raise ValueError("an emergency loan needs both loan_rate_pct and loan_term_years")
        return self


class Budget(Section):
    usd_per_year: Money = Field(description="What the household can spend each year.")
    first_year: Year | None = Field(None, description="Default: next calendar year.")
    horizon_years: int = Field(10, ge=1, le=30)
    carryover: bool = Field(True, description="Unspent money rolls into the next year.")
    add_bill_savings: bool = Field(False, description="Add each year's bill savings to later budgets.")
    discount_rate_pct: float = Field(3.0, ge=0, le=30)
    by_year: dict[Year, Money] | None = Field(None, description="Budgets that differ by year.")
    loans: list[Loan] = []
    emergency: EmergencyFunds | None = Field(
        None, description="How a failed heating system or water heater is paid for beyond the budget."
    )


class ProjectOption(Section):
    """Overrides for one upgrade: a contractor quote, chosen equipment, a size."""

    cost_usd: Money | None = Field(None, description="Contractor quote, before incentives.")
    quote_date: dt.date | None = None
    contractor: str | None = None
    variant: str | None = Field(None, description="One of the upgrade's variants in the catalog.")
    size: float | None = Field(None, gt=0, le=1000,
                               description="In the upgrade's size unit (tons, kW, kWh...).")
    hspf2: float | None = Field(None, gt=3, le=15)
    seer2: float | None = Field(None, gt=5, le=40)
    uef: float | None = Field(None, gt=0.3, le=5)
    cop_5f: float | None = Field(None, ge=1, le=5, description="Heat pump COP at 5 F.")
    capacity_5f_pct: float | None = Field(None, ge=10, le=130, description="Capacity at 5 F, % of 47 F.")
    amps: float | None = Field(None, gt=0, le=400, description="Charger or service amps.")
    backup: Literal["electric", "existing"] | None = Field(
        None, description="Heat pump backup heat: electric (strips or heaters, the default) or "
        "existing (keep the fuel-burning furnace or boiler as a dual-fuel backup).")


Objective = Literal["best_value", "lowest_emissions", "home_fuel_off_soonest", "least_out_of_pocket",
                    "risk_aware"]
"""The keys of :data:`homeplan.plan.objectives.OBJECTIVES`."""


class Choices(Section):
    objective: Objective = Field("best_value", description="What the roadmap aims for (see "
                                 "homeplan.plan.objectives); older spellings such as npv are read.")
    pins: dict[str, Year] = Field({}, description="Project id -> the year it must happen.")
    exclude: list[str] = Field([], description="Project ids to leave out.")
    require_before: dict[str, list[str]] = Field(
        {}, description="Extra order: project id -> projects that must be done first."
    )
    all_electric: bool = Field(
        True, description="Take the home off gas, oil, propane and gasoline within the horizon."
    )
    all_electric_by: Year | None = Field(
        None, description="A firm year for fully electric; the plan is infeasible if it cannot."
    )
    max_projects_per_year: int | None = Field(None, ge=1, le=20)
    replace_at_risk_pct: float = Field(
        50, gt=0, lt=100, description="Replace an appliance by the year its failure risk reaches this."
    )
    failed_now: list[str] = Field([], description="Appliance ids to treat as failed this year.")
    risk_weight: float = Field(
        1.0, ge=0, le=100, description="risk_aware objective: weight of the worst price paths' "
        "cost (CVaR) beside the expected cost.")
    risk_tail_pct: float = Field(
        10, gt=0, le=100, description="risk_aware objective: the share of worst price paths whose "
        "mean cost is weighed.")
    risk_scenarios: int = Field(
        100, ge=10, le=1000, description="risk_aware objective: price scenarios optimised over.")

    @field_validator("objective", mode="before")
    @classmethod
    def _older_objective_names(cls, value: Any) -> Any:
        return canonical(value) if isinstance(value, str) else value


# ---------------------------------------------------------------- named options


class Alternative(Section):
    """A named option of the same plan: changes to its sections (different budgets, with or
    without solar, keep the furnace as backup...), compared side by side with ``homeplan
    compare`` and in the app."""

    name: str = Field(min_length=1, max_length=80, description="What the option is called.")
    description: str | None = Field(None, max_length=500, description="The option in a sentence.")
    changes: dict[str, Any] = Field(
        {}, description="Plan sections as in the file; mappings are merged key by key into the "
        "plan, any other value (a list, a number) replaces the plan's.")


# ---------------------------------------------------------------- the whole plan


class Plan(Section):
    """A home, its owner's budget and choices: everything homeplan needs to make a roadmap."""

    format_version: int = Field(FORMAT_VERSION, description="Plan file format version.")
    provenance: Provenance = Provenance()
    advisor: Advisor | None = Field(None, description="Who prepared the plan (printed as a block).")
    display: Display = Display()
    home: Home
    appliances: list[Appliance] = Field([], max_length=40, description="At most 40 (one home).")
    vehicles: list[Vehicle] = Field([], max_length=12, description="At most 12.")
    usage: Usage | None = None
    household: Household = Household()
    prices: Prices = Prices()
    budget: Budget
    incentives: list[dict[str, Any]] = Field(
        [], max_length=200, description="Incentive programs as data (see docs/plan-format.md#incentives)."
    )
    incentive_files: list[str] = Field(
        [], max_length=20, description="Paths (relative to the plan file) of incentive catalogs to include."
    )
    options: dict[str, ProjectOption] = Field({}, description="Project id -> overrides.")
    choices: Choices = Choices()
    alternatives: list[Alternative] = Field(
        [], description="Named options of this plan, each a set of changes (see docs/plan-format.md).")

    @model_validator(mode="after")
    def _alternatives_distinct(self) -> Plan:
        names = [a.name.strip().lower() for a in self.alternatives]
        for i, n in enumerate(names):
            if n in names[:i]:
                raise ValueError(f"alternatives[{i}] repeats the name '{self.alternatives[i].name}': "
                                 "give each option its own name")
            if "alternatives" in self.alternatives[i].changes:
                raise ValueError(f"alternatives[{i}] changes 'alternatives': an option cannot hold options")
        return self

    @model_validator(mode="after")
    def _ids_unique(self) -> Plan:
        seen: dict[str, str] = {}
        for group, items in (("appliances", self.appliances), ("vehicles", self.vehicles)):
            for i, item in enumerate(items):
                key = item.key if isinstance(item, Appliance) else (item.id or f"vehicle{i + 1}")
                if key in seen:
                    raise ValueError(
                        f"{group}[{i}] has id '{key}' already used by {seen[key]}: give each "
                        "appliance and vehicle its own id"
                    )
                seen[key] = f"{group}[{i}]"
        return self

    @property
    def first_year(self) -> int:
        """The first planning year: the budget's, or next calendar year."""
        return self.budget.first_year or (dt.date.today().year + 1)

    def vehicle_key(self, index: int) -> str:
        v = self.vehicles[index]
        return v.id or f"vehicle{index + 1}"
