"""Locate and load the grammar, once per process."""

from __future__ import annotations

import functools
from importlib import resources
from pathlib import Path

from lark import Lark
from lark.indenter import Indenter

GRAMMAR_NAME = "qlc.lark"


class SpecIndenter(Indenter):
    """Python-style indentation; newlines inside parentheses and braces are ignored."""

    NL_type = "_NL"
    OPEN_PAREN_types = ["LPAR", "LBRACE"]
    CLOSE_PAREN_types = ["RPAR", "RBRACE"]
    INDENT_type = "_INDENT"
    DEDENT_type = "_DEDENT"
    tab_len = 8

    def _process(self, stream):  # type: ignore[no-untyped-def]
        # The base class asserts on an unbalanced ')'; let the parser report it instead.
        token = None
        for token in stream:
            if token.type == self.NL_type:
                yield from self.handle_NL(token)
            else:
                yield token
            if token.type in self.OPEN_PAREN_types:
                self.paren_level += 1
            elif token.type in self.CLOSE_PAREN_types and self.paren_level > 0:
                self.paren_level -= 1
        while len(self.indent_level) > 1:
            self.indent_level.pop()
            if token is None:
                break
            yield type(token).new_borrow_pos(self.DEDENT_type, "", token)


def grammar_location() -> str:
    """Where the grammar is read from: inside the installed package, else the checkout."""
    packaged = resources.files("logiccheck") / "_grammar" / GRAMMAR_NAME
    if packaged.is_file():
        return str(packaged)
    return str(Path(__file__).resolve().parents[2] / "grammar" / GRAMMAR_NAME)


def grammar_text() -> str:
    """The grammar source (see `grammar_location`)."""
    return Path(grammar_location()).read_text(encoding="utf-8")


@functools.lru_cache(maxsize=1)
def spec_parser() -> Lark:
    """The LALR parser, built once; later calls reuse it."""
    return Lark(
        grammar_text(),
        parser="lalr",
        lexer="contextual",
        strict=True,
        propagate_positions=True,
        maybe_placeholders=True,
        postlex=SpecIndenter(),
    )
