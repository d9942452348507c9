"""The sources panel's lines: each figure with the value the views show and where it comes
from, in words (no ids, keys of the file format or Python values), on every sample home."""

from __future__ import annotations

import csv
import functools
import re

import pytest

from homeplan import catalog, load_plan, plan_roadmap
from homeplan.report.fmt import money
from homeplan.report.sources import (
    assumption_sources,
    capacity_sources,
    catalog_source_words,
    energy_sources,
    money_sources,
    program_sources,
    step_sources,
)
from tests.conftest import SAMPLES

pytestmark = pytest.mark.slow

DATA = catalog.__file__.rsplit("/", 1)[0] + "/data"
# what must never reach a homeowner: ids, file-format keys, Python values, working notes
FORBIDDEN = re.compile(r"\b[a-z]+_[a-z0-9_]+\b|\bTrue\b|\bFalse\b|\bNone\b|\bnan\b|[{}\[\]]"
                       r"|from memory|common practice")


@functools.cache
def _result(path):
    return plan_roadmap(load_plan(path))


def _plain(lines) -> None:
    for x in lines:
        for text in (x.what, x.value, x.source, x.group):
            # file names are allowed (they name the user's own files)
            rest = re.sub(r"\S+\.ya?ml\b", "", text)
            assert not FORBIDDEN.search(rest), text
        assert x.source


@pytest.mark.parametrize("table", ["appliance_life", "existing_loads", "like_for_like",
                                   "equipment_performance"])
def test_catalog_sources_read_plainly(table) -> None:
    with open(f"{DATA}/{table}.csv", encoding="utf-8") as f:
        rows = list(csv.DictReader(f))
    for row in rows:
        words = catalog_source_words(row["source"])
        assert "from memory" not in words and "common practice" not in words, words
        if re.search(r"from memory|common practice|no source", row["source"].split(";")[0]):
            assert "an estimate" in words  # a recalled figure says so
        else:
            # a published reference is named as the table gives it
            assert row["source"].split(";")[0].strip()[:20] in words


def test_published_reference_kept_whole() -> None:
    src = "NEC 2023 Table 430.248: 1/2 hp single-phase motor 9.8 A at 115-120 V"
    assert catalog_source_words(src) == f"homeplan's built-in table, after {src}"


@pytest.mark.parametrize("path", SAMPLES, ids=[p.name for p in SAMPLES])
def test_every_figure_has_its_value_and_source(path) -> None:
    result = _result(path)
    road = result.roadmap
    infos = {p.id: p for p in result.projects}
    _plain(assumption_sources(result.plan, result))
    for step in road.steps:
        lines = step_sources(step, infos.get(step.project_id), result.plan)
        _plain(lines)
        values = {x.what: x.value for x in lines}
        # the same figures the Roadmap and Next views show (one figure, one value)
        assert values[f"Price in {step.year}"] == money(step.cost_usd)
        assert values["You pay"] == money(step.net_cost_usd)
        assert values["Year"] == str(step.year)
        for line in step.incentives:
            assert any(x.value == money(line.amount_usd) for x in lines if x.what == line.program)
    for t in road.years:
        lines = money_sources(result.plan, result, t.year)
        _plain(lines)
        values = {x.what: x.value for x in lines}
        assert values["Bills"] == money(t.total_bills_usd)
        assert values["Back"] == money(t.incentives_usd)
        assert values["Plan running total"] == money(t.cumulative_usd)
    energy = energy_sources(result)
    _plain(energy)
    kwh = result.energy_before.annual["electricity_kwh"]
    assert any(x.value == f"{kwh:,.0f} kWh" for x in energy)
    for p in result.programs:
        lines = program_sources(result.plan, p)
        _plain(lines)
        assert lines[0].value.startswith(money(sum(p.paid_by_year.values())))
    for state in result.capacity:
        lines = capacity_sources(state)
        _plain(lines)
        values = {x.what: x.value for x in lines}
        assert values["Service"] == f"{state.service_amps:,.0f} A"
        if state.amps is not None:
            assert values["Calculated load"] == f"{state.amps:,.0f} A"
