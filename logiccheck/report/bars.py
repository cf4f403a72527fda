"""A compact terminal bar for the `validate` table: expected versus answered at a glance.

The bar is `width` cells scaled to the larger of expected and answered: `█` answered on
path, `░` missing on path, `▓` out of path (red), and `│` at the end of the expected count when answers fall short of it,
so a broken route shows as a red tail or a long light gap without reading numbers.
"""

from __future__ import annotations

from rich.text import Text

ON, MISSING, OUT, MARK, EMPTY = "█", "░", "▓", "│", " "
STYLES = {ON: "blue", MISSING: "yellow", OUT: "red", MARK: "bold", EMPTY: ""}


def bar_cells(expected: int, answered: int, out_of_path: int, missing_on_path: int, width: int = 12) -> str:
    """The bar as plain characters (also what a terminal without colour shows)."""
    on_path = max(answered - out_of_path, 0)
    total = max(expected, on_path + missing_on_path + out_of_path, 1)

    def cells(count: int) -> int:
        return round(width * count / total)

    sizes = [cells(on_path), cells(missing_on_path), cells(out_of_path)]
    for i, count in ((1, missing_on_path), (2, out_of_path)):
        if count and not sizes[i]:
            sizes[i] = 1  # never round away a route break
    while sum(sizes) > width:
        sizes[sizes.index(max(sizes))] -= 1
    parts = [ON] * sizes[0] + [MISSING] * sizes[1] + [OUT] * sizes[2]
    parts += [EMPTY] * (width - len(parts))
    # The last cell the expected count reaches: an empty one there shows how short answers fall.
    mark = min(cells(expected), width) - 1
    if expected and mark >= 0 and parts[mark] == EMPTY:
        parts[mark] = MARK
    return "".join(parts)


def bar_text(expected: int, answered: int, out_of_path: int, missing_on_path: int, width: int = 12) -> Text:
    """The bar as a rich Text with colours (rich drops them where colour is off)."""
    text = Text()
    for char in bar_cells(expected, answered, out_of_path, missing_on_path, width):
        text.append(char, style=STYLES[char])
    return text


def signed_bar_cells(value: float | None, width: int = 10) -> str:
    """A bar for a value in −1..1 (a correlation): half the cells each side of a centre
    line, filled towards the left for negative values and to the right for positive ones."""
    half = width // 2
    if value is None or value != value:
        return EMPTY * half + MARK + EMPTY * half
    v = max(-1.0, min(1.0, value))
    filled = round(abs(v) * half)
    if v < 0:
        return EMPTY * (half - filled) + OUT * filled + MARK + EMPTY * half
    return EMPTY * half + MARK + ON * filled + EMPTY * (half - filled)


def signed_bar_text(value: float | None, width: int = 10) -> Text:
    """The signed bar with colours: red to the left of the centre, blue to the right."""
    text = Text()
    for char in signed_bar_cells(value, width):
        text.append(char, style=STYLES[char])
    return text
