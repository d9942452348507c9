"""Hostile files: every one must exit 2 in < 2 s and < 200 MB (issue "a plan file from someone
else is safe to open").

Each case is a plan file, or a plan that names a hostile incentive or weather file; each runs as
a new ``homeplan`` process (``check``, ``plan`` and ``open``), timed from start to exit, with its
peak memory (``ru_maxrss`` of the child, from wait4). Printed: exit code, seconds, MB, and the
first line of the message, which must not hold an escape character nor a line of a file that is
not a plan, incentive or weather file.

Usage: python benchmarks/bench_hostile.py
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
HOMEPLAN = [sys.executable, "-m", "homeplan.cli"]
BASE = (ROOT / "sample_homes" / "minimal.yaml").read_text(encoding="utf-8")
SECRET = "root:x:0:0:SECRET-LINE-MARKER:/root:/bin/bash"


def _bomb(levels: int = 9, width: int = 10) -> str:
    out = "a0: &a0 [" + ", ".join(["lol"] * width) + "]\n"
    for i in range(1, levels):
        out += f"a{i}: &a{i} [" + ", ".join([f"*a{i - 1}"] * width) + "]\n"
    return out


def _named(folder: Path, line: str, extra_home: str = "") -> Path:
    plan = folder / f"names_{abs(hash(line)) % 10**8}.yaml"
    text = BASE.replace("  floor_area_ft2: 1600\n", f"  floor_area_ft2: 1600\n{extra_home}")
    plan.write_text(text + line, encoding="utf-8")
    return plan


def _big(path: Path, head: str, mb: int = 25) -> None:
    """A file of ``mb`` MB written a megabyte at a time (this process stays small: a child's peak
    memory, as wait4 reports it, counts what it shared with this process before its exec)."""
    with open(path, "w", encoding="utf-8") as fh:
        fh.write(head)
        for _ in range(mb):
            fh.write("# " + "x" * (1024 * 1024 - 3) + "\n")


def cases(folder: Path) -> list[tuple[str, Path, list[str]]]:
    """(what, plan file, extra arguments)."""
    out: list[tuple[str, Path, list[str]]] = []

    def plan_file(name: str, content: bytes | str) -> Path:
        p = folder / name
        p.write_bytes(content if isinstance(content, bytes) else content.encode("utf-8"))
        return p

    out.append(("alias bomb (plan)", plan_file("bomb.yaml", BASE + _bomb()), []))
    (folder / "bomb_incentives.yaml").write_text("programs: []\n" + _bomb(), encoding="utf-8")
    out.append(("alias bomb (incentive file)", _named(folder, "incentive_files: [bomb_incentives.yaml]\n"), []))
    out.append(("device as plan (/dev/zero)", Path("/dev/zero"), []))
    out.append(("device as plan (/dev/urandom)", Path("/dev/urandom"), []))
    os.symlink("/dev/zero", folder / "link_to_zero.yaml")
    out.append(("symlink to a device as plan", folder / "link_to_zero.yaml", []))
    os.symlink("/dev/zero", folder / "weather.epw")
    plan = _named(folder, "", "  climate: {weather_file: weather.epw}\n")
    out.append((".epw symlink to /dev/zero", plan, []))
    out.append((".epw symlink to /dev/zero, allowed", plan, ["--allow-outside", "/dev/zero"]))
    out.append(("incentive file /dev/zero, allowed", _named(folder, "incentive_files: [/dev/zero]\n"),
                ["--allow-outside", "/dev/zero"]))
    os.mkfifo(folder / "fifo.yaml")
    out.append(("FIFO as plan", folder / "fifo.yaml", []))
    os.mkfifo(folder / "fifo_incentives.yaml")
    out.append(("FIFO as incentive file", _named(folder, "incentive_files: [fifo_incentives.yaml]\n"), []))
    out.append(("folder as plan", folder, []))
    deep = 100_000
    out.append(("nesting 100,000 deep (flow lists)",
                plan_file("deep_flow.yaml", "home: " + "[" * deep + "]" * deep + "\n"), []))
    out.append(("nesting 100,000 deep (flow maps)",
                plan_file("deep_map.yaml", "home: " + "{a: " * deep + "1" + "}" * deep + "\n"), []))
    out.append(("nesting 100,000 deep (block lists)",
                plan_file("deep_block.yaml", "home:\n" + "- " * deep + "1\n"), []))
    (folder / "deep_incentives.yaml").write_text("programs: " + "[" * deep + "]" * deep + "\n", encoding="utf-8")
    out.append(("nesting 100,000 deep (incentive file)",
                _named(folder, "incentive_files: [deep_incentives.yaml]\n"), []))
    _big(folder / "big.yaml", BASE)
    out.append(("25 MB plan", folder / "big.yaml", []))
    _big(folder / "big_incentives.yaml", "programs: []\n")
    out.append(("25 MB incentive file", _named(folder, "incentive_files: [big_incentives.yaml]\n"), []))
    out.append(("0.8 MB of values, no alias", plan_file("values.yaml", BASE + "extra:\n" + "".join(
        f"  - {{n: {i}, v: {i}}}\n" for i in range(32_000))), []))
    out.append(("binary (random bytes)", plan_file("random.yaml", os.urandom(1 << 20)), []))
    out.append(("binary (PNG header)", plan_file("png.yaml", b"\x89PNG\r\n\x1a\n" + os.urandom(4096)), []))
    out.append(("raw escape sequence in the file", plan_file("esc_raw.yaml", BASE.replace(
        "home:\n", "home:\n  name: x\x1b]52;c;SGVsbG8=\x07\x1b[2J\n")), []))
    out.append(("5,000-digit number", plan_file("digits.yaml", BASE + "x: " + "9" * 5000 + "\n"), []))
    out.append(("tag that constructs an object", plan_file("tag.yaml", BASE + "x: !!python/object/apply:os.system [ls]\n"), []))
    (folder / "secret.txt").write_text(SECRET + "\n", encoding="utf-8")
    out.append(("passwd-like file as incentive file", _named(folder, "incentive_files: [secret.txt]\n"), []))
    out.append(("../../etc/passwd as incentive file", _named(folder, "incentive_files: [../../../../etc/passwd]\n"), []))
    return out


def run_one(argv: list[str], timeout_s: float = 30.0) -> tuple[int | None, float, float, str]:
    """(exit code, seconds, peak MB, stderr) of one new process."""
    start = time.perf_counter()
    proc = subprocess.Popen(argv, stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL,
                            stderr=subprocess.PIPE, cwd=ROOT, env={**os.environ, "TERM": "dumb"})
    deadline = start + timeout_s
    while True:
        pid, status, usage = os.wait4(proc.pid, os.WNOHANG)
        if pid:
            break
        if time.perf_counter() > deadline:
            proc.kill()
            pid, status, usage = os.wait4(proc.pid, 0)
            err = proc.stderr.read().decode("utf-8", "replace")
            return None, time.perf_counter() - start, usage.ru_maxrss / 1024, err
        time.sleep(0.005)
    seconds = time.perf_counter() - start
    err = proc.stderr.read().decode("utf-8", "replace")
    proc.stderr.close()
    return os.waitstatus_to_exitcode(status), seconds, usage.ru_maxrss / 1024, err


def main() -> None:
    print(f"load average before: {Path('/proc/loadavg').read_text().split()[:3]}")
    worst_s = worst_mb = 0.0
    failures = 0
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp) / "plans"
        folder.mkdir()
        for what, plan, extra in cases(folder):
            for command in ("check", "plan", "open"):
                code, seconds, mb, err = run_one([*HOMEPLAN, command, str(plan), *extra])
                first = err.strip().splitlines()[0] if err.strip() else ""
                leaks = "\x1b" in err or "SECRET-LINE-MARKER" in err
                ok = code == 2 and seconds < 2.0 and mb < 200 and not leaks
                failures += not ok
                worst_s, worst_mb = max(worst_s, seconds), max(worst_mb, mb)
                print(f"{'ok ' if ok else 'BAD'} {what:42s} {command:6s} exit {code}  {seconds:5.2f} s "
                      f"{mb:6.1f} MB  {first[:110]}" + ("  [LEAK]" if leaks else ""))
    print(f"worst: {worst_s:.2f} s, {worst_mb:.1f} MB; {failures} case(s) missing the target")
    print(f"load average after: {Path('/proc/loadavg').read_text().split()[:3]}")


if __name__ == "__main__":
    main()
