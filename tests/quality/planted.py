"""A hand-built export of an invented library visitor survey, with planted problems."""

from __future__ import annotations

import numpy as np
import pandas as pd

SPEC = """survey libvisit "Public library visitor survey"

codes yn
  yes = 1 "Yes"
  no  = 2 "No"

codes sat5
  vd = 1 "Very dissatisfied"
  d  = 2 "Dissatisfied"
  n  = 3 "Neither"
  s  = 4 "Satisfied"
  vs = 5 "Very satisfied"

nonresponse
  dk = 98 "Don't know"

section intro "About your visit"
  age: number 0..120 "How old are you?" strict
  stop minor "Thank you. This survey is for visitors aged 14 and over." when age < 14
  member: single yn "Do you hold a library card?" gate

section card "Card holders" when member = yes
  visits: number 0..365 "How many times did you visit in the last year?"
  borrow: single yn "Did you borrow anything today?" gate
  items_n: number 0..50 "How many items did you borrow?" when borrow = yes
  grid services single sat5 "How satisfied are you with each of these?"
    s_staff "Help from staff"
    s_space "Study space"
    s_hours "Opening hours"
    s_wifi "Wi-fi"
    s_events "Events"
    s_stock "Book stock"
    s_clean "Cleanliness"
    s_access "Step-free access"

section noncard "Not a card holder" when member = no
  why_no: single { notime = 1 "No time", online = 2 "I read online", far = 3 "Too far" } "Why not?"

section wrap "Finally"
  overall: number 0..10 "How likely are you to recommend the library, 0 to 10?"
  comments: text "Anything else you would like to tell us?"

check items_ok "Borrowers borrowed at least one item"
  when borrow = yes
  require items_n >= 1
"""

GRID = ["s_staff", "s_space", "s_hours", "s_wifi", "s_events", "s_stock", "s_clean", "s_access"]
COLUMNS = ["id", "email", "age", "member", "visits", "borrow", "items_n", *GRID, "why_no", "overall", "comments", "duration"]


def _varied_grid(rng: np.random.Generator) -> list[int]:
    """Random satisfaction answers that are neither flat nor a repeating cycle."""
    while True:
        g = [int(x) for x in rng.integers(1, 6, size=8)]
        if len(set(g)) >= 3 and all(g[i] != g[i - 2] for i in (2,)) and g[:4] != g[4:]:
            return g


def clean_row(rng: np.random.Generator, rid: str) -> dict[str, object]:
    row: dict[str, object] = dict.fromkeys(COLUMNS, "")
    row.update(id=rid, email=f"{rid}@example.org", age=int(rng.integers(18, 80)), duration=int(rng.integers(500, 700)))
    if rng.random() < 0.8:
        borrow = 1 if rng.random() < 0.6 else 2
        row.update(member=1, visits=int(rng.integers(1, 120)), borrow=borrow)
        if borrow == 1:
            row["items_n"] = int(rng.integers(1, 9))
        row.update(dict(zip(GRID, _varied_grid(rng), strict=True)))
    else:
        row.update(member=2, why_no=int(rng.integers(1, 4)))
    row["overall"] = int(rng.integers(0, 11))
    if rng.random() < 0.3:
        row["comments"] = "More seats near the windows, please."
    return row


def card_row(rid: str, grid: list[int], **extra: object) -> dict[str, object]:
    row: dict[str, object] = dict.fromkeys(COLUMNS, "")
    row.update(id=rid, email=f"{rid}@example.org", age=41, member=1, visits=30, borrow=1, items_n=3, overall=7, duration=610)
    row.update(dict(zip(GRID, grid, strict=True)))
    row.update(extra)
    return row


def build() -> tuple[pd.DataFrame, pd.DataFrame, dict[str, set[str]]]:
    """The export, the sample frame and, per respondent id, the checks that must flag it."""
    rng = np.random.default_rng(20260)
    rows = [clean_row(rng, f"c{i:02d}") for i in range(30)]
    expected: dict[str, set[str]] = {r["id"]: set() for r in rows}  # type: ignore[misc]

    # Two different interviews filed under one id.
    rows.append(card_row("p-dupid", [2, 3, 4, 2, 5, 3, 1, 4], age=35, visits=12, overall=6))
    rows.append(card_row("p-dupid", [4, 1, 3, 5, 2, 2, 4, 1], age=62, visits=80, borrow=2, items_n="", overall=9))
    expected["p-dupid"] = {"duplicate-id"}
    # An exact copy under another id (the interview length differs, as it would).
    orig = card_row("p-orig", [3, 4, 2, 5, 4, 1, 3, 2], age=29, visits=44, items_n=2, overall=8, duration=580)
    rows.append(orig)
    rows.append({**orig, "id": "p-copy", "email": "p-copy@example.org", "duration": 640})
    expected["p-orig"] = expected["p-copy"] = {"duplicate-response"}
    # A near-copy: 12 of the 14 items asked of both agree (85.7 %, above 85 %).
    near = card_row("p-near1", [5, 2, 4, 1, 3, 4, 2, 5], age=53, visits=7, items_n=5, overall=3, duration=560)
    rows.append(near)
    rows.append({**near, "id": "p-near2", "email": "p-near2@example.org", "visits": 9, "overall": 4, "duration": 655})
    expected["p-near1"] = expected["p-near2"] = {"near-duplicate"}
    # A straight-liner and a see-saw.
    rows.append(card_row("p-flat", [4] * 8, age=47, visits=60, overall=5))
    expected["p-flat"] = {"straightline"}
    rows.append(card_row("p-seesaw", [1, 5, 1, 5, 1, 5, 1, 5], age=24, visits=3, items_n=1, overall=2))
    expected["p-seesaw"] = {"pattern-response"}
    # A speeder: 150 s against a median near 600 s.
    rows.append(card_row("p-fast", [2, 4, 3, 3, 5, 1, 4, 2], age=38, visits=15, overall=10, duration=150))
    expected["p-fast"] = {"speeder"}
    # Someone who was never sampled.
    rows.append(card_row("p-stranger", [3, 1, 4, 2, 2, 5, 3, 4], age=66, visits=100, overall=1))
    expected["p-stranger"] = {"not-in-frame"}
    # A break-off after the first gate: age and member only.
    brk: dict[str, object] = dict.fromkeys(COLUMNS, "")
    brk.update(id="p-break", email="p-break@example.org", age=33, member=1)
    rows.append(brk)
    expected["p-break"] = set()  # caught by its disposition, by no check

    export = pd.DataFrame(rows, columns=COLUMNS).astype(str)
    ids = [str(i) for i in export["id"].unique() if i != "p-stranger"]
    # The frame spells e-mails with other case and stray spaces.
    frame = pd.DataFrame({"id": ids, "email": [f" {i.upper()}@Example.org " for i in ids]})
    return export, frame, expected


def build_routed() -> tuple[pd.DataFrame, pd.DataFrame, dict[str, set[str]]]:
    """Like `build`, with the respondents a speeder rule must leave alone: screen-outs
    and break-offs with very short interviews, and partials. Also planted: a speeding
    complete and a speeding partial, short routes that agree (never near-duplicates)."""
    export, frame, expected = build()
    rows = export.to_dict("records")
    rng = np.random.default_rng(20261)

    def blank(rid: str, **values: object) -> dict[str, object]:
        row: dict[str, object] = dict.fromkeys(COLUMNS, "")
        row.update(id=rid, email=f"{rid}@example.org", **values)
        return row

    extra: list[dict[str, object]] = []
    # Screen-outs: the stop ends the interview after one question, in seconds.
    for i in range(6):
        extra.append(blank(f"s-minor{i}", age=int(rng.integers(8, 14)), duration=int(rng.integers(5, 15))))
    # Break-offs: two answers and gone; identical short routes share their blanks only.
    for i in range(6):
        extra.append(blank(f"s-break{i}", age=40, member=1, duration=int(rng.integers(10, 40))))
    # Partials: half the grid left blank, a normal pace.
    for i in range(4):
        row = clean_row(rng, f"s-part{i}")
        row.update(member=1, visits=int(rng.integers(1, 50)), borrow=2, items_n="", why_no="")
        grid = _varied_grid(rng)
        row.update(dict(zip(GRID, grid[:4] + [""] * 4, strict=True)))
        extra.append(row)
    # Speeders among completes and partials: a few seconds per item asked.
    extra.append(card_row("p-fast2", [5, 3, 1, 4, 2, 2, 5, 3], age=57, visits=22, overall=6, duration=120))
    part = card_row("p-fastpart", [1, 4, 2, 5, "", "", "", ""], age=31, visits=5, borrow=2, items_n="", overall=8,
                    duration=60)
    extra.append(part)
    for row in extra:
        expected[str(row["id"])] = set()
    expected["p-fast2"] = {"speeder"}
    expected["p-fastpart"] = {"speeder"}
    out = pd.DataFrame(rows + extra, columns=COLUMNS).astype(str)
    ids = [str(i) for i in out["id"].unique() if i != "p-stranger"]
    frame = pd.DataFrame({"id": ids, "email": [f" {i.upper()}@Example.org " for i in ids]})
    return out, frame, expected
