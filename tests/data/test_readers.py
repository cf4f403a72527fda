"""Every export format gives the same validation; bad encodings name the byte offset;
stray text is never silently lost; inputs are never modified."""

from __future__ import annotations

import hashlib
import json
from pathlib import Path

import openpyxl
import pyarrow as pa
import pyarrow.parquet as pq
import pytest

from logiccheck.data import DataReadError, validate
from logiccheck.data.readers import first_bad_byte
from logiccheck.loader import load_text

SPEC = """survey fmt "Formats"

codes yesno
  yes = 1 "Yes"
  no  = 2 "No"

codes meals
  breakfast = 1 "Breakfast"
  lunch     = 2 "Lunch"
  dinner    = 3 "Dinner"

nonresponse
  dk = 98 "Don't know"

canteen: single yesno "Do you use the staff canteen?" gate
visits: number 0..30 "Visits last month?" when canteen = yes
meal: multi meals "Which meals?" when canteen = yes
note_text: text "Anything else? Café, tea…" when canteen = yes
"""

HEADER = ["id", "canteen", "visits", "meal_1", "meal_2", "meal_3", "note_text"]
ROWS = [
    ["a1", "1", "12", "1", "0", "1", "more tea"],
    ["a2", "2", "", "", "", "", ""],
    ["a3", "2", "4", "", "", "", ""],  # off the route
    ["a4", "1", "12a", "0", "1", "0", "crème brûlée"],  # not a number
    ["a5", "1", "98", "0", "0", "0", ""],  # dk; no meal chosen
]


def _q():
    return load_text(SPEC, "fmt.qlc").questionnaire


def _csv_text(sep: str = ",") -> str:
    return "\n".join(sep.join(r) for r in [HEADER, *ROWS]) + "\n"


def _summary(result) -> tuple:
    return (
        result.table.to_dict("records"),
        [f.to_json() for f in result.findings],
        result.dispositions,
    )


def test_every_format_gives_the_same_result(tmp_path: Path) -> None:
    q = _q()
    csv_path = tmp_path / "e.csv"
    csv_path.write_text(_csv_text(), encoding="utf-8")
    expected = _summary(validate(q, csv_path))
    bom = tmp_path / "bom.csv"
    bom.write_bytes(b"\xef\xbb\xbf" + _csv_text().encode("utf-8"))
    tsv = tmp_path / "e.tsv"
    tsv.write_text(_csv_text("\t"), encoding="utf-8")
    xlsx = tmp_path / "e.xlsx"
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(HEADER)
    for r in ROWS:
        # Numbers as numbers, as a spreadsheet holds them; the stray text stays text.
        sheet.append([int(c) if c.isdigit() else (c or None) for c in r])
    book.save(xlsx)
    parquet = tmp_path / "e.parquet"
    pq.write_table(pa.table({h: [r[i] or None for r in ROWS] for i, h in enumerate(HEADER)}), parquet)
    jsonl = tmp_path / "e.jsonl"
    jsonl.write_text("\n".join(json.dumps(dict(zip(HEADER, r, strict=True))) for r in ROWS) + "\n", encoding="utf-8")
    for path in (bom, tsv, xlsx, parquet, jsonl):
        assert _summary(validate(q, path)) == expected, path.name


def test_stray_text_in_a_number_column_is_an_invalid_value(tmp_path: Path) -> None:
    path = tmp_path / "e.csv"
    path.write_text(_csv_text(), encoding="utf-8")
    result = validate(_q(), path)
    bad = [f for f in result.findings if f.check == "invalid-value"]
    assert [(f.respondent, f.item, f.value) for f in bad] == [("a4", "visits", "12a")]
    assert "is not a number" in bad[0].message
    row = result.table.set_index("item").loc["visits"]
    # a1, a3, a4, a5 have a value (12a counts as answered, but invalid); a3 is off the route.
    assert (row.answered, row.invalid, row.out_of_path, row.expected) == (4, 1, 1, 3)


def test_non_utf8_names_file_and_byte_offset(tmp_path: Path) -> None:
    path = tmp_path / "latin.csv"
    data = _csv_text().replace("crème", "cr\u00e8me").encode("cp1252")
    path.write_bytes(data)
    offset = data.index(b"\xe8")
    with pytest.raises(DataReadError) as err:
        validate(_q(), path)
    message = str(err.value)
    assert str(path) in message and f"byte {offset}" in message and "--encoding" in message
    assert first_bad_byte(path) == offset
    # With the encoding given, it reads.
    result = validate(_q(), path, encoding="cp1252")
    assert result.respondents == len(ROWS)


def test_input_is_never_modified(tmp_path: Path) -> None:
    path = tmp_path / "e.csv"
    path.write_text(_csv_text(), encoding="utf-8")
    before = hashlib.sha256(path.read_bytes()).hexdigest()
    validate(_q(), path)
    assert hashlib.sha256(path.read_bytes()).hexdigest() == before


@pytest.mark.parametrize(
    ("name", "content", "needle"),
    [
        ("missing.csv", None, "no such file"),
        ("e.sav", b"x", "unknown export format"),
        ("empty.csv", b"", "empty"),
        ("dup.csv", b"id,canteen,canteen\n1,1,1\n", "appears twice"),
        ("ragged.csv", b"id,canteen\n1,1,1\n", "wrong number of cells"),
    ],
)
def test_bad_exports_give_one_line_errors(tmp_path: Path, name: str, content: bytes | None, needle: str) -> None:
    path = tmp_path / name
    if content is not None:
        path.write_bytes(content)
    with pytest.raises(DataReadError) as err:
        validate(_q(), path)
    assert needle in str(err.value) and "\n" not in str(err.value)


def test_chunked_and_streamed_reading_give_the_same_results(tmp_path: Path) -> None:
    from logiccheck.data.simulate import simulate, write_csv

    q = load_text((Path(__file__).parents[2] / "specs" / "bikeshare.qlc").read_text(), "bikeshare.qlc").questionnaire
    sim = simulate(q, 997, seed=5, faults=0.05)
    path = tmp_path / "big.csv"
    write_csv(sim.table, path)
    whole = validate(q, path, chunk_rows=10_000)
    for chunk_rows, stream in ((7, False), (13, True), (250, True)):
        part = validate(q, path, chunk_rows=chunk_rows, stream=stream)
        assert _summary(part) == _summary(whole)
        assert (part.due == whole.due).all() and (part.valid == whole.valid).all()
        assert part.measures.equals(whole.measures)
