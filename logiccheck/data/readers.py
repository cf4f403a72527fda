"""Read an export (CSV, TSV, .xlsx, Parquet, JSON Lines) in chunks of raw columns.

Every reader yields pyarrow tables whose columns are text (or, for Parquet, the file's
own numeric types) with blank cells as null, so no code, blank or stray text is lost
before the typed frame judges it. Input files are only ever opened for reading.
"""

from __future__ import annotations

import codecs
import csv
import json
from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

import pyarrow as pa
import pyarrow.csv as pacsv

from logiccheck.safety.streams import spool

if TYPE_CHECKING:
    import pandas as pd

DEFAULT_CHUNK_ROWS = None  # chosen from the number of columns: about CHUNK_CELLS cells a chunk
CHUNK_CELLS = 12_000_000
MAX_CHUNK_ROWS = 200_000


def rows_for(columns: int) -> int:
    """Rows per chunk so that a chunk holds about CHUNK_CELLS cells (memory stays flat)."""
    return max(1_000, min(MAX_CHUNK_ROWS, CHUNK_CELLS // max(columns, 1)))
# Files up to this size are read in one threaded pass and then sliced; larger ones are
# streamed block by block, so an export larger than memory still validates.
ONE_PASS_BYTES = 256_000_000


class DataReadError(Exception):
    """An export that cannot be read: one line naming the file and what to do."""


@dataclass
class Export:
    """An opened export: its path, column names, row count when known, and its chunks."""

    path: Path
    columns: list[str]
    chunks: Iterator[pa.Table]
    size: int
    delimiter: str | None = None  # the delimiter a CSV/TSV export was read with


def _suffix(path: Path) -> str:
    return "".join(s.lower() for s in path.suffixes[-1:])


def open_export(
    path: str | Path,
    *,
    encoding: str | None = None,
    chunk_rows: int | None = DEFAULT_CHUNK_ROWS,
    stream: bool | None = None,
    delimiter: str | None = None,
) -> Export:
    """Open an export for chunked reading; the format follows the file name's suffix.
    A CSV's delimiter is detected from its header line unless `delimiter` is given."""
    shown = str(path)
    path = spool(path)
    if not path.exists():
        raise DataReadError(f"{shown}: no such file; give the path of the export (CSV, TSV, .xlsx, .parquet or .jsonl)")
    if path.is_dir():
        raise DataReadError(f"{path}: is a folder; give the path of an export file")
    suffix = _suffix(path)
    size = path.stat().st_size
    encoding = encoding or bom_encoding(path)
    if suffix in (".csv", ".tsv", ".tab", ".txt"):
        if delimiter is None:
            delimiter = "\t" if suffix in (".tsv", ".tab") else detect_delimiter(path, encoding)
        elif delimiter not in DELIMITERS:
            raise DataReadError(f"delimiter {delimiter!r} is not supported; use one of , ; tab |")
        return _open_delimited(path, delimiter, encoding, chunk_rows, size, stream)
    if suffix == ".xlsx":
        return _open_xlsx(path, chunk_rows, size)
    if suffix in (".parquet", ".pq"):
        return _open_parquet(path, chunk_rows, size)
    if suffix in (".jsonl", ".ndjson"):
        return _open_jsonl(path, encoding, chunk_rows, size)
    raise DataReadError(
        f"{path}: unknown export format `{suffix or '(none)'}`; use .csv, .tsv, .xlsx, .parquet or .jsonl"
    )


# ---------------------------------------------------------------- CSV / TSV
def bom_encoding(path: Path) -> str | None:
    """UTF-16 and UTF-32 text announce themselves with a byte-order mark; None otherwise."""
    try:
        with path.open("rb") as fh:
            head = fh.read(4)
    except OSError:
        return None
    if head.startswith((b"\xff\xfe\x00\x00", b"\x00\x00\xfe\xff")):
        return "utf-32"
    if head.startswith((b"\xff\xfe", b"\xfe\xff")):
        return "utf-16"
    return None


def ragged_line(path: Path, delimiter: str, encoding: str | None, width: int) -> tuple[int, int] | None:
    """(line number, cells) of the first record whose number of cells is not `width`."""
    csv.field_size_limit(2**31 - 1)
    try:
        with path.open("r", encoding=encoding or "utf-8-sig", newline="") as fh:
            reader = csv.reader(fh, delimiter=delimiter)
            for row in reader:
                if row and len(row) != width:
                    return reader.line_num, len(row)
    except (OSError, UnicodeDecodeError, csv.Error):
        return None
    return None


DELIMITERS = (",", ";", "\t", "|")
DELIMITER_NAMES = {",": "comma", ";": "semicolon", "\t": "tab", "|": "vertical bar"}


def parse_delimiter(text: str) -> str:
    """`--delimiter` / `[data] delimiter` as given (",", ";", "tab", "\\t", "|")."""
    named = {"comma": ",", "semicolon": ";", "tab": "\t", "\\t": "\t", "pipe": "|"}
    value = named.get(text.lower(), text)
    if value not in DELIMITERS:
        raise DataReadError(f"delimiter {text!r} is not supported; use one of , ; tab |")
    return value


def detect_delimiter(path: Path, encoding: str | None) -> str:
    """The delimiter of a CSV export, from its header line: the candidate that splits it
    into the most fields outside quotes (a comma on a tie, and for a one-column file)."""
    enc = encoding or "utf-8-sig"
    try:
        with path.open("r", encoding=enc, newline="") as fh:
            line = fh.readline()
    except UnicodeDecodeError:
        raise _not_utf8(path, encoding) from None
    except LookupError:
        raise DataReadError(f"{path}: unknown encoding `{encoding}`; use a name such as utf-8, cp1252 or latin-1") from None
    counts = {d: 0 for d in DELIMITERS}
    quoted = False
    for ch in line:
        if ch == '"':
            quoted = not quoted
        elif not quoted and ch in counts:
            counts[ch] += 1
    best = max(DELIMITERS, key=lambda d: (counts[d], d == ","))
    return best if counts[best] else ","


def first_bad_byte(path: Path, encoding: str = "utf-8") -> int | None:
    """The byte offset of the first byte that does not decode, or None."""
    decoder = codecs.getincrementaldecoder(encoding)()
    offset = 0
    with path.open("rb") as fh:
        while True:
            block = fh.read(1 << 20)
            if not block:
                try:
                    decoder.decode(b"", final=True)
                except UnicodeDecodeError as err:
                    return offset + err.start
                return None
            try:
                decoder.decode(block)
            except UnicodeDecodeError as err:
                # err.start is relative to the buffered bytes plus this block.
                pending = len(decoder.getstate()[0])
                return offset - pending + err.start
            offset += len(block)


def _not_utf8(path: Path, encoding: str | None) -> DataReadError:
    enc = encoding or "utf-8"
    where = first_bad_byte(path, enc)
    at = f" at byte {where}" if where is not None else ""
    return DataReadError(
        f"{path}: not {enc} text{at}; save the export as UTF-8 or pass --encoding (e.g. --encoding cp1252)"
    )


def _header(path: Path, delimiter: str, encoding: str | None) -> list[str]:
    enc = encoding or "utf-8-sig"
    try:
        with path.open("r", encoding=enc, newline="") as fh:
            row = next(csv.reader(fh, delimiter=delimiter), None)
    except UnicodeDecodeError:
        raise _not_utf8(path, encoding) from None
    except LookupError:
        raise DataReadError(f"{path}: unknown encoding `{encoding}`; use a name such as utf-8, cp1252 or latin-1") from None
    if not row:
        raise DataReadError(f"{path}: the file is empty; an export needs a header row of column names")
    seen: set[str] = set()
    for name in row:
        if name in seen:
            raise DataReadError(f"{path}: column `{name}` appears twice in the header; every column needs its own name")
        seen.add(name)
    return row


def _open_delimited(
    path: Path, delimiter: str, encoding: str | None, chunk_rows: int | None, size: int, stream: bool | None
) -> Export:
    names = _header(path, delimiter, encoding)
    chunk_rows = chunk_rows or rows_for(len(names))
    read = pacsv.ReadOptions(
        encoding=encoding or "utf8",
        block_size=1 << 24,
    )
    parse = pacsv.ParseOptions(delimiter=delimiter, newlines_in_values=True)
    convert = pacsv.ConvertOptions(
        # Dictionary-encoded text: every cell is kept as written, and each column is
        # judged once per distinct text rather than once per cell.
        column_types={c: pa.dictionary(pa.int32(), pa.string()) for c in names},
        strings_can_be_null=True,
        quoted_strings_can_be_null=True,
        null_values=[""],
    )
    if stream is None:
        stream = size > ONE_PASS_BYTES

    def chunks() -> Iterator[pa.Table]:
        try:
            if not stream:
                table = pacsv.read_csv(path, read_options=read, parse_options=parse, convert_options=convert)
                yield from _slices(table, chunk_rows)
                return
            reader = pacsv.open_csv(path, read_options=read, parse_options=parse, convert_options=convert)
            pending: list[pa.RecordBatch] = []
            rows = 0
            for batch in reader:
                pending.append(batch)
                rows += batch.num_rows
                if rows >= chunk_rows:
                    yield pa.Table.from_batches(pending)
                    pending, rows = [], 0
            if pending:
                yield pa.Table.from_batches(pending)
        except pa.ArrowInvalid as err:
            bad = ragged_line(path, delimiter, encoding, len(names)) if "columns" in str(err) else None
            if bad is not None:
                raise DataReadError(
                    f"{path}: line {bad[0]} has the wrong number of cells ({bad[1]}; the header has {len(names)}); "
                    "check quoting and delimiters on that line"
                ) from None
            raise _csv_error(path, str(err), encoding) from None

    return Export(path, names, chunks(), size, delimiter)


def _csv_error(path: Path, text: str, encoding: str | None) -> DataReadError:
    if "UTF8" in text or "utf8" in text.lower():
        return _not_utf8(path, encoding)
    first = text.strip().splitlines()[0] if text.strip() else "unreadable"
    if "Expected" in first and "columns" in first:
        return DataReadError(f"{path}: a row has the wrong number of cells ({first}); check quoting and delimiters")
    return DataReadError(f"{path}: cannot read as CSV ({first})")


def _slices(table: pa.Table, chunk_rows: int) -> Iterator[pa.Table]:
    if table.num_rows == 0:
        yield table
        return
    for start in range(0, table.num_rows, chunk_rows):
        yield table.slice(start, chunk_rows)


def prefetch(chunks: Iterator[pa.Table], depth: int = 1) -> Iterator[pa.Table]:
    """Read the next chunk in a background thread while the caller works on this one
    (pyarrow's reader releases the GIL, so reading and evaluating overlap)."""
    import queue
    import threading

    box: queue.Queue = queue.Queue(maxsize=depth)
    done = object()
    stop = threading.Event()

    def work() -> None:
        try:
            for table in chunks:
                if stop.is_set():
                    return
                box.put(table)
            box.put(done)
        except BaseException as err:  # noqa: BLE001 - handed to the consuming thread
            box.put(err)

    thread = threading.Thread(target=work, daemon=True)
    thread.start()
    try:
        while True:
            item = box.get()
            if item is done:
                return
            if isinstance(item, BaseException):
                raise item
            yield item
    finally:
        stop.set()


# ---------------------------------------------------------------- other formats
def _cell_text(value: object) -> str | None:
    if value is None:
        return None
    if isinstance(value, bool):
        return "1" if value else "0"
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    if hasattr(value, "isoformat"):
        return value.isoformat()  # type: ignore[no-any-return]
    text = str(value)
    return text if text != "" else None


def _rows_to_table(names: list[str], rows: list[list[str | None]]) -> pa.Table:
    cols = list(zip(*rows, strict=False)) if rows else [() for _ in names]
    return pa.table({n: pa.array(list(c), type=pa.string()) for n, c in zip(names, cols, strict=False)})


def _open_xlsx(path: Path, chunk_rows: int | None, size: int) -> Export:
    import openpyxl

    try:
        book = openpyxl.load_workbook(path, read_only=True, data_only=True)
    except Exception as err:  # noqa: BLE001 - openpyxl raises many kinds; all mean unreadable
        raise DataReadError(f"{path}: cannot read as .xlsx ({type(err).__name__}: {err})") from None
    sheet = book.worksheets[0]
    # The declared size of a sheet is not trusted (a 2 KB file may declare a million
    # rows): only rows present in the file are read, one at a time.
    sheet.reset_dimensions()
    rows = (row for row in sheet.iter_rows(values_only=True) if any(v is not None and v != "" for v in row))
    header = next(rows, None)
    if header is None:
        raise DataReadError(f"{path}: the first sheet is empty; an export needs a header row")
    names = [_cell_text(h) or f"column_{i + 1}" for i, h in enumerate(header)]
    if len(set(names)) != len(names):
        dup = next(n for n in names if names.count(n) > 1)
        raise DataReadError(f"{path}: column `{dup}` appears twice in the header; every column needs its own name")
    chunk_rows = chunk_rows or rows_for(len(names))

    def chunks() -> Iterator[pa.Table]:
        batch: list[list[str | None]] = []
        for row in rows:
            cells = [_cell_text(v) for v in row[: len(names)]]
            cells += [None] * (len(names) - len(cells))
            batch.append(cells)
            if len(batch) >= chunk_rows:
                yield _rows_to_table(names, batch)
                batch = []
        yield _rows_to_table(names, batch)
        book.close()

    return Export(path, names, _skip_empty_tail(chunks()), size)


def _skip_empty_tail(chunks: Iterator[pa.Table]) -> Iterator[pa.Table]:
    """Drop an empty last chunk unless it is the only one (the header still counts)."""
    first = True
    for table in chunks:
        if table.num_rows or first:
            yield table
        first = False


def _open_parquet(path: Path, chunk_rows: int | None, size: int) -> Export:
    import pyarrow.parquet as pq

    try:
        pfile = pq.ParquetFile(path)
    except (pa.ArrowInvalid, OSError) as err:
        raise DataReadError(f"{path}: cannot read as Parquet ({err})") from None
    names = list(pfile.schema_arrow.names)
    chunk_rows = chunk_rows or rows_for(len(names))

    def chunks() -> Iterator[pa.Table]:
        empty = True
        for batch in pfile.iter_batches(batch_size=chunk_rows):
            empty = False
            yield pa.Table.from_batches([batch])
        if empty:
            yield pfile.schema_arrow.empty_table()

    return Export(path, names, chunks(), size)


def _open_jsonl(path: Path, encoding: str | None, chunk_rows: int | None, size: int) -> Export:
    enc = encoding or "utf-8-sig"
    names: list[str] = []
    try:
        with path.open("r", encoding=enc) as fh:
            for line in fh:
                if line.strip():
                    first = json.loads(line)
                    if not isinstance(first, dict):
                        raise DataReadError(f"{path}: line 1 is not a JSON object; JSON Lines exports hold one object per line")
                    names = list(first)
                    break
    except UnicodeDecodeError:
        raise _not_utf8(path, encoding) from None
    except json.JSONDecodeError as err:
        raise DataReadError(f"{path}: line 1 is not valid JSON ({err.msg})") from None
    chunk_rows = chunk_rows or rows_for(len(names))

    def chunks() -> Iterator[pa.Table]:
        batch: list[list[str | None]] = []
        with open(path, encoding=enc) as fh:
            for number, line in enumerate(fh, start=1):
                if not line.strip():
                    continue
                try:
                    obj = json.loads(line)
                except json.JSONDecodeError as err:
                    raise DataReadError(f"{path}: line {number} is not valid JSON ({err.msg})") from None
                if not isinstance(obj, dict):
                    raise DataReadError(f"{path}: line {number} is not a JSON object")
                extra = [k for k in obj if k not in names]
                if extra:
                    raise DataReadError(
                        f"{path}: line {number} has key `{extra[0]}` that line 1 does not; give every line the same keys"
                    )
                batch.append([_json_cell(obj.get(k)) for k in names])
                if len(batch) >= chunk_rows:
                    yield _rows_to_table(names, batch)
                    batch = []
        yield _rows_to_table(names, batch)

    return Export(path, names, _skip_empty_tail(chunks()), size)


def _json_cell(value: object) -> str | None:
    if isinstance(value, (list, dict)):
        return json.dumps(value)
    return _cell_text(value)


def column_texts(table: pa.Table, column: str) -> list[str | None]:
    """A column's cells as the export wrote them (text; None where blank)."""
    arr = table.column(column)
    if pa.types.is_dictionary(arr.type) or pa.types.is_string(arr.type) or pa.types.is_large_string(arr.type):
        return [None if v is None else str(v) for v in arr.to_pylist()]
    return [_cell_text(v) for v in arr.to_pylist()]


def read_table(
    path: str | Path, *, encoding: str | None = None, delimiter: str | None = None
) -> tuple[pa.Table, Export]:
    """The whole export as one table (the one reader; chunks joined)."""
    export = open_export(path, encoding=encoding, delimiter=delimiter)
    parts = list(export.chunks)
    table = pa.concat_tables(parts) if parts else pa.table({c: pa.array([], pa.string()) for c in export.columns})
    return table, export


def read_cells(path: str | Path, *, encoding: str | None = None, delimiter: str | None = None) -> pd.DataFrame:
    """Every cell as text ("" where blank), columns in file order: what `clean` writes from."""
    table, _ = read_table(path, encoding=encoding, delimiter=delimiter)
    return cells_frame(table)


def cells_frame(table: pa.Table) -> pd.DataFrame:
    import pandas as pd

    return pd.DataFrame(
        {c: ["" if v is None else v for v in column_texts(table, c)] for c in table.column_names},
        columns=list(table.column_names),
        dtype=object,
    ).astype(str)
