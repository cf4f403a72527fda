"""Following `missing-sensitive`'s advice must settle the condition: for every kind of
advice the check gives, apply it to the spec text, lint again and expect no finding on
that condition's line."""

from __future__ import annotations

import re

import pytest

from logiccheck.checks.runner import run_checks
from logiccheck.loader import load_text

BASE = """survey advice "Advice"

codes yesno
  yes = 1 "Yes"
  no = 2 "No"

nonresponse
  dk = 98 "Don't know"
  refused = 99 "Refused"

section main "Main"
  used: single yesno "Used it?"
  score: number 0..10 "Score?"
  follow: text "Why?" when COND
"""
LINE = 14


def _lint(text: str) -> list[tuple[str, str]]:
    found = run_checks(load_text(text, "advice.qlc"))
    return [(d.check, d.message) for d in found if d.span.line == LINE and d.severity.value != "info"]


def _advice(cond: str) -> str:
    got = _lint(BASE.replace("COND", cond))
    assert [c for c, _ in got] == ["missing-sensitive"], got
    return got[0][1]


def test_a_blank_is_settled_by_answered() -> None:
    message = _advice("used != yes")
    assert "`answered(used) and ...`" in message
    assert _lint(BASE.replace("COND", "answered(used) and used != yes")) == []


@pytest.mark.parametrize("cond", ["score >= 7", "score > 6", "score >= 8 or used = no", "6 < score"])
def test_a_non_response_code_is_settled_by_a_range_or_strict(cond: str) -> None:
    message = _advice(cond)
    # answered() does not help here: a non-response code is an answer.
    assert "answered(" not in message
    assert _lint(BASE.replace("COND", "answered(score) and (" + cond + ")")) != []
    ranged = re.search(r"write `([^`]+)` as `(score in \d+\.\.\d+)`", message)
    assert ranged, message
    assert _lint(BASE.replace("COND", cond.replace(ranged.group(1), ranged.group(2)))) == []
    assert "mark `score` `strict`" in message
    strict = BASE.replace("COND", cond).replace('"Score?"', '"Score?" strict')
    assert _lint(strict) == []
