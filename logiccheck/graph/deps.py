"""Dependency graph: each statement points at the names its conditions, pipes,
derived values and rules read. Every edge keeps the position of the reference."""

from __future__ import annotations

from dataclasses import dataclass

import networkx as nx

from logiccheck.diagnostics import Span
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire
from logiccheck.model.resolve import pipes_in


@dataclass(frozen=True)
class Read:
    """`entry` reads `name` at `span`; `via` says through what (condition, pipe...)."""

    name: str
    span: Span
    via: str  # "context" | "condition" | "let" | "pipe" | "check"
    owner: n.Section | n.Grid | None = None  # the section/grid whose condition reads it, for "context"


def _names(expr: object) -> list[tuple[str, Span]]:
    out = []
    for node in n.walk(expr):  # type: ignore[arg-type]
        if isinstance(node, n.Ref):
            out.append((node.name, node.span))
        elif isinstance(node, n.Func):
            out.append((node.name, node.name_span))
    return out


def reads_of(q: Questionnaire, entry: Entry) -> list[Read]:
    """Everything one statement reads, in reading order (computed once per statement)."""
    cache = q._cache.setdefault("reads", {})
    found = cache.get(entry.index)
    if found is None:
        found = cache[entry.index] = _reads_of(q, entry)
    return found


def _reads_of(q: Questionnaire, entry: Entry) -> list[Read]:
    out: list[Read] = []
    # A section or grid condition is shared by every statement in it: walk it once.
    context_cache = q._cache.setdefault("context_reads", {})
    for owner, expr in entry.context:
        reads = context_cache.get(id(owner))
        if reads is None:
            reads = context_cache[id(owner)] = [Read(name, span, "context", owner) for name, span in _names(expr)]
        out.extend(reads)
    if entry.kind == "let":
        out.extend(Read(name, span, "let") for name, span in _names(entry.own))
    elif entry.kind == "check":
        out.extend(Read(name, span, "check") for name, span in _names(entry.own))
        out.extend(Read(name, span, "check") for name, span in _names(entry.require))
    else:
        out.extend(Read(name, span, "condition") for name, span in _names(entry.own))
    for text, span in entry.texts():
        out.extend(Read(name, pspan, "pipe") for name, pspan in pipes_in(text, span))
    return [r for r in out if r.name in q.symbols]


def node_id(entry: Entry) -> str:
    """Graph node name: the declared name, or kind:name for stops, skips and checks."""
    if entry.kind in ("item", "let", "sample"):
        return entry.name
    return f"{entry.kind}:{entry.name}@{entry.index}"


def dependency_graph(q: Questionnaire) -> nx.DiGraph:
    """Nodes are statements (attribute `entry`); an edge a → b means a reads b."""
    cached = q._cache.get("graph")
    if cached is not None:
        return cached
    graph = nx.DiGraph()
    for entry in q.entries:
        if entry.kind in ("item", "let", "sample") and q.symbols.get(entry.name) is not entry:
            continue  # a duplicate definition; the first one stands
        graph.add_node(node_id(entry), entry=entry)
    for entry in q.entries:
        source = node_id(entry)
        if source not in graph:
            continue
        for read in reads_of(q, entry):
            target = q.symbols[read.name]
            tid = node_id(target)
            if graph.has_edge(source, tid):
                graph.edges[source, tid]["reads"].append(read)
            else:
                graph.add_edge(source, tid, reads=[read])
    q._cache["graph"] = graph
    return graph
