"""`validate --format csv`: the per-item table; with `--out DIR`, items.csv and findings.csv."""

from __future__ import annotations

import csv
import io
import os
import tempfile
from pathlib import Path

from logiccheck.data.result import TABLE_COLUMNS, ValidationResult

FINDING_COLUMNS = ["check", "severity", "respondent", "row", "item", "value", "message"]


def items_csv(result: ValidationResult) -> str:
    buf = io.StringIO()
    result.table[TABLE_COLUMNS].to_csv(buf, index=False, lineterminator="\n")
    return buf.getvalue()


def write_findings_csv(result: ValidationResult, fh: io.TextIOBase) -> None:
    writer = csv.writer(fh, lineterminator="\n")
    writer.writerow(FINDING_COLUMNS)
    for block in result.blocks:
        for f in block.records():
            writer.writerow(["" if v is None else v for v in (f.check, f.severity.value, f.respondent, f.row, f.item, f.value, f.message)])


def _atomic_write(path: Path, write) -> None:  # type: ignore[no-untyped-def]
    """Write to a temp file beside `path`, then replace it in one step."""
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", dir=path.parent)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as fh:
            write(fh)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def write_csv_dir(result: ValidationResult, out: str | Path) -> list[Path]:
    folder = Path(out)
    folder.mkdir(parents=True, exist_ok=True)
    items = folder / "items.csv"
    findings = folder / "findings.csv"
    _atomic_write(items, lambda fh: fh.write(items_csv(result)))
    _atomic_write(findings, lambda fh: write_findings_csv(result, fh))
    return [items, findings]
