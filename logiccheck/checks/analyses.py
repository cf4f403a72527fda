"""Analyses: results beyond findings that the post-collection pipeline computes once per run.

An analysis reads the same `DataContext` the data and quality checks read and returns an
`Analysis`: top-level sections of `validate`'s JSON (e.g. "scales"), columns `clean`
appends to the cleaned export (e.g. `score_NAME`, `weight`), and keys for `clean`'s
`summary.json`. Reporters only format these; they never compute them again.
"""

from __future__ import annotations

import importlib
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

if TYPE_CHECKING:
    from logiccheck.checks.data_context import DataContext


@dataclass
class Analysis:
    sections: dict[str, Any] = field(default_factory=dict)  # JSON-ready, top level of validate's JSON
    columns: dict[str, np.ndarray] = field(default_factory=dict)  # per respondent, export order; NaN/None = blank
    summary: dict[str, Any] = field(default_factory=dict)  # JSON-ready, added to summary.json
    notes: list[str] = field(default_factory=list)


AnalysisRunner = Callable[["DataContext"], "Analysis | None"]

# Modules whose import registers analyses; loaded on first use.
ANALYSIS_MODULES: tuple[str, ...] = ("logiccheck.weights.analysis", "logiccheck.scales.checks")

_ANALYSES: dict[str, AnalysisRunner] = {}
_loaded = False


def analysis(name: str) -> Callable[[AnalysisRunner], AnalysisRunner]:
    """Decorator: register an analysis under `name` (run in registration order)."""

    def wrap(fn: AnalysisRunner) -> AnalysisRunner:
        if name in _ANALYSES and _ANALYSES[name] is not fn:
            raise ValueError(f"analysis {name} is registered twice")
        _ANALYSES[name] = fn
        return fn

    return wrap


def all_analyses() -> dict[str, AnalysisRunner]:
    global _loaded
    if not _loaded:
        _loaded = True
        for module in ANALYSIS_MODULES:
            importlib.import_module(module)
    return dict(_ANALYSES)


def run_analyses(ctx: DataContext, timings: dict[str, float] | None = None) -> dict[str, Analysis]:
    """Every registered analysis that has something to say for this run (`timings`:
    filled with each one's seconds, where given)."""
    out: dict[str, Analysis] = {}
    for name, fn in all_analyses().items():
        started = time.perf_counter()
        result = fn(ctx)
        if timings is not None:
            timings[f"analysis {name}"] = time.perf_counter() - started
        if result is not None:
            out[name] = result
    return out
