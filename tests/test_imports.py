"""The describing commands load no numerical library.

``check``, ``schema``, ``graph`` and ``lifecycle`` read a plan and describe it; only planning
needs numpy, pandas, scipy and pvlib (and a plan that names a weather or meter file, whose
readings are arrays), and of them only ``graph`` needs networkx. Each command runs in a fresh
interpreter on every sample, and the modules it loaded are listed afterwards. A structural check
of the rule that heavy libraries are imported only where they are needed, not a timing.
"""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from .conftest import ROOT, SAMPLES

NUMERICAL = ("numpy", "pandas", "scipy", "pvlib")

_RUN = """
import contextlib, io, json, sys
from homeplan.cli import main
codes = []
for args in json.loads(sys.argv[1]):
    with contextlib.redirect_stdout(io.StringIO()):
        codes.append(main(args))
print(json.dumps({"codes": codes, "loaded": sorted({m.split(".")[0] for m in sys.modules})}))
"""


def _loaded_after(runs: list[list[str]]) -> tuple[list[int], set[str]]:
    r = subprocess.run([sys.executable, "-c", _RUN, json.dumps(runs)], capture_output=True, text=True,
                       cwd=ROOT, check=True)
    out = json.loads(r.stdout.strip().splitlines()[-1])
    return out["codes"], set(out["loaded"])


@pytest.mark.parametrize("command", ["check", "schema", "graph", "lifecycle"])
def test_describing_commands_load_no_numerical_library(command):
    runs = [[command]] if command == "schema" else [[command, str(p)] for p in SAMPLES]
    codes, loaded = _loaded_after(runs)
    assert codes == [0] * len(runs)
    assert "pydantic" in loaded  # the walk sees the modules the commands did load
    assert sorted(loaded & set(NUMERICAL)) == []
    if command != "graph":  # the upgrade graph is a networkx graph; check reads its plain form
        assert "networkx" not in loaded


def test_planning_loads_them():
    """Guard against a listing that misses what a command loads: ``plan`` does need numpy."""
    codes, loaded = _loaded_after([["plan", str(ROOT / "sample_homes" / "minimal.yaml")]])
    assert codes == [0] and "numpy" in loaded and "networkx" in loaded
