"""The records a spec comparison produces; every reporter reads these."""

from __future__ import annotations

from typing import Literal

from pydantic import BaseModel, Field

from logiccheck.diagnostics import Span

# break: answers are no longer comparable or columns change; caution: read the change
# before comparing waves; info: nothing to act on.
Impact = Literal["break", "caution", "info"]

KINDS: dict[str, tuple[Impact, str]] = {
    "item-added": ("info", "a new item"),
    "item-removed": ("break", "an item is gone: its column and trend end"),
    "item-renamed": ("caution", "same question and answers under a new name: the export column changes"),
    "type-changed": ("break", "the answer type, range or list changed"),
    "recode": ("break", "an answer is stored under another value: trend comparisons break unless recoded"),
    "option-added": ("caution", "a new answer option: the distribution shifts"),
    "option-removed": ("break", "an answer option is gone"),
    "option-reworded": ("caution", "an answer option's text changed"),
    "wording-changed": ("caution", "the question text changed: compare waves with care"),
    "flags-changed": ("caution", "a flag changed (required, strict, gate, key, shuffled)"),
    "sample-added": ("caution", "a new sample variable: the sample file needs its column"),
    "sample-removed": ("caution", "a sample variable is gone: conditions no longer read its column"),
    "codes-added": ("info", "a new answer list"),
    "codes-removed": ("info", "an answer list is gone (items that used it are reported on their own)"),
    "routing-changed": ("break", "who is asked changed"),
    "routing-equivalent": ("info", "the condition was rewritten; the solver proves it asks the same people"),
    "routing-not-compared": ("caution", "who is asked could not be compared"),
    "stop-added": ("break", "a new screen-out: some respondents now end here"),
    "stop-removed": ("break", "a screen-out is gone"),
    "stop-changed": ("break", "a screen-out ends the interview for other respondents"),
    "check-added": ("info", "a new edit rule"),
    "check-removed": ("caution", "an edit rule is gone"),
    "check-changed": ("caution", "an edit rule fails for other respondents"),
    "check-equivalent": ("info", "an edit rule was rewritten; the solver proves it fails for the same respondents"),
}


class Change(BaseModel):
    kind: str
    impact: Impact
    item: str | None
    message: str
    old_name: str | None = None
    old: Span | None = None
    new: Span | None = None
    witness: dict[str, str] | None = None
    asked_in: Literal["old", "new"] | None = None
    details: dict[str, object] = Field(default_factory=dict)

    def to_json(self) -> dict[str, object]:
        def place(span: Span | None) -> dict[str, object] | None:
            return None if span is None else {"file": span.file, "line": span.line, "column": span.column}

        out: dict[str, object] = {
            "kind": self.kind,
            "impact": self.impact,
            "item": self.item,
            "message": self.message,
            "old": place(self.old),
            "new": place(self.new),
        }
        if self.old_name is not None:
            out["old_name"] = self.old_name
        if self.witness is not None:
            out["witness"] = self.witness
            out["asked_in"] = self.asked_in
        if self.details:
            out["details"] = self.details
        return out


class SpecDiff(BaseModel):
    old_file: str
    new_file: str
    changes: list[Change] = Field(default_factory=list)
    compared: int = 0  # items in both versions whose routing was compared
    routing_same: int = 0

    @property
    def routing_changed(self) -> bool:
        return any(c.kind == "routing-changed" for c in self.changes)

    def counts(self) -> dict[str, int]:
        out = {"break": 0, "caution": 0, "info": 0}
        for change in self.changes:
            out[change.impact] += 1
        return out

    def to_json(self) -> dict[str, object]:
        return {
            "old": self.old_file,
            "new": self.new_file,
            "changes": [c.to_json() for c in self.changes],
            "summary": {
                **self.counts(),
                "items_compared": self.compared,
                "routing_same": self.routing_same,
                "routing_changed": sum(c.kind == "routing-changed" for c in self.changes),
            },
        }
