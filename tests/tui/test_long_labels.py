"""Long names at 80 columns: labels wrap at spaces or are shortened after a whole word; no word
is cut (checked on the text the views draw, not on the helpers alone)."""

from __future__ import annotations

from homeplan.tui.app import status_line
from homeplan.tui.format import trunc_words, wrap_labels

from .conftest import long_names_plan, make_app, settle

LONG = "Okafor-Lindqvist-Vandenberghe family house (invented)"


def test_trunc_words_keeps_whole_words_and_the_invented_mark():
    out = trunc_words(LONG, 39)
    assert out == "Okafor-Lindqvist-… (invented)"
    out = trunc_words(LONG, 45)
    assert out == "Okafor-Lindqvist-Vandenberghe… (invented)" and len(out) <= 45
    assert trunc_words("Short house", 39) == "Short house"


def test_status_line_fits_80_columns_with_the_file_name():
    line = status_line(LONG, ("plan up to date", ""), False, ("$9,000/yr", ""),
                       "long_names_home.yaml", 80)
    assert line.cell_len <= 80
    assert line.plain.endswith("long_names_home.yaml") and "(invented)" in line.plain


def test_wrap_labels_never_cut_and_tell_alike_names_apart():
    labels = ["Electric vehicle (replaces 2012 station wagon for the daily commute)",
              "Electric vehicle (replaces 2017 station wagon for family trips)", "Gas furnace"]
    out = wrap_labels(labels, 23)
    assert out[2] == "Gas furnace"
    for text in out:
        assert "…" not in text and all(len(line) <= 23 for line in text.split("\n"))
    assert out[0].replace("\n", " ") == "EV for 2012 station wagon for the daily commute"
    assert out[0] != out[1]


async def test_roadmap_and_home_show_every_word_of_long_names(tmp_path):
    from homeplan.tui.widgets.home import Inventory
    from homeplan.tui.widgets.roadmap import Timeline

    app = make_app(long_names_plan(tmp_path))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        for key, table_type in (("2", Inventory), ("3", Timeline)):
            await pilot.press(key)
            await pilot.pause()
            table = app.screen.query_one(table_type)
            text = " ".join(" ".join(str(table.get_row_at(i)[0]).split())
                            for i in range(table.row_count))
            assert "2012 station wagon for the daily commute" in text
            assert "2017 station wagon for family trips" in text
            assert "…" not in text


def test_next_box_wraps_a_long_first_step(tmp_path):
    import dataclasses

    from homeplan.plan.load import load_plan
    from homeplan.tui.widgets.base import ViewData
    from homeplan.tui.widgets.overview import next_text

    from .conftest import shared_planner

    path = long_names_plan(tmp_path)
    plan = load_plan(path).plan
    result = shared_planner(plan, tmp_path)
    road = result.roadmap
    long = "Electric vehicle (replaces 2012 station wagon for the daily commute)"
    steps = (dataclasses.replace(road.steps[0], label=long), *road.steps[1:])
    result = dataclasses.replace(result, roadmap=dataclasses.replace(road, steps=steps))
    text = next_text(ViewData(plan=plan, result=result, path=path), 80).plain
    assert "…" not in text.split("Then:")[0]
    assert "EV for 2012 station wagon for the daily commute" in " ".join(text.split())
    steps_part = text.split("Why now")[0]  # the rest is prose, wrapped by the box itself
    assert all(len(line) <= 76 for line in steps_part.split("\n"))  # inside the box at 80
