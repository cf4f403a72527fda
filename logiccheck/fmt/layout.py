"""Lay out spec text: indentation, spacing, aligned answer lists, blank lines.

The formatter works on tokens and lines, not on the parse tree, so every comment stays
on its line and a statement kind this module does not know is kept as written (only
re-indented). `format_text` then proves the result means the same as the input.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

INDENT = "  "
TAB_LEN = 8  # as the parser's indenter counts a tab

_TOKEN = re.compile(
    r'(?P<string>"(?:\\.|[^"\\\n])*")'
    r"|(?P<comment>#[^\n]*)"
    r"|(?P<number>[0-9]+(?:\.[0-9]+)?)"
    r"|(?P<name>[A-Za-z_][A-Za-z0-9_]*)"
    r"|(?P<op>\.\.|<=|>=|!=|[=<>+\-*/(){},:])"
    r"|(?P<space>[ \t]+)"
    r"|(?P<other>.)"
)
BINARY = frozenset({"=", "<", "<=", ">", ">=", "!=", "+", "-", "*", "/"})
FUNCTIONS = frozenset({"count", "answered", "asked"})
# Words after which a `-` is a sign, not a subtraction.
WORDS = frozenset({"when", "require", "and", "or", "not", "in", "has", "any", "all", "seconds", "number", "decimal"})
# Statement heads whose lines the formatter knows how to space.
KNOWN_HEADS = frozenset(
    {"survey", "codes", "nonresponse", "sample", "section", "grid", "let", "skip", "stop", "check", "scale"}
)
CLAUSE_WORDS = frozenset({"when", "require", "seconds", "gate", "key", "required", "strict", "shuffled", "soft"})


@dataclass
class Tok:
    kind: str
    text: str


def tokens(line: str) -> list[Tok]:
    """The tokens of one physical line, spaces dropped."""
    out = []
    for match in _TOKEN.finditer(line):
        kind = match.lastgroup or "other"
        if kind != "space":
            out.append(Tok(kind, match.group()))
    return out


def _is_value(tok: Tok) -> bool:
    if tok.kind in ("number", "string"):
        return True
    if tok.kind == "name":
        return tok.text not in WORDS
    return tok.text in (")", "}")


def join(toks: list[Tok]) -> str:
    """Tokens with canonical spacing: binary operators spaced, signs tight, brackets
    tight inside `( )` and spaced inside `{ }`, `,` and `:` followed by one space."""
    out: list[str] = []
    prev: Tok | None = None
    tight_next = False
    for tok in toks:
        text = tok.text
        if prev is None:
            space = ""
        elif tight_next or text in (",", ")", ":", "..") or prev.text == "..":
            space = ""
        elif text == "(" and prev.kind == "name" and prev.text in FUNCTIONS:
            space = ""
        elif tok.kind == "comment":
            space = "  "
        else:
            space = " "
        if text == "}" and prev is not None and prev.text == "{":
            space = ""
        out.append(space + text)
        tight_next = text == "(" or (text == "-" and (prev is None or not _is_value(prev)))
        prev = tok
    return "".join(out)


def _code_cells(toks: list[Tok]) -> tuple[str, str, str] | None:
    """(label, value, rest) of a `label = [-]N "text"` line, else None."""
    if len(toks) < 4 or toks[0].kind != "name" or toks[1].text != "=":
        return None
    i = 2
    value = ""
    if toks[i].text == "-":
        value, i = "-", i + 1
    if i >= len(toks) or toks[i].kind != "number":
        return None
    value += toks[i].text
    rest = toks[i + 1 :]
    if not rest or rest[0].kind != "string":
        return None
    return toks[0].text, value, join(rest)


def _is_row(toks: list[Tok]) -> bool:
    return len(toks) > 1 and toks[0].kind == "name" and toks[1].kind == "string" and toks[0].text not in KNOWN_HEADS


@dataclass
class Line:
    """One output line: blank, a comment alone, or (part of) a statement."""

    level: int = 0
    text: str = ""
    kind: str = "blank"  # blank | comment | code | more (a continuation inside brackets)
    head: str = ""  # first word of a statement's first line
    code: tuple[str, str, str] | None = None  # cells of an answer-list line
    row: tuple[str, str] | None = None  # cells of a grid row
    top: int = -1  # which top-level statement the line belongs to


@dataclass
class _State:
    widths: list[int] = field(default_factory=lambda: [0])
    depth: int = 0  # open brackets


def _width(indent: str) -> int:
    return indent.count(" ") + indent.count("\t") * TAB_LEN


def _level_for(widths: list[int], width: int) -> int:
    """The block a comment line sits in, from its indentation."""
    for level in range(len(widths) - 1, -1, -1):
        if width >= widths[level]:
            return level
    return 0


def scan(text: str) -> list[Line]:
    """Split text into lines with their block level (computed as the indenter does)."""
    state = _State()
    out: list[Line] = []
    top = -1
    verbatim_below: int | None = None  # level of an unknown statement's head
    pending: list[Line] = []  # comments indented deeper than the block they follow
    for raw in text.replace("\r\n", "\n").replace("\r", "\n").split("\n"):
        stripped = raw.strip(" \t")
        if not stripped:
            out.append(Line())
            continue
        indent = raw[: len(raw) - len(raw.lstrip(" \t"))]
        toks = tokens(stripped)
        if state.depth > 0:
            out.append(Line(level=len(state.widths) - 1, text=join(toks), kind="more", top=top))
        elif stripped.startswith("#"):
            line = Line(level=_level_for(state.widths, _width(indent)), text=stripped, kind="comment", top=-2)
            if out and _width(indent) > state.widths[-1]:
                pending.append(line)  # may sit above the first line of a new block
            out.append(line)
            continue
        else:
            width = _width(indent) if out else 0
            if width > state.widths[-1]:
                state.widths.append(width)
            else:
                while len(state.widths) > 1 and width < state.widths[-1]:
                    state.widths.pop()
            level = len(state.widths) - 1
            for line in pending:
                line.level = max(line.level, level)
            pending = []
            if level == 0:
                top += 1
            if verbatim_below is not None and level <= verbatim_below:
                verbatim_below = None
            head = toks[0].text if toks else ""
            unknown = (
                head not in KNOWN_HEADS
                and head not in CLAUSE_WORDS
                and not (len(toks) > 1 and toks[1].text in (":", "=") and toks[0].kind == "name")
                and not _is_row(toks)
                and not all(t.kind == "name" for t in toks)  # a scale's `ITEM [reversed]` line
            )
            if verbatim_below is None and unknown:
                verbatim_below = level
            if verbatim_below is not None:
                out.append(Line(level=level, text=stripped, kind="code", head="", top=top))
            else:
                row = (toks[0].text, join(toks[1:])) if _is_row(toks) else None
                out.append(
                    Line(level=level, text=join(toks), kind="code", head=head, top=top, code=_code_cells(toks), row=row)
                )
        for tok in toks:
            if tok.text in ("(", "{"):
                state.depth += 1
            elif tok.text in (")", "}") and state.depth > 0:
                state.depth -= 1
    return out


def _align(lines: list[Line], cells: str, render: Callable[[Any, list[int]], str]) -> None:
    """Align the columns of each run of lines that have `cells` (answer-list lines, grid
    rows) at one level; comments, blank lines and deeper clause lines may sit between."""
    i = 0
    while i < len(lines):
        if getattr(lines[i], cells) is None:
            i += 1
            continue
        level = lines[i].level
        run: list[Line] = []
        j = i
        while j < len(lines):
            line = lines[j]
            if getattr(line, cells) is not None and line.level == level:
                run.append(line)
            elif not (line.kind in ("comment", "blank") or line.level > level):
                break
            j += 1
        widths = [max(len(getattr(x, cells)[k]) for x in run) for k in range(len(getattr(run[0], cells)) - 1)]
        for line in run:
            line.text = render(getattr(line, cells), widths)
        i = j


def _render_code(cells: tuple[str, str, str], widths: list[int]) -> str:
    label, value, rest = cells
    return f"{label.ljust(widths[0])} = {value.rjust(widths[1])} {rest}"


def _render_row(cells: tuple[str, str], widths: list[int]) -> str:
    return f"{cells[0].ljust(widths[0])} {cells[1]}"


def _statement_spans(lines: list[Line]) -> dict[int, tuple[int, int]]:
    """Top-level statement number -> (first, last) line index of its code lines."""
    spans: dict[int, tuple[int, int]] = {}
    for index, line in enumerate(lines):
        if line.kind in ("code", "more") and line.top >= 0:
            first, _ = spans.get(line.top, (index, index))
            spans[line.top] = (first, index)
    return spans


def _blank_lines(lines: list[Line]) -> list[Line]:
    """One blank line around each top-level statement that spans several lines; runs of
    blank lines become one; none at the start of a block or the ends of the file."""
    spans = _statement_spans(lines)
    want_before: set[int] = set()
    want_after: set[int] = set()
    for first, last in spans.values():
        if last > first:
            start = first
            # Comments directly above a statement belong with it.
            while start > 0 and lines[start - 1].kind == "comment" and lines[start - 1].level == 0:
                start -= 1
            want_before.add(start)
            # Comments indented under its last line end the block with it.
            while last + 1 < len(lines) and lines[last + 1].kind in ("comment", "blank") and (
                lines[last + 1].kind == "blank" or lines[last + 1].level > 0
            ):
                last += 1
            while lines[last].kind == "blank":
                last -= 1
            want_after.add(last)
    out: list[Line] = []
    for index, line in enumerate(lines):
        if index in want_before and out and out[-1].kind != "blank":
            out.append(Line())
        if line.kind == "blank":
            if not out or out[-1].kind == "blank":
                continue
        out.append(line)
        if index in want_after:
            out.append(Line())
    # No blank line between a head and its block, nor at the end of the file.
    kept: list[Line] = []
    for index, line in enumerate(out):
        if line.kind == "blank":
            before = next((x for x in reversed(kept) if x.kind != "blank"), None)
            after = next((x for x in out[index + 1 :] if x.kind != "blank"), None)
            if after is None or before is None:
                continue
            if before.kind in ("code", "more") and after.level > before.level and after.kind != "more":
                continue
            if kept and kept[-1].kind == "blank":
                continue
        kept.append(line)
    return kept


def layout(text: str) -> str:
    """The formatted text (without the meaning check; see `format_text`)."""
    lines = scan(text)
    _align(lines, "code", _render_code)
    _align(lines, "row", _render_row)
    lines = _blank_lines(lines)
    rendered = []
    for line in lines:
        if line.kind == "blank":
            rendered.append("")
        elif line.kind == "more":
            rendered.append(INDENT * (line.level + 2) + line.text)
        else:
            rendered.append(INDENT * line.level + line.text)
    return "\n".join(rendered) + "\n" if rendered else ""
