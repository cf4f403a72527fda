"""SARIF, JUnit and workflow annotations, checked against the published formats."""

from __future__ import annotations

import json
import re
import xml.etree.ElementTree as ET
from pathlib import Path

import jsonschema

from logiccheck.checks.registry import all_checks
from logiccheck.checks.runner import run_checks
from logiccheck.diagnostics import Diagnostic, Related, Severity, Span
from logiccheck.loader import load_file
from logiccheck.report.github import annotation, escape_data, escape_property, github_text
from logiccheck.report.junit import junit_text
from logiccheck.report.sarif import sarif_log
from tests.cli_run import run_cli
from tests.conftest import CHECK_FIXTURES, ROOT

SCHEMAS = Path(__file__).resolve().parent / "data" / "schemas"
XS = "{http://www.w3.org/2001/XMLSchema}"


def _records() -> list[Diagnostic]:
    span = Span(file="specs/demo wave.qlc", line=4, column=3, end_line=4, end_column=9)
    other = Span(file="specs/demo wave.qlc", line=2, column=1, end_line=2, end_column=5)
    return [
        Diagnostic(
            check="unknown-name",
            severity=Severity.error,
            span=span,
            message="`ridez` is not defined; did you mean `rides`?",
            item="ridez",
            witness={"rides": "yes", "age": "30"},
            related=[Related(span=other, message="`rides` is defined here")],
            notes=["names are case-sensitive"],
        ),
        Diagnostic(
            check="unused-suppression",
            severity=Severity.warning,
            span=Span(file="specs/other.qlc", line=1, column=1),
            message="100% stale: line 1, col 2\nsecond line",
        ),
        Diagnostic(check="internal-error", severity=Severity.info, span=span, message="a note"),
    ]


def _sarif_validator() -> jsonschema.Draft4Validator:
    # Source: OASIS SARIF 2.1.0 schema (rtm.5), vendored; see tests/data/schemas/README.md.
    schema = json.loads((SCHEMAS / "sarif-2.1.0-rtm.5.json").read_text(encoding="utf-8"))
    return jsonschema.Draft4Validator(schema)


def test_sarif_validates_against_the_official_schema() -> None:
    log = sarif_log(_records(), root=ROOT)
    errors = sorted(_sarif_validator().iter_errors(log), key=str)
    assert errors == []
    run = log["runs"][0]
    rules = run["tool"]["driver"]["rules"]
    ids = [r["id"] for r in rules]
    assert set(all_checks()) <= set(ids)
    assert "internal-error" in ids  # unregistered record still gets a rule
    first = run["results"][0]
    assert ids[first["ruleIndex"]] == first["ruleId"] == "unknown-name"
    region = first["locations"][0]["physicalLocation"]["region"]
    assert region == {"startLine": 4, "startColumn": 3, "endLine": 4, "endColumn": 9}
    assert first["locations"][0]["physicalLocation"]["artifactLocation"]["uri"] == "specs/demo%20wave.qlc"
    assert first["relatedLocations"][0]["message"]["text"] == "`rides` is defined here"
    assert first["properties"]["witness"] == {"rides": "yes", "age": "30"}
    assert [r["level"] for r in run["results"]] == ["error", "warning", "note"]


def test_sarif_rules_carry_the_check_docs() -> None:
    rules = {r["id"]: r for r in sarif_log([], root=ROOT)["runs"][0]["tool"]["driver"]["rules"]}
    for name, info in all_checks().items():
        rule = rules[name]
        assert rule["shortDescription"]["text"] == info.summary
        assert info.what in rule["fullDescription"]["text"] and info.why in rule["fullDescription"]["text"]
        assert info.bad in rule["help"]["text"] and info.good in rule["help"]["markdown"]


def test_sarif_schema_rejects_a_broken_log() -> None:
    # The validator is live: a result with a zero start line breaks the schema's minimum.
    log = sarif_log(_records(), root=ROOT)
    log["runs"][0]["results"][0]["locations"][0]["physicalLocation"]["region"]["startLine"] = 0
    assert list(_sarif_validator().iter_errors(log))


def test_sarif_from_the_command_line_is_valid() -> None:
    bad = CHECK_FIXTURES / "bad-suppression" / "bad.qlc"
    proc = run_cli("lint", str(bad), "--format", "sarif")
    assert proc.returncode == 1, proc.stderr
    log = json.loads(proc.stdout)
    assert list(_sarif_validator().iter_errors(log)) == []
    assert [r["ruleId"] for r in log["runs"][0]["results"]].count("bad-suppression") == 4


# ------------------------------------------------------------------ JUnit
def _xsd_rules() -> dict[str, dict[str, object]]:
    """Element rules from the vendored junit-10.xsd: attributes, required ones, children."""
    # Source: junit-10.xsd (Jenkins/Surefire style), vendored; see tests/data/schemas/README.md.
    tree = ET.parse(SCHEMAS / "junit-10.xsd").getroot()
    patterns = {
        st.get("name"): st.find(f"{XS}restriction/{XS}pattern").get("value")
        for st in tree.findall(f"{XS}simpleType")
    }
    rules: dict[str, dict[str, object]] = {}
    for el in tree.findall(f"{XS}element"):
        attrs = {a.get("name"): a for a in el.iter(f"{XS}attribute")}
        rules[el.get("name")] = {
            "attrs": set(attrs),
            "required": {n for n, a in attrs.items() if a.get("use") == "required"},
            "children": {c.get("ref") for c in el.iter(f"{XS}element") if c.get("ref")},
            "patterns": {n: patterns[a.get("type")] for n, a in attrs.items() if a.get("type") in patterns},
            "text": el.get("type") == "xs:string" or any(ct.get("mixed") == "true" for ct in el.iter(f"{XS}complexType")),
        }
    return rules


def _conforms(node: ET.Element, rules: dict[str, dict[str, object]]) -> list[str]:
    problems = []
    rule = rules.get(node.tag)
    if rule is None:
        return [f"<{node.tag}> is not an element of the schema"]
    extra = set(node.attrib) - rule["attrs"]
    missing = rule["required"] - set(node.attrib)
    if extra:
        problems.append(f"<{node.tag}> has attributes the schema lacks: {sorted(extra)}")
    if missing:
        problems.append(f"<{node.tag}> lacks required attributes {sorted(missing)}")
    for name, pattern in rule["patterns"].items():
        if name in node.attrib and not re.fullmatch(pattern, node.attrib[name]):
            problems.append(f"<{node.tag} {name}={node.attrib[name]!r}> breaks its pattern")
    if (node.text or "").strip() and not rule["text"]:
        problems.append(f"<{node.tag}> may not hold text")
    for child in node:
        if child.tag not in rule["children"]:
            problems.append(f"<{child.tag}> may not sit in <{node.tag}>")
        problems.extend(_conforms(child, rules))
    return problems


def test_junit_parses_with_the_expected_counts_and_fits_the_schema() -> None:
    records = _records()
    files = ["specs/demo wave.qlc", "specs/other.qlc", "specs/clean.qlc"]
    checks = ["unknown-name", "unused-suppression", "duplicate-name"]
    text = junit_text(records, files, checks, disabled=["type-mismatch"], fail_on=Severity.warning)
    root = ET.fromstring(text)
    assert _conforms(root, _xsd_rules()) == []
    suites = root.findall("testsuite")
    assert [s.get("name") for s in suites] == files
    # 4 checks (3 run + 1 turned off) plus internal-error, which gave a record: 5 cases a file.
    assert root.get("tests") == str(5 * 3)
    assert root.get("failures") == "2"
    demo = suites[0]
    failing = {c.get("name"): c.find("failure") for c in demo.findall("testcase") if c.find("failure") is not None}
    assert list(failing) == ["unknown-name"]
    assert "`ridez` is not defined" in failing["unknown-name"].get("message")
    assert "witness: rides = yes" in failing["unknown-name"].text
    # The info record is below --fail-on warning: kept as output, not a failure.
    info_case = next(c for c in demo.findall("testcase") if c.get("name") == "internal-error")
    assert info_case.find("failure") is None and "a note" in info_case.find("system-out").text
    skipped = [c.get("name") for c in demo.findall("testcase") if c.find("skipped") is not None]
    assert skipped == ["type-mismatch"] and demo.get("skipped") == "1"
    assert suites[1].get("failures") == "1" and suites[2].get("failures") == "0"


def test_junit_schema_check_is_live() -> None:
    root = ET.fromstring(junit_text(_records(), ["a.qlc"], ["unknown-name"]))
    root.find("testsuite").attrib.pop("tests")
    root.find("testsuite").set("time", "soon")
    assert len(_conforms(root, _xsd_rules())) == 2


def test_junit_from_a_real_lint() -> None:
    bad = CHECK_FIXTURES / "unknown-name" / "bad.qlc"
    records = run_checks(load_file(bad), solver=False)
    root = ET.fromstring(junit_text(records, [str(bad)], ["unknown-name", "duplicate-name"]))
    assert root.get("tests") == "2" and root.get("failures") == "1"


# ------------------------------------------------------------------ workflow annotations
def test_annotation_escaping() -> None:
    # Escapes of the workflow command format: % CR LF in data; also : and , in properties.
    assert escape_data("100% done\r\nnext") == "100%25 done%0D%0Anext"
    assert escape_property("a:b,c%") == "a%3Ab%2Cc%25"


def test_github_snapshot() -> None:
    assert github_text(_records()).split("\n") == [
        "::error file=specs/demo wave.qlc,line=4,col=3,endColumn=9,title=unknown-name::"
        "`ridez` is not defined; did you mean `rides`?%0Awitness: rides = yes, age = 30"
        "%0Asee specs/demo wave.qlc:2:1: `rides` is defined here",
        "::warning file=specs/other.qlc,line=1,col=1,title=unused-suppression::"
        "100%25 stale: line 1, col 2%0Asecond line",
        "::notice file=specs/demo wave.qlc,line=4,col=3,endColumn=9,title=internal-error::a note",
    ]


def test_github_property_with_comma_and_colon() -> None:
    d = Diagnostic(check="unknown-code", severity=Severity.error, span=Span(file="C:/x,y.qlc", line=2, column=5), message="m")
    assert annotation(d) == "::error file=C%3A/x%2Cy.qlc,line=2,col=5,title=unknown-code::m"


# ------------------------------------------------------------------ validate findings
def test_validate_findings_through_the_same_emitters() -> None:
    spec, data = ROOT / "specs" / "bikeshare.qlc", ROOT / "specs" / "bikeshare_export.csv"
    base = ["validate", str(spec), "--data", str(data)]
    findings = json.loads(run_cli(*base, "--format", "json").stdout)["findings"]
    assert findings, "the demo export has planted faults"
    sarif = json.loads(run_cli(*base, "--format", "sarif").stdout)
    assert list(_sarif_validator().iter_errors(sarif)) == []
    results = sarif["runs"][0]["results"]
    assert len(results) == len(findings)
    assert [r["ruleId"] for r in results] == [f["check"] for f in findings]
    first = next(r for r in results if r.get("relatedLocations"))
    assert first["relatedLocations"][0]["physicalLocation"]["artifactLocation"]["uri"].endswith("bikeshare.qlc")
    junit = ET.fromstring(run_cli(*base, "--format", "junit").stdout)
    assert _conforms(junit, _xsd_rules()) == []
    failing_checks = {f["check"] for f in findings if f["severity"] == "error"}
    assert junit.get("failures") == str(len(failing_checks))
    lines = run_cli(*base, "--format", "github").stdout.splitlines()
    assert len(lines) == len(findings) and all(line.startswith("::") for line in lines)
