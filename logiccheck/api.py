"""The notebook API: objects over the same records every command and format uses.

    import logiccheck
    survey = logiccheck.load("specs/bikeshare.qlc")
    survey.lint().to_frame()            # spec diagnostics as a DataFrame
    result = survey.validate(export)    # a path or a pandas DataFrame
    result.table, result.findings, result.dispositions
    result                              # in Jupyter: summary and per-item chart
    survey.report("report.html", data=export)
"""

from __future__ import annotations

import importlib
import tempfile
from collections.abc import Iterable, Mapping
from pathlib import Path
from typing import Any

import pandas as pd

from logiccheck.diagnostics import Diagnostic
from logiccheck.loader import Loaded, load_file, load_text
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.report.report_data import ReportData, from_validation

DIAGNOSTIC_COLUMNS = ["check", "severity", "file", "line", "column", "item", "message"]


class Diagnostics(list[Diagnostic]):
    """The lint diagnostics: a plain list, plus `.to_frame()` and a notebook view."""

    def to_frame(self) -> pd.DataFrame:
        rows = [
            {"check": d.check, "severity": d.severity.value, "file": d.file, "line": d.line,
             "column": d.column, "item": d.item, "message": d.message}
            for d in self
        ]
        return pd.DataFrame(rows, columns=DIAGNOSTIC_COLUMNS)

    def counts(self) -> dict[str, int]:
        out = {"error": 0, "warning": 0, "info": 0}
        for d in self:
            out[d.severity.value] += 1
        return out

    def _repr_html_(self) -> str:
        return self.to_frame().to_html(index=False, escape=True)


class Validation:
    """A validation result as DataFrames: `.table`, `.findings`, `.dispositions`."""

    def __init__(self, data: ReportData, raw: Any = None) -> None:
        self.data = data
        self.raw = raw  # the data stage's own result object

    @property
    def table(self) -> pd.DataFrame:
        """One row per item in questionnaire order: expected, answered, out_of_path, ..."""
        return self.data.ordered_items()

    @property
    def findings(self) -> pd.DataFrame:
        f = self.data.findings
        return f if f is not None else pd.DataFrame()

    @property
    def dispositions(self) -> dict[str, int]:
        return dict(self.data.dispositions)

    @property
    def representativeness(self) -> pd.DataFrame:
        """With margins: per category, the sample share against the population share."""
        return pd.DataFrame(self.data.sections.get("representativeness", []))

    @property
    def respondents(self) -> int | None:
        return self.data.respondents

    @property
    def scales(self) -> pd.DataFrame:
        """One row per scale item: scale, item, reversed, alpha, alpha_ci_low/high, n,
        alpha_if_deleted, item_total, scored, mean, sd (the scale's figures repeat per item)."""
        rows = []
        for s in self.data.scales:
            ci = s.get("alpha_ci") or [None, None]
            for item in s["items"]:
                rows.append({"scale": s["scale"], "item": item, "reversed": item in s.get("reversed", []),
                             "alpha": s["alpha"], "alpha_ci_low": ci[0], "alpha_ci_high": ci[1], "n": s["n"],
                             "alpha_if_deleted": s["alpha_if_deleted"].get(item), "item_total": s["item_total"].get(item),
                             "scored": s["scored"], "mean": s["mean"], "sd": s["sd"]})
        columns = ["scale", "item", "reversed", "alpha", "alpha_ci_low", "alpha_ci_high", "n", "alpha_if_deleted",
                   "item_total", "scored", "mean", "sd"]
        return pd.DataFrame(rows, columns=columns)

    def summary(self) -> dict[str, Any]:
        return {
            "respondents": self.respondents,
            "findings": self.data.severity_counts(),
            "dispositions": self.dispositions,
        }

    def to_html(self) -> str:
        """The full self-contained report page."""
        from logiccheck.report.html import render_html

        return render_html(self.data)

    def report(self, path: str | Path) -> Path:
        """Write the HTML report (atomically) and return its path."""
        from logiccheck.report.output import write_atomic

        return write_atomic(path, self.to_html())

    def _repr_html_(self) -> str:
        from logiccheck.report.html import render_fragment

        return render_fragment(self.data)

    def __repr__(self) -> str:
        s = self.summary()
        return f"<Validation respondents={s['respondents']} findings={s['findings']} dispositions={s['dispositions']}>"


class Cleaning:
    """A cleaning run: `.cleaned` and `.audit` as DataFrames, `.summary`, `.findings`."""

    def __init__(self, run: Any, *, kept: bool) -> None:
        self.raw = run  # the clean stage's own result
        self.outputs: list[Path] = list(run.outputs) if kept else []

    @property
    def cleaned(self) -> pd.DataFrame:
        return self.raw.outcome.cleaned

    @property
    def audit(self) -> pd.DataFrame:
        """One row per change, enough to undo it."""
        return self.raw.outcome.audit

    @property
    def summary(self) -> dict[str, Any]:
        return dict(self.raw.summary)

    @property
    def findings(self) -> pd.DataFrame:
        from logiccheck.report.report_data import FINDING_COLUMNS, _frame

        return _frame(self.raw.result.findings, FINDING_COLUMNS)

    def _repr_html_(self) -> str:
        from logiccheck.report.html import render_cleaning

        return render_cleaning(self.summary)

    def __repr__(self) -> str:
        out = self.summary.get("output", {})
        return f"<Cleaning respondents={out.get('respondents')} removed={out.get('removed')} cells_blanked={out.get('cells_blanked')}>"


class Survey:
    """A loaded questionnaire spec: lint it, validate or clean exports, draw its routing."""

    def __init__(self, loaded: Loaded, path: str | None = None) -> None:
        self.loaded = loaded
        self.path = path
        self._lint: Diagnostics | None = None

    @property
    def questionnaire(self) -> Questionnaire:
        return self.loaded.questionnaire

    @property
    def name(self) -> str:
        spec = self.questionnaire.spec
        return spec.name or spec.file

    @property
    def items(self) -> list[str]:
        return [e.name for e in self.questionnaire.items()]

    def config(self) -> Any:
        """The configuration `lint` would use for this spec (logiccheck.toml or pyproject.toml
        above it; defaults for a spec given as text)."""
        from logiccheck.config import Config, config_for

        return config_for(self.path) if self.path else Config()

    def lint(self, *, solver: bool = True, disable: Iterable[str] = ()) -> Diagnostics:
        """Every spec check (syntax, names, codes, order, routing) as a list, with the
        spec's configuration applied (checks turned off, severities changed)."""
        from logiccheck.checks.runner import run_checks

        config = self.config()
        out = Diagnostics(run_checks(self.loaded, solver=solver, disable=set(disable) | config.disabled,
                                     severity=config.severity))
        if solver and not disable:
            self._lint = out
        return out

    def _diagnostics(self) -> Diagnostics:
        return self._lint if self._lint is not None else self.lint()

    def validate(
        self,
        data: str | Path | pd.DataFrame,
        *,
        mapping: str | Path | Any | None = None,
        frame: str | Path | None = None,
        settings: Mapping[str, Any] | None = None,
        keep_cells: bool = False,
        margins: str | Path | None = None,
    ) -> Validation:
        """Run the data checks on an export (a file path or a DataFrame).

        `mapping` is a mapping TOML path or a `logiccheck.data.DataMapping`; `frame` a
        sample-frame CSV; `margins` a margins TOML (`.representativeness`: the sample
        against the population per category); `keep_cells=True` keeps the respondent × item route arrays on
        `.raw` (e.g. `.raw.item_states("trips")`). Runs the same pipeline as the commands;
        bad input raises one of `logiccheck.pipeline.INPUT_ERRORS` (e.g. `DataReadError`).
        """
        pipeline = importlib.import_module("logiccheck.pipeline")  # pandas-heavy: load on first use
        options = pipeline.RunOptions(mapping=mapping, frame=frame, config=self.config(), margins=margins)
        raw = pipeline.run_pipeline(self.loaded, data, options)
        if not keep_cells:
            raw.due = raw.has_value = raw.valid = raw.frame = None
        from logiccheck.report.report_data import settings_used

        used = settings_used(raw.config, raw.mapping)
        used.update(settings or {})
        export = str(data) if isinstance(data, (str, Path)) else None
        return self.validation_view(raw, settings=used, export=export)

    def validation_view(
        self, raw: Any, *, settings: Mapping[str, Any] | None = None, export: str | None = None
    ) -> Validation:
        """Wrap any validation result (table/findings/dispositions/respondents attributes)."""
        return Validation(from_validation(self.questionnaire, raw, self._diagnostics(), settings=settings,
                                          export=export), raw)

    def clean(
        self,
        data: str | Path | pd.DataFrame,
        *,
        policy: str | Path | Mapping[str, Any] | Any | None = None,
        out: str | Path | None = None,
        frame: str | Path | None = None,
        margins: str | Path | None = None,
    ) -> Cleaning:
        """Apply a cleaning policy to an export; the cleaned frame and audit as DataFrames.

        `policy`: a policy TOML path, a `[clean]` table as a dict, a `CleanPolicy`, or None
        for the configuration found above the spec. `out`: a folder for the cleaned file,
        audit and summary (None: kept in memory only). `margins`: a margins TOML; the
        cleaned frame gains a raked `weight` column and `.summary["weights"]` its
        diagnostics. The input is never modified.
        """
        run = importlib.import_module("logiccheck.clean.run")
        policies = importlib.import_module("logiccheck.clean.policy")
        pipeline = importlib.import_module("logiccheck.pipeline")
        config = self.config()  # found once for the policy, the mapping and the thresholds
        configured = config.models.get("clean")
        quality = None
        if policy is None:
            chosen = configured if isinstance(configured, policies.CleanPolicy) else policies.CleanPolicy()
        elif isinstance(policy, (str, Path)):
            chosen, quality = policies.load_policy(policy)
        elif isinstance(policy, Mapping):
            chosen = policies.CleanPolicy.model_validate(dict(policy))
        else:
            chosen = policy
        options = pipeline.RunOptions(frame=frame, config=config, quality=quality, margins=margins)
        with tempfile.TemporaryDirectory(prefix="logiccheck-clean-") as tmp:
            export = Path(tmp) / "export.csv"
            if isinstance(data, pd.DataFrame):
                data.to_csv(export, index=False)  # the cleaned file is written in the export's format: a frame goes as CSV
            else:
                export = Path(data)
            target = Path(out) if out is not None else Path(tmp) / "out"
            target.mkdir(parents=True, exist_ok=True)
            done = run.clean_export(self.loaded, export, target, chosen, options=options)
        return Cleaning(done, kept=out is not None)

    def picture(self, fmt: str = "svg") -> bytes:
        """The routing picture (the first one, for specs drawn per section) as SVG or PNG bytes."""
        from logiccheck.report.graph_picture import figure_bytes, routing_pictures

        return figure_bytes(routing_pictures(self.questionnaire, self._diagnostics())[0].figure, fmt)

    def report(self, path: str | Path, data: str | Path | pd.DataFrame | None = None) -> Path:
        """Write the HTML report: spec only, or with an export's validation."""
        from logiccheck.report.html import render_html
        from logiccheck.report.output import write_atomic

        if data is not None:
            return self.validate(data).report(path)
        return write_atomic(path, render_html(ReportData(self.questionnaire, list(self._diagnostics()))))

    def _repr_html_(self) -> str:
        import html

        counts = self._diagnostics().counts()
        return (
            f"<p><strong>{html.escape(self.name)}</strong>: {len(self.items)} items, "
            f"{len(self.questionnaire.sections)} sections; spec diagnostics "
            f"{counts['error']} errors, {counts['warning']} warnings, {counts['info']} info</p>"
        )

    def __repr__(self) -> str:
        return f"<Survey {self.name!r}: {len(self.items)} items>"


def load(path: str | Path) -> Survey:
    """Read a `.qlc` spec file (raises logiccheck.loader.SpecReadError when unreadable)."""
    return Survey(load_file(path), str(path))


def loads(text: str, file: str = "<spec>") -> Survey:
    """A spec from text, e.g. a cell of a notebook."""
    return Survey(load_text(text, file), None)


__all__ = ["Cleaning", "Diagnostics", "Survey", "Validation", "load", "loads"]
