"""Who answered against the population: per margin variable, each kept respondent's
category; the representativeness table, chi-square fit, response rates from a sample
frame, and raked weights. Computed once per run (memoised on the context) and read by
the `weight-missing` and `sparse-cell` checks and the `weights` analysis."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

from logiccheck.weights.margins import Margins, MarginsError, Variable
from logiccheck.weights.rake import RakeResult, effective_n, kish_deff, rake

if TYPE_CHECKING:
    from logiccheck.checks.data_context import DataContext

MEMO_KEY = "weights"
CAUTION = (
    "Weighting adjusts only for the variables given in the margins file; it cannot correct "
    "differences on anything else. It enlarges the variance of estimates, most for small "
    "groups (see the effective n), and whether and how to weight is a decision for the "
    "study's own protocol."
)


@dataclass
class Prepared:
    margins: Margins
    kept: np.ndarray  # disposition is one the margins file's [weights] respondents lists
    cells: dict[str, np.ndarray]  # variable -> category index per respondent (-1: no value)
    base: np.ndarray | None  # base weights (NaN where blank, not a number or not above 0)
    weighted: np.ndarray  # kept, a category on every variable, a usable base weight
    notes: list[str] = field(default_factory=list)
    _raked: RakeResult | None = None
    _rake_error: str | None = None


def margins_of(ctx: DataContext) -> Margins | None:
    m = ctx.options.get("margins")
    return m if isinstance(m, Margins) else None


def _cells(ctx: DataContext, var: Variable, kept: np.ndarray) -> np.ndarray:
    values = np.asarray(ctx.value_of(var.name), dtype=float)
    codes = np.asarray(var.codes, dtype=float)
    # Index of each value in the listed codes; -1 where blank or not listed.
    order = np.argsort(codes)
    pos = np.searchsorted(codes[order], values)
    pos = np.clip(pos, 0, len(codes) - 1)
    hit = codes[order][pos] == values
    idx = np.where(hit, order[pos], -1)
    # A non-response code the file does not list is no value (`weight-missing`); a
    # substantive code it does not list would leave those respondents out silently.
    nr_codes = [float(o.value) for o in ctx.q.nonresponse]
    unlisted = kept & ~hit & ~np.isnan(values) & ~np.isin(values, nr_codes)
    if unlisted.any():
        codes_list = ctx.q.item_codes(ctx.q.symbols[var.name].stmt)
        labels = {float(o.value): o.label for o in (codes_list.options if codes_list else [])}
        first = float(values[unlisted][0])
        label = labels.get(first, f"{first:g}")
        count = int(np.sum(values[unlisted] == first))
        margins = margins_of(ctx)
        raise MarginsError(
            f"{margins.file if margins else 'margins'}: key `margins.{var.name}`: {count} kept respondent(s) are "
            f"`{label}`, which has no population share; add `{label} = SHARE` (or merge it into a listed category)"
        )
    return idx.astype(np.int64)


def prepare(ctx: DataContext) -> Prepared | None:
    """Categories, kept and weighted respondents (once per run); None without margins."""
    margins = margins_of(ctx)
    if margins is None:
        return None
    done = ctx.memo.get(MEMO_KEY)
    if done is not None:
        return done
    s = margins.settings
    kept = np.isin(ctx.disposition.astype(str), s.respondents)
    cells = {v.name: _cells(ctx, v, kept) for v in margins.variables}
    base = None
    weighted = kept.copy()
    for idx in cells.values():
        weighted &= idx >= 0
    if s.base is not None:
        text = ctx.text_of(s.base)
        if text is None:
            raise MarginsError(f"{margins.file}: key `weights.base`: the export has no column `{s.base}`")
        base = _positive_numbers(text)
        weighted &= ~np.isnan(base)
    prepared = Prepared(margins, kept, cells, base, weighted)
    ctx.memo[MEMO_KEY] = prepared
    return prepared


def _positive_numbers(text: np.ndarray) -> np.ndarray:
    """Cells as numbers; NaN where blank, not a number, not finite or not above 0."""
    values = pd.to_numeric(pd.Series(text, dtype=object).astype("string").str.strip(), errors="coerce")
    out = values.to_numpy(dtype=float, na_value=np.nan)
    out[~np.isfinite(out) | (out <= 0)] = np.nan
    return out


def representativeness(p: Prepared) -> tuple[list[dict[str, Any]], dict[str, dict[str, Any]]]:
    """Rows (variable, category, sample_share, population_share, difference, sample_count)
    over kept respondents with a value on the variable, and the chi-square fit per variable."""
    from scipy.stats import chisquare

    rows: list[dict[str, Any]] = []
    fit: dict[str, dict[str, Any]] = {}
    for var in p.margins.variables:
        idx = p.cells[var.name][p.kept]
        idx = idx[idx >= 0]
        counts = np.bincount(idx, minlength=len(var.categories)).astype(float)
        n = int(counts.sum())
        shares = np.asarray(var.shares)
        for k, cat in enumerate(var.categories):
            sample = float(counts[k] / n) if n else None
            rows.append({
                "variable": var.name, "category": cat.label, "sample_share": sample,
                "population_share": cat.share, "difference": None if sample is None else sample - cat.share,
                "sample_count": int(counts[k]),
            })
        if n:
            stat, pvalue = chisquare(counts, shares * n)
            fit[var.name] = {"chi2": float(stat), "df": len(var.categories) - 1, "p": float(pvalue), "n": n}
        else:
            fit[var.name] = {"chi2": None, "df": len(var.categories) - 1, "p": None, "n": 0}
    return rows, fit


def response_rates(p: Prepared, ctx: DataContext) -> list[dict[str, Any]]:
    """Per category of each margin variable the sample frame holds: frame cases, kept
    respondents among them, and the rate (their ratio)."""
    sf = ctx.sample_frame
    if sf is None:
        return []
    id_column = getattr(getattr(ctx.config, "frame", None), "id_column", "id")
    if id_column not in sf.columns:
        return []
    kept_ids = {str(i) for i in ctx.ids[p.kept]}
    responded = sf[id_column].astype(str).isin(kept_ids).to_numpy()
    out: list[dict[str, Any]] = []
    for var in p.margins.variables:
        if var.name not in sf.columns:
            continue
        cells = sf[var.name].astype(str).str.strip()
        for cat in var.categories:
            mine = ((cells == cat.label) | (cells == f"{cat.code:g}")).to_numpy()
            cases = int(mine.sum())
            got = int((mine & responded).sum())
            out.append({"variable": var.name, "category": cat.label, "frame": cases, "respondents": got,
                        "response_rate": got / cases if cases else None})
    return out


def raked(p: Prepared) -> tuple[RakeResult | None, str | None]:
    """The raked weights over the weighted respondents (once), or why there are none."""
    if p._raked is not None or p._rake_error is not None:
        return p._raked, p._rake_error
    s = p.margins.settings
    w = p.weighted
    if not w.any():
        p._rake_error = "no kept respondent has a value on every margin variable: no weights"
        return None, p._rake_error
    cells = [p.cells[v.name][w] for v in p.margins.variables]
    for var, c in zip(p.margins.variables, cells, strict=True):
        empty = [cat.label for k, cat in enumerate(var.categories) if not (c == k).any()]
        if empty:
            p._rake_error = (f"{var.name} = {empty[0]} has no respondent to weight, so its population share "
                             "cannot be met: merge it with a neighbouring category in the margins file; no weights")
            return None, p._rake_error
    p._raked = rake(cells, [np.asarray(v.shares) for v in p.margins.variables],
                    None if p.base is None else p.base[w], tolerance=s.tolerance,
                    max_iterations=s.max_iterations, trim=s.trim)
    if not p._raked.converged:
        if s.trim is not None:
            p._raked.notes.append(
                f"weights: the margins cannot be met within the trim bounds [{s.trim[0]:g}, {s.trim[1]:g}]: after "
                f"{p._raked.iterations} sweeps a weighted share still differs from its population share by "
                f"{p._raked.max_difference:.3g}; widen the bounds or merge small categories")
        else:
            p._raked.notes.append(
                f"weights: raking did not converge in {p._raked.iterations} sweeps (largest difference "
                f"{p._raked.max_difference:.3g}, tolerance {s.tolerance:g}); raise [weights] max_iterations")
    return p._raked, None


def weight_column(p: Prepared, n: int) -> np.ndarray:
    """Mean 1 over the weighted respondents; NaN (blank) for everyone else."""
    out = np.full(n, np.nan)
    result, _ = raked(p)
    if result is not None:
        out[p.weighted] = result.weights
    return out


def diagnostics(p: Prepared) -> dict[str, Any]:
    """`summary.json`'s "weights"."""
    s = p.margins.settings
    result, error = raked(p)
    out: dict[str, Any] = {"method": s.method}
    if result is None:
        out |= {"iterations": 0, "converged": False, "min": None, "max": None, "deff": None, "effective_n": None,
                "n": 0}
    else:
        w = result.weights
        out |= {"iterations": result.iterations, "converged": result.converged, "min": float(w.min()),
                "max": float(w.max()), "deff": kish_deff(w), "effective_n": effective_n(w), "n": int(w.size)}
    out |= {
        "tolerance": s.tolerance, "max_iterations": s.max_iterations,
        "max_difference": None if result is None else result.max_difference,
        "base": s.base, "trim": list(s.trim) if s.trim else None,
        "trimmed": None if result is None else result.trimmed,
        "respondents": list(s.respondents), "variables": [v.name for v in p.margins.variables],
        "margins_file": p.margins.file, "caution": CAUTION,
    }
    if error:
        out["note"] = error
    return out
