"""The `weights` analysis: representativeness and fit (validate), the `weight` column and
the weighting diagnostics (clean), whenever a margins file is given."""

from __future__ import annotations

from logiccheck.checks.analyses import Analysis, analysis
from logiccheck.checks.data_context import DataContext
from logiccheck.weights.compute import (
    CAUTION,
    diagnostics,
    prepare,
    raked,
    representativeness,
    response_rates,
    weight_column,
)


@analysis("weights")
def weights_analysis(ctx: DataContext) -> Analysis | None:
    p = prepare(ctx)
    if p is None:
        return None
    rows, fit = representativeness(p)
    sections = {"representativeness": rows, "fit": fit}
    rates = response_rates(p, ctx)
    if rates:
        sections["response_rates"] = rates
    summary = diagnostics(p)
    sections["weights"] = summary
    result, error = raked(p)
    notes = [*(result.notes if result else []), *([f"weights: {error}"] if error else []), CAUTION]
    return Analysis(sections=sections, columns={"weight": weight_column(p, ctx.n)}, summary={"weights": summary},
                    notes=notes)
