"""Stage 3a: the dependency graph (networkx)."""

from logiccheck.graph.deps import Read, dependency_graph, reads_of

__all__ = ["Read", "dependency_graph", "reads_of"]
