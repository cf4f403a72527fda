"""Where every name of a spec is defined and used, for go-to, references and rename.

Names live in separate spaces, so a code label `other` of one list is never confused
with a label of another list or with an item called `other`:

| key | what |
| --- | --- |
| `("value", NAME)` | items, grid rows, derived values, sample variables |
| `("block", NAME)` | sections and grids |
| `("codes", NAME)` | named answer lists |
| `("label", LIST, LABEL)` | a code label of a list: a codes name, `nonresponse`, or `inline:ITEM` |
| `("stop", NAME)`, `("check", NAME)` | screen-outs and edit rules |
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass, field
from typing import Any

from logiccheck.diagnostics import Span
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire

Key = tuple[str, ...]


@dataclass(frozen=True)
class Occurrence:
    key: Key
    span: Span
    definition: bool


@dataclass
class NameIndex:
    occurrences: list[Occurrence] = field(default_factory=list)
    definitions: dict[Key, Span] = field(default_factory=dict)
    by_line: dict[int, list[Occurrence]] = field(default_factory=dict)

    def add(self, key: Key, span: Span | None, definition: bool = False) -> None:
        if span is None or span.end_column is None:
            return
        occ = Occurrence(key, span, definition)
        self.occurrences.append(occ)
        self.by_line.setdefault(span.line, []).append(occ)
        if definition:
            self.definitions.setdefault(key, span)

    def at(self, line: int, column: int) -> Occurrence | None:
        """The name under a 1-based position (the end column counts, for a cursor just
        after the name)."""
        for occ in self.by_line.get(line, []):
            assert occ.span.end_column is not None
            if occ.span.column <= column <= occ.span.end_column:
                return occ
        return None

    def uses(self, key: Key, include_definition: bool = True) -> list[Span]:
        seen: set[tuple[int, int]] = set()
        out = []
        for occ in self.occurrences:
            if occ.key != key or (occ.definition and not include_definition):
                continue
            where = (occ.span.line, occ.span.column)
            if where not in seen:
                seen.add(where)
                out.append(occ.span)
        return sorted(out, key=lambda s: (s.line, s.column))


def list_key(q: Questionnaire, stmt: Any) -> str | None:
    """The answer list a coded item reads its labels from."""
    spec = getattr(stmt, "type", None)
    if spec is None:
        return None
    if spec.codes_name is not None:
        return spec.codes_name
    if spec.inline_codes is not None:
        owner = stmt.grid if getattr(stmt, "grid", None) else stmt.name
        return f"inline:{owner}"
    return None


def _label_key(q: Questionnaire, subject: Any, label: str) -> Key | None:
    if not isinstance(subject, n.Ref):
        return None
    entry = q.symbols.get(subject.name)
    if entry is None:
        return None
    codes = q.item_codes(entry.stmt)
    if codes is not None and any(o.label == label for o in codes.options):
        key = list_key(q, entry.stmt)
        return ("label", key, label) if key else None
    if any(o.label == label for o in q.nonresponse):
        return ("label", "nonresponse", label)
    return None


def _codes_in(q: Questionnaire, expr: Any) -> Iterator[tuple[Key, Span]]:
    """Code labels written in a resolved condition, with the list each belongs to."""
    for node in n.walk(expr):
        pairs: list[tuple[Any, Any]] = []
        if isinstance(node, n.Compare):
            pairs = [(node.left, node.right), (node.right, node.left)]
        elif isinstance(node, (n.InList, n.Has)):
            pairs = [(node.subject, v) for v in node.values]
        for subject, value in pairs:
            if isinstance(value, n.Code):
                span = value.span
                if span.end_column is not None and span.end_column - span.column == len(value.label):
                    key = _label_key(q, subject, value.label)
                    if key is not None:
                        yield key, span


def _options(index: NameIndex, key: str, codes: n.CodeList | None) -> None:
    if codes is None:
        return
    for option in codes.options:
        index.add(("label", key, option.label), option.span, definition=True)


def build_index(q: Questionnaire) -> NameIndex:
    index = NameIndex()
    for name, codes in q.codes.items():
        index.add(("codes", name), codes.span, definition=True)
        _options(index, name, codes)
    for option in q.nonresponse:
        index.add(("label", "nonresponse", option.label), option.span, definition=True)
    for name, section in q.sections.items():
        index.add(("block", name), section.name_span, definition=True)
    for name, grid in q.grids.items():
        index.add(("block", name), grid.name_span, definition=True)
        if grid.type.inline_codes is not None:
            _options(index, f"inline:{name}", grid.type.inline_codes)
        if grid.type.codes_name is not None:
            index.add(("codes", grid.type.codes_name), grid.type.codes_span)
    conditions: dict[tuple[int, int], Any] = {}
    for entry in q.entries:
        _add_entry(index, q, entry)
        for expr in [e for _, e in entry.context] + [entry.own, entry.require]:
            if expr is not None and hasattr(expr, "span"):
                conditions.setdefault((expr.span.line, expr.span.column), expr)
    for expr in conditions.values():
        for key, span in _codes_in(q, expr):
            index.add(key, span)
    for ref in q.references:
        space = "block" if ref.role == "skip-target" and ref.name not in q.symbols else "value"
        index.add((space, ref.name), ref.span)
    return index


def _add_entry(index: NameIndex, q: Questionnaire, entry: Entry) -> None:
    stmt = entry.stmt
    kind = entry.kind
    if kind in ("item", "sample", "let"):
        if q.symbols.get(entry.name) is entry:
            index.add(("value", entry.name), stmt.name_span, definition=True)
        else:
            index.add(("value", entry.name), stmt.name_span)
        spec = getattr(stmt, "type", None)
        if spec is not None and getattr(stmt, "grid", None) is None:
            if spec.codes_name is not None:
                index.add(("codes", spec.codes_name), spec.codes_span)
            elif spec.inline_codes is not None:
                _options(index, f"inline:{stmt.name}", spec.inline_codes)
    elif kind in ("stop", "check"):
        index.add((kind, entry.name), stmt.name_span, definition=True)
