"""The report renders in headless Chromium: chart, table and picture are in the page and
painted. Skips where no Chromium is installed (`.ci/run` installs Debian's `chromium`)."""

from __future__ import annotations

import importlib.util
import shutil
import subprocess
from pathlib import Path

import pytest

pytest.importorskip("jinja2")
pytest.importorskip("matplotlib")

from logiccheck.checks.runner import run_checks
from logiccheck.loader import load_file
from logiccheck.report.graph_picture import BOX_STYLE
from logiccheck.report.html import render_html
from logiccheck.report.item_chart import COLOURS
from logiccheck.report.report_data import from_validation
from tests.report.fakes import fake_result
from tests.report.test_html_report import parse

ROOT = Path(__file__).resolve().parents[2]
ARTIFACTS = ROOT / "out" / "test-artifacts"  # ignored by git
BROWSER = shutil.which("chromium") or shutil.which("chromium-browser")
pytestmark = pytest.mark.skipif(
    BROWSER is None, reason="headless Chromium not installed (apt-get install -y chromium); render test skipped"
)


def _chromium(tmp_path: Path, *args: str) -> subprocess.CompletedProcess[str]:
    cmd = [BROWSER, "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
           "--disable-component-update", "--disable-sync", "--no-first-run",
           f"--user-data-dir={tmp_path / 'profile'}", *args]
    return subprocess.run(cmd, capture_output=True, text=True, timeout=180, check=False)


def _hex(colour: str) -> tuple[int, int, int]:
    return tuple(int(colour[i:i + 2], 16) for i in (1, 3, 5))  # type: ignore[return-value]


def _pixels(image, colour: str, tol: int = 3) -> int:
    import numpy as np

    rgb = (image[..., :3] * 255).round().astype(int) if image.dtype != np.uint8 else image[..., :3].astype(int)
    return int((abs(rgb - np.array(_hex(colour))).max(axis=-1) <= tol).sum())


@pytest.fixture(scope="module")
def report_file(tmp_path_factory) -> Path:
    loaded = load_file("specs/bikeshare.qlc")
    q = loaded.questionnaire
    if importlib.util.find_spec("logiccheck.data") is not None:
        import logiccheck

        html = logiccheck.load("specs/bikeshare.qlc").validate("specs/bikeshare_export.csv").to_html()
    else:
        html = render_html(from_validation(q, fake_result(q), run_checks(loaded), export="demo.csv"))
    path = tmp_path_factory.mktemp("report") / "report.html"
    path.write_text(html, encoding="utf-8")
    return path


def test_rendered_dom_has_chart_table_and_picture(report_file, tmp_path) -> None:
    done = _chromium(tmp_path, "--dump-dom", report_file.as_uri())
    assert done.returncode == 0, done.stderr[-500:]
    page = parse(done.stdout)
    assert {"item-chart", "item-table", "routing"} <= page.ids
    rows = [a for t, a in page.tags if t == "tr"]
    assert len(rows) > 14  # one per item at least, plus section rows
    assert sum(1 for t, _ in page.tags if t == "svg") >= 2


def test_screenshot_shows_chart_table_and_picture(report_file, tmp_path) -> None:
    from matplotlib.image import imread

    ARTIFACTS.mkdir(parents=True, exist_ok=True)
    shot = ARTIFACTS / "report-screenshot.png"
    shot.unlink(missing_ok=True)
    done = _chromium(tmp_path, f"--screenshot={shot}", "--window-size=1280,6000", "--hide-scrollbars",
                     report_file.as_uri())
    assert done.returncode == 0 and shot.exists(), done.stderr[-500:]
    image = imread(str(shot))
    assert image.shape[0] >= 6000 * 0.9
    # Each part paints a colour no other part uses, so its pixels prove it is visible.
    assert _pixels(image, COLOURS["on_path"]) > 500, "per-item chart not painted"
    assert _pixels(image, "#5283b9") > 200, "per-item table bars not painted"
    assert _pixels(image, BOX_STYLE["gate"][0]) > 500, "routing picture not painted"
