"""Writing every `clean` output atomically (exports are read by `data/readers.py`, the one reader)."""

from __future__ import annotations

import hashlib
import json
from pathlib import Path
from typing import Any

import pandas as pd

from logiccheck.atomic import atomic_write
from logiccheck.clean.sheet import escape, unescape

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
    return frame.map(escape) if safe else frame


def write_table(frame: pd.DataFrame, path: Path, fmt: str, sheet_safe: bool, delimiter: str = ",") -> None:
    """`frame` holds text cells ("" = blank); CSV and TSV keep the export's delimiter."""
    if fmt in ("csv", "tsv"):
        sep = "\t" if fmt == "tsv" else delimiter
        atomic_write(path, lambda p: sheet_frame(frame, sheet_safe).to_csv(p, index=False, encoding="utf-8", sep=sep))
    elif fmt == "jsonl":
        typed = frame.replace("", None)
        atomic_write(path, lambda p: typed.to_json(p, orient="records", lines=True, force_ascii=False))
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
