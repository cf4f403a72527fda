"""The terminal bar: expected versus answered without reading numbers."""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st
from rich.console import Console

from logiccheck.report.bars import MARK, MISSING, ON, OUT, bar_cells, bar_text


def test_clean_route_is_a_full_bar() -> None:
    assert bar_cells(100, 100, 0, 0, width=10) == ON * 10


def test_missing_on_path_shows_as_a_light_gap() -> None:
    assert bar_cells(100, 80, 0, 20, width=10) == ON * 8 + MISSING * 2


def test_out_of_path_shows_as_a_tail_and_is_never_rounded_away() -> None:
    assert bar_cells(50, 70, 20, 0, width=7) == ON * 5 + OUT * 2
    assert OUT in bar_cells(1000, 1001, 1, 0, width=8)
    assert MISSING in bar_cells(1000, 999, 0, 1, width=8)


def test_expected_mark_where_answers_fall_short() -> None:
    cells = bar_cells(100, 50, 0, 0, width=10)
    assert cells.startswith(ON * 5) and MARK not in cells[:5]
    assert bar_cells(80, 40, 0, 0, width=10) == ON * 5 + " " * 4 + MARK


@settings(max_examples=60, deadline=None)
@given(st.integers(0, 500), st.integers(0, 500), st.integers(0, 500), st.integers(0, 500), st.integers(4, 30))
def test_bar_always_has_its_width(expected, answered, oop, missing, width) -> None:
    oop = min(oop, answered)
    cells = bar_cells(expected, answered, oop, missing, width)
    assert len(cells) == width
    assert (OUT in cells) == (oop > 0)


def test_colour_only_where_asked() -> None:
    console = Console(no_color=True, color_system=None, width=40)
    with console.capture() as cap:
        console.print(bar_text(10, 12, 2, 0, width=6))
    assert cap.get().strip() == bar_cells(10, 12, 2, 0, width=6).strip()
