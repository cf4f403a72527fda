"""Root causes in spec terms: why an answer was off the route, as one sentence."""

from __future__ import annotations

from typing import Any

import numpy as np

from logiccheck.data.evaluate import BLANK, INVALID, NOT_ASKED, OFF_ROUTE, UNKNOWN, Guard
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Entry, Questionnaire


def source_of(q: Questionnaire, node: Any) -> str:
    """The spec text of an expression, from its span."""
    span = node.span
    lines = q.lines
    if span.end_line is None or span.end_column is None or span.line < 1 or span.line > len(lines):
        return ""
    if span.end_line == span.line:
        return lines[span.line - 1][span.column - 1 : span.end_column - 1]
    parts = [lines[span.line - 1][span.column - 1 :]]
    parts += [ln.strip() for ln in lines[span.line : span.end_line - 1]]
    parts.append(lines[span.end_line - 1][: span.end_column - 1].strip())
    return " ".join(p.strip() for p in parts)


def _labels(q: Questionnaire, name: str) -> dict[int, str]:
    entry = q.symbols.get(name)
    out: dict[int, str] = {}
    if entry is None or entry.kind not in ("item", "sample"):
        return out
    codes = q.item_codes(entry.stmt)
    if codes is not None:
        out.update({o.value: o.label for o in codes.options})
    out.update({o.value: o.label for o in q.nonresponse})
    return out


def _options(q: Questionnaire, name: str) -> list[tuple[int, str]]:
    entry = q.symbols.get(name)
    codes = q.item_codes(entry.stmt) if entry is not None and entry.kind in ("item", "sample") else None
    return [(o.value, o.label) for o in codes.options] if codes is not None else []


def fact(q: Questionnaire, how: str, name: str, key: float) -> str:
    """What a name held for a respondent, from its key (see evaluate.fact_key)."""
    how = how.removeprefix("input:")
    if how == "answered":
        return f"`{name}` was answered" if key == 1.0 else f"`{name}` was not answered"
    if how == "asked":
        return f"`{name}` was asked" if key == 1.0 else f"`{name}` was not asked"
    state = {
        NOT_ASKED: "was not asked",
        BLANK: "was left blank",
        INVALID: "has an invalid value",
        OFF_ROUTE: "was answered off the route",
        UNKNOWN: "is unknown",
    }
    if key in state:
        return f"`{name}` {state[key]}"
    kind = q.value_kind(name)
    if kind == "bool":
        return f"`{name}` is {'true' if key == 1.0 else 'false'}"
    if kind == "set":
        bits = int(key)
        chosen = [label for j, (_, label) in enumerate(_options(q, name)) if bits >> j & 1]
        return f"`{name}` has {', '.join(chosen)}" if chosen else f"`{name}` has none of its options"
    if kind == "coded":
        label = _labels(q, name).get(int(key)) if float(key).is_integer() else None
        return f"`{name}` = {label}" if label else f"`{name}` = {key:g}"
    return f"`{name}` = {key:g}"


def guard_text(q: Questionnaire, g: Guard) -> str:
    """The clause after the facts: where the routing says this item is asked."""
    if g.kind == "stop":
        return f"stop `{g.entry.name}` fired (line {g.entry.span.line})"
    if g.kind == "skip":
        return f"`skip to {g.entry.name}` fired (line {g.entry.span.line})"
    text = source_of(q, g.expr)
    line = g.expr.span.line
    if g.kind == "context":
        owner = g.entry
        what = "section" if isinstance(owner, n.Section) else "grid"
        return f"{what} `{owner.name}` is asked only when `{text}`, line {line}"
    return f"asked only when `{text}`, line {line}"


def off_route_message(q: Questionnaire, item: str, g: Guard, keys: np.ndarray) -> str:
    if g.kind == "stop":
        return f"`{item}` answered after stop `{g.entry.name}` fired (line {g.entry.span.line}); nothing after a stop is asked"
    if g.kind == "skip":
        return f"`{item}` answered but {guard_text(q, g)}; the skip passes over `{item}`"
    facts: list[str] = []
    inputs: dict[int, list[str]] = {}  # fact index -> the inputs of that derived value
    for j, (how, name) in enumerate(g.reads):
        text = fact(q, how, name, float(keys[j]))
        if how.startswith("input:") and facts:
            inputs.setdefault(len(facts) - 1, []).append(text)
        else:
            facts.append(text)
    parts = [f"{f} ({', '.join(inputs[i])})" if i in inputs else f for i, f in enumerate(facts)]
    said = " and ".join(parts) if parts else "the condition does not hold"
    message = f"`{item}` answered but {said}; {guard_text(q, g)}"
    if g.kind == "own" and isinstance(g.entry, Entry) and g.entry.index in q.broken:
        message += " (this condition has a spec problem; see `logiccheck lint`)"
    return message
