"""`validate --format sarif|junit|github`: data findings through the lint emitters."""

from __future__ import annotations

from logiccheck.checks.registry import all_checks
from logiccheck.data.result import ValidationResult
from logiccheck.diagnostics import Severity
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.report.github import github_text
from logiccheck.report.junit import junit_text
from logiccheck.report.records import findings_as_diagnostics
from logiccheck.report.sarif import sarif_text


def emit_findings(
    result: ValidationResult, fmt: str, q: Questionnaire | None = None, fail_on: Severity = Severity.error
) -> str:
    data_file = result.source or "export"
    records = findings_as_diagnostics(result.findings, data_file, q)
    if fmt == "sarif":
        return sarif_text(records)
    if fmt == "github":
        return github_text(records)
    checks = [n for n, c in all_checks().items() if c.stage in ("data", "quality")]
    return junit_text(records, [data_file], checks, fail_on=fail_on)
