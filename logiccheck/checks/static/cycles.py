"""Loops in the dependency graph: statements whose conditions or definitions read each other."""

from __future__ import annotations

from collections.abc import Iterable, Iterator
from itertools import islice

import networkx as nx

from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import register
from logiccheck.diagnostics import Diagnostic
from logiccheck.graph.deps import Read

# Loops through one knot of statements can be exponentially many; past this, the first
# ones found are reported and a note says more exist.
MAX_LOOPS = 50


def loops(graph: nx.DiGraph, limit: int = MAX_LOOPS) -> tuple[list[list[str]], bool]:
    """Every simple loop (up to `limit`), each rotated to start at its earliest statement,
    in a stable order; and whether the limit cut the list."""
    order = {node: data["entry"].index for node, data in graph.nodes(data=True)}
    found: list[list[str]] = []
    truncated = False
    for component in nx.strongly_connected_components(graph):
        if len(component) == 1:
            (node,) = component
            if graph.has_edge(node, node):
                found.append([node])
            continue
        sub = graph.subgraph(component)
        batch = list(islice(nx.simple_cycles(sub), limit + 1))
        if len(batch) > limit:
            truncated = True
            batch = batch[:limit]
        found.extend(batch)
    rotated = []
    for cycle in found:
        start = min(range(len(cycle)), key=lambda k: order[cycle[k]])
        rotated.append(cycle[start:] + cycle[:start])
    rotated.sort(key=lambda c: [order[x] for x in c])
    if len(rotated) > limit:
        truncated, rotated = True, rotated[:limit]
    return rotated, truncated


def _first_read(graph: nx.DiGraph, a: str, b: str) -> Read:
    return graph.edges[a, b]["reads"][0]


def _label(graph: nx.DiGraph, node: str) -> str:
    entry = graph.nodes[node]["entry"]
    return entry.name if entry.kind in ("item", "let", "sample") else f"{entry.kind} {entry.name}"


@register(
    "circular-definition",
    severity="error",
    stage="spec",
    summary="Statements whose conditions or definitions read each other in a loop.",
    what="A loop in the dependency graph: derived values defined in terms of each other, "
    "an item whose condition (or whose section's condition) reads itself, or a chain of "
    "conditions and derived values that comes back to where it started. Each loop is "
    "reported once, at its earliest statement, with the whole path and every edge as a "
    "related location.",
    why="No order of asking can settle a loop: some value in it is always needed before "
    "it exists, so the statements in it are never (or unpredictably) asked.",
    bad="let heavy = light or daily\nlet light = heavy and weekly",
    good="let heavy = daily or weekly\nlet light = weekly and not heavy",
)
def circular_definition(ctx: LintContext) -> Iterable[Diagnostic]:
    graph = ctx.graph
    found, truncated = loops(graph)
    yield from _report(ctx, graph, found, truncated)


def _report(ctx: LintContext, graph: nx.DiGraph, found: list[list[str]], truncated: bool) -> Iterator[Diagnostic]:
    for cycle in found:
        edges = list(zip(cycle, cycle[1:] + cycle[:1], strict=True))
        reads = [_first_read(graph, a, b) for a, b in edges]
        names = [_label(graph, x) for x in cycle]
        path = " → ".join(f"`{x}`" for x in [*names, names[0]])
        if len(cycle) == 1 and reads[0].via == "context":
            owner = reads[0].owner
            assert owner is not None  # a "context" read always names its section or grid
            word = "grid" if getattr(owner, "rows", None) is not None else "section"
            message = (
                f"`{names[0]}` is inside {word} `{owner.name}`, whose condition reads `{names[0]}`: "
                f"it can only be asked once it is answered ({path})"
            )
        elif len(cycle) == 1:
            message = f"`{names[0]}` depends on itself: {path}"
        else:
            message = f"{len(cycle)} statements read each other in a loop: {path}"
        related = [
            (read.span, f"`{_label(graph, a)}` reads `{_label(graph, b)}` here ({read.via})")
            for (a, b), read in zip(edges, reads, strict=True)
        ]
        notes = ["more loops exist through these statements; only the first are listed"] if truncated else []
        yield ctx.diag(
            "circular-definition",
            reads[0].span,
            message,
            item=names[0],
            related=related,
            notes=notes,
        )
