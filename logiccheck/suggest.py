"""The one did-you-mean helper: the closest known name to a misspelt one."""

from __future__ import annotations

import difflib
from collections.abc import Iterable


def closest(word: str, options: Iterable[str], cutoff: float = 0.6) -> str | None:
    """The known name most like `word`, or None when none is close enough."""
    found = difflib.get_close_matches(word, list(options), n=1, cutoff=cutoff)
    return found[0] if found else None


def did_you_mean(word: str, options: Iterable[str], cutoff: float = 0.6) -> str:
    """"; did you mean `x`?" for a close name, else ""."""
    best = closest(word, options, cutoff)
    return f"; did you mean `{best}`?" if best else ""
