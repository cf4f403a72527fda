"""Outputs are written atomically, with ordinary file permissions."""

from __future__ import annotations

import os
import stat
from pathlib import Path

import pytest

from logiccheck.atomic import atomic_write, write_atomic, write_text_atomic


def test_new_file_gets_the_umask_mode_not_the_private_temp_mode(tmp_path: Path) -> None:
    mask = os.umask(0o022)
    try:
        path = write_atomic(tmp_path / "out.txt", "hello")
    finally:
        os.umask(mask)
    assert path.read_text() == "hello"
    assert stat.S_IMODE(path.stat().st_mode) == 0o644


def test_existing_file_keeps_its_mode(tmp_path: Path) -> None:
    path = tmp_path / "out.csv"
    path.write_text("old")
    path.chmod(0o640)
    write_text_atomic(path, lambda fh: fh.write("a,b\r\n"))
    assert path.read_bytes() == b"a,b\r\n"  # no newline translation
    assert stat.S_IMODE(path.stat().st_mode) == 0o640


def test_interrupted_write_leaves_the_old_file_and_no_temp(tmp_path: Path) -> None:
    path = tmp_path / "summary.json"
    path.write_text("whole")

    def half(tmp: Path) -> None:
        tmp.write_text('{"half": ')
        raise KeyboardInterrupt

    with pytest.raises(KeyboardInterrupt):
        atomic_write(path, half)
    assert path.read_text() == "whole"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["summary.json"]
