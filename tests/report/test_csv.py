"""CSV exports: formula injection neutralised, numbers kept numeric, RFC 4180 structure.

References: OWASP "CSV Injection" (leading = + - @ tab CR, neutralised with a leading single
quote); RFC 4180 (CRLF record ends, quoted fields). Files are read back with Python's csv module.
"""

from __future__ import annotations

import csv
import io

import pytest

from homeplan.report.csvout import csv_text, safe_cell, steps_csv, write_csv_dir
from homeplan.result.roadmap import Step
from tests.report.fixtures import HOSTILE, make_plan, make_result


@pytest.mark.parametrize("text", ["=1+1", "+SUM(A1)", "-2+3", "@cmd", "\tx", "\rx",
                                  "=HYPERLINK(\"http://evil.example\")"])
def test_dangerous_text_gets_a_quote(text: str) -> None:
    assert safe_cell(text) == "'" + text  # OWASP CSV Injection


def test_numbers_stay_numbers() -> None:
    assert safe_cell(-1200.5) == -1200.5
    assert safe_cell(-3) == -3
    assert safe_cell(float("nan")) == ""
    assert safe_cell("plain text") == "plain text"
    assert safe_cell(None) == ""


def test_written_csv_reads_back_with_negative_numbers_numeric() -> None:
    text = csv_text(["a", "b"], [[-5.25, "-5"], ["=x", 3]])
    assert text.endswith("\r\n") and "\r\n" in text  # RFC 4180 line ends
    rows = list(csv.reader(io.StringIO(text)))
    assert rows[1] == ["-5.25", "'-5"]
    assert rows[2] == ["'=x", "3"]
    assert float(rows[1][0]) == -5.25


def test_hostile_plan_steps_csv_has_no_formula_cells() -> None:
    result = make_result(make_plan(**HOSTILE), hostile_labels=True)
    steps = [Step("heat_pump", "=cmd|' /C calc'!A0", 2028, variant="+1", size="@x", cost_usd=100.0,
                  net_cost_usd=-50.0, reasons=["-reason"])]
    result = make_result(result.plan, steps=steps)
    rows = list(csv.reader(io.StringIO(steps_csv(result))))
    for row in rows[1:]:
        for cell in row:
            try:
                float(cell)
                continue  # a number: allowed even when negative
            except ValueError:
                assert not cell.startswith(("=", "+", "-", "@", "\t", "\r")), cell
    assert rows[1][2] == "'=cmd|' /C calc'!A0"
    assert rows[1][7] == "-50.0"


def test_write_csv_dir(tmp_path) -> None:
    out = tmp_path / "csv"
    paths = write_csv_dir(make_result(), out)
    assert sorted(p.name for p in paths) == ["monthly_energy.csv", "steps.csv", "years.csv"]
    years = list(csv.DictReader(io.StringIO((out / "years.csv").read_text())))
    assert [int(r["year"]) for r in years] == list(range(2027, 2037))
    monthly = list(csv.DictReader(io.StringIO((out / "monthly_energy.csv").read_text())))
    assert len(monthly) == 24 and monthly[0]["month_name"] == "Jan"
    assert not list(tmp_path.glob("csv/.*tmp"))  # atomic writes leave no temp files


def test_write_csv_dir_refuses_missing_parent(tmp_path) -> None:
    from homeplan.errors import InputError

    with pytest.raises(InputError):
        write_csv_dir(make_result(), tmp_path / "no" / "such")
