"""A `DataContext` from a `ValidationResult`, and the scale results attached to it, for the
commands and reporters that do not yet run the post-collection pipeline."""

from __future__ import annotations

from typing import Any

import numpy as np

from logiccheck.checks.analyses import Analysis
from logiccheck.checks.data_context import DataContext
from logiccheck.checks.data_runner import run_data_checks
from logiccheck.checks.registry import all_checks
from logiccheck.data.result import ValidationResult
from logiccheck.model.questionnaire import Questionnaire

SCALE_CHECKS = ("low-reliability", "scale-misfit", "inconsistent-answers")


def context_from_validation(q: Questionnaire, result: ValidationResult, config: Any = None) -> DataContext:
    """The route state of a validation (run with `keep_cells=True`) as a check context."""
    if result.due is None or result.has_value is None or result.valid is None:
        raise ValueError("validate with keep_cells=True to compute scales")
    frame = result.frame
    nr_codes = [float(o.value) for o in q.nonresponse]
    n = result.respondents

    def value_of(name: str) -> np.ndarray:
        if frame is None or name not in frame.columns:
            return np.full(n, np.nan)
        return frame[name].to_numpy(dtype=float, na_value=np.nan)

    nonresponse = np.zeros_like(result.valid)
    for j, name in enumerate(result.items):
        entry = q.symbols.get(name)
        if entry is not None and entry.kind == "item" and q.allows_nonresponse(entry.stmt):
            nonresponse[:, j] = result.valid[:, j] & np.isin(value_of(name), nr_codes)
    return DataContext(
        q=q, ids=np.asarray(result.ids, dtype=object), items=list(result.items), due=result.due,
        has_value=result.has_value, valid=result.valid, nonresponse=nonresponse, stop=result.stop,
        disposition=result.disposition, value_of=value_of, text_of=lambda column: None, config=config,
    )


def attach_scales(q: Questionnaire, result: ValidationResult) -> Analysis | None:
    """Run the scale checks and analysis on a validation; their findings join its blocks and
    the analysis is kept on it (`result.analyses["scales"]`). Nothing happens without scales."""
    if not q.scales or result.due is None:
        return None
    from logiccheck.scales.checks import scales_analysis

    ctx = context_from_validation(q, result)
    others = [name for name in all_checks() if name not in SCALE_CHECKS]
    blocks = run_data_checks(ctx, disable=others)
    analysis = scales_analysis(ctx)
    result.blocks.extend(blocks)
    result._findings = None
    result.notes.extend(ctx.notes)
    if analysis is not None:
        result.analyses["scales"] = analysis
    return analysis
