"""Heat pump and air conditioner ratings: pre-2023 metrics to the current ones, and seasonal energy.

Equipment rated before 2023 carries SEER, EER and HSPF from the DOE test procedure in 10 CFR 430
Subpart B Appendix M; equipment made from 2023 carries SEER2, EER2 and HSPF2 from Appendix M1,
which tests ducted systems at higher external static pressure and so gives lower numbers for the
same equipment. DOE publishes no single conversion factor (it restated its standards in the new
metrics level by level); the factors used here are the RESNET MINHERS Addendum 71 table for
SEER and HSPF, and the ratio of DOE's paired southwest standard levels for EER. They are
planning conversions for equipment whose current rating is not known - a data sheet's SEER2,
EER2 or HSPF2 is always better. Factors live in ``data/rating_conversions.csv`` with their
sources.

HSPF, HSPF2, SEER and SEER2 are seasonal ratios in Btu per Wh, so the seasonal electricity of a
heat pump is the heat it delivers divided by HSPF2 x 1,000 (and likewise for cooling with
SEER2).

References
----------
DOE 10 CFR 430 Subpart B Appendices M and M1 (test procedures; the M1 metrics SEER2, EER2,
HSPF2 are required from 2023-01-01). DOE test procedure final rule, 82 FR 1426 (2017-01-05),
which established Appendix M1. RESNET MINHERS Addendum 71, SEER2/HSPF2 conversions.
10 CFR 430.32(c): the standards from 2023-01-01 (southwest EER/EER2 levels, from memory).
"""

from __future__ import annotations

import numpy as np

from homeplan.energy._data import read_table

__all__ = [
    "SYSTEMS",
    "conversion_factor",
    "eer2_from_eer",
    "hspf2_from_hspf",
    "seasonal_cooling_kwh",
    "seasonal_heating_kwh",
    "seer2_from_seer",
]

SYSTEMS: tuple[str, ...] = ("split", "single_package", "small_duct_high_velocity", "space_constrained")
"""Equipment types of the conversion table; ``split`` is the default when the type is unknown
(ductless mini-splits are split systems)."""


def conversion_factor(metric: str, system: str = "split") -> float:
    """The new-metric / old-metric factor for one rating and equipment type.

    Parameters
    ----------
    metric : str
        ``seer``, ``eer`` or ``hspf`` (the pre-2023 rating being converted).
    system : str
        One of :data:`SYSTEMS`; ``split`` when not known.

    Returns
    -------
    float
        SEER2/SEER, EER2/EER or HSPF2/HSPF, dimensionless.

    Raises
    ------
    ValueError
        If the metric or the equipment type is unknown, or the table has no factor for the pair.

    References
    ----------
    RESNET MINHERS Addendum 71 (SEER, HSPF); DOE's paired standard levels in 10 CFR 430.32(c)
    (EER, from memory). Sources per row in ``data/rating_conversions.csv``.
    """
    if metric not in ("seer", "eer", "hspf"):
        raise ValueError(f"unknown rating {metric!r}: use seer, eer or hspf")
    if system not in SYSTEMS:
        raise ValueError(f"unknown equipment type {system!r}: use one of {', '.join(SYSTEMS)}")
    for row in read_table("rating_conversions"):
        if row["system"] == system and row["metric"] == metric:
            return float(row["factor"])
    raise ValueError(f"no {metric.upper()} conversion for {system.replace('_', ' ')} equipment "
                     "in the table: give the equipment's current rating instead")


def _convert(value: float, metric: str, system: str, low: float, high: float) -> float:
    v = float(value)
    if not np.isfinite(v) or not low <= v <= high:
        raise ValueError(f"{metric.upper()} {value!r} is outside {low:g}-{high:g}: check the "
                         "rating (a pre-2023 rating, Btu per Wh)")
    return v * conversion_factor(metric, system)


def seer2_from_seer(seer: float, system: str = "split") -> float:
    """SEER2 (Appendix M1) of equipment rated in SEER (Appendix M).

    Parameters
    ----------
    seer : float
        Pre-2023 seasonal energy efficiency ratio, Btu/Wh (5-40).
    system : str
        Equipment type, one of :data:`SYSTEMS`.

    Returns
    -------
    float
        SEER2, Btu/Wh.

    Raises
    ------
    ValueError
        If the rating is outside 5-40 or the type is unknown.

    References
    ----------
    RESNET MINHERS Addendum 71: SEER2 = 0.95 SEER (split), 0.96 (single package).
    """
    return _convert(seer, "seer", system, 5.0, 40.0)


def eer2_from_eer(eer: float, system: str = "split") -> float:
    """EER2 (Appendix M1) of equipment rated in EER (Appendix M).

    Parameters
    ----------
    eer : float
        Pre-2023 energy efficiency ratio at 95 F outdoor, Btu/Wh (4-30).
    system : str
        ``split`` or ``single_package``.

    Returns
    -------
    float
        EER2, Btu/Wh.

    Raises
    ------
    ValueError
        If the rating is outside 4-30 or the table has no factor for the type.

    References
    ----------
    DOE 10 CFR 430.32(c) southwest levels from 2023, stated in both metrics (from memory):
    EER2 = 0.96 EER.
    """
    return _convert(eer, "eer", system, 4.0, 30.0)


def hspf2_from_hspf(hspf: float, system: str = "split") -> float:
    """HSPF2 (Appendix M1, region IV) of a heat pump rated in HSPF (Appendix M).

    Parameters
    ----------
    hspf : float
        Pre-2023 heating seasonal performance factor, Btu/Wh (3-15).
    system : str
        Equipment type, one of :data:`SYSTEMS`.

    Returns
    -------
    float
        HSPF2, Btu/Wh.

    Raises
    ------
    ValueError
        If the rating is outside 3-15 or the type is unknown.

    References
    ----------
    RESNET MINHERS Addendum 71: HSPF2 = 0.85 HSPF (split), 0.84 (single package).
    """
    return _convert(hspf, "hspf", system, 3.0, 15.0)


def seasonal_heating_kwh(delivered_heat_btu: float | np.ndarray, hspf2: float) -> float | np.ndarray:
    """Electricity a heat pump uses over a heating season to deliver a quantity of heat.

    Parameters
    ----------
    delivered_heat_btu : float or numpy.ndarray
        Heat delivered to the home over the season (or per period), Btu; at least 0.
    hspf2 : float
        The heat pump's HSPF2, Btu of heat per Wh of electricity over the season.

    Returns
    -------
    float or numpy.ndarray
        Electricity, kWh: delivered heat / (HSPF2 x 1,000 Wh/kWh), backup heat included as the
        rating includes it.

    Raises
    ------
    ValueError
        If HSPF2 is not a positive finite number or a delivered heat is negative.

    References
    ----------
    DOE 10 CFR 430 Subpart B Appendix M1: HSPF2 is the total heat delivered over the heating
    season (Btu) divided by the total electricity used (Wh), for climate region IV.
    """
    if not np.isfinite(hspf2) or hspf2 <= 0:
        raise ValueError(f"HSPF2 must be a positive number, not {hspf2!r}")
    heat = np.asarray(delivered_heat_btu, float)
    if np.any(heat < 0) or not np.all(np.isfinite(heat)):
        raise ValueError("delivered heat must be finite and at least 0 Btu")
    out = heat / (hspf2 * 1000.0)
    return float(out) if out.ndim == 0 else out


def seasonal_cooling_kwh(removed_heat_btu: float | np.ndarray, seer2: float) -> float | np.ndarray:
    """Electricity an air conditioner or heat pump uses over a cooling season.

    Parameters
    ----------
    removed_heat_btu : float or numpy.ndarray
        Heat removed from the home over the season (or per period), Btu; at least 0.
    seer2 : float
        SEER2, Btu of cooling per Wh of electricity over the season.

    Returns
    -------
    float or numpy.ndarray
        Electricity, kWh: removed heat / (SEER2 x 1,000 Wh/kWh).

    Raises
    ------
    ValueError
        If SEER2 is not a positive finite number or a removed heat is negative.

    References
    ----------
    DOE 10 CFR 430 Subpart B Appendix M1: SEER2 is the total heat removed over the cooling
    season (Btu) divided by the total electricity used (Wh).
    """
    if not np.isfinite(seer2) or seer2 <= 0:
        raise ValueError(f"SEER2 must be a positive number, not {seer2!r}")
    heat = np.asarray(removed_heat_btu, float)
    if np.any(heat < 0) or not np.all(np.isfinite(heat)):
        raise ValueError("removed heat must be finite and at least 0 Btu")
    out = heat / (seer2 * 1000.0)
    return float(out) if out.ndim == 0 else out
