"""The validate, check and simulate commands: docs/formats.md JSON, exit status, CSV files,
the README's first command on the demo export, deterministic simulation."""

from __future__ import annotations

import csv
import json
from pathlib import Path

from click.testing import CliRunner

from logiccheck.cli.main import cli

ROOT = Path(__file__).resolve().parents[2]
SPEC = str(ROOT / "specs" / "bikeshare.qlc")
DEMO = str(ROOT / "specs" / "bikeshare_export.csv")


def run(*args: str):
    return CliRunner().invoke(cli, list(args))


def test_validate_json_has_the_design_fields() -> None:
    res = run("validate", SPEC, "--data", DEMO, "--format", "json")
    assert res.exit_code == 1, res.output
    doc = json.loads(res.stdout)
    assert {"respondents", "items", "findings", "dispositions"} <= set(doc)
    assert doc["respondents"] == 300
    for item in doc["items"]:
        assert {"item", "expected", "answered", "out_of_path", "missing_on_path", "invalid"} <= set(item)
    for f in doc["findings"]:
        assert {"check", "severity", "respondent", "item", "message"} <= set(f)
    assert set(doc["dispositions"]) >= {"complete", "partial", "break-off", "underage"}
    assert sum(doc["dispositions"].values()) == 300


def test_demo_export_shows_the_planted_faults() -> None:
    doc = json.loads(run("validate", SPEC, "--data", DEMO, "--format", "json").stdout)
    by_check: dict[str, list[dict]] = {}
    for f in doc["findings"]:
        by_check.setdefault(f["check"], []).append(f)
    assert any(
        f["item"] == "range_ok" and "`ebike` = no" in f["message"] and "asked only when `ebike = yes`, line 46" in f["message"]
        for f in by_check["out-of-path"]
    )
    assert any(f["item"] == "why_not" for f in by_check["out-of-path"])
    assert len([f for f in by_check["out-of-path"] if f["item"] == "purpose_other"]) == 4
    assert {f["item"] for f in by_check["invalid-value"]} == {"freq", "trips"}
    assert [f["item"] for f in by_check["missing-on-path"] if f["severity"] == "error"] == ["age"]
    assert [f["item"] for f in by_check["check-failed"]] == ["daily_needs_trips"]
    assert {f["item"] for f in by_check["after-stop"]} == {"used", "overall"}
    items = {i["item"]: i for i in doc["items"]}
    assert items["range_ok"]["out_of_path"] == 1
    assert items["purpose_other"]["over_expected"] is True


def test_readme_first_command_runs_lint_then_validate() -> None:
    res = run("check", SPEC, "--data", DEMO, "--color", "never")
    assert res.exit_code == 1
    out = res.stdout
    assert out.index("lint") < out.index("validate") < out.index("out-of-path")
    assert "1 file checked" in out and "300 respondents" in out and "> expected" in out
    assert "… and" in out  # the terminal caps what it shows


def test_fail_on_and_usage_errors(tmp_path: Path) -> None:
    clean = tmp_path / "clean.csv"
    assert run("simulate", SPEC, "-n", "50", "--seed", "3", "--out", str(clean)).exit_code == 0
    ok = run("validate", SPEC, "--data", str(clean), "--format", "json")
    assert ok.exit_code in (0, 1)
    strict = run("validate", SPEC, "--data", str(clean), "--fail-on", "info")
    assert strict.exit_code == 1  # a simulated export has blanks: missing-on-path infos
    missing = run("validate", SPEC, "--data", str(tmp_path / "nope.csv"))
    assert missing.exit_code == 2 and "no such file" in missing.stderr
    bad_map = tmp_path / "m.toml"
    bad_map.write_text("colour = 1\n", encoding="utf-8")
    res = run("validate", SPEC, "--data", str(clean), "--map", str(bad_map))
    assert res.exit_code == 2 and "`colour`" in res.stderr


def test_csv_out_writes_items_and_findings(tmp_path: Path) -> None:
    res = run("validate", SPEC, "--data", DEMO, "--format", "csv")
    rows = list(csv.DictReader(res.stdout.splitlines()))
    assert len(rows) == 14 and rows[0]["item"] == "age"
    out = tmp_path / "report"
    res = run("validate", SPEC, "--data", DEMO, "--format", "csv", "--out", str(out))
    assert res.exit_code == 1
    items = list(csv.DictReader((out / "items.csv").open(encoding="utf-8")))
    findings = list(csv.DictReader((out / "findings.csv").open(encoding="utf-8")))
    assert len(items) == 14
    doc = json.loads(run("validate", SPEC, "--data", DEMO, "--format", "json").stdout)
    assert len(findings) == len(doc["findings"])  # the terminal caps; files never do
    assert not list(out.glob(".*"))  # no temp files left behind


def test_simulate_is_deterministic_and_its_faults_are_found(tmp_path: Path) -> None:
    a, b = tmp_path / "a.csv", tmp_path / "b.csv"
    for path in (a, b):
        assert run("simulate", SPEC, "-n", "300", "--seed", "11", "--faults", "0.05", "--out", str(path)).exit_code == 0
    assert a.read_bytes() == b.read_bytes()
    assert (tmp_path / "a.faults.csv").read_bytes() == (tmp_path / "b.faults.csv").read_bytes()
    faults = list(csv.DictReader((tmp_path / "a.faults.csv").open(encoding="utf-8")))
    assert faults and {f["fault"] for f in faults} <= {"out-of-path", "invalid-code", "not-a-number"}
    doc = json.loads(run("validate", SPEC, "--data", str(a), "--format", "json").stdout)
    found = {(f["row"], f["item"], f["check"]) for f in doc["findings"]}
    for f in faults:
        want = ("out-of-path", "after-stop") if f["fault"] == "out-of-path" else ("invalid-value",)
        assert any((int(f["row"]), f["item"], c) in found for c in want), f
    other = tmp_path / "c.csv"
    run("simulate", SPEC, "-n", "300", "--seed", "12", "--out", str(other))
    assert other.read_bytes() != a.read_bytes()


def test_findings_csv_lists_every_finding_as_in_json() -> None:
    import io

    from logiccheck.data import validate
    from logiccheck.loader import load_file
    from logiccheck.report import data_csv

    result = validate(load_file(SPEC).questionnaire, DEMO)
    out = io.StringIO()
    data_csv.write_findings_csv(result, out)
    rows = list(csv.reader(io.StringIO(out.getvalue(), newline="")))
    assert rows[0] == data_csv.FINDING_COLUMNS and len(rows) == 1 + len(result.findings)
    assert {(r[0], r[4], int(r[3])) for r in rows[1:]} == {(f.check, f.item or "", f.row) for f in result.findings}


def test_check_json_and_a_spec_with_errors_still_validates(tmp_path: Path) -> None:
    spec = tmp_path / "broken.qlc"
    spec.write_text(
        'survey b "Broken"\n\ncodes yesno\n  yes = 1 "Yes"\n  no  = 2 "No"\n\n'
        'a: single yesno "A?"\nb: single yesno "B?" when a = maybe\nc: number 0..5 "C?" when a = yes\n',
        encoding="utf-8",
    )
    data = tmp_path / "e.csv"
    data.write_text("id,a,b,c\n1,1,1,3\n2,2,,4\n", encoding="utf-8")
    res = run("check", str(spec), "--data", str(data), "--format", "json")
    assert res.exit_code == 1
    doc = json.loads(res.stdout)
    checks = [d["check"] for d in doc["lint"]["diagnostics"]]
    assert [c for c in checks if c != "routing-skipped"] == ["unknown-code"]
    # The routing analysis skips the broken statement and says so.
    assert "routing-skipped" in checks
    assert doc["validate"]["respondents"] == 2
    off = {(f["respondent"], f["item"]) for f in doc["validate"]["findings"] if f["check"] == "out-of-path"}
    assert off == {("1", "b"), ("2", "c")}
    assert "note: the spec has 1 problem" in res.stderr


def test_header_only_export(tmp_path: Path) -> None:
    data = tmp_path / "e.csv"
    data.write_text("id,district,age,used\n", encoding="utf-8")
    res = run("validate", SPEC, "--data", str(data), "--format", "json")
    doc = json.loads(res.stdout)
    assert doc["respondents"] == 0 and all(i["expected"] == 0 for i in doc["items"])
    assert any(f["check"] == "missing-column" for f in doc["findings"])


def test_configuration_checks_table_applies_to_findings(tmp_path: Path) -> None:
    import shutil

    root = Path(__file__).resolve().parents[2]
    spec = tmp_path / "bikeshare.qlc"
    shutil.copy(root / "specs" / "bikeshare.qlc", spec)
    export = root / "specs" / "bikeshare_export.csv"
    plain = json.loads(run("validate", str(spec), "--data", str(export), "--format", "json").stdout)
    checks = {f["check"] for f in plain["findings"]}
    assert {"missing-on-path", "check-failed"} <= checks
    (tmp_path / "logiccheck.toml").write_text('[checks]\n"missing-on-path" = "off"\n"check-failed" = "error"\n')
    doc = json.loads(run("validate", str(spec), "--data", str(export), "--format", "json").stdout)
    assert "missing-on-path" not in {f["check"] for f in doc["findings"]}
    assert {f["severity"] for f in doc["findings"] if f["check"] == "check-failed"} == {"error"}
    # Everything else is untouched.
    rest = [f for f in plain["findings"] if f["check"] not in ("missing-on-path", "check-failed")]
    assert [f for f in doc["findings"] if f["check"] != "check-failed"] == rest


def test_junit_for_findings_follows_fail_on() -> None:
    import xml.etree.ElementTree as ET

    root = Path(__file__).resolve().parents[2]
    args = ("validate", str(root / "specs" / "bikeshare.qlc"), "--data", str(root / "specs" / "bikeshare_export.csv"),
            "--format", "junit")
    strict = ET.fromstring(run(*args, "--fail-on", "warning").stdout)
    default = ET.fromstring(run(*args).stdout)
    # The demo export has warning-level findings (speeder, near-duplicate, check-failed):
    # they fail their test cases only when --fail-on warning asks for it.
    assert int(strict.get("failures")) > int(default.get("failures")) > 0
