"""`validate --format csv`: the per-item table; with `--out DIR`, items.csv and findings.csv."""

from __future__ import annotations

import csv
import io
from pathlib import Path
from typing import TextIO

import pyarrow as pa
import pyarrow.csv as pacsv

from logiccheck.atomic import write_text_atomic
from logiccheck.data.result import TABLE_COLUMNS, ValidationResult

ARROW_BLOCK = 64  # blocks at least this large are written by pyarrow
FINDING_COLUMNS = ["check", "severity", "respondent", "row", "item", "value", "message"]


def items_csv(result: ValidationResult) -> str:
    buf = io.StringIO()
    result.table[TABLE_COLUMNS].to_csv(buf, index=False, lineterminator="\n")
    return buf.getvalue()


def write_findings_csv(result: ValidationResult, fh: TextIO, *, sheet_safe: bool = False) -> None:
    """Every finding, one row each, in FINDING_COLUMNS order: `validate --format csv` and
    `clean`'s findings.csv. `sheet_safe` neutralises cells a spreadsheet would run as a
    formula. Large plain blocks go through pyarrow's CSV writer."""
    from logiccheck.clean.sheet import escape

    writer = csv.writer(fh, lineterminator="\n")
    writer.writerow(FINDING_COLUMNS)
    for block in result.blocks:
        if sheet_safe or block.rows.size < ARROW_BLOCK or "{value}" in block.message or block.messages is not None:
            for rec in block.rows_out():
                cells = ["" if v is None else str(v) for v in rec]
                writer.writerow([escape(c) for c in cells] if sheet_safe else cells)
            continue
        k = block.rows.size
        table = pa.table(
            {
                "check": pa.repeat(pa.scalar(block.check), k),
                "severity": pa.repeat(pa.scalar(block.severity.value), k),
                "respondent": pa.array(block.ids, pa.string()) if block.ids is not None else pa.nulls(k, pa.string()),
                "row": pa.array(block.rows + 1),
                "item": pa.repeat(pa.scalar(block.item or ""), k),
                "value": pa.array(block.values, pa.string()) if block.values is not None else pa.nulls(k, pa.string()),
                "message": pa.repeat(pa.scalar(block.message), k),
            }
        )
        buf = io.BytesIO()
        pacsv.write_csv(table, buf, write_options=pacsv.WriteOptions(include_header=False, quoting_style="needed"))
        fh.write(buf.getvalue().decode("utf-8"))


def write_csv_dir(result: ValidationResult, out: str | Path) -> list[Path]:
    folder = Path(out)
    folder.mkdir(parents=True, exist_ok=True)
    items = folder / "items.csv"
    findings = folder / "findings.csv"
    write_text_atomic(items, lambda fh: fh.write(items_csv(result)))
    write_text_atomic(findings, lambda fh: write_findings_csv(result, fh))
    return [items, findings]
