"""Stage 1: spec text to a lark parse tree, with syntax errors as diagnostics."""

from logiccheck.syntax.parser import ParseResult, parse_text

__all__ = ["ParseResult", "parse_text"]
