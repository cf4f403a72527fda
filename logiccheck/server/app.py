"""The language server: `logiccheck server` speaks LSP over stdio (pygls).

On every change the spec is parsed and the static checks run at once; the routing
checks (the solver) run after a short pause in one background thread, and their result
is dropped if the text changed meanwhile, so typing never waits on the solver. Each
published set equals what `lint --format json` gives for the same text and
configuration.
"""

from __future__ import annotations

import asyncio
from collections.abc import Callable
from typing import Any, TypeVar

from lsprotocol import types as lsp
from pygls.exceptions import JsonRpcInvalidParams
from pygls.lsp.server import LanguageServer
from pygls.uris import to_fs_path

from logiccheck import __version__
from logiccheck.config import Config, ConfigError, config_for
from logiccheck.server import features
from logiccheck.server.document import Document, open_document, routing_job
from logiccheck.server.incremental import ChunkCache
from logiccheck.server.routing_worker import Workers

ROUTING_DELAY = 0.4  # seconds of quiet before the solver starts (setting `routingDelay`, ms)

class SpecServer(LanguageServer):
    def __init__(self) -> None:
        super().__init__("logiccheck", __version__, text_document_sync_kind=lsp.TextDocumentSyncKind.Incremental)
        self.docs: dict[str, Document] = {}
        self.caches: dict[str, ChunkCache] = {}
        self.pending: dict[str, asyncio.Task[None]] = {}
        self.routing_delay = ROUTING_DELAY
        self.routing = True
        self.workers = Workers()

    # -- analysis
    def config(self, path: str) -> Config:
        try:
            return config_for(path)
        except ConfigError as err:
            self.window_show_message(lsp.ShowMessageParams(type=lsp.MessageType.Error, message=str(err)))
            return Config()

    def refresh(self, uri: str) -> Document:
        """Re-read a document after a change: static diagnostics now, routing later."""
        text_doc = self.workspace.get_text_document(uri)
        path = to_fs_path(uri) or uri
        previous = self.docs.get(uri)
        config = previous.config if previous is not None and previous.path == path else self.config(path)
        cache = self.caches.setdefault(uri, ChunkCache())
        doc = open_document(uri, path, text_doc.source, text_doc.version or 0, config, cache)
        self.docs[uri] = doc
        self.publish(doc)
        task = self.pending.pop(uri, None)
        if task is not None:
            task.cancel()
        if self.routing:
            self.pending[uri] = asyncio.get_running_loop().create_task(self._route_later(doc))
        return doc

    async def _route_later(self, doc: Document) -> None:
        await asyncio.sleep(self.routing_delay)
        if self.docs.get(doc.uri) is not doc:
            return
        worker = self.workers.take()
        try:
            result = await asyncio.get_running_loop().run_in_executor(None, worker.run, routing_job(doc))
        except asyncio.CancelledError:
            worker.stop()  # the text changed while the solver ran: end that run now
            raise
        if result is None or self.docs.get(doc.uri) is not doc:
            return
        doc.full, doc.reach = result.diagnostics, result.reach
        self.publish(doc)

    def publish(self, doc: Document) -> None:
        self.text_document_publish_diagnostics(
            lsp.PublishDiagnosticsParams(uri=doc.uri, version=doc.version,
                                         diagnostics=features.lsp_diagnostics(doc, doc.diagnostics))
        )

    def doc(self, uri: str) -> Document | None:
        found = self.docs.get(uri)
        if found is None and uri in self.workspace.text_documents:
            found = self.refresh(uri)
        return found


server = SpecServer()
T = TypeVar("T")


def _at(doc: Document, position: lsp.Position) -> tuple[int, int]:
    return features.from_position(doc.text.split("\n"), position)


def _ask(ls: SpecServer, params: Any, answer: Callable[[Document, int, int], T]) -> T | None:
    """A request about one position of an open document."""
    doc = ls.doc(params.text_document.uri)
    return answer(doc, *_at(doc, params.position)) if doc else None


@server.feature(lsp.INITIALIZE)
def initialize(ls: SpecServer, params: lsp.InitializeParams) -> None:
    options: Any = params.initialization_options or {}
    if isinstance(options, dict):
        if "routingDelay" in options:
            ls.routing_delay = max(float(options["routingDelay"]) / 1000.0, 0.0)
        if "routing" in options:
            ls.routing = bool(options["routing"])


@server.feature(lsp.TEXT_DOCUMENT_DID_OPEN)
async def did_open(ls: SpecServer, params: lsp.DidOpenTextDocumentParams) -> None:
    ls.refresh(params.text_document.uri)


@server.feature(lsp.TEXT_DOCUMENT_DID_CHANGE)
async def did_change(ls: SpecServer, params: lsp.DidChangeTextDocumentParams) -> None:
    ls.refresh(params.text_document.uri)


@server.feature(lsp.TEXT_DOCUMENT_DID_SAVE)
async def did_save(ls: SpecServer, params: lsp.DidSaveTextDocumentParams) -> None:
    # The configuration may have changed on disk: read it again.
    uri = params.text_document.uri
    if uri in ls.docs:
        ls.docs.pop(uri)
        ls.refresh(uri)


@server.feature(lsp.TEXT_DOCUMENT_DID_CLOSE)
def did_close(ls: SpecServer, params: lsp.DidCloseTextDocumentParams) -> None:
    uri = params.text_document.uri
    task = ls.pending.pop(uri, None)
    if task is not None:
        task.cancel()
    ls.docs.pop(uri, None)
    ls.caches.pop(uri, None)
    ls.text_document_publish_diagnostics(lsp.PublishDiagnosticsParams(uri=uri, diagnostics=[]))


@server.feature(lsp.TEXT_DOCUMENT_HOVER)
def hover(ls: SpecServer, params: lsp.HoverParams) -> lsp.Hover | None:
    return _ask(ls, params, features.hover)


@server.feature(lsp.TEXT_DOCUMENT_DEFINITION)
def definition(ls: SpecServer, params: lsp.DefinitionParams) -> lsp.Location | None:
    return _ask(ls, params, features.definition)


@server.feature(lsp.TEXT_DOCUMENT_REFERENCES)
def references(ls: SpecServer, params: lsp.ReferenceParams) -> list[lsp.Location]:
    doc = ls.doc(params.text_document.uri)
    if doc is None:
        return []
    return features.references(doc, *_at(doc, params.position), params.context.include_declaration)


@server.feature(
    lsp.TEXT_DOCUMENT_COMPLETION,
    lsp.CompletionOptions(trigger_characters=["=", "(", ",", " "]),
)
def completion(ls: SpecServer, params: lsp.CompletionParams) -> lsp.CompletionList:
    return lsp.CompletionList(is_incomplete=False, items=_ask(ls, params, features.completion) or [])


@server.feature(lsp.TEXT_DOCUMENT_DOCUMENT_SYMBOL)
def document_symbol(ls: SpecServer, params: lsp.DocumentSymbolParams) -> list[lsp.DocumentSymbol]:
    doc = ls.doc(params.text_document.uri)
    return features.outline(doc) if doc else []


@server.feature(lsp.TEXT_DOCUMENT_PREPARE_RENAME)
def prepare_rename(ls: SpecServer, params: lsp.PrepareRenameParams) -> lsp.Range | None:
    return _ask(ls, params, features.prepare_rename)


@server.feature(lsp.TEXT_DOCUMENT_RENAME)
def rename(ls: SpecServer, params: lsp.RenameParams) -> lsp.WorkspaceEdit | None:
    doc = ls.doc(params.text_document.uri)
    if doc is None:
        return None
    try:
        return features.rename(doc, *_at(doc, params.position), params.new_name)
    except features.RenameError as err:
        raise JsonRpcInvalidParams(str(err)) from None


@server.feature(
    lsp.TEXT_DOCUMENT_CODE_ACTION,
    lsp.CodeActionOptions(code_action_kinds=[lsp.CodeActionKind.QuickFix]),
)
def code_action(ls: SpecServer, params: lsp.CodeActionParams) -> list[lsp.CodeAction]:
    doc = ls.doc(params.text_document.uri)
    return features.code_actions(doc, list(params.context.diagnostics)) if doc else []


@server.feature(lsp.TEXT_DOCUMENT_FORMATTING)
def formatting(ls: SpecServer, params: lsp.DocumentFormattingParams) -> list[lsp.TextEdit]:
    from logiccheck.fmt import FormatError, format_text

    doc = ls.doc(params.text_document.uri)
    if doc is None:
        return []
    try:
        out = format_text(doc.text, doc.path)
    except FormatError:
        return []  # a spec with a syntax error is left as it is; its diagnostics say why
    if out == doc.text:
        return []
    lines = doc.text.split("\n")
    end = features.to_position(lines, len(lines), len(lines[-1]) + 1)
    return [lsp.TextEdit(range=lsp.Range(start=lsp.Position(line=0, character=0), end=end), new_text=out)]


@server.feature(lsp.SHUTDOWN)
def shutdown(ls: SpecServer, params: None) -> None:
    for task in ls.pending.values():
        task.cancel()
    ls.workers.close()


def serve() -> None:
    """Serve over stdin/stdout until the client says exit."""
    try:
        server.start_io()
    finally:
        server.workers.close()
