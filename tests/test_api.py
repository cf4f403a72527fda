"""The notebook API: the same records as the command line, as objects and DataFrames."""

from __future__ import annotations

import json
import subprocess
import sys

import pandas as pd
import pytest
from click.testing import CliRunner

import logiccheck
from logiccheck.cli.main import cli
from tests.report.fakes import fake_result

TYPO = 'survey t "T"\n\ncodes yesno\n  yes = 1 "Yes"\n  no = 2 "No"\n\nq1: single yesno "A?"\nq2: text "B?" when q_one = yes\n'


def test_import_stays_light() -> None:
    code = "import sys, logiccheck; print(sorted(m for m in ('pandas', 'matplotlib', 'jinja2', 'z3') if m in sys.modules))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.strip() == "[]"


def test_load_returns_the_questionnaire() -> None:
    survey = logiccheck.load("specs/bikeshare.qlc")
    assert isinstance(survey, logiccheck.Survey)
    assert survey.name == "bikeshare_2026"
    assert survey.items[:3] == ["age", "used", "freq"]
    assert survey.questionnaire.symbols["used"].stmt.flags.gate


def test_lint_matches_the_command_line(tmp_path) -> None:
    spec = tmp_path / "typo.qlc"
    spec.write_text(TYPO, encoding="utf-8")
    diags = logiccheck.load(spec).lint()
    assert isinstance(diags, list) and diags
    frame = diags.to_frame()
    assert list(frame.columns) == ["check", "severity", "file", "line", "column", "item", "message"]
    # The CLI's JSON (docs/formats.md) is the reference: same records, same positions.
    result = CliRunner().invoke(cli, ["lint", str(spec), "--format", "json"])
    cli_rows = [(d["check"], d["severity"], d["line"], d["column"]) for d in json.loads(result.output)["diagnostics"]]
    assert cli_rows == list(frame[["check", "severity", "line", "column"]].itertuples(index=False, name=None))
    assert diags.counts()["error"] == (frame["severity"] == "error").sum()
    assert "unknown-name" in diags._repr_html_()


def test_loads_reads_text() -> None:
    survey = logiccheck.loads(TYPO, "cell.qlc")
    assert survey.questionnaire.file == "cell.qlc" and survey.items == ["q1", "q2"]


def test_validation_view_gives_frames_and_notebook_html() -> None:
    pytest.importorskip("matplotlib")
    survey = logiccheck.load("specs/bikeshare.qlc")
    raw = fake_result(survey.questionnaire)
    result = survey.validation_view(raw, export="demo.csv")
    assert isinstance(result, logiccheck.Validation)
    assert isinstance(result.table, pd.DataFrame) and isinstance(result.findings, pd.DataFrame)
    assert list(result.table["item"]) == survey.items  # questionnaire order
    assert {"expected", "answered", "out_of_path", "missing_on_path", "invalid", "section"} <= set(result.table.columns)
    assert len(result.findings) == len(raw.findings)
    assert result.dispositions == raw.dispositions.value_counts().to_dict()
    assert result.respondents == 200
    html = result._repr_html_()
    assert "summary-cards" in html and "<svg" in html
    assert "respondents=200" in repr(result)


def test_validation_report_written_atomically(tmp_path) -> None:
    pytest.importorskip("jinja2")
    survey = logiccheck.load("specs/bikeshare.qlc")
    result = survey.validation_view(fake_result(survey.questionnaire))
    path = result.report(tmp_path / "r.html")
    assert path.read_text(encoding="utf-8").startswith("<!DOCTYPE html>")
    assert [p.name for p in tmp_path.iterdir()] == ["r.html"]  # no temp file left behind


def test_picture_bytes() -> None:
    pytest.importorskip("matplotlib")
    survey = logiccheck.load("specs/bikeshare.qlc")
    assert survey.picture("svg").lstrip().startswith(b"<?xml")
    assert survey.picture("png")[:4] == b"\x89PNG"


def test_clean_gives_frames_and_keeps_the_input(tmp_path) -> None:
    import hashlib
    from pathlib import Path

    export = Path("specs/bikeshare_export.csv")
    before = hashlib.sha256(export.read_bytes()).hexdigest()
    survey = logiccheck.load("specs/bikeshare.qlc")
    cleaning = survey.clean(export, out=tmp_path / "cleaned")
    assert isinstance(cleaning, logiccheck.Cleaning)
    assert isinstance(cleaning.cleaned, pd.DataFrame) and isinstance(cleaning.audit, pd.DataFrame)
    out = cleaning.summary["output"]
    assert len(cleaning.cleaned) == out["respondents"] == 300 - out["removed"]
    assert len(cleaning.audit) == out["cells_blanked"] > 0  # the demo export has off-path answers
    assert cleaning.outputs and all(p.exists() for p in cleaning.outputs)
    assert hashlib.sha256(export.read_bytes()).hexdigest() == before
    in_memory = survey.clean(pd.read_csv(export, dtype=str, keep_default_na=False), policy={"blank_out_of_path": False})
    assert in_memory.outputs == [] and len(in_memory.audit) < len(cleaning.audit)
    html = cleaning._repr_html_()
    assert "output.cells_blanked" in html and "<script" not in html.lower()


def test_validate_applies_the_configuration_checks_table(tmp_path) -> None:
    import shutil
    from pathlib import Path

    root = Path(__file__).resolve().parents[1]
    spec = tmp_path / "bikeshare.qlc"
    shutil.copy(root / "specs" / "bikeshare.qlc", spec)
    export = root / "specs" / "bikeshare_export.csv"
    before = logiccheck.load(spec).validate(export).findings
    assert (before["check"] == "missing-on-path").any()
    # The demo export has no quality findings under the per-item speeder rule, so a data
    # check is re-graded here.
    (tmp_path / "logiccheck.toml").write_text('[checks]\n"missing-on-path" = "off"\n"after-stop" = "info"\n')
    after = logiccheck.load(spec).validate(export).findings
    assert not (after["check"] == "missing-on-path").any()
    assert set(after.loc[after["check"] == "after-stop", "severity"]) == {"info"}
    assert len(after) == len(before) - int((before["check"] == "missing-on-path").sum())
