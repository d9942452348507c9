"""Loader: every kind of bad input gets a located, explained error; good files load."""

from __future__ import annotations

import textwrap

import pytest

from homeplan.errors import InputError
from homeplan.plan.load import load_plan, load_plan_text

GOOD = textwrap.dedent("""\
    home:
      location: {latitude: 44.9, longitude: -93.2}
      floor_area_ft2: 1800
      electrical:
        service_amps: 100
    appliances:
      - kind: furnace
        year_installed: 2008
    budget:
      usd_per_year: 8000
    """)


def errors_of(text: str) -> list:
    with pytest.raises(InputError) as info:
        load_plan_text(text, "p.yaml")
    return info.value.problems


def one_error(text: str):
    problems = errors_of(text)
    assert len(problems) == 1, problems
    return problems[0]


def test_minimal_file_loads_with_defaults():
    plan = load_plan_text(GOOD).plan
    assert plan.home.electrical.service_amps == 100
    assert plan.budget.horizon_years == 10
    assert plan.prices.electricity.export == "net_metering"


# Each case: (name, text, expected line, expected col, words in the message)
CASES = [
    ("misspelled key", GOOD.replace("service_amps", "servce_amps"), 5, 5, "did you mean 'service_amps'"),
    ("unknown top key", GOOD + "budgett: 3\n", 11, 1, "unknown key 'budgett'"),
    ("missing required", GOOD.replace("  floor_area_ft2: 1800\n", ""), 1, 1, "missing required key 'floor_area_ft2'"),
    ("text for number", GOOD.replace("1800", "big"), 3, 19, "must be a number"),
    ("out of range", GOOD.replace("44.9", "144.9"), 2, 24, "at most 90"),
    ("negative budget", GOOD.replace("usd_per_year: 8000", "usd_per_year: -5"), 10, 17, "at least 0"),
    ("bad enum with suggestion", GOOD.replace("kind: furnace", "kind: furnce"), 7, 11, "did you mean 'furnace'"),
    ("afue as percent", GOOD.replace("year_installed: 2008", "year_installed: 2008\n    afue: 80"), 9, 11, "0.80"),
    ("year too early", GOOD.replace("2008", "1700"), 8, 21, "at least 1900"),
    ("list where section", GOOD.replace("  electrical:\n    service_amps: 100\n", "  electrical: [100]\n"), 4, 3, "section of keys"),
    ("section where list", GOOD.replace("appliances:\n  - kind: furnace\n    year_installed: 2008\n", "appliances: furnace\n"), 6, 13, "must be a list"),
    ("bool wrong", GOOD.replace("usd_per_year: 8000", "usd_per_year: 8000\n  carryover: 3"), 11, 14, "true or false, not 3"),
    ("busbar below main", GOOD.replace("service_amps: 100", "service_amps: 100\n    busbar_amps: 60\n    main_breaker_amps: 100"), 4, 3, "busbar_amps 60 is smaller"),
    ("monthly list too short", GOOD + "usage:\n  gas:\n    monthly_therms: [1, 2, 3]\n", 13, 5, "12 values"),
    ("duplicate ids", GOOD.replace("    year_installed: 2008\n", "    year_installed: 2008\n  - kind: furnace\n"), 1, 1, "already used"),
    ("both SI and US key", GOOD.replace("floor_area_ft2: 1800", "floor_area_ft2: 1800\n  floor_area_m2: 160"), 4, 3, "both floor_area_m2 and floor_area_ft2"),
    ("bad id pattern", GOOD.replace("kind: furnace", "kind: furnace\n    id: Big Furnace"), 8, 9, "not a valid id"),
    ("bad date", "provenance: {date: yesterday}\n" + GOOD, 1, 20, "must be a date"),
    ("no location", GOOD.replace("  location: {latitude: 44.9, longitude: -93.2}\n", ""), 1, 1, "needs a location"),
    ("newer format", "format_version: 9\n" + GOOD, 1, 17, "newer homeplan"),
    ("format zero", "format_version: 0\n" + GOOD, 1, 17, "does not exist"),
    ("format not int", "format_version: one\n" + GOOD, 1, 17, "whole number"),
    ("bool not parsable", GOOD.replace("usd_per_year: 8000", "usd_per_year: 8000\n  carryover: perhaps"), 11, 14, "true or false"),
    ("wrong display units", "display: {units: metric}\n" + GOOD, 1, 18, "use one of"),
    ("installed in the future", GOOD.replace("2008", "2099"), 8, 21, "after the plan's first year"),
    ("fuel the kind cannot burn", GOOD.replace("kind: furnace", "kind: range\n    fuel: oil"), 8, 11, "does not burn oil"),
    ("main breaker above service", GOOD.replace("service_amps: 100", "service_amps: 100\n    main_breaker_amps: 200"), 4, 3, "larger than service_amps"),
    ("infinite budget", GOOD.replace("usd_per_year: 8000", "usd_per_year: .inf"), 10, 17, "finite number"),
    ("invalid date", "provenance: {date: 2026-02-30}\n" + GOOD, 1, 20, "not a valid date"),
]


@pytest.mark.parametrize("name,text,line,col,words", CASES, ids=[c[0] for c in CASES])
def test_bad_input_is_located_and_explained(name, text, line, col, words):
    problems = errors_of(text)
    hit = [p for p in problems if words in str(p)]
    assert hit, f"{name}: no problem mentions {words!r}: {problems}"
    assert (hit[0].line, hit[0].col) == (line, col), f"{name}: {hit[0]}"
    assert str(hit[0]).startswith(f"p.yaml:{line}:{col}: ")


def test_every_problem_reported_at_once():
    text = GOOD.replace("servi", "serv").replace("1800", "x").replace("furnace", "furnce")
    assert len(errors_of(text)) >= 3


def test_syntax_error_located():
    p = one_error("home:\n  a: [1, 2\nbudget: 3\n")
    assert p.line >= 2 and "YAML" in p.message


def test_tab_indentation_syntax_error():
    p = one_error("home:\n\tfloor_area_ft2: 3\n")
    assert p.line == 2


def test_duplicate_key_refused():
    p = one_error(GOOD + "budget:\n  usd_per_year: 3\n")
    assert "duplicate key" in p.message and p.line == 11


def test_python_object_tag_refused():
    p = one_error("home: !!python/object/apply:os.system ['echo hi']\n")
    assert "not allowed" in p.message and (p.line, p.col) == (1, 7)


def test_custom_tag_refused():
    p = one_error("home: !include other.yaml\n")
    assert "tag" in p.message


def test_alias_bomb_refused():
    bomb = "a: &a [x, x, x, x, x, x, x, x, x, x]\n"
    for i in range(1, 9):
        prev = chr(ord("a") + i - 1)
        cur = chr(ord("a") + i)
        bomb += f"{cur}: &{cur} [" + ", ".join([f"*{prev}"] * 10) + "]\n"
    p = one_error(bomb)
    assert "aliases (*name) repeat more than" in p.message


def test_small_alias_use_is_fine():
    text = GOOD + "incentives:\n  - &p {id: x}\n  - *p\nincentive_files: []\n"
    plan = load_plan_text(text).plan
    assert [dict(p) for p in plan.incentives] == [{"id": "x"}, {"id": "x"}]  # the alias expanded
    assert plan.incentive_files == []


def test_top_level_list_refused():
    p = one_error("- a\n- b\n")
    assert "top level is a list" in p.message


def test_top_level_scalar_refused():
    p = one_error("hello\n")
    assert "single value" in p.message


def test_empty_text_refused():
    p = one_error("   \n")
    assert "empty" in p.message


def test_empty_file(tmp_path):
    f = tmp_path / "e.yaml"
    f.write_text("")
    with pytest.raises(InputError, match="empty"):
        load_plan(f)


def test_missing_file(tmp_path):
    with pytest.raises(InputError, match="file not found"):
        load_plan(tmp_path / "nope.yaml")


def test_directory_instead_of_file(tmp_path):
    with pytest.raises(InputError, match="directory"):
        load_plan(tmp_path)


def test_not_utf8_located(tmp_path):
    f = tmp_path / "latin1.yaml"
    f.write_bytes(GOOD.replace("home:", "home:\n  name: Caf\xe9").encode("latin-1"))
    with pytest.raises(InputError) as info:
        load_plan(f)
    p = info.value.problems[0]
    assert "UTF-8" in p.message and (p.line, p.col) == (2, 12)


def test_too_large_refused(tmp_path):
    f = tmp_path / "big.yaml"
    f.write_text(GOOD + "#" * (3 * 1024 * 1024))
    with pytest.raises(InputError, match="may be at most"):
        load_plan(f)


def test_si_keys_converted():
    # 1 m2 = 10.7639 ft2 (NIST SP 811 Appendix B); 0 C = 32 F
    text = GOOD.replace("floor_area_ft2: 1800", "floor_area_m2: 167.2254").replace(
        "  electrical:", "  climate: {heating_design_c: -23.3333, hdd65: 7000}\n  electrical:")
    plan = load_plan_text(text).plan
    assert plan.home.floor_area_ft2 == pytest.approx(1800, rel=1e-4)
    assert plan.home.climate.heating_design_f == pytest.approx(-10.0, abs=1e-3)


def test_si_key_error_names_the_key_written():
    text = GOOD.replace("floor_area_ft2: 1800", "floor_area_m2: 5")  # 53.8 ft2 is too small
    p = one_error(text)
    assert p.line == 3 and "floor_area_ft2" in p.message


def test_utf8_bom_accepted(tmp_path):
    f = tmp_path / "bom.yaml"
    f.write_bytes(b"\xef\xbb\xbf" + GOOD.encode())
    assert load_plan(f).plan.home.floor_area_ft2 == 1800
