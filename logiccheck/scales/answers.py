"""The answer list a scale's items share, and item values as positions on it.

A scale's items must share one ordered answer list (the order of its `codes` lines) or
one number range; `scale-mixed-answers` reports those that do not, and statistics are
only computed for scales whose items all agree.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from logiccheck.diagnostics import Span
from logiccheck.model import nodes as n
from logiccheck.model.questionnaire import Questionnaire

if TYPE_CHECKING:
    import numpy as np


@dataclass(frozen=True)
class Answers:
    """One ordered answer list (code values in list order) or one whole-number range."""

    kind: str  # "codes" or "range"
    values: tuple[float, ...]  # codes: values in list order; range: (lo, hi)
    labels: tuple[str, ...] = ()
    name: str = ""  # the codes list's name ("" inline)

    @property
    def steps(self) -> int:
        """Positions run 0..steps: options − 1, or hi − lo."""
        if self.kind == "codes":
            return len(self.values) - 1
        return int(self.values[1] - self.values[0])

    def describe(self) -> str:
        if self.kind == "range":
            return f"the range {self.values[0]:g}..{self.values[1]:g}"
        if self.name:
            return f"the answer list `{self.name}`"
        return "an inline answer list (" + ", ".join(self.labels) + ")"

    def same_as(self, other: Answers) -> bool:
        return self.kind == other.kind and self.values == other.values and self.labels == other.labels

    def positions(self, values: np.ndarray, reversed_: bool = False) -> np.ndarray:
        """Position of each value on the list (0..steps; reversed: steps..0), NaN where the
        value is none of the list's options (blank, invalid or a non-response code)."""
        import numpy as np  # here, not at the top: `lint` loads this module and never needs numpy

        values = np.asarray(values, dtype=float)
        if self.kind == "range":
            lo, hi = self.values
            ok = (values >= lo) & (values <= hi) & (values == np.floor(values))
            pos = np.where(ok, values - lo, np.nan)
        else:
            codes = np.asarray(self.values, dtype=float)
            order = np.argsort(codes, kind="stable")
            ordered = codes[order]
            at = np.clip(np.searchsorted(ordered, values), 0, len(ordered) - 1)
            ok = ordered[at] == values
            pos = np.where(ok, order[at].astype(float), np.nan)
        return self.steps - pos if reversed_ else pos


@dataclass
class MixProblem:
    """Why a scale's item cannot be scored with the others."""

    span: Span
    item: str
    message: str
    related: list[tuple[Span, str]]


def answers_of(q: Questionnaire, name: str) -> Answers | str:
    """The answer list of an item or grid row, or why it has none a scale can use."""
    entry = q.symbols.get(name)
    if entry is None:
        return "undefined"
    if entry.kind != "item":
        word = {"let": "a derived value", "sample": "a sample variable"}.get(entry.kind, entry.kind)
        return f"`{name}` is {word}, not an item; a scale takes `single` or `number` items"
    t = entry.stmt.type
    if t.kind == "number" and t.lo is not None and t.hi is not None:
        return Answers("range", (float(t.lo), float(t.hi)))
    if t.kind == "single":
        codes = q.item_codes(entry.stmt)
        if codes is None:
            return "undefined"
        return Answers("codes", tuple(float(o.value) for o in codes.options), tuple(o.label for o in codes.options),
                       "" if codes.inline else codes.name)
    return f"`{name}` is a `{t.kind}` item; a scale takes `single` or `number` items"


def scale_answers(q: Questionnaire, scale: n.Scale) -> tuple[Answers | None, list[MixProblem]]:
    """The list the scale's items share (None when they do not), and the items that differ."""
    first: tuple[n.ScaleItem, Answers] | None = None
    problems: list[MixProblem] = []
    undefined = False
    for member in scale.items:
        got = answers_of(q, member.name)
        if got == "undefined":
            undefined = True  # unknown-name reports it
            continue
        if isinstance(got, str):
            problems.append(MixProblem(member.span, member.name, got, []))
            continue
        if first is None:
            first = (member, got)
            continue
        if not got.same_as(first[1]):
            problems.append(MixProblem(
                member.span, member.name,
                f"`{member.name}` uses {got.describe()}, but `{first[0].name}` uses {first[1].describe()}; "
                "the items of a scale share one answer list or range",
                [(first[0].span, f"`{first[0].name}` is listed here")],
            ))
    if first is None or problems or undefined or first[1].steps < 1:
        return None, problems
    return first[1], problems
