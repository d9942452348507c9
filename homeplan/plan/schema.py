"""JSON Schema of the plan file format, for editors that validate and complete YAML."""

from __future__ import annotations

from typing import Any

from homeplan.plan.model import FORMAT_VERSION, Plan


def plan_json_schema() -> dict[str, Any]:
    schema = Plan.model_json_schema(mode="validation")
    schema["$schema"] = "https://json-schema.org/draft/2020-12/schema"
    schema["$id"] = f"https://homeplan.invalid/schema/plan-{FORMAT_VERSION}.json"
    schema["title"] = f"homeplan plan file, format {FORMAT_VERSION}"
    schema["description"] = (
        "A home, its appliances, vehicles, bills, budget and choices. Units are in the key "
        "names; SI spellings (floor_area_m2, heating_design_c, ...) are converted on load and "
        "are not listed here."
    )
    return schema
