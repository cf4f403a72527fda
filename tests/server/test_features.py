"""Editor features answered from one document, without a client (fast cases)."""

from __future__ import annotations

import pytest
from lsprotocol import types as lsp

from logiccheck.config import Config
from logiccheck.server import features as f
from logiccheck.server.document import open_document
from logiccheck.server.routing_worker import RoutingJob, compute

SPEC = '''survey s "Café survey"
codes yesno
  yes = 1 "Yes"
  no  = 2 "No"
nonresponse
  dk = 98 "Don't know"
section drinks "Drinks"
  coffee: single yesno "Do you drink coffée?" gate
  kinds: multi { latte = 1 "Latte", flat = 2 "Flat white" } "Which?" when coffee = yes
  grid taste single yesno "Did you like it?" when kinds has any (latte, flat)
    taste_hot "Hot enough?"
  let fan = coffee = yes and kinds has latte
  stop none "Thanks." when coffee = no
  why: text "Why {coffee}?" when fan
'''


def _doc(text: str = SPEC, routed: bool = False):  # type: ignore[no-untyped-def]
    doc = open_document("file:///s.qlc", "/s.qlc", text, 1, Config())
    if routed:
        result = compute(RoutingJob(text, "/s.qlc", set(), {}))
        doc.full, doc.reach = result.diagnostics, result.reach
    return doc


def _at(text: str, needle: str, offset: int = 0) -> tuple[int, int]:
    for number, line in enumerate(text.split("\n"), start=1):
        if needle in line:
            return number, line.index(needle) + 1 + offset
    raise AssertionError(needle)


def test_hover_on_grid_row_let_stop_and_section() -> None:
    doc = _doc(routed=True)
    row = f.hover(doc, *_at(SPEC, "taste_hot"))
    assert row is not None
    text = row.contents.value  # type: ignore[union-attr]
    assert "grid `taste` row" in text and 'Stem: "Did you like it?"' in text
    assert "section `drinks`" not in text  # the section has no condition
    assert "grid `taste`: kinds has any (latte, flat)" in text
    assert "Reachable: yes" in text
    let = f.hover(doc, *_at(SPEC, "let fan", 4)).contents.value  # type: ignore[union-attr]
    assert "derived value" in let and "`fan = coffee = yes and kinds has latte`" in let
    why = f.hover(doc, *_at(SPEC, "why:")).contents.value  # type: ignore[union-attr]
    assert "own: fan" in why and "not screened out by `stop none` (line 13) when coffee = no" in why
    block = f.hover(doc, *_at(SPEC, "drinks")).contents.value  # type: ignore[union-attr]
    assert "section" in block and '"Drinks"' in block
    # Before the routing checks ran, hover says so instead of guessing.
    assert "being checked" in f.hover(_doc(), *_at(SPEC, "why:")).contents.value  # type: ignore[union-attr]


def test_completion_of_code_labels_after_in_and_has_any() -> None:
    doc = _doc()
    line, col = _at(SPEC, "has any (latte, ", len("has any (latte, "))
    assert [i.label for i in f.completion(doc, line, col)] == ["latte", "flat"]
    line, col = _at(SPEC, "when coffee = ", len("when coffee = "))
    assert [i.label for i in f.completion(doc, line, col)] == ["yes", "no", "dk"]
    # After `when`: names and words, no labels.
    labels = {i.label for i in f.completion(doc, *_at(SPEC, "when fan", 5))}
    assert {"coffee", "kinds", "taste_hot", "fan", "when", "gate"} <= labels and "latte" not in labels


def test_pipes_are_references_and_are_renamed() -> None:
    doc = _doc()
    spans = doc.index.uses(("value", "coffee"))
    assert (14, 19) in {(s.line, s.column) for s in spans}  # "Why {coffee}?"
    edit = f.rename(doc, *_at(SPEC, "coffee:"), "espresso")
    assert edit is not None and edit.changes is not None
    assert len(edit.changes["file:///s.qlc"]) == 5
    with pytest.raises(f.RenameError, match="reserved"):
        f.rename(doc, *_at(SPEC, "coffee:"), "section")
    with pytest.raises(f.RenameError, match="not a name"):
        f.rename(doc, *_at(SPEC, "coffee:"), "Espresso")
    # Labels of the inline list are their own names: renaming `latte` leaves others alone.
    edit = f.rename(doc, *_at(SPEC, "latte = 1"), "cappuccino")
    assert edit is not None and len(edit.changes["file:///s.qlc"]) == 3  # type: ignore[index]


def test_outline_nests_grid_rows_in_sections() -> None:
    symbols = f.outline(_doc())
    assert [s.name for s in symbols] == ["yesno", "drinks"]
    drinks = symbols[1]
    assert [c.name for c in drinks.children or []] == ["coffee", "kinds", "taste", "fan", "none", "why"]
    grid = drinks.children[2]  # type: ignore[index]
    assert [c.name for c in grid.children or []] == ["taste_hot"]


def test_positions_count_utf16_units() -> None:
    # A diagnostic after a non-ASCII character: LSP columns are UTF-16 units.
    text = SPEC.replace('why: text "Why {coffee}?" when fan', 'why: text "Why 😀 {coffee}?" when fn')
    doc = _doc(text)
    diag = next(d for d in f.lsp_diagnostics(doc, doc.diagnostics) if d.code == "unknown-name")
    line = text.split("\n")[diag.range.start.line]
    units = len(line[: line.index("when fn") + 5].encode("utf-16-le")) // 2
    assert diag.range.start.character == units == line.index("when fn") + 6
    emoji = ["a😀b"]
    assert f.to_position(emoji, 1, 3) == lsp.Position(line=0, character=3)
    assert f.from_position(emoji, lsp.Position(line=0, character=3)) == (1, 3)


def test_suppression_goes_above_a_line_that_has_a_comment() -> None:
    text = SPEC.replace('when fan\n', 'when fn  # follow-up\n')
    doc = _doc(text)
    diag = next(d for d in f.lsp_diagnostics(doc, doc.diagnostics) if d.code == "unknown-name")
    actions = f.code_actions(doc, [diag])
    titles = [a.title for a in actions]
    assert titles[0] == "Replace with `fan`"
    allow = next(a for a in actions if a.title.startswith("Allow"))
    edit = allow.edit.changes["file:///s.qlc"][0]  # type: ignore[union-attr,index]
    assert edit.new_text == "  # lc: allow unknown-name -- REASON\n" and edit.range.start.character == 0
