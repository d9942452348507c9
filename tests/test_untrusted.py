"""A plan file from someone else: read safely, shown safely, and planned or refused with a
located message; the files it names stay inside its folder unless the user allows them.

References: ECMA-48 5th ed. (ESC 0x1B, BEL 0x07, CSI 0x9B introduce control functions); Unicode
UAX #9 section 2 (bidirectional overrides U+202A-U+202E, isolates U+2066-U+2069); Unicode
chapter 22 (Control Pictures U+2400-U+243F); YAML 1.2.2 section 5.1 (printable characters) and
10.3 (core schema); CWE-776 (recursive entity expansion, "billion laughs"); POSIX.1-2017 open()
with O_NONBLOCK on a FIFO and S_ISREG.
"""

from __future__ import annotations

import datetime as dt
import io
import os
import threading
from contextlib import redirect_stderr, redirect_stdout
from pathlib import Path

import pytest

from homeplan import cli
from homeplan.errors import InputError
from homeplan.plan.files import INCENTIVES, PLAN, OutsideFolderError, PlanFolder, read_text
from homeplan.plan.load import load_plan, load_plan_text
from homeplan.plan.preflight import preflight
from homeplan.plan.text import clean
from homeplan.plan.yamlread import check_events, read_yaml
from homeplan.planner.chain import plan_roadmap

from .conftest import ROOT

MINIMAL = (ROOT / "sample_homes" / "minimal.yaml").read_text(encoding="utf-8")


def run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with redirect_stdout(out), redirect_stderr(err):
        code = cli.main(list(argv))
    return code, out.getvalue(), err.getvalue()


# ------------------------------------------------------------------ the sanitiser


def test_escape_sequences_are_shown_not_obeyed():
    # OSC 52 (set clipboard) and CSI 2J (clear screen): ECMA-48; ESC -> U+241B, BEL -> U+2407
    assert clean("a\x1b]52;c;SGVsbG8=\x07b\x1b[2J") == "a\u241b]52;c;SGVsbG8=\u2407b\u241b[2J"
    assert clean("x\x9b31m") == "x\ufffd31m"  # C1 CSI, ECMA-48 8-bit form


def test_bidirectional_overrides_are_shown():
    # RLO U+202E and the isolates (Unicode UAX #9, section 2) would reorder the text
    assert clean("invoice\u202egnp.exe") == "invoice\ufffdgnp.exe"
    assert "\u2066" not in clean("a\u2066b\u2069c")
    assert clean("\u05e9\u05dc\u05d5\u05dd") == "\u05e9\u05dc\u05d5\u05dd"  # plain Hebrew stays


def test_multi_line_keeps_lines_and_tabs_only():
    assert clean("a\r\nb\tc\x1b", one_line=False) == "a\nb\tc\u241b"
    assert clean("\ud800x") == "\ufffdx"  # an unpaired surrogate would break the terminal's encoder


def test_plan_text_is_sanitised_on_load():
    plan = load_plan_text(MINIMAL.replace("home:\n", 'home:\n  name: "Home\\e[2J\\u202e"\n')).plan
    assert plan.home.name == "Home\u241b[2J\ufffd"


def test_cli_prints_no_escape_from_a_plan(tmp_path):
    p = tmp_path / "p.yaml"
    p.write_text(MINIMAL.replace("home:\n", 'home:\n  name: "Home\\e]52;c;SGVsbG8=\\a\\e[2J"\n'))
    code, out, err = run("check", str(p))
    assert code == 0 and "\x1b" not in out + err and "Home\u241b]52" in out
    p.write_text(MINIMAL + 'x\x1b: 1\n')
    code, out, err = run("check", str(p))
    assert code == 2 and "\x1b" not in err and "U+001B" in err


# ------------------------------------------------------------------ reading files


def test_devices_fifos_and_folders_are_refused(tmp_path):
    for path, words in (("/dev/zero", "is a device"), (str(tmp_path), "is a folder")):
        with pytest.raises(InputError, match=words):
            read_text(path, PLAN)
    fifo = tmp_path / "fifo.yaml"
    os.mkfifo(fifo)
    done: list[str] = []

    def reader():  # a FIFO with no writer would block a plain open() forever
        try:
            read_text(fifo, PLAN)
        except InputError as err:
            done.append(str(err))

    t = threading.Thread(target=reader, daemon=True)
    t.start()
    t.join(10)
    assert done and "named pipe" in done[0]


def test_size_cap_is_checked_on_the_open_file(tmp_path):
    p = tmp_path / "big.yaml"
    p.write_bytes(b"a: 1\n" + b"#" * (PLAN.max_bytes + 10))
    with pytest.raises(InputError, match="may be at most"):
        read_text(p, PLAN)


def test_deep_nesting_is_refused_without_recursion():
    deep = "home: " + "[" * 100_000 + "]" * 100_000
    with pytest.raises(InputError, match="nested"):
        check_events(deep, "p.yaml")
    block = "home:\n" + "- " * 50 + "1\n"
    with pytest.raises(InputError, match="nested more than 32 deep"):
        check_events(block, "p.yaml")


def test_alias_bomb_and_plain_large_file_have_their_own_messages():
    bomb = "a: &a [x, x, x, x, x, x, x, x, x, x]\n" + "".join(
        f"b{i}: &b{i} [" + ", ".join([f"*{'a' if i == 1 else f'b{i - 1}'}"] * 10) + "]\n" for i in range(1, 6))
    with pytest.raises(InputError, match="aliases"):
        check_events(bomb, "p.yaml")
    many = "x:\n" + "".join(f"  - {i}\n" for i in range(25_000))
    with pytest.raises(InputError, match="holds more than 20,000 values"):
        check_events(many, "p.yaml")


@pytest.mark.parametrize("text,line,col,words", [
    ("a: 1\na: 2\n", 2, 1, "duplicate key"),
    ("? [a, b]\n: 1\n", 1, 3, "a key that is a section"),
    ("a: " + "9" * 5000 + "\n", 1, 4, "a number of 5,000 digits"),
    ("a: 2027-02-30\n", 1, 4, "not a valid date"),
    ("a: \"x\x01\"\n", 1, 6, "U+0001"),
    ("a: !!python/object:os.system x\n", 1, 4, "not allowed"),
    ("a: *nowhere\n", 1, 4, "no anchor"),
])
def test_yaml_problems_are_located(text, line, col, words):
    with pytest.raises(InputError) as info:
        read_yaml(text, "f.yaml")
    p = info.value.problems[0]
    assert (p.line, p.col) == (line, col) and words in p.message


def test_yaml_core_schema_values():
    # YAML 1.2.2 section 10.3.2: tags resolved from plain scalars
    doc = read_yaml("a: [~, true, False, 0o17, 0x1F, 1_000, 1e3, .inf, yes, '12', 2027-01-05]", "f")
    assert doc["a"][:9] == [None, True, False, 15, 31, 1000, 1000.0, float("inf"), "yes"]
    assert doc["a"][9] == "12" and doc["a"][10] == dt.date(2027, 1, 5)


def test_refused_characters_are_those_yaml_does_not_print():
    # YAML 1.2.2 section 5.1, c-printable: x09 | x0A | x0D | [x20-x7E] | x85 | [xA0-xD7FF] |
    # [xE000-xFFFD] | [x10000-x10FFFF]; every other code point is refused, each one checked
    from homeplan.plan.yamlread import _NOT_PRINTABLE

    printable = [(0x09, 0x09), (0x0A, 0x0A), (0x0D, 0x0D), (0x20, 0x7E), (0x85, 0x85), (0xA0, 0xD7FF),
                 (0xE000, 0xFFFD), (0x10000, 0x10FFFF)]
    allowed = set().union(*(range(lo, hi + 1) for lo, hi in printable))
    everything = "".join(map(chr, range(0x110000)))
    refused = {m.start() for m in _NOT_PRINTABLE.finditer(everything)}
    assert refused == set(range(0x110000)) - allowed
    with pytest.raises(InputError, match=r"U\+FFFE"):
        read_yaml("a: b\ufffe\n", "f.yaml")


# ------------------------------------------------------------------ files a plan names


def _plan_naming(tmp_path: Path, line: str) -> Path:
    folder = tmp_path / "plans"
    folder.mkdir(exist_ok=True)
    p = folder / "p.yaml"
    p.write_text(MINIMAL + line, encoding="utf-8")
    return p


def test_outside_files_are_refused_the_same_whether_they_exist_or_not(tmp_path):
    (tmp_path / "real.yaml").write_text("programs: []\n")
    messages = []
    for name in ("../real.yaml", "../missing.yaml"):
        p = _plan_naming(tmp_path, f"incentive_files: [{name}]\n")
        code, _, err = run("check", str(p))
        assert code == 2 and "outside the plan's folder" in err
        messages.append(err.replace("real", "X").replace("missing", "X"))
    assert messages[0] == messages[1]  # nothing tells whether the outside file exists


def test_an_allowed_outside_file_is_read(tmp_path):
    (tmp_path / "progs.yaml").write_text("programs: []\n")
    p = _plan_naming(tmp_path, "incentive_files: [../progs.yaml]\n")
    assert run("check", str(p), "--allow-outside", str(tmp_path / "progs.yaml"))[0] == 0


def test_a_file_that_is_not_an_incentive_file_is_never_quoted(tmp_path):
    secret = "root:x:0:0:SECRET-MARKER:/root:/bin/bash"
    (tmp_path / "plans").mkdir()
    (tmp_path / "plans" / "notes.txt").write_text(secret + "\nsecond: [line\n")
    (tmp_path / "plans" / "shadow").write_text(secret + "\n")
    for name in ("notes.txt", "shadow"):
        p = _plan_naming(tmp_path, f"incentive_files: [{name}]\n")
        code, out, err = run("plan", str(p))
        assert code == 2 and "SECRET-MARKER" not in out + err


def test_a_symlinked_weather_file_to_a_device_is_refused(tmp_path):
    p = _plan_naming(tmp_path, "")
    p.write_text(MINIMAL.replace("  floor_area_ft2: 1600\n", "  floor_area_ft2: 1600\n  climate: {weather_file: w.epw}\n"))
    (p.parent / "w.epw").symlink_to("/dev/zero")
    code, _, err = run("plan", str(p))
    assert code == 2 and "outside the plan's folder" in err
    code, _, err = run("plan", str(p), "--allow-outside", "/dev/zero")
    assert code == 2 and "is a device" in err


BILL_YEAR = ("usage:\n  weather_file: {name}\n"
             "  electricity: {{monthly_kwh: [900, 800, 700, 600, 600, 700, 800, 800, 700, 600, 700, 900]}}\n")


@pytest.mark.parametrize("command", ["check", "plan"])
def test_the_bill_year_weather_file_is_read_the_safe_way(tmp_path, command):
    """usage.weather_file gets the same checks as every file a plan names, in check as in plan."""
    p = _plan_naming(tmp_path, BILL_YEAR.format(name="bills.epw"))
    folder = p.parent
    line = 1 + MINIMAL.count("\n") + 1  # the weather_file line under usage:
    code, _, err = run(command, str(p))  # missing
    assert code == 2 and f"p.yaml:{line}:" in err and "bills.epw" in err and "Traceback" not in err
    (folder / "bills.epw").write_text("LOCATION,nowhere\nnot,a,weather,file\n")
    code, _, err = run(command, str(p))
    assert code == 2 and f"p.yaml:{line}:" in err and "weather file" in err
    (folder / "bills.epw").unlink()
    (folder / "bills.epw").symlink_to("/dev/zero")  # POSIX S_ISREG: a device is refused unread
    code, _, err = run(command, str(p), "--allow-outside", "/dev/zero")
    assert code == 2 and "is a device" in err
    p.write_text(MINIMAL + BILL_YEAR.format(name="../outside.csv"))
    code, _, err = run(command, str(p))
    assert code == 2 and "outside the plan's folder" in err


def test_a_good_bill_year_weather_file_passes_check_and_plan(tmp_path):
    import shutil

    import pvlib

    p = _plan_naming(tmp_path, BILL_YEAR.format(name="bills.csv"))
    # a TMY3 file shipped with pvlib (NREL TMY3 user's manual, Wilcox & Marion 2008, format)
    shutil.copy(Path(pvlib.__file__).parent / "data" / "723170TYA.CSV", p.parent / "bills.csv")
    assert run("check", str(p))[0] == 0
    code, out, _ = run("plan", str(p))
    assert code == 0 and "billed year's weather (bills.csv)" in out


@pytest.mark.parametrize("command", ["check", "plan"])
def test_the_meter_file_is_read_the_safe_way(tmp_path, command):
    """usage.meter_file: a device, a file outside the folder or one that is not a meter file is
    exit 2 at its line, and a line of a file that is not a meter file is never quoted."""
    p = _plan_naming(tmp_path, "usage: {meter_file: meter.xml}\n")
    line = 1 + MINIMAL.count("\n")
    (p.parent / "meter.xml").symlink_to("/dev/zero")  # POSIX S_ISREG: a device is refused unread
    code, _, err = run(command, str(p), "--allow-outside", "/dev/zero")
    assert code == 2 and f"p.yaml:{line}:" in err and "is a device" in err
    p.write_text(MINIMAL + "usage: {meter_file: ../meter.csv}\n")
    code, _, err = run(command, str(p))
    assert code == 2 and "outside the plan's folder" in err
    (p.parent / "secret.txt").write_text("root:x:0:0:SECRET-MARKER:/root:/bin/bash\n")
    p.write_text(MINIMAL + "usage: {meter_file: secret.txt}\n")
    code, out, err = run(command, str(p))
    assert code == 2 and "SECRET-MARKER" not in out + err and "Traceback" not in err


def test_plan_folder_resolves_inside_paths():
    folder = PlanFolder.of(ROOT / "sample_homes")
    assert folder.resolve("incentives/demoland_invented.yaml", ("x",), INCENTIVES).name == "demoland_invented.yaml"
    with pytest.raises(OutsideFolderError):
        folder.resolve("../README.md", ("x",), INCENTIVES)


def test_preflight_needs_no_heavy_library(tmp_path):
    """A hostile file is refused before pydantic, numpy or pvlib are imported."""
    import subprocess
    import sys

    p = tmp_path / "bomb.yaml"
    p.write_text("home: " + "[" * 100_000 + "]" * 100_000)
    code = ("import sys; from homeplan.cli import main; rc = main(['plan', sys.argv[1]]); "
            "heavy = [m for m in ('pydantic', 'numpy', 'pvlib') if m in sys.modules]; print(rc, heavy)")
    out = subprocess.run([sys.executable, "-c", code, str(p)], capture_output=True, text=True, cwd=ROOT)
    assert out.stdout.strip() == "2 []"
    preflight(ROOT / "sample_homes" / "cold_gas_100a.yaml")  # the samples pass


# ------------------------------------------------------------------ check catches what plan rejects


@pytest.mark.parametrize("edit,code_check,code_plan", [
    (("  - {kind: range}\n", "  - {kind: range}\n  - {id: wh2, kind: water_heater, year_installed: 2016}\n"), 0, 0),
    (("  - {kind: range}\n", "  - {kind: range}\n  - {kind: cooktop}\n"), 0, 0),
    (("budget:", "options: {heat_pump: {variant: zzz}}\nbudget:"), 2, 2),
    (("  floor_area_ft2: 1600\n", "  floor_area_ft2: 1600\n  roof: {year_installed: 1900}\n"), 0, 0),
    (("budget:", "usage: {electricity: {monthly_kwh: [1e308, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1]}}\nbudget:"), 2, 2),
])
def test_check_and_plan_agree(tmp_path, edit, code_check, code_plan):
    p = tmp_path / "p.yaml"
    p.write_text(MINIMAL.replace(*edit))
    c1, _, err1 = run("check", str(p))
    c2, _, err2 = run("plan", str(p))
    assert (c1, c2) == (code_check, code_plan), err1 + err2
    assert "internal error" not in err1 + err2
    if code_check == 2:
        assert err1.startswith(f"{p}:") and err1.split(":")[1].isdigit()


def test_two_water_heaters_are_two_projects():
    text = MINIMAL.replace("  - {kind: range}\n", "  - {kind: range}\n  - {id: wh2, kind: water_heater, year_installed: 2012}\n")
    result = plan_roadmap(load_plan_text(text).plan)
    labels = [p.label for p in result.projects if p.kind == "heat_pump_water_heater"]
    assert labels == ["Heat pump water heater", "Heat pump water heater (replaces wh2)"]


def test_too_many_new_loads_is_an_input_error_for_check_and_plan(tmp_path):
    apps = "".join(f"  - {{id: wh{i}, kind: water_heater, year_installed: 2012}}\n" for i in range(14))
    p = tmp_path / "p.yaml"
    p.write_text(MINIMAL.replace("appliances:\n", "appliances:\n" + apps))
    for command in ("check", "plan"):
        code, _, err = run(command, str(p))
        assert code == 2 and "ways, more than the capacity check weighs" in err
    p.write_text(MINIMAL.replace("appliances:\n", "appliances:\n" + apps * 4))
    code, _, err = run("check", str(p))
    assert code == 2 and "at most 40" in err


def test_paid_after_days_far_in_the_future_is_an_input_error(tmp_path):
    p = tmp_path / "p.yaml"
    p.write_text(MINIMAL + "incentives:\n  - {id: r, name: R (invented), administrator: A (invented), "
                 "source: invented, kind: rebate_later, kinds: [heat_pump], rate_pct: 10, "
                 "paid_after_days: 3650000}\n")
    code, _, err = run("check", str(p))
    assert code == 2 and "paid_after_days" in err


def test_debug_zero_means_no_traceback(monkeypatch):
    monkeypatch.setenv("HOMEPLAN_DEBUG", "0")
    assert not cli.debugging()
    monkeypatch.setenv("HOMEPLAN_DEBUG", "1")
    assert cli.debugging()


def test_a_loaded_sample_is_unchanged_by_the_new_reader():
    for path in sorted((ROOT / "sample_homes").glob("*.yaml")):
        assert load_plan(path).plan.home.electrical.service_amps > 0
