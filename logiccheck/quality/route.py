"""The route state the quality and cleaning stages read: respondents × items masks.

It is computed only by the data stage's evaluator (see `bridge.state_from_validation`);
this module holds its shape.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from logiccheck.model.questionnaire import Entry, Questionnaire


class RouteError(ValueError):
    """An export the route state cannot be computed for (e.g. no id column)."""


@dataclass
class RouteState:
    ids: list[str]
    items: list[str]  # items and grid rows in questionnaire order (the data stage's items)
    due: np.ndarray  # respondents × items
    has_value: np.ndarray
    valid: np.ndarray  # has a value and the value is valid
    nonresponse: np.ndarray  # the value is a non-response code
    stops: dict[str, np.ndarray] = field(default_factory=dict)
    checks_failed: dict[str, np.ndarray] = field(default_factory=dict)
    columns: dict[str, list[str]] = field(default_factory=dict)  # item -> its export columns

    def col(self, item: str) -> int:
        return self.items.index(item)


def item_columns(q: Questionnaire, entry: Entry) -> list[str]:
    """An item's export columns in the default layout (docs/formats.md)."""
    stmt = entry.stmt
    if stmt.type.kind == "multi":
        codes = q.item_codes(stmt)
        return [f"{stmt.name}_{o.value}" for o in (codes.options if codes else [])]
    if stmt.type.kind == "note":
        return []
    return [stmt.name]
