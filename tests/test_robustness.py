"""Garbage, truncated and mutated specs give diagnostics, never an exception."""

from __future__ import annotations

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from logiccheck.checks.runner import run_checks
from logiccheck.loader import load_text
from logiccheck.report.graph_data import build_drawing
from logiccheck.report.graph_dot import to_dot
from logiccheck.report.graph_mermaid import to_mermaid
from tests.conftest import SPECS

SEEDS = [(SPECS / name).read_text(encoding="utf-8") for name in ("bikeshare.qlc", "clinic_visit.qlc", "onboarding.qlc")]
# Characters that matter to the grammar, plus a few that it never accepts.
PIECES = st.sampled_from([*'abcxyz_019 .:=<>!(){},"#\n\t-+*/\\', "  ", "\n  ", "when ", "section ", "\ufeff", "é"])
ALPHABET = PIECES


def assert_only_diagnostics(text: str) -> None:
    loaded = load_text(text, "fuzz.qlc")
    drawing = build_drawing(loaded.questionnaire)
    assert to_dot(drawing).startswith("digraph") and "flowchart" in to_mermaid(drawing)
    diagnostics = run_checks(loaded, solver=False)
    for d in diagnostics:
        assert d.check != "internal-error", d.message
        assert d.line >= 1 and d.column >= 1, (d.check, d.line, d.column)
        assert d.message


@settings(max_examples=120, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(PIECES, max_size=120).map("".join) | st.text(max_size=120))
def test_random_text(text: str) -> None:
    assert_only_diagnostics(text)


@st.composite
def mutated(draw: st.DrawFn) -> str:
    text = draw(st.sampled_from(SEEDS))
    lines = text.split("\n")
    for _ in range(draw(st.integers(1, 4))):
        op = draw(st.sampled_from(["delete", "duplicate", "swap", "char", "truncate", "indent"]))
        if not lines:
            break
        i = draw(st.integers(0, len(lines) - 1))
        if op == "delete":
            del lines[i]
        elif op == "duplicate":
            lines.insert(i, lines[i])
        elif op == "swap":
            j = draw(st.integers(0, len(lines) - 1))
            lines[i], lines[j] = lines[j], lines[i]
        elif op == "indent":
            lines[i] = draw(st.sampled_from(["", " ", "    ", "\t"])) + lines[i].lstrip()
        elif op == "char" and lines[i]:
            k = draw(st.integers(0, len(lines[i]) - 1))
            how = draw(st.sampled_from(["drop", "double", "replace"]))
            ch = draw(ALPHABET)
            line = lines[i]
            lines[i] = {
                "drop": line[:k] + line[k + 1 :],
                "double": line[: k + 1] + line[k:],
                "replace": line[:k] + ch + line[k + 1 :],
            }[how]
        elif op == "truncate":
            joined = "\n".join(lines)
            cut = draw(st.integers(0, len(joined)))
            lines = joined[:cut].split("\n")
    return "\n".join(lines)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(mutated())
def test_mutated_specs(text: str) -> None:
    assert_only_diagnostics(text)
