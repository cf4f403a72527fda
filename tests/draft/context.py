"""A data-check context built from the data stage as it stands (validate with the cells
kept, then the quality bridge's route state), for testing data checks as units."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

from logiccheck.checks.data_context import DataContext
from logiccheck.data import DataMapping, validate
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.quality.bridge import state_from_validation


def data_context(q: Questionnaire, export: str | Path | pd.DataFrame, mapping: DataMapping | None = None) -> DataContext:
    result = validate(q, export, mapping or DataMapping(), keep_cells=True)
    state = state_from_validation(q, result)
    frame = result.frame
    n = result.respondents

    def value_of(name: str) -> np.ndarray:
        if frame is None or name not in frame.columns:
            return np.full(n, np.nan)
        return frame[name].to_numpy(dtype=float, na_value=np.nan)

    def text_of(column: str) -> np.ndarray | None:
        if frame is None or column not in frame.columns:
            return None
        return frame[column].astype(object).where(frame[column].notna(), None).to_numpy()

    return DataContext(
        q=q, ids=np.asarray(state.ids, dtype=object), items=list(state.items), due=state.due,
        has_value=state.has_value, valid=state.valid, nonresponse=state.nonresponse,
        stop=np.asarray(result.stop, dtype=object), disposition=np.asarray(result.disposition, dtype=object),
        value_of=value_of, text_of=text_of, config=None, mapping=mapping,
    )
