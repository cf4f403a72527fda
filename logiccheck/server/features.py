"""What the editor asks about a spec, answered from one `Document`: diagnostics, hover,
definitions, references, completion, outline, rename and quick fixes. Plain functions
over lsprotocol types, so they are tested and timed without a client."""

from __future__ import annotations

import re
from typing import Any

from lsprotocol import types as lsp

from logiccheck.checks.registry import all_checks
from logiccheck.checks.suppress import UNSUPPRESSIBLE
from logiccheck.diagnostics import Diagnostic, Severity, Span
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire
from logiccheck.report.graph_data import span_text
from logiccheck.server.document import Document
from logiccheck.server.index import Key

SOURCE = "logiccheck"
NAME = re.compile(r"[a-z_][a-z0-9_]*")
STATEMENT_WORDS = ("survey", "codes", "nonresponse", "sample", "section", "grid", "let", "skip to", "stop", "check")
CLAUSE_WORDS = ("when", "require", "seconds")
FLAGS = ("gate", "key", "required", "strict", "shuffled", "soft")
TYPE_WORDS = ("single", "multi", "number", "decimal", "text", "note")
OPERATOR_WORDS = ("and", "or", "not", "in", "has", "any", "all", "count", "answered", "asked")
RESERVED = frozenset(
    "survey codes nonresponse sample section grid let skip stop check when require seconds "
    "gate key required strict shuffled soft".split()
)
_SEVERITY = {
    Severity.error: lsp.DiagnosticSeverity.Error,
    Severity.warning: lsp.DiagnosticSeverity.Warning,
    Severity.info: lsp.DiagnosticSeverity.Information,
}
# Where code labels are wanted: `name =`, `name !=`, `name in (a, `, `name has`, `has any (`.
_LABEL_CONTEXT = re.compile(
    r"([a-z_][a-z0-9_]*)\s*(?:!?=|in\s*\((?:[^()]*,)?|has(?:\s+(?:any|all)\s*\((?:[^()]*,)?)?)\s*[a-z0-9_]*$"
)


# ---------------------------------------------------------------- positions
def _line(text_lines: list[str], line: int) -> str:
    return text_lines[line - 1] if 1 <= line <= len(text_lines) else ""


def to_position(text_lines: list[str], line: int, column: int) -> lsp.Position:
    """1-based line and character column → LSP position (0-based, UTF-16 units)."""
    prefix = _line(text_lines, line)[: max(column - 1, 0)]
    return lsp.Position(line=max(line - 1, 0), character=len(prefix.encode("utf-16-le")) // 2)


def from_position(text_lines: list[str], pos: lsp.Position) -> tuple[int, int]:
    """LSP position → 1-based line and character column."""
    line = _line(text_lines, pos.line + 1)
    units = 0
    for i, char in enumerate(line):
        if units >= pos.character:
            return pos.line + 1, i + 1
        units += 2 if ord(char) > 0xFFFF else 1
    return pos.line + 1, len(line) + 1


def to_range(text_lines: list[str], span: Span) -> lsp.Range:
    start = to_position(text_lines, span.line, span.column)
    if span.end_line is not None and span.end_column is not None:
        end = to_position(text_lines, span.end_line, span.end_column)
    else:
        # A point: cover the word (or the character) it starts.
        rest = _line(text_lines, span.line)[span.column - 1 :]
        word = re.match(r"[A-Za-z0-9_]+|\S", rest)
        end = to_position(text_lines, span.line, span.column + (len(word.group()) if word else 0))
    if (end.line, end.character) < (start.line, start.character):
        end = start
    return lsp.Range(start=start, end=end)


def location(doc: Document, span: Span) -> lsp.Location:
    return lsp.Location(uri=doc.uri, range=to_range(doc.text.split("\n"), span))


# ---------------------------------------------------------------- diagnostics
def witness_words(witness: dict[str, str] | None) -> str:
    return ", ".join(f"{k} = {v}" for k, v in (witness or {}).items())


def to_lsp_diagnostic(doc: Document, diag: Diagnostic, lines: list[str]) -> lsp.Diagnostic:
    """One diagnostic: `code` is the check, the witness is in the message, and `data`
    holds the record exactly as `lint --format json` writes it."""
    message = diag.message
    if diag.witness:
        message += f"\nwitness: {witness_words(diag.witness)}"
    for note in diag.notes:
        message += f"\nnote: {note}"
    related = [
        lsp.DiagnosticRelatedInformation(location=lsp.Location(uri=doc.uri, range=to_range(lines, r.span)), message=r.message)
        for r in diag.related
        if r.span.file == diag.span.file
    ]
    return lsp.Diagnostic(
        range=to_range(lines, diag.span),
        message=message,
        severity=_SEVERITY[diag.severity],
        code=diag.check,
        source=SOURCE,
        related_information=related or None,
        data=diag.to_json(),
    )


def lsp_diagnostics(doc: Document, found: list[Diagnostic]) -> list[lsp.Diagnostic]:
    lines = doc.text.split("\n")
    return [to_lsp_diagnostic(doc, d, lines) for d in found if d.span.file == doc.path]


# ---------------------------------------------------------------- hover
def _num(x: float | None) -> str:
    return "?" if x is None else (str(int(x)) if float(x).is_integer() else str(x))


def _answers(q: Questionnaire, stmt: Any) -> list[str]:
    spec = stmt.type
    out = []
    codes = q.item_codes(stmt)
    if codes is not None:
        where = f"list `{codes.name}`" if codes.name else "its own list"
        out.append(f"Answers ({where}): " + ", ".join(f'`{o.label}` = {o.value} "{o.text}"' for o in codes.options))
    elif spec.kind in ("number", "decimal"):
        out.append(f"Answers: {spec.kind} {_num(spec.lo)}..{_num(spec.hi)}")
    if q.allows_nonresponse(stmt) and q.nonresponse:
        out.append("Non-response codes: " + ", ".join(f"`{o.label}` = {o.value}" for o in q.nonresponse))
    elif spec.kind in ("single", "number", "decimal") and isinstance(stmt, n.Item) and stmt.flags.strict:
        out.append("`strict`: non-response codes are not valid")
    return out


def route_words(q: Questionnaire, entry: Entry) -> str:
    """The whole condition of a statement in plain words: section ∧ grid ∧ own ∧ skips ∧
    stops."""
    parts = []
    for owner, expr in entry.context:
        if expr is not None:
            word = "grid" if isinstance(owner, n.Grid) else "section"
            parts.append(f"{word} `{owner.name}`: {span_text(q.text, expr.span)}")
    if entry.kind != "let" and entry.own is not None:
        parts.append(f"own: {span_text(q.text, entry.own.span)}")
    stops, skips = q.guards(entry)
    for skip in skips:
        cond = span_text(q.text, skip.own.span) if skip.own is not None else "always"
        parts.append(f"not skipped by `skip to {skip.name}` (line {skip.stmt.span.line}) when {cond}")
    for stop in stops:
        cond = span_text(q.text, stop.own.span) if stop.own is not None else "always"
        parts.append(f"not screened out by `stop {stop.name}` (line {stop.stmt.span.line}) when {cond}")
    return " ∧ ".join(parts) if parts else "always (no condition, skip or stop applies)"


def reach_words(doc: Document, entry: Entry) -> str:
    if doc.full is None:
        return "Reachable: being checked (the routing checks run after a short pause)"
    if doc.reach is None:
        return "Reachable: not checked (the routing checks are turned off)"
    reach = doc.reach.get(entry.index)
    if reach is None or reach.possible is None:
        return "Reachable: not judged (fix the errors in its conditions first)"
    if not reach.possible:
        return "Reachable: **no** — no respondent can be asked this (see `unreachable-item`)"
    example = witness_words(reach.witness)
    return "Reachable: yes" + (f" — for example {example}" if example else "")


def _entry_hover(doc: Document, entry: Entry) -> list[str]:
    q = doc.q
    stmt = entry.stmt
    if entry.kind == "let":
        return [
            f"**`{entry.name}`** — derived value (line {stmt.span.line})",
            f"`{entry.name} = {span_text(q.text, stmt.expr.span)}`",
            f"Computed where it stands; needs: {route_words(q, entry)}",
        ]
    if entry.kind == "sample":
        return [f"**`{entry.name}`** — sample variable: always known, never asked", *_answers(q, stmt)]
    what = f"grid `{stmt.grid}` row" if stmt.grid else "item"
    lines = [f"**`{entry.name}`** — {stmt.type.kind} {what} (line {stmt.span.line})", f'"{stmt.text}"']
    if stmt.grid:
        grid = q.grids.get(stmt.grid)
        if grid is not None:
            lines.append(f'Stem: "{grid.text}"')
    lines += _answers(q, stmt)
    flags = [f for f in ("gate", "key", "required", "strict") if getattr(stmt.flags, f)]
    if flags:
        lines.append("Flags: " + ", ".join(f"`{f}`" for f in flags))
    lines.append(f"Asked when: {route_words(q, entry)}")
    lines.append(reach_words(doc, entry))
    return lines


def _label_hover(doc: Document, key: Key) -> list[str]:
    q = doc.q
    _, listed, label = key
    if listed == "nonresponse":
        options, where = q.nonresponse, "the non-response codes"
    elif listed.startswith("inline:"):
        owner = listed.split(":", 1)[1]
        entry = q.symbols.get(owner)
        grid = q.grids.get(owner)
        codes = q.item_codes(entry.stmt) if entry is not None else (grid.type.inline_codes if grid else None)
        options, where = (codes.options if codes else []), f"the answers of `{owner}`"
    else:
        codes = q.codes.get(listed)
        options, where = (codes.options if codes else []), f"answer list `{listed}`"
    for o in options:
        if o.label == label:
            return [f'**`{label}`** = {o.value} "{o.text}" — in {where}']
    return []


def hover(doc: Document, line: int, column: int) -> lsp.Hover | None:
    occ = doc.index.at(line, column)
    if occ is None:
        return None
    q = doc.q
    key = occ.key
    lines: list[str] = []
    if key[0] == "value":
        entry = q.symbols.get(key[1])
        if entry is not None:
            lines = _entry_hover(doc, entry)
    elif key[0] == "label":
        lines = _label_hover(doc, key)
    elif key[0] == "codes" and key[1] in q.codes:
        codes = q.codes[key[1]]
        lines = [f"**`{codes.name}`** — answer list", *(f'`{o.label}` = {o.value} "{o.text}"' for o in codes.options)]
    elif key[0] == "block":
        block = q.sections.get(key[1]) or q.grids.get(key[1])
        if block is not None:
            word = "grid" if isinstance(block, n.Grid) else "section"
            title = block.text if isinstance(block, n.Grid) else block.title
            lines = [f"**`{block.name}`** — {word}", f'"{title}"']
            if block.when is not None:
                lines.append(f"When: {span_text(q.text, block.when.span)}")
    elif key[0] in ("stop", "check"):
        entry = q.symbols.get(key[1]) or next((e for e in q.entries if e.kind == key[0] and e.name == key[1]), None)
        if entry is not None:
            lines = [f"**`{entry.name}`** — {key[0]}", f'"{entry.stmt.text}"', f"Reached when: {route_words(q, entry)}"]
            lines.append(reach_words(doc, entry))
    if not lines:
        return None
    text_lines = doc.text.split("\n")
    return lsp.Hover(
        contents=lsp.MarkupContent(kind=lsp.MarkupKind.Markdown, value="\n\n".join(lines)),
        range=to_range(text_lines, occ.span),
    )


# ---------------------------------------------------------------- definition, references
def definition(doc: Document, line: int, column: int) -> lsp.Location | None:
    occ = doc.index.at(line, column)
    if occ is None:
        return None
    span = doc.index.definitions.get(occ.key)
    return location(doc, span) if span is not None else None


def references(doc: Document, line: int, column: int, include_declaration: bool) -> list[lsp.Location]:
    occ = doc.index.at(line, column)
    if occ is None:
        return []
    return [location(doc, s) for s in doc.index.uses(occ.key, include_declaration)]


# ---------------------------------------------------------------- rename
class RenameError(ValueError):
    """A new name that cannot be used; the message says why."""


def prepare_rename(doc: Document, line: int, column: int) -> lsp.Range | None:
    occ = doc.index.at(line, column)
    if occ is None or occ.key not in doc.index.definitions:
        return None
    return to_range(doc.text.split("\n"), occ.span)


def rename(doc: Document, line: int, column: int, new_name: str) -> lsp.WorkspaceEdit | None:
    occ = doc.index.at(line, column)
    if occ is None or occ.key not in doc.index.definitions:
        return None
    if not NAME.fullmatch(new_name):
        raise RenameError(f"`{new_name}` is not a name: use lower-case letters, digits and _, starting with a letter")
    if new_name in RESERVED:
        raise RenameError(f"`{new_name}` is a reserved word of the spec language")
    taken = (*occ.key[:-1], new_name)
    if taken != occ.key and taken in doc.index.definitions:
        raise RenameError(f"`{new_name}` is already defined here")
    lines = doc.text.split("\n")
    edits = [lsp.TextEdit(range=to_range(lines, s), new_text=new_name) for s in doc.index.uses(occ.key)]
    return lsp.WorkspaceEdit(changes={doc.uri: edits})


# ---------------------------------------------------------------- completion
def _labels_for(q: Questionnaire, name: str) -> list[lsp.CompletionItem]:
    entry = q.symbols.get(name)
    if entry is None or entry.kind not in ("item", "sample") or not entry.stmt.type.coded:
        return []
    codes = q.item_codes(entry.stmt)
    options = list(codes.options) if codes else []
    if q.allows_nonresponse(entry.stmt):
        options += q.nonresponse
    return [
        lsp.CompletionItem(label=o.label, kind=lsp.CompletionItemKind.EnumMember, detail=f'{o.value} "{o.text}"',
                           sort_text=f"{i:04d}")
        for i, o in enumerate(options)
    ]


def completion(doc: Document, line: int, column: int) -> list[lsp.CompletionItem]:
    q = doc.q
    before = _line(doc.text.split("\n"), line)[: column - 1]
    found = _LABEL_CONTEXT.search(before)
    if found and found.group(1) not in OPERATOR_WORDS:
        labels = _labels_for(q, found.group(1))
        if labels:
            return labels
    out: list[lsp.CompletionItem] = []
    for name, entry in q.symbols.items():
        detail = entry.kind if entry.kind != "item" else entry.stmt.type.kind
        out.append(lsp.CompletionItem(label=name, kind=lsp.CompletionItemKind.Variable, detail=detail,
                                      documentation=getattr(entry.stmt, "text", None)))
    words = [(w, "statement") for w in STATEMENT_WORDS] + [(w, "clause") for w in CLAUSE_WORDS]
    words += [(w, "flag") for w in FLAGS] + [(w, "type") for w in TYPE_WORDS] + [(w, "operator") for w in OPERATOR_WORDS]
    out += [lsp.CompletionItem(label=w, kind=lsp.CompletionItemKind.Keyword, detail=d) for w, d in words]
    return out


# ---------------------------------------------------------------- outline
def _symbol(doc: Document, lines: list[str], name: str, detail: str, kind: lsp.SymbolKind, span: Span,
            name_span: Span, children: list[lsp.DocumentSymbol] | None = None) -> lsp.DocumentSymbol:
    selection = to_range(lines, name_span)
    end_line = span.end_line if span.end_line is not None else span.line
    end_column = span.end_column if span.end_column is not None else len(_line(lines, end_line)) + 1
    full = lsp.Range(start=to_position(lines, span.line, 1), end=to_position(lines, end_line, end_column))
    if (full.end.line, full.end.character) < (selection.end.line, selection.end.character):
        full = lsp.Range(start=full.start, end=selection.end)
    return lsp.DocumentSymbol(name=name, detail=detail, kind=kind, range=full, selection_range=selection,
                              children=children or None)


def outline(doc: Document) -> list[lsp.DocumentSymbol]:
    """Answer lists, sections, grids, items, derived values, stops and checks, nested as
    written (and any statement kind with a name and a body, such as scales)."""
    lines = doc.text.split("\n")
    spec = doc.q.spec
    out: list[lsp.DocumentSymbol] = []
    for codes in spec.codes:
        options = [_symbol(doc, lines, o.label, f'{o.value} "{o.text}"', lsp.SymbolKind.EnumMember, o.span, o.span)
                   for o in codes.options]
        out.append(_symbol(doc, lines, codes.name, "answer list", lsp.SymbolKind.Enum, codes.span, codes.span, options))
    out += [_statement_symbol(doc, lines, s) for s in spec.body]
    for extra in ("scales",):  # statement kinds kept beside the body
        for node in getattr(spec, extra, []) or []:
            name_span = getattr(node, "name_span", node.span)
            out.append(_symbol(doc, lines, node.name, extra[:-1], lsp.SymbolKind.Struct, node.span, name_span))
    out.sort(key=lambda s: (s.selection_range.start.line, s.selection_range.start.character))
    return out


def _statement_symbol(doc: Document, lines: list[str], stmt: Any) -> lsp.DocumentSymbol:
    kind = stmt.stmt
    if kind == "section":
        children = [_statement_symbol(doc, lines, s) for s in stmt.body]
        return _symbol(doc, lines, stmt.name, f'section "{stmt.title}"', lsp.SymbolKind.Namespace, stmt.span,
                       stmt.name_span, children)
    if kind == "grid":
        rows = [_statement_symbol(doc, lines, r) for r in stmt.rows]
        return _symbol(doc, lines, stmt.name, f"grid · {stmt.type.kind}", lsp.SymbolKind.Array, stmt.span,
                       stmt.name_span, rows)
    if kind == "item":
        what = "row" if stmt.grid else stmt.type.kind
        return _symbol(doc, lines, stmt.name, what, lsp.SymbolKind.Field, stmt.span, stmt.name_span)
    if kind == "skip":
        return _symbol(doc, lines, f"skip to {stmt.target}", "skip", lsp.SymbolKind.Event, stmt.span, stmt.target_span)
    symbol_kind = {"let": lsp.SymbolKind.Constant, "sample": lsp.SymbolKind.Property, "stop": lsp.SymbolKind.Event,
                   "check": lsp.SymbolKind.Boolean}.get(kind, lsp.SymbolKind.Object)
    name_span = getattr(stmt, "name_span", stmt.span)
    return _symbol(doc, lines, getattr(stmt, "name", kind), kind, symbol_kind, stmt.span, name_span)


# ---------------------------------------------------------------- quick fixes
_DID_YOU_MEAN = re.compile(r"did you mean `([^`]+)`\?")


def _insert_after_line(lines: list[str], line: int, text: str) -> lsp.TextEdit:
    end = to_position(lines, line, len(_line(lines, line)) + 1)
    return lsp.TextEdit(range=lsp.Range(start=end, end=end), new_text=text)


def _suppression(doc: Document, lines: list[str], check: str, line: int) -> lsp.TextEdit:
    """`# lc: allow CHECK -- reason` at the end of the line, or alone above it when the
    line already has a comment."""
    source = _line(lines, line)
    comment = f"# lc: allow {check} -- REASON"
    stripped = re.sub(r'"(?:\\.|[^"\\\n])*"', "", source)
    if "#" not in stripped:
        return _insert_after_line(lines, line, f"  {comment}")
    indent = source[: len(source) - len(source.lstrip())]
    start = lsp.Position(line=line - 1, character=0)
    return lsp.TextEdit(range=lsp.Range(start=start, end=start), new_text=f"{indent}{comment}\n")


def _strict_targets(doc: Document, diag: lsp.Diagnostic, record: dict[str, Any]) -> list[Entry]:
    q = doc.q
    lines = doc.text.split("\n")
    start = from_position(lines, diag.range.start)
    end = from_position(lines, diag.range.end)
    if start[0] == end[0]:
        covered = _line(lines, start[0])[start[1] - 1 : end[1] - 1]
    else:
        covered = _line(lines, start[0])[start[1] - 1 :]
    names = NAME.findall(covered) + ([record["item"]] if record.get("item") else [])
    out: list[Entry] = []
    for name in dict.fromkeys(names):
        entry = q.symbols.get(name)
        if entry is not None and entry.kind == "item" and q.allows_nonresponse(entry.stmt) and entry.grid is None:
            out.append(entry)
    return out


def code_actions(doc: Document, diagnostics: list[lsp.Diagnostic]) -> list[lsp.CodeAction]:
    lines = doc.text.split("\n")
    known = all_checks()
    out: list[lsp.CodeAction] = []
    for diag in diagnostics:
        if diag.source != SOURCE or not isinstance(diag.data, dict):
            continue
        record = diag.data
        check = str(diag.code)
        suggestion = _DID_YOU_MEAN.search(diag.message)
        if suggestion:
            out.append(lsp.CodeAction(
                title=f"Replace with `{suggestion.group(1)}`",
                kind=lsp.CodeActionKind.QuickFix,
                diagnostics=[diag],
                is_preferred=True,
                edit=lsp.WorkspaceEdit(changes={doc.uri: [lsp.TextEdit(range=diag.range, new_text=suggestion.group(1))]}),
            ))
        if "`strict`" in diag.message:
            for entry in _strict_targets(doc, diag, record):
                text_end = entry.stmt.text_span
                at = to_position(lines, text_end.end_line or text_end.line, text_end.end_column or text_end.column)
                out.append(lsp.CodeAction(
                    title=f"Mark `{entry.name}` strict (no non-response codes)",
                    kind=lsp.CodeActionKind.QuickFix,
                    diagnostics=[diag],
                    edit=lsp.WorkspaceEdit(changes={doc.uri: [lsp.TextEdit(range=lsp.Range(start=at, end=at),
                                                                            new_text=" strict")]}),
                ))
        if check in known and check not in UNSUPPRESSIBLE and known[check].stage in ("spec", "routing"):
            out.append(lsp.CodeAction(
                title=f"Allow `{check}` here (write the reason)",
                kind=lsp.CodeActionKind.QuickFix,
                diagnostics=[diag],
                edit=lsp.WorkspaceEdit(changes={doc.uri: [_suppression(doc, lines, check, diag.range.start.line + 1)]}),
            ))
    return out
