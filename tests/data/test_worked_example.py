"""A worked example with hand-computed counts: a gate with a known split and a follow-up
with answers where it was not due (hand-computed; the counting rules are DESIGN §5)."""

from __future__ import annotations

import pandas as pd

from logiccheck.data import validate
from logiccheck.load import load_text

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
