"""Electrical capacity engine: NEC 220 load calculations, 705.12 solar/battery backfeed limits,
625 EV charger circuits and energy management, and the cheapest remedy when a plan does not fit.

All results are planning estimates; a licensed electrician, a permit and the local inspector
(AHJ) decide.

References
----------
NFPA 70 (NEC) 2020 and 2023 (2026 optional): 220.82, 220.83, 220.87, 220.70, 750.30, 705.11,
705.12(B), 625.41, 625.42, 240.6(A), 230.79(C).
"""

from homeplan.electrical.errors import ElectricalInputError, MethodNotApplicableError
from homeplan.electrical.evse import (
    EvseCircuit,
    ems_counted_va,
    ev_charger_load,
    evse_breaker_amps,
    evse_circuit,
    evse_load_va,
    next_standard_ocpd_amps,
    rated_charger_amps,
)
from homeplan.electrical.loads import (
    CATEGORIES,
    HVAC_CATEGORIES,
    Dwelling,
    Ems,
    Load,
    Service,
    heat_pump_loads,
    nameplate_load,
)
from homeplan.electrical.nec220 import (
    CAUTION,
    BreakdownRow,
    LoadCalcResult,
    MeasuredDemand,
    nec220_82,
    nec220_83,
    nec220_87,
    peak_kw_bound_from_hourly_kwh,
)
from homeplan.electrical.nec705 import (
    BackfeedResult,
    DeratedMainOption,
    backfeed_check,
    derated_main_options,
    max_inverter_amps,
)
from homeplan.electrical.remedies import (
    ProposedLoad,
    Remedy,
    RemedyCosts,
    ServiceUpgrade,
    Variant,
    find_remedy,
)
from homeplan.electrical.report import PlanState, capacity_report, format_breakdown_text
from homeplan.electrical.tables import EDITIONS
from homeplan.electrical.upgrade_loads import loads_for_upgrade

__all__ = [
    "CATEGORIES",
    "CAUTION",
    "EDITIONS",
    "HVAC_CATEGORIES",
    "BackfeedResult",
    "BreakdownRow",
    "DeratedMainOption",
    "Dwelling",
    "ElectricalInputError",
    "Ems",
    "EvseCircuit",
    "Load",
    "LoadCalcResult",
    "MeasuredDemand",
    "MethodNotApplicableError",
    "PlanState",
    "ProposedLoad",
    "Remedy",
    "RemedyCosts",
    "Service",
    "ServiceUpgrade",
    "Variant",
    "backfeed_check",
    "capacity_report",
    "derated_main_options",
    "ems_counted_va",
    "ev_charger_load",
    "evse_breaker_amps",
    "evse_circuit",
    "evse_load_va",
    "find_remedy",
    "format_breakdown_text",
    "heat_pump_loads",
    "loads_for_upgrade",
    "max_inverter_amps",
    "nameplate_load",
    "nec220_82",
    "nec220_83",
    "nec220_87",
    "next_standard_ocpd_amps",
    "peak_kw_bound_from_hourly_kwh",
    "rated_charger_amps",
]
