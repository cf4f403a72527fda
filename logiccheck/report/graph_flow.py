"""The routing picture's layout data, from the shared drawing (`graph_data.build_drawing`).

The picture shows sections as bands in questionnaire order and every statement as a box
inside its band, so nested groups are flattened: a grid's rows become boxes of kind
`row` in the grid's section, an arrow into a grid's condition points at its first row,
one into a section's condition at the band. Skips get an arrow to where they land, and
boxes the routing checks proved unreachable are marked.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass, field

from logiccheck.diagnostics import Diagnostic
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.report.graph_data import Drawing, build_drawing

# The check whose diagnostics mark a box as unreachable (the lint rules).
UNREACHABLE_CHECK = "unreachable-item"
TOP = "_top"


@dataclass
class FlowNode:
    id: str
    name: str
    kind: str  # item | gate | row | let | sample | stop | skip
    group: str  # band id
    detail: str
    index: int  # position in questionnaire order
    line: int
    unreachable: bool = False
    key: bool = False  # a `key` item


@dataclass
class FlowGroup:
    """A band: a section, or a run of statements outside any section."""

    id: str
    title: str
    nodes: list[str] = field(default_factory=list)
    condition: bool = False  # the section has its own `when`
    line: int | None = None


@dataclass(frozen=True)
class FlowEdge:
    source: str  # node id of the input
    target: str  # node id, or a band id for a section's condition
    via: str  # condition | context | let | pipe | skip


@dataclass
class FlowPicture:
    title: str
    nodes: dict[str, FlowNode]
    groups: list[FlowGroup]
    edges: list[FlowEdge]

    def by_name(self, name: str) -> FlowNode:
        return next(node for node in self.nodes.values() if node.name == name and node.kind not in ("stop", "skip"))

    def band(self, section: str) -> FlowGroup:
        return next(g for g in self.groups if g.title.split(" · ")[0] == section and g.id != TOP)

    def subset(self, group_id: str) -> FlowPicture:
        """One band, plus the inputs it reads from other bands as a band of their own."""
        group = next(g for g in self.groups if g.id == group_id)
        inside = set(group.nodes)
        edges = [e for e in self.edges if e.target in inside or e.target == group_id]
        outside = sorted({e.source for e in edges if e.source not in inside}, key=lambda i: self.nodes[i].index)
        nodes = {i: self.nodes[i] for i in group.nodes}
        groups = []
        if outside:
            groups.append(FlowGroup("_inputs", "Read from other sections", list(outside)))
            nodes.update({i: self.nodes[i] for i in outside})
        groups.append(group)
        return FlowPicture(f"{self.title} · {group.title}", nodes, groups, edges)


def _outermost(drawing: Drawing, gid: str | None) -> tuple[str | None, str | None]:
    """(outermost section group id, innermost grid name) for a node's group."""
    grid = None
    section = None
    while gid is not None:
        group = drawing.groups[gid]
        if group.kind == "grid" and grid is None:
            grid = group.name
        if group.kind == "section":
            section = gid
        gid = group.parent
    return section, grid


def flow_picture(q: Questionnaire, diagnostics: Iterable[Diagnostic] = ()) -> FlowPicture:
    """Bands, boxes and arrows for the routing picture, in questionnaire order."""
    drawing = build_drawing(q)
    nodes: dict[str, FlowNode] = {}
    groups: list[FlowGroup] = []
    band_of_section: dict[str, str] = {}
    for index, (nid, dn) in enumerate(drawing.nodes.items()):
        section, grid = _outermost(drawing, dn.group)
        band = section or TOP
        if not groups or groups[-1].id.split("#")[0] != band:
            bid = band if all(g.id != band for g in groups) else f"{band}#{len(groups)}"
            if section is not None:
                sg = drawing.groups[section]
                title = f"{sg.name} · {sg.title}" if sg.title else sg.name
                sec = q.sections.get(sg.name)
                groups.append(FlowGroup(bid, title, condition=sg.condition is not None,
                                        line=sec.name_span.line if sec is not None else None))
                band_of_section.setdefault(section, bid)
            else:
                title = "Sample variables (known before the interview)" if dn.kind == "sample" else "Outside sections"
                groups.append(FlowGroup(bid, title))
        kind: str = dn.kind  # a node kind, or "row" for an item in a grid
        detail = dn.detail
        if grid is not None and kind in ("item", "gate"):
            kind, detail = "row", f"grid {grid} · {detail}"
        elif kind == "sample":
            detail = f"sample · {detail}"
        elif kind == "let":
            detail = "derived value"
        elif kind == "stop":
            detail = "stop (ends the interview)"
        elif kind == "skip":
            detail = f"skip to {dn.name}"
        entry = q.symbols.get(dn.name) if kind not in ("stop", "skip") else None
        key = bool(entry is not None and getattr(getattr(entry.stmt, "flags", None), "key", False))
        nodes[nid] = FlowNode(nid, dn.name, kind, groups[-1].id, detail, index, dn.line, key=key)
        groups[-1].nodes.append(nid)

    def target_of(gid: str) -> str | None:
        group = drawing.groups[gid]
        if group.kind == "section":
            return band_of_section.get(gid)
        rows = [n for n in group.nodes if n in nodes]
        return rows[0] if rows else None

    edges: dict[FlowEdge, None] = {}
    for de in drawing.edges:
        if de.source not in nodes:
            continue
        target = de.target if de.target in nodes else (target_of(de.target) if de.target in drawing.groups else None)
        if target is not None:
            edges[FlowEdge(de.source, target, de.via)] = None
    by_name = {n.name: n.id for n in nodes.values() if n.kind not in ("stop", "skip")}
    section_band = {drawing.groups[g].name: b for g, b in band_of_section.items()}
    for node in nodes.values():
        if node.kind == "skip":
            target = by_name.get(node.name) or section_band.get(node.name)
            if target is not None:
                edges[FlowEdge(node.id, target, "skip")] = None
    _mark_unreachable(q, nodes, groups, diagnostics)
    return FlowPicture(drawing.title, nodes, groups, list(edges))


def _mark_unreachable(q: Questionnaire, nodes: dict[str, FlowNode], groups: list[FlowGroup],
                      diagnostics: Iterable[Diagnostic]) -> None:
    """Mark boxes from `unreachable-item` diagnostics: by item name, else by line."""
    by_name = {n.name: n for n in nodes.values() if n.kind not in ("stop", "skip")}
    by_line: dict[int, list[FlowNode]] = {}
    for node in nodes.values():
        by_line.setdefault(node.line, []).append(node)
    band_lines = {g.line: g for g in groups if g.line is not None}
    for diag in diagnostics:
        if diag.check != UNREACHABLE_CHECK or diag.file != q.file:
            continue
        if diag.item and diag.item in by_name and by_name[diag.item].line == diag.line:
            by_name[diag.item].unreachable = True
        elif diag.line in by_line:
            for node in by_line[diag.line]:
                node.unreachable = True
        elif diag.line in band_lines:
            for nid in band_lines[diag.line].nodes:
                nodes[nid].unreachable = True
        elif diag.item and diag.item in by_name:
            by_name[diag.item].unreachable = True
