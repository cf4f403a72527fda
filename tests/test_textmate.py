"""The TextMate grammar in editors/, tokenised by the `vscode-textmate` engine (the
npm package editors use) and judged against our own lexer: every string, number,
keyword, flag, name, operator and comment of the demo specs gets the matching scope."""

from __future__ import annotations

import json
import re
import shutil
import subprocess
from pathlib import Path

import pytest

from logiccheck.syntax.grammar import spec_parser
from tests.conftest import ROOT, SPECS

EDITORS = ROOT / "editors"
GRAMMAR = EDITORS / "qlc.tmLanguage.json"
SCRIPT = EDITORS / "check" / "tokenize.mjs"
MODULES = EDITORS / "check" / "node_modules"
DEMO = [*sorted(p for p in SPECS.rglob("*.qlc") if "syntax" not in p.name), ROOT / "tests" / "server" / "planted.qlc"]

# What our lexer calls a token -> the scope the highlighter must give it.
EXPECTED = {
    "STRING": ("string.quoted.double",),
    "NUMBER": ("constant.numeric",),
    "FLAG_WORD": ("storage.modifier",),
    "NAME": ("variable.other", "entity.name", "constant.other.label"),
    "COMPARE": ("keyword.operator",),
    "EQ": ("keyword.operator",),
}
KEYWORD_SCOPES = ("keyword.", "storage.type", "support.function")


def tokenise(paths: list[Path]) -> dict[str, list[list[dict]]]:
    node = shutil.which("node")
    if node is None:
        pytest.skip("node is not installed: the TextMate grammar test needs node 18 or later")
    if not MODULES.is_dir():
        pytest.skip("the npm packages vscode-textmate and vscode-oniguruma are absent: run `npm install` in editors/check")
    ran = subprocess.run([node, str(SCRIPT), str(GRAMMAR), *map(str, paths)], capture_output=True, text=True, check=False)
    assert ran.returncode == 0, ran.stderr
    return json.loads(ran.stdout)


def scope_at(lines: list[list[dict]], line: int, column: int) -> list[str]:
    """The scopes of the character at a 1-based line and column."""
    position = 0
    for token in lines[line - 1]:
        if position <= column - 1 < position + len(token["text"]):
            return token["scopes"]
        position += len(token["text"])
    raise AssertionError(f"no token at {line}:{column}")


def test_grammar_is_valid_json_with_our_scope() -> None:
    data = json.loads(GRAMMAR.read_text(encoding="utf-8"))
    assert data["scopeName"] == "source.qlc" and "qlc" in data["fileTypes"]


def test_demo_specs_are_scoped_as_our_lexer_reads_them() -> None:
    got = tokenise(DEMO)
    parser = spec_parser()
    checked = 0
    for path in DEMO:
        text = path.read_text(encoding="utf-8")
        lines = got[str(path)]
        for token in parser.lex(text, dont_ignore=True):
            kind = token.type
            value = str(token)
            if kind in EXPECTED:
                wanted = EXPECTED[kind]
            elif value.isalpha():
                wanted = KEYWORD_SCOPES  # statement words, types, `when`, `and`, `count` ...
            else:
                continue
            scopes = scope_at(lines, token.line, token.column)
            assert any(s.startswith(w) for s in scopes for w in wanted), (path.name, token.line, value, scopes)
            checked += 1
        # Comments: every `#` outside a quoted text starts a comment.
        for number, line in enumerate(text.split("\n"), start=1):
            bare = re.sub(r'"(?:\\.|[^"\\])*"', lambda m: " " * len(m.group()), line)
            if "#" in bare:
                scopes = scope_at(lines, number, bare.index("#") + 1)
                assert any(s.startswith("comment.line") for s in scopes), (path.name, number, scopes)
        # Nothing in a valid spec is marked invalid.
        for number, tokens in enumerate(lines, start=1):
            for token in tokens:
                assert not any("invalid" in s for s in token["scopes"]), (path.name, number, token)
    assert checked > 1000


def test_pipes_suppressions_and_labels_have_their_own_scopes(tmp_path: Path) -> None:
    spec = tmp_path / "s.qlc"
    spec.write_text(
        'survey s "S"\ncodes yn\n  yes = 1 "Yes"\n'
        'n: number 0..9 "N?"\n'
        'a: text "You said {n}." when n >= 2  # lc: allow unsafe-pipe -- asked of all\n',
        encoding="utf-8",
    )
    lines = tokenise([spec])[str(spec)]
    assert "constant.other.label.qlc" in scope_at(lines, 3, 3)
    assert "variable.other.pipe.qlc" in scope_at(lines, 5, 20)
    assert "keyword.other.suppression.qlc" in scope_at(lines, 5, 41)
