"""`diff --format json`."""

from __future__ import annotations

import json

from logiccheck.diff.model import SpecDiff


def diff_json(diff: SpecDiff) -> str:
    return json.dumps(diff.to_json(), indent=2, ensure_ascii=False)
