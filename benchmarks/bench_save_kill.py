"""SIGKILL during saving: no plan or backup file is ever lost, empty or half-written, and the next
save leaves no temporary file behind (issue "a plan file from someone else is safe to open":
500 kills, 0 lost or empty files, 0 stray temp files).

A child process saves the plan in a tight loop with homeplan's own writer (``write_atomic``,
which also writes the ``.bak``), alternating two versions of a plan padded to about 600 kB so
that each save spends most of its time writing. The parent kills it with SIGKILL after a
random delay, then checks: the plan and its backup each hold one whole version (the original,
A or B) and the plan still loads; then it saves once itself and counts the homeplan temporary
files left in the folder. Where the kill landed is told by the temporary file it left: during
the backup (``NAME.bak.<pid>...``), during the plan (``NAME.<pid>...``) or between writes.

Usage: python benchmarks/bench_save_kill.py [KILLS] [symlink]
"""

from __future__ import annotations

import collections
import os
import random
import signal
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from homeplan.plan.load import load_plan  # noqa: E402
from homeplan.plan.save import TEMP_SUFFIX, write_atomic  # noqa: E402

CHILD = r"""
import sys
from homeplan.plan.save import write_atomic
path, a, b = sys.argv[1], open(sys.argv[2]).read(), open(sys.argv[3]).read()
print("ready", flush=True)
i = 0
while True:
    write_atomic(path, a if i % 2 else b)
    i += 1
"""


def versions(folder: Path) -> tuple[str, str, str]:
    base = (ROOT / "sample_homes" / "cold_gas_100a.yaml").read_text(encoding="utf-8")
    pad = "".join(f"# padding line {i:06d} {'-' * 80}\n" for i in range(6000))  # ~600 kB
    original = base + pad
    a = base.replace("usd_per_year: 9000", "usd_per_year: 9100") + pad
    b = base.replace("usd_per_year: 9000", "usd_per_year: 9200") + pad
    (folder / "a.txt").write_text(a, encoding="utf-8")
    (folder / "b.txt").write_text(b, encoding="utf-8")
    return original, a, b


def main() -> None:
    kills = int(sys.argv[1]) if len(sys.argv) > 1 else 500
    through_link = len(sys.argv) > 2 and sys.argv[2] == "symlink"
    print(f"load average before: {Path('/proc/loadavg').read_text().split()[:3]}")
    rng = random.Random(19)
    tally: collections.Counter = collections.Counter()
    start = time.perf_counter()
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        original, a, b = versions(folder)
        real = folder / "home.yaml"
        real.write_text(original, encoding="utf-8")
        target = real
        if through_link:
            target = folder / "link.yaml"
            target.symlink_to(real.name)
        whole = {original, a, b}
        for _ in range(kills):
            child = subprocess.Popen([sys.executable, "-c", CHILD, str(target), str(folder / "a.txt"),
                                      str(folder / "b.txt")], stdout=subprocess.PIPE, cwd=ROOT)
            assert child.stdout.readline().strip() == b"ready"
            time.sleep(rng.uniform(0.0, 0.08))
            os.kill(child.pid, signal.SIGKILL)
            child.wait()
            child.stdout.close()
            temps = [p.name for p in folder.iterdir() if p.name.endswith(TEMP_SUFFIX)]
            if any(".bak." in t for t in temps):
                tally["killed while writing the backup"] += 1
            elif temps:
                tally["killed while writing the plan"] += 1
            else:
                tally["killed between writes"] += 1
            text = real.read_text(encoding="utf-8")
            bak = real.with_name(real.name + ".bak")
            bak_text = bak.read_text(encoding="utf-8") if bak.exists() else None
            if text not in whole:
                tally["plan lost, empty or partial"] += 1
            if bak_text is not None and bak_text not in whole:
                tally["backup lost, empty or partial"] += 1
            if bak_text is None:
                tally["no backup yet"] += 1
            try:
                load_plan(target)
            except Exception:  # noqa: BLE001 - counted
                tally["plan does not load"] += 1
            write_atomic(target, a)  # the next save
            left = [p.name for p in folder.iterdir() if p.name.endswith(TEMP_SUFFIX)]
            tally["stray temp files after the next save"] += len(left)
            if through_link and not target.is_symlink():
                tally["symlink replaced by a file"] += 1
    print(f"{kills} SIGKILLs during saving{' through a symlink' if through_link else ''} "
          f"in {time.perf_counter() - start:.0f} s:")
    for key in ("killed while writing the backup", "killed while writing the plan", "killed between writes",
                "plan lost, empty or partial", "backup lost, empty or partial", "plan does not load",
                "no backup yet", "stray temp files after the next save", "symlink replaced by a file"):
        print(f"  {key:40s} {tally.get(key, 0):>5}")
    print(f"load average after: {Path('/proc/loadavg').read_text().split()[:3]}")


if __name__ == "__main__":
    main()
