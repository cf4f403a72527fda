"""Parse only what an edit changed: the server splits a spec into its top-level
statements and keeps the parse tree of each, keyed by its text.

A top-level statement is parsed on its own exactly as inside the whole file (the
grammar is `stmt*` at the top, and a statement ends where the next line starts in the
first column outside brackets), so joining the trees gives the whole file's tree; only
the line numbers move, and they are shifted. Any chunk that does not parse sends the
whole text through the ordinary parser, whose error recovery and messages `lint` uses.
"""

from __future__ import annotations

from lark import Token, Tree

from logiccheck.diagnostics import Diagnostic
from logiccheck.loader import Loaded, gc_paused
from logiccheck.model.build import build_spec
from logiccheck.model.resolve import resolve
from logiccheck.syntax import parse_text
from logiccheck.syntax.grammar import spec_parser
from logiccheck.syntax.parser import ParseResult


def chunks(text: str) -> list[tuple[int, int, str]] | None:
    """(first line, first character offset, text) of each top-level statement with the
    blank and comment lines after it; None where the text needs the ordinary parser."""
    if "\r" in text or text.startswith("\ufeff") or not text.endswith("\n"):
        return None
    out: list[tuple[int, int, str]] = []
    lines = text.split("\n")[:-1]
    depth = 0
    start_line, start_offset, offset = 0, 0, 0
    for number, line in enumerate(lines):
        starts = depth == 0 and line[:1] not in ("", " ", "\t", "#")
        if starts and number > start_line:
            out.append((start_line + 1, start_offset, "\n".join(lines[start_line:number]) + "\n"))
            start_line, start_offset = number, offset
        depth = _depth_after(line, depth)
        offset += len(line) + 1
    out.append((start_line + 1, start_offset, "\n".join(lines[start_line:]) + "\n"))
    return out


def _depth_after(line: str, depth: int) -> int:
    in_string = False
    i = 0
    while i < len(line):
        char = line[i]
        if in_string:
            if char == "\\":
                i += 1
            elif char == '"':
                in_string = False
        elif char == '"':
            in_string = True
        elif char == "#":
            break
        elif char in "({":
            depth += 1
        elif char in ")}" and depth > 0:
            depth -= 1
        i += 1
    return depth


def _shift(tree: Tree, lines: int, chars: int) -> None:
    """Move every position in a tree by a number of lines and characters."""
    stack = [tree]
    while stack:
        node = stack.pop()
        meta = node.meta
        if not getattr(meta, "empty", True):
            meta.line += lines
            meta.end_line += lines
            meta.start_pos += chars
            meta.end_pos += chars
        for child in node.children:
            if isinstance(child, Tree):
                stack.append(child)
            elif isinstance(child, Token):
                if child.line is not None:
                    child.line += lines
                    child.end_line = (child.end_line or child.line - lines) + lines
                if child.start_pos is not None:
                    child.start_pos += chars
                    child.end_pos = (child.end_pos or 0) + chars


class ChunkCache:
    """Parse trees of top-level statements from the last version of one document."""

    def __init__(self) -> None:
        # chunk text -> [(tree, line shift, char shift it carries now)]
        self.trees: dict[str, list[tuple[Tree, int, int]]] = {}
        self.parsed = 0  # statements parsed by the last call (for tests)

    def parse(self, text: str) -> ParseResult | None:
        pieces = chunks(text)
        if pieces is None:
            return None
        parser = spec_parser()
        kept: dict[str, list[tuple[Tree, int, int]]] = {}
        children: list[object] = []
        self.parsed = 0
        for line, offset, piece in pieces:
            shelf = self.trees.get(piece)
            if shelf:
                tree, at_line, at_char = shelf.pop()
            else:
                try:
                    tree = parser.parse(piece)
                except Exception:  # noqa: BLE001 - the ordinary parser reports it
                    return None
                at_line, at_char = 0, 0
                self.parsed += 1
            if (at_line, at_char) != (line - 1, offset):
                _shift(tree, line - 1 - at_line, offset - at_char)
            kept.setdefault(piece, []).append((tree, line - 1, offset))
            children.extend(tree.children)
        self.trees = kept
        return ParseResult(Tree("start", children), [], text)


def load_incremental(cache: ChunkCache, text: str, file: str) -> Loaded:
    """As `loader.load_text`, re-parsing only the statements that changed."""
    with gc_paused():
        parsed = cache.parse(text)
        if parsed is None:
            parsed = parse_text(text, file)
        spec, built = build_spec(parsed.tree, file)
        questionnaire = resolve(spec, parsed.text)
    return Loaded(questionnaire, sorted(parsed.diagnostics + built, key=Diagnostic.sort_key))
