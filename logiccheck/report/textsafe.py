"""Text from specs and exports made safe to show.

Terminal: control characters (C0, DEL, C1) and bidirectional controls are shown as
escapes such as `\\x1b` or `\\u202e`, so a cell cannot retitle, clear or recolour the
user's terminal, nor reverse the text around it. HTML: bidirectional controls
(U+202A–202E, U+2066–2069, U+200E/F, U+061C) are replaced by their visible escape before
the template escapes the markup (the Unicode "Trojan Source" advice: show, never obey)."""

from __future__ import annotations

import re

BIDI = "\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069\u200e\u200f\u061c"
_BIDI_RE = re.compile(f"[{BIDI}]")
_TERMINAL_RE = re.compile(f"[\\x00-\\x1f\\x7f-\\x9f{BIDI}]")
_TERMINAL_KEEP_TABS_RE = re.compile(f"[\\x00-\\x08\\x0a-\\x1f\\x7f-\\x9f{BIDI}]")


def _visible(match: re.Match[str]) -> str:
    code = ord(match.group())
    return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}"


def terminal_text(text: object, keep_tabs: bool = False) -> str:
    """`text` with every control character shown as an escape (tabs kept if asked)."""
    pattern = _TERMINAL_KEEP_TABS_RE if keep_tabs else _TERMINAL_RE
    return pattern.sub(_visible, str(text))


def html_text(text: object) -> str:
    """`text` with bidirectional controls shown as escapes (markup is escaped later)."""
    return _BIDI_RE.sub(_visible, str(text))
