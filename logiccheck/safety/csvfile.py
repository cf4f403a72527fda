"""The one CSV writer and reader for every CSV the project writes.

The writer quotes a cell holding a comma, a quote, a carriage return or a line feed
(RFC 4180 quoting) and ends records with a line feed. Python's `csv` writer with a
line-feed terminator leaves a bare carriage return unquoted, which readers then take as
a record break; this writer never does. `read_csv_rows` (Python's `csv` reader, no
field-size limit) and the export reader (pyarrow, newlines in values) both read back
exactly what was written.
"""

from __future__ import annotations

import csv
import sys
from collections.abc import Iterable, Iterator
from pathlib import Path
from typing import TextIO

from logiccheck.atomic import write_text_atomic
from logiccheck.clean.sheet import escape

_SPECIAL = frozenset(',"\r\n')


def csv_cell(value: object, sheet_safe: bool = False, delimiter: str = ",") -> str:
    """One cell as CSV text; None is an empty cell."""
    text = "" if value is None else str(value)
    if sheet_safe:
        text = escape(text)
    if _SPECIAL.isdisjoint(text) and delimiter not in text:
        return text
    return '"' + text.replace('"', '""') + '"'


def csv_line(values: Iterable[object], sheet_safe: bool = False, delimiter: str = ",") -> str:
    return delimiter.join(csv_cell(v, sheet_safe, delimiter) for v in values) + "\n"


def write_csv_rows(handle: TextIO, header: Iterable[object] | None, rows: Iterable[Iterable[object]],
                   sheet_safe: bool = False, delimiter: str = ",") -> None:
    """Write `header` (if any) and `rows`; `sheet_safe` escapes formula-like cells,
    header included."""
    if header is not None:
        handle.write(csv_line(header, sheet_safe, delimiter))
    for row in rows:
        handle.write(csv_line(row, sheet_safe, delimiter))


def write_csv_file(path: str | Path, header: Iterable[object], rows: Iterable[Iterable[object]],
                   sheet_safe: bool = False) -> None:
    """Write a UTF-8 CSV file atomically."""
    write_text_atomic(path, lambda fh: write_csv_rows(fh, header, rows, sheet_safe))


def csv_text(header: Iterable[object], rows: Iterable[Iterable[object]], sheet_safe: bool = False) -> str:
    return "".join([csv_line(header, sheet_safe), *(csv_line(r, sheet_safe) for r in rows)])


def read_csv_rows(path: str | Path, encoding: str = "utf-8") -> Iterator[list[str]]:
    """Every record of a CSV file as written (cells of any size, any characters)."""
    csv.field_size_limit(sys.maxsize if sys.maxsize < 2**63 else 2**31 - 1)
    with open(path, encoding=encoding, newline="") as fh:
        yield from csv.reader(fh, strict=True)
