"""Entry point: `logiccheck COMMAND ...`."""

from __future__ import annotations

import click

from logiccheck import __version__
from logiccheck.cli.check import check_command
from logiccheck.cli.clean import clean_command
from logiccheck.cli.diff import diff_command
from logiccheck.cli.draft import draft_command
from logiccheck.cli.explain import explain_command
from logiccheck.cli.graph import graph_command
from logiccheck.cli.lint import lint_command
from logiccheck.cli.rates import rates_command
from logiccheck.cli.report import report_command
from logiccheck.cli.simulate import simulate_command
from logiccheck.cli.validate import validate_command
from logiccheck.safety.cli_guard import guarded


class GuardedGroup(click.Group):
    """Every command runs behind the path check and the one-line error net."""

    def add_command(self, cmd: click.Command, name: str | None = None) -> None:
        super().add_command(guarded(cmd), name)


@click.group(cls=GuardedGroup, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="logiccheck")
def cli() -> None:
    """State questionnaire routing once; lint it before fielding, validate exports after."""


# One line per command module.
cli.add_command(lint_command)
cli.add_command(explain_command)
cli.add_command(graph_command)
cli.add_command(validate_command)
cli.add_command(check_command)
cli.add_command(simulate_command)
cli.add_command(diff_command)
cli.add_command(report_command)
cli.add_command(clean_command)
cli.add_command(rates_command)
cli.add_command(draft_command)


def main() -> None:
    cli(prog_name="logiccheck")


if __name__ == "__main__":
    main()
