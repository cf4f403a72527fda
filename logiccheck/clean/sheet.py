"""Spreadsheet safety: a reversible escape for cells a spreadsheet would run as a formula.

A text cell starting with `=`, `+`, `-`, `@`, tab or carriage return (and not a number)
gets a leading apostrophe; so does a cell that would otherwise read back as escaped, so
`unescape(escape(x)) == x` for every cell.
"""

from __future__ import annotations

import re

FORMULA_START = ("=", "+", "-", "@", "\t", "\r")
_NUMBER = re.compile(r"^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$")


def needs_escape(cell: str) -> bool:
    if not cell or _NUMBER.match(cell.strip()):
        return False
    if cell.startswith(FORMULA_START):
        return True
    return cell.startswith("'") and needs_escape(cell[1:])


def escape(cell: str) -> str:
    return "'" + cell if needs_escape(cell) else cell


def unescape(cell: str) -> str:
    return cell[1:] if cell.startswith("'") and needs_escape(cell[1:]) else cell


SHEET_ESCAPE = "sheet-escape"
ESCAPE_REASON = ("a spreadsheet would run this cell as a formula; the CSV and .xlsx outputs hold it with "
                 "a leading apostrophe (new_value)")


def needs_escape_any(cells: list[str]) -> list[int]:
    """Positions of the cells that need the escape (a quick test on the first character first)."""
    return [i for i, c in enumerate(cells) if c and (c[0] in "=+-@\t\r'") and needs_escape(c)]
