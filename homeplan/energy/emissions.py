"""Combustion CO2 emissions by fuel and the money that leaves the household for fuel."""

from __future__ import annotations

from dataclasses import dataclass

from homeplan.energy._data import emission_factor

__all__ = ["EmissionFactors", "emissions_kg", "fuel_money_out_usd"]


@dataclass(frozen=True)
class EmissionFactors:
    """kg CO2 per trade unit of each carrier. ``grid_kg_per_kwh`` is user-settable (e.g. an eGRID
    subregion value); the defaults come from data/emission_factors.csv.

    Attributes
    ----------
    grid_kg_per_kwh : float
        Grid electricity, kg CO2/kWh.
    natural_gas_kg_per_therm : float
        Natural gas, kg CO2/therm.
    propane_kg_per_gal : float
        Propane, kg CO2/gal.
    heating_oil_kg_per_gal : float
        Heating oil, kg CO2/gal.
    gasoline_kg_per_gal : float
        Gasoline, kg CO2/gal.
    diesel_kg_per_gal : float
        Diesel, kg CO2/gal.

    References
    ----------
    EIA Carbon Dioxide Emissions Coefficients; EPA-420-F-11-041 (gasoline, diesel);
    EIA FAQ 74 (US grid 2023); EPA eGRID2023.
    """

    grid_kg_per_kwh: float
    natural_gas_kg_per_therm: float
    propane_kg_per_gal: float
    heating_oil_kg_per_gal: float
    gasoline_kg_per_gal: float
    diesel_kg_per_gal: float

    @classmethod
    def default(cls, grid: str = "grid_us_eia_2023", grid_kg_per_kwh: float | None = None
                ) -> EmissionFactors:
        """Factors from the data table; ``grid`` names a table row, or pass your own value.

        Parameters
        ----------
        grid : str
            Row key of ``data/emission_factors.csv`` for the grid factor.
        grid_kg_per_kwh : float or None
            Own grid factor, kg CO2/kWh; used instead of ``grid`` when given.

        Returns
        -------
        EmissionFactors
            Factors for every fuel, kg CO2 per trade unit.

        Raises
        ------
        KeyError
            If ``grid`` is not a row of the table.
        """
        return cls(
            grid_kg_per_kwh=emission_factor(grid) if grid_kg_per_kwh is None else grid_kg_per_kwh,
            natural_gas_kg_per_therm=emission_factor("natural_gas"),
            propane_kg_per_gal=emission_factor("propane"),
            heating_oil_kg_per_gal=emission_factor("heating_oil"),
            gasoline_kg_per_gal=emission_factor("gasoline"),
            diesel_kg_per_gal=emission_factor("diesel"),
        )

    def for_fuel(self, fuel: str) -> float:
        """kg CO2 per trade unit of ``fuel`` (``electricity`` -> per kWh).

        Parameters
        ----------
        fuel : str
            Fuel name, e.g. ``natural_gas``.

        Returns
        -------
        float
            Emission factor, kg CO2 per trade unit (kWh, therm or gal).

        Raises
        ------
        KeyError
            If ``fuel`` is unknown.
        """
        return {
            "electricity": self.grid_kg_per_kwh,
            "natural_gas": self.natural_gas_kg_per_therm,
            "propane": self.propane_kg_per_gal,
            "heating_oil": self.heating_oil_kg_per_gal,
            "gasoline": self.gasoline_kg_per_gal,
            "diesel": self.diesel_kg_per_gal,
        }[fuel]


def emissions_kg(annual_units: dict[str, float], factors: EmissionFactors) -> dict[str, float]:
    """kg CO2 per fuel = annual units x factor (electricity: grid imports x grid factor).

    Parameters
    ----------
    annual_units : dict of str to float
        Annual use by fuel, trade units per year (electricity: the grid kWh to count).
    factors : EmissionFactors
        Emission factors, kg CO2 per trade unit.

    Returns
    -------
    dict of str to float
        Emissions by fuel, kg CO2 per year.

    Raises
    ------
    KeyError
        If a fuel is unknown.

    References
    ----------
    EIA Carbon Dioxide Emissions Coefficients; EPA-420-F-11-041; EIA FAQ 74.
    """
    return {fuel: units * factors.for_fuel(fuel) for fuel, units in annual_units.items()}


def fuel_money_out_usd(annual_bills_usd: dict[str, float]) -> float:
    """Money that leaves the household for fossil fuel each year (all non-electric bills,
    including fixed charges and vehicle fuel).

    Parameters
    ----------
    annual_bills_usd : dict of str to float
        Annual bill by fuel, USD per year.

    Returns
    -------
    float
        Sum of every bill except electricity, USD per year.
    """
    return float(sum(v for k, v in annual_bills_usd.items() if k != "electricity"))
