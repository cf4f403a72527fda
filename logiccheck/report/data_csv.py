"""`validate --format csv`: the per-item table; with `--out DIR`, items.csv and findings.csv."""

from __future__ import annotations

from pathlib import Path
from typing import TextIO

from logiccheck.atomic import write_text_atomic
from logiccheck.data.result import TABLE_COLUMNS, ValidationResult
from logiccheck.safety.csvfile import csv_text, write_csv_rows

FINDING_COLUMNS = ["check", "severity", "respondent", "row", "item", "value", "message"]


def items_csv(result: ValidationResult) -> str:
    table = result.table[TABLE_COLUMNS]
    return csv_text(TABLE_COLUMNS, table.itertuples(index=False, name=None), sheet_safe=True)


def write_findings_csv(result: ValidationResult, fh: TextIO, *, sheet_safe: bool = True) -> None:
    """Every finding, one row each, in FINDING_COLUMNS order: `validate --format csv` and
    `clean`'s findings.csv, through the project's one CSV writer (every cell reads back
    whole). `sheet_safe` neutralises cells a spreadsheet would run as a formula."""
    write_csv_rows(fh, FINDING_COLUMNS, [], sheet_safe=sheet_safe)
    for block in result.blocks:
        write_csv_rows(fh, None, (["" if v is None else v for v in rec] for rec in block.rows_out()), sheet_safe=sheet_safe)


def write_csv_dir(result: ValidationResult, out: str | Path) -> list[Path]:
    folder = Path(out)
    folder.mkdir(parents=True, exist_ok=True)
    items = folder / "items.csv"
    findings = folder / "findings.csv"
    write_text_atomic(items, lambda fh: fh.write(items_csv(result)))
    write_text_atomic(findings, lambda fh: write_findings_csv(result, fh))
    return [items, findings]
