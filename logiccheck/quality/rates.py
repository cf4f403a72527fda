"""Outcome rates from final case dispositions: response, cooperation, refusal and
contact rates, with the formulas of the AAPOR Standard Definitions (from memory).

Categories: I complete, P partial, R refusal and break-off, NC non-contact, O other
eligible non-interview, UH unknown if household/occupied, UO unknown other, NE not
eligible. `e` is the estimated share of unknown-eligibility cases that are eligible.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass

CATEGORIES = ("I", "P", "R", "NC", "O", "UH", "UO", "NE")

# Words a sample file may use for each category (our own list; case-insensitive).
ALIASES: dict[str, str] = {
    "i": "I", "complete": "I", "completed": "I", "interview": "I",
    "p": "P", "partial": "P",
    "r": "R", "refusal": "R", "refused": "R", "break-off": "R", "breakoff": "R",
    "nc": "NC", "non-contact": "NC", "noncontact": "NC", "no-contact": "NC",
    "o": "O", "other": "O",
    "uh": "UH", "unknown-household": "UH",
    "uo": "UO", "unknown-other": "UO", "unknown": "UO",
    "ne": "NE", "not-eligible": "NE", "ineligible": "NE", "screen-out": "NE", "screened-out": "NE",
}


class RatesError(ValueError):
    """Input that cannot give rates (an unknown outcome, a negative count, e out of range)."""


def category_of(word: str) -> str | None:
    key = str(word).strip().lower().replace("_", "-").replace(" ", "-")
    return ALIASES.get(key)


@dataclass(frozen=True)
class OutcomeCounts:
    I: int = 0  # noqa: E741 - the standard's own letter
    P: int = 0
    R: int = 0
    NC: int = 0
    O: int = 0  # noqa: E741
    UH: int = 0
    UO: int = 0
    NE: int = 0

    def __post_init__(self) -> None:
        for c in CATEGORIES:
            if getattr(self, c) < 0:
                raise RatesError(f"count for {c} is negative ({getattr(self, c)})")

    @classmethod
    def from_mapping(cls, counts: Mapping[str, int]) -> OutcomeCounts:
        out: dict[str, int] = dict.fromkeys(CATEGORIES, 0)
        for word, n in counts.items():
            cat = category_of(word)
            if cat is None:
                raise RatesError(f"unknown outcome {word!r}; use one of {', '.join(CATEGORIES)}")
            out[cat] += int(n)
        return cls(**out)

    @classmethod
    def from_outcomes(cls, outcomes: Iterable[object]) -> OutcomeCounts:
        out: dict[str, int] = dict.fromkeys(CATEGORIES, 0)
        for i, word in enumerate(outcomes, start=1):
            cat = category_of(str(word))
            if cat is None:
                raise RatesError(
                    f"case {i}: unknown outcome {word!r}; use one of {', '.join(CATEGORIES)} "
                    "or a word such as complete, partial, refusal, non-contact"
                )
            out[cat] += 1
        return cls(**out)

    def as_dict(self) -> dict[str, int]:
        return {c: getattr(self, c) for c in CATEGORIES}

    def estimated_e(self) -> float | None:
        """(I+P+R+NC+O) / (I+P+R+NC+O+NE): the share eligible among cases whose
        eligibility is known."""
        eligible = self.I + self.P + self.R + self.NC + self.O
        known = eligible + self.NE
        return eligible / known if known else None


def _ratio(num: float, den: float) -> float | None:
    return num / den if den else None


def outcome_rates(counts: OutcomeCounts, e: float | None = None) -> dict[str, float | None]:
    """RR1–RR6, COOP1–4, REF1–3, CON1–3 and the `e` used. A rate with a zero
    denominator is None."""
    if e is None:
        e = counts.estimated_e()
        if e is None:
            e = 1.0  # nothing known about eligibility: treat unknown cases as eligible (conservative)
    if not 0.0 <= e <= 1.0:
        raise RatesError(f"e must be between 0 and 1, not {e}")
    c = counts
    ip = c.I + c.P
    contacted_non = c.R + c.NC + c.O
    u = c.UH + c.UO
    full = ip + contacted_non + u
    with_e = ip + contacted_non + e * u
    known = ip + contacted_non
    return {
        "e": e,
        "RR1": _ratio(c.I, full),
        "RR2": _ratio(ip, full),
        "RR3": _ratio(c.I, with_e),
        "RR4": _ratio(ip, with_e),
        "RR5": _ratio(c.I, known),
        "RR6": _ratio(ip, known),
        "COOP1": _ratio(c.I, ip + c.R + c.O),
        "COOP2": _ratio(ip, ip + c.R + c.O),
        "COOP3": _ratio(c.I, ip + c.R),
        "COOP4": _ratio(ip, ip + c.R),
        "REF1": _ratio(c.R, full),
        "REF2": _ratio(c.R, with_e),
        "REF3": _ratio(c.R, known),
        "CON1": _ratio(ip + c.R + c.O, ip + c.R + c.O + c.NC + u),
        "CON2": _ratio(ip + c.R + c.O, ip + c.R + c.O + c.NC + e * u),
        "CON3": _ratio(ip + c.R + c.O, ip + c.R + c.O + c.NC),
    }


def dispositions_to_counts(
    dispositions: Mapping[str, int], stops: Iterable[str] = (), mapping: Mapping[str, str] | None = None
) -> OutcomeCounts:
    """Counts from our dispositions: complete → I, partial → P, break-off → R, and each
    `stop` (a screen-out) → NE unless `mapping` says otherwise."""
    base = {"complete": "I", "partial": "P", "break-off": "R", **dict.fromkeys(stops, "NE")}
    base.update(mapping or {})
    out: dict[str, int] = dict.fromkeys(CATEGORIES, 0)
    for name, n in dispositions.items():
        cat = base.get(name) or category_of(name)
        if cat is None:
            raise RatesError(f"disposition {name!r} has no outcome category; map it in [quality.rates]")
        out[cat] += int(n)
    return OutcomeCounts(**out)
