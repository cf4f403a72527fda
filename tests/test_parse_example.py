"""The normative example of the routing semantics (DEVELOPERS.md) parses clean and means what its comments say."""

from __future__ import annotations

from logiccheck.checks.runner import run_checks
from logiccheck.loader import load_file, load_text
from logiccheck.model import nodes as n


def test_example_parses_without_diagnostics(bikeshare_path) -> None:
    loaded = load_file(bikeshare_path)
    assert loaded.syntax == []
    assert loaded.questionnaire.problems == []
    errors = [d for d in run_checks(loaded, solver=False) if d.severity.value == "error"]
    assert errors == []


def test_example_structure(bikeshare_path) -> None:
    q = load_file(bikeshare_path).questionnaire
    names = [e.name for e in q.items()]
    assert names[:3] == ["age", "used", "freq"]
    assert {"dock_find", "dock_app", "dock_safe"} <= set(names)
    assert q.symbols["dock_app"].grid.name == "docks"
    assert q.entry("age").stmt.flags.strict and q.entry("age").stmt.flags.key
    assert q.entry("used").stmt.flags.gate
    # The section condition `used = yes` resolves the label to its code value.
    ctx = q.entry("freq").context
    cond = ctx[0][1]
    assert isinstance(cond, n.Compare) and isinstance(cond.right, n.Code) and cond.right.value == 1
    assert q.let_kinds["frequent"] == "bool"
    assert q.entry("district").kind == "sample"
    assert [o.value for o in q.nonresponse] == [98, 99]


def test_positions_are_one_based(bikeshare_path) -> None:
    q = load_file(bikeshare_path).questionnaire
    age = q.entry("age")
    line = q.source_line(age.span.line)
    assert line[age.span.column - 1 :].startswith("age:")


def test_several_syntax_errors_are_reported() -> None:
    text = 'survey s "t"\na single yesno "x"\nb: number 1 "y"\nc: text "ok"\n'
    loaded = load_text(text, "x.qlc")
    lines = [d.line for d in loaded.syntax]
    assert lines == [2, 3]
    assert all(d.check == "syntax-error" for d in loaded.syntax)


def test_empty_and_comment_only_files_are_errors() -> None:
    # A spec with no statements is never what was meant: it must not lint clean.
    for text in ("", "# nothing\n\n", "\r\n"):
        syntax = load_text(text, "e.qlc").syntax
        assert [(d.check, d.line, d.column) for d in syntax] == [("syntax-error", 1, 1)]
        assert "empty" in syntax[0].message
