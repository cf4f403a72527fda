"""Reading an export cell-exactly, and writing every output atomically."""

from __future__ import annotations

import hashlib
import json
from pathlib import Path
from typing import Any

import pandas as pd

from logiccheck.atomic import atomic_write
from logiccheck.clean.sheet import escape, unescape

FORMATS = {".csv": "csv", ".parquet": "parquet", ".xlsx": "xlsx"}


class ExportError(ValueError):
    """An export that cannot be read: one line naming the file and what to do."""


def export_format(path: Path) -> str:
    fmt = FORMATS.get(path.suffix.lower())
    if fmt is None:
        raise ExportError(f"{path}: unsupported export format {path.suffix!r}; use .csv, .parquet or .xlsx")
    return fmt


def read_export(path: str | Path) -> pd.DataFrame:
    """Every cell as the exact text of the file ("" = empty), so that cleaning and its
    reversal are exact. Parquet values are turned into text the same way each time."""
    path = Path(path)
    fmt = export_format(path)
    if not path.is_file():
        raise ExportError(f"{path}: no such export file")
    try:
        if fmt == "csv":
            frame = pd.read_csv(path, dtype=str, keep_default_na=False, na_filter=False, encoding="utf-8")
        elif fmt == "xlsx":
            frame = pd.read_excel(path, dtype=str, keep_default_na=False, na_filter=False)
        else:
            frame = pd.read_parquet(path)
            frame = frame.astype(object).where(frame.notna(), "").astype(str)
    except UnicodeDecodeError as err:
        raise ExportError(f"{path}: not UTF-8 text (byte {err.start}); export as UTF-8") from None
    except (pd.errors.ParserError, pd.errors.EmptyDataError, ValueError, OSError) as err:
        raise ExportError(f"{path}: cannot read the export ({str(err).splitlines()[0]})") from None
    dup = frame.columns[frame.columns.duplicated()].tolist()
    if dup:
        raise ExportError(f"{path}: column {dup[0]!r} appears twice; give every column its own name")
    return frame


def file_hash(path: str | Path) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for block in iter(lambda: fh.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()


def sheet_frame(frame: pd.DataFrame, safe: bool) -> pd.DataFrame:
    return frame.map(escape) if safe else frame


def write_table(frame: pd.DataFrame, path: Path, fmt: str, sheet_safe: bool) -> None:
    if fmt == "csv":
        atomic_write(path, lambda p: sheet_frame(frame, sheet_safe).to_csv(p, index=False, encoding="utf-8"))
    elif fmt == "xlsx":
        atomic_write(path, lambda p: sheet_frame(frame, sheet_safe).to_excel(p, index=False, engine="openpyxl"))
    else:
        typed = frame.replace("", None)
        atomic_write(path, lambda p: typed.to_parquet(p, index=False))


def write_json(obj: Any, path: Path) -> None:
    atomic_write(path, lambda p: p.write_text(json.dumps(obj, indent=2, ensure_ascii=False) + "\n", encoding="utf-8"))


def read_sheet_csv(path: str | Path) -> pd.DataFrame:
    """Read back a CSV this tool wrote, undoing the spreadsheet escape."""
    frame = pd.read_csv(path, dtype=str, keep_default_na=False, na_filter=False, encoding="utf-8")
    return frame.map(unescape)
