"""Every built-in number and every check of the tests names where it comes from.

A catalog row's source must name a published document (code section and edition, statute or
form, handbook table, dataset, library function) or say "from memory", "common practice, no
source" or "by definition". It must never be empty and never point at the project itself: its
files, its working notes, its documentation or its issue tracker are not sources. The same
rule holds for the comments and docstrings of the test modules, which carry the source of each
expected value. This is a check of the project's own bookkeeping, not of a number.
"""

from __future__ import annotations

import ast
import csv
import io
import re
import tokenize
from pathlib import Path

import pytest
from ruamel.yaml import YAML

from .conftest import ROOT

DATA_DIRS = [ROOT / "homeplan" / "data", ROOT / "homeplan" / "energy" / "data",
             ROOT / "homeplan" / "electrical" / "data"]
INCENTIVE_FILES = sorted((ROOT / "sample_homes" / "incentives").glob("*.yaml"))
TEXT_ONLY = {"cautions.yaml"}
"""Data files without numbers: the safety texts are the project's own wording, not data."""

PROJECT_REFERENCES = re.compile(
    r"""
      \b[\w-]+\.(md|py)\b                      # a project file or note by name
    | \b(money|energy|electrical|practice)\s+(reference|notes?)\b   # the notes by subject
    | \breference\s+notes?\b | \bproject'?s?\s+(own\s+)?(reference\s+)?notes\b
    | \breference/ | \bshared/ | \bdocs/ | \bhomeplan/
    | \bissue\s*\#?\d+ | \bissues?\b\s*:      # the issue tracker
    | (?-i:\bARCHITECTURE\b)
    """,
    re.IGNORECASE | re.VERBOSE,
)
NOTE_REFERENCES = re.compile(
    r"""
      \b[\w-]+\.md\b                            # a note or document by name
    | \b(money|energy|electrical|practice)\s+(reference|notes?)\b
    | \breference\s+notes?\b | \bproject'?s?\s+(own\s+)?(reference\s+)?notes\b
    | \breference/ | \bshared/ | \bdocs/
    | \bissue\s*\#?\d+ | \bissues?\s*: | (?-i:\bARCHITECTURE\b)
    """,
    re.IGNORECASE | re.VERBOSE,
)
"""What a test's comment may not cite: the working notes, the documentation, the issues. (A
test may name the project's own modules and tables when it says they are not the source.)"""
EMPTY_CITATION = re.compile(r"\b(source|sources|ref|reference|references)\s*:\s*[.;,)]?\s*$", re.IGNORECASE)

DOC_SUBJECTS = {
    "tests/test_docs.py": "checks the documentation itself",
    "tests/test_layout.py": "checks the layout rules written in the developer guide",
    "tests/result/test_roadmap.py": "checks the JSON format document against the code",
    "tests/test_sources.py": "names the patterns it forbids",
}
"""Test modules whose subject is a project document: they may name it (not as a source)."""


def _data_files() -> list[Path]:
    return sorted(p for d in DATA_DIRS for p in d.iterdir() if p.suffix in (".csv", ".yaml"))


EDITIONED = re.compile(r"\bNEC\b|\bACCA\s+Manual\s+[JSD]\b|\bASHRAE\s+Handbook\b")
"""Documents revised every few years: a value taken from one names the edition it is from."""
EDITION = re.compile(r"\b(19|20)\d\d\b|\b\d+(st|nd|rd|th)\s+ed\b")


def edition_problem(text: str) -> str | None:
    """A citation of a periodically revised document without its edition in the same clause."""
    for cite in EDITIONED.finditer(text):
        clause = re.split(r"[;]", text[cite.start():], maxsplit=1)[0]
        if not EDITION.search(clause):
            return f"cites {cite.group(0)!r} without its edition ({clause.strip()[:60]!r})"
    return None


def problem(source: object) -> str | None:
    """Why a source text is not acceptable, or None."""
    if not isinstance(source, str) or not source.strip():
        return "empty source"
    hit = PROJECT_REFERENCES.search(source)
    if hit:
        return f"names the project ({hit.group(0)!r}), not a published source"
    return edition_problem(source)


def _csv_problems(path: Path) -> list[str]:
    rows = list(csv.DictReader(io.StringIO(path.read_text(encoding="utf-8"))))
    if not rows or "source" not in rows[0]:
        return [f"{path.name}: no source column"]
    return [f"{path.name} row {i + 2}: {why}" for i, row in enumerate(rows)
            if (why := problem(row["source"]))]


UPGRADE_NUMBER_SOURCES = {"life_years": "life_source", "heat_loss_cut_pct": "heat_loss_cut_source",
                          "provides_spaces": "provides_spaces_source"}
UPGRADE_DEFINITIONS = {"provides_amps"}
"""Numbers that define the upgrade (a 200 A panel provides 200 A), named in its label."""


def _upgrade_problems(path: Path) -> list[str]:
    out = []
    records = YAML(typ="safe").load(path.read_text(encoding="utf-8"))
    for name, rec in records.items():
        where = f"{path.name} {name}"
        for key, value in rec.items():
            if isinstance(value, (int, float)) and not isinstance(value, bool):
                if key in UPGRADE_DEFINITIONS:
                    continue
                if key not in UPGRADE_NUMBER_SOURCES:
                    out.append(f"{where}.{key}: a number without a known source key")
                elif why := problem(rec.get(UPGRADE_NUMBER_SOURCES[key])):
                    out.append(f"{where}.{UPGRADE_NUMBER_SOURCES[key]}: {why}")
        for key in ("cost", "cost_change"):
            needs_source = key in rec and rec[key].get("kind") != "inflation"
            if needs_source and (why := problem(rec[key].get("source"))):
                out.append(f"{where}.{key}.source: {why}")
        for vname, variant in (rec.get("variants") or {}).items():
            if why := problem(variant.get("source")):
                out.append(f"{where}.variants.{vname}.source: {why}")
    return out


def _glossary_problems(path: Path) -> list[str]:
    """Each term of the glossary names where its definition is published."""
    terms = YAML(typ="safe").load(path.read_text(encoding="utf-8"))
    return [f"{path.name} {t.get('term')}: {why}" for t in terms if (why := problem(t.get("source")))]


def _program_problems(path: Path) -> list[str]:
    doc = YAML(typ="safe").load(path.read_text(encoding="utf-8"))
    out = [f"{path.name} {p.get('id')}: {why}" for p in doc["programs"] if (why := problem(p.get("source")))]
    for lineno, line in enumerate(path.read_text(encoding="utf-8").splitlines(), 1):
        comment = line.partition("#")[2]
        if comment and (hit := NOTE_REFERENCES.search(comment)):
            out.append(f"{path.name}:{lineno}: comment cites the project ({hit.group(0)!r})")
    return out


@pytest.mark.parametrize("path", _data_files(), ids=lambda p: p.name)
def test_every_catalog_row_names_a_source(path: Path) -> None:
    if path.name in TEXT_ONLY:
        text = path.read_text(encoding="utf-8")
        assert not re.search(r":\s*-?\d+(\.\d+)?\s*$", text, re.M), "a number in a text-only file"
        return
    if path.suffix == ".csv":
        bad = _csv_problems(path)
    elif path.name == "upgrades.yaml":
        bad = _upgrade_problems(path)
    elif path.name == "glossary.yaml":
        bad = _glossary_problems(path)
    else:
        pytest.fail(f"{path.name}: a data file the source check does not know how to read")
    assert not bad, "\n".join(bad)


@pytest.mark.parametrize("path", INCENTIVE_FILES, ids=lambda p: p.name)
def test_every_sample_program_names_a_source(path: Path) -> None:
    bad = _program_problems(path)
    assert not bad, "\n".join(bad)


def _comments_and_docstrings(path: Path) -> list[tuple[int, str]]:
    text = path.read_text(encoding="utf-8")
    out = [(tok.start[0], tok.string) for tok in tokenize.generate_tokens(io.StringIO(text).readline)
           if tok.type == tokenize.COMMENT]
    for node in ast.walk(ast.parse(text)):
        if isinstance(node, (ast.Module, ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef)):
            doc = ast.get_docstring(node, clean=False)
            if doc:
                first = node.body[0].lineno
                out += [(first + i, line) for i, line in enumerate(doc.splitlines())]
    return out


def _names_a_document(name: str) -> bool:
    """A document of the project, named by a test whose subject it is."""
    return name == "docs/" or name == "README.md" or (ROOT / "docs" / name).exists()


TEST_MODULES = sorted(p for p in (ROOT / "tests").rglob("*.py"))


@pytest.mark.parametrize("path", TEST_MODULES, ids=lambda p: str(p.relative_to(ROOT)))
def test_test_modules_cite_no_project_file_as_a_source(path: Path) -> None:
    rel = str(path.relative_to(ROOT))
    bad = []
    for lineno, text in _comments_and_docstrings(path):
        hit = NOTE_REFERENCES.search(text)
        if hit and not (rel in DOC_SUBJECTS and _names_a_document(hit.group(0))):
            bad.append(f"{rel}:{lineno}: {hit.group(0)!r} in {text.strip()!r}")
        if EMPTY_CITATION.search(text):
            bad.append(f"{rel}:{lineno}: a source marker with nothing after it: {text.strip()!r}")
        if why := edition_problem(text):
            bad.append(f"{rel}:{lineno}: {why}")
    assert not bad, "\n".join(bad)


@pytest.mark.parametrize("text,ok", [
    ("NEC 2023 220.83(B)", True),
    ("from memory: about 8.34 lb per gallon", True),
    ("common practice, no source: 16 A floor", True),
    ("", False),
    ("   ", False),
    ("money reference notes: 1.5k/3k", False),
    ("electrical.md: strip heat", False),
    ("reference/energy.md Q_hw", False),
    ("see issue 5", False),
    ("the project's reference notes", False),
    ("docs/plan-format.md", False),
    ("NEC 240.6(A)", False),
    ("NEC 2023 240.6(A)", True),
    ("ACCA Manual S: 90-115 % (from memory)", False),
    ("ACCA Manual S (2nd ed., 2014): 90-115 % (from memory)", True),
    ("NEC 2023 220.83; ASHRAE Handbook service-life table", False),
])
def test_the_checker_itself_can_fail(text: str, ok: bool) -> None:
    """The rule above is not vacuous: it rejects the kinds of source it is meant to reject."""
    assert (problem(text) is None) == ok
    assert EMPTY_CITATION.search("# source:") is not None
    assert NOTE_REFERENCES.search("# money.md: panel $600") is not None
    assert NOTE_REFERENCES.search("# NEC 2023 220.83(B)") is None
    assert edition_problem("# 8,000 + 0.4 x 7,200 (NEC 220.83(A))") is not None
    assert edition_problem("# 8,000 + 0.4 x 7,200 (NEC 2023 220.83(A))") is None


def test_the_walkers_find_bad_rows(tmp_path: Path) -> None:
    bad_csv = tmp_path / "t.csv"
    bad_csv.write_text('key,value,source\na,1,"NEC 2023 220.41"\nb,2,\nc,3,"electrical.md: x"\n')
    assert [m.split(": ")[0] for m in _csv_problems(bad_csv)] == ["t.csv row 3", "t.csv row 4"]
    bad_yaml = tmp_path / "upgrades.yaml"
    bad_yaml.write_text("x:\n  life_years: 10\n  cost: {low: 1, typical: 2, high: 3, per: each}\n"
                        "  variants:\n    v: {va: 100, source: \"money reference: 1\"}\n")
    found = _upgrade_problems(bad_yaml)
    assert len(found) == 3 and any("life_source" in m for m in found)


CODE_MODULES = sorted((ROOT / "homeplan").rglob("*.py"))


@pytest.mark.parametrize("path", CODE_MODULES, ids=lambda p: str(p.relative_to(ROOT)))
def test_code_references_cite_no_working_notes(path: Path) -> None:
    """The References sections and comments of the code follow the same rule as the tests."""
    rel = str(path.relative_to(ROOT))
    bad = [f"{rel}:{lineno}: {hit.group(0)!r} in {text.strip()!r}"
           for lineno, text in _comments_and_docstrings(path)
           if (hit := NOTE_REFERENCES.search(text)) and not _names_a_document(hit.group(0))]
    assert not bad, "\n".join(bad)
