"""`lint --format json`: the fields of docs/formats.md."""

from __future__ import annotations

import json

from logiccheck.diagnostics import Diagnostic, count_by_severity


def lint_json(diagnostics: list[Diagnostic]) -> str:
    payload = {
        "diagnostics": [d.to_json() for d in diagnostics],
        "summary": count_by_severity(diagnostics),
    }
    return json.dumps(payload, indent=2, ensure_ascii=False)
