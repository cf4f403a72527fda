"""Default dispositions: the stop that fired, else by the share of due items answered.

The thresholds (complete above 80 %, partial 50–80 %, break-off below 50 %) are the
example thresholds the AAPOR Standard Definitions give for treating a case as a
complete or partial interview (from memory). The completeness rule language of the
quality stage may replace this rule; the measures it reads stay on the result.
"""

from __future__ import annotations

import numpy as np

COMPLETE_ABOVE = 0.8  # AAPOR Standard Definitions example threshold (from memory)
PARTIAL_FROM = 0.5  # AAPOR Standard Definitions example threshold (from memory)
BASE = ("complete", "partial", "break-off")


def answered_share(answered: np.ndarray, due: np.ndarray) -> np.ndarray:
    """Share of due items answered; 1.0 where nothing was due."""
    with np.errstate(invalid="ignore", divide="ignore"):
        share = np.where(due > 0, answered / np.maximum(due, 1), 1.0)
    return share.astype(np.float64)


def default_dispositions(share: np.ndarray, stop_names: np.ndarray) -> np.ndarray:
    """One disposition per respondent: a stop name where a stop fired, else by share."""
    out = np.where(share > COMPLETE_ABOVE, "complete", np.where(share >= PARTIAL_FROM, "partial", "break-off"))
    out = out.astype(object)
    stopped = stop_names != ""
    out[stopped] = stop_names[stopped]
    return out


def tally(dispositions: np.ndarray, stops: list[str]) -> dict[str, int]:
    """Counts per disposition, every base disposition and stop listed (zero included)."""
    got: dict[str, int] = {}
    if len(dispositions):
        names, counts = np.unique(dispositions.astype(str), return_counts=True)
        got = {str(x): int(c) for x, c in zip(names.tolist(), counts.tolist(), strict=True)}
    out = {name: got.pop(name, 0) for name in (*BASE, *stops)}
    out.update(got)
    return out
