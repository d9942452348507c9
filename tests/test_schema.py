"""The JSON Schema accepts every sample and rejects what the loader rejects."""

from __future__ import annotations

import json
import subprocess
import sys

import jsonschema
import pytest

from homeplan.plan.load import load_plan
from homeplan.plan.schema import plan_json_schema

from .conftest import SAMPLES


def _plain(doc):
    """Plain JSON-able data from a loaded document (dates as strings, as editors see them)."""
    return json.loads(json.dumps(doc, default=str))


@pytest.mark.parametrize("path", SAMPLES, ids=[p.name for p in SAMPLES])
def test_samples_validate_against_schema(path):
    schema = plan_json_schema()
    jsonschema.Draft202012Validator.check_schema(schema)
    loaded = load_plan(path)
    data = _plain(loaded.document)
    jsonschema.validate(data, schema)


def test_schema_rejects_unknown_key():
    schema = plan_json_schema()
    data = _plain(load_plan(SAMPLES[0]).document)
    data["home"]["servce_amps"] = 100
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(data, schema)


def test_dumped_plan_round_trips_through_schema():
    """model -> JSON -> schema-valid -> model again, unchanged."""
    from homeplan.plan.model import Plan

    plan = load_plan(SAMPLES[0]).plan
    data = json.loads(plan.model_dump_json(exclude_none=True))
    jsonschema.validate(data, plan_json_schema())
    assert Plan.model_validate(data) == plan


def test_schema_command_prints_json():
    out = subprocess.run([sys.executable, "-m", "homeplan.cli", "schema"], capture_output=True, text=True, check=True)
    assert json.loads(out.stdout)["title"].startswith("homeplan plan file")


def test_schema_accepts_si_spellings_and_refuses_both():
    from homeplan.plan.load import load_plan_text

    text = ("home:\n  location: {latitude: 47.6, longitude: -122.3}\n  floor_area_m2: 140\n"
            "  electrical: {service_amps: 200}\n  climate: {heating_design_c: -5}\n"
            "budget: {usd_per_year: 5000}\n")
    load_plan_text(text)  # the loader accepts it ...
    data = _plain(load_plan_text(text).document)
    jsonschema.validate(data, plan_json_schema())  # ... and so does the schema
    data["home"]["floor_area_ft2"] = 1500
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(data, plan_json_schema())
