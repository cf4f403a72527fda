"""One call from spec text to a resolved questionnaire, with the diagnostics so far."""

from __future__ import annotations

import gc
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path

from logiccheck.diagnostics import Diagnostic
from logiccheck.model.build import build_spec
from logiccheck.model.questionnaire import Questionnaire
from logiccheck.model.resolve import resolve
from logiccheck.syntax import parse_text


class SpecReadError(Exception):
    """A spec file that cannot be read at all (missing, not UTF-8): exit status 2."""


@dataclass
class Loaded:
    questionnaire: Questionnaire
    syntax: list[Diagnostic] = field(default_factory=list)

    @property
    def ok(self) -> bool:
        return not self.syntax


def read_spec_text(path: str | Path) -> str:
    path = Path(path)
    try:
        raw = path.read_bytes()
    except FileNotFoundError:
        raise SpecReadError(f"{path}: no such file; give the path of a .qlc spec") from None
    except IsADirectoryError:
        raise SpecReadError(f"{path}: is a folder; give the path of a .qlc spec") from None
    except OSError as err:
        raise SpecReadError(f"{path}: cannot read ({err.strerror})") from None
    try:
        return raw.decode("utf-8")
    except UnicodeDecodeError as err:
        raise SpecReadError(
            f"{path}: not UTF-8 text (byte {err.start}); save the spec as UTF-8"
        ) from None


@contextmanager
def gc_paused() -> Iterator[None]:
    """Pause the cyclic garbage collector while building many small objects that all stay
    alive (parse tree, nodes): its repeated scans of them cost a third of the load time
    of a large spec and free nothing. Reference counting still frees as usual."""
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_enabled:
            gc.enable()


def load_text(text: str, file: str = "<spec>") -> Loaded:
    with gc_paused():
        parsed = parse_text(text, file)
        spec, built = build_spec(parsed.tree, file)
        questionnaire = resolve(spec, parsed.text)
    return Loaded(questionnaire, sorted(parsed.diagnostics + built, key=Diagnostic.sort_key))


def load_file(path: str | Path) -> Loaded:
    return load_text(read_spec_text(path), str(path))
