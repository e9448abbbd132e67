"""Numbers as a person types them in a field of the interface: the one home of that parsing,
used by every field (the cell editor, the room form, the own RT60 limit, the material
chooser's own values).

A decimal comma is accepted as well as a decimal point ("9,5" is 9.5), as many keyboards and
locales write it. In a list, numbers are separated by spaces or semicolons; a comma with a
space after it ("0.6, 0.5"), or a comma between numbers that already have a decimal point or
more than one comma ("0.6,0.5", "1,2,3"), separates them too, as before.
"""

from __future__ import annotations

import re

__all__ = ["parse_number", "parse_numbers", "split_entries"]

#: One number with a decimal comma instead of a point: "9,5", "-0,25", ",5", "1,5e3".
_DECIMAL_COMMA = re.compile(r"[+-]?(\d+,\d*|,\d+)([eE][+-]?\d+)?")
#: What separates the numbers of a list: spaces, semicolons, a comma with a space after it.
_SEPARATOR = re.compile(r"[\s;]+|,\s+")
#: What separates entries such as "Amp=3,2; Guitar=4" or "Amp=3.2, Guitar=4": a semicolon,
#: or a comma not followed by a digit (a comma followed by a digit is a decimal comma).
_ENTRY_SEPARATOR = re.compile(r";|,(?!\d)")


def parse_number(text: str) -> float:
    """The typed text as one number; a decimal comma is read as a decimal point. Raises
    ValueError("'text' is not a number").

    >>> parse_number("9,5"), parse_number(" -0,25 "), parse_number("1.5e3"), parse_number("2")
    (9.5, -0.25, 1500.0, 2.0)
    """
    t = text.strip()
    if _DECIMAL_COMMA.fullmatch(t):
        t = t.replace(",", ".")
    try:
        return float(t)
    except ValueError:
        raise ValueError(f"'{text.strip()}' is not a number") from None


def parse_numbers(text: str) -> list[float]:
    """The typed text as a list of numbers, separated by spaces, semicolons or a comma and a
    space; each may have a decimal comma. A part with several commas, or with a point and a
    comma ("1,2,3", "0.6,0.5"), is a list written with commas. Raises ValueError naming the
    first part that is not a number.

    >>> parse_numbers("0,6 0,5; 0,4")
    [0.6, 0.5, 0.4]
    >>> parse_numbers("0.6, 0.5"), parse_numbers("0,6, 0,5"), parse_numbers("1,2,3")
    ([0.6, 0.5], [0.6, 0.5], [1.0, 2.0, 3.0])
    """
    out = []
    for part in _SEPARATOR.split(text.strip()):
        part = part.strip(",")
        if not part:
            continue
        if _DECIMAL_COMMA.fullmatch(part):
            out.append(parse_number(part))
        else:
            out += [parse_number(p) for p in part.split(",") if p]
    return out


def split_entries(text: str) -> list[str]:
    """Entries of a list such as "Amp=3,2; Guitar=4" or "Amp=3.2, Guitar=4": separated by
    semicolons, or by commas not followed by a digit.

    >>> split_entries("Amp=3,2, Guitar=4"), split_entries("Amp=3.2;Guitar=4,5")
    (['Amp=3,2', ' Guitar=4'], ['Amp=3.2', 'Guitar=4,5'])
    """
    return _ENTRY_SEPARATOR.split(text)

