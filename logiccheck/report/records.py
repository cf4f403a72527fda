"""Data findings as `Diagnostic` records, so the SARIF, JUnit and annotation emitters
serve `validate` as they serve `lint`.

A finding points at its row of the export (line = data row + 1, the header being line
1, as a CSV opens in an editor) with the item's statement in the spec as a related
place; the respondent id and the cell are its witness.
"""

from __future__ import annotations

from collections.abc import Iterable

from logiccheck.data.findings import Finding
from logiccheck.diagnostics import Diagnostic, Related, Span
from logiccheck.model.questionnaire import Questionnaire


def finding_as_diagnostic(finding: Finding, data_file: str, q: Questionnaire | None = None) -> Diagnostic:
    line = finding.row + 1 if finding.row is not None else 1
    related = []
    if q is not None and finding.item is not None and finding.item in q.symbols:
        span = q.symbols[finding.item].span
        related.append(Related(span=span, message=f"`{finding.item}` in the spec"))
    witness: dict[str, str] = {}
    if finding.respondent is not None:
        witness["respondent"] = finding.respondent
    if finding.item is not None and finding.value is not None:
        witness[finding.item] = finding.value
    return Diagnostic(
        check=finding.check,
        severity=finding.severity,
        span=Span(file=data_file, line=line, column=1),
        message=finding.message,
        item=finding.item,
        witness=witness or None,
        related=related,
    )


def findings_as_diagnostics(
    findings: Iterable[Finding], data_file: str, q: Questionnaire | None = None
) -> list[Diagnostic]:
    return [finding_as_diagnostic(f, data_file, q) for f in findings]
