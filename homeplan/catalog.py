"""The built-in catalog: every table in ``homeplan/data/``, read into small frozen records.

Appliance service lives and condition factors, upgrade kinds with their variants and costs,
like-for-like replacement costs, the loads of existing appliances, equipment defaults,
reference climates and cautions. The numbers live in the tables, each row with its source;
this module only reads them. Readers are cached: the tables are packaged and immutable for the
life of the process.
"""

from __future__ import annotations

import csv
from dataclasses import dataclass, field
from functools import cache
from importlib import resources
from typing import Any

__all__ = [
    "CostRange",
    "GlossaryTerm",
    "LikeForLike",
    "ReferenceClimate",
    "ServiceLife",
    "UpgradeKind",
    "Variant",
    "caution_ids_of",
    "caution_titles",
    "cautions",
    "condition_factors",
    "existing_load_row",
    "glossary",
    "like_for_like_cost",
    "like_for_like_table",
    "performance",
    "reference_climates",
    "service_life",
    "service_lives",
    "upgrade_kinds",
]


def _data_text(name: str) -> str:
    return resources.files("homeplan.data").joinpath(name).read_text(encoding="utf-8")


def _yaml_data(name: str) -> Any:
    """A built-in YAML table, read with PyYAML's C loader (no comments or positions are needed
    for the shipped data; about 30 times faster than a pure-Python round-trip parser)."""
    import yaml

    return yaml.load(_data_text(name), Loader=getattr(yaml, "CSafeLoader", yaml.SafeLoader))


@dataclass(frozen=True)
class ServiceLife:
    kind: str
    fuel: str
    type: str
    median_life_years: float
    weibull_shape: float
    source: str


@cache
def service_lives() -> tuple[ServiceLife, ...]:
    rows = csv.DictReader(_data_text("appliance_life.csv").splitlines())
    return tuple(
        ServiceLife(r["kind"], r["fuel"], r["type"], float(r["median_life_years"]),
                    float(r["weibull_shape"]), r["source"])
        for r in rows
    )


def service_life(kind: str, fuel: str = "", type_: str = "") -> ServiceLife:
    """The best-matching service-life row: exact kind+fuel+type, then kind+fuel, then kind."""
    rows = [r for r in service_lives() if r.kind == kind]
    if not rows:
        raise KeyError(f"no service life for appliance kind '{kind}'")
    for want in ((fuel, type_), (fuel, ""), ("", type_)):
        for r in rows:
            if (not want[0] or r.fuel == want[0]) and r.type == want[1]:
                return r
    for r in rows:
        if r.fuel == fuel:
            return r
    return rows[0]


@cache
def condition_factors() -> dict[str, float]:
    rows = csv.DictReader(_data_text("condition_factors.csv").splitlines())
    return {r["condition"]: float(r["life_factor"]) for r in rows}


@dataclass(frozen=True)
class Variant:
    id: str
    label: str
    cost_factor: float = 1.0
    va: float | None = None
    va_per_ton: float | None = None
    strips_kw: float | None = None
    strips_interlocked: bool = False
    amps: float | None = None
    hp_class: str | None = None    # heat pump class (ratings in homeplan/energy/data/heat_pumps.csv)
    source: str = ""


@dataclass(frozen=True)
class CostRange:
    low: float
    typical: float
    high: float
    per: str
    source: str

    def level(self, name: str) -> float:
        return {"low": self.low, "typical": self.typical, "high": self.high}[name]


@dataclass(frozen=True)
class UpgradeKind:
    """One kind of upgrade from data/upgrades.yaml."""

    id: str
    label: str
    category: str
    size_unit: str
    life_years: float
    cost: CostRange
    cost_change: dict[str, Any]
    replaces: tuple[str, ...] = ()
    variants: tuple[Variant, ...] = ()
    requires: tuple[str, ...] = ()
    better_before: tuple[str, ...] = ()
    cautions: tuple[str, ...] = ()
    capacity_load: bool = False
    capacity_remedy: bool = False
    backfeed: bool = False
    milestone: bool = False
    fuel: str | None = None
    provides_amps: int | None = None
    short: str = ""       # a short name for narrow screens ("" = the label is short enough)
    extra: dict[str, Any] = field(default_factory=dict)

    def variant(self, variant_id: str | None) -> Variant | None:
        if not self.variants:
            return None
        if variant_id is None:
            return self.variants[0]
        for v in self.variants:
            if v.id == variant_id:
                return v
        raise KeyError(variant_id)


_KNOWN = {"label", "short", "category", "size_unit", "life_years", "life_source", "cost", "cost_change",
          "replaces", "variants", "requires", "better_before", "cautions", "capacity_load",
          "capacity_remedy", "backfeed", "milestone", "fuel", "provides_amps"}


@cache
def upgrade_kinds() -> dict[str, UpgradeKind]:
    out: dict[str, UpgradeKind] = {}
    for kid, raw in _yaml_data("upgrades.yaml").items():
        cost = raw["cost"]
        variants = tuple(Variant(id=vid, **v) for vid, v in (raw.get("variants") or {}).items())
        out[kid] = UpgradeKind(
            id=kid,
            label=raw["label"],
            category=raw["category"],
            size_unit=raw["size_unit"],
            life_years=float(raw["life_years"]),
            cost=CostRange(cost["low"], cost["typical"], cost["high"], cost["per"], cost["source"]),
            cost_change=dict(raw.get("cost_change") or {"kind": "inflation"}),
            replaces=tuple(raw.get("replaces") or ()),
            variants=variants,
            requires=tuple(raw.get("requires") or ()),
            better_before=tuple(raw.get("better_before") or ()),
            cautions=tuple(raw.get("cautions") or ()),
            capacity_load=bool(raw.get("capacity_load", False)),
            capacity_remedy=bool(raw.get("capacity_remedy", False)),
            backfeed=bool(raw.get("backfeed", False)),
            milestone=bool(raw.get("milestone", False)),
            fuel=raw.get("fuel"),
            provides_amps=raw.get("provides_amps"),
            short=str(raw.get("short") or ""),
            extra={k: v for k, v in raw.items() if k not in _KNOWN},
        )
    return out


def cautions(edition: int = 2023) -> dict[str, str]:
    """Safety cautions by id (``data/cautions.yaml``), with the NEC edition the load calculations
    use written into the ones that name it."""
    return {k: v["text"].replace("{edition}", str(edition)) for k, v in _caution_records().items()}


def caution_titles() -> dict[str, str]:
    """The short title of each caution, by id."""
    return {k: v["title"] for k, v in _caution_records().items()}


def caution_ids_of(texts: tuple[str, ...] | list[str], edition: int = 2023) -> list[str | None]:
    """The id of each caution text (None for a text that is not in the catalog)."""
    by_text = {" ".join(t.split()): k for k, t in cautions(edition).items()}
    return [by_text.get(" ".join(t.split())) for t in texts]


@cache
def _caution_records() -> dict[str, dict[str, str]]:
    return dict(_yaml_data("cautions.yaml"))


@cache
def performance() -> dict[str, float]:
    """Equipment and practice defaults by key (``data/equipment_performance.csv``)."""
    rows = csv.DictReader(_data_text("equipment_performance.csv").splitlines())
    return {r["key"]: float(r["value"]) for r in rows}


@dataclass(frozen=True)
class LikeForLike:
    """Today's cost of replacing an appliance with the same kind on the same fuel."""

    kind: str
    fuel: str
    cost: dict[str, float]
    source: str


@cache
def like_for_like_table() -> tuple[LikeForLike, ...]:
    rows = csv.DictReader(_data_text("like_for_like.csv").splitlines())
    return tuple(LikeForLike(r["kind"], r["fuel"], {"low": float(r["low_usd"]), "typical": float(r["typical_usd"]),
                                                     "high": float(r["high_usd"])}, r["source"]) for r in rows)


def like_for_like_cost(kind: str, fuel: str, level: str = "typical") -> float:
    """Today's cost of replacing an appliance with the same kind on the same fuel (0 if unknown)."""
    for row in like_for_like_table():
        if row.kind == kind and row.fuel == fuel:
            return row.cost[level]
    return 0.0


@cache
def _existing_loads_table() -> tuple[dict[str, str], ...]:
    return tuple(csv.DictReader(_data_text("existing_loads.csv").splitlines()))


def existing_load_row(kind: str, fuel: str = "", type_: str = "") -> dict[str, str] | None:
    """The electrical load of an existing appliance (``data/existing_loads.csv``): the row for
    this kind, fuel and type, else this kind and fuel, else this kind."""
    rows = [r for r in _existing_loads_table() if r["kind"] == kind]
    for r in rows:
        if r["fuel"] == fuel and r["type"] == type_:
            return r
    for r in rows:
        if r["fuel"] == fuel and not r["type"]:
            return r
    for r in rows:
        if not r["fuel"]:
            return r
    return None


@dataclass(frozen=True)
class ReferenceClimate:
    """Climate numbers of a reference place, used where a plan gives a location but not them."""

    name: str
    latitude: float
    longitude: float
    hdd65: float
    cdd65: float
    heating_design_f: float
    cooling_design_f: float
    cloudiness: float
    source: str


@cache
def reference_climates() -> tuple[ReferenceClimate, ...]:
    rows = csv.DictReader(_data_text("reference_climates.csv").splitlines())
    return tuple(
        ReferenceClimate(r["name"], float(r["latitude"]), float(r["longitude"]), float(r["hdd65"]),
                         float(r["cdd65"]), float(r["heating_design_f"]), float(r["cooling_design_f"]),
                         float(r["cloudiness"]), r["source"])
        for r in rows
    )


@dataclass(frozen=True)
class GlossaryTerm:
    """A term of the trade: the plain words screens use instead, and its explanation."""

    term: str
    plain: str
    text: str
    source: str


@cache
def glossary() -> tuple[GlossaryTerm, ...]:
    """The glossary (data/glossary.yaml), in its order."""
    return tuple(GlossaryTerm(r["term"], r["plain"], " ".join(r["text"].split()), r["source"])
                 for r in _yaml_data("glossary.yaml"))
