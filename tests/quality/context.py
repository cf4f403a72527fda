"""Test helper: a `DataContext` built from the data stage as it stands (validate with the
cells kept, the route state, the dispositions), as the pipeline will build it."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

from logiccheck.checks.data_context import DataContext
from logiccheck.checks.data_runner import run_data_checks
from logiccheck.data.findings import FindingBlock
from logiccheck.data.mapping import DataMapping
from logiccheck.data.validate import validate
from logiccheck.loader import load_text
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.quality import completeness
from logiccheck.quality.bridge import state_from_validation
from logiccheck.quality.config import QualityConfig

QUALITY = ("duplicate-id", "duplicate-response", "near-duplicate", "straightline", "pattern-response", "speeder",
           "not-in-frame")


def build_context(
    spec: str | Questionnaire,
    export: pd.DataFrame | str | Path,
    config: QualityConfig | None = None,
    sample_frame: pd.DataFrame | None = None,
) -> DataContext:
    q = load_text(spec, "test.qlc").questionnaire if isinstance(spec, str) else spec
    cells = pd.read_csv(export, dtype=str, keep_default_na=False) if not isinstance(export, pd.DataFrame) else export
    cells = cells.astype(str)
    config = config or QualityConfig()
    result = validate(q, cells, DataMapping(), keep_cells=True)
    state = state_from_validation(q, result)
    disposition = completeness.dispositions(q, state, config.completeness).to_numpy(dtype=object)
    frame = result.frame
    assert frame is not None

    def value_of(name: str) -> np.ndarray:
        if name not in frame.columns:
            return np.full(len(cells), np.nan)
        return frame[name].to_numpy(dtype=float, na_value=np.nan)

    def text_of(column: str) -> np.ndarray | None:
        if column not in cells.columns:
            return None
        texts = cells[column].to_numpy(dtype=object).copy()
        texts[np.char.strip(texts.astype(str)) == ""] = None
        return texts

    return DataContext(
        q=q, ids=np.asarray(state.ids, dtype=object), items=list(state.items), due=state.due,
        has_value=state.has_value, valid=state.valid, nonresponse=state.nonresponse,
        stop=np.asarray(result.stop, dtype=object), disposition=disposition, value_of=value_of, text_of=text_of,
        config=config, sample_frame=sample_frame,
    )


def quality_blocks(ctx: DataContext) -> list[FindingBlock]:
    return [b for b in run_data_checks(ctx, stages=("quality",)) if b.check in QUALITY or b.check == "internal-error"]


def flagged(ctx: DataContext) -> dict[str, set[str]]:
    """Respondent id -> the quality checks that flag it (internal errors fail the test)."""
    out: dict[str, set[str]] = {}
    for b in quality_blocks(ctx):
        assert b.check != "internal-error", b.message
        for f in b.records():
            out.setdefault(str(f.respondent), set()).add(f.check)
    return out
