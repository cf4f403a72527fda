"""`logiccheck server`"""

from __future__ import annotations

import click


@click.command("server")
def server_command() -> None:
    """Language server for editors: LSP over standard input and output.

    Diagnostics as you type, hover, go to definition, references, completion, outline,
    rename, quick fixes and formatting. Configure your editor to run `logiccheck server`
    for *.qlc files."""
    from logiccheck.server.app import serve

    serve()
