"""`diff` on versions with known changes; witnesses re-checked by an independent router."""

from __future__ import annotations

import itertools
import json

import pytest

from logiccheck.diff import diff_questionnaires
from logiccheck.loader import load_file, load_text
from tests.cli_run import Ran, run_cli
from tests.conftest import ROOT
from tests.diff_oracle import Router, parse_witness

DATA = ROOT / "tests" / "data" / "diff"


def _diff(new: str, old: str = "wave1"):  # type: ignore[no-untyped-def]
    a = load_file(DATA / f"{old}.qlc").questionnaire
    b = load_file(DATA / f"{new}.qlc").questionnaire
    return a, b, diff_questionnaires(a, b)


def _kinds(result) -> list[tuple[str, str | None]]:  # type: ignore[no-untyped-def]
    return [(c.kind, c.item) for c in result.changes]


@pytest.mark.parametrize(
    ("new", "expected"),
    [
        ("recode", [("recode", "freq")]),
        ("reworded", [("wording-changed", "ebike")]),
        ("tightened", [("routing-changed", "range_ok")]),
        ("demorgan", [("routing-equivalent", "helmet")]),
        (
            "all_four",
            [("recode", "freq"), ("wording-changed", "ebike"), ("routing-changed", "range_ok"), ("routing-equivalent", "helmet")],
        ),
        ("renamed", [("item-renamed", "rode_ebike"), ("item-added", "parking"), ("item-removed", "purpose_other")]),
        ("wave1", []),
        ("editrule", [("check-equivalent", "daily_needs_trips")]),
        ("gridstem", [("flags-changed", "used"), ("wording-changed", "docks"), ("flags-changed", "docks")]),
        (
            "screenout",
            [("stop-changed", "underage")]
            + [("routing-changed", x) for x in (
                "used", "freq", "trips", "purpose", "purpose_other", "ebike", "range_ok", "helmet",
                "dock_find", "dock_app", "dock_safe", "praise", "why_not", "overall")]
            + [("check-changed", "daily_needs_trips")],
        ),
    ],
)
def test_reports_exactly_the_known_changes(new: str, expected: list) -> None:
    _, _, result = _diff(new)
    assert _kinds(result) == expected


def test_recode_names_the_moved_labels() -> None:
    _, _, result = _diff("recode")
    (change,) = result.changes
    assert change.impact == "break"
    assert change.details["moved"] == ["`weekly` 2 → 3", "`monthly` 3 → 2"]


def test_tightened_gate_witness_is_really_routed_differently() -> None:
    old, new, result = _diff("tightened")
    (change,) = [c for c in result.changes if c.kind == "routing-changed"]
    assert change.asked_in == "old"
    a = Router(old, parse_witness(old, change.witness)).asked["range_ok"]
    b = Router(new, parse_witness(new, change.witness)).asked["range_ok"]
    assert (a, b) == (True, False)
    # The witness is a real respondent: past the age screen, under the new age limit.
    assert 16 <= float(change.witness["age"]) < 18


def test_renamed_item_keeps_routing_of_items_reading_it() -> None:
    _, _, result = _diff("renamed")
    assert result.routing_same == result.compared == 14
    renamed = next(c for c in result.changes if c.kind == "item-renamed")
    assert renamed.old_name == "ebike"


HEAD = """survey t "T"
codes yesno
  yes = 1 "Yes"
  no = 2 "No"
nonresponse
  dk = 98 "Don't know"
a: single yesno "A?"
b: single yesno "B?"
n: number 0..5 "N?"
"""
LABELS = [None, "yes", "no", "dk"]


def _brute(old_cond: str, new_cond: str) -> tuple[bool, object]:
    """Every respondent over a tiny spec: does `z` get asked alike? (exhaustive oracle)."""
    old = load_text(HEAD + f'z: text "Z?" when {old_cond}\n', "old.qlc").questionnaire
    new = load_text(HEAD + f'z: text "Z?" when {new_cond}\n', "new.qlc").questionnaire
    for a, b, num in itertools.product(LABELS, LABELS, [None, 0, 1, 2, 3, 4, 5, 98]):
        answers = {"a": a, "b": b, "n": num}
        if Router(old, answers).asked["z"] != Router(new, answers).asked["z"]:
            return False, (old, new)
    return True, (old, new)


# Expected verdicts worked by hand from the routing semantics (DEVELOPERS.md) (Kleene logic; dk is a real value that
# `=`/`!=` see, ordering on it is unknown); the exhaustive router confirms each one.
@pytest.mark.parametrize(
    ("old_cond", "new_cond", "same"),
    [
        ("not (a = yes or b = yes)", "a != yes and b != yes", True),  # De Morgan
        ("not (a = yes or b = yes)", "a = no and b = no", False),  # differs on dk
        ("not (a = yes and b = yes)", "not a = yes or not b = yes", True),  # De Morgan
        ("a = yes and b = yes", "b = yes and a = yes", True),
        ("n >= 2", "not (n < 2)", True),  # unknown on blank and on dk either way
        ("n >= 2", "n in 2..5", True),
        ("n >= 2", "n != 0 and answered(n)", False),  # differs for n = 1 and n = dk
        ("answered(a)", "a in (yes, no, dk)", True),
        ("a = yes", "a != no", False),  # differs on dk
    ],
)
def test_solver_verdict_agrees_with_exhaustive_routing(old_cond: str, new_cond: str, same: bool) -> None:
    brute_same, (old, new) = _brute(old_cond, new_cond)
    assert brute_same == same
    result = diff_questionnaires(old, new)
    routing = [c for c in result.changes if c.kind.startswith("routing")]
    if same:
        assert [c.kind for c in routing] in ([], ["routing-equivalent"])
        assert result.routing_same == result.compared
    else:
        (change,) = routing
        assert change.kind == "routing-changed"
        asked = (
            Router(old, parse_witness(old, change.witness)).asked["z"],
            Router(new, parse_witness(new, change.witness)).asked["z"],
        )
        assert asked == ((True, False) if change.asked_in == "old" else (False, True))


def _cli(*args: str) -> Ran:
    return run_cli("diff", *args)


def test_cli_formats_and_exit_status() -> None:
    old, new = str(DATA / "wave1.qlc"), str(DATA / "all_four.qlc")
    proc = _cli(old, new, "--format", "json")
    assert proc.returncode == 0
    payload = json.loads(proc.stdout)
    assert payload["summary"]["routing_changed"] == 1
    assert [c["kind"] for c in payload["changes"]] == ["recode", "wording-changed", "routing-changed", "routing-equivalent"]
    assert _cli(old, new, "--fail-on-routing-change").returncode == 1
    assert _cli(old, str(DATA / "demorgan.qlc"), "--fail-on-routing-change").returncode == 0
    md = _cli(old, new, "--format", "markdown").stdout
    assert md.startswith("### Spec changes") and "| 🔴 break | `routing-changed` | `range_ok` |" in md
    assert "`age` = 16" in md or "`age` = 17" in md
    text = _cli(old, new, "--color", "never").stdout
    assert "routing-changed `range_ok`" in text and "witness: " in text


def test_cli_unreadable_or_broken_spec_exits_2(tmp_path) -> None:  # type: ignore[no-untyped-def]
    proc = _cli(str(tmp_path / "missing.qlc"), str(DATA / "wave1.qlc"))
    assert proc.returncode == 2 and "no such file" in proc.stderr
    broken = tmp_path / "broken.qlc"
    broken.write_text('survey s "S"\nage number 0..120 "Age?"\n')
    proc = _cli(str(DATA / "wave1.qlc"), str(broken))
    assert proc.returncode == 2 and "broken.qlc:2:" in proc.stderr and proc.stderr.count("\n") == 1


def test_every_screenout_witness_is_routed_as_claimed() -> None:
    # A tightened screen-out: each witness, run through both versions by the independent
    # router, is asked / screened out / fails the rule in exactly the version claimed.
    old, new, result = _diff("screenout")
    assert result.changes
    for change in result.changes:
        runs = {"old": Router(old, parse_witness(old, change.witness)), "new": Router(new, parse_witness(new, change.witness))}
        if change.kind == "routing-changed":
            got = {side: r.asked[change.item] for side, r in runs.items()}
        elif change.kind == "stop-changed":
            got = {side: change.item in r.fired for side, r in runs.items()}
        else:
            assert change.kind == "check-changed"
            got = {side: change.item in r.failed for side, r in runs.items()}
        other = "new" if change.asked_in == "old" else "old"
        assert got == {change.asked_in: True, other: False}, change


def test_new_option_type_change_and_unreadable_condition() -> None:
    old, new, result = _diff("edge_new", old="edge_old")
    assert _kinds(result) == [
        ("option-added", "a"), ("type-changed", "m"), ("type-changed", "n"),
        ("routing-changed", "c"), ("routing-not-compared", "d"), ("routing-changed", "e"),
    ]
    for change in (c for c in result.changes if c.kind == "routing-changed"):
        a = Router(old, parse_witness(old, change.witness, side="old")).asked[change.item]
        b = Router(new, parse_witness(new, change.witness, side="new")).asked[change.item]
        assert (a, b) == ((True, False) if change.asked_in == "old" else (False, True))
    # The skip's new reading catches the answer only the new version offers.
    assert next(c for c in result.changes if c.item == "e").witness == {"a": "maybe"}


def test_markdown_caps_rows_but_json_keeps_all() -> None:
    from logiccheck.report.diff_markdown import MAX_ROWS, diff_markdown

    head = 'survey s "S"\ncodes yesno\n  yes = 1 "Yes"\n  no = 2 "No"\nage: number 0..120 "Age?" strict\n'
    body = "".join(f'q{i}: single yesno "Q{i}?"\n' for i in range(MAX_ROWS + 20))
    old = load_text(head + body, "old.qlc").questionnaire
    new = load_text(head + 'stop young "Too young" when age < 10\n' + body, "new.qlc").questionnaire
    result = diff_questionnaires(old, new)
    assert len(result.changes) == MAX_ROWS + 21  # the stop, and every item after it
    md = diff_markdown(result)
    assert md.count("| 🔴 break |") == MAX_ROWS and "… and 21 more changes" in md
    assert len(result.to_json()["changes"]) == MAX_ROWS + 21


@pytest.mark.parametrize(
    ("old", "new", "expected"),
    [
        # A sample variable's answer recoded: the sample file's codes no longer match.
        ("wave1", "sample_recode", [("recode", "district", "`west` 3 → 4")]),
        ("wave1", "sample_added", [("sample-added", "visits", "is new"), ("option-added", "district", "`north` = 4")]),
        ("wave1", "sample_removed", [("sample-removed", "district", "was removed")]),
        (
            "wave1",
            "nonresponse",
            [
                ("recode", None, "`dk` 98 → 97"),
                ("option-reworded", None, '"Prefer not to say" is now "Would rather not say"'),
                ("option-added", None, "`na` = 96"),
            ],
        ),
        # Named lists nothing uses are compared under their own names.
        ("lists_old", "lists_new", [("recode", "spare", "`high` 2 → 3"), ("codes-added", "fresh", "is new"),
                                    ("codes-removed", "gone", "was removed")]),
    ],
)
def test_sample_variables_answer_lists_and_nonresponse_are_compared(old: str, new: str, expected: list) -> None:
    _, _, result = _diff(new, old=old)
    assert [(c.kind, c.item) for c in result.changes] == [(k, i) for k, i, _ in expected]
    for change, (_, _, words) in zip(result.changes, expected, strict=True):
        assert words in change.message
    if new == "nonresponse":
        assert all(c.details.get("list") == "nonresponse" for c in result.changes)
    # The JSON form carries the same kinds; a recode is a breaking change.
    kinds = [c["kind"] for c in result.to_json()["changes"]]
    assert kinds == [k for k, _, _ in expected]
    assert all(c.impact == "break" for c in result.changes if c.kind == "recode")


def test_a_list_an_item_uses_is_reported_with_the_item_only() -> None:
    # wave1 → recode moves codes of the `freq` list, which the item `freq` uses: one change.
    _, _, result = _diff("recode")
    assert [(c.kind, c.item, c.details.get("list")) for c in result.changes] == [("recode", "freq", "freq")]


def test_nonresponse_answers_are_linked_by_label_across_versions() -> None:
    old_text = (
        'survey s "S"\ncodes yn\n  yes = 1 "Yes"\n  no  = 2 "No"\nnonresponse\n  dk = 98 "Don\'t know"\n'
        '  refused = 99 "Refused"\nb: number 0..10 "B?"\nc: text "C?" when b >= 5\ne: text "E?" when b = 98\n'
    )
    old = load_text(old_text, "old.qlc").questionnaire

    def kinds(new_text: str) -> list[tuple[str, str | None]]:
        return _kinds(diff_questionnaires(old, load_text(new_text, "new.qlc").questionnaire))

    # `dk` recoded, the rule following it: only the recode; the rewrite is proved equal.
    assert kinds(old_text.replace("dk = 98", "dk = 97").replace("b = 98", "b = 97")) == [
        ("recode", None), ("routing-equivalent", "e")]
    # `dk` recoded but the rule still reads 98: whoever says "don't know" is no longer
    # asked `e`, and the independent router agrees with the witness.
    new_text = old_text.replace("dk = 98", "dk = 97")
    new = load_text(new_text, "new.qlc").questionnaire
    result = diff_questionnaires(old, new)
    assert _kinds(result) == [("recode", None), ("routing-changed", "e")]
    change = result.changes[1]
    a = Router(old, parse_witness(old, change.witness, side="old")).asked["e"]
    b = Router(new, parse_witness(new, change.witness, side="new")).asked["e"]
    assert (a, b) == (True, False) and change.asked_in == "old"
    # A non-response code dropped that no condition reads: no routing change.
    assert kinds(old_text.replace('  refused = 99 "Refused"\n', "")) == [("option-removed", None)]
