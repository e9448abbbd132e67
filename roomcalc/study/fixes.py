"""Fixing what a room file says outside the fields the interface edits: keys it does not know
(a typo such as ``aera``) and a ``version`` left out. No interface here.

A file with problems is opened as far as it can be read (:mod:`roomcalc.io.roomfile.asread`):
a bad value stays in its field, or as read, and the room's check reports it where it is; the
tables and the room form fix those. An unknown key has no field: :func:`unknown_keys` lists
them with the known key each probably meant, :func:`use_key` reads one as that key and
:func:`remove_key` drops it. Each changes the spec in place and returns an undo label, as the
rules in :mod:`roomcalc.study.edits` do.
"""

from __future__ import annotations

import difflib
from dataclasses import MISSING, dataclass, fields

from roomcalc.io.roomfile import (FORMAT_VERSION, KNOWN_KEYS, RoomSpec, as_read_objects,
                                  spec_as_read, spec_to_dict)

__all__ = ["UnknownKey", "unknown_keys", "use_key", "remove_key", "version_missing",
           "add_version"]


@dataclass(frozen=True)
class UnknownKey:
    """A key of a table that the table does not know."""

    table: str              # the table's field path: "" (top level), "air", "surfaces[3]"
    key: str
    value: object           # as read
    meant: str | None       # the known key it probably meant (None: none is close)

    @property
    def where(self) -> str:
        """The key's field path, as the room's check names it (``surfaces[3].aera``)."""
        return f"{self.table}.{self.key}" if self.table else self.key


def unknown_keys(spec: RoomSpec) -> list[UnknownKey]:
    """Every unknown key of the room, in the order of the file's tables, each with the known
    key it probably meant: the nearest by spelling, as the check's "did you mean" says
    (roomcalc.io.checks.Checker.keys), and only one the table does not give already."""
    out = []
    for table, obj in as_read_objects(spec):
        if not obj.unknown_keys:
            continue
        known = KNOWN_KEYS[table.split("[")[0]]
        given = _given(obj, _table_of(spec_to_dict(spec), table) or {})
        for key, value in obj.unknown_keys.items():
            near = difflib.get_close_matches(key, list(known), n=1, cutoff=0.5)
            meant = near[0] if near and near[0] not in given else None
            out.append(UnknownKey(table, key, value, meant))
    return out


def use_key(spec: RoomSpec, table: str, key: str, meant: str) -> str:
    """Read the unknown ``key`` of ``table`` as the known key ``meant`` (its value as read is
    checked as that key's value from now on, and saved under that name). Raises ValueError
    when the table gives ``meant`` already. Returns an undo label."""
    doc = spec_to_dict(spec)
    t = _table_of(doc, table)
    if t is None or key not in t:
        raise ValueError(f"{table or 'the room'} has no key '{key}'")
    if meant in _given(dict(as_read_objects(spec))[table], t):
        raise ValueError(f"{_named(table)} gives '{meant}' already: remove '{key}' instead, or "
                         f"change '{meant}' first")
    renamed = {(meant if k == key else k): v for k, v in t.items()}
    t.clear()
    t.update(renamed)
    spec.__dict__.update(spec_as_read(doc).__dict__)
    return f"read '{key}' as '{meant}'"


def remove_key(spec: RoomSpec, table: str, key: str) -> str:
    """Drop the unknown ``key`` of ``table`` (it is not saved any more). Returns an undo
    label."""
    obj = dict(as_read_objects(spec)).get(table)
    if obj is None or key not in obj.unknown_keys:
        raise ValueError(f"{table or 'the room'} has no unknown key '{key}'")
    del obj.unknown_keys[key]
    return f"remove unknown key '{key}'"


def version_missing(spec: RoomSpec) -> bool:
    """The file left out ``version`` (required)."""
    return spec.version is None


def add_version(spec: RoomSpec) -> str:
    """Give the room the version of the room files this roomcalc writes."""
    spec.version = FORMAT_VERSION
    return f"add version = {FORMAT_VERSION}"


def _given(obj, t: dict) -> set[str]:
    """The keys of table ``t`` (``obj``'s) that hold a value of the user's: not a default the
    writer puts in by itself (``units = "metric"``, an object's ``count = 1``)."""
    defaults = {f.name: f.default for f in fields(obj) if f.default is not MISSING}
    return {k for k in t if not (k in defaults and getattr(obj, k, None) == defaults[k]
                                 and k not in obj.as_read)}


def _table_of(doc: dict, table: str):
    """The table of a room document at a field path ("", "air", "surfaces[3]"), or None."""
    if not table:
        return doc
    name, _, index = table.partition("[")
    t = doc.get(name)
    if index:
        i = int(index.rstrip("]"))
        t = t[i] if isinstance(t, list) and i < len(t) else None
    return t if isinstance(t, dict) else None


def _named(table: str) -> str:
    return f"[{table}]" if table and "[" not in table else (table or "the room")
