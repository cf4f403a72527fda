"""Run the registered data and quality checks over one pipeline context.

The runner stamps each check's name and severity on what it returns; a check that
raises becomes one `internal-error` finding naming it, so one broken check never hides
the others.
"""

from __future__ import annotations

import time
from collections.abc import Iterable

import numpy as np

from logiccheck.checks.data_context import DataContext
from logiccheck.checks.registry import CheckInfo, all_checks
from logiccheck.data.findings import FindingBlock, Hits
from logiccheck.diagnostics import Severity

_EMPTY = np.zeros(0, dtype=np.int64)


def block_of(info: CheckInfo, hits: Hits, ids: np.ndarray) -> FindingBlock:
    """A finding block for `hits`, stamped with the declared check's name and severity."""
    rows = np.asarray(hits.rows, dtype=np.int64)
    per_row = isinstance(hits.message, list)
    if per_row and len(hits.message) != rows.size:
        raise ValueError(f"check {info.name}: {len(hits.message)} messages for {rows.size} rows")
    return FindingBlock(
        check=info.name,
        severity=info.severity,
        item=hits.item,
        message="" if per_row else str(hits.message),
        rows=rows,
        ids=ids[rows] if rows.size else None,
        values=hits.values,
        messages=list(hits.message) if per_row else None,
    )


def run_data_checks(
    ctx: DataContext, stages: Iterable[str] = ("data", "quality"), disable: Iterable[str] = (),
    timings: dict[str, float] | None = None,
) -> list[FindingBlock]:
    """Every registered data/quality check with a runner, in declaration order.
    `timings`: filled with each check's seconds (wall), where given."""
    off = set(disable)
    wanted = set(stages)
    out: list[FindingBlock] = []
    for info in all_checks().values():
        if info.data_run is None or info.stage not in wanted or info.name in off:
            continue
        started = time.perf_counter()
        try:
            for hits in info.data_run(ctx):
                out.append(block_of(info, hits, ctx.ids))
        except Exception as err:  # noqa: BLE001 - reported as a finding instead
            out.append(
                FindingBlock("internal-error", Severity.error, None,
                             f"check `{info.name}` failed: {type(err).__name__}: {err}", _EMPTY)
            )
        if timings is not None:
            timings[f"check {info.name}"] = time.perf_counter() - started
    return out
