"""A worked example with hand-computed counts: a gate with a known split and a follow-up
with answers where it was not due (hand-computed; the counting rules are docs/formats.md)."""

from __future__ import annotations

import pandas as pd

from logiccheck.data import validate
from logiccheck.loader import load_text

SPEC = """survey worked "Worked example"

codes yesno
  yes = 1 "Yes"
  no  = 2 "No"

pet: single yesno "Do you have a pet?" gate
pet_kind: text "What kind of pet?" when pet = yes
"""

# 10 respondents: 6 yes, 3 no, 1 blank. pet_kind: 5 of the yes answer it, one yes leaves it
# blank; 2 of the no answer it anyway; the blank-gate respondent answers it too.
ROWS = [
    (1, 1, "cat"),
    (2, 1, "dog"),
    (3, 1, "fish"),
    (4, 1, "dog"),
    (5, 1, "bird"),
    (6, 1, None),
    (7, 2, "cat"),
    (8, 2, None),
    (9, 2, "hamster"),
    (10, None, "dog"),
]


def _frame() -> pd.DataFrame:
    return pd.DataFrame(ROWS, columns=["id", "pet", "pet_kind"]).astype({"pet": "Float64"})


def test_hand_computed_counts() -> None:
    q = load_text(SPEC, "worked.qlc").questionnaire
    result = validate(q, _frame())
    table = result.table.set_index("item")
    # pet: asked of all 10; 9 answered; 1 blank.
    assert table.loc["pet"].to_dict() == {
        "expected": 10,
        "answered": 9,
        "out_of_path": 0,
        "missing_on_path": 1,
        "invalid": 0,
        "over_expected": False,
    }
    # pet_kind: due for the 6 yes; 8 answered (5 yes + 2 no + 1 blank gate); 3 off the
    # route (ids 7, 9, 10); 1 due and blank (id 6).
    assert table.loc["pet_kind"].to_dict() == {
        "expected": 6,
        "answered": 8,
        "out_of_path": 3,
        "missing_on_path": 1,
        "invalid": 0,
        "over_expected": True,
    }
    off = sorted(f.respondent for f in result.findings if f.check == "out-of-path")
    assert off == ["10", "7", "9"]
    messages = {f.respondent: f.message for f in result.findings if f.check == "out-of-path"}
    assert messages["7"] == "`pet_kind` answered but `pet` = no; asked only when `pet = yes`, line 8"
    assert messages["10"] == "`pet_kind` answered but `pet` was left blank; asked only when `pet = yes`, line 8"


def test_measures_and_dispositions_by_hand() -> None:
    # AAPOR Standard Definitions example thresholds (from memory): complete > 80 % of due
    # items answered, partial 50–80 %, break-off < 50 %.
    spec = """survey disp "Dispositions"

codes yesno
  yes = 1 "Yes"
  no  = 2 "No"

age: number 0..120 "Age?"
stop minor "Adults only." when age < 18
a: single yesno "A?" gate
b: single yesno "B?"
c: single yesno "C?"
d: single yesno "D?"
"""
    frame = pd.DataFrame(
        {
            "id": ["p1", "p2", "p3", "p4", "p5"],
            "age": ["30", "40", "50", "12", "60"],
            "a": ["1", "1", "1", None, None],
            "b": ["1", "1", None, None, None],
            "c": ["1", "1", None, None, None],
            "d": ["1", None, None, None, None],
            "duration": ["300", "x", "", "40", "-5"],
        }
    )
    result = validate(load_text(spec, "disp.qlc").questionnaire, frame)
    m = result.measures.set_index("id")
    # Due: age + a..d = 5 for adults; p4 is stopped after age (1 due).
    assert m["due"].tolist() == [5, 5, 5, 1, 5]
    assert m["answered"].tolist() == [5, 4, 2, 1, 1]
    assert m["gates_answered"].tolist() == [1, 1, 1, 0, 0]
    # p1 5/5 complete; p2 4/5 = 80 % partial (not above 80 %); p3 2/5 = 40 % break-off.
    assert m["disposition"].tolist() == ["complete", "partial", "break-off", "minor", "break-off"]
    assert result.dispositions == {"complete": 1, "partial": 1, "break-off": 2, "minor": 1}
    assert m.loc["p1", "duration"] == 300 and m["duration"].isna().tolist() == [False, True, True, False, True]


def test_root_cause_names_the_inputs_of_a_derived_value() -> None:
    spec = """survey why "Why"

codes freq
  daily  = 1 "Daily"
  weekly = 2 "Weekly"

often: single freq "How often?"
count_n: number 0..100 "How many?" strict
let heavy = (often = daily or count_n >= 50)
detail: text "Tell us more." when heavy
"""
    frame = pd.DataFrame({"id": ["x"], "often": ["2"], "count_n": ["7"], "detail": ["lots"]})
    result = validate(load_text(spec, "why.qlc").questionnaire, frame)
    (finding,) = [f for f in result.findings if f.check == "out-of-path"]
    assert finding.message == (
        "`detail` answered but `heavy` is false (`often` = weekly, `count_n` = 7); asked only when `heavy`, line 10"
    )
