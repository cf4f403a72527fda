"""Writing every `clean` output atomically (exports are read by `data/readers.py`, the one reader)."""

from __future__ import annotations

import hashlib
import json
from pathlib import Path
from typing import Any

import pandas as pd

from logiccheck.atomic import atomic_write
from logiccheck.clean.sheet import escape, unescape
from logiccheck.safety.csvfile import read_csv_rows, write_csv_rows

FORMATS = {".csv": "csv", ".tsv": "tsv", ".tab": "tsv", ".txt": "csv", ".parquet": "parquet", ".pq": "parquet",
           ".xlsx": "xlsx", ".jsonl": "jsonl", ".ndjson": "jsonl"}


class ExportError(ValueError):
    """An export that cannot be read: one line naming the file and what to do."""


def export_format(path: Path) -> str:
    fmt = FORMATS.get(path.suffix.lower())
    if fmt is None:
        raise ExportError(f"{path}: unsupported export format {path.suffix!r}; use .csv, .tsv, .xlsx, .parquet or .jsonl")
    return fmt


def file_hash(path: str | Path) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for block in iter(lambda: fh.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()


def sheet_frame(frame: pd.DataFrame, safe: bool) -> pd.DataFrame:
    """Cells and column names escaped for spreadsheets (when `safe`)."""
    if not safe:
        return frame
    escaped = frame.map(lambda c: escape(str(c)))
    escaped.columns = [escape(str(c)) for c in frame.columns]
    return escaped


def write_csv_table(frame: pd.DataFrame, path: Path, sheet_safe: bool, delimiter: str = ",") -> None:
    """A table through the project's one CSV writer (exact read-back, see safety.csvfile)."""
    with open(path, "w", encoding="utf-8", newline="") as fh:
        write_csv_rows(fh, [str(c) for c in frame.columns], frame.itertuples(index=False, name=None), sheet_safe,
                       delimiter=delimiter)


def _write_xlsx(frame: pd.DataFrame, path: Path) -> None:
    """Every cell written as text, so nothing in the sheet is a live formula."""
    import openpyxl

    book = openpyxl.Workbook(write_only=True)
    sheet = book.create_sheet()
    sheet.append([_text_cell(sheet, str(c)) for c in frame.columns])
    for row in frame.itertuples(index=False, name=None):
        sheet.append([_text_cell(sheet, "" if v is None else str(v)) for v in row])
    book.save(path)


def _text_cell(sheet: Any, text: str) -> Any:
    from openpyxl.cell import WriteOnlyCell

    if text == "":
        return None
    cell = WriteOnlyCell(sheet, value=text)
    cell.data_type = "s"  # a string, even where it starts with "="
    return cell


def write_table_to(frame: pd.DataFrame, path: Path, fmt: str, sheet_safe: bool, delimiter: str = ",") -> None:
    """Write a table straight to `path` (callers make it atomic or part of a set).
    `frame` holds text cells ("" = blank); CSV and TSV keep the export's delimiter."""
    if fmt in ("csv", "tsv"):
        write_csv_table(frame, path, sheet_safe, "\t" if fmt == "tsv" else delimiter)
    elif fmt == "jsonl":
        frame.replace("", None).to_json(path, orient="records", lines=True, force_ascii=False)
    elif fmt == "xlsx":
        _write_xlsx(sheet_frame(frame, sheet_safe), path)
    else:
        frame.replace("", None).to_parquet(path, index=False)


def write_table(frame: pd.DataFrame, path: Path, fmt: str, sheet_safe: bool, delimiter: str = ",") -> None:
    atomic_write(path, lambda p: write_table_to(frame, p, fmt, sheet_safe, delimiter))


def write_json_to(obj: Any, path: Path) -> None:
    path.write_text(json.dumps(obj, indent=2, ensure_ascii=False) + "\n", encoding="utf-8")


def write_json(obj: Any, path: Path) -> None:
    atomic_write(path, lambda p: write_json_to(obj, p))


def read_sheet_csv(path: str | Path) -> pd.DataFrame:
    """Read back a CSV this tool wrote, undoing the spreadsheet escape (names included)."""
    rows = read_csv_rows(path)
    header = [unescape(c) for c in next(rows, [])]
    body = [[unescape(c) for c in r] for r in rows]
    return pd.DataFrame(body, columns=header, dtype=object).astype(str) if body else pd.DataFrame(columns=header, dtype=str)
