"""Margins in the commands that run before the one pipeline does: the two weights checks
and the `weights` analysis over a validation result, added to what the command reports."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from logiccheck.checks.analyses import Analysis
from logiccheck.checks.data_context import DataContext
from logiccheck.checks.data_runner import block_of
from logiccheck.checks.registry import check_info
from logiccheck.data.findings import FindingBlock
from logiccheck.data.result import ValidationResult
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.weights.analysis import weights_analysis
from logiccheck.weights.context import context_from_validation
from logiccheck.weights.margins import Margins

CHECKS = ("weight-missing", "sparse-cell")


def weight_blocks(ctx: DataContext, disable: set[str] | frozenset[str] = frozenset()) -> list[FindingBlock]:
    """The findings of the weights checks only (the others run elsewhere in these commands)."""
    out: list[FindingBlock] = []
    for name in CHECKS:
        if name in disable:
            continue
        info = check_info(name)
        assert info.data_run is not None
        out.extend(block_of(info, hits, ctx.ids) for hits in info.data_run(ctx))
    return out


def _sample_frame(mapping: Any) -> pd.DataFrame | None:
    path = getattr(mapping, "frame", None)
    return pd.read_csv(path, dtype=str, keep_default_na=False) if path else None


def attach_weights(
    q: Questionnaire, result: ValidationResult, source: str | Path | pd.DataFrame, margins: Margins, *,
    mapping: Any = None, config: Any = None, encoding: str | None = None,
) -> Analysis:
    """validate: findings, notes and JSON sections added to `result` (in place). Raises
    `MarginsError` when the margins do not fit the export."""
    ctx = context_from_validation(q, result, source, options={"margins": margins}, config=config, mapping=mapping,
                                  sample_frame=_sample_frame(mapping), encoding=encoding)
    result.blocks.extend(weight_blocks(ctx))
    result._findings = None
    analysis = weights_analysis(ctx) or Analysis()
    result.sections.update(analysis.sections)
    result.notes.extend(analysis.notes)
    return analysis


def clean_weights(
    q: Questionnaire, full: ValidationResult, source: str | Path, margins: Margins, *, disposition: np.ndarray,
    kept_rows: np.ndarray, config: Any = None, mapping: Any = None, sample_frame: pd.DataFrame | None = None,
) -> tuple[Analysis, list[FindingBlock]]:
    """clean: weights over the respondents the cleaned export keeps (rows removed by the
    policy are neither weighted nor reported)."""
    in_output = np.zeros(full.respondents, dtype=bool)
    in_output[kept_rows] = True
    disp = np.where(in_output, np.asarray(disposition, dtype=object), "(removed)")
    ctx = context_from_validation(q, full, source, options={"margins": margins}, config=config, mapping=mapping,
                                  sample_frame=sample_frame, disposition=disp)
    blocks = weight_blocks(ctx)
    return weights_analysis(ctx) or Analysis(), blocks
