"""A room file with problems, read as far as it goes, to be shown and fixed in the interface.

:func:`read_spec_as_read` refuses only text that cannot be read at all (not UTF-8, not TOML:
roomcalc.io.checks). Everything else becomes a :class:`RoomSpec` that holds what the file says,
problems and all:

- a number outside its range (a negative area, a humidity of 150 %), or not whole where a
  whole number goes, is kept in its field as written (as the interface keeps a value typed out
  of range), and a list of numbers of the wrong length too;
- a value the spec cannot hold (text where a number goes, a face that is not one of the six,
  a table where a list goes) is kept as read in ``as_read`` of its table, its field left as
  the reader leaves it;
- a key the table does not know (a typo) is kept in ``unknown_keys`` of its table;
- an array of tables that is not one (``surfaces = 5``), or [[materials]] with problems, is
  kept whole as read at the top level.

:func:`roomcalc.io.roomfile.write.spec_to_dict` writes all of it back, so checking the spec
(:func:`roomcalc.io.roomfile.check_room`, the same checks and messages as for the file)
reports every problem until it is fixed, and saving writes the user's text back
(:func:`roomcalc.io.roomfile.keep.spec_to_toml_keeping` keeps it where it was). A value kept
as read gives way once its field is edited (:func:`settle_as_read`).
"""

from __future__ import annotations

import copy

from roomcalc.io.checks import read_text_file, read_toml
from roomcalc.io.roomfile.layout import same_data
from roomcalc.io.roomfile.parse import SpecProblems, parse_data, parse_with
from roomcalc.io.roomfile.spec import (AIR_KEYS, CANDIDATE_KEYS, OBJECT_KEYS, RECEIVER_KEYS,
                                       SHAPE_KEYS, SOURCE_KEYS, SURFACE_KEYS, TARGET_KEYS,
                                       TOP_KEYS, RoomSpec)
from roomcalc.io.roomfile.write import spec_fields_dict

__all__ = ["read_spec_as_read", "parse_spec_as_read", "spec_as_read", "settle_as_read",
           "as_read_objects", "KNOWN_KEYS"]

#: The keys each kind of table knows, by the field path of the table ("" for the top level).
KNOWN_KEYS = {"": TOP_KEYS, "air": AIR_KEYS, "shape": SHAPE_KEYS, "target": TARGET_KEYS,
              "surfaces": SURFACE_KEYS, "objects": OBJECT_KEYS, "sources": SOURCE_KEYS,
              "receivers": RECEIVER_KEYS, "candidates": CANDIDATE_KEYS}
_ARRAYS = ("surfaces", "objects", "sources", "receivers", "candidates")


def read_spec_as_read(path) -> RoomSpec:
    """A room file as far as it can be read (see the module's description). Raises
    RoomFileError only for a file that cannot be read or is not TOML."""
    return parse_spec_as_read(read_text_file(path), str(path))


def parse_spec_as_read(text: str, filename: str = "<room>") -> RoomSpec:
    """Room-file text as far as it can be read (RoomFileError only for text that is not
    TOML)."""
    return spec_as_read(read_toml(text, filename), filename)


def spec_as_read(data: dict, filename: str = "<room>") -> RoomSpec:
    """A parsed room document (as tomllib gives it) as a spec that keeps what it cannot hold
    (see the module's description); a document without problems gives the spec
    :func:`roomcalc.io.roomfile.parse_data` gives."""
    try:
        return parse_data(data, filename)
    except SpecProblems:
        pass
    try:
        spec = parse_with(data, filename, keep=True)
    except Exception:   # noqa: BLE001 - a number kept out of range upset a later rule:
        spec = parse_with(data, filename, keep=False)        # keep it as read instead
    _keep_as_read(spec, data)
    return spec


def _keep_as_read(spec: RoomSpec, data: dict) -> None:
    """Put into ``spec`` what ``data`` holds that the spec does not (the diff of the data and
    the spec's own document)."""
    made = spec_fields_dict(spec)
    if "version" not in data:
        spec.version = None             # a required key left out stays left out: reported
        made.pop("version", None)
    materials = data.get("materials")
    if materials is not None and not same_data(made.get("materials"), materials):
        spec.as_read["materials"] = (materials, [])
        spec.materials = []
        made.pop("materials", None)
    for key in ("air", "shape", "target"):
        sub, raw = getattr(spec, key), data.get(key)
        if sub is not None and isinstance(raw, dict):
            _table(sub, raw, made.get(key) or {}, KNOWN_KEYS[key])
            made[key] = raw             # handled: not kept whole below
    for key in _ARRAYS:
        items, raw = getattr(spec, key), data.get(key)
        if isinstance(raw, list) and all(isinstance(x, dict) for x in raw) \
                and len(raw) == len(items):
            for item, entry, mine in zip(items, raw, made.get(key) or [{}] * len(raw)):
                _table(item, entry, mine, KNOWN_KEYS[key])
            made[key] = raw
        elif raw is not None:
            spec.as_read[key] = (raw, [])
            setattr(spec, key, [])
            made[key] = raw
    _table(spec, {k: v for k, v in data.items() if k != "materials"}, made, TOP_KEYS)


def _table(obj, raw: dict, made: dict, known) -> None:
    """Keys of one table as read (``raw``) that its spec object's own table (``made``) does not
    hold as read: unknown ones into ``unknown_keys``, known ones into ``as_read``."""
    for key, value in raw.items():
        if key not in known:
            obj.unknown_keys[key] = value
        elif key not in made or not same_data(made[key], value):
            obj.as_read[key] = (value, _copy(getattr(obj, key, None)))



def _copy(v):
    """The field's value when read, apart from the field (edits change the field in place)."""
    return copy.deepcopy(v)


def as_read_objects(spec: RoomSpec):
    """Every table of the spec that can keep keys as read: (field path, object), the room
    first ("" ), then [air], [shape], [target] and each entry (``surfaces[2]``)."""
    yield "", spec
    yield "air", spec.air
    yield "shape", spec.shape
    if spec.target is not None:
        yield "target", spec.target
    for key in _ARRAYS:
        for i, item in enumerate(getattr(spec, key)):
            yield f"{key}[{i}]", item


def settle_as_read(spec: RoomSpec) -> None:
    """Forget the values kept as read whose field has been edited since (the field's value now
    stands), so that clearing the field later does not bring the old text back. The interface
    calls it after every edit."""
    for _, obj in as_read_objects(spec):
        if obj.as_read:
            obj.as_read = {k: (raw, held) for k, (raw, held) in obj.as_read.items()
                           if getattr(obj, k, None) == held}
