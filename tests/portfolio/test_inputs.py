"""Reading a portfolio's input: a CSV of homes over a template, or a folder of plan files.

Bad input is located (file, line, column) and explained; a bad row does not stop the others.
"""

from __future__ import annotations

import json
import shutil

import pytest

from homeplan.errors import InputError
from homeplan.portfolio.inputs import (
    NONE,
    CellError,
    apply_cells,
    iter_inputs,
    open_source,
    parse_cell,
    plan_of_row,
)
from homeplan.portfolio.runner import InProcessExecutor, run
from homeplan.portfolio.store import Store, store_path

from .conftest import ROOT, new_store

TEMPLATE = {
    "home": {"location": {"latitude": 44.95, "longitude": -93.25}, "floor_area_ft2": 1800,
             "electrical": {"service_amps": 100}},
    "appliances": [{"id": "heating", "kind": "furnace", "fuel": "gas"},
                   {"id": "cooling", "kind": "central_ac"}],
    "budget": {"usd_per_year": 8000, "first_year": 2027},
}


def test_cells_are_numbers_flags_lists_text_or_none():
    assert parse_cell("100") == 100 and isinstance(parse_cell("100"), int)
    assert parse_cell(" 0.8 ") == 0.8
    assert parse_cell("TRUE") is True and parse_cell("false") is False
    assert parse_cell("[1, 2, 3]") == [1, 2, 3]
    assert parse_cell("gas") == "gas"
    assert parse_cell("None") == NONE
    with pytest.raises(ValueError, match="finite"):
        parse_cell("nan")
    with pytest.raises(ValueError, match="list"):
        parse_cell("[1, 2")


def test_cells_set_keys_items_by_id_and_remove():
    doc = apply_cells(TEMPLATE, {"home.floor_area_ft2": "2400", "appliances.heating.fuel": "propane",
                                 "appliances.cooling": "none", "home.roof.tilt_deg": "30",
                                 "vehicles.car1.fuel": "electric"})
    assert doc["home"]["floor_area_ft2"] == 2400
    assert doc["appliances"] == [{"id": "heating", "kind": "furnace", "fuel": "propane"}]
    assert doc["home"]["roof"] == {"tilt_deg": 30}                    # a new section
    assert doc["vehicles"] == [{"id": "car1", "fuel": "electric"}]    # a new item
    assert TEMPLATE["appliances"][0]["fuel"] == "gas"                 # the template is untouched


def test_a_row_cannot_remove_a_key_and_set_inside_it():
    with pytest.raises(CellError, match="removes 'appliances.cooling'") as err:
        apply_cells(TEMPLATE, {"appliances.cooling": "none", "appliances.cooling.seer2": "14"})
    assert err.value.column == "appliances.cooling"


def test_a_bad_row_is_located_at_its_line_and_column(tmp_path):
    template = tmp_path / "template.yaml"
    template.write_text(json.dumps(TEMPLATE))
    homes = tmp_path / "homes.csv"
    homes.write_text("id,appliances.heating.fuel,home.floor_area_ft2\n"
                     "a,gas,1500\n"
                     "b,gass,1500\n"
                     "c,gas,[1\n")
    source = open_source(homes, template)
    items = list(iter_inputs(source))
    assert [i.home_id for i in items] == ["a", "b", "c"]
    plan_of_row(str(homes), source.template, "a", items[0].payload, source.columns)
    with pytest.raises(InputError) as bad_fuel:
        plan_of_row(str(homes), source.template, "b", items[1].payload, source.columns)
    p = bad_fuel.value.problems[0]
    assert (p.line, "'gass' is not a valid fuel" in p.message, "did you mean 'gas'" in p.hint) == (3, True, True)
    with pytest.raises(InputError) as bad_cell:
        plan_of_row(str(homes), source.template, "c", items[2].payload, source.columns)
    p = bad_cell.value.problems[0]
    assert (p.line, p.col) == (4, 3) and "home.floor_area_ft2" in p.hint


def test_the_header_is_checked_before_any_home(tmp_path):
    template = tmp_path / "template.yaml"
    template.write_text(json.dumps(TEMPLATE))
    homes = tmp_path / "homes.csv"
    homes.write_text("id,hom.floor_area_ft2,home..x\nA,1,2\n")
    with pytest.raises(InputError) as err:
        open_source(homes, template)
    msgs = {(p.line, p.col): p for p in err.value.problems}
    assert "unknown plan section 'hom'" in msgs[(1, 2)].message and "'home'" in msgs[(1, 2)].hint
    assert "not a path of keys" in msgs[(1, 3)].message
    homes.write_text("name,home.floor_area_ft2\nA,1\n")
    with pytest.raises(InputError, match="no 'id' column"):
        open_source(homes, template)
    with pytest.raises(InputError, match="needs a template"):
        open_source(homes)


def test_rows_with_problems_are_recorded_and_the_run_goes_on(tmp_path):
    shutil.copy(ROOT / "sample_homes" / "minimal.yaml", tmp_path / "template.yaml")
    homes = tmp_path / "homes.csv"
    homes.write_text("id,home.floor_area_ft2,appliances.furnace.fuel\n"
                     "good,1500,gas\n"
                     "bad,-3,gas\n"
                     "good,1600,propane\n"
                     ",1700,gas\n"
                     "short,1800\n")
    source = open_source(homes, tmp_path / "template.yaml")
    with new_store(source, tmp_path / "out") as store:
        run(source, store, InProcessExecutor())
        rows = list(store.homes(("home_id", "status", "message")))
    assert [r[1] for r in rows] == ["ok", "error", "error", "error", "error"]
    assert "homes.csv:3:1: home bad: floor_area_ft2 is -3" in rows[1][2]
    assert "the id good is used by homes.csv line 2 too" in rows[2][2]
    assert "the row has no id" in rows[3][2]
    assert "the row has 2 cells, the header 3" in rows[4][2]


def test_a_folder_of_plans(tmp_path):
    for name in ("minimal.yaml", "cold_gas_100a.yaml"):
        shutil.copy(ROOT / "sample_homes" / name, tmp_path / name)
    (tmp_path / "incentives").mkdir()
    shutil.copy(ROOT / "sample_homes" / "incentives" / "demoland_invented.yaml", tmp_path / "incentives")
    (tmp_path / "broken.yaml").write_text("home: [\n")
    source = open_source(tmp_path)
    assert [i.home_id for i in iter_inputs(source)] == ["broken", "cold_gas_100a", "minimal"]
    before = source.fingerprint()
    with new_store(source, tmp_path / "out") as store:
        run(source, store, InProcessExecutor())
        rows = {r[0]: r for r in store.homes(("home_id", "status", "message"))}
    assert rows["minimal"][1] == rows["cold_gas_100a"][1] == "ok"
    assert rows["broken"][1] == "error" and "broken.yaml:" in rows["broken"][2]
    (tmp_path / "minimal.yaml").write_text((tmp_path / "minimal.yaml").read_text() + "\n# edited\n")
    assert open_source(tmp_path).fingerprint() != before
    with Store.open(store_path(tmp_path / "out"), readonly=True) as store:
        assert store.counts()["done"] == 3
