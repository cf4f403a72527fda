"""`--format sarif`: SARIF 2.1.0, one rule per registered check, one result per record."""

from __future__ import annotations

import json
import os
from collections.abc import Iterable
from pathlib import Path, PurePath
from urllib.parse import quote

from logiccheck import __version__
from logiccheck.checks.registry import CheckInfo, all_checks
from logiccheck.diagnostics import Diagnostic, Severity, Span

SARIF_VERSION = "2.1.0"
SARIF_SCHEMA = "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"
LEVEL = {Severity.error: "error", Severity.warning: "warning", Severity.info: "note"}
SRCROOT = "%SRCROOT%"


def artifact_uri(file: str, root: Path | None = None) -> tuple[str, str | None]:
    """A relative URI (with the base id) when the file lies under `root`, else an absolute one."""
    root = (root or Path.cwd()).resolve()
    path = Path(file)
    absolute = path if path.is_absolute() else (root / path)
    try:
        rel = PurePath(os.path.relpath(absolute.resolve(), root))
    except ValueError:  # another drive on Windows
        rel = None
    if rel is not None and not rel.as_posix().startswith("../"):
        return quote(rel.as_posix()), SRCROOT
    return absolute.resolve().as_uri(), None


def _location(span: Span, root: Path | None) -> dict[str, object]:
    uri, base = artifact_uri(span.file, root)
    artifact: dict[str, object] = {"uri": uri}
    if base:
        artifact["uriBaseId"] = base
    region: dict[str, object] = {"startLine": max(span.line, 1), "startColumn": max(span.column, 1)}
    if span.end_line is not None and span.end_line >= span.line:
        region["endLine"] = span.end_line
    if span.end_column is not None and span.end_column >= 1:
        same_line = span.end_line in (None, span.line)
        if not same_line or span.end_column > span.column:
            region["endColumn"] = span.end_column  # exclusive in both our spans and SARIF
    return {"physicalLocation": {"artifactLocation": artifact, "region": region}}


def rule_of(info: CheckInfo) -> dict[str, object]:
    """A check's docs as a SARIF reportingDescriptor."""
    help_text = (
        f"{info.summary}\n\nWhat it finds: {info.what}\n\nWhy it matters: {info.why}\n\n"
        f"Bad:\n{info.bad}\n\nGood:\n{info.good}"
    )
    help_md = (
        f"{info.summary}\n\n**What it finds.** {info.what}\n\n**Why it matters.** {info.why}\n\n"
        f"Bad:\n\n```\n{info.bad}\n```\n\nGood:\n\n```\n{info.good}\n```\n\n"
        f"Run `logiccheck explain {info.name}` for the same text."
    )
    return {
        "id": info.name,
        "name": info.name,
        "shortDescription": {"text": info.summary},
        "fullDescription": {"text": f"{info.what} {info.why}"},
        "help": {"text": help_text, "markdown": help_md},
        "defaultConfiguration": {"level": LEVEL[info.severity]},
        "properties": {"stage": info.stage, "tags": [info.stage]},
    }


def _ad_hoc_rule(name: str) -> dict[str, object]:
    # A record from no registered check (internal-error): still a valid rule.
    return {
        "id": name,
        "name": name,
        "shortDescription": {"text": f"{name} (not a registered check)"},
        "defaultConfiguration": {"level": "error"},
    }


def sarif_log(
    diagnostics: Iterable[Diagnostic],
    *,
    root: Path | None = None,
    checks: dict[str, CheckInfo] | None = None,
) -> dict[str, object]:
    """The SARIF log as a dict (see `sarif_text` for the serialised form)."""
    records = list(diagnostics)
    checks = checks if checks is not None else all_checks()
    rules = [rule_of(info) for info in sorted(checks.values(), key=lambda c: c.name)]
    index = {rule["id"]: i for i, rule in enumerate(rules)}
    for record in records:
        if record.check not in index:
            index[record.check] = len(rules)
            rules.append(_ad_hoc_rule(record.check))
    results = []
    for record in records:
        result: dict[str, object] = {
            "ruleId": record.check,
            "ruleIndex": index[record.check],
            "level": LEVEL[record.severity],
            "message": {"text": record.message},
            "locations": [_location(record.span, root)],
        }
        if record.related:
            result["relatedLocations"] = [
                {"id": i, **_location(rel.span, root), "message": {"text": rel.message}}
                for i, rel in enumerate(record.related, start=1)
            ]
        props: dict[str, object] = {}
        if record.item is not None:
            props["item"] = record.item
        if record.witness:
            props["witness"] = dict(record.witness)
        if record.notes:
            props["notes"] = list(record.notes)
        if props:
            result["properties"] = props
        results.append(result)
    run: dict[str, object] = {
        "tool": {
            "driver": {
                "name": "logiccheck",
                "version": __version__,
                "semanticVersion": __version__,
                "rules": rules,
            }
        },
        "results": results,
        "columnKind": "unicodeCodePoints",
        "originalUriBaseIds": {SRCROOT: {"uri": (root or Path.cwd()).resolve().as_uri() + "/"}},
    }
    return {"$schema": SARIF_SCHEMA, "version": SARIF_VERSION, "runs": [run]}


def sarif_text(diagnostics: Iterable[Diagnostic], *, root: Path | None = None) -> str:
    return json.dumps(sarif_log(diagnostics, root=root), indent=2, ensure_ascii=False)
