"""The report's money with its build-up, and the extensions of time already granted.

Checks against sources outside the report builder:

- the workbook's formulas are read back with openpyxl and evaluated here by a small
  evaluator of our own (``_evaluate``: cell references, ``*``, ``SUM`` of a range, ``MIN``),
  written from the spreadsheet's arithmetic, not with the code that wrote them; their
  results must equal the values beside them and the figures of the first page;
- each rate of the prolongation build-up must be the rate of the row of
  prolongation_rates.csv (read with Python's csv module) that its source names;
- hand-worked cases on the small case of ``test_report.py`` (working in the comments);
- the demo's grants, read from extensions_granted.csv with the csv module, with the
  completion in force from each grant's date worked by ``datetime.timedelta`` (calendar
  days, the rule of case-format.md: a grant is in force from its ``granted_on``).
"""

from __future__ import annotations

import csv
import datetime as dt
import re
from pathlib import Path

import pytest
from casewriter import write_case
from test_report import ACTIVITIES, ASBUILT, LINKS, UPDATE, rows_of, write_small_case

from delay.case import load_case
from reports.sections.windows import in_force_steps
from reports.writer import build

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "case_demo"


# -- an evaluator of the workbook's formulas, independent of the code that wrote them ---------------
_TOKEN = re.compile(r"\s*(?:([A-Z]+)([0-9]+)(?::([A-Z]+)([0-9]+))?|(SUM|MIN)\(|([*,()]))")


def _column_number(letters: str) -> int:
    number = 0
    for letter in letters:
        number = number * 26 + ord(letter) - 64
    return number


def _evaluate(sheet, text: str, depth: int = 0):
    """The value of a formula of the forms the report writes: ``=A2*B2``, ``=SUM(C2:C5)``,
    ``=MIN(D2,E2)``, ``=F2``; a reference to a formula is evaluated in turn."""
    assert text.startswith("=") and depth < 20, text
    tokens = []
    position = 1
    while position < len(text):
        found = _TOKEN.match(text, position)
        assert found, f"unknown formula text {text[position:]!r} in {text}"
        tokens.append(found.groups())
        position = found.end()

    def cell(letters, digits):
        value = sheet.cell(row=int(digits), column=_column_number(letters)).value
        return _evaluate(sheet, value, depth + 1) if isinstance(value, str) and value.startswith("=") else value

    def term(k):  # a reference, a range (inside SUM), or a function call
        col, row, col2, row2, function, _ = tokens[k]
        if function:
            arguments, k = [], k + 1
            while True:
                value, k = expression(k)
                arguments.append(value)
                if tokens[k][5] == ")":
                    break
                assert tokens[k][5] == ","
                k += 1
            flat = [v for a in arguments for v in (a if isinstance(a, list) else [a])]
            return (sum(flat) if function == "SUM" else min(flat)), k + 1
        if col2:
            assert col == col2, "a range down one column"
            return [cell(col, r) or 0 for r in range(int(row), int(row2) + 1)], k + 1
        return cell(col, row), k + 1

    def expression(k):
        value, k = term(k)
        while k < len(tokens) and tokens[k][5] == "*":
            other, k = term(k + 1)
            value = value * other
        return value, k

    value, end = expression(0)
    assert end == len(tokens), text
    return value


def _sheet_rows(sheet) -> tuple[list[str], list[list]]:
    rows = list(sheet.iter_rows(values_only=True))
    return list(rows[0]), [list(r) for r in rows[1:]]


def _formula_checks(sheet) -> list[tuple[str, int, float, float]]:
    """Every formula cell of ``sheet``: (its heading, its row, its result by the evaluator,
    the value of the column it recomputes on that row)."""
    headings, _ = _sheet_rows(sheet)
    checks = []
    for number, heading in enumerate(headings, start=1):
        if not heading or not heading.endswith(" (formula)"):
            continue
        source = headings.index(heading[: -len(" (formula)")]) + 1
        for row in range(2, sheet.max_row + 1):
            formula = sheet.cell(row=row, column=number)
            if formula.value is None:
                continue
            assert formula.data_type == "f", (heading, row, formula.value)  # a formula, not text
            checks.append(
                (heading, row, float(_evaluate(sheet, formula.value)), float(sheet.cell(row=row, column=source).value))
            )
    return checks


def test_the_evaluator_reads_the_forms_it_knows():
    from openpyxl import Workbook

    sheet = Workbook().active
    for row in ([2, 3, "=A1*B1"], [4, 5, "=A2*B2"], [None, None, "=SUM(C1:C2)"], [None, None, "=MIN(C3,A2)"]):
        sheet.append(row)
    # by hand: 2 x 3 = 6, 4 x 5 = 20, 6 + 20 = 26, min(26, 4) = 4
    assert [_evaluate(sheet, sheet.cell(row=r, column=3).value) for r in (1, 2, 3, 4)] == [6, 20, 26, 4]


# -- the demo ------------------------------------------------------------------------------------------
@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    return build(DEMO, tmp_path_factory.mktemp("money-demo") / "report")


@pytest.fixture(scope="module")
def demo_book(demo):
    from openpyxl import load_workbook

    return load_workbook(demo / "tables.xlsx")  # formulas as written, not values


def test_the_demo_workbook_formulas_recompute_the_values_beside_them(demo_book):
    checks = _formula_checks(demo_book["prolongation_build_up"]) + _formula_checks(demo_book["damages_build_up"])
    assert len(checks) >= 10
    wrong = [c for c in checks if abs(c[2] - c[3]) > 0.005]
    assert not wrong, wrong


def test_the_demo_prolongation_totals_are_the_first_page_figures(demo, demo_book):
    headings, rows = _sheet_rows(demo_book["prolongation_build_up"])
    sheet = demo_book["prolongation_build_up"]
    formula = headings.index("cost (EUR) (formula)") + 1
    totals = {}
    for number, row in enumerate(rows, start=2):
        if str(row[0]).startswith("total, "):
            totals[row[0][len("total, ") :]] = (
                row[headings.index("compensable days")],
                _evaluate(sheet, sheet.cell(row=number, column=formula).value),
            )
    headline = {r["method_title"]: r for r in rows_of(demo, "headline")}
    for method, row in headline.items():
        compensable, cost = int(row["compensable_days"]), float(row["prolongation_cost"])
        if compensable:
            assert totals[method][0] == compensable and abs(totals[method][1] - cost) < 0.005, method
        else:
            assert method not in totals and cost == 0.0
    assert set(totals) <= set(headline)


def test_the_demo_rates_in_the_build_up_come_from_their_sources(demo):
    with open(DEMO / "prolongation_rates.csv", newline="", encoding="utf-8") as handle:
        file_rows = {f"prolongation_rates.csv row {n}": r for n, r in enumerate(csv.DictReader(handle), start=2)}
    built = rows_of(demo, "prolongation_build_up")
    assert built and {r["source"] for r in built} <= set(file_rows)  # every demo day falls in a period
    for row in built:
        source = file_rows[row["source"]]
        assert float(row["cost_per_day"]) == float(source["cost_per_day"])
        assert (row["from"], row["to"]) == (source["from"], source["to"])
        assert abs(int(row["days"]) * float(row["cost_per_day"]) - float(row["cost"])) < 0.005
    listed = rows_of(demo, "prolongation_rates")
    assert [r["source"] for r in listed[:-1]] == list(file_rows)
    assert listed[-1]["source"].startswith("case.toml [commercial] prolongation_cost_per_day")


def test_the_demo_damages_are_days_times_rate_under_the_cap(demo):
    import tomllib

    with open(DEMO / "case.toml", "rb") as handle:
        commercial = tomllib.load(handle)["commercial"]
    headline = {r["method_title"]: r for r in rows_of(demo, "headline")}
    whole = {r["method_title"]: r for r in rows_of(demo, "damages_build_up") if r["applies_to"] == "the whole works"}
    assert set(whole) == set(headline)
    for method, row in whole.items():
        before = int(row["ld_days"]) * float(commercial["liquidated_damages_per_day"])
        expected = min(before, float(commercial["liquidated_damages_cap"]))
        assert int(row["ld_days"]) == int(headline[method]["ld_days"])
        assert float(row["ld_exposure"]) == expected == float(headline[method]["ld_exposure"])
        assert row["ld_capped"] == ("true" if before > expected else "false")


def test_the_demo_grants_are_listed_with_the_completion_in_force_from_their_dates(demo):
    with open(DEMO / "extensions_granted.csv", newline="", encoding="utf-8") as handle:
        granted = list(csv.DictReader(handle))
    listed = rows_of(demo, "extensions_granted")
    assert [(r["grant"], r["granted_on"], r["days"]) for r in listed] == [
        (g["id"], g["granted_on"], g["days"]) for g in granted
    ]
    assert [r["events"] for r in listed] == [g["events"] for g in granted]
    # by hand: the contract completion 2026-05-29 (case.toml), + 21 days from 2025-08-22 is
    # 2026-06-19, + 7 more from 2026-03-20 is 2026-06-26; both grants name section 2, the
    # section of the completion activity MS-COMPLETION (sections.csv): the whole works
    contract = dt.date(2026, 5, 29)
    assert contract + dt.timedelta(days=21) == dt.date(2026, 6, 19)
    assert [r["completion_in_force"] for r in listed] == ["2026-06-19", "2026-06-26"]
    assert all(r["applies_to"].startswith("the whole works") for r in listed)


def test_the_completion_in_force_steps_at_each_demo_grant():
    steps = in_force_steps(load_case(DEMO), dt.date(2025, 3, 3), dt.date(2026, 7, 3))
    # the same working as above: a step on each granted_on date, flat in between
    assert [(r.date, r.completion_in_force) for r in steps.itertuples()] == [
        (dt.date(2025, 3, 3), dt.date(2026, 5, 29)),
        (dt.date(2025, 8, 22), dt.date(2026, 6, 19)),
        (dt.date(2026, 3, 20), dt.date(2026, 6, 26)),
        (dt.date(2026, 7, 3), dt.date(2026, 6, 26)),
    ]
    assert list(steps["grant"]) == ["", "EOT-01 +21 days", "EOT-02 +7 days", ""]


# -- hand-worked cases -----------------------------------------------------------------------------------
def test_the_small_case_prolongation_is_five_days_at_the_flat_rate(tmp_path):
    # test_report.py's working: 5 compensable days by every method; no prolongation_rates.csv,
    # so each is priced at the flat 100 EUR a day of case.toml: 5 x 100 = 500
    from openpyxl import load_workbook

    out = build(write_small_case(tmp_path / "case"), tmp_path / "report")
    rows = rows_of(out, "prolongation_build_up")
    assert [(r["method_title"], r["days"], r["cost_per_day"], r["cost"]) for r in rows] == [
        (m, "5", "100.0", "500.0")
        for m in ("windows analysis", "impacted as-planned", "time impact analysis", "collapsed as-built")
    ]
    assert {r["source"] for r in rows} == {"case.toml [commercial] prolongation_cost_per_day"}
    sheet = load_workbook(out / "tables.xlsx")["prolongation_build_up"]
    headings, values = _sheet_rows(sheet)
    assert headings[-2:] == ["compensable days (formula)", "cost (EUR) (formula)"]
    # one row and one total row per method: 8 rows under the headings
    assert [v[0] for v in values] == [
        x
        for m in ("windows analysis", "impacted as-planned", "time impact analysis", "collapsed as-built")
        for x in (m, f"total, {m}")
    ]
    assert sheet["I2"].value == "=F2*E2" and sheet["I3"].value == "=SUM(I2:I2)" and sheet["H3"].value == "=SUM(F2:F2)"
    assert [_evaluate(sheet, sheet.cell(row=r, column=9).value) for r in (2, 3)] == [500.0, 500.0]
    page = (out / "report.html").read_text(encoding="utf-8")
    assert '<tr class="total"><td>total, windows analysis</td>' in page


def test_a_cap_that_bites_is_recomputed_by_min(tmp_path):
    # the small case with the event the contractor's: no excusable day, so no extension; the
    # revised completion is the date in force, 2025-01-17, and the works finished on
    # 2025-01-22: 5 culpable days x 50 EUR = 250 EUR, above the cap of 200: 200, capped
    from openpyxl import load_workbook

    root = write_case(
        tmp_path / "case",
        activities=ACTIVITIES,
        links=LINKS,
        completion="2025-01-17",
        commercial={
            "currency": "EUR",
            "prolongation_cost_per_day": 100,
            "liquidated_damages_per_day": 50,
            "liquidated_damages_cap": 200,
        },
        snapshots={"u01": {"label": "Update 01", "data_date": "2025-01-13", "activities": UPDATE}},
        files={
            "events.csv": [
                {
                    "id": "E1",
                    "title": "Slow slab",
                    "party": "contractor",
                    "start": "2025-01-13",
                    "finish": "2025-01-22",
                    "activities": "B",
                    "impact": "extend",
                    "days": 3,
                }
            ],
            "asbuilt.csv": ASBUILT,
        },
    )
    out = build(root, tmp_path / "report", methods="windows,impacted")
    rows = rows_of(out, "damages_build_up")
    assert [(r["ld_days"], r["damages_before_cap"], r["cap"], r["ld_exposure"], r["ld_capped"]) for r in rows] == [
        ("5", "250.0", "200.0", "200.0", "true")
    ] * 2
    sheet = load_workbook(out / "tables.xlsx")["damages_build_up"]
    headings, _ = _sheet_rows(sheet)
    exposure = headings.index("liquidated damages (EUR) (formula)") + 1
    assert sheet.cell(row=2, column=exposure).value.startswith("=MIN(")
    assert _evaluate(sheet, sheet.cell(row=2, column=exposure).value) == 200.0
    assert not [c for c in _formula_checks(sheet) if abs(c[2] - c[3]) > 0.005]
    note = (out / "report.html").read_text(encoding="utf-8")
    assert "it limits: windows analysis, the whole works: EUR 250.00" in note
