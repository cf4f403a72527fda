"""Data checks of the margins: kept respondents who cannot be weighted, and categories
too thin to weight. Both run only when a margins file is given."""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np

from logiccheck.checks.data_context import DataContext
from logiccheck.checks.registry import data_check
from logiccheck.data.findings import Hits
from logiccheck.weights.compute import Prepared, prepare
from logiccheck.weights.margins import MarginsError


def _prepared(ctx: DataContext) -> Prepared | None:
    """The shared preparation; margins that do not fit the export are the `weights`
    analysis's error to raise (the command stops with exit 2), not a check's."""
    try:
        return prepare(ctx)
    except MarginsError:
        return None


_SPEC = 'sample district single { central = 1 "Central", east = 2 "East", west = 3 "West" }'


@data_check(
    "weight-missing",
    severity="warning",
    stage="quality",
    summary="A kept respondent has no value on a margin variable, so gets no weight.",
    what="A respondent whose disposition the margins file's `[weights] respondents` keeps, but "
    "who has no value on a variable of the margins file (blank, invalid, or a non-response code "
    "the file gives no share), or no usable base weight. Raking needs every respondent's "
    "category on every margin variable; this respondent's `weight` is left blank.",
    why="Respondents without a weight drop out of every weighted estimate. If they differ from "
    "the others, weighted results are biased in a way the weights do not show.",
    bad=f"{_SPEC}\n# margins.toml: [margins.district] central = 0.5, east = 0.3, west = 0.2\n"
    "# export row 7: district is blank",
    good=f"{_SPEC}\n# export row 7: district = 2 (east), filled in from the sample file",
)
def weight_missing(ctx: DataContext) -> Iterator[Hits]:
    p = _prepared(ctx)
    if p is None:
        return
    for var in p.margins.variables:
        rows = np.flatnonzero(p.kept & (p.cells[var.name] < 0))
        if rows.size:
            yield Hits(rows, f"no value on margin variable `{var.name}`: this respondent gets no weight", item=var.name)
    if p.base is not None:
        rows = np.flatnonzero(p.kept & np.isnan(p.base))
        if rows.size:
            yield Hits(rows, f"base weight `{p.margins.settings.base}` is blank, not a number or not above 0: "
                             "this respondent gets no weight", item=p.margins.settings.base)


@data_check(
    "sparse-cell",
    severity="warning",
    stage="quality",
    summary="A category of a margin variable has fewer kept respondents than the threshold.",
    what="A category of a margins-file variable with fewer kept respondents (with a value) than "
    "`[weights] min_cell` (default 20; common practice, no source: figures between 20 and 50 are "
    "usual). Reported once per category.",
    why="The few respondents of a thin category carry its whole population share: their weights "
    "grow large, the variance of every weighted estimate grows (a smaller effective n), and one "
    "unusual respondent can move the results.",
    bad=f"{_SPEC}\n# 300 kept respondents, 6 of them west; margins give west 0.2",
    good="# merge the thin category with a neighbour in the spec's sample variable and the margins file:\n"
    'sample district single { central = 1 "Central", outer = 2 "East or West" }',
)
def sparse_cell(ctx: DataContext) -> Iterator[Hits]:
    p = _prepared(ctx)
    if p is None:
        return
    threshold = p.margins.settings.min_cell
    for var in p.margins.variables:
        idx = p.cells[var.name][p.kept]
        counts = np.bincount(idx[idx >= 0], minlength=len(var.categories))
        for k, cat in enumerate(var.categories):
            if counts[k] < threshold:
                yield Hits(np.zeros(0, dtype=np.int64),
                           f"{var.name} = {cat.label}: {int(counts[k])} kept respondent(s), fewer than {threshold} "
                           f"([weights] min_cell); its weights will be large and unstable: consider merging it "
                           "with a neighbouring category", item=var.name)
