"""Suppression comments: what they cover, and what is reported about them."""

from __future__ import annotations

from logiccheck.checks.runner import run_checks
from logiccheck.checks.suppress import scan
from logiccheck.loader import load_text

HEAD = 'survey s "S"\n\ncodes yesno\n  yes = 1 "Yes"\n  no = 2 "No"\n\n'


def _checks(text: str, **kw) -> list[tuple[str, int]]:
    # Static checks only unless a test asks for the solver: routing notes on the
    # statements a static error breaks are not what these tests are about.
    kw.setdefault("solver", False)
    return [(d.check, d.line) for d in run_checks(load_text(HEAD + text, "s.qlc"), **kw)]


def test_line_above_and_same_line() -> None:
    text = (
        'a: single yesno "A?"\n'
        "# lc: allow unknown-code -- planned label\n"
        "\n"
        'b: text "B?" when a = maybe\n'
        'c: text "C?" when a = perhaps   # lc: allow unknown-code -- planned label\n'
        'd: text "D?" when a = sometimes\n'
    )
    assert _checks(text) == [("unknown-code", 12)]


def test_file_form_and_several_checks() -> None:
    text = (
        "# lc: allow-file unknown-code, unknown-name -- merged wave file\n"
        'a: single yesno "A?"\n'
        'b: text "B?" when a = maybe or zz = 1\n'
    )
    assert _checks(text) == []


def test_unused_not_reported_for_a_check_that_did_not_run() -> None:
    text = 'a: single yesno "A?"   # lc: allow unknown-code -- planned\n'
    assert _checks(text) == [("unused-suppression", 7)]
    assert _checks(text, disable=["unknown-code"]) == []


def test_hash_inside_a_string_is_not_a_comment() -> None:
    found = scan(HEAD + 'a: text "# lc: allow unknown-code -- no"\n', "s.qlc")
    assert found.suppressions == [] and found.problems == []


def test_suppressions_cannot_hide_themselves() -> None:
    text = 'a: single yesno "A?"   # lc: allow bad-suppression -- no\n'
    assert _checks(text) == [("bad-suppression", 7)]


def test_covers_the_statement_with_its_clauses_only() -> None:
    text = (
        'a: single yesno "A?"\n'
        "# lc: allow unknown-code -- the rule is finished in wave 2\n"
        'check c1 "C"\n'
        "  when a = yes\n"
        "  require a = maybe\n"
        'check c2 "C"\n'
        "  require a = perhaps\n"
    )
    assert _checks(text) == [("unknown-code", 13)]
