"""Between the data stage and the quality stage: a route state from a `ValidationResult`."""

from __future__ import annotations

import numpy as np
import pandas as pd

from logiccheck.data.mapping import DataMapping
from logiccheck.data.result import ValidationResult
from logiccheck.data.validate import CHECK_FAILED, validate
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.quality.route import RouteError, RouteState, item_columns


def state_from_validation(q: Questionnaire, result: ValidationResult) -> RouteState:
    """The route state the data stage computed (validate with `keep_cells=True`)."""
    if result.due is None or result.has_value is None or result.valid is None:
        raise ValueError("validate with keep_cells=True to run the quality checks on its result")
    n = result.respondents
    nr_codes = [o.value for o in q.nonresponse]
    nonresponse = result.nonresponse if result.nonresponse is not None else np.zeros_like(result.valid)
    for j, name in enumerate(result.items if result.nonresponse is None else []):
        entry = q.symbols[name]
        if result.frame is not None and name in result.frame.columns and q.allows_nonresponse(entry.stmt):
            values = result.frame[name].to_numpy(dtype=float, na_value=np.nan)
            nonresponse[:, j] = result.valid[:, j] & np.isin(values, nr_codes)
    stops = {e.name: np.asarray(result.stop == e.name) for e in q.entries if e.kind == "stop"}
    failed = {e.name: np.zeros(n, bool) for e in q.entries if e.kind == "check"}
    # From the finding blocks (0-based rows): no need to materialise every finding.
    for b in result.blocks:
        if b.check == CHECK_FAILED.name and b.item in failed and b.rows.size:
            failed[b.item][b.rows] = True
    columns = {name: item_columns(q, q.symbols[name]) for name in result.items}
    return RouteState([str(i) for i in result.ids], list(result.items), result.due, result.has_value, result.valid,
                      nonresponse, stops, failed, columns)


def require_id(frame: pd.DataFrame, id_column: str) -> None:
    if id_column not in frame.columns:
        raise RouteError(f"the export has no respondent id column {id_column!r}; add it or map another column")


def route_state(q: Questionnaire, frame: pd.DataFrame, id_column: str = "id") -> RouteState:
    """Due, answered, valid and non-response masks for every respondent × item of an
    export in the default layout (docs/formats.md), by the data stage's evaluator."""
    require_id(frame, id_column)
    return state_from_validation(q, validate(q, frame, DataMapping(id=id_column), keep_cells=True))
