"""Generate a valid spec of a given size, for benchmarks and scale tests.

The spec is invented filler: sections of items, with grids, chains of gates whose
follow-ups nest `depth` deep (each gate asked only when the one before it was `yes`,
inside nested sections), derived values, and optionally skips and screen-out stops.
It lints clean of static errors by construction.
"""

from __future__ import annotations

import argparse
import random
from dataclasses import dataclass

HEADER = '''survey generated "Generated benchmark questionnaire"

codes yesno
  yes = 1 "Yes"
  no = 2 "No"

codes scale5
  s1 = 1 "Very poor"
  s2 = 2 "Poor"
  s3 = 3 "Fair"
  s4 = 4 "Good"
  s5 = 5 "Very good"

codes topics
  t1 = 1 "First topic"
  t2 = 2 "Second topic"
  t3 = 3 "Third topic"
  t4 = 4 "Fourth topic"

nonresponse
  dk = 98 "Don't know"
  refused = 99 "Prefer not to say"

sample region single { north = 1 "North", south = 2 "South" }

'''


@dataclass
class Shape:
    """What the generated spec contains; `items` counts items and grid rows."""

    items: int = 5000
    section_size: int = 50
    depth: int = 3  # gates nested this deep (nested sections, each opened by a gate)
    grid_rows: int = 5
    grid_every: int = 4  # one grid per this many blocks of plain items
    lets: bool = True
    skips: bool = False
    stops: bool = False
    seed: int = 1


def generate(shape: Shape | None = None, **overrides: object) -> str:
    """The text of a spec with about `shape.items` items."""
    s = shape or Shape()
    for key, value in overrides.items():
        setattr(s, key, value)
    rnd = random.Random(s.seed)
    out = [HEADER]
    count = 0
    sec = 0
    while count < s.items:
        sec += 1
        budget = min(s.section_size, s.items - count)
        lines, used = _section(s, rnd, sec, budget)
        out.extend(lines)
        count += used
    return "\n".join(out) + "\n"


def _section(s: Shape, rnd: random.Random, sec: int, budget: int) -> tuple[list[str], int]:
    p = f"s{sec}_"
    lines = [f'section sec{sec} "Section {sec}"' + (" when region = north" if sec % 7 == 0 else "")]
    used = 0
    # Opening gate and numeric item; the stop and skip read them.
    lines.append(f'  {p}open: single yesno "Does part {sec} apply to you?" gate')
    lines.append(f'  {p}num: number 0..90 "How many times, part {sec}?" strict')
    used += 2
    if s.stops and sec % 5 == 0:
        lines.append(f'  stop screen{sec} "Thank you, that is all." when {p}num > 89')
    if s.lets:
        lines.append(f"  let {p}busy = ({p}open = yes and {p}num >= 10)")
    if s.skips and sec % 3 == 0:
        lines.append(f"  skip to {p}after when {p}open = no")
    block = 0
    indent = "  "
    depth = 0
    prev_gate = f"{p}open"
    while used < budget - 1:
        block += 1
        if depth < s.depth and block % 2 == 1:
            # Open a nested section guarded by the previous gate.
            depth += 1
            lines.append(f'{indent}section {p}n{depth}_{block} "Part {sec}.{block}" when {prev_gate} = yes')
            indent += "  "
            gate = f"{p}g{block}"
            lines.append(f'{indent}{gate}: single yesno "Gate {block} of part {sec}?" gate')
            prev_gate = gate
            used += 1
            continue
        if block % s.grid_every == 0 and used + s.grid_rows <= budget - 1:
            lines.append(f'{indent}grid {p}grid{block} single scale5 "How do you rate each?"')
            for r in range(s.grid_rows):
                lines.append(f'{indent}  {p}r{block}_{r} "Aspect {r + 1}"')
            used += s.grid_rows
            continue
        kind = rnd.randrange(4)
        name = f"{p}q{block}"
        if kind == 0:
            lines.append(f'{indent}{name}: single scale5 "Question {block}?" when {prev_gate} = yes')
        elif kind == 1:
            lines.append(f'{indent}{name}: multi topics "Which topics, {block}?"')
        elif kind == 2:
            cond = f"{p}busy" if s.lets else f"{p}num > 3"
            lines.append(f'{indent}{name}: text "You said {{{p}num}}. Why?" when {cond}')
        else:
            lines.append(f'{indent}{name}: number 0..50 "How many, {block}?" strict when {p}num in 1..60')
        used += 1
    lines.append(f'  {p}after: text "Anything else about part {sec}?"')
    used += 1
    lines.append("")
    return lines, used


ROUTING_HEADER = """survey bench "Generated routing benchmark"

codes yesno
  yes = 1 "Yes"
  no = 2 "No"

codes agree5
  sd = 1 "Strongly disagree"
  d = 2 "Disagree"
  n = 3 "Neither"
  a = 4 "Agree"
  sa = 5 "Strongly agree"

codes kinds
  food = 1 "Food"
  rent = 2 "Rent"
  travel = 3 "Travel"
  other = 4 "Other"

nonresponse
  dk = 98 "Don't know"
  refused = 99 "Refused"

sample region single { north = 1 "North", south = 2 "South" }
"""

ROUTING_DEPTH = 6


def routing_module(k: int, rng: random.Random, plant: bool) -> list[str]:
    """One section of about 34 items for `routing_spec`."""
    when = f" when region = {'north' if k % 2 else 'south'}" if k % 3 == 0 else ""
    out = [f'section s{k} "Module {k}"{when}']
    out.append(f'  g{k}_1: single yesno "Gate {k}.1" gate required')
    for j in range(1, ROUTING_DEPTH + 1):
        if j > 1:
            out.append(f'  g{k}_{j}: single yesno "Gate {k}.{j}" when g{k}_{j - 1} = yes')
        out.append(f'  a{k}_{j}: number 0..100 "Amount {k}.{j}" when g{k}_{j} = yes')
        out.append(f'  grid m{k}_{j} single agree5 "Opinions {k}.{j}" when g{k}_{j} = yes')
        out.append(f'    r{k}_{j}_1 "Row 1"')
        out.append(f'    r{k}_{j}_2 "Row 2"')
        out.append(f'    r{k}_{j}_3 "Row 3" when a{k}_{j} > {rng.randint(5, 60)}')
        if j == 2:
            out.append(f"  skip to e{k} when g{k}_2 = no and a{k}_1 < {rng.randint(3, 20)}")
        if j == 3 and k % 4 == 1:
            out.append(f'  stop out{k} "Thank you." when a{k}_3 = 0 and g{k}_1 = yes')
    out.append(f"  let l{k} = (a{k}_1 >= 50 or g{k}_2 = yes)")
    out.append(f'  t{k}: text "Tell us more" when l{k}')
    out.append(f'  k{k}: multi kinds "Spending on?"')
    out.append(f'  ko{k}: text "Other spending?" when k{k} has other')
    if plant:
        out.append(f'  z{k}: text "Never asked" when g{k}_3 = yes and g{k}_2 = no')
    out.append(f'  e{k}: number 0..10 "Score {k}"')
    return out


def routing_spec(items: int, seed: int = 1) -> str:
    """Sections of about 34 items: gates nested 6 deep, grids, lets, skips, stops, and
    one never-reachable item planted in every tenth section."""
    rng = random.Random(seed)
    lines = ROUTING_HEADER.splitlines()
    k = 0
    count = 0
    while count < items:
        k += 1
        body = routing_module(k, rng, plant=k % 10 == 5)
        count += sum(1 for line in body if ":" in line.split('"')[0] or line.startswith("    r"))
        lines.extend(body)
    return "\n".join(lines) + "\n"


def item_count(text: str) -> int:
    """Items and grid rows in a generated spec (for reporting)."""
    from logiccheck.loader import load_text

    return len(load_text(text).questionnaire.items())


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("-n", "--items", type=int, default=5000)
    parser.add_argument("--depth", type=int, default=3)
    parser.add_argument("--skips", action="store_true")
    parser.add_argument("--stops", action="store_true")
    parser.add_argument("--seed", type=int, default=1)
    args = parser.parse_args()
    print(generate(Shape(items=args.items, depth=args.depth, skips=args.skips, stops=args.stops, seed=args.seed)), end="")


if __name__ == "__main__":
    main()
