"""The draft as spec text: header, shared answer lists, items with their mined conditions
(consecutive items sharing one condition as a section), and drafted stops."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from logiccheck.draft.infer import Column, Inferred, label_name
from logiccheck.draft.mine import Condition, Literal, Var


@dataclass
class Routed:
    """A drafted item: its column, mined condition and share explained, and a stop after it."""

    column: Column
    condition: Condition
    share: float
    stop: Literal | None = None
    stop_rows: int = 0
    notes: list[str] = field(default_factory=list)


def _q(text: str) -> str:
    return '"' + text.replace("\\", "/").replace('"', "'") + '"'


def _num(x: float | None) -> str:
    if x is None:
        return "0"
    return f"{int(x)}" if float(x).is_integer() else f"{x:g}"


def _list_key(c: Column) -> tuple:
    return tuple((code, c.var.labels[code], c.texts.get(code, str(code))) for code in c.var.options)


def _list_lines(key: tuple, indent: str) -> list[str]:
    return [f"{indent}{label} = {code} {_q(text)}" for code, label, text in key]


def render(source: str, inferred: Inferred, routed: list[Routed]) -> str:
    """The spec text of a draft."""
    vars_: dict[str, Var] = {r.column.var.name: r.column.var for r in routed}
    read = {name for r in routed for name in r.condition.reads()} | {
        r.stop.var for r in routed if r.stop is not None
    }
    lines = [
        "# DRAFT: written by `logiccheck draft` from the export " + source + ".",
        "# Review every line before use: names, question texts and answer labels are placeholders,",
        "# and each condition is the simplest one that explains who answered; it may be a",
        "# coincidence of the data rather than the routing that was meant.",
    ]
    delimited = [r.column.var.name for r in routed if r.column.delimited]
    labelled = [r.column.var.name for r in routed if r.column.kind == "single" and any(
        t != str(c) for c, t in r.column.texts.items())]
    if labelled or delimited:
        names = ", ".join([*labelled, *delimited])
        lines.append(f'# Read as answer labels: {names}. Validate with `[data] values = "auto"`; a column of free')
        lines.append("# text with few distinct answers reads as labels too: declare it `text` if so.")
    if delimited:
        lines.append(f"# {', '.join(delimited)}: one column of labels separated by `;`: set `layout = \"delimited\"` under [data.multi].")
    if inferred.renamed:
        pairs = ", ".join(f'{k} = "{v}"' for k, v in inferred.renamed.items())
        lines.append(f"# Renamed columns: map them under [data.columns]: {pairs}")
    lines += ["", f'survey draft "Drafted from {source.replace(chr(34), chr(39))}"', ""]
    # Answer lists used by more than one item are declared once.
    uses: dict[tuple, list[str]] = {}
    for r in routed:
        if r.column.kind in ("single", "multi"):
            uses.setdefault(_list_key(r.column), []).append(r.column.var.name)
    shared: dict[tuple, str] = {}
    taken: set[str] = set()
    for key, users in uses.items():
        if len(users) < 2:
            continue
        first, last = key[0][1], key[-1][1]
        name = label_name(f"ans_{first}_{last}", taken)
        shared[key] = name
        lines.append(f"codes {name}")
        lines += _list_lines(key, "  ")
        lines.append("")
    if inferred.nonresponse:
        lines.append("nonresponse")
        lines += [f"  nr{v} = {v} {_q(f'Non-response code {v}')}" for v in inferred.nonresponse]
        lines.append("")
    section: Condition | None = None
    parts = 0
    masks: dict[Condition, np.ndarray] = {}

    def within(cond: Condition, outer: Condition) -> bool:
        """The condition holds (almost) only where the section's does: the item may sit
        in the section with its own `when`, and the two together route as it alone."""
        if cond == outer:
            return True
        if not cond.literals:
            return False
        for c in (cond, outer):
            if c not in masks:
                masks[c] = c.mask(vars_, inferred.rows)
        return int((masks[cond] & ~masks[outer]).sum()) <= max(2, int(0.001 * inferred.rows))

    for i, r in enumerate(routed):
        cond = r.condition
        if section is not None and not within(cond, section):
            section = None
            lines.append("")
        nxt = routed[i + 1].condition if i + 1 < len(routed) else None
        if section is None and cond.literals and nxt is not None and within(nxt, cond) and r.stop is None:
            parts += 1
            section = cond
            lines.append(f"section part_{parts} {_q(f'Part {parts}')} when {cond.text(vars_)}")
        indent = "  " if section is not None else ""
        shared_cond = section is not None and cond == section
        lines.append(f"{indent}# {_explains(r, shared_cond)}")
        lines += [f"{indent}# {note}" for note in r.notes]
        lines.append(indent + _item(r, vars_, shared, read, shared_cond))
        if r.stop is not None:
            section = None
            name = f"out_{r.column.var.name}"
            lit = r.stop.text(vars_[r.stop.var])
            lines.append(f"# {r.stop_rows} respondents have nothing after `{r.column.var.name}` when {lit}")
            lines.append(f"stop {name} {_q(f'Screened out at {r.column.var.name}')} when {lit}")
    return "\n".join(lines).rstrip() + "\n"


def _explains(r: Routed, in_section: bool) -> str:
    pct = f"{100 * r.share:.1f} %"
    if not r.condition.literals:
        return f"asked of everyone: explains {pct} of respondents"
    where = "the section's condition" if in_section else "this condition"
    return f"{where} explains {pct} of respondents (answered where it holds, blank where not)"


def _item(r: Routed, vars_: dict[str, Var], shared: dict[tuple, str], read: set[str], in_section: bool) -> str:
    c = r.column
    name = c.var.name
    if c.kind in ("single", "multi"):
        key = _list_key(c)
        codes = shared.get(key) or "{ " + ", ".join(f"{lb} = {code} {_q(t)}" for code, lb, t in key) + " }"
        typ = f"{c.kind} {codes}"
    elif c.kind in ("number", "decimal"):
        typ = f"{c.kind} {_num(c.lo)}..{_num(c.hi)}"
    else:
        typ = "text"
    out = f"{name}: {typ} {_q(name)}"
    if r.condition.literals and not in_section:
        out += f" when {r.condition.text(vars_)}"
    if name in read and c.kind == "single":
        out += " gate"
    if c.strict:
        out += " strict"
    return out
