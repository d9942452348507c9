"""Build :class:`~homeplan.electrical.loads.Load` objects from an upgrade variant's electrical
fields (the ``va``, ``va_per_ton``, ``strips_kw``, ``strips_interlocked`` and ``amps`` keys of
``homeplan/data/upgrades.yaml`` variants), without importing the catalog.

References
----------
NEC 2020/2023 220.82(C) (heat pump compressor + supplemental heat), 422.13 (water heater
continuous), 625.42 (EV charging continuous).
"""

from __future__ import annotations

from homeplan.electrical.errors import ElectricalInputError
from homeplan.electrical.evse import ev_charger_load
from homeplan.electrical.loads import Load, heat_pump_loads

__all__ = ["loads_for_upgrade"]

_CATEGORY = {
    "water": "water_heater",
    "cooking": "range",
    "drying": "dryer",
    "appliance": "appliance",
    "motor": "motor",
}


def loads_for_upgrade(
    upgrade_category: str,
    *,
    name: str,
    va: float | None = None,
    va_per_ton: float | None = None,
    tons: float | None = None,
    strips_kw: float | None = None,
    strips_interlocked: bool = False,
    amps: float | None = None,
    volts: int = 240,
    existing: bool = False,
) -> tuple[Load, ...]:
    """Loads for one upgrade variant.

    ``upgrade_category``: ``heating`` (heat pump: compressor ``va`` or ``va_per_ton`` x ``tons``,
    plus ``strips_kw`` supplemental heat), ``water``, ``cooking``, ``drying``, ``appliance``,
    ``motor`` (need ``va``), ``vehicles`` (EV charger, needs ``amps``).

    Parameters
    ----------
    upgrade_category : str
        Category of the upgrade, as listed above.
    name : str
        Name of the upgrade, used as the load label.
    va : float or None
        Nameplate of the appliance or heat pump compressor, VA.
    va_per_ton : float or None
        Heat pump compressor nameplate per ton of capacity, VA/ton.
    tons : float or None
        Heat pump capacity, tons.
    strips_kw : float or None
        Supplemental heat strips, kW.
    strips_interlocked : bool
        True if the strips are locked out while the compressor runs.
    amps : float or None
        EV charger current, A.
    volts : int
        Load voltage, V (120, 208 or 240).
    existing : bool
        True if the load is already installed.

    Returns
    -------
    tuple of Load
        The variant's loads, VA at nameplate.

    Raises
    ------
    ElectricalInputError
        If a needed rating is missing, ``tons`` is not positive or the category is unknown.

    References
    ----------
    NEC 2020/2023 220.82(C), 422.13, 625.42.
    """
    if upgrade_category == "heating":
        if va is None:
            if va_per_ton is None or tons is None:
                raise ElectricalInputError(
                    f"upgrade '{name}'", "a heat pump needs va, or va_per_ton and tons"
                )
            if tons <= 0:
                raise ElectricalInputError(f"upgrade '{name}'.tons", f"must be > 0, got {tons!r}")
            va = va_per_ton * tons
        return heat_pump_loads(compressor_va=va, strips_kw=strips_kw or 0.0,
                               interlocked=strips_interlocked, existing=existing, name=name)
    if upgrade_category == "vehicles":
        if amps is None:
            raise ElectricalInputError(f"upgrade '{name}'.amps", "an EV charger needs its current in A")
        return (ev_charger_load(amps, name=name, volts=volts, existing=existing),)
    if upgrade_category not in _CATEGORY:
        raise ElectricalInputError(
            f"upgrade '{name}'.category",
            f"no electrical load for category {upgrade_category!r}; use one of "
            f"{sorted([*_CATEGORY, 'heating', 'vehicles'])}",
        )
    if va is None:
        raise ElectricalInputError(f"upgrade '{name}'.va", "give the nameplate VA of this variant")
    cat = _CATEGORY[upgrade_category]
    return (
        Load(
            name=name,
            va=va,
            category=cat,
            volts=volts,
            continuous=cat == "water_heater",
            ems_eligible=cat == "water_heater",
            existing=existing,
            source="upgrade catalog variant",
        ),
    )
