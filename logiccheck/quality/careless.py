"""Careless responding: straight-lining and repeating patterns in grids, speeders, and
respondents outside the sample frame. Vectorised over respondents."""

from __future__ import annotations

import re
from collections.abc import Sequence

import numpy as np
import pandas as pd

from logiccheck.quality.config import CarelessConfig, SpeedConfig
from logiccheck.quality.findings import Finding, finding


def _packed(values: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Answered values of each row moved to the left, in order; and how many there are."""
    blank = np.isnan(values)
    order = np.argsort(blank, axis=1, kind="stable")
    packed = np.take_along_axis(values, order, axis=1)
    return packed, (~blank).sum(axis=1)


def longest_run(packed: np.ndarray, count: np.ndarray) -> np.ndarray:
    """Longest run of identical consecutive answers per row (blanks skipped)."""
    m = packed.shape[1]
    cur = np.where(count > 0, 1, 0)
    run = cur.copy()
    for j in range(1, m):
        valid = j < count
        same = valid & (packed[:, j] == packed[:, j - 1])
        cur = np.where(same, cur + 1, np.where(valid, 1, cur))
        run = np.maximum(run, cur)
    return run


def grid_measures(values: np.ndarray) -> pd.DataFrame:
    """Per respondent: answered rows, within-grid standard deviation (population), and
    the longest run of identical answers."""
    values = values.astype(float)
    packed, count = _packed(values)
    safe = np.maximum(count, 1)
    mean = np.nansum(values, axis=1) / safe
    sd = np.sqrt(np.nansum((values - mean[:, None]) ** 2, axis=1) / safe)
    return pd.DataFrame({"answered": count, "sd": np.where(count > 0, sd, np.nan), "longest_run": longest_run(packed, count)})


def repeating_period(values: np.ndarray, min_length: int, max_period: int) -> np.ndarray:
    """Per respondent, the smallest period p (2..max_period) such that the answered values
    repeat with period p over at least `min_length` answers and at least two full
    cycles, and the cycle is not one value (that is straight-lining); 0 when none."""
    packed, count = _packed(values.astype(float))
    n, m = packed.shape
    found = np.zeros(n, dtype=np.int64)
    long_enough = count >= min_length
    for p in range(2, max_period + 1):
        if m <= p:
            break
        idx = np.arange(p, m)
        valid = idx[None, :] < count[:, None]
        same = (packed[:, p:] == packed[:, :-p]) | ~valid
        cycle = packed[:, :p]
        varied = (cycle != cycle[:, :1]).any(axis=1)
        hit = same.all(axis=1) & long_enough & (count >= 2 * p) & varied & (found == 0)
        found[hit] = p
    return found


def grid_findings(
    ids: Sequence[object], grid: str, values: pd.DataFrame, config: CarelessConfig
) -> list[Finding]:
    """`straightline` and `pattern-response` for one grid. `values` holds the grid's rows
    as columns (respondents × rows), substantive codes only (non-response codes blank)."""
    arr = values.to_numpy(dtype=float)
    measures = grid_measures(arr)
    out: list[Finding] = []
    enough = measures["answered"].to_numpy() >= config.min_rows
    run_share = measures["longest_run"].to_numpy() / np.maximum(measures["answered"].to_numpy(), 1)
    flat = enough & ((measures["sd"].to_numpy() <= config.straightline_sd) | (run_share >= config.longest_run_share))
    for r in np.flatnonzero(flat):
        row = measures.iloc[r]
        out.append(
            finding(
                "straightline", ids[r], int(r),
                f"grid {grid}: {int(row['answered'])} rows answered, standard deviation {row['sd']:.2f}, "
                f"longest run of the same answer {int(row['longest_run'])}",
                item=grid, value=round(float(row["sd"]), 4),
            )
        )
    period = repeating_period(arr, config.pattern_min_length, config.pattern_max_period)
    for r in np.flatnonzero((period > 0) & ~flat):
        seq = arr[r][~np.isnan(arr[r])]
        cycle = "-".join(f"{v:g}" for v in seq[: period[r]])
        out.append(
            finding(
                "pattern-response", ids[r], int(r),
                f"grid {grid}: answers repeat the cycle {cycle} over {len(seq)} rows",
                item=grid, value=cycle,
            )
        )
    return out


def speeders(ids: Sequence[object], durations: pd.Series, config: SpeedConfig) -> list[Finding]:
    """Interview length below `fraction_of_median` × the median length of those with a
    recorded length (common practice, no source)."""
    d = pd.to_numeric(durations, errors="coerce").to_numpy(dtype=float)
    known = ~np.isnan(d) & (d > 0)
    if not known.any():
        return []
    median = float(np.median(d[known]))
    limit = config.fraction_of_median * median
    out = []
    for r in np.flatnonzero(known & (d < limit)):
        out.append(
            finding(
                "speeder", ids[r], int(r),
                f"interview took {d[r]:g} s, under {config.fraction_of_median:.2f} × the median {median:g} s",
                item=config.duration_column, value=float(d[r]),
            )
        )
    return out


_SPACE = re.compile(r"\s+")


def normalise_email(value: object) -> str | None:
    if value is None or (isinstance(value, float) and np.isnan(value)):
        return None
    text = _SPACE.sub("", str(value)).casefold()
    return text or None


def not_in_frame(
    ids: Sequence[object],
    emails: Sequence[object] | None,
    frame: pd.DataFrame,
    id_column: str = "id",
    email_column: str = "email",
) -> list[Finding]:
    """Respondents whose id is not in the frame, or whose e-mail (compared case- and
    space-insensitively) is not, where both files have e-mails."""
    has_id = id_column in frame.columns
    has_email = email_column in frame.columns and emails is not None
    if not has_id and not has_email:
        raise ValueError(f"sample frame has neither column {id_column!r} nor {email_column!r}")
    frame_ids = {str(v).strip() for v in frame[id_column].dropna()} if has_id else set()
    frame_emails = {e for e in map(normalise_email, frame[email_column]) if e} if has_email else set()
    out = []
    for r, rid in enumerate(ids):
        reasons = []
        if has_id and str(rid).strip() not in frame_ids:
            reasons.append(f"id {rid} is not in the sample frame")
        if has_email and emails is not None:
            mail = normalise_email(emails[r])
            if mail is not None and mail not in frame_emails:
                reasons.append(f"e-mail {emails[r]!s} is not in the sample frame")
        if reasons:
            out.append(finding("not-in-frame", rid, r, "; ".join(reasons)))
    return out
