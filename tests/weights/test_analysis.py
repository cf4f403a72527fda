"""The weights analysis: response rates from a sample frame, notes when weights cannot be
made or margins not met, base weights, and the registry hooks."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from logiccheck.checks.analyses import all_analyses
from tests.cli_run import run_cli
from tests.weights.scenario import MARGINS, make


def test_weights_analysis_is_registered() -> None:
    assert "weights" in all_analyses()


def test_response_rate_per_category_from_the_frame(tmp_path: Path) -> None:
    spec, export, margins, truth = make(tmp_path, n=200)
    rng = np.random.default_rng(5)
    extra = pd.DataFrame({"id": [f"X{i}" for i in range(150)], "area": rng.choice(["1", "2", "3"], 150)})
    frame = pd.concat([pd.DataFrame({"id": truth["id"], "area": truth["area"].map(lambda v: "" if pd.isna(v) else str(int(v)))}),
                       extra], ignore_index=True)
    frame.to_csv(tmp_path / "frame.csv", index=False)
    ran = run_cli("validate", str(spec), "--data", str(export), "--margins", str(margins),
                  "--frame", str(tmp_path / "frame.csv"), "--format", "json")
    rates = {(r["variable"], r["category"]): r for r in json.loads(ran.stdout)["response_rates"]}
    assert {v for v, _ in rates} == {"area"}  # the frame holds only this margin variable
    # Oracle: pandas over the frame, responding = kept disposition in the export.
    kept = set(truth.loc[truth["disposition"].isin(["complete", "partial"]), "id"])
    for code, label in (("1", "north"), ("2", "centre"), ("3", "south")):
        cases = frame[frame["area"] == code]
        r = rates[("area", label)]
        assert r["frame"] == len(cases)
        assert r["respondents"] == cases["id"].isin(kept).sum()
        assert r["response_rate"] == r["respondents"] / len(cases)
    text = run_cli("validate", str(spec), "--data", str(export), "--margins", str(margins),
                   "--frame", str(tmp_path / "frame.csv"))
    assert "response rate" in text.stdout and "chi-square" in text.stdout


def test_trim_bounds_that_cannot_be_met_give_a_note(tmp_path: Path) -> None:
    spec, export, margins, _ = make(tmp_path, n=200, margins=MARGINS + "trim = [0.9, 1.1]\nmax_iterations = 50\n")
    ran = run_cli("clean", str(spec), "--data", str(export), "--margins", str(margins), "--out", str(tmp_path / "o"))
    assert ran.returncode == 0, ran.stderr
    summary = json.loads((tmp_path / "o" / "summary.json").read_text())
    w = summary["weights"]
    assert w["converged"] is False and w["iterations"] == 50 and w["trim"] == [0.9, 1.1]
    assert 0.9 - 1e-9 <= w["min"] and w["max"] <= 1.1 + 1e-9
    assert any("cannot be met within the trim bounds" in note for note in summary["notes"])


def test_an_empty_category_gives_no_weights_and_says_why(tmp_path: Path) -> None:
    text = MARGINS.replace("[margins.member]\nyes = 0.35\nno = 0.65\n", "")
    spec, export, margins, _ = make(tmp_path, n=120, margins=text + "[margins.resident]\nyes = 0.9\nno = 0.1\n")
    ran = run_cli("clean", str(spec), "--data", str(export), "--margins", str(margins), "--out", str(tmp_path / "o"))
    assert ran.returncode == 0, ran.stderr
    summary = json.loads((tmp_path / "o" / "summary.json").read_text())
    # Everyone answering `no` is screened out, so no kept respondent carries that category.
    assert summary["weights"]["deff"] is None and "resident = no has no respondent" in summary["weights"]["note"]
    cleaned = pd.read_csv(tmp_path / "o" / "library.cleaned.csv", dtype=str, keep_default_na=False)
    assert (cleaned["weight"] == "").all()
    v = run_cli("validate", str(spec), "--data", str(export), "--margins", str(margins), "--format", "json")
    sparse = [f for f in json.loads(v.stdout)["findings"] if f["check"] == "sparse-cell" and f["item"] == "resident"]
    assert any("resident = no: 0 kept" in f["message"] for f in sparse)


def test_base_weights_and_respondents_without_one(tmp_path: Path) -> None:
    spec, export, margins, truth = make(tmp_path, n=150, margins=MARGINS + 'base = "dw"\n')
    data = pd.read_csv(export, dtype=str, keep_default_na=False)
    rng = np.random.default_rng(2)
    data["dw"] = [f"{x:.3f}" for x in rng.uniform(1, 5, len(data))]
    data.loc[[3, 10], "dw"] = ["", "-1"]
    data.to_csv(export, index=False)
    ran = run_cli("validate", str(spec), "--data", str(export), "--margins", str(margins), "--format", "json")
    kept = truth["disposition"].isin(["complete", "partial"]).to_numpy()
    got = {f["row"] for f in json.loads(ran.stdout)["findings"] if f["check"] == "weight-missing" and f["item"] == "dw"}
    assert got == {r + 1 for r in (3, 10) if kept[r]}
    out = run_cli("clean", str(spec), "--data", str(export), "--margins", str(margins), "--out", str(tmp_path / "o"))
    assert out.returncode == 0, out.stderr
    cleaned = pd.read_csv(tmp_path / "o" / "library.cleaned.csv", dtype=str, keep_default_na=False)
    assert cleaned.loc[3, "weight"] == "" and cleaned.loc[10, "weight"] == ""


def test_a_missing_base_column_stops_the_run(tmp_path: Path) -> None:
    spec, export, margins, _ = make(tmp_path, n=60, margins=MARGINS + 'base = "dw"\n')
    ran = run_cli("validate", str(spec), "--data", str(export), "--margins", str(margins))
    assert ran.returncode == 2 and "key `weights.base`: the export has no column `dw`" in ran.stderr


def test_notebook_api_validate_and_clean_with_margins(tmp_path: Path) -> None:
    import logiccheck

    spec, export, margins, _ = make(tmp_path, n=150)
    survey = logiccheck.load(spec)
    v = survey.validate(export, margins=margins)
    cli = json.loads(run_cli("validate", str(spec), "--data", str(export), "--margins", str(margins),
                             "--format", "json").stdout)
    assert v.raw.to_json()["fit"] == cli["fit"]
    assert v.representativeness.to_dict("records") == cli["representativeness"]
    c = survey.clean(export, margins=margins)
    on_cli = run_cli("clean", str(spec), "--data", str(export), "--margins", str(margins), "--out", str(tmp_path / "o"))
    assert on_cli.returncode == 0
    file = pd.read_csv(tmp_path / "o" / "library.cleaned.csv", dtype=str, keep_default_na=False)
    assert c.cleaned["weight"].tolist() == file["weight"].tolist()
    assert c.summary["weights"] == json.loads((tmp_path / "o" / "summary.json").read_text())["weights"] | {
        "margins_file": c.summary["weights"]["margins_file"]}


def test_weights_follow_the_respondents_the_policy_keeps(tmp_path: Path) -> None:
    spec, export, margins, truth = make(tmp_path, n=200)
    policy = tmp_path / "policy.toml"
    policy.write_text('[clean]\nkeep_dispositions = ["complete", "outsider"]\n', encoding="utf-8")
    ran = run_cli("clean", str(spec), "--data", str(export), "--margins", str(margins), "--policy", str(policy),
                  "--out", str(tmp_path / "o"))
    assert ran.returncode == 0, ran.stderr
    cleaned = pd.read_csv(tmp_path / "o" / "library.cleaned.csv", dtype=str, keep_default_na=False)
    assert len(cleaned) == int((truth["disposition"] != "partial").sum())
    w = pd.to_numeric(cleaned["weight"].replace("", np.nan))
    has = w.notna()
    # Partials were removed: the weights are raked again over the completes that remain.
    assert w[has].mean() == pytest.approx(1.0, abs=1e-12)
    shares = w[has].groupby(pd.to_numeric(cleaned.loc[has, "member"])).sum() / w[has].sum()
    assert shares[1.0] == pytest.approx(0.35, abs=1e-9) and shares[2.0] == pytest.approx(0.65, abs=1e-9)
    summary = json.loads((tmp_path / "o" / "summary.json").read_text())
    assert summary["weights"]["n"] == int(has.sum())
