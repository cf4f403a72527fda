"""A starting spec drafted from an export: column types and answer lists (`infer`),
display conditions and stops mined from who answered what (`mine`), spec text (`write`)."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pyarrow as pa

from logiccheck.draft.infer import Inferred, infer, read_table
from logiccheck.draft.mine import Condition, explained, mine, sample_rows, stop_literal
from logiccheck.draft.write import Routed, render

Progress = Callable[[int, int], None]  # (steps done, steps in all)


@dataclass
class Draft:
    text: str
    inferred: Inferred
    routed: list[Routed]


def route(inferred: Inferred, *, seed: int = 0, progress: Progress | None = None) -> list[Routed]:
    """Mine each column's condition over the columns before it, in order; a stop is
    drafted after a column where the respondents with some value have nothing later."""
    cols = inferred.columns
    n = inferred.rows
    present = np.column_stack([c.var.present for c in cols]) if cols else np.zeros((n, 0), dtype=bool)
    # later[:, i]: the respondent has a value in some column after i.
    later = np.zeros_like(present)
    if cols:
        later[:, :-1] = np.logical_or.accumulate(present[:, ::-1], axis=1)[:, ::-1][:, 1:]
    alive = np.ones(n, dtype=bool)
    sample = sample_rows(n, seed)
    small = [c.var.subset(sample) for c in cols] if sample is not None else None
    out: list[Routed] = []
    for i, c in enumerate(cols):
        if progress is not None:
            progress(i, len(cols))
        answered = c.var.present
        got = mine([p.var for p in cols[:i]], answered, alive, sample=sample,
                   sampled=small[:i] if small is not None else None)
        r = Routed(c, got.condition, got.share)
        if i + 1 < len(cols):
            lit = stop_literal(c.var, ~later[:, i], alive)
            if lit is not None:
                fires = lit.mask(c.var) & alive
                r.stop, r.stop_rows = lit, int(fires.sum())
                alive = alive & ~fires
        out.append(r)
    if progress is not None:
        progress(len(cols), len(cols))
    return out


def draft_table(table: pa.Table, source: str, *, decimal: str = ".", progress: Progress | None = None) -> Draft:
    """Draft a spec from an export already read; the draft lints without errors (a
    condition the linter rejects is dropped, with a note)."""
    inferred = infer(table, decimal=decimal)
    routed = route(inferred, progress=progress)
    text = render(source, inferred, routed)
    for _ in range(3):
        bad = _lint_errors(text, routed)
        if not bad:
            break
        vars_ = {r.column.var.name: r.column.var for r in routed}
        for r in bad:
            r.notes.append(f"the mined condition `{r.condition.text(vars_)}` was dropped: the linter rejects it")
            r.condition = Condition()
            r.share = explained(r.condition, vars_, r.column.var.present, np.ones(inferred.rows, dtype=bool)) / max(inferred.rows, 1)
        text = render(source, inferred, routed)
    return Draft(text, inferred, routed)


def draft_file(path: str | Path, *, encoding: str | None = None, decimal: str = ".", progress: Progress | None = None) -> Draft:
    return draft_table(read_table(path, encoding), Path(path).name, decimal=decimal, progress=progress)


def _lint_errors(text: str, routed: list[Routed]) -> list[Routed]:
    """Drafted items (or whole draft, as every conditional item) the linter reports errors at."""
    from logiccheck.checks.runner import run_checks
    from logiccheck.loader import load_text

    loaded = load_text(text, "draft.qlc")
    errors = [d for d in run_checks(loaded) if d.severity.value == "error"]
    if not errors:
        return []
    names = {d.item for d in errors if d.item}
    return [r for r in routed if r.column.var.name in names and r.condition.literals]
