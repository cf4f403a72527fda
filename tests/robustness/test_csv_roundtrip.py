"""Every CSV the project writes reads back exactly, whatever a cell holds."""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pandas as pd
import pyarrow as pa
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from logiccheck.clean.apply import reverse_audit
from logiccheck.clean.io import read_sheet_csv
from logiccheck.clean.policy import CleanPolicy
from logiccheck.clean.run import clean_export
from logiccheck.clean.sheet import unescape
from logiccheck.data.readers import open_export
from logiccheck.data.readers import read_cells as read_export
from logiccheck.loader import load_text
from logiccheck.safety.csvfile import csv_text, read_csv_rows, write_csv_file
from tests.robustness.common import HEADER, SPEC, write_export

# Cell texts that have broken CSV files: bare CR, CRLF, LF, quotes, NUL, delimiters,
# leading formula characters and apostrophes, spaces, non-ASCII.
TRICKY = st.text(alphabet=st.sampled_from(list("ab,\"'\r\n\t\x00=+-@ é1.")), max_size=12)
CELLS = st.one_of(TRICKY, st.text(max_size=20))


def _cells(table: pa.Table, column: str) -> list[str]:
    return ["" if v is None else v for v in table.column(column).to_pylist()]


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.lists(CELLS, min_size=1, max_size=12))
def test_written_cells_read_back_exactly_by_every_reader(tmp_path: Path, cells: list[str]) -> None:
    path = tmp_path / "t.csv"
    write_csv_file(path, ["id", "text"], [[str(i), c] for i, c in enumerate(cells)])
    # Our reader (Python's csv module).
    rows = list(read_csv_rows(path))
    assert rows[0] == ["id", "text"] and [r[1] for r in rows[1:]] == cells
    # The export reader (pyarrow) every command uses: blanks come back as nulls.
    export = open_export(path)
    table = pa.concat_tables(list(export.chunks))
    assert _cells(table, "text") == cells
    # Outside reference: pandas' C parser reads the same cells.
    frame = pd.read_csv(path, dtype=str, keep_default_na=False, na_filter=False, encoding="utf-8")
    assert frame["text"].tolist() == cells


def test_a_one_megabyte_cell_and_bare_carriage_returns(tmp_path: Path) -> None:
    big = "x\r" * (1 << 19)  # 1 MiB of text with a bare CR every other character
    cells = [big, "\r", "a\rb", "\r\n", '"', "\x00", ""]
    path = tmp_path / "t.csv"
    write_csv_file(path, ["id", "text"], [[str(i), c] for i, c in enumerate(cells)])
    assert [r[1] for r in list(read_csv_rows(path))[1:]] == cells
    assert _cells(pa.concat_tables(list(open_export(path).chunks)), "text") == cells


def test_the_sheet_escape_round_trips_through_the_writer() -> None:
    cells = ["=HYPERLINK(\"x\")", "-3", "+4.5", "@me", "\tx", "\rx", "'=y", "ok"]
    text = csv_text(["=head", "b"], [[c, c] for c in cells], sheet_safe=True)
    rows = list(csv.reader(io.StringIO(text, newline="")))
    # Genuine numbers are left as they are (OWASP CSV-injection guidance: escape
    # formula triggers, keep numbers usable).
    assert rows[0][0] == "'=head" and rows[1 + cells.index("-3")][0] == "-3" and rows[1 + cells.index("+4.5")][0] == "+4.5"
    assert all(not r[0].startswith(("=", "@", "\t", "\r")) for r in rows)
    assert [unescape(r[0]) for r in rows[1:]] == cells


@settings(max_examples=6, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow])
@given(st.lists(CELLS, min_size=4, max_size=10))
def test_cleaned_export_and_audit_rebuild_the_original(tmp_path: Path, comments: list[str]) -> None:
    out = tmp_path / "out"
    data = write_export(tmp_path / "ferry.csv", comments)
    q = load_text(SPEC, str(tmp_path / "ferry.qlc")).questionnaire
    run = clean_export(q, data, out, policy=CleanPolicy())
    original = read_export(data)
    assert original["comment"].tolist() == comments and list(original.columns) == HEADER
    # Read as this tool reads (escape undone) ...
    restored = reverse_audit(read_sheet_csv(out / "ferry.cleaned.csv"), read_sheet_csv(out / "audit.csv"))
    pd.testing.assert_frame_equal(restored, original)
    # ... and as a plain CSV reader sees the file: the audit's sheet-escape records undo
    # the escapes themselves.
    raw = [list(r) for r in read_csv_rows(out / "ferry.cleaned.csv")]
    plain = pd.DataFrame(raw[1:], columns=raw[0], dtype=object)
    pd.testing.assert_frame_equal(reverse_audit(plain, read_sheet_csv(out / "audit.csv")), original)
    assert run.summary["input"]["respondents"] == len(comments)


def test_a_formula_column_name_is_escaped_and_recorded(tmp_path: Path) -> None:
    import openpyxl

    data = tmp_path / "ferry.csv"
    write_csv_file(data, [*HEADER, "=HYPERLINK(\"http://example.invalid\")"], [["r1", "30", "2", "", "=2+2", "x"]])
    q = load_text(SPEC, str(tmp_path / "ferry.qlc")).questionnaire
    run = clean_export(q, data, tmp_path / "out")
    header = next(read_csv_rows(tmp_path / "out" / "ferry.cleaned.csv"))
    assert header[-1].startswith("'=")
    escapes = run.outcome.audit[run.outcome.audit["check"] == "sheet-escape"]
    assert set(zip(escapes["row"], escapes["column"], strict=True)) == {(0, "=HYPERLINK(\"http://example.invalid\")"), (1, "comment")}
    # .xlsx: no cell is a formula, the header included.
    xlsx = tmp_path / "ferry.xlsx"
    book = openpyxl.Workbook()
    sheet = book.active
    for row in ([*HEADER, "=HYPERLINK(\"http://example.invalid\")"], ["r1", "30", "2", "", "=2+2", "x"]):
        sheet.append(row)
    for row in sheet.iter_rows():
        for cell in row:
            cell.data_type = "s"
    book.save(xlsx)
    clean_export(q, xlsx, tmp_path / "out2")
    cleaned = openpyxl.load_workbook(tmp_path / "out2" / "ferry.cleaned.xlsx").active
    assert not any(c.data_type == "f" for row in cleaned.iter_rows() for c in row)
    assert cleaned.cell(1, 6).value.startswith("'=")
