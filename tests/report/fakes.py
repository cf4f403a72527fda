"""A validation result in the shape the data stage hands over (table, findings,
dispositions, respondents), for testing the report on its own. Invented demo values."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np
import pandas as pd

from logiccheck.model.questionnaire import Questionnaire

NASTY = [
    "<script>alert('x')</script>",
    '=HYPERLINK("http://example.invalid","click")',
    "+SUM(1,2)",
    "@cmd",
    "Tom & Jerry <b>bold</b> \"quoted\"",
]


@dataclass
class FakeResult:
    table: pd.DataFrame
    findings: list[dict[str, Any]]
    dispositions: pd.Series  # one disposition per respondent
    respondents: int
    thresholds: dict[str, Any] = field(default_factory=dict)


def fake_result(q: Questionnaire, respondents: int = 200, seed: int = 7, findings_per_item: int = 3) -> FakeResult:
    rng = np.random.default_rng(seed)
    names = [e.name for e in q.items()]
    rows, findings = [], []
    for i, name in enumerate(names):
        expected = int(rng.integers(respondents // 2, respondents))
        missing = int(rng.integers(0, 10))
        oop = int(rng.integers(0, 6)) if i % 3 == 0 else 0
        rows.append({"item": name, "expected": expected, "answered": expected - missing + oop,
                     "out_of_path": oop, "missing_on_path": missing, "invalid": int(i % 5 == 0)})
        for k in range(findings_per_item):
            check, severity = [("out-of-path", "error"), ("missing-on-path", "warning"), ("straightline", "info")][k % 3]
            findings.append({"check": check, "severity": severity, "respondent": f"r{(i * 7 + k) % respondents:04d}",
                             "row": i + 2, "item": name, "value": NASTY[(i + k) % len(NASTY)],
                             "message": f"{name}: {check} for this respondent"})
    table = pd.DataFrame(rows).sample(frac=1.0, random_state=seed)  # order must not matter
    dispositions = pd.Series(rng.choice(["complete", "partial", "break-off", "underage"], size=respondents,
                                        p=[0.7, 0.15, 0.1, 0.05]))
    return FakeResult(table, findings, dispositions, respondents, {"speeder": {"min_seconds_per_item": 2.0}})
