"""Locate and load the grammar; build the parser once per process and keep it on disk between runs."""

from __future__ import annotations

import functools
import hashlib
import os
import sys
from importlib import resources
from pathlib import Path

import lark
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


# The options the parser is built with; part of the cache file's name.
PARSER_OPTIONS: dict[str, object] = {
    "parser": "lalr",
    "lexer": "contextual",
    "strict": True,
    "propagate_positions": True,
    "maybe_placeholders": True,
}


def cache_folder() -> Path:
    """Where the built parser is kept between runs: `LOGICCHECK_CACHE_DIR`, else the
    user's cache folder (`XDG_CACHE_HOME`, `LOCALAPPDATA` on Windows, `~/.cache`)."""
    explicit = os.environ.get("LOGICCHECK_CACHE_DIR")
    if explicit:
        return Path(explicit)
    base = os.environ.get("XDG_CACHE_HOME") or (os.environ.get("LOCALAPPDATA") if os.name == "nt" else None)
    return (Path(base) if base else Path.home() / ".cache") / "logiccheck"


def cache_file(text: str) -> Path:
    """The cache file for this grammar, lark version, Python version and options: a
    changed grammar gets a new file, so a file once written is never rewritten."""
    key = "\0".join([text, lark.__version__, repr(sys.version_info[:2]), repr(sorted(PARSER_OPTIONS.items()))])
    return cache_folder() / f"qlc-parser-{hashlib.sha256(key.encode()).hexdigest()[:20]}.lark"


def _build(text: str, cache: str | bool) -> Lark:
    return Lark(text, cache=cache, postlex=SpecIndenter(), **PARSER_OPTIONS)  # type: ignore[arg-type]


@functools.lru_cache(maxsize=1)
def spec_parser() -> Lark:
    """The LALR parser, built once per process and kept on disk between runs (lark's
    own cache); without a writable cache folder it is built each run, silently."""
    text = grammar_text()
    target = cache_file(text)
    if not target.is_file():
        try:
            target.parent.mkdir(parents=True, exist_ok=True)
        except OSError:
            return _build(text, False)
        if not os.access(target.parent, os.W_OK):
            return _build(text, False)
    # lark hashes its options (this path included) into the file and rebuilds on any
    # mismatch or unreadable file, so a half-written file from a concurrent first run
    # costs a rebuild, never a wrong parser.
    return _build(text, str(target))
