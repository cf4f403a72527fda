"""Margins end to end through the commands, each number against an outside oracle:
pandas for shares, scipy for chi-square, two independent rakings for weights, numpy for
Kish's deff, the scenario's construction for who lacks a margin variable."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from scipy.stats import chisquare

from tests.cli_run import run_cli
from tests.weights.oracles import ipfn_rake, plain_rake
from tests.weights.scenario import make

POP = {
    "area": {1.0: ("north", 0.30), 2.0: ("centre", 0.45), 3.0: ("south", 0.25)},
    "age_group": {1.0: ("under30", 2100 / 8000), 2.0: ("mid", 3900 / 8000), 3.0: ("over60", 2000 / 8000)},
    "member": {1.0: ("yes", 0.35), 2.0: ("no", 0.65)},
}


@pytest.fixture(scope="module")
def scenario(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, Path, Path, pd.DataFrame]:
    return make(tmp_path_factory.mktemp("library"))


def _validate_json(scenario) -> dict:  # type: ignore[no-untyped-def]
    spec, export, margins, _ = scenario
    ran = run_cli("validate", str(spec), "--data", str(export), "--margins", str(margins), "--format", "json")
    assert ran.returncode in (0, 1), ran.stderr
    return json.loads(ran.stdout)


def test_dispositions_are_as_built(scenario) -> None:  # type: ignore[no-untyped-def]
    got = _validate_json(scenario)["dispositions"]
    truth = scenario[3]["disposition"].value_counts().to_dict()
    assert got["complete"] == truth["complete"] and got["partial"] == truth["partial"]
    assert got["outsider"] == truth["outsider"]


def test_representativeness_and_fit_against_pandas_and_scipy(scenario) -> None:  # type: ignore[no-untyped-def]
    out = _validate_json(scenario)
    truth = scenario[3]
    kept = truth[truth["disposition"].isin(["complete", "partial"])]
    rows = {(r["variable"], r["category"]): r for r in out["representativeness"]}
    for var, cats in POP.items():
        # Oracle: pandas' normalised value counts over kept respondents with a value.
        shares = kept[var].dropna().value_counts(normalize=True)
        counts = kept[var].dropna().value_counts()
        for code, (label, pop) in cats.items():
            r = rows[(var, label)]
            assert r["sample_share"] == pytest.approx(shares.get(code, 0.0), abs=1e-15)
            assert r["population_share"] == pytest.approx(pop, abs=1e-15)
            assert r["difference"] == pytest.approx(shares.get(code, 0.0) - pop, abs=1e-15)
        # Oracle: scipy.stats.chisquare on the observed counts and expected = share × n.
        obs = np.array([counts.get(code, 0) for code in cats])
        exp = np.array([p for _, p in cats.values()]) * obs.sum()
        stat, p = chisquare(obs, exp)
        fit = out["fit"][var]
        assert fit["chi2"] == pytest.approx(stat, rel=1e-9, abs=1e-6)
        assert fit["p"] == pytest.approx(p, rel=1e-6, abs=1e-9)
        assert fit["df"] == len(cats) - 1


def test_weight_missing_on_exactly_those_without_a_value(scenario) -> None:  # type: ignore[no-untyped-def]
    out = _validate_json(scenario)
    truth = scenario[3]
    kept = truth["disposition"].isin(["complete", "partial"])
    got = {(f["row"], f["item"]) for f in out["findings"] if f["check"] == "weight-missing"}
    want = {(i + 1, var) for var in POP for i in np.flatnonzero(kept & truth[var].isna())}
    assert got == want and len(want) == 11


def _weights_oracle(truth: pd.DataFrame, base: np.ndarray | None = None) -> tuple[pd.Series, np.ndarray]:
    kept = truth["disposition"].isin(["complete", "partial"]) & truth[list(POP)].notna().all(axis=1)
    sub = truth[kept]
    cats = [[list(POP[v]).index(x) for x in sub[v]] for v in POP]
    shares = [[p for _, p in POP[v].values()] for v in POP]
    b = None if base is None else base[kept.to_numpy()]
    return kept, np.array(plain_rake(cats, shares, b)), ipfn_rake(cats, shares, b)  # type: ignore[return-value]


def test_clean_weights_against_two_independent_rakings(scenario, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    spec, export, margins, truth = scenario
    ran = run_cli("clean", str(spec), "--data", str(export), "--margins", str(margins), "--out", str(tmp_path))
    assert ran.returncode == 0, ran.stderr
    cleaned = pd.read_csv(tmp_path / "library.cleaned.csv", dtype=str, keep_default_na=False)
    summary = json.loads((tmp_path / "summary.json").read_text())
    kept, plain, other = _weights_oracle(truth)
    w = pd.to_numeric(cleaned["weight"].replace("", np.nan)).to_numpy()
    assert np.isnan(w[~kept.to_numpy()]).all()  # blank for everyone not weighted
    ours = w[kept.to_numpy()]
    assert np.abs(ours - plain).max() < 1e-6
    assert np.abs(ours - other).max() < 1e-6
    assert ours.mean() == pytest.approx(1.0, abs=1e-12)
    s = summary["weights"]
    assert s["method"] == "rake" and s["converged"] is True and s["iterations"] >= 1
    # Kish: deff = 1 + CV² with the population variance (numpy's default ddof=0).
    assert s["deff"] == pytest.approx(1 + plain.var() / plain.mean() ** 2, rel=1e-9)
    assert s["effective_n"] == pytest.approx(len(plain) / s["deff"], rel=1e-12)
    assert s["min"] == pytest.approx(plain.min(), abs=1e-9) and s["max"] == pytest.approx(plain.max(), abs=1e-9)
    assert "decision for the study's own protocol" in s["caution"]
    assert any("only for the variables given" in note for note in summary["notes"])
    assert summary["findings"]["weight-missing"] == 11


def test_weighted_shares_meet_every_margin(scenario, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    spec, export, margins, _truth = scenario
    run_cli("clean", str(spec), "--data", str(export), "--margins", str(margins), "--out", str(tmp_path))
    cleaned = pd.read_csv(tmp_path / "library.cleaned.csv", dtype=str, keep_default_na=False)
    w = pd.to_numeric(cleaned["weight"].replace("", np.nan))
    has = w.notna()
    for var, cats in POP.items():
        shares = w[has].groupby(pd.to_numeric(cleaned.loc[has, var])).sum() / w[has].sum()
        for code, (_, pop) in cats.items():
            assert shares[code] == pytest.approx(pop, abs=1e-9)
