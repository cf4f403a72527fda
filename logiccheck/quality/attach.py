"""Quality checks added to a validation run: `validate` and `check` report them wherever
their inputs exist (a duration column, a sample frame), as DESIGN §5 asks."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow as pa

from logiccheck.data.findings import FindingBlock
from logiccheck.data.mapping import DataMapping
from logiccheck.data.readers import open_export
from logiccheck.data.result import ValidationResult
from logiccheck.data.validate import validate
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.quality.bridge import state_from_validation
from logiccheck.quality.config import QualityConfig
from logiccheck.quality.run import run_quality


def _extra_columns(source: str | Path | pd.DataFrame, names: list[str], encoding: str | None) -> pd.DataFrame:
    """Columns the typed frame does not carry (duration, e-mail), as text."""
    if isinstance(source, pd.DataFrame):
        return source[[c for c in names if c in source.columns]].astype(str)
    export = open_export(source, encoding=encoding)
    wanted = [c for c in names if c in export.columns]
    parts = [chunk.select(wanted) for chunk in export.chunks] if wanted else []
    if not parts:
        return pd.DataFrame()
    table = pa.concat_tables(parts)
    return pd.DataFrame({c: [None if v is None else str(v) for v in table[c].to_pylist()] for c in wanted})


def attach_quality(
    q: Questionnaire,
    result: ValidationResult,
    source: str | Path | pd.DataFrame,
    mapping: DataMapping | None = None,
    config: QualityConfig | None = None,
    encoding: str | None = None,
) -> ValidationResult:
    """Add the quality findings to `result` (in place; also returned). Validate with
    `keep_cells=True` first: a result without cells costs a second validation pass."""
    mapping = mapping or DataMapping()
    config = config or QualityConfig()
    if config.speed.duration_column == "duration" and mapping.duration != "duration":
        config = config.model_copy(update={"speed": config.speed.model_copy(update={"duration_column": mapping.duration})})
    full = result if result.due is not None and result.frame is not None else validate(q, source, mapping, encoding=encoding)
    if full.frame is None or full.respondents == 0:
        return result
    state = state_from_validation(q, full)
    frame = full.frame.reset_index(drop=True).copy()
    extra = _extra_columns(source, [config.speed.duration_column, config.frame.email_column], encoding)
    for c in extra.columns:
        if c not in frame.columns:
            frame[c] = extra[c].to_numpy()
    sample_frame = None
    if mapping.frame is not None:
        sample_frame = pd.read_csv(mapping.frame, dtype=str, keep_default_na=False)
    try:
        quality = run_quality(q, frame, config, sample_frame, id_column="id" if "id" in frame.columns else mapping.id, state=state)
    except (ValueError, KeyError) as err:
        # Validation itself stands; say plainly what was not checked.
        result.notes.append(f"quality checks not run: {err}")
        return result
    for f in quality.findings:
        result.blocks.append(
            FindingBlock(f.check, f.severity, f.item, f.message, np.array([f.row]), np.array([f.respondent], dtype=object),
                         None if f.value is None else [str(f.value)])
        )
    result._findings = None
    result.notes.extend(quality.notes)
    return result
