"""The drawing of a routing dependency graph, independent of any output format.

Every emitter (dot, mermaid, and image formats later) draws the same `Drawing`: nodes
(items, rows, derived values, sample variables, stops and skips), groups (sections and
grids, nested as in the spec), and edges from a value to the statement or block whose
condition, pipe or definition reads it, labelled with the source text of that condition.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Any, Literal

from logiccheck.diagnostics import Span
from logiccheck.graph import reads_of
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire

NodeKind = Literal["item", "gate", "let", "sample", "stop", "skip"]
# Every other entry kind draws as itself (items are items or gates; checks are not drawn).
_ENTRY_NODE_KIND: dict[str, NodeKind] = {"let": "let", "sample": "sample", "stop": "stop", "skip": "skip"}
MAX_LABEL = 60  # longer condition texts are cut with an ellipsis


@dataclass
class DrawNode:
    id: str
    name: str
    kind: NodeKind
    detail: str  # e.g. "single yesno", "number 0..120"
    group: str | None  # id of the innermost group, or None at top level
    line: int


@dataclass
class DrawGroup:
    id: str
    name: str
    kind: Literal["section", "grid"]
    title: str
    parent: str | None
    shuffled: bool = False
    condition: str | None = None
    nodes: list[str] = field(default_factory=list)  # node ids directly inside
    children: list[str] = field(default_factory=list)  # group ids directly inside

    def heading(self) -> str:
        """`section NAME` / `grid NAME (shuffled)`, and its condition on a second line."""
        out = f"{self.kind} {self.name}"
        if self.shuffled:
            out += " (shuffled)"
        if self.condition:
            out += f"\nwhen {self.condition}"
        return out


@dataclass
class DrawEdge:
    source: str  # the node read
    target: str  # the node or group whose condition reads it
    label: str  # the condition's source text ("pipe" for a piped value)
    via: str  # "condition" | "context" | "let" | "pipe"


@dataclass
class Drawing:
    title: str
    nodes: dict[str, DrawNode] = field(default_factory=dict)
    groups: dict[str, DrawGroup] = field(default_factory=dict)
    top_nodes: list[str] = field(default_factory=list)
    top_groups: list[str] = field(default_factory=list)
    edges: list[DrawEdge] = field(default_factory=list)


def span_text(text: str, span: Span | None) -> str:
    """The source text a span covers, on one line, whitespace collapsed."""
    if span is None or span.end_line is None or span.end_column is None:
        return ""
    lines = text.split("\n")
    if not 1 <= span.line <= len(lines) or not 1 <= span.end_line <= len(lines):
        return ""
    if span.line == span.end_line:
        piece = lines[span.line - 1][span.column - 1 : span.end_column - 1]
    else:
        parts = [lines[span.line - 1][span.column - 1 :]]
        parts.extend(lines[span.line : span.end_line - 1])
        parts.append(lines[span.end_line - 1][: span.end_column - 1])
        piece = " ".join(parts)
    return re.sub(r"\s+", " ", piece).strip()


def _short(label: str) -> str:
    return label if len(label) <= MAX_LABEL else label[: MAX_LABEL - 1] + "…"


def _detail(q: Questionnaire, stmt: Any) -> str:
    spec = getattr(stmt, "type", None)
    if spec is None:
        return ""
    if spec.kind in ("single", "multi"):
        out = f"{spec.kind} {spec.codes_name or '{…}'}"
    elif spec.kind in ("number", "decimal"):
        out = f"{spec.kind} {spec.lo:g}..{spec.hi:g}"
    else:
        out = spec.kind
    member = scale_membership(q).get(getattr(stmt, "name", ""))
    return f"{out} · {member}" if member else out


def scale_membership(q: Questionnaire) -> dict[str, str]:
    """Item → "scale NAME" (with "reversed"), for every item a scale lists."""
    out: dict[str, list[str]] = {}
    for scale in q.scales.values():
        for m in scale.items:
            out.setdefault(m.name, []).append(f"scale {scale.name}" + (" reversed" if m.reversed else ""))
    return {name: ", ".join(parts) for name, parts in out.items()}


def _node_id(entry: Entry) -> str:
    if entry.kind in ("item", "let", "sample"):
        return f"n_{entry.name}"
    return f"{entry.kind}_{entry.name}_{entry.index}"


def build_drawing(q: Questionnaire) -> Drawing:
    """Nodes, nested groups and labelled edges for one questionnaire."""
    drawing = Drawing(title=q.spec.title or q.spec.name or q.file)
    group_ids: dict[int, str] = {}
    entry_nodes: dict[int, str] = {}
    for entry in q.entries:
        if entry.kind == "check":
            continue
        if entry.kind in ("item", "let", "sample") and q.symbols.get(entry.name) is not entry:
            continue  # a duplicate definition; the first one stands
        parent = None
        for owner, _ in entry.context:
            if id(owner) not in group_ids:
                gid = f"g{len(group_ids) + 1}_{owner.name}"
                group_ids[id(owner)] = gid
                drawing.groups[gid] = DrawGroup(
                    id=gid,
                    name=owner.name,
                    kind="grid" if isinstance(owner, n.Grid) else "section",
                    title=owner.title if isinstance(owner, n.Section) else owner.text,
                    parent=parent,
                    shuffled=bool(getattr(owner, "shuffled", False)),
                    condition=span_text(q.text, owner.when.span) if owner.when is not None else None,
                )
                (drawing.groups[parent].children if parent else drawing.top_groups).append(gid)
            parent = group_ids[id(owner)]
        kind: NodeKind
        if entry.kind == "item":
            kind = "gate" if entry.stmt.flags.gate else "item"
        else:
            kind = _ENTRY_NODE_KIND[entry.kind]
        nid = _node_id(entry)
        entry_nodes[entry.index] = nid
        drawing.nodes[nid] = DrawNode(nid, entry.name, kind, _detail(q, entry.stmt), parent, entry.span.line)
        (drawing.groups[parent].nodes if parent else drawing.top_nodes).append(nid)

    seen: set[tuple[str, str, str]] = set()
    for entry in q.entries:
        target_node = entry_nodes.get(entry.index)
        if target_node is None:
            continue
        for read in reads_of(q, entry):
            source = entry_nodes.get(q.symbols[read.name].index)
            if source is None:
                continue
            if read.via == "context":
                owner = read.owner
                # A context read comes from its section's or grid's condition.
                assert owner is not None and owner.when is not None
                target = group_ids[id(owner)]
                label = span_text(q.text, owner.when.span)
            elif read.via == "pipe":
                target, label = target_node, "pipe"
            elif read.via == "let":
                target, label = target_node, span_text(q.text, entry.stmt.expr.span)
            else:
                when = getattr(entry.stmt, "when", None)
                target, label = target_node, span_text(q.text, when.span) if when is not None else ""
            key = (source, target, label)
            if key in seen:
                continue
            seen.add(key)
            drawing.edges.append(DrawEdge(source, target, _short(label), read.via))
    return drawing
