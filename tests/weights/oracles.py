"""Independent rakings the tests compare ours against.

`plain_rake`: iterative proportional fitting as Deming & Stephan (1940) describe it,
written as a plain loop over respondents and categories (no numpy). `ipfn_rake`: the
`ipfn` package (PyPI), raking a pandas frame with one row per respondent.
`r_rake`: R's `survey` package (`rake()`), where Rscript and the package are installed.
"""

from __future__ import annotations

import json
import shutil
import subprocess
import warnings
from collections.abc import Sequence

import numpy as np
import pandas as pd


def plain_rake(cats: Sequence[Sequence[int]], shares: Sequence[Sequence[float]], base: Sequence[float] | None = None,
               sweeps: int = 5000, tol: float = 1e-13) -> list[float]:
    """cats[v][i]: respondent i's category on variable v; shares[v][k]: population shares."""
    n = len(cats[0])
    w = [1.0] * n if base is None else [float(b) for b in base]
    total = sum(w)
    for _ in range(sweeps):
        change = 0.0
        for v in range(len(cats)):
            sums = [0.0] * len(shares[v])
            for i in range(n):
                sums[cats[v][i]] += w[i]
            for i in range(n):
                k = cats[v][i]
                f = shares[v][k] * total / sums[k]
                change = max(change, abs(f - 1.0))
                w[i] *= f
        if change < tol:
            break
    mean = sum(w) / n
    return [x / mean for x in w]


def ipfn_rake(cats: Sequence[Sequence[int]], shares: Sequence[Sequence[float]], base: Sequence[float] | None = None) -> np.ndarray:
    from ipfn import ipfn

    n = len(cats[0])
    df = pd.DataFrame({f"v{v}": list(c) for v, c in enumerate(cats)})
    df["total"] = np.ones(n) if base is None else np.asarray(base, dtype=float)
    total = df["total"].sum()
    aggregates = [pd.Series(np.asarray(s) * total, index=range(len(s))) for s in shares]
    for agg in aggregates:
        agg.index.name = None
    dims = [[f"v{v}"] for v in range(len(cats))]
    with warnings.catch_warnings():  # the package uses pandas calls that newer pandas deprecates
        warnings.simplefilter("ignore")
        out = ipfn.ipfn(df, [a.rename_axis(f"v{v}") for v, a in enumerate(aggregates)], dims, weight_col="total",
                        convergence_rate=1e-15, max_iteration=5000, rate_tolerance=0).iteration()
    w = out["total"].to_numpy(dtype=float)
    return w / w.mean()


R_SCRIPT = r"""
suppressMessages(library(survey))
data(api)
# The package's own example: a cluster sample of school districts with its design
# weights, raked to population counts by school type and by school-wide target met.
dclus1 <- svydesign(id = ~dnum, weights = ~pw, data = apiclus1, fpc = ~fpc)
pop.types <- data.frame(stype = c("E", "H", "M"), Freq = c(4421, 755, 1018))
pop.schwide <- data.frame(sch.wide = c("No", "Yes"), Freq = c(1072, 5122))
r <- rake(dclus1, list(~stype, ~sch.wide), list(pop.types, pop.schwide),
          control = list(maxit = 1000, epsilon = 1e-12, verbose = FALSE))
w <- weights(r)
cat(paste0('{"id": [', paste0('"', apiclus1$cds, '"', collapse = ","), '], "w": [',
    paste(sprintf("%.17g", w), collapse = ","), '], "deff": ', sprintf("%.17g", length(w) * sum(w^2) / sum(w)^2),
    ', "neff": ', sprintf("%.17g", sum(w)^2 / sum(w^2)), '}'))
"""


def r_available() -> bool:
    if shutil.which("Rscript") is None:
        return False
    probe = subprocess.run(["Rscript", "-e", "library(survey)"], capture_output=True, text=True)
    return probe.returncode == 0


def r_rake_apiclus1() -> dict[str, object]:
    """R survey's raked weights for apiclus1 (ids, weights) and Kish's deff and n_eff of them."""
    run = subprocess.run(["Rscript", "-e", R_SCRIPT], capture_output=True, text=True, check=True)
    return json.loads(run.stdout)
