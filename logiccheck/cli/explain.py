"""`logiccheck explain [CHECK]`"""

from __future__ import annotations

import click
from rich.table import Table

from logiccheck.checks.registry import CheckInfo, all_checks
from logiccheck.cli.common import color_option, fail, make_console
from logiccheck.suggest import did_you_mean


def check_docs(info: CheckInfo) -> str:
    """A check's docs as plain text, in the fixed sections."""
    return (
        f"{info.name} ({info.severity.value}, {info.stage} check)\n\n"
        f"{info.summary}\n\n"
        f"What it finds\n  {info.what}\n\n"
        f"Why it matters\n  {info.why}\n\n"
        "Bad\n" + "\n".join("  " + ln for ln in info.bad.splitlines()) + "\n\n"
        "Good\n" + "\n".join("  " + ln for ln in info.good.splitlines())
    )


@click.command("explain")
@click.argument("check", required=False)
@color_option
def explain_command(check: str | None, color: str) -> None:
    """Show what a check finds and why it matters; with no name, list all checks."""
    checks = all_checks()
    console = make_console(color)
    if check is None:
        table = Table("check", "severity", "stage", "what it finds", box=None, pad_edge=False)
        stages = {"spec": 0, "routing": 1, "data": 2, "quality": 3}
        for info in sorted(checks.values(), key=lambda c: (stages[c.stage], c.name)):
            table.add_row(info.name, info.severity.value, info.stage, info.summary)
        console.print(table)
        return
    found = checks.get(check)
    if found is None:
        hint = did_you_mean(check, checks) or "; `logiccheck explain` lists them"
        fail(f"no check is called `{check}`{hint}")
    click.echo(check_docs(found))
