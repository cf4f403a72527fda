"""How long `diff` takes on generated specs, against loading the two versions (baseline).

    python benchmarks/bench_diff.py [N_BLOCKS]

Each block is a gate, two follow-ups and a grid of three rows; the new version tightens
one gate in the middle, so every item after it is compared and one block's items change.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from logiccheck.diff import diff_questionnaires
from logiccheck.loader import load_text


def spec(blocks: int, tighten: int | None) -> str:
    lines = [
        'survey bench "Generated"',
        "codes yesno",
        '  yes = 1 "Yes"',
        '  no = 2 "No"',
        "nonresponse",
        '  dk = 98 "Don\'t know"',
        'age: number 0..120 "Age?" strict',
    ]
    for i in range(blocks):
        extra = " and age >= 30" if i == tighten else ""
        lines += [
            f'g{i}: single yesno "Gate {i}?" gate',
            f'f{i}: number 0..50 "How many {i}?" when g{i} = yes{extra}',
            f'h{i}: single yesno "Follow-up {i}?" when not (g{i} = no or f{i} > 40)',
            f'grid r{i} single yesno "Rows {i}" when g{i} = yes',
            f'  r{i}a "Row a"',
            f'  r{i}b "Row b" when f{i} >= 1',
            f'  r{i}c "Row c"',
        ]
    return "\n".join(lines) + "\n"


def main() -> None:
    blocks = int(sys.argv[1]) if len(sys.argv) > 1 else 100
    old_text, new_text = spec(blocks, None), spec(blocks, blocks // 2)
    load_text(spec(1, None), "warm-up.qlc")  # build the parser once, outside the timings
    t0 = time.perf_counter()
    old = load_text(old_text, "old.qlc").questionnaire
    new = load_text(new_text, "new.qlc").questionnaire
    t1 = time.perf_counter()
    result = diff_questionnaires(old, new)
    t2 = time.perf_counter()
    items = sum(1 for e in new.entries if e.is_item)
    changed = sum(c.kind == "routing-changed" for c in result.changes)
    print(f"items per version: {items}")
    print(f"load both versions (baseline): {t1 - t0:.3f} s")
    print(f"diff (items compared: {result.compared}, routing changed: {changed}): {t2 - t1:.3f} s")
    print(f"ratio diff / load: {(t2 - t1) / (t1 - t0):.1f}x")


if __name__ == "__main__":
    main()
