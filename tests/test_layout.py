"""The package layout holds: no import cycle, engines stand alone, views sit on top.

These are checks of the project's own architecture (docs/developing.md), not of its numbers:
they read every module's imports with ``ast`` and walk the graph with networkx.
"""

from __future__ import annotations

import ast
from dataclasses import dataclass
from pathlib import Path

import networkx as nx
import pytest

from .conftest import ROOT

PACKAGE = ROOT / "homeplan"
ENGINES = ("energy", "electrical", "money", "schedule")
VIEWS = ("cli", "tui", "report", "portfolio")

# What each part of the package may import from homeplan (besides itself). The root module
# (homeplan/__init__.py) only re-exports lazily and is importable by anyone (for __version__).
ALLOWED: dict[str, set[str]] = {
    **{e: set() for e in ENGINES},
    "errors": set(),
    "units": set(),
    "catalog": set(),
    "plan": {"errors", "units"},
    "result": {"plan", "money"},
    "planner": {"plan", "result", "catalog", "errors", "units", *ENGINES},
    "report": {"plan", "result", "catalog", "errors", "units", "planner", *ENGINES},
    "portfolio": {"plan", "result", "catalog", "errors", "units", "planner", "report", *ENGINES},
    "tui": {"plan", "result", "catalog", "errors", "units", "planner", "report", "portfolio", *ENGINES},
    "cli": {"plan", "result", "catalog", "errors", "units", "planner", "report", "tui", "portfolio",
            *ENGINES},
}

# Function-local imports of the project's own modules are allowed only to defer a heavy
# library, with a comment saying so on the line before.
DEFERRED = {
    ("homeplan.cli.app", "homeplan.tui.app"),               # textual
    ("homeplan.cli.app", "homeplan.tui.portfolio"),
    ("homeplan.tui.app", "homeplan.planner.chain"),         # numpy, scipy, pvlib, networkx
    ("homeplan.tui.app", "homeplan.planner.context"),
    ("homeplan.tui.app", "homeplan.planner.diskstore"),       # numpy
    ("homeplan.cli.describe", "homeplan.planner.basis"),    # a named weather file: numpy, pandas, pvlib
    ("homeplan.cli.describe", "homeplan.planner.meter"),    # a named meter file: numpy
    ("homeplan.tui.app", "homeplan.planner.diskstore"),     # with the planner, after the first paint
}


@dataclass(frozen=True)
class Edge:
    source: str
    target: str
    line: int
    local: bool          # inside a function
    comment: str         # the line before the import, stripped


def _module_name(path: Path) -> str:
    parts = path.relative_to(ROOT).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


MODULES = {_module_name(p): p for p in sorted(PACKAGE.rglob("*.py"))}


def _resolve(name: str) -> str | None:
    while name and name not in MODULES:
        name = name.rpartition(".")[0]
    return name or None


def _type_checking_nodes(tree: ast.AST) -> set[int]:
    out: set[int] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.If) and "TYPE_CHECKING" in ast.unparse(node.test):
            out.update(id(n) for n in ast.walk(node))
    return out


def _edges() -> list[Edge]:
    edges = []
    for name, path in MODULES.items():
        source = path.read_text(encoding="utf-8")
        lines = source.splitlines()
        tree = ast.parse(source)
        typing_only = _type_checking_nodes(tree)
        local_ids = {id(n) for f in ast.walk(tree) if isinstance(f, ast.FunctionDef | ast.AsyncFunctionDef)
                     for n in ast.walk(f)}
        for node in ast.walk(tree):
            if id(node) in typing_only:
                continue
            targets: list[str] = []
            if isinstance(node, ast.ImportFrom) and node.module and node.module.startswith("homeplan"):
                targets = [_resolve(f"{node.module}.{a.name}") or _resolve(node.module) or ""
                           for a in node.names]
            elif isinstance(node, ast.Import):
                targets = [_resolve(a.name) or "" for a in node.names if a.name.startswith("homeplan")]
            for t in targets:
                if t and t != name:
                    edges.append(Edge(name, t, node.lineno, id(node) in local_ids,
                                      lines[node.lineno - 2].strip() if node.lineno > 1 else ""))
    return edges


EDGES = _edges()


def _part(module: str) -> str:
    """The part of the package a module belongs to: ``homeplan.planner.chain`` -> ``planner``."""
    parts = module.split(".")
    return parts[1] if len(parts) > 1 else ""


def test_no_import_cycle():
    g = nx.DiGraph((e.source, e.target) for e in EDGES)
    cycles = [c for c in nx.strongly_connected_components(g) if len(c) > 1]
    assert cycles == [], f"import cycles: {cycles}"


@pytest.mark.parametrize("part", sorted(ALLOWED))
def test_each_part_imports_only_what_sits_below_it(part):
    bad = sorted({f"{e.source}:{e.line} -> {e.target}" for e in EDGES
                  if _part(e.source) == part and _part(e.target) not in {part, "", *ALLOWED[part]}})
    assert bad == [], "imports across the layering:\n" + "\n".join(bad)


def test_nothing_below_the_views_imports_them():
    below = set(ALLOWED) - set(VIEWS)
    bad = sorted(f"{e.source} -> {e.target}" for e in EDGES
                 if _part(e.source) in below and _part(e.target) in VIEWS)
    assert bad == []


def test_function_local_imports_only_defer_heavy_libraries():
    local = [e for e in EDGES if e.local]
    unexpected = sorted(f"{e.source}:{e.line} -> {e.target}" for e in local
                        if (e.source, e.target) not in DEFERRED)
    assert unexpected == [], "import these at the top of the module:\n" + "\n".join(unexpected)
    silent = sorted(f"{e.source}:{e.line}" for e in local if not e.comment.startswith("#")
                    and not any(x.source == e.source and x.line == e.line - 1 for x in local))
    assert silent == [], "say on the line before why the import is deferred"


def test_few_modules_at_the_top():
    top = sorted(p.name for p in PACKAGE.glob("*.py"))
    assert len(top) <= 5, top


def test_every_module_declares_its_public_names():
    missing = []
    for name, path in MODULES.items():
        if name.endswith("__main__"):
            continue
        tree = ast.parse(path.read_text(encoding="utf-8"))
        declared = any(isinstance(n, ast.Assign | ast.AnnAssign) and any(
            isinstance(t, ast.Name) and t.id == "__all__"
            for t in (n.targets if isinstance(n, ast.Assign) else [n.target])) for n in tree.body)
        if not declared:
            missing.append(name)
    assert missing == [], "modules without __all__: " + ", ".join(missing)


def test_the_graph_sees_the_project():
    """Guard against a walker that finds nothing (and so passes everything)."""
    assert len(MODULES) > 60 and len(EDGES) > 200
    assert any(e.source == "homeplan.planner.chain" and e.target == "homeplan.planner.scheduling"
               for e in EDGES)
