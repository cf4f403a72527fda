"""The resolved questionnaire: statements in order, with context, names and types."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Literal

from logiccheck.diagnostics import Span
from logiccheck.model import nodes as n

# What a name stands for, as conditions see it.
ValueKind = Literal["coded", "set", "number", "text", "note", "bool", "unknown"]
RefRole = Literal["condition", "context", "pipe", "let", "check", "skip-target"]


@dataclass
class Entry:
    """One statement in questionnaire order (a grid row is an entry of its own).

    `context` holds the enclosing section and grid conditions (resolved, outermost
    first) with the statement that owns each; `own` is the statement's own condition.
    """

    index: int
    stmt: Any  # n.Item | n.Sample | n.Let | n.Skip | n.Stop | n.Check
    section: n.Section | None = None
    grid: n.Grid | None = None
    context: list[tuple[Any, Any]] = field(default_factory=list)  # (owner node, expr)
    own: Any = None  # resolved own condition (when), or the let's expression
    require: Any = None  # a check's resolved `require`
    skip_target: int | None = None  # for a skip: index of the first entry it lands on

    @property
    def name(self) -> str:
        return getattr(self.stmt, "name", "") or getattr(self.stmt, "target", "")

    @property
    def kind(self) -> str:
        return self.stmt.stmt

    @property
    def is_item(self) -> bool:
        return self.stmt.stmt == "item"

    @property
    def span(self) -> Span:
        return getattr(self.stmt, "name_span", None) or self.stmt.span

    def texts(self) -> list[tuple[str, Span]]:
        """The quoted texts shown with this statement (a grid's stem goes with its first
        row), which may pipe values with `{name}`."""
        out = []
        if self.kind in ("item", "stop"):
            out.append((self.stmt.text, self.stmt.text_span))
        if self.grid is not None and self.grid.rows and self.grid.rows[0] is self.stmt:
            out.append((self.grid.text, self.grid.text_span))
        return out

    def conditions(self) -> list[Any]:
        """Every condition that must be true for this statement to be reached."""
        out = [expr for _, expr in self.context if expr is not None]
        if self.kind != "let" and self.own is not None:
            out.append(self.own)
        return out


@dataclass
class Reference:
    """A name read by a statement: in a condition, a pipe, a derived value or a rule."""

    entry: int  # index of the reading entry
    name: str
    span: Span
    role: RefRole


@dataclass
class Problem:
    """A fact found while resolving, judged later by the check named here."""

    check: str
    span: Span
    message: str
    item: str | None = None
    related: list[tuple[Span, str]] = field(default_factory=list)


@dataclass
class Questionnaire:
    spec: n.Spec
    text: str
    entries: list[Entry] = field(default_factory=list)
    codes: dict[str, n.CodeList] = field(default_factory=dict)
    nonresponse: list[n.CodeOption] = field(default_factory=list)
    symbols: dict[str, Entry] = field(default_factory=dict)  # items, rows, lets, samples
    sections: dict[str, n.Section] = field(default_factory=dict)
    grids: dict[str, n.Grid] = field(default_factory=dict)
    scales: dict[str, n.Scale] = field(default_factory=dict)  # a namespace of their own
    section_start: dict[str, int] = field(default_factory=dict)  # section -> first entry index
    references: list[Reference] = field(default_factory=list)
    problems: list[Problem] = field(default_factory=list)
    let_kinds: dict[str, ValueKind] = field(default_factory=dict)
    broken: set[int] = field(default_factory=set)  # entries whose conditions failed to resolve
    _cache: dict[str, Any] = field(default_factory=dict, repr=False)

    @property
    def file(self) -> str:
        return self.spec.file

    @property
    def lines(self) -> list[str]:
        return self.text.split("\n")

    # -- lookups
    def items(self) -> list[Entry]:
        return [e for e in self.entries if e.is_item]

    def entry(self, name: str) -> Entry | None:
        return self.symbols.get(name)

    def item_codes(self, item: n.Item | n.Sample) -> n.CodeList | None:
        spec = item.type
        if spec.inline_codes is not None:
            return spec.inline_codes
        if spec.codes_name is not None:
            return self.codes.get(spec.codes_name)
        return None

    def allows_nonresponse(self, item: n.Item | n.Sample) -> bool:
        """Single and numeric items accept the non-response codes unless `strict`."""
        if isinstance(item, n.Sample):
            return False
        return item.type.kind in ("single", "number", "decimal") and not item.flags.strict

    def value_kind(self, name: str) -> ValueKind:
        entry = self.symbols.get(name)
        if entry is None:
            return "unknown"
        if entry.kind == "let":
            return self.let_kinds.get(name, "unknown")
        kind = entry.stmt.type.kind
        kinds: dict[str, ValueKind] = {
            "single": "coded",
            "multi": "set",
            "number": "number",
            "decimal": "number",
            "text": "text",
            "note": "note",
        }
        return kinds[kind]

    def guards(self, entry: Entry) -> tuple[list[Entry], list[Entry]]:
        """The stops before `entry`, and the skips whose span covers it."""
        stops = [e for e in self._stops() if e.index < entry.index]
        skips = [
            e
            for e in self._skips()
            if e.index < entry.index and e.skip_target is not None and e.skip_target > entry.index
        ]
        return stops, skips

    def _stops(self) -> list[Entry]:
        if "_stops" not in self._cache:
            self._cache["_stops"] = [e for e in self.entries if e.kind == "stop"]
        return self._cache["_stops"]

    def _skips(self) -> list[Entry]:
        if "_skips" not in self._cache:
            self._cache["_skips"] = [e for e in self.entries if e.kind == "skip"]
        return self._cache["_skips"]

    def source_line(self, line: int) -> str:
        lines = self.lines
        return lines[line - 1] if 1 <= line <= len(lines) else ""
