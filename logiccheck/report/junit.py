"""`--format junit`: one test suite per file, one test case per check per file.

A case fails when the check gave a record at or above the `fail_on` level there; records
below it go to the case's `system-out`; a check turned off in the configuration is
`skipped`.
"""

from __future__ import annotations

import xml.etree.ElementTree as ET
from collections.abc import Iterable

from logiccheck.diagnostics import Diagnostic, Severity


def _line(d: Diagnostic) -> str:
    text = f"{d.file}:{d.line}:{d.column}: {d.severity.value}: {d.message}"
    if d.witness:
        text += " [witness: " + ", ".join(f"{k} = {v}" for k, v in d.witness.items()) + "]"
    return text


def junit_tree(
    diagnostics: Iterable[Diagnostic],
    files: list[str],
    checks: Iterable[str],
    *,
    disabled: Iterable[str] = (),
    fail_on: Severity = Severity.error,
) -> ET.Element:
    records = list(diagnostics)
    off = set(disabled)
    names = sorted(set(checks) | off | {d.check for d in records})
    by_key: dict[tuple[str, str], list[Diagnostic]] = {}
    for d in records:
        by_key.setdefault((d.file, d.check), []).append(d)
    ordered_files = list(dict.fromkeys([*files, *(d.file for d in records)]))
    root = ET.Element("testsuites", name="logiccheck")
    totals = {"tests": 0, "failures": 0, "skipped": 0}
    for file in ordered_files:
        suite = ET.SubElement(root, "testsuite", name=file, file=file)
        counts = {"tests": 0, "failures": 0, "skipped": 0}
        for check in names:
            case = ET.SubElement(suite, "testcase", name=check, classname=file, time="0")
            counts["tests"] += 1
            found = by_key.get((file, check), [])
            if check in off and not found:
                ET.SubElement(case, "skipped", message=f"`{check}` is turned off in the configuration")
                counts["skipped"] += 1
                continue
            failing = [d for d in found if d.severity.at_least(fail_on)]
            quiet = [d for d in found if not d.severity.at_least(fail_on)]
            if failing:
                first = failing[0]
                more = f" (and {len(failing) - 1} more)" if len(failing) > 1 else ""
                failure = ET.SubElement(
                    case,
                    "failure",
                    type=max((d.severity for d in failing), key=lambda s: s.rank).value,
                    message=f"{first.line}:{first.column}: {first.message}{more}",
                )
                failure.text = "\n".join(_line(d) for d in failing)
                counts["failures"] += 1
            if quiet:
                out = ET.SubElement(case, "system-out")
                out.text = "\n".join(_line(d) for d in quiet)
        for key, value in counts.items():
            totals[key] += value
        suite.set("tests", str(counts["tests"]))
        suite.set("failures", str(counts["failures"]))
        suite.set("errors", "0")
        suite.set("skipped", str(counts["skipped"]))
        suite.set("time", "0")
    root.set("tests", str(totals["tests"]))
    root.set("failures", str(totals["failures"]))
    root.set("errors", "0")
    return root


def junit_text(
    diagnostics: Iterable[Diagnostic],
    files: list[str],
    checks: Iterable[str],
    *,
    disabled: Iterable[str] = (),
    fail_on: Severity = Severity.error,
) -> str:
    tree = junit_tree(diagnostics, files, checks, disabled=disabled, fail_on=fail_on)
    ET.indent(tree)
    return '<?xml version="1.0" encoding="UTF-8"?>\n' + ET.tostring(tree, encoding="unicode")
