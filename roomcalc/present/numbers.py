"""How numbers and lines look in every presenter: one formatter, one band label, one wrapper."""

from __future__ import annotations

import math
import textwrap

import numpy as np

__all__ = ["WIDTH", "NO_VALUE", "fmt", "fit", "value_or_note", "band_label", "wrap", "floats",
           "finite_or_none", "plural", "json_text", "csv_number"]

#: Width of the text reports [characters].
WIDTH = 80


def fmt(x, nd: int = 2, signed: bool = False) -> str:
    """``x`` with ``nd`` decimals; "-" for None, NaN or infinity (a value the formula has
    none for). A value that rounds to zero is written unsigned ("0.0", never "-0.0" or
    "+0.0"); ``signed``: a "+" before a positive value (a change or a margin).

    >>> fmt(-0.004), fmt(-0.04, 1), fmt(-0.0, 0), fmt(-0.06, 1)
    ('0.00', '0.0', '0', '-0.1')
    >>> fmt(0.26, 1, signed=True), fmt(-0.01, 1, signed=True), fmt(-2.0, 1, signed=True)
    ('+0.3', '0.0', '-2.0')
    """
    if x is None:
        return "-"
    x = float(x)
    if not math.isfinite(x):
        return "-"
    text = f"{x:{'+' if signed else ''}.{nd}f}"
    if text[0] in "+-" and not text.strip("+-0."):
        return text[1:]
    return text


#: What text, markdown and CSV say where a formula has no finite value to give (an infinity or
#: NaN, such as the OSHA TWA of a day too quiet for its dose formula). One wording everywhere;
#: a table cell, too narrow for it, shows "-".
NO_VALUE = "below the range of the formula"


def value_or_note(x, nd: int = 1, unit: str = "") -> str:
    """``x`` with ``nd`` decimals and its unit, or :data:`NO_VALUE` when it is not finite."""
    if x is None or not math.isfinite(float(x)):
        return NO_VALUE
    return fmt(x, nd) + (f" {unit}" if unit else "")


def fit(cell: str, width: int) -> str:
    """A number as :func:`fmt` wrote it, made to fit ``width`` characters so that columns never
    run together: fewer decimals, then powers of ten ("9e+03")."""
    if len(cell) <= width:
        return cell
    try:
        x = float(cell)
    except ValueError:
        return cell[:width]
    for text in (f"{x:.0f}", f"{x:.0e}".replace("e+0", "e+").replace("e-0", "e-")):
        if len(text) <= width:
            return text
    return f"{x:.0e}"


def band_label(b) -> str:
    """An octave band as a short column head: 125, 250, 500, 1k, 2k."""
    return f"{b:g}" if b < 1000 else f"{b / 1000:g}k"


def wrap(text: str, first: str = "  - ", rest: str = "    ", width: int | None = None) -> str:
    """Wrapped to the report's width (``width`` 0: one line, for a screen that wraps itself)."""
    if width == 0:
        return first + text
    return textwrap.fill(text, (width or WIDTH) - 1, initial_indent=first,
                         subsequent_indent=rest)


def floats(a, nd: int | None = None) -> list[float]:
    """An array as a list of floats for JSON (rounded to ``nd`` decimals if given)."""
    out = [float(x) for x in np.asarray(a, dtype=float).reshape(-1)]
    if nd is not None:
        out = [round(x, nd) for x in out]
    return out


def finite_or_none(a) -> list:
    """An array as a JSON list with None where a value is not finite (no limit there)."""
    return [float(v) if math.isfinite(float(v)) else None
            for v in np.asarray(a, dtype=float).reshape(-1)]


def plural(n: int, word: str, many: str | None = None) -> str:
    """"1 surface", "2 surfaces"."""
    return f"{n:g} {word if n == 1 else (many or word + 's')}"


def csv_number(x) -> str:
    """A CSV cell: 6 significant digits, empty where there is no finite value, "0" for a
    negative zero.

    >>> csv_number(-0.0), csv_number(1.23456789), csv_number(float("nan"))
    ('0', '1.23457', '')
    """
    if x is None or x == "":
        return ""
    x = float(x)
    if not math.isfinite(x):
        return ""
    return f"{x + 0.0:.6g}"      # + 0.0 turns -0.0 into 0.0


def _strict(obj):
    if isinstance(obj, float):
        return obj + 0.0 if math.isfinite(obj) else None     # + 0.0: no -0.0 in JSON
    if isinstance(obj, dict):
        return {k: _strict(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_strict(v) for v in obj]
    return obj


def json_text(data) -> str:
    """Strict JSON (RFC 8259): a value a formula has none for (NaN, or an infinity such as the
    OSHA TWA of a quiet day) is written as null, never as NaN or Infinity."""
    import json

    return json.dumps(_strict(data), indent=2, allow_nan=False) + "\n"
