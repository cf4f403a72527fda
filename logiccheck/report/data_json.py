"""`validate --format json`: the fields of docs/formats.md."""

from __future__ import annotations

import json

from logiccheck.data.result import ValidationResult


def validation_json(result: ValidationResult) -> str:
    return json.dumps(result.to_json(), indent=2, ensure_ascii=False)
