"""Edge cases of the static checks beyond their fixtures."""

from __future__ import annotations

from logiccheck.checks.runner import run_checks
from logiccheck.loader import load_text

HEAD = 'survey s "t"\ncodes yesno\n  yes = 1 "Yes"\n  no = 2 "No"\nnonresponse\n  dk = 98 "Don\'t know"\n'  # 6 lines


def found(body: str, check: str) -> list[tuple[int, int]]:
    return [(d.line, d.column) for d in run_checks(load_text(HEAD + body, "x.qlc"), solver=False) if d.check == check]


def test_samples_may_be_read_anywhere_but_a_check_is_judged_where_it_stands() -> None:
    body = (
        'a: text "A" when region = north\n'
        "check late \"b is known\" when a_known require b = yes\n"
        'let a_known = answered(a)\n'
        'b: single yesno "B"\n'
        'sample region single { north = 1 "N", south = 2 "S" }\n'
    )
    # The check reads `a_known` and `b` before they exist: both stages would find it
    # never applies, so lint says where the rule must move.
    assert found(body, "forward-reference") == [(8, 30), (8, 46)]
    moved = body.replace("check late \"b is known\" when a_known require b = yes\n", "") + (
        "check late \"b is known\" when a_known require b = yes\n"
    )
    assert found(moved, "forward-reference") == []


def test_asked_and_answered_of_a_later_item_are_forward() -> None:
    assert found('a: text "A" when answered(b)\nb: text "B"\n', "forward-reference") == [(7, 27)]


def test_grid_condition_reading_its_own_row_is_reported_once() -> None:
    body = 'grid g single yesno "Agree?" when r2 = yes\n  r1 "One"\n  r2 "Two"\n  r3 "Three"\n'
    assert found(body, "forward-reference") == [(7, 35)]


def test_skip_to_a_later_section_is_fine_and_to_an_enclosing_one_is_not() -> None:
    body = (
        'section one "One"\n  a: single yesno "A"\n  skip to two when a = no\n  b: text "B"\n'
        'section two "Two"\n  c: single yesno "C"\n  skip to two when c = no\n  d: text "D"\n'
    )
    assert found(body, "backward-skip") == [(13, 11)]


def test_code_collision_skips_strict_items_and_reports_a_shared_list_once() -> None:
    body = (
        'codes many\n  low = 1 "Low"\n  odd = 98 "Odd"\n'
        'p: single many "P?" strict\nq: single many "Q?"\nr: single many "R?"\n'
        'grid g number 0..100 "How many?" strict\n  g1 "One"\n  g2 "Two"\n'
    )
    got = run_checks(load_text(HEAD + body, "x.qlc"), solver=False)
    collisions = [d for d in got if d.check == "code-collision"]
    assert [(d.line, d.column) for d in collisions] == [(9, 3)]
    assert "`q`, `r`" in collisions[0].message


def test_shuffled_section_nested_block_reading_a_sibling() -> None:
    body = (
        'section outer "Outer" shuffled\n  a: single yesno "A"\n'
        '  section inner "Inner" when a = yes\n    b: text "B"\n'
    )
    assert found(body, "shuffled-dependency") == [(9, 30)]


def test_shuffled_block_condition_itself_is_not_a_sibling_read() -> None:
    body = 'a: single yesno "A"\nsection outer "Outer" when a = yes shuffled\n  b: text "B"\n  c: text "C"\n'
    assert found(body, "shuffled-dependency") == []


def test_broken_statements_do_not_stop_later_checks() -> None:
    body = 'a: single nolist "A"\nb: text "B" when a = yes and c = 1\nlet x = y + 1\nlet y = x\n'
    got = run_checks(load_text(HEAD + body, "x.qlc"), solver=False)
    checks = {d.check for d in got}
    assert "internal-error" not in checks
    assert {"unknown-name", "circular-definition"} <= checks
