"""What a file may hold: the range of every physical quantity in a room file, and the size and
nesting a data file may have before it is parsed. One home for both; docs/room-files.md lists
them ("Allowed ranges", "File size and nesting").

Ranges are given in SI (metric) and converted to a file's own units where units matter: an
imperial file's lengths are checked, and reported, in ft (areas ft^2, volumes ft^3,
temperatures degF). The ranges are generous for real rooms, from a vocal booth to a large
hall, and keep every formula finite: a volume of 1e-12 m^3 or a directivity of 5e-324 is
refused with the allowed range instead of giving RT 0.00 s or -inf levels. Each lies inside
what the engine accepts (roomcalc.engine.checks and the formulas that call it; a test reads
the engine's own limits): the file layer refuses first, so the user sees the file and the
field, never the engine's message.

The size guard (:func:`guard_text`) runs before the TOML parser: the parser's time grows
with the square of the parts of a dotted key (an 80 kB line ``a.a.a...= 1`` of 40,000 parts
took 24 s and 6 GB), so a file is refused, quickly and with the limit it broke, when it is
larger, has longer lines, longer dotted keys or deeper brackets than any room, catalogue or
criteria file needs.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from roomcalc.io.errors import Problem, RoomFileError
from roomcalc.io.units import METRIC, Units

__all__ = ["Range", "RANGES", "limit", "MAX_FILE_BYTES", "MAX_LINE_CHARS", "MAX_KEY_PARTS",
           "MAX_NESTING", "guard_size", "guard_text", "ranges_table"]


@dataclass(frozen=True)
class Range:
    """An allowed range, in SI. ``dim``: how it converts to a file's units ("length", "area",
    "volume", "temperature", or "" for none); ``unit``: the label when ``dim`` is "";
    ``low_open``: the low end itself is not allowed; ``why``: the reason, for the docs."""

    low: float
    high: float
    dim: str = ""
    unit: str = ""
    low_open: bool = False
    why: str = ""

    def bounds(self, u: Units = METRIC) -> tuple[float, float]:
        """(low, high) in the file's units."""
        if self.dim == "temperature":
            return u.temperature_from_c(self.low), u.temperature_from_c(self.high)
        f = {"length": u.length, "area": u.area, "volume": u.volume}.get(self.dim, 1.0)
        return self.low / f, self.high / f

    def label(self, u: Units = METRIC) -> str:
        return {"length": u.length_label, "area": u.area_label, "volume": u.volume_label,
                "temperature": u.temperature_label}.get(self.dim, self.unit)


#: Largest surface coefficient (test reports to ISO 354 give values a little above 1; common
#: practice). The catalogue uses the same value.
ALPHA_MAX = 1.2

#: The allowed range of every physical quantity of a room file, by the name of its key.
RANGES: dict[str, Range] = {
    "length": Range(0.1, 1000.0, "length", why="a side of a box room, 10 cm to 1 km; the "
                    "box's volume (length x width x height) must also lie in its range"),
    "volume": Range(1.0, 1e6, "volume", why="a 1 m^3 closet or vocal booth to a 1,000,000 m^3 "
                    "hall; smaller, a diffuse field has no meaning; larger, no criterion here "
                    "covers the room"),
    "area": Range(0.001, 1e5, "area", why="one surface (per unit): 10 cm^2 (a vent) to "
                  "100,000 m^2 (the floor of the largest hall)"),
    "surface_count": Range(1, 10000, unit="units", why="identical surfaces (windows, panels)"),
    "alpha": Range(0.0, ALPHA_MAX, unit="(alpha)", why="0 (fully reflecting) to 1.2 (test "
                   "reports to ISO 354 give values a little above 1; common practice)"),
    "object_count": Range(0.0, 100000.0, unit="units", why="up to an audience of 100,000"),
    "absorption": Range(0.0, 1000.0, "area", why="absorption area of one object: a person is "
                        "about 0.5 m^2 (common practice); a large absorber block fits"),
    "sound_power": Range(0.0, 200.0, unit="dB", why="dB re 1 pW per band: a quiet fan is about "
                         "30 dB, a jet engine about 160 dB (common practice, from memory)"),
    "sound_power_dba": Range(0.0, 200.0, unit="dB(A)", why="as sound_power, A-weighted"),
    "level_dba_1m": Range(0.0, 180.0, unit="dB(A)", why="A-weighted level of the direct sound "
                          "at 1 m: a whisper is about 30, a voice about 60, a planer about 100 "
                          "(common practice, from memory); its sound power stays inside "
                          "sound_power's range"),
    "directivity": Range(0.1, 100.0, unit="(Q)", why="Q of real sources is about 1 to 20 "
                         "(common practice): 1 in free space, 2 on a surface, 4 at an edge, 8 "
                         "in a corner; a horn on its axis reaches 10 to 50 (from memory); below "
                         "1, a source turned away from the listeners"),
    "distance": Range(0.01, 10000.0, "length", why="receiver to source: 1 cm up; a real source "
                      "is no point at such distances, and a warning says so below 0.5 m"),
    "position": Range(-10000.0, 10000.0, "length", why="each coordinate; in a box room, inside "
                      "the box"),
    "hours": Range(0.0, 24.0, unit="h per day", why="one working day"),
    "temperature": Range(-40.0, 60.0, "temperature", why="indoor air, cold store to hot "
                         "workshop; ISO 9613-1 states its accuracy from -20 to 50 degC"),
    "relative_humidity": Range(0.0, 100.0, unit="%", why="relative humidity"),
    "pressure_kpa": Range(50.0, 120.0, unit="kPa", why="high plateau to below sea level"),
    "rt60_limit": Range(0.05, 20.0, unit="s", why="a reverberation time limit or target"),
    "level_limit": Range(0.0, 200.0, unit="dB", why="a limit on the level at a receiver, as "
                         "for sound power"),
    "level_limit_dba": Range(0.0, 200.0, unit="dB(A)", why="as level_limit, A-weighted"),
    "cost": Range(0.0, 1e9, why="a price in the file's currency"),
    "max_area": Range(0.0, 1e9, "area", why="most area a candidate covers (up to all of a "
                      "surface's count)"),
    "step": Range(0.001, 1e5, "area", why="area of one panel"),
    "panel": Range(0.05, 100.0, "length", why="width or height of one panel, 5 cm to 100 m"),
    "max_count": Range(0.0, 1e6, unit="units", why="most units of a candidate"),
    "area_each": Range(0.001, 1e5, "area", why="what one unit counts for"),
}


def limit(name: str, u: Units = METRIC, unit: str | None = None) -> dict:
    """The range ``name`` as keyword arguments of :class:`roomcalc.io.checks.Checker`'s
    ``number``, ``value`` and ``numbers`` (low, high, low_open, unit), in the file's units.
    ``unit``: a different label for the message (e.g. "one per band: 125, ... Hz")."""
    r = RANGES[name]
    low, high = r.bounds(u)
    return {"low": low, "high": high, "low_open": r.low_open,
            "unit": r.label(u) if unit is None else unit}


def ranges_table() -> str:
    """The ranges as a markdown table (metric and imperial), as docs/room-files.md lists them
    (a test keeps the two equal)."""
    from roomcalc.io.units import IMPERIAL

    def num(x):
        return f"{x:,.6g}" if abs(x) < 1e6 else f"{x:.6g}"

    lines = ["| Range | Metric | Imperial | Why |", "|---|---|---|---|"]
    for name, r in RANGES.items():
        cells = []
        for u in (METRIC, IMPERIAL):
            lo, hi = r.bounds(u)
            lab = r.label(u)
            cells.append(f"{'above ' if r.low_open else ''}{num(lo)} to {num(hi)}"
                         + (f" {lab}" if lab else ""))
        lines.append(f"| `{name}` | {cells[0]} | {cells[1]} | {r.why} |")
    return "\n".join(lines) + "\n"


# ----------------------------------------------------------------------------- size guard

#: Largest data file read [bytes]. A room of 2,000 surfaces is about 200 kB.
MAX_FILE_BYTES = 4 * 1024 * 1024
#: Longest line [characters] (a long inline list of band values is a few hundred).
MAX_LINE_CHARS = 20000
#: Most parts of one dotted key (``a.b.c`` has 3); room files use 2 or 3.
MAX_KEY_PARTS = 8
#: Deepest nesting of arrays and inline tables (``[[1]]`` is 2); room files use 2 or 3.
MAX_NESTING = 8

# Tokens the guard looks at; everything else is skipped by the regular expression engine.
_TOKENS = re.compile(r'"""(?:[^"\\]|\\.|"(?!""))*"{3,5}'
                     r"|'''(?:[^']|'(?!''))*'{3,5}"
                     r'|"(?:[^"\\\n]|\\.)*"'
                     r"|'[^'\n]*'"
                     r"|#[^\n]*"
                     r"|[\[\]{}=,.\n]", re.DOTALL)


def _refuse(filename: str, where: str, message: str):
    raise RoomFileError([Problem(filename, where, message)])


def guard_size(size: int, filename: str) -> None:
    """A file of ``size`` bytes is not larger than :data:`MAX_FILE_BYTES`."""
    if size > MAX_FILE_BYTES:
        _refuse(filename, "", f"is {size:,} bytes; roomcalc reads data files of at most "
                f"{MAX_FILE_BYTES:,} bytes ({MAX_FILE_BYTES // 1024 // 1024} MB; a room of "
                "2,000 surfaces is about 200 kB)")


def guard_text(text: str, filename: str) -> None:
    """Refuse TOML text larger, with longer lines, longer dotted keys or deeper brackets than
    the limits above, before it is parsed (in time linear in its length). Raises
    RoomFileError naming the file, the line and the limit."""
    guard_size(len(text.encode("utf-8")) if len(text) * 4 > MAX_FILE_BYTES else len(text),
               filename)
    line, parts, stack = 1, 1, []
    in_key = True                    # at a key: line start, or after { or , in an inline table
    for m in _TOKENS.finditer(text):
        tok = m.group()
        c = tok[0]
        if c == "\n":
            line += 1
            if not stack:
                in_key, parts = True, 1
        elif c in "\"'":
            line += tok.count("\n")
        elif c == "#":
            continue
        elif c == "." and in_key:
            parts += 1
            if parts > MAX_KEY_PARTS:
                _refuse(filename, f"line {line}", f"a dotted key has more than "
                        f"{MAX_KEY_PARTS} parts; keys of at most {MAX_KEY_PARTS} parts are "
                        "read (room files use 2 or 3)")
        elif c == "=":
            in_key, parts = False, 1
        elif c in "[{":
            if in_key and not stack and c == "[":
                continue                 # a table header: [a.b] or [[a.b]], still a key
            stack.append(c)
            if len(stack) > MAX_NESTING:
                _refuse(filename, f"line {line}", f"arrays or inline tables are nested more "
                        f"than {MAX_NESTING} deep; at most {MAX_NESTING} levels are read")
            in_key, parts = c == "{", 1
        elif c in "]}":
            if stack:
                stack.pop()
            in_key = False
        elif c == ",":
            in_key, parts = bool(stack) and stack[-1] == "{", 1
    start = 0
    for n, line_end in enumerate(_line_ends(text), 1):
        if line_end - start > MAX_LINE_CHARS:
            _refuse(filename, f"line {n}", f"is {line_end - start:,} characters long; "
                    f"lines of at most {MAX_LINE_CHARS:,} are read")
        start = line_end + 1


def _line_ends(text: str):
    """Where each line ends (the index of its new line, or the text's end)."""
    i = text.find("\n")
    while i != -1:
        yield i
        i = text.find("\n", i + 1)
    yield len(text)
