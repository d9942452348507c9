"""Fuzzing the readers and the whole pipeline: bounded and repeatable.

Every input, however broken, ends in a result or a located input error (exit code 2), never an
internal error or a traceback. hypothesis draws the seeds (``derandomize=True``: the same seeds
on every run); ``tests/fuzzing.py`` turns a seed into a file. The long run is
``benchmarks/bench_fuzz.py``.
"""

from __future__ import annotations

import random
import shutil
import tempfile
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from homeplan.errors import InputError, PlanRuleError
from homeplan.plan.files import PlanFolder
from homeplan.plan.load import load_plan, load_plan_text
from homeplan.planner.basis import read_weather_file
from homeplan.planner.programs import read_incentive_file
from tests import fuzzing

SEEDS = st.integers(min_value=0, max_value=2**32 - 1)
BOUNDED = {"derandomize": True, "deadline": None, "database": None,
           "suppress_health_check": [HealthCheck.too_slow, HealthCheck.function_scoped_fixture]}


@settings(max_examples=150, **BOUNDED)
@given(SEEDS)
def test_plan_reader_gives_a_plan_or_a_located_error(seed):
    text = fuzzing.fuzzed_plan_text(random.Random(seed))
    try:
        load_plan_text(text, "fuzz.yaml")
    except InputError as err:
        assert err.problems and all(p.message for p in err.problems)


@settings(max_examples=150, **BOUNDED)
@given(st.binary(max_size=3000))
def test_plan_reader_on_any_bytes(data):
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "bytes.yaml"
        path.write_bytes(data)
        try:
            load_plan(path)
        except InputError as err:
            assert err.problems


@settings(max_examples=80, **BOUNDED)
@given(SEEDS)
def test_incentive_reader_gives_programs_or_an_error(seed):
    with tempfile.TemporaryDirectory() as tmp:
        (Path(tmp) / "p.yaml").write_text(fuzzing.fuzzed_incentive_text(random.Random(seed)), encoding="utf-8")
        try:
            programs = read_incentive_file(PlanFolder.of(tmp), "p.yaml", ("incentive_files", 0))
        except (InputError, PlanRuleError) as err:
            assert str(err)
        else:
            assert all(p.id for p in programs)


@pytest.fixture(scope="module")
def tmy3() -> str:
    return fuzzing.tmy3_text()


@settings(max_examples=15, **BOUNDED)
@given(SEEDS)
def test_weather_reader_gives_a_year_or_an_error(tmy3, seed):
    with tempfile.TemporaryDirectory() as tmp:
        (Path(tmp) / "w.csv").write_text(fuzzing.fuzzed_weather_text(random.Random(seed), tmy3), encoding="utf-8")
        try:
            w = read_weather_file(PlanFolder.of(tmp), "w.csv")
        except PlanRuleError as err:
            assert err.loc == ("home", "climate", "weather_file")
        else:
            assert len(w.temp_f) == 8760


@pytest.fixture(scope="module")
def folder():
    tmp = Path(tempfile.mkdtemp())
    yield fuzzing.plan_folder(tmp)
    shutil.rmtree(tmp)


@pytest.mark.slow
@settings(max_examples=10, **BOUNDED)
@given(SEEDS)
def test_whole_pipeline_never_fails_inside(folder, seed):
    plan = folder / "fuzz.yaml"
    plan.write_text(fuzzing.fuzzed_plan_text(random.Random(seed)), encoding="utf-8")
    out = folder / "out"
    out.mkdir(exist_ok=True)
    with fuzzing.shared_planning():
        outcomes = fuzzing.run_commands(plan, out)
    bad = [(o.command, o.code, o.stderr[-300:], o.trace[-300:]) for o in outcomes if not o.ok]
    assert bad == []
    assert all("\x1b" not in o.stderr for o in outcomes)


def test_the_fuzz_reaches_the_planner():
    """Guard: enough fuzzed plans are valid that the pipeline test plans some of them."""
    valid = 0
    for seed in range(60):
        try:
            load_plan_text(fuzzing.fuzzed_plan_text(random.Random(seed)), "fuzz.yaml")
            valid += 1
        except InputError:
            pass
    assert 10 <= valid <= 55
