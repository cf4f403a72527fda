"""Run the spec checks in order; one failing check never hides the others."""

from __future__ import annotations

from collections.abc import Iterable

from logiccheck.checks.context import LintContext
from logiccheck.checks.registry import all_checks
from logiccheck.checks.suppress import apply_suppressions
from logiccheck.diagnostics import Diagnostic, Severity, Span
from logiccheck.loader import Loaded, gc_paused

STAGE_ORDER = ("spec", "routing")


def statement_lines(loaded: Loaded) -> dict[int, int]:
    """First line -> last line of each statement (its span ends on the next line)."""
    out: dict[int, int] = {}
    for entry in loaded.questionnaire.entries:
        span = entry.stmt.span
        end = span.end_line if span.end_line is not None else span.line
        out[span.line] = max(span.line, end - 1)
    return out


def run_checks(
    loaded: Loaded,
    *,
    solver: bool = True,
    disable: Iterable[str] = (),
    severity: dict[str, Severity] | None = None,
    options: dict[str, object] | None = None,
    shared: dict[str, object] | None = None,
) -> list[Diagnostic]:
    """Syntax diagnostics, then every registered spec check (and routing checks).
    `shared` receives what the checks leave for each other (the editor server keeps the
    routing analysis to tell who can reach each statement)."""
    disabled = set(disable)
    overrides = severity or {}
    ctx = LintContext(loaded.questionnaire, loaded.syntax, dict(options or {}))
    if shared is not None:
        ctx.shared = shared  # type: ignore[assignment]
    out: list[Diagnostic] = list(loaded.syntax)
    checks = all_checks(STAGE_ORDER)
    stages = STAGE_ORDER if solver else ("spec",)
    for stage in stages:
        for info in checks.values():
            if info.stage != stage or info.run is None or info.name in disabled:
                continue
            try:
                if stage == "spec":
                    # Static checks build the graph and many small records; see gc_paused.
                    with gc_paused():
                        out.extend(info.run(ctx))
                else:
                    out.extend(info.run(ctx))
            except Exception as err:  # noqa: BLE001 - reported as a diagnostic instead
                out.append(
                    Diagnostic(
                        check="internal-error",
                        severity=Severity.error,
                        span=Span(file=loaded.questionnaire.file, line=1, column=1),
                        message=f"check `{info.name}` failed: {type(err).__name__}: {err}",
                    )
                )
    ran = {n for n, c in checks.items() if c.stage in stages and n not in disabled}
    out = apply_suppressions(
        out, loaded.questionnaire.text, loaded.questionnaire.file, ran=ran, known=checks,
        statements=statement_lines(loaded),
    )
    result = []
    for diag in out:
        if diag.check in disabled:
            continue
        if diag.check in overrides:
            diag = diag.model_copy(update={"severity": overrides[diag.check]})
        result.append(diag)
    result.sort(key=Diagnostic.sort_key)
    return result
