"""`graph --format dot`: the routing graph as Graphviz DOT text."""

from __future__ import annotations

from logiccheck.report.graph_data import DrawGroup, Drawing, DrawNode

_SHAPES = {
    "item": 'shape=box, style="rounded"',
    "gate": 'shape=box, style="rounded,bold", penwidth=2',
    "let": 'shape=ellipse, style="dashed"',
    "sample": "shape=cylinder",
    "stop": "shape=octagon",
    "skip": "shape=cds",
}


def _q(text: str) -> str:
    """A DOT double-quoted string."""
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"').replace("\n", "\\n") + '"'


def _node(node: DrawNode, indent: str) -> str:
    label = node.name if not node.detail else f"{node.name}\n{node.detail}"
    if node.kind == "gate":
        label += "\n(gate)"
    return f"{indent}{_q(node.id)} [label={_q(label)}, {_SHAPES[node.kind]}];"


def _group(drawing: Drawing, group: DrawGroup, indent: str) -> list[str]:
    title = group.heading()
    out = [f"{indent}subgraph {_q('cluster_' + group.id)} {{", f"{indent}  label={_q(title)};"]
    if group.kind == "grid":
        out.append(f'{indent}  style="dashed";')
    for nid in group.nodes:
        out.append(_node(drawing.nodes[nid], indent + "  "))
    for gid in group.children:
        out.extend(_group(drawing, drawing.groups[gid], indent + "  "))
    out.append(f"{indent}}}")
    return out


def _anchor(drawing: Drawing, gid: str) -> str | None:
    """A node inside a group (DOT edges end at nodes; `lhead` clips them to the box)."""
    group = drawing.groups[gid]
    if group.nodes:
        return group.nodes[0]
    for child in group.children:
        found = _anchor(drawing, child)
        if found:
            return found
    return None


def to_dot(drawing: Drawing) -> str:
    out = [
        "digraph routing {",
        f"  label={_q(drawing.title)};",
        "  labelloc=t;",
        "  compound=true;",
        "  rankdir=TB;",
        '  node [fontname="Helvetica", fontsize=10];',
        '  edge [fontname="Helvetica", fontsize=9];',
    ]
    for nid in drawing.top_nodes:
        out.append(_node(drawing.nodes[nid], "  "))
    for gid in drawing.top_groups:
        out.extend(_group(drawing, drawing.groups[gid], "  "))
    for edge in drawing.edges:
        attrs = [f"label={_q(edge.label)}"] if edge.label else []
        if edge.via == "pipe":
            attrs.append('style="dotted"')
        target = edge.target
        if target in drawing.groups:
            anchor = _anchor(drawing, target)
            if anchor is None:
                continue
            attrs.append(f"lhead={_q('cluster_' + target)}")
            target = anchor
        out.append(f"  {_q(edge.source)} -> {_q(target)} [{', '.join(attrs)}];")
    out.append("}")
    return "\n".join(out) + "\n"
