"""Completeness measures, rules in the condition language, and dispositions."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from logiccheck.loader import load_text
from logiccheck.quality.bridge import route_state
from logiccheck.quality.completeness import RuleError, dispositions, measures, parse_rule
from logiccheck.quality.config import CompletenessConfig

SPEC = """survey t "t"
codes yn
  yes = 1 "Yes"
  no = 2 "No"
nonresponse
  dk = 98 "Don't know"
age: number 0..120 "Age" strict
stop minor "Too young" when age < 16
used: single yn "Used?" gate
a1: single yn "A1" when used = yes
a2: single yn "A2" when used = yes
a3: single yn "A3" when used = yes
a4: single yn "A4" when used = yes
b1: single yn "B1" when used = no
last: single yn "Last"
"""


def frame(rows: list[list[object]]) -> pd.DataFrame:
    return pd.DataFrame(rows, columns=["id", "age", "used", "a1", "a2", "a3", "a4", "b1", "last"])


@pytest.fixture
def q():  # type: ignore[no-untyped-def]
    return load_text(SPEC).questionnaire


def test_skipped_items_do_not_count(q) -> None:  # type: ignore[no-untyped-def]
    data = frame(
        [
            ["r1", 30, 2, None, None, None, None, 1, 1],  # no-branch: 4 of 4 due answered
            ["r2", 30, 1, 1, 1, 1, 1, None, 1],  # 7 of 7
            ["r3", 30, 1, 1, 1, None, None, None, None],  # 4 of 7
            ["r4", 30, 1, None, None, None, None, None, None],  # only the first gate: 2 of 7
            ["r5", 12, None, None, None, None, None, None, None],  # screened out
            ["r6", 30, 1, 1, 1, 1, 98, None, 1],  # dk counts as answered: 7 of 7
        ]
    )
    state = route_state(q, data)
    m = measures(q, state, CompletenessConfig())
    assert m["due_count"].tolist() == [4, 7, 7, 7, 1, 7]
    assert m["answered_count"].tolist() == [4, 7, 4, 2, 1, 7]
    assert m["gates_answered"].tolist() == [1, 1, 1, 1, 0, 1]
    # Default thresholds: the example thresholds of the AAPOR Standard Definitions
    # (from memory): complete > 80 %, partial 50–80 %, break-off < 50 %.
    disp = dispositions(q, state, CompletenessConfig())
    assert disp.tolist() == ["complete", "complete", "partial", "break-off", "minor", "complete"]
    strict = dispositions(q, state, CompletenessConfig(nonresponse_counts_as_answered=False))
    assert strict.tolist()[5] == "complete"  # 6 of 7 = 86 %
    m2 = measures(q, state, CompletenessConfig(nonresponse_counts_as_answered=False))
    assert m2["answered_count"].tolist()[5] == 6


def test_rules_and_weights(q) -> None:  # type: ignore[no-untyped-def]
    data = frame(
        [
            ["r1", 30, 1, 1, 1, 1, 1, None, None],  # 6 of 7, but not the key item `last`
            ["r2", 30, 1, 1, None, None, None, None, 1],  # 4 of 7 with `last`
            ["r3", 30, 1, None, None, None, None, None, None],  # stopped before a2
        ]
    )
    state = route_state(q, data)
    cfg = CompletenessConfig(complete_rule="answered_share >= 0.5 and answered(last)", partial_rule="reached(a2)")
    assert dispositions(q, state, cfg).tolist() == ["partial", "complete", "break-off"]
    cfg = CompletenessConfig(complete_rule="weighted_share > 0.8", weights={"last": 10})
    m = measures(q, state, cfg)
    # r2: weights a1..a4 = 1, last = 10, age and used = 1: answered 1+1+1+10 = 13 of 16
    assert m["weighted_share"].iloc[1] == pytest.approx(13 / 16)
    assert dispositions(q, state, cfg).tolist() == ["partial", "complete", "break-off"]
    assert np.isclose(m["weighted_share"].iloc[0], 6 / 16)


def test_rule_errors(q) -> None:  # type: ignore[no-untyped-def]
    with pytest.raises(RuleError, match="did you mean `answered_share`"):
        parse_rule("answered_shar > 0.5", q)
    with pytest.raises(RuleError, match="column"):
        parse_rule("answered_share >", q)
    with pytest.raises(RuleError, match="names no item"):
        parse_rule("reached(nothing)", q)
