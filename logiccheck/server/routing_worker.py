"""The routing checks of the editor server run in a fresh child process per run.

A fresh process gives exactly what `lint` gives (the solver's witnesses depend on what
the process solved before, so a long-lived process would drift), and a run for text
that has changed since can be stopped at once by ending its process. One process is
kept started and warm (imports and grammar loaded) so a run starts without that wait.
"""

from __future__ import annotations

import multiprocessing
from dataclasses import dataclass, field
from multiprocessing.connection import Connection
from typing import Any

from logiccheck.diagnostics import Diagnostic, Severity


@dataclass
class RoutingJob:
    text: str
    path: str
    disabled: set[str]
    severity: dict[str, Severity]


@dataclass
class Reach:
    """Whether some respondent reaches a statement, with one such respondent."""

    possible: bool | None  # None: not judged (an error in its conditions)
    witness: dict[str, str] = field(default_factory=dict)


@dataclass
class RoutingResult:
    diagnostics: list[Diagnostic]
    reach: dict[int, Reach] | None  # by entry index; None when no routing check ran


def compute(job: RoutingJob) -> RoutingResult:
    """Every check as `lint` runs it, and who can reach each statement."""
    from logiccheck.checks.runner import run_checks
    from logiccheck.loader import load_text

    loaded = load_text(job.text, job.path)
    shared: dict[str, Any] = {}
    found = run_checks(loaded, solver=True, disable=job.disabled, severity=job.severity, shared=shared)
    a = shared.get("routing")
    if a is None:
        return RoutingResult(found, None)
    reach: dict[int, Reach] = {}
    for entry in loaded.questionnaire.entries:
        if entry.kind not in ("item", "stop", "check"):
            continue
        key = ("asked", entry.index) if entry.kind == "item" else ("reached", entry.index)
        if not a.ok(entry) or key not in a.questions:
            reach[entry.index] = Reach(None)
            continue
        model = a.facts.model(key)
        reach[entry.index] = Reach(False) if model is None else Reach(True, a.witness_for(model, a.cone([], entry)))
    return RoutingResult(found, reach)


def _serve(conn: Connection) -> None:
    # Load everything before the job arrives: this is the warm-up.
    import logiccheck.checks.routing
    import logiccheck.checks.static  # noqa: F401
    from logiccheck.syntax.grammar import spec_parser

    spec_parser()
    try:
        job = conn.recv()
    except EOFError:
        return
    if job is not None:
        conn.send(compute(job))


class WarmProcess:
    """One routing run in its own process; `stop()` ends it."""

    def __init__(self, ctx: Any) -> None:
        self.conn, child = ctx.Pipe()
        self.process = ctx.Process(target=_serve, args=(child,), daemon=True, name="logiccheck-routing")
        self.process.start()
        child.close()

    def run(self, job: RoutingJob) -> RoutingResult | None:
        """Blocking: the result, or None when the run was stopped."""
        try:
            self.conn.send(job)
            return self.conn.recv()
        except (EOFError, OSError, BrokenPipeError):
            return None
        finally:
            self.stop()

    def stop(self) -> None:
        if self.process.is_alive():
            self.process.terminate()
        self.process.join(timeout=5)
        self.conn.close()


class Workers:
    """Hands out a warm process per run and starts the next one."""

    def __init__(self) -> None:
        self.ctx = multiprocessing.get_context("spawn")
        self.next: WarmProcess | None = None

    def take(self) -> WarmProcess:
        worker = self.next if self.next is not None and self.next.process.is_alive() else WarmProcess(self.ctx)
        self.next = WarmProcess(self.ctx)
        return worker

    def close(self) -> None:
        if self.next is not None:
            self.next.stop()
            self.next = None
