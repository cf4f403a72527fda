"""The one list of checks: name, default severity, stage, docs and the code that runs it."""

from __future__ import annotations

import dataclasses
import importlib
from collections.abc import Callable, Iterable
from dataclasses import dataclass
from typing import TYPE_CHECKING, Literal

from logiccheck.diagnostics import Diagnostic, Severity

if TYPE_CHECKING:
    from logiccheck.checks.context import LintContext
    from logiccheck.checks.data_context import DataContext
    from logiccheck.data.findings import Hits

Stage = Literal["spec", "routing", "data", "quality"]
Runner = Callable[["LintContext"], Iterable[Diagnostic]]
# A data or quality check: reads the pipeline's context, returns hits without its name;
# the data runner stamps the name and severity on them.
DataRunner = Callable[["DataContext"], Iterable["Hits"]]

# Modules whose import registers checks; the registry is filled on first use. `lint`
# loads only the spec modules, so it never imports the data stack (pandas, pyarrow).
SPEC_MODULES = (
    "logiccheck.checks.static",
    "logiccheck.checks.suppress",
    "logiccheck.checks.routing",
)
DATA_MODULES = (
    "logiccheck.data.checks",
    "logiccheck.quality.checks",
    "logiccheck.weights.checks",
    "logiccheck.draft.mismatch",
    "logiccheck.scales.checks",
)
CHECK_MODULES = SPEC_MODULES + DATA_MODULES
SPEC_STAGES = frozenset({"spec", "routing"})


@dataclass(frozen=True)
class CheckInfo:
    """A check's identity and docs. `run` is None for data checks, which the vectorised
    evaluator computes in one pass; their docs still live here."""

    name: str
    severity: Severity
    stage: Stage
    summary: str
    what: str
    why: str
    bad: str
    good: str
    run: Runner | None = None
    data_run: DataRunner | None = None


_REGISTRY: dict[str, CheckInfo] = {}
_loaded: set[str] = set()  # modules imported so far


def register(
    name: str,
    *,
    severity: Severity | str,
    stage: Stage,
    summary: str,
    what: str,
    why: str,
    bad: str,
    good: str,
) -> Callable[[Runner], Runner]:
    """Decorator: declare a check once, with its docs, beside its code."""
    info = CheckInfo(name, Severity(severity), stage, summary, what, why, bad, good)

    def wrap(fn: Runner) -> Runner:
        _add(dataclasses.replace(info, run=fn))
        return fn

    return wrap


def describe(
    name: str,
    *,
    severity: Severity | str,
    stage: Stage,
    summary: str,
    what: str,
    why: str,
    bad: str,
    good: str,
) -> CheckInfo:
    """Declare a check whose findings another stage produces (data and quality checks)."""
    info = CheckInfo(name, Severity(severity), stage, summary, what, why, bad, good, None)
    _add(info)
    return info


def data_check(
    name: str,
    *,
    severity: Severity | str,
    stage: Stage,
    summary: str,
    what: str,
    why: str,
    bad: str,
    good: str,
) -> Callable[[DataRunner], DataRunner]:
    """Decorator: declare a data or quality check once, with its docs, beside its code.

    The function receives the pipeline's `DataContext` and yields `Hits` (rows, message,
    item); `checks.data_runner.run_data_checks` stamps the check's name and severity."""
    if stage not in ("data", "quality"):
        raise ValueError(f"data_check {name}: stage must be data or quality, not {stage}")
    info = CheckInfo(name, Severity(severity), stage, summary, what, why, bad, good)

    def wrap(fn: DataRunner) -> DataRunner:
        _add(dataclasses.replace(info, data_run=fn))
        return fn

    return wrap


def _add(info: CheckInfo) -> None:
    old = _REGISTRY.get(info.name)
    if old is not None and (old.run is not info.run or old.data_run is not info.data_run):
        raise ValueError(f"check {info.name} is declared twice")
    _REGISTRY[info.name] = info


def _load(modules: tuple[str, ...] = CHECK_MODULES) -> None:
    for module in modules:
        if module not in _loaded:
            _loaded.add(module)
            importlib.import_module(module)


def all_checks(stages: Iterable[str] | None = None) -> dict[str, CheckInfo]:
    """Every declared check, or those of `stages` (spec stages load no data modules)."""
    if stages is None:
        _load()
        return dict(_REGISTRY)
    wanted = set(stages)
    _load(SPEC_MODULES if wanted <= SPEC_STAGES else CHECK_MODULES)
    return {name: info for name, info in _REGISTRY.items() if info.stage in wanted}


def get(name: str) -> CheckInfo | None:
    """The check called `name`, loading the data modules only when it is not a spec check."""
    _load(SPEC_MODULES)
    if name not in _REGISTRY:
        _load()
    return _REGISTRY.get(name)


def is_check(name: str) -> bool:
    return get(name) is not None


def check_info(name: str) -> CheckInfo:
    """The declared check called `name`; an undeclared name is a programming error."""
    info = get(name)
    if info is None:
        raise KeyError(f"no check is declared as {name!r}; declare it with register, data_check or describe")
    return info


def default_severity(name: str) -> Severity:
    info = get(name)
    return info.severity if info is not None else Severity.error
