"""Keyboard layouts and the letter neighbours they imply, for synthetic typos.

A substitution typo usually hits a key next to the intended one, so the typo generator
needs to know which keys touch. The maps here are derived from the geometry of the three
letter rows of each layout (written out below from the printed key caps), not from a
table copied from anywhere: row ``r`` starts ``ROW_OFFSETS[r]`` key widths to the right
of the row above, and two keys touch when they sit side by side in one row, or in
neighbouring rows less than one key width apart horizontally.

Only letter keys are modelled. The number row is left out on purpose: a typo that brings a
digit into a word would turn it into a code-like token, a different kind of error.

This module never does I/O and holds no state: layouts are constants, neighbour maps are
computed by a cached function.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache

ROW_OFFSETS: tuple[float, float, float] = (0.0, 0.25, 0.75)
"""Horizontal offset of the top, home and bottom letter rows, in key widths.

Standard staggered keyboards (ANSI and ISO alike): Tab is 1.5 keys wide, Caps Lock 1.75,
the left Shift 2.25 (ANSI; on ISO the extra key beside a 1.25-wide Shift lands the first
letter in the same place). Relative to the top letter row that puts the home row 0.25 and
the bottom row 0.75 to the right. Common practice, no source.
"""


@dataclass(frozen=True, slots=True, kw_only=True)
class Layout:
    """A keyboard layout: its name and its three letter rows, left to right."""

    name: str
    rows: tuple[str, str, str]
    description: str


LAYOUTS: dict[str, Layout] = {
    layout.name: layout
    for layout in (
        Layout(
            name="qwerty",
            rows=("qwertyuiop", "asdfghjkl", "zxcvbnm"),
            description="US/UK QWERTY (English, Dutch)",
        ),
        Layout(
            name="qwerty-es",
            rows=("qwertyuiop", "asdfghjklñ", "zxcvbnm"),
            description="Spanish QWERTY, with ñ at the end of the home row",
        ),
        Layout(
            name="qwertz",
            rows=("qwertzuiopü", "asdfghjklöä", "yxcvbnm"),
            description="German QWERTZ: z and y swapped, umlauts at the right of the rows",
        ),
        Layout(
            name="azerty",
            rows=("azertyuiop", "qsdfghjklmù", "wxcvbn"),
            description="French AZERTY: a/q and z/w swapped, m on the home row",
        ),
    )
}

DEFAULT_LAYOUT_BY_LANG: dict[str, str] = {
    "en": "qwerty",
    "nl": "qwerty",
    "es": "qwerty-es",
    "de": "qwertz",
    "fr": "azerty",
}
"""The layout most writers of a language type on; ``qwerty`` for any other language."""


def layout_for(name: str | None, lang: str) -> Layout:
    """The layout called ``name``, or the usual one for ``lang`` when ``name`` is None.

    >>> layout_for(None, "de-AT").name
    'qwertz'
    >>> layout_for("azerty", "en").name
    'azerty'
    """
    if name is None:
        primary = lang.split("-", 1)[0].lower()
        name = DEFAULT_LAYOUT_BY_LANG.get(primary, "qwerty")
    try:
        return LAYOUTS[name]
    except KeyError:
        known = ", ".join(sorted(LAYOUTS))
        raise ValueError(f"unknown keyboard layout {name!r} (known: {known})") from None


@cache
def neighbours(layout_name: str) -> dict[str, str]:
    """Map each lowercase letter of a layout to the letters on the keys touching it.

    >>> neighbours("qwerty")["s"]
    'weadzx'
    >>> neighbours("qwertz")["z"]
    'tugh'
    >>> neighbours("azerty")["a"]
    'zq'
    """
    layout = LAYOUTS[layout_name]
    places: list[tuple[str, int, float]] = []
    for r, row in enumerate(layout.rows):
        for i, key in enumerate(row):
            places.append((key, r, i + ROW_OFFSETS[r]))
    out: dict[str, str] = {}
    for key, r, x in places:
        near = []
        for other, r2, x2 in places:
            if other == key:
                continue
            same_row = r2 == r and abs(x2 - x) == 1.0
            next_row = abs(r2 - r) == 1 and abs(x2 - x) < 1.0
            if same_row or next_row:
                near.append((r2, x2, other))
        near.sort()
        out[key] = "".join(other for _, _, other in near)
    return out


def layout_letters(layout_name: str) -> str:
    """Every letter of a layout, row by row.

    >>> layout_letters("qwerty")[:5]
    'qwert'
    """
    return "".join(LAYOUTS[layout_name].rows)
