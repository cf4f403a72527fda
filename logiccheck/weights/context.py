"""A `DataContext` from a validation result, for the commands that run before the one
pipeline does (validate, clean, the notebook API)."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from logiccheck.checks.data_context import DataContext
from logiccheck.data.result import ValidationResult
from logiccheck.model.questionnaire import Questionnaire


def context_from_validation(
    q: Questionnaire,
    result: ValidationResult,
    source: str | Path | pd.DataFrame,
    *,
    options: dict[str, Any],
    config: Any = None,
    mapping: Any = None,
    sample_frame: pd.DataFrame | None = None,
    disposition: np.ndarray | None = None,
    encoding: str | None = None,
) -> DataContext:
    """Validate with `keep_cells=True` first. `disposition` overrides the result's own (the
    cleaner's configured completeness rule)."""
    from logiccheck.quality.attach import _extra_columns
    from logiccheck.quality.bridge import state_from_validation

    if result.due is None or result.frame is None:
        raise ValueError("validate with keep_cells=True before building a data context")
    state = state_from_validation(q, result)
    frame = result.frame.reset_index(drop=True)
    n = result.respondents

    def value_of(name: str) -> np.ndarray:
        if name not in frame.columns:
            return np.full(n, np.nan)
        return pd.to_numeric(frame[name], errors="coerce").to_numpy(dtype=float, na_value=np.nan)

    texts: dict[str, np.ndarray | None] = {}

    def text_of(column: str) -> np.ndarray | None:
        if column not in texts:
            extra = _extra_columns(source, [column], encoding)
            if column in extra.columns:
                cells = extra[column].to_numpy(dtype=object)
                blank = pd.isna(cells) | (np.char.strip(cells.astype(str)) == "") | (cells.astype(str) == "nan")
                cells[blank] = None
                texts[column] = cells
            else:
                texts[column] = None
        return texts[column]

    return DataContext(
        q=q, ids=np.asarray([str(i) for i in result.ids], dtype=object), items=list(result.items),
        due=result.due, has_value=result.has_value, valid=result.valid, nonresponse=state.nonresponse,
        stop=np.asarray(result.stop, dtype=object),
        disposition=np.asarray(result.disposition if disposition is None else disposition, dtype=object),
        value_of=value_of, text_of=text_of, config=config, mapping=mapping, sample_frame=sample_frame,
        options=options,
    )
