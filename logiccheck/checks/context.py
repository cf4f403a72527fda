"""What a spec check sees, and the one way it hands back diagnostics."""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass, field
from typing import Any

import networkx as nx

from logiccheck.checks.registry import default_severity
from logiccheck.diagnostics import Diagnostic, Related, Span
from logiccheck.graph import dependency_graph
from logiccheck.model.questionnaire import Questionnaire


@dataclass
class LintContext:
    questionnaire: Questionnaire
    syntax: list[Diagnostic] = field(default_factory=list)
    options: dict[str, Any] = field(default_factory=dict)
    # Facts one check leaves for a later one (e.g. the routing analysis).
    shared: dict[str, Any] = field(default_factory=dict)

    @property
    def q(self) -> Questionnaire:
        return self.questionnaire

    @property
    def graph(self) -> nx.DiGraph:
        return dependency_graph(self.questionnaire)

    def diag(
        self,
        check: str,
        span: Span,
        message: str,
        *,
        item: str | None = None,
        witness: dict[str, str] | None = None,
        related: Iterable[tuple[Span, str]] = (),
        notes: Iterable[str] = (),
    ) -> Diagnostic:
        return Diagnostic(
            check=check,
            severity=default_severity(check),
            span=span,
            message=message,
            item=item,
            witness=witness,
            related=[Related(span=s, message=m) for s, m in related],
            notes=list(notes),
        )
