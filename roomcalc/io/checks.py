"""Small helpers that check values read from TOML and collect problems with their field paths."""

from __future__ import annotations

import difflib
import math
import re
import tomllib
from pathlib import Path

from roomcalc.io.errors import Problem
from roomcalc.io.limits import guard_size, guard_text

_TOML_POS = re.compile(r"^(?P<msg>.*?)\s*\(at line (?P<line>\d+), column (?P<col>\d+)\)\s*$")
_TOML_END = re.compile(r"^(?P<msg>.*?)\s*\(at end of document\)\s*$")


def toml_files(folders, extra=(), what: str = "file") -> list[Path]:
    """The ``*.toml`` files of ``folders`` (missing folders give none; the top level only, so
    a subfolder such as ``criteria/`` is not read as part of its parent) and of ``extra``
    files or folders given by the user, which must exist."""
    from roomcalc.io.errors import RoomFileError

    def of(folder: Path) -> list[Path]:
        return sorted(folder.glob("*.toml")) if folder.is_dir() else []

    files = [f for folder in folders for f in of(Path(folder))]
    for p in extra:
        p = Path(p)
        if p.is_dir():
            files += of(p)
        elif p.exists():
            files.append(p)
        else:
            raise RoomFileError([Problem(str(p), "", f"{what} not found")])
    return files


def read_text_file(path) -> str:
    """The text of a user's file (room file, catalogue, criteria, a kept recovery file), read
    in one place so that every way in gives the same message: a missing file, a folder, a
    file the user may not read, one larger than :mod:`roomcalc.io.limits` allows or bytes
    that are not UTF-8 become a RoomFileError naming the file ("FILE: cannot read it: it is a
    folder"). The bytes are decoded as they are, line ends included (``read_text`` would turn a
    stray carriage return into a new line)."""
    from roomcalc.io.errors import RoomFileError

    path = Path(path)

    def fail(message: str):
        return RoomFileError([Problem(str(path), "", message)])

    try:
        if path.is_dir():
            raise IsADirectoryError(21, "Is a directory", str(path))
        guard_size(path.stat().st_size, str(path))
        data = path.read_bytes()
    except FileNotFoundError:
        raise fail("no such file") from None
    except IsADirectoryError:
        raise fail("cannot read it: it is a folder") from None
    except PermissionError:
        raise fail("cannot read it: permission denied") from None
    except OSError as exc:
        raise fail(f"cannot read it: {exc.strerror or exc}") from None
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise fail(f"cannot read it: not UTF-8 text (byte 0x{data[exc.start]:02x} at "
                   f"position {exc.start})") from None


def read_toml_file(path) -> dict:
    """Read and parse a TOML data file (catalogue, criteria); an unreadable file, text that is
    not UTF-8 or a syntax error becomes a RoomFileError naming the file."""
    return read_toml(read_text_file(path), str(path))


def read_toml(text: str, filename: str) -> dict:
    """Parse TOML text; a syntax error becomes a RoomFileError naming the line and column, with
    the line itself and a caret under the column (:func:`toml_error`).

    Text larger, or with longer lines, dotted keys or deeper brackets than
    :mod:`roomcalc.io.limits` allows is refused before it is parsed."""
    from roomcalc.io.errors import RoomFileError

    guard_text(text, filename)
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise RoomFileError([toml_error(text, str(exc), filename)]) from None
    except ValueError as exc:  # an integer longer than Python converts (sys.int_info)
        msg = "a number has too many digits to read" if "digits" in str(exc) else str(exc)
        raise RoomFileError([Problem(filename, "", f"not valid TOML: {msg}")]) from None
    except RecursionError:
        raise RoomFileError([Problem(filename, "", "not valid TOML: arrays or tables are "
                                     "nested too deeply")]) from None


#: tomllib's messages for a bracket or a string that is never closed: it names where it
#: noticed (often the end of the file), not where the bracket or string was opened.
_UNCLOSED = ("Unclosed array", "Unclosed inline table", "Unterminated string",
             "Expected \"'\"", "Illegal character '\\n'")
_OPENED = {"[": "the list opened here with '[' is not closed (a ']' is missing)",
           "{": "the inline table opened here with '{' is not closed (a '}' is missing; an "
                "inline table must end on the line it starts)",
           '"': "the text opened here with '\"' is not closed (a '\"' is missing)",
           "'": "the text opened here with \"'\" is not closed (a \"'\" is missing)",
           '"""': "the text opened here with '\"\"\"' is not closed",
           "'''": "the text opened here with \"'''\" is not closed"}
#: A line that starts a table or gives a key: never inside a list, so a list still open there
#: was left open.
_TABLE_OR_KEY = re.compile(r"\s*(\[\[?[A-Za-z0-9_.-]+\]\]?\s*(#.*)?$|[A-Za-z0-9_.-]+\s*=)")
EXCERPT_WIDTH = 72      # characters of the line shown under a TOML error


def toml_error(text: str, message: str, filename: str) -> Problem:
    """The problem of TOML text that cannot be read, from tomllib's ``message``: the file, the
    line and column, what is wrong, and that line with a caret under the column. For a list
    ``[``, an inline table ``{`` or a text (string) that is never closed, the place is where it
    was opened (found by :func:`_unclosed_at`), not where the parser gave up (often the end of
    the file)."""
    m = _TOML_POS.match(message)
    if m:
        msg, line, col = m["msg"], int(m["line"]), int(m["col"])
    elif (m := _TOML_END.match(message)):
        msg, line, col = m["msg"], None, None
    else:
        return Problem(filename, "", f"not valid TOML: {message}")
    lines = text.split("\n")          # as the parser counts lines
    line_start = None if line is None else sum(len(x) + 1 for x in lines[:line - 1])
    opened = _unclosed_at(text, len(text) if line is None else line_start + col - 1)
    if opened is None or not (line is None or msg.startswith(_UNCLOSED)):
        if line is not None and _TABLE_OR_KEY.match(lines[line - 1]):
            # A list left open runs into the next table's header or key, which the parser
            # then finds to be a bad value.
            opened = _unclosed_at(text, line_start)
        else:
            opened = None
    if opened is not None:
        token, line, col = opened
        msg = _OPENED[token]
    elif line is None:                 # the end of the file: its last line that has text
        line = max((i + 1 for i, x in enumerate(lines) if x.strip()), default=1)
        col = len(lines[line - 1].rstrip()) + 1
        msg += " at the end of the file"
    excerpt = _excerpt(lines[line - 1] if line <= len(lines) else "", line, col)
    return Problem(filename, f"line {line}, column {col}", f"not valid TOML: "
                   f"{msg[:1].lower() + msg[1:]}", excerpt)


def _excerpt(line_text: str, line: int, col: int) -> str:
    """``  12 | alpha = [0.1,`` and a caret under column ``col`` (a long line is cut around
    it; tabs are shown as spaces so that the caret stays under its character)."""
    s = line_text.replace("\t", " ").rstrip("\r\n")
    s = "".join(c if c.isprintable() else " " for c in s)
    start = max(0, col - 1 - EXCERPT_WIDTH // 2) if len(s) > EXCERPT_WIDTH else 0
    shown = s[start:start + EXCERPT_WIDTH]
    lead = "..." if start else ""
    tail = "..." if start + EXCERPT_WIDTH < len(s) else ""
    num = f"{line:>5} | "
    return (f"{num}{lead}{shown}{tail}\n" + " " * (len(num) - 2) + "| " +
            " " * (len(lead) + col - 1 - start) + "^")


def _unclosed_at(text: str, stop: int):
    """The innermost list ``[``, inline table ``{`` or text (``"``, ``'``, ``\"\"\"``,
    ``'''``) still open at character ``stop`` of TOML ``text``: (token, line, column), both
    counted from 1, or None. Table headers (``[shape]``, ``[[surfaces]]``), comments and the
    contents of closed texts are skipped."""
    stack: list[tuple[str, int, int]] = []
    i, n, line, line_start = 0, min(stop, len(text)), 1, 0
    at_line_start = True

    def here(k):
        return line, k - line_start + 1

    while i < n:
        c = text[i]
        if c == "\n":
            i += 1
            line, line_start, at_line_start = line + 1, i, True
            continue
        if c in " \t\r":
            i += 1
            continue
        if c == "#":
            j = text.find("\n", i)
            i = n if j < 0 else j
            continue
        if at_line_start and not stack and c == "[":     # a table header: to its line's end
            at_line_start = False
            j = text.find("\n", i)
            i = n if j < 0 else j
            continue
        at_line_start = False
        if c in "\"'":
            triple = text.startswith(c * 3, i)
            token = c * 3 if triple else c
            where = here(i)
            j = i + len(token)
            while True:
                if j >= n:
                    return (token, *where)
                if text.startswith(token, j):
                    break
                if not triple and text[j] == "\n":
                    return (token, *where)
                if c == '"' and text[j] == "\\":
                    j += 1
                if text[j] == "\n":
                    line, line_start = line + 1, j + 1
                j += 1
            i = j + len(token)
            continue
        if c in "[{":
            stack.append((c, *here(i)))
        elif c in "]}" and stack:
            stack.pop()
        i += 1
    return stack[-1] if stack else None


def nearest(word: str, choices, cutoff: float = 0.6) -> str | None:
    """The choice nearest to ``word`` (for "did you mean ...?"), or None if none is close."""
    m = difflib.get_close_matches(word, list(choices), n=1, cutoff=cutoff)
    return m[0] if m else None


def kind_of(v) -> str:
    """What a TOML value is, in the words of a problem ("a number", "text", "a table")."""
    return {bool: "true/false", str: "text", list: "a list", dict: "a table", int: "a number",
            float: "a number"}.get(type(v), type(v).__name__)


class Checker:
    """Collects problems for one file."""

    def __init__(self, filename: str, keep: bool = False):
        self.filename = filename
        self.problems: list[Problem] = []
        #: Keep a number that is outside its range (or not whole where a whole number goes)
        #: instead of dropping it, as the interface keeps a value typed out of range: a file
        #: with problems is opened with its numbers as written (roomcalc.io.roomfile.asread).
        self.keep = keep

    def add(self, where: str, message: str) -> None:
        self.problems.append(Problem(self.filename, where, message))

    def band_table(self, v: dict, path: str, bands, parse, owner: str):
        """A table band -> value, ``{ 500 = ..., 1000 = ... }``: each key one of ``bands``
        (else a problem naming ``owner``'s bands, e.g. "this room"), each value through
        ``parse(x, path)`` (None: it reported a problem). Returns {band: value}, or None when
        anything was wrong (every problem reported)."""
        known = [str(b) for b in bands]
        out, ok = {}, True
        for k, x in v.items():
            if k not in known:
                self.add(f"{path}.{k}", f"'{k}' is not a band of {owner} "
                         f"({', '.join(known)} Hz)")
                ok = False
                continue
            y = parse(x, f"{path}.{k}")
            ok &= y is not None
            out[int(k)] = y
        return out if ok else None

    def name_key(self, key: str, where: str, known, what: str) -> str:
        """A key of ``where`` that names one of ``known`` (a table by source or receiver
        name): an empty or blank key, or one not known, is a problem. Returns the key's field
        path, for the problems of its value."""
        listed = f" ({what}s: {', '.join(known)})" if known else f" (it has no {what}s)"
        if not key.strip():
            path = f'{where}."{key}"'
            self.add(path, f"is an empty name: give the name of a {what} of this room{listed}")
            return path
        path = f"{where}.{key}"
        if key not in known:
            self.add(path, f"'{key}' is not a {what} of this room{listed}")
        return path

    def keys(self, table: dict, where: str, known) -> None:
        """Report keys of a table that are not known, with the nearest known one."""
        for k in table:
            if k not in known:
                near = difflib.get_close_matches(k, list(known), n=1, cutoff=0.5)
                hint = f"; did you mean '{near[0]}'?" if near else \
                    f"; known keys: {', '.join(known)}"
                self.add(_join(where, k), f"unknown key '{k}'{hint}")

    def table(self, parent: dict, key: str, where: str, required=False):
        v = parent.get(key)
        if v is None:
            if required:
                self.add(_join(where, key), "is required (a table)")
            return None
        if not isinstance(v, dict):
            self.add(_join(where, key), f"must be a table, not {kind_of(v)}")
            return None
        return v

    def array_of_tables(self, parent: dict, key: str, where: str = "") -> list:
        v = parent.get(key, [])
        if not isinstance(v, list) or not all(isinstance(x, dict) for x in v):
            self.add(_join(where, key), f"must be an array of tables ([[{key}]])")
            return []
        return v

    def text(self, table: dict, key: str, where: str, required=False, default=None,
             choices=None, nonempty=False):
        """Text at ``table[key]``; ``nonempty``: empty text (or only spaces) is a problem."""
        if key not in table:
            if required:
                self.add(_join(where, key), "is required (text)")
            return default
        v = table[key]
        if not isinstance(v, str):
            self.add(_join(where, key), f"must be text, not {kind_of(v)}")
            return default
        if nonempty and not v.strip():
            self.add(_join(where, key), "is empty: give a value" if required else
                     "is empty: give a value, or leave the key out")
            return default
        if choices is not None and v not in choices:
            near = difflib.get_close_matches(v, list(choices), n=1, cutoff=0.4)
            hint = f" (did you mean '{near[0]}'?)" if near else ""
            self.add(_join(where, key), f"'{v}' is not one of {', '.join(choices)}{hint}")
            return default
        return v

    def number(self, table: dict, key: str, where: str, *, low=None, high=None,
               low_open=False, required=False, default=None, integer=False, unit=""):
        if key not in table:
            if required:
                self.add(_join(where, key), "is required (a number)")
            return default
        return self.value(table[key], _join(where, key), low=low, high=high,
                          low_open=low_open, default=default, integer=integer, unit=unit)

    def value(self, v, where: str, *, low=None, high=None, low_open=False, default=None,
              integer=False, unit=""):
        if integer and isinstance(v, float) and math.isfinite(v):
            self.add(where, f"must be a whole number, not {v!r}")
            return v if self.keep else default
        if isinstance(v, bool) or not isinstance(v, (int, float)) or \
                (integer and not isinstance(v, int)):
            want = "a whole number" if integer else "a number"
            self.add(where, f"must be {want}, not {kind_of(v)}")
            return default
        # tomllib reads integers of any length; one too large for a float is out of every range.
        if isinstance(v, int) and abs(v) > 1e300:
            self.add(where, f"a whole number of {len(str(abs(v)))} digits is far too large")
            return default
        if not math.isfinite(v):
            self.add(where, f"{v} is not a finite number")
            return default
        bad = (low is not None and (v <= low if low_open else v < low)) or \
            (high is not None and v > high)
        if bad:
            self.add(where, f"{_fmt(v)} is outside {_range(low, high, low_open, unit)}")
            return v if self.keep else default
        return v

    def numbers(self, table: dict, key: str, where: str, *, length=None, low=None, high=None,
                low_open=False, required=False, unit="", what="values"):
        if key not in table:
            if required:
                self.add(_join(where, key), "is required (a list of numbers)")
            return None
        v = table[key]
        path = _join(where, key)
        if not isinstance(v, list):
            self.add(path, f"must be a list of numbers, not {kind_of(v)}")
            return None
        if length is not None and len(v) != length:
            self.add(path, f"has {len(v)} {what}; {length} are needed ({unit})" if unit else
                     f"has {len(v)} {what}; {length} are needed")
            return self._kept(v)
        out, ok = [], True
        for i, x in enumerate(v):
            y = self.value(x, f"{path}[{i}]", low=low, high=high, low_open=low_open)
            ok &= y is not None
            out.append(y)
        return [float(x) for x in out] if ok else None

    def _kept(self, v: list):
        """A list of numbers of the wrong length, kept in keep mode (else None)."""
        if self.keep and v and all(isinstance(x, (int, float)) and not isinstance(x, bool)
                                   and math.isfinite(x) and abs(x) <= 1e300 for x in v):
            return [float(x) for x in v]
        return None


def _fmt(v) -> str:
    return f"{v:g}" if isinstance(v, float) else str(v)


def _range(low, high, low_open, unit) -> str:
    u = f" {unit}" if unit else ""
    if low is not None and high is not None:
        if low_open:
            return f"the allowed range: above {_fmt(low)} and up to {_fmt(high)}{u}"
        return f"{_fmt(low)} to {_fmt(high)}{u}"
    if low is not None:
        return f"the allowed range: {'above' if low_open else 'at least'} {_fmt(low)}{u}"
    return f"the allowed range: at most {_fmt(high)}{u}"


_BARE = re.compile(r"[A-Za-z0-9_-]+")


def _join(where: str, key: str) -> str:
    """A field's path as the user would write it: a key that is not bare (empty, spaces, dots)
    is quoted, so that even ``"" = 1`` is named."""
    if not _BARE.fullmatch(key):
        key = '"' + key.replace("\\", "\\\\").replace('"', '\\"') + '"'
    return f"{where}.{key}" if where else key
