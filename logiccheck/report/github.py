"""`--format github`: one workflow annotation command per record.

`::LEVEL file=F,line=L,col=C,endLine=..,endColumn=..,title=CHECK::message`. The message
escapes `%`, CR and LF; property values also escape `:` and `,`, as the workflow
command format requires.
"""

from __future__ import annotations

from collections.abc import Iterable

from logiccheck.diagnostics import Diagnostic, Severity

LEVEL = {Severity.error: "error", Severity.warning: "warning", Severity.info: "notice"}


def escape_data(text: str) -> str:
    return text.replace("%", "%25").replace("\r", "%0D").replace("\n", "%0A")


def escape_property(text: str) -> str:
    return escape_data(text).replace(":", "%3A").replace(",", "%2C")


def annotation(d: Diagnostic) -> str:
    props = [("file", d.file.replace("\\", "/")), ("line", str(d.line)), ("col", str(d.column))]
    if d.span.end_line is not None and d.span.end_line != d.line:
        props.append(("endLine", str(d.span.end_line)))
    if d.span.end_column is not None and d.span.end_column > d.column:
        props.append(("endColumn", str(d.span.end_column)))
    props.append(("title", d.check))
    message = d.message
    if d.witness:
        message += "\nwitness: " + ", ".join(f"{k} = {v}" for k, v in d.witness.items())
    for rel in d.related:
        message += f"\nsee {rel.span.file}:{rel.span.line}:{rel.span.column}: {rel.message}"
    head = ",".join(f"{k}={escape_property(v)}" for k, v in props)
    return f"::{LEVEL[d.severity]} {head}::{escape_data(message)}"


def github_text(diagnostics: Iterable[Diagnostic]) -> str:
    return "\n".join(annotation(d) for d in diagnostics)
