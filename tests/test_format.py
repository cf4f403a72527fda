"""The formatter: one layout, idempotent, comments kept, meaning unchanged."""

from __future__ import annotations

import random
import re
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from benchmarks.generate import Shape, generate
from logiccheck.fmt import FormatError, format_text, meaning
from logiccheck.fmt.layout import layout
from logiccheck.loader import load_text
from tests.cli_run import run_cli
from tests.conftest import SPECS
from tests.data.specgen import make_spec

DEMO = sorted(p for p in SPECS.rglob("*.qlc") if "syntax" not in p.name)


def _same_meaning(a: str, b: str) -> bool:
    return meaning(load_text(a).questionnaire) == meaning(load_text(b).questionnaire)


def _comments(text: str) -> list[str]:
    """Comment texts in order (outside quoted texts)."""
    return [m.group().rstrip() for m in re.finditer(r'"(?:\\.|[^"\\\n])*"|#[^\n]*', text) if m.group().startswith("#")]


def _roughen(text: str, seed: int) -> str:
    """The same spec written carelessly: twice the indentation, extra spaces between
    tokens, trailing spaces and doubled blank lines."""
    rng = random.Random(seed)
    out = []
    for line in text.split("\n"):
        indent = len(line) - len(line.lstrip(" "))
        body = line.strip()
        parts = re.split(r'("(?:\\.|[^"\\\n])*"|#[^\n]*)', body)
        rough = []
        for i, part in enumerate(parts):
            if i % 2 == 1:
                rough.append(part)
                continue
            part = re.sub(r" ", lambda _: " " * rng.randint(1, 3), part)
            part = re.sub(r"([,(){}]|(?<![<>!])=)", lambda m: rng.choice(["", " "]) + m.group(1) + rng.choice(["", " "]), part)
            rough.append(part)
        out.append(" " * (indent * 2) + "".join(rough) + " " * rng.randint(0, 2))
        if not body and rng.random() < 0.5:
            out.append("")  # runs of blank lines become one
    return "\n".join(out)


@pytest.mark.parametrize("path", DEMO, ids=lambda p: p.name)
def test_demo_specs_are_formatted_and_keep_their_meaning(path: Path) -> None:
    text = path.read_text(encoding="utf-8")
    out = format_text(text, str(path))
    # The demo specs are kept formatted, so `format --check` passes on them.
    assert out == text
    rough = _roughen(text, seed=len(text))
    assert _same_meaning(rough, text), "the roughened copy is itself a valid spec"
    assert format_text(rough, str(path)) == text


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(seed=st.integers(0, 10**6), size=st.integers(2, 12), rough=st.integers(0, 10**6))
def test_generated_specs_keep_meaning_and_comments(seed: int, size: int, rough: int) -> None:
    text = make_spec(seed, size)
    # Comments everywhere: above statements, after them, indented or not.
    rng = random.Random(rough)
    lines = []
    for line in text.split("\n"):
        if line.strip() and rng.random() < 0.2:
            lines.append(" " * rng.choice([0, 2, 4]) + f"# note {len(lines)}")
        lines.append(line + (f"  # tail {len(lines)}" if line.strip() and rng.random() < 0.2 else ""))
    text = _roughen("\n".join(lines), rough)
    out = format_text(text)
    assert _same_meaning(out, text)
    assert format_text(out) == out  # idempotent
    assert _comments(out) == _comments(text)


def test_large_generated_spec_with_grids_skips_and_stops() -> None:
    text = generate(Shape(items=400, depth=3, skips=True, stops=True, seed=7))
    out = format_text(text)
    assert _same_meaning(out, text)
    assert format_text(out) == out


def test_layout_rules() -> None:
    messy = (
        "survey  s   \"S\"\n"
        "codes yn\n"
        "    yes=1 \"Yes\"\n"
        "\n\n"
        "    refused_answer = 10 \"Refused\"   # keep\n"
        "a:single yn \"A?\"  when(a=yes)or not a in(yes,yes)\n"
        "b :number -5..5 \"B?\"\n"
        "   when b>-1 and count( a )>=1\n"
        "\n\n\n"
        "c: single {x=1 \"X\",y=2 \"Y\"} \"C?\"\n"
    )
    assert layout(messy) == (
        'survey s "S"\n'
        "\n"
        "codes yn\n"
        '  yes            =  1 "Yes"\n'
        "\n"
        '  refused_answer = 10 "Refused"  # keep\n'
        "\n"
        'a: single yn "A?" when (a = yes) or not a in (yes, yes)\n'
        "\n"
        'b: number -5..5 "B?"\n'
        "  when b > -1 and count(a) >= 1\n"
        "\n"
        'c: single { x = 1 "X", y = 2 "Y" } "C?"\n'
    )


def test_comment_above_a_block_stays_in_the_block() -> None:
    text = 'survey s "S"\nsection a "A"\n  # first\n  x: text "X"\n  # last\n# after\ny: text "Y"\n'
    assert layout(text) == 'survey s "S"\n\nsection a "A"\n  # first\n  x: text "X"\n  # last\n\n# after\ny: text "Y"\n'


def test_unknown_statement_kinds_are_kept_as_written() -> None:
    # A statement this formatter does not know keeps its words and spacing; only its
    # indentation follows the block it is in.
    text = 'survey s "S"\nsection a "A"\n    x: text "X"\n    widget  w   "W"  min 3\n        x    reversed\n'
    assert layout(text) == 'survey s "S"\n\nsection a "A"\n  x: text "X"\n  widget  w   "W"  min 3\n    x    reversed\n'


def test_syntax_error_is_refused() -> None:
    with pytest.raises(FormatError, match=r"s\.qlc:2:\d+: cannot format"):
        format_text('survey s "S"\na single yn "A"\n', "s.qlc")


def test_format_command(tmp_path: Path) -> None:
    spec = tmp_path / "s.qlc"
    spec.write_text('survey s "S"\na: text  "A?"\n', encoding="utf-8")
    ran = run_cli("format", "--check", str(spec))
    assert ran.returncode == 1 and "would reformat" in ran.stdout
    assert spec.read_text(encoding="utf-8") == 'survey s "S"\na: text  "A?"\n'  # --check changes nothing
    ran = run_cli("format", str(spec))
    assert ran.returncode == 0
    assert spec.read_text(encoding="utf-8") == 'survey s "S"\na: text "A?"\n'
    assert run_cli("format", "--check", str(spec)).returncode == 0
    bad = tmp_path / "bad.qlc"
    bad.write_text('survey s "S"\na text "A?"\n', encoding="utf-8")
    ran = run_cli("format", str(bad), str(spec))
    assert ran.returncode == 2 and "bad.qlc:2" in ran.stderr
    assert bad.read_text(encoding="utf-8") == 'survey s "S"\na text "A?"\n'


def test_scale_blocks_are_spaced_like_other_statements() -> None:
    text = (
        'survey s "S"\n\ncodes agree\n  a = 1 "A"\n  b = 2 "B"\n  c = 3 "C"\n\n'
        'q1: single agree "One?"\nq2: single agree "Two?"\nq3: single agree "Three?"\n\n'
        'scale  care   "Care"  min 2\n     q1\n     q2    reversed\n     q3\n'
    )
    out = format_text(text, "s.qlc")
    assert out.endswith('scale care "Care" min 2\n  q1\n  q2 reversed\n  q3\n')
    assert format_text(out, "s.qlc") == out
    assert meaning(load_text(out, "s.qlc").questionnaire) == meaning(load_text(text, "s.qlc").questionnaire)
