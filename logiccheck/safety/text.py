"""Long cell values are cut before they reach a message: the first characters, an
ellipsis and the value's full length, e.g. "abc… (1,048,576 characters)"."""

from __future__ import annotations

MAX_VALUE_CHARS = 120


def clip(value: str, limit: int = MAX_VALUE_CHARS) -> str:
    if len(value) <= limit:
        return value
    return f"{value[:limit]}… ({len(value):,} characters)"
