"""JSON Schema of the plan file format, for editors that validate and complete YAML."""

from __future__ import annotations

from typing import Any

from homeplan.plan.model import FORMAT_VERSION, Plan
from homeplan.units import SI_KEYS

__all__ = ["plan_json_schema"]


def _add_si_keys(schema: dict[str, Any]) -> None:
    """Let editors accept the SI spellings the loader converts (floor_area_m2, ...): each SI key
    becomes a property beside its internal key, and a required internal key may be given either
    way."""
    by_target = {target: si for si, (target, _) in SI_KEYS.items()}
    for definition in [schema, *schema.get("$defs", {}).values()]:
        props = definition.get("properties", {})
        for target, si in by_target.items():
            if target not in props or si in props:
                continue
            props[si] = {"type": "number", "description": f"SI spelling of {target}, converted on load."}
            required = definition.get("required", [])
            if target in required:
                required.remove(target)
                definition.setdefault("allOf", []).append(
                    {"anyOf": [{"required": [target]}, {"required": [si]}]})
            definition.setdefault("allOf", []).append({"not": {"required": [target, si]}})


def plan_json_schema() -> dict[str, Any]:
    schema = Plan.model_json_schema(mode="validation")
    _add_si_keys(schema)
    schema["$schema"] = "https://json-schema.org/draft/2020-12/schema"
    schema["$id"] = f"https://homeplan.invalid/schema/plan-{FORMAT_VERSION}.json"
    schema["title"] = f"homeplan plan file, format {FORMAT_VERSION}"
    schema["description"] = (
        "A home, its appliances, vehicles, bills, budget and choices. Units are in the key "
        "names; SI spellings (floor_area_m2, heating_design_c, ...) are accepted beside them and "
        "converted on load."
    )
    return schema
