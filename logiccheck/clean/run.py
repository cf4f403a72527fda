"""The whole `clean` job as a function: the pipeline's result, the policy, DIR written."""

from __future__ import annotations

import dataclasses
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from logiccheck import __version__
from logiccheck.clean.apply import CleanOutcome, apply_policy
from logiccheck.clean.io import export_format, file_hash, write_json_to, write_table_to
from logiccheck.clean.outset import output_names, write_set
from logiccheck.clean.policy import BIAS_WARNING, CleanPolicy, PolicyError
from logiccheck.data.mapping import DataMapping
from logiccheck.loader import Loaded
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.pipeline import PipelineResult, RunOptions, run_pipeline
from logiccheck.quality.config import SOURCES, QualityConfig
from logiccheck.quality.rates import OutcomeCounts, dispositions_to_counts, outcome_rates
from logiccheck.quality.repair import Repairer
from logiccheck.report.data_csv import write_findings_csv
from logiccheck.safety.streams import is_stream, spool

MAX_HINTS = 200  # repair hints written to the summary (the solver runs once per failing respondent)


@dataclass
class CleanRun:
    result: PipelineResult
    outcome: CleanOutcome
    summary: dict[str, Any]
    outputs: list[Path] = field(default_factory=list)


def _repair_hints(q: Questionnaire, result: PipelineResult, config: QualityConfig) -> list[dict[str, Any]]:
    state = result.state
    assert state is not None
    failing = sorted({int(r) for m in state.checks_failed.values() for r in m.nonzero()[0]})
    hints: list[dict[str, Any]] = []
    if not failing:
        return hints
    frame = _by_spec_name(result)
    repairer = Repairer(q, config.repair.weights, timeout_ms=config.repair.timeout_ms)
    for r in failing[:MAX_HINTS]:
        hint = repairer.hint({str(k): v for k, v in frame.iloc[r].to_dict().items()})
        if hint is None:
            continue
        checks = [name for name, m in state.checks_failed.items() if m[r]]
        hints.append({"respondent": state.ids[r], "row": r + 1, "fails": checks, "change": hint.items,
                      "example_values": {k: (None if v is None or v != v else v) for k, v in hint.values.items()}, "alternatives": hint.alternatives})
    return hints


def _by_spec_name(result: PipelineResult) -> pd.DataFrame:
    """The export's cells as written, under the spec's names (option columns NAME_N): the
    repair solver reads the values a respondent gave, invalid ones included."""
    cells = result.cells()
    rename: dict[str, str] = {}
    if result.layout is not None:
        for name, plan in result.layout.plans.items():
            if plan.kind == "multi" and len(plan.columns) == len(plan.options):
                rename.update({c: f"{name}_{v}" for c, v in zip(plan.columns, plan.options, strict=True)})
            elif len(plan.columns) == 1:
                rename[plan.columns[0]] = name
    return cells[[c for c in cells.columns if c in rename]].rename(columns=rename)


def _markers(mapping: DataMapping) -> set[str]:
    """Cell texts that mean no value: left as they are by the cleaner."""
    return {*mapping.blank_markers(), *(m.strip() for m in mapping.not_shown), *(m.strip() for m in mapping.unanswered)}


def _weights_after_policy(q: Questionnaire, result: PipelineResult, kept: np.ndarray, opts: RunOptions) -> Any:
    """Weights raked again over the respondents the cleaned export keeps, so their mean is
    1 and the margins hold in the file handed on (the policy removed some)."""
    from logiccheck.weights.analysis import weights_analysis
    from logiccheck.weights.margins import Margins, load_margins

    assert result.context is not None
    removed = np.where(kept, np.asarray(result.disposition, dtype=object), "(removed by the policy)")
    ctx = dataclasses.replace(result.context, disposition=removed, options=dict(result.context.options), memo={}, notes=[])
    margins = opts.margins
    ctx.options["margins"] = margins if isinstance(margins, Margins) or margins is None else load_margins(margins, q)
    return weights_analysis(ctx)


def clean_export(
    spec: Questionnaire | Loaded,
    export: Path | str,
    out: Path,
    policy: CleanPolicy | None = None,
    config: QualityConfig | None = None,
    sample_frame: Path | None = None,
    sample_outcomes: OutcomeCounts | None = None,
    mapping: DataMapping | str | Path | None = None,
    *,
    options: RunOptions | None = None,
) -> CleanRun:
    """Run the pipeline on `export` (the same reader, route state, findings and
    dispositions as `validate`) and apply `policy` to the very cells it judged.
    `export` may be "-" (standard input) or a named pipe: it is copied once, read as CSV
    when its name gives no format, and the cleaned export takes the format read
    (`standard-input.cleaned.csv`, or `.tsv` when tab-delimited).
    `config` overrides the configuration's [quality] table; `mapping` its [data] table."""
    export = Path(export)
    policy = policy or CleanPolicy()
    q = spec.questionnaire if isinstance(spec, Loaded) else spec
    # A pipe can be read once: the pipeline and the input hash both read one copy.
    piped = is_stream(export)
    source = spool(export) if piped else export
    named = not piped or bool(export.suffix)  # "-" has none
    fmt = export_format(export) if named else None
    opts = options or RunOptions()
    if mapping is not None:
        opts.mapping = mapping
    if config is not None:
        opts.quality = config
    if sample_frame is not None:
        opts.frame = sample_frame
    result = run_pipeline(q, source, opts)
    if piped:
        result.source = str(export)
    if fmt is None:  # no name to go by: the format the reader found
        fmt = "tsv" if result.delimiter == "\t" else "csv"
    quality = result.quality_config or QualityConfig()
    if policy.keep_dispositions is not None:
        known = {"complete", "partial", "break-off", *(e.name for e in q.entries if e.kind == "stop")}
        unknown = [d for d in policy.keep_dispositions if d not in known]
        if unknown:
            raise PolicyError(
                f"[clean] keep_dispositions: no disposition is called {unknown[0]!r}; "
                f"the dispositions are {', '.join(sorted(known))}"
            )
    frame = result.cells()
    outcome = apply_policy(q, frame, result, policy, _markers(result.mapping or DataMapping()))
    if len(frame) and not len(outcome.cleaned):
        why = ", ".join(f"{check} {n}" for check, n in sorted(outcome.removed.items()))
        raise PolicyError(
            f"the policy would remove every respondent ({why}); nothing was written. "
            "Check [clean] respondents and keep_dispositions"
        )

    names = output_names(export, None if named else f".{fmt}")
    stops = [e.name for e in q.entries if e.kind == "stop"]
    disp_counts = dict(result.dispositions)
    if sample_outcomes is not None:
        counts, basis = sample_outcomes, "sample file"
    else:
        counts = dispositions_to_counts(disp_counts, stops)
        basis = "export dispositions only (no non-contacts or unknown-eligibility cases known: an upper bound)"
    by_check: dict[str, int] = {}
    for (check, _sev), k in sorted(result.counts_by_check().items()):
        by_check[check] = by_check.get(check, 0) + k
    summary: dict[str, Any] = {
        "tool": "logiccheck",
        "version": __version__,
        "spec": q.file,
        "input": {"file": str(export), "sha256": file_hash(source), "respondents": result.respondents, "format": fmt},
        "output": {"respondents": len(outcome.cleaned), "removed": sum(outcome.removed.values()),
                   "cells_blanked": sum(outcome.blanked.values())},
        "findings": by_check,
        "dispositions": disp_counts,
        "blanked": outcome.blanked,
        "removed": outcome.removed,
        "policy": policy.model_dump(mode="json"),
        "thresholds": quality.thresholds(),
        "threshold_sources": SOURCES,
        "rates": {"basis": basis, "counts": counts.as_dict(), **outcome_rates(counts)},
        "repair_hints": _repair_hints(q, result, quality),
        "notes": [*result.notes, BIAS_WARNING],
    }
    in_output = np.zeros(result.respondents, dtype=bool)
    in_output[outcome.kept] = True
    if "weights" in result.analyses and not in_output.all():
        result.analyses["weights"] = _weights_after_policy(q, result, in_output, opts)
    for analysis in result.analyses.values():
        summary.update(analysis.summary)
    cleaned = outcome.cleaned
    added: list[str] = []
    for analysis in result.analyses.values():
        for name, values in analysis.columns.items():
            column = np.asarray(values, dtype=object)[outcome.kept]
            cleaned[name] = ["" if v is None or (isinstance(v, float) and v != v) else str(v) for v in column]
            added.append(name)
    if added:
        # What `reverse_audit(cleaned, audit, added)` drops to rebuild the original export.
        summary["added_columns"] = added

    safe, delimiter = policy.sheet_safe, result.delimiter or ","
    writers: dict[str, Callable[[Path], None]] = {names[0]: lambda p: write_table_to(cleaned, p, fmt, safe, delimiter)}
    if fmt != "csv":
        writers[names[1]] = lambda p: write_table_to(cleaned, p, "csv", safe)
    writers["audit.csv"] = lambda p: write_table_to(outcome.audit.astype(str), p, "csv", safe)

    def findings_csv(p: Path) -> None:
        with open(p, "w", encoding="utf-8", newline="") as fh:
            write_findings_csv(result, fh, sheet_safe=safe)

    writers["findings.csv"] = findings_csv
    writers["summary.json"] = lambda p: write_json_to(summary, p)
    written = write_set(out, writers)
    return CleanRun(result, outcome, summary, written)
