"""Careless responding: straight-lining and repeating patterns in grids, speeders, and
respondents outside the sample frame. Vectorised over respondents."""

from __future__ import annotations

import re
from collections.abc import Sequence
from dataclasses import dataclass

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


@dataclass
class GridFlags:
    """Per respondent for one grid: flat (straight-lined), the repeating period (0: none)
    and the measures behind them."""

    flat: np.ndarray
    period: np.ndarray
    answered: np.ndarray
    sd: np.ndarray
    longest_run: np.ndarray


def grid_flags(values: np.ndarray, config: CarelessConfig) -> GridFlags:
    """Straight-lining and repeating cycles over a respondents × grid-rows matrix of
    substantive answers (NaN = blank), vectorised over respondents."""
    arr = values.astype(float)
    m = grid_measures(arr)
    answered = m["answered"].to_numpy()
    sd = m["sd"].to_numpy()
    run = m["longest_run"].to_numpy()
    enough = answered >= config.min_rows
    flat = enough & ((sd <= config.straightline_sd) | (run / np.maximum(answered, 1) >= config.longest_run_share))
    period = repeating_period(arr, config.pattern_min_length, config.pattern_max_period)
    period[flat] = 0
    return GridFlags(flat, period, answered, sd, run)


def straightline_message(grid: str, answered: int, sd: float, run: int) -> str:
    return (f"grid {grid}: {answered} rows answered, standard deviation {sd:.2f}, "
            f"longest run of the same answer {run}")


def cycle_text(row: np.ndarray, period: int) -> tuple[str, int]:
    """The repeated cycle as text (e.g. 1-5) and how many rows it covers."""
    seq = row[~np.isnan(row)]
    return "-".join(f"{v:g}" for v in seq[:period]), int(seq.size)


def grid_findings(
    ids: Sequence[object], grid: str, values: pd.DataFrame, config: CarelessConfig
) -> list[Finding]:
    """`straightline` and `pattern-response` for one grid. `values` holds the grid's rows
    as columns (respondents × rows), substantive codes only (non-response codes blank)."""
    arr = values.to_numpy(dtype=float)
    flags = grid_flags(arr, config)
    out: list[Finding] = []
    for r in np.flatnonzero(flags.flat).tolist():
        msg = straightline_message(grid, int(flags.answered[r]), float(flags.sd[r]), int(flags.longest_run[r]))
        out.append(finding("straightline", ids[r], int(r), msg, item=grid, value=round(float(flags.sd[r]), 4)))
    for r in np.flatnonzero(flags.period > 0).tolist():
        cycle, length = cycle_text(arr[r], int(flags.period[r]))
        out.append(
            finding("pattern-response", ids[r], int(r), f"grid {grid}: answers repeat the cycle {cycle} over {length} rows",
                    item=grid, value=cycle)
        )
    return out


@dataclass
class SpeedFlags:
    flag: np.ndarray  # per respondent
    per_item: np.ndarray  # seconds per item asked (NaN where not judged)
    median: float  # median seconds per item among those judged (NaN if none)


def speed_flags(seconds: np.ndarray, asked: np.ndarray, eligible: np.ndarray, fraction: float) -> SpeedFlags:
    """Speeders compared like with like: seconds per item asked, against the median of
    the `eligible` respondents (completes and partials) with a recorded length; only
    they can be flagged. Below `fraction` × that median is a speeder (common practice,
    no source)."""
    seconds = np.asarray(seconds, dtype=float)
    asked = np.asarray(asked, dtype=float)
    judged = eligible & ~np.isnan(seconds) & (seconds > 0) & (asked > 0)
    with np.errstate(divide="ignore", invalid="ignore"):
        per_item = np.where(judged, seconds / np.where(asked > 0, asked, 1.0), np.nan)
    if not judged.any():
        return SpeedFlags(np.zeros(seconds.size, bool), per_item, float("nan"))
    median = float(np.median(per_item[judged]))
    return SpeedFlags(judged & (per_item < fraction * median), per_item, median)


def speeders(ids: Sequence[object], durations: pd.Series, config: SpeedConfig) -> list[Finding]:
    """Interview length below `fraction_of_median` × the median length of everyone with a
    recorded length (no route or disposition known here; the `speeder` check compares
    seconds per item asked among completes and partials)."""
    d = pd.to_numeric(durations, errors="coerce").to_numpy(dtype=float)
    flags = speed_flags(d, np.ones(d.size), np.ones(d.size, bool), config.fraction_of_median)
    return [
        finding("speeder", ids[r], int(r),
                f"interview took {d[r]:g} s, under {config.fraction_of_median:.2f} × the median {flags.median:g} s",
                item=config.duration_column, value=float(d[r]))
        for r in np.flatnonzero(flags.flag).tolist()
    ]


_SPACE = re.compile(r"\s+")


def normalise_email(value: object) -> str | None:
    if value is None or (isinstance(value, float) and np.isnan(value)):
        return None
    text = _SPACE.sub("", str(value)).casefold()
    return text or None


def _normalised(values: Sequence[object] | np.ndarray) -> np.ndarray:
    """E-mails without spaces, case-folded; None where blank (vectorised)."""
    s = pd.Series(list(values), dtype=object)
    text = s.where(s.notna(), "").astype(str).str.replace(_SPACE, "", regex=True).str.casefold()
    out = text.to_numpy(dtype=object)
    out[out == ""] = None
    return out


@dataclass
class FrameFlags:
    id_missing: np.ndarray  # per respondent
    email_missing: np.ndarray


def frame_flags(
    ids: Sequence[object] | np.ndarray,
    emails: Sequence[object] | np.ndarray | None,
    frame: pd.DataFrame,
    id_column: str = "id",
    email_column: str = "email",
) -> FrameFlags:
    """Respondents whose id is not in the frame, and those whose e-mail (compared case-
    and space-insensitively) is not, where both files have e-mails."""
    has_id = id_column in frame.columns
    has_email = email_column in frame.columns and emails is not None
    if not has_id and not has_email:
        raise ValueError(f"sample frame has neither column {id_column!r} nor {email_column!r}")
    n = len(ids)
    id_missing = np.zeros(n, bool)
    if has_id:
        known = frame[id_column].dropna().astype(str).str.strip().to_numpy(dtype=object)
        mine = pd.Series(list(ids), dtype=object).astype(str).str.strip().to_numpy(dtype=object)
        id_missing = ~np.isin(mine, known)
    email_missing = np.zeros(n, bool)
    if has_email and emails is not None:
        known_mail = _normalised(frame[email_column].to_numpy(dtype=object))
        mine_mail = _normalised(emails)
        given = pd.notna(mine_mail)
        listed = known_mail[pd.notna(known_mail)]
        email_missing = given & ~np.isin(mine_mail, listed)
    return FrameFlags(id_missing, email_missing)


def frame_message(rid: object, email: object, id_missing: bool, email_missing: bool) -> str:
    reasons = []
    if id_missing:
        reasons.append(f"id {rid} is not in the sample frame")
    if email_missing:
        reasons.append(f"e-mail {email!s} is not in the sample frame")
    return "; ".join(reasons)


def not_in_frame(
    ids: Sequence[object],
    emails: Sequence[object] | None,
    frame: pd.DataFrame,
    id_column: str = "id",
    email_column: str = "email",
) -> list[Finding]:
    """Respondents whose id is not in the frame, or whose e-mail (compared case- and
    space-insensitively) is not, where both files have e-mails."""
    flags = frame_flags(ids, emails, frame, id_column, email_column)
    hit = np.flatnonzero(flags.id_missing | flags.email_missing)
    return [
        finding("not-in-frame", ids[r], int(r),
                frame_message(ids[r], emails[r] if emails is not None else None, bool(flags.id_missing[r]),
                              bool(flags.email_missing[r])))
        for r in hit.tolist()
    ]
