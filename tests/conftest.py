from __future__ import annotations

from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
SPECS = ROOT / "specs"
CHECK_FIXTURES = Path(__file__).resolve().parent / "checks"


@pytest.fixture
def bikeshare_path() -> Path:
    return SPECS / "bikeshare.qlc"
