"""Reading a room file's text as it is laid out: its tables and ``key = value`` entries,
each with the comment and blank lines above it, its end-of-line comment and the comments inside
a value written over several lines. :mod:`.keep` writes an edited room over this layout."""

from __future__ import annotations

import re
import tomllib
from dataclasses import dataclass, field
from functools import lru_cache

__all__ = ["ARRAY_TABLES", "Entry", "Layout", "SINGLE_TABLES", "TABLE_ORDER", "Table",
           "Unsupported", "comment_lines", "content_key", "frozen", "read_layout", "same_data",
           "trail_comment"]

#: Tables written once (``[name]``) and arrays of tables (``[[name]]``), in the documented order.
SINGLE_TABLES = ("air", "shape", "target")
ARRAY_TABLES = ("surfaces", "objects", "sources", "receivers", "candidates", "materials")
TABLE_ORDER = ("air", "shape", "surfaces", "objects", "sources", "receivers", "target",
               "candidates", "materials")


class Unsupported(Exception):
    """A layout this reader does not follow line by line."""


@dataclass
class Entry:
    """One ``key = value`` of a table as written."""

    key: str
    lead: list[str]          # comment and blank lines above it
    lines: list[str]         # the entry's lines, verbatim
    prefix: str              # the first line up to the value ("  area = ")
    trail: str               # after the value on its last line ("  # measured"), or ""
    inner: list[str]         # comments inside a value written over several lines
    value: object = None     # as tomllib reads it


@dataclass
class Table:
    kind: str                # "" for the top level
    lead: list[str]          # comment and blank lines above the header
    header: str | None       # the header line, verbatim (None for the top level)
    entries: list[Entry] = field(default_factory=list)
    tail: list[str] = field(default_factory=list)   # comments right after the last entry
    data: dict = field(default_factory=dict)
    content: object = None   # content_key(data), for matching entries of arrays of tables

    def comments(self, skip: int = 0) -> list[str]:
        """Its comments as written, in order (``skip``: lines of the lead not counted)."""
        out = comment_lines(self.lead[skip:])
        if self.header is not None:
            m = _HEADER.fullmatch(self.header)
            out += [m.group(4).strip()] if m and m.group(4) else []
        for e in self.entries:
            out += comment_lines(e.lead) + e.inner + trail_comment(e.trail)
        return out + comment_lines(self.tail)


@dataclass
class Layout:
    tables: list[Table]     # in file order, the top level first
    end: list[str]           # comment and blank lines at the end of the file
    newline: str


def comment_lines(lines) -> list[str]:
    return [x.strip() for x in lines if x.lstrip().startswith("#")]


def trail_comment(text: str) -> list[str]:
    i = text.find("#")
    return [text[i:].strip()] if i >= 0 and not text[:i].strip() else []


_BARE = re.compile(r"[A-Za-z0-9_-]+")
#: A value on one line that needs no scanning: a string with no escapes, a value with no
#: string or brackets, or a list of such; then spaces and perhaps a comment.
_ONE_LINE = re.compile(r"(\"[^\"\\]*\"|[^\"'#\[\]{}]*?|\[[^\"'#\[\]{}]*\])(\s*(?:#.*)?)")
_HEADER = re.compile(r"\s*(\[\[?)\s*([A-Za-z0-9_-]+)\s*(\]\]?)\s*(#.*)?")


@lru_cache(maxsize=8)
def read_layout(text: str) -> Layout:
    """The tables and entries of a room file's text (kept for the text: the interface writes
    the room on every edit over the same original)."""
    newline = "\r\n" if "\r\n" in text else "\n"
    lines = text.split("\n")
    if lines and lines[-1] == "":
        lines.pop()
    if newline == "\r\n":
        lines = [x[:-1] if x.endswith("\r") else x for x in lines]
    data = tomllib.loads(text)
    root = Table("", [], None, data=data)
    tables, counts = [root], {}
    table, pending = root, []
    i = 0
    while i < len(lines):
        line = lines[i]
        s = line.strip()
        if not s or s.startswith("#"):
            pending.append(line)
            i += 1
            continue
        if s.startswith("["):
            m = _HEADER.fullmatch(line)
            if m is None:
                raise Unsupported(line)
            kind, array = m.group(2), m.group(1) == "[["
            if (m.group(3) == "]]") != array or \
                    kind not in (ARRAY_TABLES if array else SINGLE_TABLES):
                raise Unsupported(line)
            cut = _first_blank(pending) if table.entries or table.header else len(pending)
            table.tail, lead = pending[:cut], pending[cut:]
            if array:
                n = counts.get(kind, 0)
                counts[kind] = n + 1
                tdata = data[kind][n]
            else:
                tdata = data[kind]
            table = Table(kind, lead, line, data=tdata,
                           content=content_key(tdata) if array else None)
            tables.append(table)
            pending = []
            i += 1
            continue
        key, rest_at = _read_key(line)
        if key not in table.data or (table is root and isinstance(data[key], dict)) or \
                (table is root and key in ARRAY_TABLES):
            raise Unsupported(line)
        end_line, trail, inner = _read_value(lines, i, rest_at)
        entry = Entry(key, pending, lines[i:end_line + 1], line[:rest_at], trail, inner,
                       table.data[key])
        table.entries.append(entry)
        pending = []
        i = end_line + 1
    cut = _first_blank(pending)
    table.tail, end = pending[:cut], pending[cut:]
    return Layout(tables, end, newline)


def _first_blank(lines: list[str]) -> int:
    for j, x in enumerate(lines):
        if not x.strip():
            return j
    return len(lines)


def _read_key(line: str) -> tuple[str, int]:
    """The key of a ``key = value`` line and where its value starts."""
    j = len(line) - len(line.lstrip())
    if line[j] in "\"'":
        q = line[j]
        k = j + 1
        while k < len(line) and line[k] != q:
            k += 2 if q == '"' and line[k] == "\\" else 1
        raw = line[j:k + 1]
        key = tomllib.loads(f"x = {raw}")["x"]
        j = k + 1
    else:
        m = _BARE.match(line, j)
        if m is None:
            raise Unsupported(line)
        key, j = m.group(0), m.end()
    while j < len(line) and line[j] in " \t":
        j += 1
    if j >= len(line) or line[j] != "=":
        raise Unsupported(line)       # a dotted key
    j += 1
    while j < len(line) and line[j] in " \t":
        j += 1
    return key, j


def _read_value(lines: list[str], i: int, at: int) -> tuple[int, str, list[str]]:
    """Where the value starting at ``lines[i][at:]`` ends: (its last line, the text after it on
    that line, the comments inside it)."""
    m = _ONE_LINE.fullmatch(lines[i], at)
    if m:
        return i, m.group(2), []
    inner: list[str] = []
    depth, k, n = 0, at, i
    line = lines[n]
    while True:
        if k >= len(line):
            if depth == 0:
                return n, "", inner
            n += 1
            if n >= len(lines):
                raise Unsupported(lines[i])
            line, k = lines[n], 0
            continue
        c = line[k]
        if c == "#":
            if depth == 0:
                return n, line[k:], inner
            inner.append(line[k:].strip())
            k = len(line)
        elif c in "[{":
            depth += 1
            k += 1
        elif c in "]}":
            depth -= 1
            k += 1
        elif c in "\"'":
            n, line, k = _skip_string(lines, n, k)
        elif c in " \t" and depth == 0:
            j = k
            while j < len(line) and line[j] in " \t":
                j += 1
            if j >= len(line) or line[j] == "#":
                return n, line[k:], inner
            k = j
        else:
            k += 1


def _skip_string(lines: list[str], n: int, k: int) -> tuple[int, str, int]:
    """Past the string starting at ``lines[n][k]``: (line index, that line, position after)."""
    line = lines[n]
    q = line[k]
    triple = line.startswith(q * 3, k)
    k += 3 if triple else 1
    while True:
        if k >= len(line):
            if not triple:
                raise Unsupported(line)
            n += 1
            if n >= len(lines):
                raise Unsupported(line)
            line, k = lines[n], 0
            continue
        c = line[k]
        if c == "\\" and q == '"':
            k += 2
        elif c == q and (not triple or line.startswith(q * 3, k)):
            k += 3 if triple else 1
            if triple:                      # up to two more quotes belong to the string
                while k < len(line) and line[k] == q:
                    k += 1
            return n, line, k
        else:
            k += 1


# --------------------------------------------------------------------------- writing


def content_key(d: dict):
    """A hashable stand-in for an entry's content (equal for equal content; an int and a
    float of the same value hash alike)."""
    try:
        k = tuple(d.items())
        hash(k)
        return k
    except TypeError:           # lists or tables among the values
        return frozen(d)


def frozen(x):
    if isinstance(x, bool):
        return x
    if isinstance(x, (int, float)):
        try:
            return float(x)
        except OverflowError:       # a whole number too large for a float, kept as read
            return x
    if isinstance(x, list):
        return tuple(frozen(v) for v in x)
    if isinstance(x, dict):
        return tuple(sorted((k, frozen(v)) for k, v in x.items()))
    return x


def same_data(a, b) -> bool:
    """Equal as TOML data: numbers by value (an int and a float of the same value are the
    same), booleans only to booleans (true is not 1), lists and tables element by element."""
    if isinstance(a, bool) or isinstance(b, bool):
        return type(a) is type(b) and a == b
    if isinstance(a, (int, float)) and isinstance(b, (int, float)):
        return a == b
    if isinstance(a, list):
        return isinstance(b, list) and len(a) == len(b) and all(map(same_data, a, b))
    if isinstance(a, dict):
        return isinstance(b, dict) and a.keys() == b.keys() and \
            all(same_data(v, b[k]) for k, v in a.items())
    return type(a) is type(b) and a == b
