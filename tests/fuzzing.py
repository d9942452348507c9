"""Fuzzed plan, incentive and weather files, and a harness that runs the commands on them.

Shared by the fuzz tests (``tests/test_fuzz.py``, bounded and repeatable with hypothesis) and
the long run (``benchmarks/bench_fuzz.py``). Everything is a function of a ``random.Random``,
so a seed gives the same file every time.

A fuzzed plan starts from one of the sample homes and gets a few mutations: a value anywhere
replaced by a hostile one (huge, negative, NaN, a 5,000-digit number, an escape sequence, a
bidirectional override, a far date, a list or section where a number goes), a list item
duplicated (two water heaters, a range and a cooktop), keys removed or added, an appliance of
any kind, fuel and age added, options with unknown variants, and sometimes damage to the text
itself (a cut, a control character, deep nesting, an alias bomb).
"""

from __future__ import annotations

import contextlib
import copy
import datetime as dt
import io
import random
import traceback
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import yaml

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = sorted((ROOT / "sample_homes").glob("*.yaml"))
INCENTIVE_SAMPLES = sorted((ROOT / "sample_homes" / "incentives").glob("*.yaml"))

KINDS = ("furnace", "boiler", "central_ac", "room_ac", "heat_pump", "mini_split", "baseboard",
         "water_heater", "range", "cooktop", "wall_oven", "dryer")
FUELS = ("gas", "propane", "oil", "electric", "wood", None)
HOSTILE_STRINGS = (
    "\x1b]52;c;SGVsbG8=\x07", "\x1b[2J\x1b[H", "\u202eevil\u202c", "a\u2066b\u2069", "\x9b31m",
    "", " ", "x" * 5000, "名前", "\ud83c\udfe0"[:0] + "🏠", "[bold]markup[/]", "=1+2", "@SUM(A1)",
    "line\nbreak", "tab\there", "../../../etc/passwd", "/dev/zero", "NaN", "inf", "1e308",
    "2027-02-30", "null", "zzz",
)
HOSTILE_NUMBERS = (0, -1, 1, 0.5, -0.0, 1e308, -1e308, 1e-308, 3650000, 2**63, -(2**63),
                   float("inf"), float("-inf"), float("nan"), 1900, 2100, 9999, 12, 13, 100, 101,
                   1e6, 1e9, 0.001)
HOSTILE_DATES = (dt.date(1, 1, 1), dt.date(9999, 12, 31), dt.date(1970, 1, 1), dt.date(2027, 3, 1))


def _load(path: Path) -> Any:
    return yaml.load(path.read_text(encoding="utf-8"), Loader=yaml.CSafeLoader)


_BASES = None


def bases() -> list[Any]:
    global _BASES  # noqa: PLW0603 - a read-only memo of the sample homes for this process
    if _BASES is None:
        _BASES = [_load(p) for p in SAMPLES]
    return _BASES


def hostile_value(rng: random.Random) -> Any:
    pick = rng.random()
    if pick < 0.35:
        return rng.choice(HOSTILE_NUMBERS)
    if pick < 0.65:
        return rng.choice(HOSTILE_STRINGS)
    if pick < 0.72:
        return rng.choice(HOSTILE_DATES)
    if pick < 0.8:
        return rng.choice((True, False, None))
    if pick < 0.9:
        return [rng.choice(HOSTILE_NUMBERS) for _ in range(rng.choice((0, 1, 11, 12, 13)))]
    return {rng.choice(("a", "kind", "variant", "id", "x")): rng.choice(HOSTILE_NUMBERS)}


def mostly(rng: random.Random, good: tuple, bad: tuple, p_bad: float = 0.1) -> Any:
    """A good choice most of the time, a bad one sometimes."""
    return rng.choice(bad) if rng.random() < p_bad else rng.choice(good)


def nearby_value(rng: random.Random, value: Any) -> Any:
    """A value of the same type, often at an edge: what a plan that passes the checks holds."""
    if isinstance(value, bool):
        return not value
    if isinstance(value, int):
        return rng.choice((0, 1, value * 2, value // 2, value + 1, value - 1, value * 10))
    if isinstance(value, float):
        return rng.choice((0.0, 1e-9, value * 10, value / 10, value * 1.5, value + 1e-6))
    if isinstance(value, str):
        return rng.choice(HOSTILE_STRINGS[:12]) if rng.random() < 0.5 else value + rng.choice(HOSTILE_STRINGS[:5])
    if isinstance(value, dt.date):
        return value.replace(year=rng.choice((1901, 1990, 2026, 2040, 2099)))
    if isinstance(value, list) and value:
        return value + [copy.deepcopy(rng.choice(value))] if rng.random() < 0.5 else value[:-1]
    return value


def _paths(node: Any, prefix: tuple = ()) -> list[tuple]:
    out = [prefix] if prefix else []
    if isinstance(node, dict):
        for k, v in node.items():
            out += _paths(v, (*prefix, k))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            out += _paths(v, (*prefix, i))
    return out


def _parent(doc: Any, path: tuple) -> tuple[Any, Any]:
    node = doc
    for p in path[:-1]:
        node = node[p]
    return node, path[-1]


def mutate_plan(rng: random.Random, doc: Any) -> Any:
    """One mutation of a plan document (a dict), in place; returns the document."""
    op = rng.random()
    paths = _paths(doc)
    if op < 0.35 and paths:  # a value anywhere: near its own most of the time, anything else some
        parent, key = _parent(doc, rng.choice(paths))
        parent[key] = nearby_value(rng, parent[key]) if rng.random() < 0.75 else hostile_value(rng)
    elif op < 0.45:  # duplicate an appliance or vehicle (two water heaters, two ranges)
        for section in ("appliances", "vehicles"):
            items = doc.get(section)
            if isinstance(items, list) and items and isinstance(items[0], dict):
                twin = copy.deepcopy(rng.choice(items))
                if rng.random() < 0.7 and isinstance(twin, dict):
                    twin["id"] = f"twin{rng.randrange(100)}"
                items.append(twin)
    elif op < 0.6:  # an appliance of any kind, fuel and age
        a = {"kind": mostly(rng, KINDS, ("fireplace", "zzz"))}
        if rng.random() < 0.5:
            a["fuel"] = mostly(rng, FUELS, ("coal",))
        if rng.random() < 0.7:
            a["year_installed"] = mostly(rng, (1900, 1950, 1990, 2010, 2026), (2101, 1800))
        if rng.random() < 0.5:
            a["id"] = mostly(rng, (f"a{rng.randrange(1000)}", "dup"), ("x y", "furnace"))
        if rng.random() < 0.3:
            a["condition"] = mostly(rng, ("good", "failed", "failing", "poor"), ("broken",))
        if not isinstance(doc.get("appliances"), list):
            doc["appliances"] = []
        doc["appliances"].append(a)
    elif op < 0.68:  # options with variants, sizes and amps
        pid = rng.choice(("heat_pump", "heat_pump_water_heater", "induction_range", "solar",
                          "battery", "ev_charger", "zzz"))
        opt = {rng.choice(("variant", "size", "amps", "cost_usd")): rng.choice(
            ("zzz", "ducted", "cold_climate", "v120", "a40", 0, -5, 1e9, 48))}
        doc.setdefault("options", {})
        if isinstance(doc["options"], dict):
            doc["options"][pid] = opt
    elif op < 0.76 and paths:  # a key removed
        parent, key = _parent(doc, rng.choice(paths))
        with contextlib.suppress(KeyError, IndexError, TypeError):
            del parent[key]
    elif op < 0.82:  # a roof, any age
        home = doc.get("home")
        if isinstance(home, dict):
            home["roof"] = {"year_installed": rng.choice((1900, 1905, 1950, 2000, 2026)),
                            "usable_area_ft2": mostly(rng, (0, 10, 400, 2000), (1e9,)),
                            "material": mostly(rng, ("asphalt_shingle", "metal", "slate"), ("zzz",))}
    elif op < 0.88:  # bills
        doc["usage"] = {"electricity": {"monthly_kwh": [mostly(rng, (0, 1e-3, 1e5, 1e308), HOSTILE_NUMBERS)] +
                                        [500] * mostly(rng, (11,), (10, 12))},
                        "gas": {"monthly_therms": [mostly(rng, (0, 1e4, 1e308), HOSTILE_NUMBERS)] * 12}}
    elif op < 0.94:  # an inline incentive program with odd numbers
        doc["incentives"] = [{"id": "p", "name": rng.choice(HOSTILE_STRINGS), "kind": "tax_credit",
                              "administrator": "Fuzz office (invented)",
                              "kinds": ["heat_pump"], "rate_pct": mostly(rng, (0, 10, 30, 100), HOSTILE_NUMBERS),
                              "paid_after_days": mostly(rng, (0, 30, 365, 3650000), (-1, 1e308)),
                              "source": "invented for the fuzz tests"}]
    else:  # budget and years
        doc["budget"] = {"usd_per_year": mostly(rng, (0, 1, 5000, 1e6, 1e12), HOSTILE_NUMBERS),
                         "first_year": mostly(rng, (1901, 2027, 2099, 2100), (9999,)),
                         "horizon_years": mostly(rng, (1, 10, 30), (0, 31, 1000))}
    return doc


def dump(doc: Any) -> str:
    return yaml.safe_dump(doc, allow_unicode=True, sort_keys=False, width=4096)


def damage_text(rng: random.Random, text: str) -> str:
    """Damage to the text itself: cut, a control character, nesting, an alias bomb, bytes."""
    op = rng.random()
    if op < 0.2:
        return text[: rng.randrange(len(text) + 1)]
    if op < 0.35:
        at = rng.randrange(len(text) + 1)
        return text[:at] + rng.choice(("\x01", "\x1b", "\x7f", "\t", "\ufeff", "\x00")) + text[at:]
    if op < 0.5:
        depth = rng.choice((40, 500, 5000))
        return text + "deep: " + "[" * depth + "]" * depth + "\n"
    if op < 0.6:
        bomb = "a: &a [x, x, x, x, x, x, x, x, x, x]\n"
        for i in range(1, 8):
            bomb += f"b{i}: &b{i} [" + ", ".join([f"*{'a' if i == 1 else f'b{i - 1}'}"] * 10) + "]\n"
        return text + bomb
    if op < 0.7:
        return text + rng.choice(("? [a, b]\n: 1\n", "---\nb: 2\n", "x: !!python/object:os.system ls\n",
                                  "home: 1\n", "x: " + "9" * 5000 + "\n", "x: *nope\n"))
    if op < 0.8:
        return text.replace(":", rng.choice((" :", "::", ": :")), 1)
    return text


def fuzzed_plan_text(rng: random.Random) -> str:
    doc = copy.deepcopy(rng.choice(bases()))
    for _ in range(rng.randrange(1, 4)):
        mutate_plan(rng, doc)
    text = dump(doc)
    if rng.random() < 0.1:
        text = damage_text(rng, text)
    return text


def plan_folder(tmp: Path) -> Path:
    """A folder laid out like sample_homes/ (its incentive files beside the plan)."""
    import shutil

    folder = tmp / "plans"
    if not folder.exists():
        shutil.copytree(ROOT / "sample_homes", folder)
    return folder


def fuzzed_incentive_text(rng: random.Random) -> str:
    doc = _load(rng.choice(INCENTIVE_SAMPLES))
    for _ in range(rng.randrange(1, 4)):
        paths = _paths(doc)
        if paths:
            parent, key = _parent(doc, rng.choice(paths))
            parent[key] = hostile_value(rng)
    text = dump(doc)
    return damage_text(rng, text) if rng.random() < 0.3 else text


def fuzzed_weather_text(rng: random.Random, epw_text: str) -> str:
    """An EPW text with some of its fields or lines damaged."""
    lines = epw_text.split("\n")
    for _ in range(rng.randrange(1, 4)):
        op = rng.random()
        i = rng.randrange(len(lines))
        if op < 0.3:
            fields = lines[i].split(",")
            j = rng.randrange(len(fields))
            fields[j] = str(rng.choice(HOSTILE_NUMBERS + ("", "x", "\x1b[2J")))
            lines[i] = ",".join(fields)
        elif op < 0.5:
            del lines[i: i + rng.choice((1, 10, 5000))]
        elif op < 0.6:
            lines = lines[: rng.randrange(len(lines))]
        elif op < 0.7:
            lines[0] = lines[0].replace(",", ";", 1)
        elif op < 0.8:
            lines.insert(i, "garbage,,,,")
    return "\n".join(lines)


# --------------------------------------------------------------------------- harness


@dataclass(frozen=True)
class Outcome:
    command: str
    code: int | None          # exit code; None when an exception escaped main()
    seconds: float
    stderr: str
    trace: str = ""
    cpu_seconds: float = 0.0  # this process's CPU time (all its threads) during the command

    @property
    def internal_error(self) -> bool:
        return self.code == 1 and "internal error" in self.stderr

    @property
    def traceback(self) -> bool:
        return self.code is None or "Traceback (most recent call last)" in self.stderr

    @property
    def ok(self) -> bool:
        return self.code in (0, 2) and not self.traceback


def run_command(argv: list[str]) -> Outcome:
    """homeplan's own entry point, in this process, with stdout and stderr captured."""
    import time

    from homeplan.cli import main

    out, err = io.StringIO(), io.StringIO()
    start, cpu = time.perf_counter(), time.process_time()
    trace = ""
    try:
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            code: int | None = main(argv)
    except SystemExit as exc:  # argparse
        code = exc.code if isinstance(exc.code, int) else 2
    except Exception:  # noqa: BLE001 - a traceback is what the fuzz looks for
        # (not BaseException: an interrupt, or the benchmark's alarm for a hang, goes to the caller)
        code = None
        trace = traceback.format_exc()
    return Outcome(argv[0], code, time.perf_counter() - start, err.getvalue(), trace,
                   time.process_time() - cpu)


def run_commands(plan: Path, out_dir: Path, commands: tuple[str, ...] | None = None) -> list[Outcome]:
    """check, plan, costs, capacity, print and export on one plan file."""
    argvs = {
        "check": ["check", str(plan)],
        "plan": ["plan", str(plan)],
        "costs": ["costs", str(plan)],
        "capacity": ["capacity", str(plan)],
        "print": ["print", str(plan), "-o", str(out_dir / "summary.html")],
        "export": ["export", str(plan), "--json", str(out_dir / "r.json"), "--ics", str(out_dir / "r.ics"),
                   "--csv", str(out_dir / "csv")],
    }
    _RUNS[0] += 1  # a new file set: what shared_planning kept is for the last one
    return [run_command(argvs[c]) for c in (commands or tuple(argvs))]


_RUNS = [0]  # calls of run_commands in this process (keys shared_planning's memo)


@contextlib.contextmanager
def shared_planning():
    """Within the block, the commands of one :func:`run_commands` call share a planning run.

    ``plan``, ``costs``, ``capacity``, ``print`` and ``export`` each load the file and then call
    the same planner on the same plan; the result (or the error) of the first call is reused by
    the others of the same call (the files it names do not change between them). Loading,
    checking, the views and the writing still run for every command.
    """
    import hashlib

    from homeplan.cli import common

    real = common.plan_roadmap
    memo: dict[str, Any] = {}

    def planned(loaded, *args, **kwargs):
        key = f"{_RUNS[0]}:" + hashlib.sha256(Path(loaded.path).read_bytes()).hexdigest()
        key += repr(sorted(map(str, loaded.allow)))
        if key not in memo:
            memo.clear()
            try:
                memo[key] = ("ok", real(loaded, *args, **kwargs))
            except Exception as exc:  # noqa: BLE001 - re-raised for every command alike
                memo[key] = ("error", exc)
        kind, value = memo[key]
        if kind == "error":
            raise value
        return value

    common.plan_roadmap = planned
    try:
        yield
    finally:
        common.plan_roadmap = real


def tmy3_text() -> str:
    """pvlib's TMY3 sample (Greensboro NC, NSRDB 723170), the weather file the fuzz damages."""
    import pvlib

    return (Path(pvlib.__file__).parent / "data" / "723170TYA.CSV").read_text(encoding="utf-8")


def weather_plan_text(weather_file: str) -> str:
    """A small plan that names a weather file (beside it)."""
    return (ROOT / "sample_homes" / "minimal.yaml").read_text(encoding="utf-8").replace(
        "  floor_area_ft2: 1600\n", f"  floor_area_ft2: 1600\n  climate: {{weather_file: {weather_file}}}\n")
