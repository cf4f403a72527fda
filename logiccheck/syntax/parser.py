"""Parse spec text; every syntax error becomes a diagnostic with plain wording."""

from __future__ import annotations

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
from logiccheck.syntax.grammar import spec_parser

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

# Known mistakes, recognised by lark's match_examples, with the message to give.
_EXAMPLES: dict[str, list[str]] = {
    "a `check` needs `require COND`": [
        'check c "t" when a = 1\n',
        'check c "t"\n  when a = 1\n',
    ],
    "an item needs `NAME: TYPE \"text\"`; the colon after the name is missing": [
        'a single yesno "t"\n',
        'a number 1..2 "t"\n',
    ],
    "the question text must be in double quotes": [
        "a: single yesno t\n",
        "a: text t\n",
        "a: number 1..5 t\n",
    ],
    "a range is written LO..HI, for example 0..120": [
        'a: number 1 "t"\n',
        'a: number "t"\n',
        'a: decimal 1 "t"\n',
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
}


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
    return f"`{value}`"


def _last_line(text: str) -> tuple[int, int]:
    lines = text.split("\n")
    while len(lines) > 1 and lines[-1].strip() == "":
        lines.pop()
    return len(lines), len(lines[-1]) + 1


def _error_to_diagnostic(err: Exception, text: str, file: str) -> tuple[Diagnostic, int]:
    line, column = getattr(err, "line", -1), getattr(err, "column", -1)
    if not isinstance(line, int) or line < 1:
        line, column = _last_line(text)
    if isinstance(err, UnexpectedCharacters):
        char = text[err.pos_in_stream] if 0 <= err.pos_in_stream < len(text) else "?"
        message = f"unexpected character `{char}`"
        if err.allowed:
            message += f"; expected {_describe(set(err.allowed))}"
    elif isinstance(err, UnexpectedEOF):
        message = f"the file ends too early; expected {_describe(set(err.expected))}"
    elif isinstance(err, UnexpectedToken):
        hint = None
        try:
            hint = err.match_examples(spec_parser().parse, _EXAMPLES, use_accepts=True)
        except Exception:  # noqa: BLE001 - a hint is optional; never fail on it
            hint = None
        message = f"unexpected {_found(err.token)}; expected {_describe(set(err.expected))}"
        if hint:
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
        indent = len(raw) - len(raw.lstrip(" \t"))
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
                diag = Diagnostic(
                    check="syntax-error",
                    severity=Severity.error,
                    span=Span(file=file, line=bad, column=1, end_line=bad, end_column=1),
                    message="this line's indentation does not match any enclosing block",
                )
            else:
                diag, bad = _error_to_diagnostic(err, "\n".join(lines), file)
                if isinstance(err, UnexpectedToken) and err.token.type in ("_NL", "_DEDENT"):
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
