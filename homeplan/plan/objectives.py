"""What a roadmap aims for: one name per objective, used by the plan file, the command line, the
JSON result, the app and the printout alike.

Each objective's key is also its name in words (underscores become spaces), so no view can call
it something else. Older spellings are still read: the plan file's first format used ``npv``,
``emissions``, ``gas_off_early`` and ``out_of_pocket``; the JSON result of schema 1.3 and older
used ``max_npv``, ``min_emissions``, ``earliest_gas_closure`` and ``min_out_of_pocket``, and
schema 1.5 ``min_cost_cvar`` for ``risk_aware``.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["ALIASES", "OBJECTIVES", "ObjectiveInfo", "canonical", "objective_words"]


@dataclass(frozen=True)
class ObjectiveInfo:
    """One objective: its key (the name everywhere) and what it means, in a sentence."""

    key: str
    meaning: str

    @property
    def label(self) -> str:
        """The key in words, capitalised: ``best_value`` -> "Best value"."""
        return self.key.replace("_", " ").capitalize()


OBJECTIVES: dict[str, ObjectiveInfo] = {o.key: o for o in (
    ObjectiveInfo("best_value", "the order of work worth the most against doing nothing, in "
                  "today's dollars over the years planned (or, when every order costs more than "
                  "doing nothing, the one that costs the least more)"),
    ObjectiveInfo("lowest_emissions", "the most greenhouse gas avoided over the years planned, "
                  "within the budget"),
    ObjectiveInfo("home_fuel_off_soonest", "the gas service closed, or the oil or propane tank "
                  "removed, as early as the budget allows; then the best value"),
    ObjectiveInfo("least_out_of_pocket", "the least money spent over the years planned: projects "
                  "after incentives, loan interest and energy bills, not discounted"),
    ObjectiveInfo("risk_aware", "the lowest expected cost over many possible price paths, plus a "
                  "weight times the average cost of the worst of them: protection against bad "
                  "price years"),
)}
"""Objective key -> its meaning, in the order the app offers them."""

ALIASES: dict[str, str] = {
    # plan file format 1 and the command line before it
    "npv": "best_value", "emissions": "lowest_emissions", "gas_off_early": "home_fuel_off_soonest",
    "out_of_pocket": "least_out_of_pocket",
    # roadmap JSON schema 1.3 and older
    "max_npv": "best_value", "min_emissions": "lowest_emissions",
    "earliest_gas_closure": "home_fuel_off_soonest", "min_out_of_pocket": "least_out_of_pocket",
    # roadmap JSON schema 1.5
    "min_cost_cvar": "risk_aware",
}
"""Older spellings -> the objective's key."""


def canonical(name: str) -> str:
    """The objective's key for a key or an older spelling (unknown names are returned as given)."""
    return ALIASES.get(name, name)


def objective_words(name: str) -> str:
    """"Best value" for ``best_value`` (or an older spelling of it)."""
    info = OBJECTIVES.get(canonical(name))
    return info.label if info is not None else name.replace("_", " ")
