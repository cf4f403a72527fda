"""What the routing picture shows: boxes, bands and arrows, from the questionnaire.

Pure data (no drawing library), so any renderer (SVG/PNG here, text formats elsewhere)
reads the same description. Arrows run from an input to the statement whose condition,
pipe, derived value or rule reads it; a section's own condition points at its band.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass, field

from logiccheck.diagnostics import Diagnostic
from logiccheck.graph.deps import dependency_graph, node_id
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire

# The check whose diagnostics mark a box as unreachable (DESIGN §4).
UNREACHABLE_CHECK = "unreachable-item"

NodeKind = str  # "item" | "gate" | "row" | "let" | "sample" | "stop" | "skip" | "check"


@dataclass
class FlowNode:
    id: str
    name: str
    kind: NodeKind
    group: str
    detail: str
    index: int
    line: int
    unreachable: bool = False
    key: bool = False


@dataclass
class FlowGroup:
    """A band: a section, or a run of statements outside any section."""

    id: str
    title: str
    nodes: list[str] = field(default_factory=list)
    condition: bool = False  # the section has its own `when`


@dataclass(frozen=True)
class FlowEdge:
    source: str  # node id of the input
    target: str  # node id, or a group id for a section's condition
    via: str  # "condition" | "context" | "let" | "pipe" | "check" | "skip"


@dataclass
class FlowPicture:
    title: str
    nodes: dict[str, FlowNode]
    groups: list[FlowGroup]
    edges: list[FlowEdge]

    def subset(self, group_id: str) -> FlowPicture:
        """One band, plus the inputs it reads from other bands as a band of their own."""
        group = next(g for g in self.groups if g.id == group_id)
        inside = set(group.nodes)
        edges = [e for e in self.edges if e.target in inside or e.target == group_id]
        outside = sorted(
            {e.source for e in edges if e.source not in inside}, key=lambda i: self.nodes[i].index
        )
        groups = []
        nodes = {i: self.nodes[i] for i in group.nodes}
        if outside:
            groups.append(FlowGroup("_inputs", "Read from other sections", list(outside)))
            nodes.update({i: self.nodes[i] for i in outside})
        groups.append(group)
        return FlowPicture(f"{self.title} · {group.title}", nodes, groups, edges)


def _type_text(spec: n.TypeSpec) -> str:
    if spec.kind in ("single", "multi"):
        codes = spec.codes_name or (f"{{{len(spec.inline_codes.options)} codes}}" if spec.inline_codes else "")
        return f"{spec.kind} {codes}".strip()
    if spec.kind in ("number", "decimal") and spec.lo is not None:
        lo, hi = spec.lo, spec.hi
        fmt = (lambda v: f"{v:g}") if spec.kind == "decimal" else (lambda v: f"{int(v)}")
        return f"{spec.kind} {fmt(lo)}..{fmt(hi) if hi is not None else ''}"
    return spec.kind


def _describe(entry: Entry) -> tuple[NodeKind, str]:
    stmt = entry.stmt
    if entry.kind == "item":
        if stmt.grid:
            return "row", f"grid {stmt.grid} · {_type_text(stmt.type)}"
        kind = "gate" if stmt.flags.gate else "item"
        return kind, _type_text(stmt.type)
    if entry.kind == "sample":
        return "sample", f"sample · {_type_text(stmt.type)}"
    if entry.kind == "let":
        return "let", "derived value"
    if entry.kind == "stop":
        return "stop", "stop" + (" when …" if stmt.when is not None else " (always)")
    if entry.kind == "skip":
        return "skip", f"skip to {stmt.target}"
    if entry.kind == "check":
        return "check", "soft check" if stmt.soft else "check"
    return entry.kind, entry.kind


def _top_title(entry: Entry) -> str:
    return {"sample": "Sample variables (known before the interview)", "check": "Edit rules"}.get(
        entry.kind, "Outside sections"
    )


def unreachable_names(diagnostics: Iterable[Diagnostic], q: Questionnaire) -> set[str]:
    """Node ids the routing checks proved unreachable (by item name, else by line)."""
    by_line = {e.span.line: node_id(e) for e in q.entries}
    sections = {s.name_span.line: s.name for s in q.sections.values()}
    out: set[str] = set()
    for diag in diagnostics:
        if diag.check != UNREACHABLE_CHECK:
            continue
        if diag.item and diag.item in q.symbols:
            out.add(node_id(q.symbols[diag.item]))
        elif diag.span.line in by_line:
            out.add(by_line[diag.span.line])
        elif diag.span.line in sections:
            out.add(f"section:{sections[diag.span.line]}")
    return out


def flow_picture(q: Questionnaire, diagnostics: Iterable[Diagnostic] = ()) -> FlowPicture:
    """The picture's content, in questionnaire order."""
    dead = unreachable_names(diagnostics, q)
    graph = dependency_graph(q)
    nodes: dict[str, FlowNode] = {}
    groups: list[FlowGroup] = []
    for entry in q.entries:
        nid = node_id(entry)
        if nid not in graph or nid in nodes:
            continue
        section = entry.section
        gid = f"section:{section.name}" if section is not None else "_top"
        if not groups or groups[-1].id != gid:
            if section is not None:
                title = f"{section.name} · {section.title}" if section.title else section.name
                groups.append(FlowGroup(gid, title, condition=section.when is not None))
            else:
                groups.append(FlowGroup(gid, _top_title(entry)))
        kind, detail = _describe(entry)
        stmt = entry.stmt
        key = bool(getattr(getattr(stmt, "flags", None), "key", False))
        section_dead = section is not None and f"section:{section.name}" in dead
        nodes[nid] = FlowNode(
            nid, entry.name, kind, gid, detail, entry.index, entry.span.line,
            unreachable=nid in dead or section_dead, key=key,
        )
        groups[-1].nodes.append(nid)
    # Make repeated runs of a section (interleaved top-level lines) unique band ids.
    seen: dict[str, int] = {}
    for group in groups:
        count = seen.get(group.id, 0)
        seen[group.id] = count + 1
        if count:
            group.id = f"{group.id}#{count}"
            for nid in group.nodes:
                nodes[nid].group = group.id
    first_band = {}
    for group in groups:
        first_band.setdefault(group.id.split("#")[0], group.id)
    edges: set[FlowEdge] = set()
    for reader, source, data in graph.edges(data=True):
        if reader not in nodes or source not in nodes:
            continue
        for read in data["reads"]:
            if read.via == "context" and isinstance(read.owner, n.Section):
                target = first_band.get(f"section:{read.owner.name}", reader)
                edges.add(FlowEdge(source, target, "context"))
            else:
                edges.add(FlowEdge(source, reader, read.via))
    for entry in q.entries:
        if entry.kind == "skip" and entry.skip_target is not None and entry.skip_target < len(q.entries):
            target = node_id(q.entries[entry.skip_target])
            if target in nodes and node_id(entry) in nodes:
                edges.add(FlowEdge(node_id(entry), target, "skip"))
    order = {nid: node.index for nid, node in nodes.items()}
    ordered = sorted(edges, key=lambda e: (order.get(e.source, 0), order.get(e.target, -1), e.target, e.via))
    return FlowPicture(q.spec.title or q.spec.name or q.file, nodes, groups, ordered)
