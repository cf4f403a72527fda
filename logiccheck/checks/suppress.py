"""Suppressions written in the spec's comments, applied after every check has run.

    used: single yesno "..."   # lc: allow unsafe-pipe -- trips is always asked first
    # lc: allow always-asked -- kept explicit for the fieldwork agency
    praise: text "..." when frequent
    # lc: allow-file route-length -- screening-only pilot

A line form on a statement's first line, or alone on the line(s) above it, covers that
statement (with its indented `when`/`require` lines); on a continuation line it covers
that line; `allow-file` covers the whole file. Each names one or more checks
(comma-separated) and must give a reason after `--`. Comments are not in the parse tree,
so the source text is scanned here.
"""

from __future__ import annotations

import re
from collections.abc import Iterable
from dataclasses import dataclass, field

from logiccheck.checks.registry import all_checks, default_severity, describe, is_check
from logiccheck.diagnostics import Diagnostic, Span
from logiccheck.suggest import did_you_mean

MARK = "lc:"
_TOKEN = re.compile(r'"(?:\\.|[^"\\\n])*"|#[^\n]*')
_DIRECTIVE = re.compile(r"#\s*lc:\s*(?P<verb>[A-Za-z-]*)\s*(?P<rest>.*)$")
_NAME = re.compile(r"[a-z][a-z0-9-]*")
VERBS = ("allow", "allow-file")

describe(
    "unused-suppression",
    severity="warning",
    stage="spec",
    summary="A suppression comment suppresses nothing.",
    what="An `# lc: allow CHECK -- reason` (or `allow-file`) comment naming a check that "
    "gives no diagnostic where the comment applies.",
    why="A stale suppression hides the next real problem of that kind on that line, and "
    "its reason no longer describes the spec; remove it once the problem is fixed.",
    bad='codes yesno\n  yes = 1 "Yes"\n  no = 2 "No"\n'
    'rides: single yesno "Do you ride?"   # lc: allow unknown-code -- old label',
    good='codes yesno\n  yes = 1 "Yes"\n  no = 2 "No"\nrides: single yesno "Do you ride?"',
)
describe(
    "bad-suppression",
    severity="error",
    stage="spec",
    summary="A suppression comment is malformed: no reason, no check, or an unknown check.",
    what="An `# lc:` comment that is not `allow` or `allow-file`, names no check or a "
    "check that does not exist, gives no reason after `--`, or stands above no statement.",
    why="A suppression is a decision someone must be able to review later; without a "
    "reason, or naming a misspelled check, it either hides nothing or hides it silently.",
    bad='rides: single yesno "Do you ride?"   # lc: allow unsafe-pipe',
    good='rides: single yesno "Do you ride?"   # lc: allow unsafe-pipe -- asked of everyone',
)
UNSUPPRESSIBLE = frozenset({"unused-suppression", "bad-suppression"})


@dataclass
class Suppression:
    check: str
    span: Span  # the check's name inside the comment
    reason: str
    target_line: int | None  # None: the whole file
    used: int = 0


@dataclass
class Scan:
    suppressions: list[Suppression] = field(default_factory=list)
    problems: list[Diagnostic] = field(default_factory=list)


def _comment(line: str) -> tuple[int, str] | None:
    """The comment on a line (0-based start, text), ignoring `#` inside strings."""
    for match in _TOKEN.finditer(line):
        if match.group(0).startswith("#"):
            return match.start(), match.group(0)
    return None


def _bad(file: str, line: int, col: int, end: int, message: str) -> Diagnostic:
    return Diagnostic(
        check="bad-suppression",
        severity=default_severity("bad-suppression"),
        span=Span(file=file, line=line, column=col, end_line=line, end_column=end),
        message=message,
    )


def scan(text: str, file: str, known: Iterable[str] | None = None) -> Scan:
    """Every suppression comment in a spec's text, and the malformed ones as diagnostics."""
    names = sorted(known if known is not None else all_checks())
    lines = text.split("\n")
    out = Scan()
    pending: list[Suppression] = []  # own-line suppressions waiting for their statement
    for number, line in enumerate(lines, start=1):
        found = _comment(line)
        code_before = (line[: found[0]] if found else line).strip()
        if code_before:
            for sup in pending:
                sup.target_line = number
            pending = []
        if found is None:
            continue
        start, comment = found
        directive = _DIRECTIVE.match(comment)
        if directive is None:
            continue
        col0 = start + 1
        end0 = start + len(comment) + 1
        verb = directive.group("verb")
        if verb not in VERBS:
            tip = did_you_mean(verb, VERBS)
            out.problems.append(
                _bad(file, number, col0, end0, f"`# {MARK} {verb}` is not a suppression; write `allow` or `allow-file`{tip}")
            )
            continue
        rest = directive.group("rest")
        rest_col = start + directive.start("rest") + 1
        if "--" in rest:
            names_part, reason = rest.split("--", 1)
            reason = reason.strip()
        else:
            names_part, reason = rest, ""
        listed = [(m.group(0), rest_col + m.start()) for m in _NAME.finditer(names_part)]
        if not listed:
            out.problems.append(_bad(file, number, col0, end0, "the suppression names no check; write `allow CHECK -- reason`"))
            continue
        if not reason:
            out.problems.append(
                _bad(file, number, col0, end0, "the suppression gives no reason; add `-- why this is acceptable`")
            )
            continue
        for check, col in listed:
            if check in UNSUPPRESSIBLE or (check not in names and not is_check(check)):
                tip = did_you_mean(check, names) if check not in UNSUPPRESSIBLE else ""
                what = "cannot be suppressed" if check in UNSUPPRESSIBLE else "is not a check"
                out.problems.append(_bad(file, number, col, col + len(check), f"`{check}` {what}{tip}"))
                continue
            span = Span(file=file, line=number, column=col, end_line=number, end_column=col + len(check))
            if verb == "allow-file":
                out.suppressions.append(Suppression(check, span, reason, None))
            elif code_before:
                out.suppressions.append(Suppression(check, span, reason, number))
            else:
                sup = Suppression(check, span, reason, None)
                sup.target_line = -1  # resolved by the next line with a statement
                pending.append(sup)
                out.suppressions.append(sup)
    for sup in pending:
        out.problems.append(
            _bad(file, sup.span.line, sup.span.column, sup.span.end_column or sup.span.column,
                 f"the suppression of `{sup.check}` stands above no statement")
        )
        out.suppressions.remove(sup)
    return out


def apply_suppressions(
    diagnostics: list[Diagnostic],
    text: str,
    file: str,
    *,
    ran: Iterable[str],
    known: Iterable[str] | None = None,
    statements: dict[int, int] | None = None,
) -> list[Diagnostic]:
    """Drop suppressed diagnostics of `file`; add bad and unused suppressions.

    `ran` is the set of checks that ran: a suppression of a check that was turned off or
    skipped (`--no-solver`) cannot be judged unused. `statements` maps a statement's
    first line to its last (its `when`/`require` lines), so a line suppression covers
    the whole statement.
    """
    found = scan(text, file, known)
    last = statements or {}

    def covers(sup: Suppression, line: int) -> bool:
        if sup.target_line is None:
            return True
        return sup.target_line <= line <= last.get(sup.target_line, sup.target_line)

    ran_set = set(ran)
    kept: list[Diagnostic] = []
    for diag in diagnostics:
        hit = None
        if diag.file == file:
            # A line suppression is the more specific one, so it is used first.
            for sup in sorted(found.suppressions, key=lambda s: s.target_line is None):
                if sup.check == diag.check and covers(sup, diag.line):
                    hit = sup
                    break
        if hit is None:
            kept.append(diag)
        else:
            hit.used += 1
    for sup in found.suppressions:
        if sup.used == 0 and sup.check in ran_set:
            where = "in this file" if sup.target_line is None else f"on line {sup.target_line}"
            kept.append(
                Diagnostic(
                    check="unused-suppression",
                    severity=default_severity("unused-suppression"),
                    span=sup.span,
                    message=f"`{sup.check}` reports nothing {where}; remove this suppression",
                    item=None,
                )
            )
    kept.extend(found.problems)
    kept.sort(key=Diagnostic.sort_key)
    return kept
