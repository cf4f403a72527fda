"""Editor latency through a real LSP client over stdio: diagnostics after an edit (the
static set, published before the routing checks) and hover, on a generated 500-item spec.

Baseline measured in the same run: `logiccheck lint --no-solver` on the same spec as a
child process (what an author waits for without the server). Prints medians and the
90th percentile, the bars, and the ratio of each median to the baseline.
Run: python benchmarks/bench_server.py [-n 500] [--edits 20] [--hovers 40]
"""

from __future__ import annotations

import argparse
import asyncio
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from lsprotocol import types as lsp  # noqa: E402
from pygls.lsp.client import LanguageClient  # noqa: E402

from benchmarks.generate import Shape, generate  # noqa: E402

EDIT_BAR, HOVER_BAR = 0.300, 0.100  # seconds, from the issue
ENV = {**os.environ, "PYTHONPATH": str(ROOT)}


class Client(LanguageClient):
    def __init__(self) -> None:
        super().__init__("bench", "1")
        self.published: dict[int, asyncio.Future[float]] = {}

        @self.feature(lsp.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS)
        def _published(params: lsp.PublishDiagnosticsParams) -> None:
            future = self.published.get(params.version or 0)
            if future is not None and not future.done():
                future.set_result(time.perf_counter())


def positions(text: str, count: int) -> list[lsp.Position]:
    """Item names spread over the spec, for hovers."""
    found = []
    for number, line in enumerate(text.split("\n")):
        stripped = line.lstrip()
        if ":" in stripped and not stripped.startswith(("#", "let ")) and stripped.split(":")[0].isidentifier():
            found.append(lsp.Position(line=number, character=len(line) - len(stripped) + 1))
    step = max(len(found) // count, 1)
    return found[::step][:count]


def edit_line(text: str) -> int:
    """A line in the middle holding a question text, edited on each round."""
    lines = text.split("\n")
    middle = len(lines) // 2
    return next(i for i in range(middle, len(lines)) if '"' in lines[i] and ":" in lines[i])


def cpu_seconds(pid: int) -> float | None:
    """User + system CPU time of a process (Linux /proc), to show the work apart from
    the machine's load."""
    try:
        fields = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()
        return (int(fields[11]) + int(fields[12])) / os.sysconf("SC_CLK_TCK")
    except (OSError, ValueError, IndexError):
        return None


async def measure(text: str, edits: int, hovers: int) -> tuple[list[float], list[float], float, float | None]:
    folder = Path(tempfile.mkdtemp(prefix="bench-server-"))
    path = folder / "spec.qlc"
    path.write_text(text, encoding="utf-8")
    uri = path.as_uri()
    client = Client()
    await client.start_io(sys.executable, "-m", "logiccheck.cli.main", "server", env=ENV)
    await client.initialize_async(lsp.InitializeParams(capabilities=lsp.ClientCapabilities(),
                                                       initialization_options={"routingDelay": 400}))
    client.initialized(lsp.InitializedParams())
    client.published[1] = asyncio.get_running_loop().create_future()
    start = time.perf_counter()
    client.text_document_did_open(lsp.DidOpenTextDocumentParams(
        text_document=lsp.TextDocumentItem(uri=uri, language_id="qlc", version=1, text=text)))
    opened = await client.published[1] - start
    line = edit_line(text)
    quote = text.split("\n")[line].index('"') + 1
    edit_times = []
    pid = client._server.pid if client._server is not None else 0
    cpu_before = cpu_seconds(pid)
    for version in range(2, edits + 2):
        client.published[version] = asyncio.get_running_loop().create_future()
        at = lsp.Position(line=line, character=quote)
        start = time.perf_counter()
        client.text_document_did_change(lsp.DidChangeTextDocumentParams(
            text_document=lsp.VersionedTextDocumentIdentifier(uri=uri, version=version),
            content_changes=[lsp.TextDocumentContentChangePartial(range=lsp.Range(start=at, end=at), text="x")]))
        edit_times.append(await client.published[version] - start)
    cpu_after = cpu_seconds(pid)
    cpu = (cpu_after - cpu_before) / edits if cpu_before is not None and cpu_after is not None else None
    await asyncio.sleep(1.0)  # let the routing run finish, as when the author pauses
    hover_times = []
    for pos in positions(text, hovers):
        start = time.perf_counter()
        got = await client.text_document_hover_async(
            lsp.HoverParams(text_document=lsp.TextDocumentIdentifier(uri=uri), position=pos))
        hover_times.append(time.perf_counter() - start)
        assert got is not None, pos
    await client.shutdown_async(None)
    client.exit(None)
    await client.stop()
    return edit_times, hover_times, opened, cpu


def baseline(path: Path, repeat: int) -> float:
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        subprocess.run([sys.executable, "-m", "logiccheck.cli.main", "lint", "--no-solver", str(path)],
                       env=ENV, capture_output=True, check=False)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def p90(values: list[float]) -> float:
    return sorted(values)[max(int(len(values) * 0.9) - 1, 0)]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("-n", "--items", type=int, default=500)
    parser.add_argument("--edits", type=int, default=20)
    parser.add_argument("--hovers", type=int, default=40)
    args = parser.parse_args()
    text = generate(Shape(items=args.items, skips=True, stops=True, seed=5))
    with tempfile.TemporaryDirectory() as folder:
        spec = Path(folder) / "spec.qlc"
        spec.write_text(text, encoding="utf-8")
        base = baseline(spec, 3)
    edits, hovers, opened, cpu = asyncio.run(measure(text, args.edits, args.hovers))
    print(f"spec: {args.items} items, {len(text.splitlines())} lines; load average {os.getloadavg()[0]:.1f}")
    print(f"baseline `lint --no-solver` (child process, median of 3): {base * 1000:.0f} ms")
    print(f"open → static diagnostics: {opened * 1000:.0f} ms")
    if cpu is not None:
        print(f"server CPU per edit (parse, checks, index, publish): {cpu * 1000:.0f} ms")
    for name, values, bar in (("edit → static diagnostics", edits, EDIT_BAR), ("hover", hovers, HOVER_BAR)):
        median = statistics.median(values)
        verdict = "within" if median <= bar else "OVER"
        print(f"{name}: median {median * 1000:.0f} ms, p90 {p90(values) * 1000:.0f} ms over {len(values)} "
              f"(bar {bar * 1000:.0f} ms: {verdict}); {median / base:.2f}× the baseline")


if __name__ == "__main__":
    main()
