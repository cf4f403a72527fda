"""`graph --format mermaid`: the routing graph as a Mermaid flowchart."""

from __future__ import annotations

from logiccheck.report.graph_data import DrawGroup, Drawing, DrawNode

_OPEN_CLOSE = {
    "item": ("(", ")"),
    "gate": ("{{", "}}"),
    "let": ("([", "])"),
    "sample": ("[(", ")]"),
    "stop": (">", "]"),
    "skip": ("[/", "/]"),
}


def _text(text: str) -> str:
    """Text inside a quoted Mermaid label: quotes and bars become entity codes."""
    return text.replace('"', "#quot;").replace("|", "#124;").replace("\n", "<br/>")


def _node(node: DrawNode, indent: str) -> str:
    label = node.name if not node.detail else f"{node.name}\n{node.detail}"
    left, right = _OPEN_CLOSE[node.kind]
    return f'{indent}{node.id}{left}"{_text(label)}"{right}'


def _group(drawing: Drawing, group: DrawGroup, indent: str) -> list[str]:
    title = group.heading()
    out = [f'{indent}subgraph {group.id}["{_text(title)}"]']
    for nid in group.nodes:
        out.append(_node(drawing.nodes[nid], indent + "  "))
    for gid in group.children:
        out.extend(_group(drawing, drawing.groups[gid], indent + "  "))
    out.append(f"{indent}end")
    return out


def to_mermaid(drawing: Drawing) -> str:
    out = ["---", f'title: "{_text(drawing.title)}"', "---", "flowchart TB"]
    for nid in drawing.top_nodes:
        out.append(_node(drawing.nodes[nid], "  "))
    for gid in drawing.top_groups:
        out.extend(_group(drawing, drawing.groups[gid], "  "))
    for edge in drawing.edges:
        arrow = "-.->" if edge.via == "pipe" else "-->"
        label = f'|"{_text(edge.label)}"|' if edge.label else ""
        out.append(f"  {edge.source} {arrow}{label} {edge.target}")
    gates = [nid for nid, node in drawing.nodes.items() if node.kind == "gate"]
    if gates:
        out.append("  classDef gate stroke-width:3px")
        out.append(f"  class {','.join(gates)} gate")
    return "\n".join(out) + "\n"
