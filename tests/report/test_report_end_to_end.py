"""The report over a real validation of the demo export: same records as the other
formats, and respondent free text escaped wherever it is shown."""

from __future__ import annotations

import json

import pandas as pd
import pytest
from click.testing import CliRunner

pytest.importorskip("jinja2")
pytest.importorskip("matplotlib")
pytest.importorskip("logiccheck.data")

import logiccheck
from logiccheck.cli.main import cli
from tests.report.test_html_report import parse

SPEC, EXPORT = "specs/bikeshare.qlc", "specs/bikeshare_export.csv"
SCRIPT = "<script>alert('row')</script>"
FORMULA = '=HYPERLINK("http://example.invalid/x","open me")'
PLUS = "+1+cmd|' /C calc'!A0"


def tampered_export() -> pd.DataFrame:
    """The demo export with hostile free text typed into text items by lapsed riders,
    who are never routed to them, so every one becomes an out-of-path finding."""
    frame = pd.read_csv(EXPORT, dtype=str, keep_default_na=False)
    lapsed = frame.index[frame["used"] == "2"][:3]
    frame.loc[lapsed[0], "praise"] = SCRIPT
    frame.loc[lapsed[1], "purpose_other"] = FORMULA
    frame.loc[lapsed[2], "praise"] = PLUS
    return frame


def test_api_validate_agrees_with_the_validate_command() -> None:
    survey = logiccheck.load(SPEC)
    result = survey.validate(EXPORT)
    cli_json = json.loads(CliRunner().invoke(cli, ["validate", SPEC, "--data", EXPORT, "--format", "json"]).output)
    assert result.respondents == cli_json["respondents"]
    assert result.dispositions == cli_json["dispositions"]
    cols = ["item", "expected", "answered", "out_of_path", "missing_on_path", "invalid"]
    assert result.table[cols].to_dict("records") == [{k: row[k] for k in cols} for row in cli_json["items"]]
    got = result.findings[["check", "respondent", "item"]].to_dict("records")
    want = [{"check": f["check"], "respondent": f["respondent"], "item": f["item"]} for f in cli_json["findings"]]
    assert sorted(map(str, got)) == sorted(map(str, want))
    assert list(result.table["item"]) == [n for n in survey.items if n in set(result.table["item"])]


def test_api_validate_accepts_a_dataframe() -> None:
    survey = logiccheck.load(SPEC)
    from_path = survey.validate(EXPORT)
    from_frame = survey.validate(pd.read_csv(EXPORT, dtype=str, keep_default_na=False))
    assert from_frame.table.equals(from_path.table)
    assert from_frame.dispositions == from_path.dispositions


def test_hostile_free_text_is_escaped_in_the_report() -> None:
    survey = logiccheck.load(SPEC)
    result = survey.validate(tampered_export())
    shown = set(result.findings["value"].dropna())
    assert {SCRIPT, FORMULA, PLUS} <= shown  # the data stage reports them as out-of-path values
    for html in (result.to_html(), result._repr_html_()):
        assert "<script" not in html.lower()
    html = result.to_html()
    assert "&lt;script&gt;alert(&#39;row&#39;)&lt;/script&gt;" in html
    assert "=HYPERLINK(&#34;http://example.invalid/x&#34;,&#34;open me&#34;)" in html
    page = parse(html)
    text = "".join(page.text)
    assert SCRIPT in text and FORMULA in text and PLUS in text  # shown as text, literally
    assert all(tag != "script" for tag, _ in page.tags)
    assert all(not (a.get("href") or "#").startswith("http") for _, a in page.tags)


def test_report_command_and_validate_html(tmp_path) -> None:
    runner = CliRunner()
    out = tmp_path / "report.html"
    result = runner.invoke(cli, ["report", SPEC, "--data", EXPORT, "--out", str(out)])
    assert result.exit_code == 0, result.output
    page = parse(out.read_text(encoding="utf-8"))
    assert {"item-chart", "item-table", "findings", "lint", "settings", "routing", "dispositions"} <= page.ids
    out2 = tmp_path / "v.html"
    result = runner.invoke(cli, ["validate", SPEC, "--data", EXPORT, "--format", "html", "--out", str(out2)])
    assert result.exit_code in (0, 1) and out2.exists()  # 1: the demo export has planted errors
    assert "item-table" in parse(out2.read_text(encoding="utf-8")).ids
    result = runner.invoke(cli, ["report", SPEC, "--data", str(tmp_path / "none.csv"), "--out", str(out)])
    assert result.exit_code == 2 and "none.csv" in result.output and len(result.output.strip().splitlines()) == 1


def test_demo_report_is_small() -> None:
    html = logiccheck.load(SPEC).validate(EXPORT).to_html()
    assert len(html.encode("utf-8")) < 2_000_000


def test_validate_table_has_a_route_bar_column() -> None:
    from logiccheck.report.bars import OUT

    result = CliRunner().invoke(cli, ["validate", SPEC, "--data", EXPORT, "--color", "never"])
    assert "route" in result.output
    survey = logiccheck.load(SPEC).validate(EXPORT)
    broken = survey.table.loc[survey.table["out_of_path"] > 0, "item"].tolist()
    lines = {line.split()[0]: line for line in result.output.splitlines() if line.strip() and line.split()[0] in survey.table["item"].tolist()}
    assert broken and all(OUT in lines[item] for item in broken)  # the off-path cell is visible
    assert all(OUT not in lines[item] for item in set(lines) - set(broken))


def test_report_without_the_extra_says_how_to_install(monkeypatch, tmp_path) -> None:
    import importlib.util

    real = importlib.util.find_spec
    monkeypatch.setattr(importlib.util, "find_spec", lambda name, *a: None if name == "jinja2" else real(name, *a))
    result = CliRunner().invoke(cli, ["report", SPEC, "--out", str(tmp_path / "r.html")])
    assert result.exit_code == 2 and 'pip install "logiccheck[report]"' in result.output
    assert not (tmp_path / "r.html").exists()
