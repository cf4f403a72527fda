"""Every fault planted in specs/faulty/routing.qlc is found with the right check at the
right line, and nothing else there gives a routing error or warning."""

from __future__ import annotations

import re

from logiccheck.checks.registry import all_checks
from logiccheck.checks.runner import run_checks
from logiccheck.loader import load_file
from tests.conftest import SPECS

FAULTY = SPECS / "faulty" / "routing.qlc"
MARK = re.compile(r"^\s*# planted: ([a-z-]+)\s*$")


def planted() -> set[tuple[str, int]]:
    out = set()
    lines = FAULTY.read_text().splitlines()
    for number, line in enumerate(lines, start=1):
        found = MARK.match(line)
        if found:
            target = next(i for i in range(number, len(lines)) if not lines[i].lstrip().startswith("#"))
            out.add((found.group(1), target + 1))
    return out


def test_every_planted_fault_is_found_at_its_line() -> None:
    routing = {name for name, info in all_checks().items() if info.stage == "routing"}
    got = {(d.check, d.line) for d in run_checks(load_file(FAULTY)) if d.check in routing}
    want = planted()
    assert len(want) >= 10
    assert want <= got, sorted(want - got)
    unplanted = {
        (d.check, d.line)
        for d in run_checks(load_file(FAULTY))
        if d.check in routing and d.severity.value != "info" and (d.check, d.line) not in want
    }
    assert unplanted == set()


def test_bikeshare_gives_only_the_intended_pipe_warning(bikeshare_path) -> None:  # type: ignore[no-untyped-def]
    loud = [d for d in run_checks(load_file(bikeshare_path)) if d.severity.value in ("error", "warning")]
    assert [(d.check, d.item, d.line) for d in loud] == [("unsafe-pipe", "praise", 53)]
    witness = loud[0].witness or {}
    # A daily rider who left `trips` blank (the case the spec's comment describes).
    assert witness.get("trips") == "blank" and witness.get("freq") == "daily"
