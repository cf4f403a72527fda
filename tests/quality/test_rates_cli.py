"""`logiccheck rates` on a sample file; config validation of the quality tables."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from click.testing import CliRunner
from pydantic import ValidationError

from logiccheck.cli.main import cli
from logiccheck.quality.config import QualityConfig


def test_rates_from_cases_and_counts(tmp_path: Path) -> None:
    # The worked example: I=5, P=3, R=2, NC=1, O=2, UH=1, UO=1 (AAPOR Standard Definitions
    # formulas, hand-computed: RR1 = 1/3, RR3 = 5/14 with e = 0.5).
    cases = ["I"] * 5 + ["partial"] * 3 + ["refusal"] * 2 + ["NC", "O", "O", "UH", "UO"]
    (tmp_path / "cases.csv").write_text("id,outcome\n" + "".join(f"{i},{c}\n" for i, c in enumerate(cases)))
    (tmp_path / "counts.csv").write_text("outcome,count\nI,5\nP,3\nR,2\nNC,1\nO,2\nUH,1\nUO,1\n")
    runner = CliRunner()
    for name in ("cases.csv", "counts.csv"):
        res = runner.invoke(cli, ["rates", str(tmp_path / name), "--e", "0.5", "--format", "json"])
        assert res.exit_code == 0, res.output
        rates = json.loads(res.output)["rates"]
        assert rates["RR1"] == pytest.approx(1 / 3) and rates["RR3"] == pytest.approx(5 / 14)
    res = runner.invoke(cli, ["rates", str(tmp_path / "cases.csv"), "--color", "never"])
    assert "RR1 0.3333" in res.output and "estimated" in res.output
    (tmp_path / "bad.csv").write_text("outcome\nI\nwho knows\n")
    res = runner.invoke(cli, ["rates", str(tmp_path / "bad.csv")])
    assert res.exit_code == 2 and "case 2: unknown outcome 'who knows'" in res.output


def test_config_is_strict() -> None:
    with pytest.raises(ValidationError):
        QualityConfig.model_validate({"duplicates": {"near_treshold": 0.9}})
    with pytest.raises(ValidationError):
        QualityConfig.model_validate({"completeness": {"complete_above": 0.4, "partial_from": 0.6}})
    cfg = QualityConfig.model_validate({"careless": {"min_rows": 5}})
    assert cfg.careless.min_rows == 5 and cfg.thresholds()["completeness"]["complete_above"] == 0.8
