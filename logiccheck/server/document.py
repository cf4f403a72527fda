"""One open spec as the server holds it: the loaded model, its name index and its
diagnostics, rebuilt once per change and read by every request."""

from __future__ import annotations

from dataclasses import dataclass, field

from logiccheck.checks.runner import run_checks
from logiccheck.config import Config
from logiccheck.diagnostics import Diagnostic
from logiccheck.loader import Loaded, load_text
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.server.incremental import ChunkCache, load_incremental
from logiccheck.server.index import NameIndex, build_index
from logiccheck.server.routing_worker import Reach, RoutingJob


@dataclass
class Document:
    """The analysis of one version of a document's text."""

    uri: str
    path: str
    text: str
    version: int
    config: Config
    loaded: Loaded
    index: NameIndex
    static: list[Diagnostic] = field(default_factory=list)
    full: list[Diagnostic] | None = None  # after the routing checks
    reach: dict[int, Reach] | None = None  # who can reach each statement, for hover

    @property
    def q(self) -> Questionnaire:
        return self.loaded.questionnaire

    @property
    def diagnostics(self) -> list[Diagnostic]:
        return self.full if self.full is not None else self.static


def open_document(
    uri: str, path: str, text: str, version: int, config: Config, cache: ChunkCache | None = None
) -> Document:
    """Parse, resolve and run the static checks: what the server does on every change.
    With a cache, only the top-level statements that changed are parsed again."""
    loaded = load_incremental(cache, text, path) if cache is not None else load_text(text, path)
    doc = Document(uri, path, text, version, config, loaded, build_index(loaded.questionnaire))
    doc.static = lint(doc, solver=False)
    return doc


def lint(doc: Document, *, solver: bool) -> list[Diagnostic]:
    """Exactly what `lint` gives for this text and configuration."""
    return run_checks(doc.loaded, solver=solver, disable=doc.config.disabled, severity=doc.config.severity)


def routing_job(doc: Document) -> RoutingJob:
    return RoutingJob(doc.text, doc.path, set(doc.config.disabled), dict(doc.config.severity))
