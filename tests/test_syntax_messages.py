"""Syntax errors for the common mistakes read well and point at the right place."""

from __future__ import annotations

import pytest

from logiccheck.loader import load_text

HEAD = 'survey s "t"\ncodes yesno\n  yes = 1 "Yes"\n  no = 2 "No"\n'  # 4 lines
SECTION = 'section part "Part"\n'

# (name, body after HEAD, line, column, words the message must contain)
CASES = [
    ("missing colon", 'a single yesno "Q?"\n', 5, 3, "add the colon after the name"),
    ("missing colon in a section", SECTION + '  a single yesno "Q?"\n', 6, 5, "add the colon"),
    ("text not quoted", 'a: single yesno Q?"\n', 5, 17, "in double quotes"),
    ("no closing quote", 'a: single yesno "Q?\n', 5, 17, "no closing quote"),
    ("text missing", "a: single yesno\n", 5, 16, "question text is missing"),
    ("range missing", 'a: number "How many?"\n', 5, 11, "LO..HI"),
    ("range half", 'a: number 0.. "How many?"\n', 5, 15, "LO..HI"),
    ("range missing in a section", SECTION + '  a: decimal "Weight?"\n', 6, 14, "LO..HI"),
    ("unknown type word", 'a: singel yesno "Q?"\n', 5, 4, "did you mean `single`"),
    ("another type word", 'a: integer 0..5 "Q?"\n', 5, 4, "did you mean `number`"),
    ("codes missing", 'a: single "Q?"\n', 5, 11, "codes name or an inline list"),
    ("bad indentation", SECTION + '    a: text "A"\n  b: text "B"\n', 7, 3, "indentation"),
    ("statement indented under an item", 'a: text "A"\n   b: text "B"\n', 6, 4, "only clauses"),
    ("unclosed parenthesis", 'a: single yesno "A"\nb: text "B" when (a = yes\nc: text "C"\n', 6, 18, "never closed"),
    ("unclosed parenthesis at end of file", 'a: single yesno "A"\nb: text "B" when (a = yes\n', 6, 18, "never closed"),
    ("unclosed brace", 'a: single { x = 1 "X" "A"\n', 5, 11, "`{` is never closed"),
    ("stray parenthesis", 'a: single yesno "A"\nb: text "B" when a = yes)\n', 6, 25, "closes nothing"),
    ("check without require", 'a: single yesno "A"\ncheck c "t" when a = yes\n', 6, 7, "needs `require"),
    ("check without require, clause lines", 'a: single yesno "A"\ncheck c "t"\n  when a = yes\n', 6, 7, "needs `require"),
    ("code line without value", "codes z\n  a = 1\n", 6, 8, "label = NUMBER"),
    ("code line without =", 'codes z\n  a 1 "A"\n', 6, 5, "label = NUMBER"),
    ("skip without to", 'a: text "A"\nskip a when a = yes\n', 6, 6, "skip to NAME"),
    ("double equals", 'a: single yesno "A"\nb: text "B" when a == yes\n', 6, 21, "single `=`"),
]


@pytest.mark.parametrize(("name", "body", "line", "column", "words"), CASES, ids=[c[0] for c in CASES])
def test_common_mistake(name: str, body: str, line: int, column: int, words: str) -> None:
    diags = load_text(HEAD + body, "x.qlc").syntax
    assert diags, f"{name}: no syntax error reported"
    first = diags[0]
    assert first.check == "syntax-error"
    assert (first.line, first.column) == (line, column), first.message
    assert words in first.message
    # Plain words, not the parser's token names.
    for token_name in ("_NL", "_INDENT", "_DEDENT", "$END", "__ANON", "RPAR", "STRING"):
        assert token_name not in first.message


def test_unexpected_end_of_file_maps_to_the_end_of_the_file() -> None:
    text = HEAD + "let x = (1 +"  # no newline, cut mid-expression
    diags = load_text(text, "x.qlc").syntax
    assert diags
    # The `(` is reported where it stands; without a bracket, the end of the file.
    assert (diags[0].line, diags[0].column) == (5, 9)
    cut = HEAD + "let x = 1 +"
    diags = load_text(cut, "x.qlc").syntax
    last_line = cut.split("\n")[-1]
    assert (diags[0].line, diags[0].column) == (5, len(last_line) + 1)


def test_recovery_continues_after_an_unclosed_parenthesis() -> None:
    text = HEAD + 'a: single yesno "A"\nb: text "B" when (a = yes\nc: text "C"\nd text "D"\n'
    diags = load_text(text, "x.qlc").syntax
    assert [(d.line, d.column) for d in diags] == [(6, 18), (8, 3)]
