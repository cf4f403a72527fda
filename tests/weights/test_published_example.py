"""A published example sample with its own design weights: the R `survey` package's
`apiclus1` (a cluster sample of California school districts, weights `pw`), raked to the
population counts of its `rake()` example. The export in `apiclus1/` was written from
that data set (school code as id; stype E/M/H → 1/2/3, sch.wide No/Yes → 1/2).

References: R's `survey` package (`rake()`, run here when Rscript and the package are
installed, e.g. Debian's r-cran-survey) and the `ipfn` package (always)."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from tests.cli_run import run_cli
from tests.weights.oracles import ipfn_rake, r_available, r_rake_apiclus1

HERE = Path(__file__).parent / "apiclus1"


@pytest.fixture(scope="module")
def cleaned(tmp_path_factory: pytest.TempPathFactory) -> tuple[pd.DataFrame, dict]:
    out = tmp_path_factory.mktemp("apiclus1")
    ran = run_cli("clean", str(HERE / "spec.qlc"), "--data", str(HERE / "export.csv"),
                  "--margins", str(HERE / "margins.toml"), "--out", str(out))
    assert ran.returncode == 0, ran.stderr
    frame = pd.read_csv(out / "export.cleaned.csv", dtype=str, keep_default_na=False)
    return frame, json.loads((out / "summary.json").read_text())


def test_every_school_weighted(cleaned) -> None:  # type: ignore[no-untyped-def]
    frame, summary = cleaned
    assert len(frame) == 183 and (frame["weight"] != "").all()
    assert summary["weights"]["n"] == 183 and summary["weights"]["converged"] is True
    assert summary["weights"]["base"] == "pw"


def test_against_ipfn(cleaned) -> None:  # type: ignore[no-untyped-def]
    frame, _summary = cleaned
    cats = [(frame["stype"].astype(int) - 1).tolist(), (frame["sch_wide"].astype(int) - 1).tolist()]
    shares = [np.array([4421, 1018, 755]) / 6194, np.array([1072, 5122]) / 6194]
    theirs = ipfn_rake(cats, shares, frame["pw"].astype(float).to_numpy())
    ours = frame["weight"].astype(float).to_numpy()
    assert np.abs(ours - theirs).max() < 1e-6


def test_against_r_survey_rake(cleaned) -> None:  # type: ignore[no-untyped-def]
    if not r_available():
        pytest.skip("Rscript with the survey package is not installed (Debian: apt-get install r-base-core r-cran-survey)")
    frame, summary = cleaned
    ref = r_rake_apiclus1()
    theirs = pd.Series(np.asarray(ref["w"], dtype=float), index=ref["id"])
    theirs = theirs.reindex(frame["id"]).to_numpy()
    # R's weights sum to the population (6194 schools); ours have mean 1: compare on one scale.
    theirs = theirs / theirs.mean()
    ours = frame["weight"].astype(float).to_numpy()
    assert np.abs(ours - theirs).max() < 1e-6
    w = summary["weights"]
    assert w["deff"] == pytest.approx(ref["deff"], rel=1e-9)
    assert w["effective_n"] == pytest.approx(ref["neff"], rel=1e-9)
    assert w["min"] == pytest.approx(theirs.min(), rel=1e-6)
    assert w["max"] == pytest.approx(theirs.max(), rel=1e-6)
