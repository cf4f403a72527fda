"""Format a spec and prove the result means the same: the resolved model is compared
before and after, so a layout bug can never change a questionnaire."""

from __future__ import annotations

from typing import Any

from pydantic import BaseModel

from logiccheck.fmt.layout import layout
from logiccheck.loader import load_text
from logiccheck.model.questionnaire import Questionnaire


def _strip(value: Any) -> Any:
    """A node as plain data without positions (any `span` or `*_span` field)."""
    if isinstance(value, BaseModel):
        value = value.model_dump()
    if isinstance(value, dict):
        return {k: _strip(v) for k, v in value.items() if k != "span" and not k.endswith("_span")}
    if isinstance(value, (list, tuple)):
        return [_strip(v) for v in value]
    return value


class FormatError(Exception):
    """A spec that cannot be formatted (a syntax error): exit status 2."""


def meaning(q: Questionnaire) -> Any:
    """The resolved model as plain data without positions: equal for equal meaning."""
    entries = [
        (
            _strip(e.stmt),
            [_strip(expr) for _, expr in e.context],
            _strip(e.own),
            _strip(e.require),
            e.skip_target,
        )
        for e in q.entries
    ]
    return (_strip(q.spec.model_copy(update={"file": ""})), entries)


def format_text(text: str, file: str = "<spec>") -> str:
    """The formatted text of a spec that parses; raises FormatError otherwise."""
    before = load_text(text, file)
    if before.syntax:
        first = before.syntax[0]
        raise FormatError(
            f"{file}:{first.line}:{first.column}: cannot format a spec with a syntax error "
            f"({first.message}); fix it first (`logiccheck lint {file}` lists them)"
        )
    out = layout(text)
    if out == text:
        return out
    after = load_text(out, file)
    if after.syntax or meaning(after.questionnaire) != meaning(before.questionnaire):
        raise FormatError(
            f"{file}: formatting would change what the spec means; left unchanged "
            "(please report this with the spec)"
        )
    return out
