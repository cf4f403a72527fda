"""Entry point: `logiccheck COMMAND ...`.

Commands are imported only when run, so `logiccheck --help` and a lint that needs no
data stack do not pay for pandas, pyarrow or the report extra. To add a command, add one
line to `COMMANDS`: its name, "module:function" and the first sentence of its docstring
(shown by `--help`; `tests/test_startup.py` checks it matches the command's own).
"""

from __future__ import annotations

import importlib

import click

from logiccheck import __version__

# name: ("module:function", one-line help). One line per command.
COMMANDS: dict[str, tuple[str, str]] = {
    "lint": ("logiccheck.cli.lint:lint_command",
             "Check questionnaire specs: syntax, names, codes, order and routing."),
    "explain": ("logiccheck.cli.explain:explain_command",
                "Show what a check finds and why it matters; with no name, list all checks."),
    "graph": ("logiccheck.cli.graph:graph_command",
              "Draw the routing: items grouped by section, edges from each value to the conditions"
              " that read it."),
    "validate": ("logiccheck.cli.validate:validate_command",
                 "Check an export against the spec's routing: off-route answers, missing, invalid values."),
    "check": ("logiccheck.cli.check:check_command",
              "Lint the spec, then validate the export against it; exit status is the worse of the two."),
    "simulate": ("logiccheck.cli.simulate:simulate_command",
                 "Write a synthetic export that follows the routing, optionally with planted faults."),
    "diff": ("logiccheck.cli.diff:diff_command",
             "Compare two versions of a spec: items, answer lists, wording and who is asked."),
    "report": ("logiccheck.cli.report:report_command",
               "One self-contained HTML page: summary, per-item chart and table, findings, diagnostics,"
               " routing."),
    "clean": ("logiccheck.cli.clean:clean_command",
              "Apply a cleaning policy to an export; write the cleaned file and an audit trail."),
    "rates": ("logiccheck.cli.rates:rates_command",
              "Response, cooperation, refusal and contact rates from final case outcomes."),
    "draft": ("logiccheck.cli.draft:draft_command",
              "Write a starting spec from an export: items, answer lists and the routing the answers follow."),
    "format": ("logiccheck.cli.format:format_command",
               "Lay out specs one way: indentation, spacing, aligned answer lists, blank lines."),
    "server": ("logiccheck.cli.server:server_command",
               "Language server for editors: LSP over standard input and output."),
}


class LazyGroup(click.Group):
    """A group whose commands (`COMMANDS`) are imported on first use."""

    def __init__(self, *args: object, lazy: dict[str, tuple[str, str]], **kwargs: object) -> None:
        super().__init__(*args, **kwargs)  # type: ignore[arg-type]
        self.lazy = lazy

    def add_command(self, cmd: click.Command, name: str | None = None) -> None:
        # Every command runs behind the path check and the one-line error net.
        from logiccheck.safety.cli_guard import guarded

        super().add_command(guarded(cmd), name)

    def list_commands(self, ctx: click.Context) -> list[str]:
        return sorted({*super().list_commands(ctx), *self.lazy})

    def get_command(self, ctx: click.Context, cmd_name: str) -> click.Command | None:
        if cmd_name not in self.commands and cmd_name in self.lazy:
            module, _, attr = self.lazy[cmd_name][0].partition(":")
            self.add_command(getattr(importlib.import_module(module), attr), cmd_name)
        return super().get_command(ctx, cmd_name)

    def format_commands(self, ctx: click.Context, formatter: click.HelpFormatter) -> None:
        # The listing reads the one-line helps from the table: importing every command
        # to print it would cost what the lazy import saves.
        names = self.list_commands(ctx)
        if not names:
            return
        limit = formatter.width - 6 - max(len(name) for name in names)
        rows = []
        for name in names:
            if name in self.commands:
                cmd = self.commands[name]
                if cmd.hidden:
                    continue
                text = cmd.get_short_help_str(limit)
            else:
                text = click.Command(name, help=self.lazy[name][1]).get_short_help_str(limit)
            rows.append((name, text))
        with formatter.section("Commands"):
            formatter.write_dl(rows)


@click.group(cls=LazyGroup, lazy=COMMANDS, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="logiccheck")
def cli() -> None:
    """State questionnaire routing once; lint it before fielding, validate exports after."""


def main() -> None:
    cli(prog_name="logiccheck")


if __name__ == "__main__":
    main()
