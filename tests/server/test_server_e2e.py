"""The language server through a real LSP client over stdio (pytest-lsp): the published
diagnostics are exactly `lint --format json`'s, before and after an edit, and hover,
definition, references, completion, rename and a quick fix work on known positions."""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest
import pytest_lsp
from lsprotocol import types as lsp
from pytest_lsp import ClientServerConfig, LanguageClient

from tests.conftest import ROOT

PLANTED = Path(__file__).with_name("planted.qlc")
ENV = {**os.environ, "PYTHONPATH": str(ROOT)}


@pytest_lsp.fixture(
    config=ClientServerConfig(server_command=[sys.executable, "-m", "logiccheck.cli.main", "server"], server_env=ENV),
)
async def client(lsp_client: LanguageClient):  # type: ignore[no-untyped-def]
    params = lsp.InitializeParams(
        capabilities=pytest_lsp.client_capabilities("visual-studio-code"),
        initialization_options={"routingDelay": 50},
    )
    await lsp_client.initialize_session(params)
    yield
    await lsp_client.shutdown_session()


def lint_json(path: Path) -> list[dict[str, Any]]:
    """`lint --format json` as users run it: in a process of its own (the solver's
    witnesses depend on what the process solved before)."""
    ran = subprocess.run(
        [sys.executable, "-m", "logiccheck.cli.main", "lint", "--format", "json", str(path)],
        capture_output=True, text=True, env=ENV, check=False,
    )
    assert ran.returncode in (0, 1), ran.stderr
    return json.loads(ran.stdout)["diagnostics"]


async def settled(client: LanguageClient, uri: str, version: int) -> list[lsp.Diagnostic]:
    """Wait for the static set, then the set after the routing checks, of `version`."""
    seen = 0
    while seen < 2:
        params = await client.wait_for_notification(lsp.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS)
        if params.uri == uri and params.version == version:
            seen += 1
    return list(client.diagnostics[uri])


def spec_copy(tmp_path: Path) -> tuple[Path, str, str]:
    path = tmp_path / "planted.qlc"
    shutil.copy(PLANTED, path)
    return path, path.as_uri(), path.read_text(encoding="utf-8")


def open_doc(client: LanguageClient, uri: str, text: str) -> None:
    client.text_document_did_open(
        lsp.DidOpenTextDocumentParams(text_document=lsp.TextDocumentItem(uri=uri, language_id="qlc", version=1, text=text))
    )


def find(text: str, needle: str, offset: int = 0) -> lsp.Position:
    """The position of `needle` (plus `offset` characters) in the text."""
    for number, line in enumerate(text.split("\n")):
        if needle in line:
            return lsp.Position(line=number, character=line.index(needle) + offset)
    raise AssertionError(needle)


@pytest.mark.asyncio
async def test_diagnostics_equal_lint_before_and_after_an_edit(client: LanguageClient, tmp_path: Path) -> None:
    path, uri, text = spec_copy(tmp_path)
    open_doc(client, uri, text)
    got = await settled(client, uri, 1)
    expected = lint_json(path)
    assert {d["check"] for d in expected} >= {"unknown-name", "unreachable-item", "missing-sensitive"}
    assert [d.data for d in got] == expected
    for diag in got:
        assert diag.source == "logiccheck" and diag.code == diag.data["check"]
        assert diag.range.start == lsp.Position(line=diag.data["line"] - 1, character=diag.data["column"] - 1)
        if diag.data["witness"]:
            assert "witness: " in diag.message
    unreachable = next(d for d in got if d.code == "unreachable-item")
    assert unreachable.related_information and all(r.location.uri == uri for r in unreachable.related_information)

    # Mend the misspelt name (an incremental edit) and break the rating instead.
    start = find(text, "membr")
    edit = lsp.TextDocumentContentChangePartial(
        range=lsp.Range(start=start, end=lsp.Position(line=start.line, character=start.character + 5)), text="member"
    )
    client.text_document_did_change(
        lsp.DidChangeTextDocumentParams(
            text_document=lsp.VersionedTextDocumentIdentifier(uri=uri, version=2), content_changes=[edit]
        )
    )
    got = await settled(client, uri, 2)
    path.write_text(text.replace("membr", "member"), encoding="utf-8")
    expected = lint_json(path)
    assert "unknown-name" not in {d["check"] for d in expected}
    assert [d.data for d in got] == expected


@pytest.mark.asyncio
async def test_navigation_and_editing_features(client: LanguageClient, tmp_path: Path) -> None:
    _path, uri, text = spec_copy(tmp_path)
    open_doc(client, uri, text)
    await settled(client, uri, 1)
    doc = lsp.TextDocumentIdentifier(uri=uri)

    # Hover on an item: text, answers, the whole condition, and whether it is reachable.
    hover = await client.text_document_hover_async(lsp.HoverParams(text_document=doc, position=find(text, "seeds_ok", 2)))
    assert hover is not None
    value = hover.contents.value  # type: ignore[union-attr]
    assert "Were the seeds you wanted in stock?" in value
    assert "Answers (list `yesno`)" in value and "`dk` = 98" in value
    assert "own: bought has bulbs" in value
    assert "Reachable: yes" in value
    hover = await client.text_document_hover_async(lsp.HoverParams(text_document=doc, position=find(text, "offers:", 1)))
    assert "Reachable: **no**" in hover.contents.value  # type: ignore[union-attr]
    # ... and on a code label: its value and text.
    hover = await client.text_document_hover_async(lsp.HoverParams(text_document=doc, position=find(text, "has bulbs", 5)))
    assert '**`bulbs`** = 2 "Bulbs and seeds" — in answer list `plants`' in hover.contents.value  # type: ignore[union-attr]

    # Definition of a name and of a code label.
    where = await client.text_document_definition_async(
        lsp.DefinitionParams(text_document=doc, position=find(text, "when member = yes and", 6))
    )
    assert isinstance(where, lsp.Location) and where.range.start == find(text, "member:")
    where = await client.text_document_definition_async(
        lsp.DefinitionParams(text_document=doc, position=find(text, "has bulbs", 5))
    )
    assert isinstance(where, lsp.Location) and where.range.start == find(text, "bulbs  =")

    # References of `member`: its definition and every condition that reads it.
    refs = await client.text_document_references_async(
        lsp.ReferenceParams(text_document=doc, position=find(text, "member:"),
                            context=lsp.ReferenceContext(include_declaration=True))
    )
    assert refs is not None
    lines = sorted((r.range.start.line, r.range.start.character) for r in refs)
    expected = sorted(
        (n, i) for n, line in enumerate(text.split("\n")) for i in _word_starts(line, "member") if not line.lstrip().startswith("#")
    )
    assert lines == expected and len(lines) == 4

    # Completion after `member = `: the labels of its list and the non-response codes.
    got = await client.text_document_completion_async(
        lsp.CompletionParams(text_document=doc, position=find(text, "when member = yes and", 14))
    )
    assert got is not None
    items = got.items if isinstance(got, lsp.CompletionList) else got
    assert [i.label for i in items] == ["yes", "no", "dk"]
    # ... and item names elsewhere.
    got = await client.text_document_completion_async(
        lsp.CompletionParams(text_document=doc, position=find(text, "require answered(", 17))
    )
    items = got.items if isinstance(got, lsp.CompletionList) else got  # type: ignore[union-attr]
    assert {"rating", "member", "when", "strict"} <= {i.label for i in items}

    # Outline: lists, the section with its items, the check.
    symbols = await client.text_document_document_symbol_async(lsp.DocumentSymbolParams(text_document=doc))
    assert symbols is not None
    names = [s.name for s in symbols]  # type: ignore[union-attr]
    assert names == ["yesno", "plants", "visit", "keen"]
    visit = symbols[2]
    assert [c.name for c in visit.children or []][:3] == ["member", "bought", "seeds_ok"]  # type: ignore[union-attr]

    # Rename `member` everywhere.
    edit = await client.text_document_rename_async(
        lsp.RenameParams(text_document=doc, position=find(text, "member:"), new_name="cardholder")
    )
    assert edit is not None and edit.changes is not None
    renamed = _apply(text, edit.changes[uri])
    assert "member" not in renamed.replace("membr", "")
    assert renamed.count("cardholder") == 4
    with pytest.raises(Exception, match="already defined"):
        await client.text_document_rename_async(
            lsp.RenameParams(text_document=doc, position=find(text, "member:"), new_name="rating")
        )


@pytest.mark.asyncio
async def test_quick_fixes_remove_the_diagnostic(client: LanguageClient, tmp_path: Path) -> None:
    path, uri, text = spec_copy(tmp_path)
    open_doc(client, uri, text)
    got = await settled(client, uri, 1)
    doc = lsp.TextDocumentIdentifier(uri=uri)
    version = 1
    for check, title in (("unknown-name", "Replace with `member`"), ("missing-sensitive", "Mark `rating` strict"),
                         ("unreachable-item", "Allow `unreachable-item` here")):
        diag = next(d for d in got if d.code == check)
        actions = await client.text_document_code_action_async(
            lsp.CodeActionParams(text_document=doc, range=diag.range, context=lsp.CodeActionContext(diagnostics=[diag]))
        )
        assert actions is not None
        action = next(a for a in actions if isinstance(a, lsp.CodeAction) and a.title.startswith(title))
        assert action.edit is not None and action.edit.changes is not None
        text = _apply(text, action.edit.changes[uri])
        version += 1
        client.text_document_did_change(
            lsp.DidChangeTextDocumentParams(
                text_document=lsp.VersionedTextDocumentIdentifier(uri=uri, version=version),
                content_changes=[lsp.TextDocumentContentChangeWholeDocument(text=text)],
            )
        )
        got = await settled(client, uri, version)
        assert check not in {d.code for d in got}, (check, text)
        path.write_text(text, encoding="utf-8")
        assert [d.data for d in got] == lint_json(path)
    assert "# lc: allow unreachable-item -- REASON" in text


def _word_starts(line: str, word: str) -> list[int]:
    import re

    return [m.start() for m in re.finditer(rf"\b{word}\b", line)]


def _apply(text: str, edits: list[lsp.TextEdit]) -> str:
    """Apply LSP edits (ASCII text: characters are UTF-16 units), last first."""
    lines = text.split("\n")
    offsets = [0]
    for line in lines:
        offsets.append(offsets[-1] + len(line) + 1)
    def at(p: lsp.Position) -> int:
        return offsets[p.line] + p.character
    for e in sorted(edits, key=lambda e: at(e.range.start), reverse=True):
        text = text[: at(e.range.start)] + e.new_text + text[at(e.range.end) :]
    return text
