"""The demo questionnaires lint clean; every planted fault in specs/faulty/ is found
exactly where its `# planted: CHECK` comment says."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from logiccheck.checks.registry import all_checks
from logiccheck.checks.runner import run_checks
from logiccheck.loader import load_file
from tests.conftest import SPECS

DEMOS = ["clinic_visit.qlc", "onboarding.qlc"]
FAULTY = sorted((SPECS / "faulty").glob("*.qlc"))
MARK = re.compile(r"#\s*(planted|intended):\s*([a-z, -]+)$")

# Check names of the lint rules that another stage registers; a planted name from this list
# is skipped until its check exists, and is then held to the same standard.
ROUTING_CHECKS = {
    "unreachable-item", "always-asked", "impossible-comparison", "missing-sensitive",
    "unsafe-pipe", "stop-never", "stop-always", "check-never-applies",
    "check-always-fails", "route-length",
}


def marks(path: Path, kind: str) -> dict[int, set[str]]:
    """Marks on a statement's own line, or alone on the line(s) just above it."""
    out: dict[int, set[str]] = {}
    pending: set[str] = set()
    for number, line in enumerate(path.read_text(encoding="utf-8").split("\n"), start=1):
        match = MARK.search(line)
        names = set()
        if match and match.group(1) == kind:
            names = {name.strip() for name in match.group(2).split(",") if name.strip()}
        if line.strip().startswith("#"):
            pending |= names
            continue
        if not line.strip():
            continue
        names |= pending
        pending = set()
        if names:
            out[number] = names
    return out


def findings(path: Path) -> dict[int, set[str]]:
    """Findings by line; route lengths and notes on skipped analysis are facts, not faults."""
    out: dict[int, set[str]] = {}
    for d in run_checks(load_file(path)):
        if d.check not in ("route-length", "routing-skipped"):
            out.setdefault(d.line, set()).add(d.check)
    return out


@pytest.mark.parametrize("name", DEMOS)
def test_demo_lints_clean(name: str) -> None:
    path = SPECS / name
    intended = marks(path, "intended")
    registered = set(all_checks())
    got = findings(path)
    expected = {line: names & registered for line, names in intended.items() if names & registered}
    assert got == expected


@pytest.mark.parametrize("name", DEMOS)
def test_demo_has_the_features_of_a_real_questionnaire(name: str) -> None:
    q = load_file(SPECS / name).questionnaire
    items = q.items()
    assert len(items) >= 40
    assert q.grids
    kinds = {e.kind for e in q.entries}
    assert {"let", "skip", "stop", "check"} <= kinds
    # Gates nested three deep: an item whose reaching needs three gate answers in turn.
    gates = {e.name for e in items if e.stmt.flags.gate}

    def gate_depth(entry) -> int:
        read = set()
        for _, expr in entry.context:
            read |= {r.name for r in _refs(expr)}
        read |= {r.name for r in _refs(entry.own)}
        return len(read & gates)

    assert max(gate_depth(e) for e in items) >= 3


def _refs(expr):
    from logiccheck.model import nodes as n

    return [node for node in n.walk(expr) if isinstance(node, n.Ref)] if expr is not None else []


def test_every_faulty_spec_plants_something() -> None:
    assert len(FAULTY) >= 5
    for path in FAULTY:
        assert marks(path, "planted"), f"{path.name}: no `# planted: CHECK` line"


@pytest.mark.parametrize("path", FAULTY, ids=[p.name for p in FAULTY])
def test_planted_faults_are_found_where_planted(path: Path) -> None:
    registered = set(all_checks())
    planted = marks(path, "planted")
    unknown = {name for names in planted.values() for name in names} - registered - ROUTING_CHECKS
    assert not unknown, f"{path.name}: planted names that are no check: {unknown}"
    expected = {line: names & registered for line, names in planted.items()}
    if not any(expected.values()):
        pytest.skip(f"{path.name}: its planted checks are not registered yet")
    got = findings(path)
    for line, names in expected.items():
        if names:
            assert got.get(line, set()) == names, f"{path.name}:{line}"
    stray = {line: names for line, names in got.items() if line not in planted}
    assert not stray, f"{path.name}: findings on lines with no planted fault: {stray}"
