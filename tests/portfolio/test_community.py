"""The invented demo community: reproducible from its seed, every home a valid plan, and the
mix it states is the mix it has."""

from __future__ import annotations

import csv
import io
import math
from collections import Counter

import pytest

from homeplan.portfolio.community import (
    DEMO_HOMES,
    DEMO_SEED,
    community_csv,
    mix,
    template_text,
    towns,
)
from homeplan.portfolio.inputs import iter_inputs, open_source, plan_of_row

from .conftest import ROOT

SAMPLE = ROOT / "sample_homes" / "community"


@pytest.fixture(scope="module")
def rows():
    return list(csv.DictReader(io.StringIO(community_csv(DEMO_HOMES, DEMO_SEED))))


def test_the_same_seed_gives_the_same_homes():
    assert community_csv(50, 3) == community_csv(50, 3)
    assert community_csv(50, 3) != community_csv(50, 4)


def test_the_sample_is_what_the_stated_seed_makes():
    assert (SAMPLE / "homes.csv").read_text(encoding="utf-8") == community_csv(DEMO_HOMES, DEMO_SEED)
    assert (SAMPLE / "template.yaml").read_text(encoding="utf-8") == template_text(
        "demoland_invented.yaml")


def test_every_home_of_the_sample_is_a_valid_plan():
    source = open_source(SAMPLE / "homes.csv", SAMPLE / "template.yaml")
    n = 0
    for item in iter_inputs(source):
        plan = plan_of_row(str(source.path), source.template, item.home_id, item.payload, source.columns)
        assert plan.home.name.endswith("(invented)")
        n += 1
    assert n == DEMO_HOMES


def _within(count: int, n: int, share: float) -> bool:
    """Four binomial standard errors: a stated share that the sample misses by more is not its mix."""
    return abs(count / n - share) <= 4 * math.sqrt(share * (1 - share) / n) + 1e-9


def test_the_towns_are_in_their_stated_shares(rows):
    count = Counter(r["home.location.place"] for r in rows)
    for t in towns():
        assert _within(count[t.place], len(rows), t.share), t.town


def test_ages_heating_and_panels_follow_the_stated_mix(rows):
    n = len(rows)
    built = Counter(next(m.value for m in mix() if m.attribute == "built"
                         and int(m.value[:4]) <= int(r["home.year_built"]) <= int(m.value[5:]))
                    for r in rows)
    for m in mix():
        if m.attribute == "built":
            assert _within(built[m.value], n, m.share), m.value
    lark = [r for r in rows if r["home.location.place"].startswith("Larkspur")]
    gas_furnaces = sum(r["appliances.heating.kind"] == "furnace" and r["appliances.heating.fuel"] == "gas"
                       for r in lark)
    stated = next(m.share for m in mix() if m.given == "town=larkspur_falls" and m.value == "gas_furnace")
    assert _within(gas_furnaces, len(lark), stated)
    new = [r for r in rows if int(r["home.year_built"]) >= 2000]
    assert all(r["home.electrical.service_amps"] in ("150", "200") for r in new)


def test_everything_is_invented_and_says_so():
    assert all("invented" in t.place and "invented" in t.source for t in towns())
    assert all("invented" in m.source for m in mix())
    assert "invented" in (SAMPLE / "README.md").read_text(encoding="utf-8").lower()
