"""The solver's routing facts agree exactly with a brute-force enumeration of every
respondent, on random small specs (hypothesis) and on hand-written ones."""

from __future__ import annotations

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from logiccheck.loader import load_text
from logiccheck.logic.routing import RoutingAnalysis
from tests.logic.oracle import Oracle

HEADER = """survey r "Random"

codes yesno
  yes = 1 "Yes"
  no = 2 "No"

nonresponse
  dk = 9 "Don't know"
"""

MAX_RESPONDENTS = 1500


@st.composite
def conditions(draw, visible: list[tuple[str, str]], depth: int = 2) -> str:  # type: ignore[no-untyped-def]
    """A condition over earlier names: every operator of the language appears."""
    if depth > 0 and draw(st.integers(0, 3)) == 0:
        kind = draw(st.sampled_from(["not", "and", "or"]))
        if kind == "not":
            return f"not ({draw(conditions(visible, depth - 1))})"
        a = draw(conditions(visible, depth - 1))
        b = draw(conditions(visible, depth - 1))
        return f"({a}) {kind} ({b})"
    name, kind = draw(st.sampled_from(visible))
    if kind == "single":
        return draw(st.sampled_from([
            f"{name} = yes", f"{name} != no", f"{name} != yes", f"{name} in (yes, dk)", f"{name} < 2",
            f"{name} >= 1", f"{name} = dk", f"answered({name})", f"asked({name})", f"{name} > 1",
        ]))
    if kind == "strict":
        return draw(st.sampled_from([f"{name} = yes", f"{name} != yes", f"{name} <= 1", f"answered({name})"]))
    if kind == "number":
        k = draw(st.integers(-1, 3))
        op = draw(st.sampled_from(["=", "!=", "<", "<=", ">", ">="]))
        return draw(st.sampled_from([
            f"{name} {op} {k}", f"{name} in 0..1", f"{name} + 1 {op} {k}", f"{name} * 2 = 2",
            f"{name} in (0, 2)", f"{name} - {name} = 0", f"not answered({name})", f"{name} / 2 < 1",
            f"-{name} < 0",
        ]))
    if kind == "multi":
        return draw(st.sampled_from([
            f"{name} has a", f"{name} has any (a, b)", f"{name} has all (a, b)", f"count({name}) >= 2",
            f"count({name}) = 1", f"answered({name})",
        ]))
    if kind == "text":
        return draw(st.sampled_from([f"answered({name})", f"asked({name})", f"not asked({name})"]))
    if kind == "sample":
        return draw(st.sampled_from([f"{name} = n", f"{name} != s", f"{name} in (n, s)", f"{name} > 1"]))
    if kind == "boollet":
        return draw(st.sampled_from([name, f"not {name}"]))
    if kind == "numlet":
        return f"{name} > {draw(st.integers(0, 2))}"
    raise AssertionError(kind)


@st.composite
def specs(draw) -> str:  # type: ignore[no-untyped-def]
    """A small spec: up to 7 items, sections, skips, stops and derived values."""
    lines = HEADER.splitlines()
    visible: list[tuple[str, str]] = []
    if draw(st.booleans()):
        lines.append('sample reg single { n = 1 "North", s = 2 "South" }')
        visible.append(("reg", "sample"))
    n_items = draw(st.integers(1, 6))
    items_made = 0
    names_made = 0
    pending_skips: list[str] = []  # skip lines waiting for a later target
    indent = ""
    section_left = 0
    sections = 0
    while items_made < n_items:
        if section_left == 0 and indent:
            indent = ""
        choice = draw(st.sampled_from(["item", "item", "item", "section", "grid", "let", "skip", "stop", "check"]))
        when = ""
        if visible and draw(st.booleans()):
            when = f" when {draw(conditions(visible))}"
        if choice == "section" and not indent and visible:
            sections += 1
            lines.append(f'section s{sections} "Part {sections}"{when}')
            indent = "  "
            section_left = draw(st.integers(1, 3))
            continue
        if choice == "grid" and visible and items_made + 2 <= n_items:
            sections += 1
            lines.append(f'{indent}grid s{sections} single yesno "Rows"{when}')
            for _ in range(2):
                items_made += 1
                names_made += 1
                name = f"q{names_made}"
                row_when = f" when {draw(conditions(visible))}" if draw(st.booleans()) else ""
                lines.append(f'{indent}  {name} "Row?"{row_when}')
                visible.append((name, "single"))
            if indent:
                section_left = max(section_left - 1, 0)
            continue
        if choice == "let" and visible:
            names_made += 1
            name = f"l{names_made}"
            numbers = [v for v, k in visible if k == "number"]
            if numbers and draw(st.booleans()):
                lines.append(f"{indent}let {name} = {numbers[0]} + 1")
                visible.append((name, "numlet"))
            else:
                lines.append(f"{indent}let {name} = ({draw(conditions(visible))})")
                visible.append((name, "boollet"))
            continue
        if choice == "stop" and visible:
            names_made += 1
            lines.append(f'{indent}stop x{names_made} "Bye"{when or " when " + draw(conditions(visible))}')
            continue
        if choice == "check" and visible:
            names_made += 1
            lines.append(f'{indent}check c{names_made} "Rule"{when} require {draw(conditions(visible))}')
            continue
        if choice == "skip" and visible:
            pending_skips.append(f"skip to TARGET{when or ' when ' + draw(conditions(visible))}")
            continue
        # An item.
        items_made += 1
        names_made += 1
        name = f"q{names_made}"
        for skip in pending_skips:
            lines.append(indent + skip.replace("TARGET", name))
        pending_skips = []
        kind = draw(st.sampled_from(["single", "single", "strict", "number", "multi", "text"]))
        flags = " required" if draw(st.integers(0, 4)) == 0 else ""
        if kind == "single":
            lines.append(f'{indent}{name}: single yesno "Q?"{when}{flags}')
        elif kind == "strict":
            lines.append(f'{indent}{name}: single yesno "Q?"{when} strict{flags}')
        elif kind == "number":
            strict = " strict" if draw(st.booleans()) else ""
            lines.append(f'{indent}{name}: number 0..2 "N?"{when}{strict}{flags}')
        elif kind == "multi":
            lines.append(f'{indent}{name}: multi {{ a = 1 "A", b = 2 "B" }} "M?"{when}')
        else:
            lines.append(f'{indent}{name}: text "T?"{when}{flags}')
        visible.append((name, kind))
        if indent:
            section_left -= 1
    return "\n".join(lines) + "\n"


def compare(text: str) -> None:
    loaded = load_text(text, "r.qlc")
    assert not loaded.syntax, [d.message for d in loaded.syntax]
    q = loaded.questionnaire
    assert not q.broken, [p.message for p in q.problems]
    oracle = Oracle(q)
    if oracle.size() > MAX_RESPONDENTS:
        return
    walks = oracle.walks()
    a = RoutingAnalysis(q)
    possible = a.facts.possible
    for e in q.entries:
        i = e.index
        if e.kind == "item":
            assert possible(("asked", i)) == any(e.name in w.asked for w in walks), f"asked {e.name}\n{text}"
            if e.own is not None:
                got = possible(("not-own", i))
                assert got == any(i in w.not_own for w in walks), f"always-asked {e.name}\n{text}"
        elif e.kind in ("stop", "check", "skip"):
            assert possible(("reached", i)) == any(i in w.reached for w in walks), f"reached {e.name}\n{text}"
            assert possible(("fires", i)) == any(i in w.fired for w in walks), f"fires {e.name}\n{text}"
            if e.own is not None:
                got = possible(("not-fires", i))
                assert got == any(i in w.not_own for w in walks), f"stop-always {e.name}\n{text}"
    for name in a.enc.blocks:
        assert possible(("block", name)) == any(name in w.blocks for w in walks), f"block {name}\n{text}"
    for stmt in a.statements:
        if stmt.key.startswith("let:"):
            continue
        for reading in ("blank", "code"):
            want = any(
                (stmt.key, "ours") in w.holds and w.holds[(stmt.key, "ours")] != w.holds[(stmt.key, reading)]
                for w in walks
            )
            got = possible(("sensitive", stmt.key, reading))
            assert got == want, f"missing-sensitive {stmt.key} {reading}\n{text}"


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
@given(specs())
def test_solver_agrees_with_brute_force(text: str) -> None:
    compare(text)


HAND_WRITTEN = [
    # A blank gate: `not` and `!=` are unknown on it; dk is a real value.
    HEADER + 'used: single yesno "U?"\nwhy: text "W?" when not (used = yes)\nalt: text "A?" when used != yes\n',
    # A stop on a non-response code, ordering unknown on it.
    HEADER + 'n1: number 0..2 "N?"\nstop s1 "Bye" when n1 >= 1\nafter: text "T?"\n',
    # A skip over a section; a check whose input may be blank.
    HEADER + 'g: single yesno "G?" required\nskip to tail when g = no\nsection mid "M" when g = yes\n'
    '  m: number 0..2 "M?" strict\ncheck r1 "R" when g = yes require m > 0\ntail: text "T?"\n',
]


@pytest.mark.parametrize("text", HAND_WRITTEN)
def test_hand_written_specs_agree(text: str) -> None:
    compare(text)
