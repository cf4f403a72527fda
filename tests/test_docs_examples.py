"""Every spec check's documented bad example raises the check and its good example does
not: the docs `logiccheck explain` prints are linted as specs.

Examples are short fragments: code lists they use but do not declare (`yesno`, `freq`,
`agree5`) are declared before them here, as the full demo specs declare them."""

from __future__ import annotations

import pytest

from logiccheck.checks.registry import all_checks
from logiccheck.checks.runner import run_checks
from logiccheck.loader import load_text

PREAMBLE = {
    "yesno": 'codes yesno\n  yes = 1 "Yes"\n  no = 2 "No"\n',
    "freq": 'codes freq\n  daily = 1 "Daily"\n  weekly = 2 "Weekly"\n  rarely = 3 "Rarely"\n',
    "agree5": 'codes agree5\n  sd = 1 "Strongly disagree"\n  n = 3 "Neither"\n  sa = 5 "Strongly agree"\n',
}
SPEC_CHECKS = sorted(n for n, i in all_checks().items() if i.stage in ("spec", "routing"))


def as_spec(example: str) -> str:
    head = "".join(text for name, text in PREAMBLE.items() if f" {name} " in example and f"codes {name}" not in example)
    return head + "\n" + example + "\n"


def raised(example: str) -> set[str]:
    loaded = load_text(as_spec(example), "example.qlc")
    return {d.check for d in run_checks(loaded, solver=True)}


@pytest.mark.parametrize("check", SPEC_CHECKS)
def test_bad_example_raises_and_good_does_not(check: str) -> None:
    info = all_checks()[check]
    assert check in raised(info.bad), f"{check}: its docs' bad example does not raise it"
    assert check not in raised(info.good), f"{check}: its docs' good example raises it"
