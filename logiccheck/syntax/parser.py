"""Parse spec text; every syntax error becomes a diagnostic with plain wording."""

from __future__ import annotations

import functools
from dataclasses import dataclass, field

from lark import Tree
from lark.exceptions import (
    UnexpectedCharacters,
    UnexpectedEOF,
    UnexpectedInput,
    UnexpectedToken,
)
from lark.indenter import DedentError

from logiccheck.diagnostics import Diagnostic, Severity, Span
from logiccheck.suggest import did_you_mean
from logiccheck.syntax.grammar import SpecIndenter, spec_parser

MAX_ERRORS = 20

# Plain words for terminals; keywords are shown as themselves in backticks.
_WORDS = {
    "NAME": "a name",
    "STRING": 'a quoted text ("...")',
    "NUMBER": "a number",
    "_NL": "the end of the line",
    "_INDENT": "an indented line",
    "_DEDENT": "the end of the indented block",
    "$END": "the end of the file",
    "FLAG_WORD": "a flag (gate, key, required, strict, shuffled, soft)",
    "MIN_WORD": "`min`",
    "SCORE_WORD": "`score`",
    "TOP_WORD": "`top`",
    "REVERSED": "`reversed`",
    "COMPARE": "a comparison (<, <=, >, >=, !=)",
    "EQ": "`=`",
    "MINUS": "`-`",
    "PLUS": "`+`",
    "STAR": "`*`",
    "SLASH": "`/`",
    "LPAR": "`(`",
    "RPAR": "`)`",
    "LBRACE": "`{`",
    "RBRACE": "`}`",
    "COMMA": "`,`",
    "COLON": "`:`",
    "DOT": "`.`",
    "__ANON_0": "`number`",
}

# Known mistakes with the message to give. An error is matched to an example by the
# parser state it stops in (and the kind of token found there), whatever the nesting:
# lark's own `match_examples` also compares the depth of the parse stack, so an example
# written at the top level would never match the same mistake inside a section.
_EXAMPLES: dict[str, list[str]] = {
    "an item is written `NAME: TYPE \"text\"`; add the colon after the name": [
        'a single yesno "t"\n',
        'a number 1..2 "t"\n',
        'a text "t"\n',
        'a multi x "t"\n',
        'a note "t"\n',
        'a decimal 0..1 "t"\n',
        'a "t"\n',
    ],
    "the question text must be in double quotes": [
        "a: single yesno t\n",
        "a: text t\n",
        "a: number 1..5 t\n",
    ],
    "the question text is missing: write it in double quotes after the type": [
        "a: single yesno\n",
        "a: text\n",
        "a: number 1..2\n",
    ],
    "a range is written LO..HI, for example 0..120": [
        'a: number 1 "t"\n',
        'a: number "t"\n',
        'a: decimal 1 "t"\n',
        'a: decimal "t"\n',
        'a: decimal 0.. "t"\n',
        'a: number 0.. "t"\n',
        'a: number 0..\n',
    ],
    "`single` and `multi` need a codes name or an inline list { label = 1 \"text\", ... }": [
        'a: single "t"\n',
        'a: multi "t"\n',
    ],
    "a code line is `label = NUMBER \"text\"`": [
        "codes c\n  yes = 1\n",
        'codes c\n  yes 1 "Yes"\n',
        'codes c\n  yes = "Yes"\n',
    ],
    "a skip is written `skip to NAME when COND`": [
        "skip a when b = 1\n",
    ],
    "compare with a single `=`": [
        'a: text "t" when b == 1\n',
    ],
    "only clauses (`when ...`, `require ...`, flags) may be indented under a statement; "
    "start the next statement at the same indentation as this one": [
        'a: text "t"\n  b: text "u"\n',
        'stop s "t"\n  b: text "u"\n',
    ],
}

TYPE_WORDS = ("single", "multi", "number", "decimal", "text", "note")
# Words people reach for when they mean one of ours.
_TYPE_SYNONYMS = {"integer": "number", "int": "number", "float": "decimal", "real": "decimal", "string": "text"}


@functools.lru_cache(maxsize=1)
def _example_states() -> tuple[dict[tuple[int, str], str], dict[int, str]]:
    """(parser state, token type) -> hint, and parser state -> hint, from the examples."""
    exact: dict[tuple[int, str], str] = {}
    by_state: dict[int, str] = {}
    parser = spec_parser()
    for label, examples in _EXAMPLES.items():
        for example in examples:
            try:
                parser.parse(example)
            except UnexpectedToken as err:
                position = err.state.position if err.state is not None else -1
                exact.setdefault((position, err.token.type), label)
                by_state.setdefault(position, label)
            except Exception:  # noqa: BLE001 - an example that fails otherwise gives no hint
                continue
    return exact, by_state


def _hint(err: UnexpectedToken) -> str | None:
    if err.state is None:
        return None
    exact, by_state = _example_states()
    position = err.state.position
    return exact.get((position, err.token.type)) or by_state.get(position)


def _type_word_hint(err: UnexpectedToken) -> str | None:
    """`a: singel yesno` -> name the answer types, with a did-you-mean."""
    words = {_describe({name}).strip("`") for name in err.expected}
    if err.token.type != "NAME" or not {"single", "multi", "text"} <= words:
        return None
    word = str(err.token)
    guess = f"; did you mean `{_TYPE_SYNONYMS[word]}`?" if word in _TYPE_SYNONYMS else did_you_mean(word, TYPE_WORDS)
    return f"`{err.token}` is not an answer type{guess} (the types are {', '.join(TYPE_WORDS)})"


def unclosed_bracket(text: str, end: int) -> tuple[int, str] | None:
    """Offset and character of the last `(` or `{` opened before `end` and not closed
    (brackets inside quoted texts and comments do not count)."""
    stack: list[tuple[int, str]] = []
    i, in_string = 0, False
    while i < min(end, len(text)):
        ch = text[i]
        if in_string:
            if ch == "\\":
                i += 1
            elif ch == '"' or ch == "\n":
                in_string = False
        elif ch == '"':
            in_string = True
        elif ch == "#":
            while i < len(text) and text[i] != "\n":
                i += 1
            continue
        elif ch in "({":
            stack.append((i, ch))
        elif ch in ")}" and stack and "({"[")}".index(ch)] == stack[-1][1]:
            stack.pop()
        i += 1
    return stack[-1] if stack else None


def _line_col(text: str, offset: int) -> tuple[int, int]:
    line = text.count("\n", 0, offset) + 1
    return line, offset - (text.rfind("\n", 0, offset) + 1) + 1


@dataclass
class ParseResult:
    """The tree (None if nothing could be parsed) and the syntax diagnostics."""

    tree: Tree | None
    diagnostics: list[Diagnostic] = field(default_factory=list)
    text: str = ""


def _describe(expected: set[str]) -> str:
    parser = spec_parser()
    words: list[str] = []
    by_name = {t.name: t for t in parser.terminals}
    for name in sorted(expected):
        if name in _WORDS:
            words.append(_WORDS[name])
            continue
        term = by_name.get(name)
        if term is not None and term.pattern.type == "str":
            words.append(f"`{term.pattern.value}`")
        else:
            words.append(name.lower())
    first = ("`)`", "`}`", "`require`", "the end of the line")
    words = sorted(set(words), key=lambda w: (w not in first, w))
    if len(words) > 6:
        words = [*words[:6], "…"]
    if not words:
        return "something else"
    if len(words) == 1:
        return words[0]
    return ", ".join(words[:-1]) + " or " + words[-1]


def _found(token: object) -> str:
    kind = getattr(token, "type", "")
    value = str(token)
    if kind == "_NL":
        return "the end of the line"
    if kind == "_INDENT":
        return "an indented line"
    if kind == "_DEDENT":
        return "a line that is indented less"
    if kind == "$END" or value == "":
        return "the end of the file"
    if len(value) > 24:
        value = value[:20] + "…" + value[-1]
    return f"`{value}`"


def _last_line(text: str) -> tuple[int, int]:
    lines = text.split("\n")
    while len(lines) > 1 and lines[-1].strip() == "":
        lines.pop()
    return len(lines), len(lines[-1]) + 1


def _error_to_diagnostic(err: Exception, text: str, file: str) -> tuple[Diagnostic, int]:
    line, column = getattr(err, "line", -1), getattr(err, "column", -1)
    token = getattr(err, "token", None)
    at_end = isinstance(err, UnexpectedEOF) or getattr(token, "type", "") == "$END"
    if token is not None and getattr(token, "type", "") == "_INDENT" and getattr(token, "end_line", None):
        # The indent token borrows the position of the line break before it; the
        # mistake is the indented line itself, at its first character.
        line, column = token.end_line, token.end_column
    if not isinstance(line, int) or line < 1 or at_end:
        # The end of the input has no position of its own: it is the end of the file.
        line, column = _last_line(text)
    expected = set(getattr(err, "expected", None) or getattr(err, "allowed", None) or ())
    offset = len(text) if at_end else getattr(err, "pos_in_stream", None)
    if not isinstance(offset, int) or offset < 0:
        offset = len(text)
    opened = unclosed_bracket(text, offset) if ("RPAR" in expected or "RBRACE" in expected or at_end) else None
    if opened is not None:
        pos, ch = opened
        line, column = _line_col(text, pos)
        close = ")" if ch == "(" else "}"
        message = f"this `{ch}` is never closed; add `{close}` before the end of the statement"
    elif isinstance(err, UnexpectedCharacters):
        # `offset` is the character's position here (lark's `pos_in_stream`, which its
        # type information leaves as None).
        char = text[offset] if 0 <= offset < len(text) else "?"
        rest = text[offset + 1 :].split("\n", 1)[0]
        if char == '"' and '"' not in rest:
            message = 'this text has no closing quote; end it with `"` on the same line'
        elif "STRING" in expected and (char.isalnum() or char in "?_"):
            message = 'the question text must be in double quotes: "..."'
        else:
            message = f"unexpected character `{char}`"
            if err.allowed:
                message += f"; expected {_describe(set(err.allowed))}"
    elif isinstance(err, UnexpectedEOF):
        message = f"the file ends too early; expected {_describe(set(err.expected))}"
    elif isinstance(err, UnexpectedToken) and err.token.type in ("RPAR", "RBRACE"):
        message = f"this `{err.token}` closes nothing; remove it, or add the opening bracket"
    elif isinstance(err, UnexpectedToken):
        message = f"unexpected {_found(err.token)}; expected {_describe(set(err.expected))}"
        type_hint = _type_word_hint(err)
        hint = None if type_hint else _hint(err)
        if type_hint:
            message = type_hint
        elif hint:
            message = f"{hint} ({message})"
    elif isinstance(err, DedentError):
        message = "this line's indentation does not match any enclosing block"
    else:
        message = str(err).splitlines()[0] if str(err) else "cannot parse this line"
    span = Span(file=file, line=line, column=max(column, 1), end_line=line, end_column=max(column, 1))
    return Diagnostic(check="syntax-error", severity=Severity.error, span=span, message=message), line


def _dedent_line(text: str, err: DedentError) -> int:
    """DedentError carries no position: find the first line whose indent fits no block."""
    stack = [0]
    depth = 0
    for number, raw in enumerate(text.split("\n"), start=1):
        stripped = raw.strip()
        depth += raw.count("(") + raw.count("{") - raw.count(")") - raw.count("}")
        if not stripped or stripped.startswith("#"):
            continue
        lead = raw[: len(raw) - len(raw.lstrip(" \t"))]
        indent = lead.count(" ") + lead.count("\t") * SpecIndenter.tab_len  # as the indenter counts
        if indent > stack[-1]:
            stack.append(indent)
        else:
            while indent < stack[-1]:
                stack.pop()
            if indent != stack[-1]:
                return number
    return 1


def _blank_statement(lines: list[str], line: int) -> None:
    """Blank the erroneous line and the lines indented under it, keeping positions."""
    index = min(max(line - 1, 0), len(lines) - 1)
    raw = lines[index]
    indent = len(raw) - len(raw.lstrip(" \t"))
    lines[index] = ""
    j = index + 1
    while j < len(lines):
        nxt = lines[j]
        if nxt.strip() and (len(nxt) - len(nxt.lstrip(" \t"))) <= indent:
            break
        lines[j] = ""
        j += 1


def parse_text(text: str, file: str = "<spec>") -> ParseResult:
    """Parse a spec. Keeps going after an error by blanking the bad statement."""
    if text.startswith("\ufeff"):
        text = text[1:]
    # Old Mac (CR only) and mixed line endings read as lines, not one long line.
    text = text.replace("\r\n", "\n").replace("\r", "\n")
    if all(not ln.strip() or ln.strip().startswith("#") for ln in text.split("\n")):
        empty = Diagnostic(
            check="syntax-error",
            severity=Severity.error,
            span=Span(file=file, line=1, column=1, end_line=1, end_column=1),
            message="the spec is empty: it holds no statements; write at least the survey line and one item",
        )
        return ParseResult(None, [empty], text)
    work = text if text.endswith("\n") else text + "\n"
    lines = work.split("\n")
    diagnostics: list[Diagnostic] = []
    parser = spec_parser()
    seen: set[int] = set()
    for _ in range(MAX_ERRORS):
        try:
            tree = parser.parse("\n".join(lines))
            diagnostics.sort(key=Diagnostic.sort_key)
            return ParseResult(tree, diagnostics, text)
        except (UnexpectedInput, DedentError) as err:
            if isinstance(err, DedentError):
                bad = _dedent_line("\n".join(lines), err)
                raw = lines[bad - 1] if 0 < bad <= len(lines) else ""
                col = len(raw) - len(raw.lstrip(" \t")) + 1
                diag = Diagnostic(
                    check="syntax-error",
                    severity=Severity.error,
                    span=Span(file=file, line=bad, column=col, end_line=bad, end_column=col),
                    message="this line's indentation does not match any enclosing block",
                )
            else:
                diag, bad = _error_to_diagnostic(err, "\n".join(lines), file)
                if isinstance(err, UnexpectedToken) and err.token.type in ("_NL", "_DEDENT", "_INDENT"):
                    # A newline or dedent token belongs to the line it ends.
                    bad = diag.span.line
            if bad in seen:
                break
            seen.add(bad)
            diagnostics.append(diag)
            if all(not ln.strip() for ln in lines):
                break
            _blank_statement(lines, bad)
        except Exception as err:  # noqa: BLE001 - any parser failure is reported, never raised
            line, column = _last_line(text)
            diagnostics.append(
                Diagnostic(
                    check="syntax-error",
                    severity=Severity.error,
                    span=Span(file=file, line=line, column=column),
                    message=f"cannot parse this file ({type(err).__name__})",
                )
            )
            break
    diagnostics.sort(key=Diagnostic.sort_key)
    return ParseResult(None, diagnostics, text)
