"""Re-parsing only the changed top-level statements gives exactly the whole-file parse."""

from __future__ import annotations

import random

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from logiccheck.loader import load_text
from logiccheck.server.incremental import ChunkCache, chunks, load_incremental
from tests.conftest import SPECS
from tests.data.specgen import make_spec

DEMO = sorted(SPECS.rglob("*.qlc"))


def _same(a, b) -> bool:  # type: ignore[no-untyped-def]
    """Equal nodes with equal positions, and equal syntax diagnostics."""
    return a.questionnaire.spec.model_dump() == b.questionnaire.spec.model_dump() and [
        d.model_dump() for d in a.syntax
    ] == [d.model_dump() for d in b.syntax]


def test_chunks_split_at_top_level_lines_outside_brackets() -> None:
    text = 'survey s "S"\n# about a\na: single { x = 1 "X",\ny = 2 "Y" } "A?"\n  when 1 = 1\n\nb: text "B"\n'
    assert [(line, piece.split("\n")[0]) for line, _, piece in chunks(text)] == [
        (1, 'survey s "S"'), (3, 'a: single { x = 1 "X",'), (7, 'b: text "B"'),
    ]
    assert "".join(piece for _, _, piece in chunks(text)) == text


def test_demo_specs_and_their_edits_parse_as_the_whole_file() -> None:
    for path in DEMO:
        text = path.read_text(encoding="utf-8")
        cache = ChunkCache()
        assert _same(load_incremental(cache, text, "f.qlc"), load_text(text, "f.qlc")), path.name
        lines = text.split("\n")
        middle = len(lines) // 2
        edited = "\n".join([*lines[:middle], '# new', 'zz_new: text "New?"', *lines[middle:]])
        assert _same(load_incremental(cache, edited, "f.qlc"), load_text(edited, "f.qlc")), path.name
        # Only the statement the edit touched (or none, for a new one) is parsed again;
        # a spec with a syntax error goes through the ordinary parser.
        if not load_text(text, "f.qlc").syntax:
            assert cache.parsed <= 2


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(seed=st.integers(0, 10**6), edits=st.lists(st.integers(0, 10**6), min_size=1, max_size=4))
def test_random_edits_keep_the_cache_exact(seed: int, edits: list[int]) -> None:
    text = make_spec(seed, 8)
    cache = ChunkCache()
    assert _same(load_incremental(cache, text, "f.qlc"), load_text(text, "f.qlc"))
    for edit in edits:
        rng = random.Random(edit)
        lines = text.split("\n")
        at = rng.randrange(len(lines))
        choice = rng.random()
        if choice < 0.3:
            lines.insert(at, lines[rng.randrange(len(lines))])  # a repeated statement
        elif choice < 0.6:
            del lines[at]
        elif choice < 0.8:
            lines[at] = lines[at].replace("=", "!=", 1)
        else:
            lines[at] = lines[at] + " ("  # a syntax error: the ordinary parser takes over
        text = "\n".join(lines)
        assert _same(load_incremental(cache, text, "f.qlc"), load_text(text, "f.qlc"))
