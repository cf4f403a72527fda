"""What a data or quality check reads: one route state per respondent × item, computed once
by the pipeline, plus the respondent-level facts (dispositions, extra columns, settings).

Checks read only this object; they never read files, print or compute the routing again.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

if TYPE_CHECKING:
    import pandas as pd

    from logiccheck.model.questionnaire import Questionnaire


@dataclass
class DataContext:
    """Respondents are rows 0..n-1 in export order; items are the data stage's items (items
    and grid rows, questionnaire order). Boolean matrices are respondents × items."""

    q: Questionnaire
    ids: np.ndarray  # respondent ids as text (object array), export order
    items: list[str]
    due: np.ndarray  # the routing asks the item (with cascade)
    has_value: np.ndarray  # the export has a value (valid or not)
    valid: np.ndarray  # has a value and it is valid
    nonresponse: np.ndarray  # the value is a non-response code
    stop: np.ndarray  # name of the stop that fired per respondent ("" if none)
    disposition: np.ndarray  # per respondent: complete, partial, break-off or a stop name
    # Numeric values of an item, grid row or option column (float64; NaN where blank or invalid).
    value_of: Callable[[str], np.ndarray]
    # The export's cells of a column as text (None where blank), or None when there is no such column.
    text_of: Callable[[str], np.ndarray | None]
    config: Any  # QualityConfig
    mapping: Any = None  # DataMapping
    sample_frame: pd.DataFrame | None = None
    options: dict[str, Any] = field(default_factory=dict)  # e.g. margins, for the checks that use them
    notes: list[str] = field(default_factory=list)  # checks add plain notes (what was not checked, and why)
    # Results computed once and shared between checks and analyses of one run (e.g. a
    # scale's statistics feed both `low-reliability` and the "scales" section).
    memo: dict[str, Any] = field(default_factory=dict)
    # `value_of` for some rows only, typing just those cells (a search on a sample then
    # costs the sample, not the export); None: cut `value_of`'s whole columns instead.
    values_at: Callable[[np.ndarray], Callable[[str], np.ndarray]] | None = None
    _index: dict[str, int] | None = field(default=None, repr=False)

    def value_of_rows(self, rows: np.ndarray) -> Callable[[str], np.ndarray]:
        """`value_of` restricted to `rows` (sorted row numbers)."""
        if self.values_at is not None:
            return self.values_at(rows)
        return lambda name: np.asarray(self.value_of(name))[rows]

    @property
    def n(self) -> int:
        return len(self.ids)

    def col(self, item: str) -> int:
        """Column of `item` in the respondent × item matrices."""
        if self._index is None:
            self._index = {name: j for j, name in enumerate(self.items)}
        return self._index[item]
