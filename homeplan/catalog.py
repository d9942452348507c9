"""The built-in catalog: appliance service lives, upgrade kinds, cautions.

The numbers live in ``homeplan/data/`` tables, each row with its source; this module only
reads them into small frozen records. Readers are cached: the tables are packaged and
immutable for the life of the process.
"""

from __future__ import annotations

import csv
from dataclasses import dataclass, field
from functools import cache
from importlib import resources
from typing import Any


def _data_text(name: str) -> str:
    return resources.files("homeplan.data").joinpath(name).read_text(encoding="utf-8")


def _yaml_data(name: str) -> Any:
    from ruamel.yaml import YAML

    return YAML(typ="safe").load(_data_text(name))


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


_KNOWN = {"label", "category", "size_unit", "life_years", "life_source", "cost", "cost_change",
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
            extra={k: v for k, v in raw.items() if k not in _KNOWN},
        )
    return out


@cache
def cautions() -> dict[str, str]:
    return dict(_yaml_data("cautions.yaml"))
