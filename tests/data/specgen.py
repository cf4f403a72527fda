"""Small random specs for property tests: items of every kind, conditions over earlier
items (comparisons, lists, ranges, has, count, answered, asked, not/and/or), a section,
a derived value, a stop and a skip."""

from __future__ import annotations

import random

HEADER = """survey prop "Property test"

codes yesno
  yes = 1 "Yes"
  no  = 2 "No"

codes tri
  a = 1 "A"
  b = 2 "B"
  c = 3 "C"

nonresponse
  dk      = 98 "Don't know"
  refused = 99 "Prefer not to say"

"""

TYPES = [
    ("single", "single yesno"),
    ("single3", "single tri"),
    ("number", "number 0..10"),
    ("decimal", "decimal 0..5"),
    ("multi", "multi tri"),
    ("text", "text"),
]


def atom(rng: random.Random, items: list[tuple[str, str, bool]]) -> str:
    name, kind, strict = rng.choice(items)
    r = rng.random()
    if r < 0.12:
        return f"answered({name})"
    if r < 0.2:
        return f"asked({name})"
    if kind == "single":
        return rng.choice(
            [f"{name} = yes", f"{name} != no", f"{name} in (yes, no)", f"{name} = 1"]
            + ([f"{name} = dk", f"{name} != refused"] if not strict else [])
        )
    if kind == "single3":
        return rng.choice([f"{name} = a", f"{name} != c", f"{name} in (a, b)", f"{name} >= 2", f"{name} < b"])
    if kind == "number":
        return rng.choice(
            [f"{name} > 4", f"{name} in 2..6", f"{name} + 1 >= 5", f"{name} * 2 < 9", f"{name} != 3", f"-{name} < -2"]
            + ([f"{name} = 98"] if not strict else [])
        )
    if kind == "decimal":
        return rng.choice([f"{name} >= 2.5", f"{name} / 2 < 1", f"{name} in 1..3"])
    if kind == "multi":
        return rng.choice([f"{name} has a", f"{name} has any (b, c)", f"{name} has all (a, b)", f"count({name}) >= 2"])
    return f"answered({name})"


def condition(rng: random.Random, items: list[tuple[str, str, bool]], depth: int = 0) -> str:
    r = rng.random()
    if depth >= 2 or r < 0.55:
        return atom(rng, items)
    if r < 0.7:
        return f"not ({condition(rng, items, depth + 1)})"
    op = "and" if r < 0.85 else "or"
    return f"({condition(rng, items, depth + 1)} {op} {condition(rng, items, depth + 1)})"


def make_spec(seed: int, size: int = 6) -> str:
    rng = random.Random(seed)
    lines: list[str] = [HEADER]
    items: list[tuple[str, str, bool]] = []  # (name, kind, strict) usable in conditions
    section_at = rng.randrange(1, size) if rng.random() < 0.5 else None
    stop_at = rng.randrange(1, size) if rng.random() < 0.4 else None
    let_at = rng.randrange(1, size) if rng.random() < 0.4 else None
    skip_at = rng.randrange(1, size - 1) if size > 2 and rng.random() < 0.4 else None
    indent = ""
    lets: list[str] = []
    for i in range(size):
        if i == section_at and items:
            lines.append(f'section part "Part" when {condition(rng, items)}')
            indent = "  "
        if i == stop_at and items:
            lines.append(f'{indent}stop early "Thank you." when {condition(rng, items)}')
        if i == let_at and items:
            lines.append(f"{indent}let d{i} = ({condition(rng, items)})")
            lets.append(f"d{i}")
        if i == skip_at and items:
            lines.append(f"{indent}skip to q{rng.randrange(i + 1, size)} when {condition(rng, items)}")
        kind, typ = rng.choice(TYPES)
        strict = kind in ("single", "single3", "number", "decimal") and rng.random() < 0.3
        flags = " strict" if strict else ""
        if kind in ("single", "single3") and rng.random() < 0.2:
            flags += " gate"
        when = ""
        if items and rng.random() < 0.7:
            cond = f"d{let_at}" if lets and rng.random() < 0.3 else condition(rng, items)
            when = f" when {cond}"
        lines.append(f'{indent}q{i}: {typ} "Question {i}"{when}{flags}')
        items.append((f"q{i}", kind, strict))
    if items and rng.random() < 0.5:
        lines.append(f'check c1 "Rule" when {condition(rng, items)} require {condition(rng, items)}')
    return "\n".join(lines) + "\n"
