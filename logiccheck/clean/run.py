"""The whole `clean` job as a function: read, check, apply the policy, write DIR."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import pandas as pd

from logiccheck import __version__
from logiccheck.clean.apply import CleanOutcome, apply_policy
from logiccheck.clean.io import ExportError, export_format, file_hash, read_export, write_json_to, write_table_to
from logiccheck.clean.outset import output_names, write_set
from logiccheck.clean.policy import BIAS_WARNING, CleanPolicy, PolicyError
from logiccheck.data.mapping import DataMapping
from logiccheck.data.readers import DataReadError
from logiccheck.data.validate import validate
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.quality.bridge import require_id, state_from_validation
from logiccheck.quality.config import SOURCES, QualityConfig
from logiccheck.quality.rates import OutcomeCounts, dispositions_to_counts, outcome_rates
from logiccheck.quality.repair import Repairer
from logiccheck.quality.run import QualityResult, run_quality

MAX_HINTS = 200  # repair hints written to the summary (the solver runs once per failing respondent)


@dataclass
class CleanRun:
    result: QualityResult
    outcome: CleanOutcome
    summary: dict[str, Any]
    outputs: list[Path] = field(default_factory=list)


def _repair_hints(q: Questionnaire, frame: pd.DataFrame, result: QualityResult, config: QualityConfig) -> list[dict[str, Any]]:
    failing = sorted({int(r) for m in result.state.checks_failed.values() for r in m.nonzero()[0]})
    hints: list[dict[str, Any]] = []
    if not failing:
        return hints
    repairer = Repairer(q, config.repair.weights, timeout_ms=config.repair.timeout_ms)
    for r in failing[:MAX_HINTS]:
        hint = repairer.hint(frame.iloc[r].to_dict())
        if hint is None:
            continue
        checks = [name for name, m in result.state.checks_failed.items() if m[r]]
        hints.append({"respondent": result.state.ids[r], "row": r + 1, "fails": checks, "change": hint.items,
                      "example_values": {k: (None if v is None or v != v else v) for k, v in hint.values.items()}, "alternatives": hint.alternatives})
    return hints


def _quality(
    q: Questionnaire, export: Path, mapping: DataMapping | None, config: QualityConfig, sf: pd.DataFrame | None,
    raw: pd.DataFrame,
) -> tuple[QualityResult, set[str], pd.DataFrame]:
    """Route state from the data stage's reader and evaluator (one pass, cells kept), then
    the quality findings. `mapping` None: the default layout, and the quality checks read
    the export as it is; with a mapping, the state's columns are the export's own names
    and the checks read the typed frame (spec names). Also returns the frame they read."""
    if mapping is None:
        require_id(raw, "id")
    try:
        full = validate(q, export, mapping or DataMapping(), keep_cells=True)
    except DataReadError as err:
        raise ExportError(str(err)) from None
    state = state_from_validation(q, full)
    if mapping is None:
        return run_quality(q, raw, config, sf, id_column="id", state=state), {""}, raw
    for name in state.items:
        entry = q.symbols[name]
        if entry.stmt.type.kind == "multi" and mapping.multi.layout == "columns":
            codes = q.item_codes(entry.stmt)
            state.columns[name] = [mapping.option_column(name, o.value) for o in (codes.options if codes else [])]
        elif entry.stmt.type.kind != "note":
            state.columns[name] = [mapping.column_of(name)]
    typed = full.frame.reset_index(drop=True).copy() if full.frame is not None else pd.DataFrame({"id": state.ids})
    for c in (config.speed.duration_column, config.frame.email_column):
        if c in raw.columns and c not in typed.columns:
            typed[c] = raw[c].to_numpy()
    markers = {*mapping.blank_markers(), *(m.strip() for m in mapping.not_shown), *(m.strip() for m in mapping.unanswered)}
    return run_quality(q, typed, config, sf, id_column="id", state=state), markers, typed


def clean_export(
    q: Questionnaire,
    export: Path,
    out: Path,
    policy: CleanPolicy | None = None,
    config: QualityConfig | None = None,
    sample_frame: Path | None = None,
    sample_outcomes: OutcomeCounts | None = None,
    mapping: DataMapping | None = None,
) -> CleanRun:
    """`mapping` None: the default layout (DESIGN §6). The data stage's reader and
    evaluator give the route state; with a mapping, cells holding a blank, not-shown or
    not-answered marker are left as they are."""
    policy = policy or CleanPolicy()
    config = config or QualityConfig()
    fmt = export_format(export)
    frame = read_export(export)
    sf = read_export(sample_frame) if sample_frame is not None else None
    if mapping is not None and config.speed.duration_column == "duration":
        config = config.model_copy(update={"speed": config.speed.model_copy(update={"duration_column": mapping.duration})})
    result, markers, by_name = _quality(q, export, mapping, config, sf, frame)
    if policy.keep_dispositions is not None:
        known = {"complete", "partial", "break-off", *(e.name for e in q.entries if e.kind == "stop")}
        unknown = [d for d in policy.keep_dispositions if d not in known]
        if unknown:
            raise PolicyError(
                f"[clean] keep_dispositions: no disposition is called {unknown[0]!r}; "
                f"the dispositions are {', '.join(sorted(known))}"
            )
    outcome = apply_policy(q, frame, result, policy, markers)
    if len(frame) and not len(outcome.cleaned):
        why = ", ".join(f"{check} {n}" for check, n in sorted(outcome.removed.items()))
        raise PolicyError(
            f"the policy would remove every respondent ({why}); nothing was written. "
            "Check [clean] respondents and keep_dispositions"
        )

    names = output_names(export)
    stops = [e.name for e in q.entries if e.kind == "stop"]
    got = result.disposition_counts()
    # Every disposition listed, zero included, as `validate` reports them.
    disp_counts = {name: got.pop(name, 0) for name in ("complete", "partial", "break-off", *stops)} | got
    if sample_outcomes is not None:
        counts, basis = sample_outcomes, "sample file"
    else:
        counts = dispositions_to_counts(disp_counts, stops)
        basis = "export dispositions only (no non-contacts or unknown-eligibility cases known: an upper bound)"
    summary: dict[str, Any] = {
        "tool": "logiccheck",
        "version": __version__,
        "spec": q.file,
        "input": {"file": str(export), "sha256": file_hash(export), "respondents": len(frame), "format": fmt},
        "output": {"respondents": len(outcome.cleaned), "removed": sum(outcome.removed.values()),
                   "cells_blanked": sum(outcome.blanked.values())},
        "findings": result.counts(),
        "dispositions": disp_counts,
        "blanked": outcome.blanked,
        "removed": outcome.removed,
        "policy": policy.model_dump(mode="json"),
        "thresholds": config.thresholds(),
        "threshold_sources": SOURCES,
        "rates": {"basis": basis, "counts": counts.as_dict(), **outcome_rates(counts)},
        "repair_hints": _repair_hints(q, by_name, result, config),
        "notes": [*result.notes, BIAS_WARNING],
    }
    findings = pd.DataFrame(
        [{"row": f.row + 1, "respondent": f.respondent, "check": f.check, "severity": f.severity.value,
          "item": f.item or "", "value": "" if f.value is None else str(f.value), "message": f.message}
         for f in result.findings],
        columns=["row", "respondent", "check", "severity", "item", "value", "message"],
    ).astype(str)

    safe = policy.sheet_safe
    writers: dict[str, Callable[[Path], None]] = {names[0]: lambda p: write_table_to(outcome.cleaned, p, fmt, safe)}
    if fmt != "csv":
        writers[names[1]] = lambda p: write_table_to(outcome.cleaned, p, "csv", safe)
    writers["audit.csv"] = lambda p: write_table_to(outcome.audit.astype(str), p, "csv", safe)
    writers["findings.csv"] = lambda p: write_table_to(findings, p, "csv", safe)
    writers["summary.json"] = lambda p: write_json_to(summary, p)
    written = write_set(out, writers)
    return CleanRun(result, outcome, summary, written)
