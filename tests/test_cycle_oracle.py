"""`circular-definition` finds the same loops as networkx's own cycle finder.

Oracle: networkx.simple_cycles (Johnson's algorithm) on the random graph the spec was
written from, independent of the spec's parser, resolver and dependency graph.
"""

from __future__ import annotations

import re

import networkx as nx
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from logiccheck.checks.runner import run_checks
from logiccheck.checks.static.cycles import MAX_LOOPS
from logiccheck.loader import load_text


@st.composite
def graphs(draw: st.DrawFn) -> tuple[nx.DiGraph, list[bool]]:
    size = draw(st.integers(1, 7))
    graph = nx.DiGraph()
    graph.add_nodes_from(range(size))
    for a in range(size):
        for b in range(size):
            if draw(st.integers(0, 9)) < 3:
                graph.add_edge(a, b)
    as_item = [draw(st.booleans()) for _ in range(size)]
    return graph, as_item


def spec_for(graph: nx.DiGraph, as_item: list[bool]) -> str:
    """Node k reads its successors: a derived value sums them, an item's condition tests them."""
    lines = ['survey loops "Loops"']
    for k in sorted(graph.nodes):
        reads = " + ".join(f"v{t}" for t in sorted(graph.successors(k))) or "0"
        if as_item[k]:
            lines.append(f'v{k}: number 0..9 "Question {k}" strict when {reads} >= 0')
        else:
            lines.append(f"let v{k} = 1 + {reads}")
    return "\n".join(lines) + "\n"


def canonical(path: list[str]) -> tuple[str, ...]:
    """A loop as a tuple starting at its smallest name (loops are equal up to rotation)."""
    start = path.index(min(path))
    return tuple(path[start:] + path[:start])


def found_loops(text: str) -> set[tuple[str, ...]]:
    out = set()
    for d in run_checks(load_text(text, "loops.qlc"), solver=False):
        if d.check == "circular-definition":
            path = re.findall(r"`(v\d+)`", d.message.split(":", 1)[1])
            assert path[0] == path[-1]
            out.add(canonical(path[:-1]))
            # Every edge of the loop is a related location.
            assert len(d.related) == len(path) - 1
    return out


@settings(max_examples=80, deadline=None)
@given(graphs())
def test_same_loops_as_networkx(case: tuple[nx.DiGraph, list[bool]]) -> None:
    graph, as_item = case
    expected = {canonical([f"v{k}" for k in cycle]) for cycle in nx.simple_cycles(graph)}
    assume(len(expected) <= MAX_LOOPS)
    assert found_loops(spec_for(graph, as_item)) == expected


def test_each_loop_is_reported_once_with_its_path() -> None:
    text = "let a = b + 1\nlet b = c + 1\nlet c = a + 1\nlet d = d + 1\n"
    got = [d for d in run_checks(load_text(text, "x.qlc"), solver=False) if d.check == "circular-definition"]
    assert [d.message for d in got] == [
        "3 statements read each other in a loop: `a` → `b` → `c` → `a`",
        "`d` depends on itself: `d` → `d`",
    ]
    assert [(r.span.line, r.span.column) for r in got[0].related] == [(1, 9), (2, 9), (3, 9)]
