"""The one did-you-mean helper: the closest known name to a misspelt one."""

from __future__ import annotations

import difflib
from collections.abc import Iterable


def closest(word: str, options: Iterable[str], cutoff: float = 0.6) -> str | None:
    """The known name most like `word`, or None when none is close enough."""
    best, score = None, cutoff
    for option in options:
        # difflib's ratio depends on argument order; take the kinder of the two.
        r = max(difflib.SequenceMatcher(None, word, option).ratio(), difflib.SequenceMatcher(None, option, word).ratio())
        if r >= score and (best is None or r > score):
            best, score = option, r
    return best


def did_you_mean(word: str, options: Iterable[str], cutoff: float = 0.6) -> str:
    """"; did you mean `x`?" for a close name, else ""."""
    best = closest(word, options, cutoff)
    return f"; did you mean `{best}`?" if best else ""
