"""The rules of editing a room spec, as plain functions on a :class:`RoomSpec` (no interface).

Every function changes the spec in place, so that a caller with an undo history (the terminal
interface's ``Document.change``) can snapshot it first, and returns what the user should be
told, if anything. The rules:

- :func:`new_item` -- a new row of any table, valid as it stands (:func:`new_candidate`
  for treatments);
- :func:`new_candidate` -- a new treatment row, valid as it stands (a default material of
  its kind, a surface of the room to cover);
- :func:`set_item_fields` -- set a field of a surface, object, source, receiver or candidate,
  clearing the keys that exclude it (typing alpha drops the material; a sound power per band
  drops the dB(A) figures and their spectrum; one dB(A) figure, the sound power or the level
  at 1 m, drops the other; a directivity drops the placement);
- :func:`use_typical_source` -- give a source the level at 1 m, spectrum and placement of a
  typical source (its own band powers where the typical source lacks a band of the room);
- :func:`rename_item` -- rename an item and carry the new name to everything that names it
  (receivers' distances and ``source_hours``, candidates' ``surface``, the target's level
  limits);
- :func:`change_bands` -- add or remove octave bands, extending or shrinking *every* per-band
  list (surfaces' and candidates' alpha, objects' and candidates' absorption, sources' sound
  power, the target's limits given per band, and the levels of a receiver's band limit);
- :func:`convert_units` -- re-express the spec in metric or imperial units;
- :func:`set_method` -- put a formula in force for the whole room (or the recommended one);
- :func:`set_criterion`, :func:`set_own_rt60_limit`, :func:`set_objective` -- what the room
  must reach: a criterion of the library or the room's own RT60 limit, one or the other.
"""

from __future__ import annotations

import math
import re

from roomcalc.engine.bands import DEFAULT_BANDS_HZ
from roomcalc.engine.field import PLACEMENT_Q
from roomcalc.io.catalog import Catalog
from roomcalc.io.limits import RANGES
from roomcalc.io.planning import convert_candidate_units
from roomcalc.io.roomfile import (COVER_KEYS, UNIT_KEYS, WALL_FACES, CandidateSpec, ObjectSpec,
                                  ReceiverSpec, RoomSpec, SourceSpec, SurfaceSpec, TargetSpec)
from roomcalc.io.sources import (TypicalSource, source_band_power, spectrum_names,
                                 spectrum_shape)
from roomcalc.io.units import UNITS
from roomcalc.study.typed import parse_numbers

__all__ = ["COLLECTIONS", "new_item", "add_item", "new_candidate", "set_item_fields", "rename_item",
           "change_bands", "convert_units", "nearest_band_fill", "set_method", "set_criterion",
           "set_objective", "set_own_rt60_limit", "parse_rt60_limit", "use_typical_source"]

#: The spec's lists of items, in the order the interface shows them.
COLLECTIONS = ("surfaces", "objects", "sources", "receivers", "candidates")

#: For each collection, (key set, keys it clears when set to a value).
_EXCLUDES = {
    "surfaces": {"alpha": ("material",)},
    "objects": {"absorption": ("material",)},
    "candidates": {"alpha": ("material",), "absorption": ("material",),
                   "surface": ("walls",), "walls": ("surface",),
                   "panel": ("step",), "step": ("panel",)},
    "sources": {"sound_power": ("sound_power_dba", "level_dba_1m", "spectrum"),
                "sound_power_dba": ("sound_power", "level_dba_1m"),
                "level_dba_1m": ("sound_power", "sound_power_dba"),
                "directivity": ("placement",),
                "placement": ("directivity",)},
}

#: The spectrum a source given in dB(A) takes when it has none yet.
DEFAULT_SPECTRUM = "pink"
#: The catalogue material a new treatment starts with: a porous wall panel when it covers a
#: surface, a bass trap when it is added as units (a material of the wrong kind for the other).
DEFAULT_COVER_MATERIAL = "glass-fibre-board-50mm-fabric"
DEFAULT_UNITS_MATERIAL = "corner-trap-porous-floor-to-ceiling"
#: Most units a new treatment added as units may use (the user changes it).
DEFAULT_UNITS_MAX = 4


#: The word each table's new rows are named with ("Surface 7").
NEW_NAMES = {"surfaces": "Surface", "objects": "Object", "sources": "Source",
             "receivers": "Receiver", "candidates": "Treatment"}
#: Ear height of a seated listener for a new receiver [m] (common practice: about 1.2 m).
EAR_HEIGHT_M = 1.2
#: Distance given to a new receiver from each source when positions cannot be used [m]:
#: a starting value for the user to change, shown in the row.
NEW_DISTANCE_M = 2.0


def new_item(spec: RoomSpec, collection: str) -> object:
    """A new row for one of the tables, valid as it stands in ``spec``, with an unused name
    ("Source 3"): a plastered 1 m^2 surface, one seated person, an 80 dB(A) pink source (at a
    quarter of a box room's length, mid-width, ear height; the next ones beside it), a receiver
    (where every source has
    a position: mid-room at ear height, else 2 m from each source), and a treatment by
    :func:`new_candidate`. Values in the file's units."""
    items = _items(spec, collection)
    names = {getattr(x, "name", "") for x in items}
    n = len(items) + 1
    while f"{NEW_NAMES[collection]} {n}" in names:
        n += 1
    name = f"{NEW_NAMES[collection]} {n}"
    box = spec.shape if spec.shape is not None and spec.shape.is_box else None
    ear = EAR_HEIGHT_M / spec.unit_system.length
    if collection == "surfaces":
        return SurfaceSpec(name=name, area=1.0, material="plaster-on-masonry")
    if collection == "objects":
        return ObjectSpec(name=name, count=1, material="person-seated")
    if collection == "sources":
        # Side by side across the width (the middle, a quarter, three quarters), a step
        # further into the room every third source: two new sources never share a point.
        k = len(items)
        position = None if box is None else [
            round(box.length * (0.25 + 0.125 * (k // 3)) % box.length, 2),
            round(box.width * (0.5, 0.25, 0.75)[k % 3], 2),
            round(min(ear, box.height / 2), 2)]
        return SourceSpec(name=name, sound_power_dba=80.0, spectrum="pink",
                          placement="surface", position=position)
    if collection == "receivers":
        placed = all(src.position is not None for src in spec.sources)
        if box is not None and placed:
            return ReceiverSpec(name=name, position=[
                round(box.length * 0.6, 2), round(box.width / 2, 2),
                round(min(ear, box.height / 2), 2)])
        d = round(NEW_DISTANCE_M / spec.unit_system.length, 1)
        return ReceiverSpec(name=name, distances={src.name: d for src in spec.sources})
    return new_candidate(spec, name)


def add_item(spec: RoomSpec, collection: str, at: int | None = None) -> int:
    """Insert :func:`new_item` at ``at`` (default: the end) and return its index. A new source
    is also given a distance of 2 m from each receiver placed by distances (one without a
    position), so that the room stays valid."""
    items = _items(spec, collection)
    item = new_item(spec, collection)
    at = len(items) if at is None else max(0, min(at, len(items)))
    items.insert(at, item)
    if collection == "sources":
        d = round(NEW_DISTANCE_M / spec.unit_system.length, 1)
        for rec in spec.receivers:
            if rec.position is None or item.position is None:
                rec.distances.setdefault(item.name, d)
    return at


def new_candidate(spec: RoomSpec, name: str) -> CandidateSpec:
    """A new treatment row that is valid as it stands: it covers a surface of the room (the
    first wall no treatment covers yet, else the first wall, else the first surface; a name
    used twice cannot be covered) with
    the default porous wall panel, or, in a room without such a surface, is added as units
    (at most :data:`DEFAULT_UNITS_MAX` bass traps). No cost: the user gives it."""
    names = [s.name for s in spec.surfaces]
    unique = [s for s in spec.surfaces if names.count(s.name) == 1]
    # A wall no treatment covers yet, if there is one (a second row covering the same wall
    # as the first is seldom what was meant), else the first wall, else the first surface.
    covered = {n for c in spec.candidates for n in c.surface_names(spec)}
    walls = [s for s in unique if s.face in WALL_FACES]
    wall = next((s for s in walls if s.name not in covered), None) \
        or next(iter(walls), None) or next(iter(unique), None)
    if wall is not None:
        return CandidateSpec(name=name, surface=wall.name, material=DEFAULT_COVER_MATERIAL)
    return CandidateSpec(name=name, material=DEFAULT_UNITS_MATERIAL,
                         max_count=DEFAULT_UNITS_MAX)


def set_item_fields(spec: RoomSpec, collection: str, index: int, values: dict) -> str:
    """Set fields of one item, clearing the keys that exclude them; returns an undo label.

    A ``name`` in ``values`` renames through :func:`rename_item`, so references follow.
    """
    items = _items(spec, collection)
    item = items[index]
    values = dict(values)
    label = f"{collection[:-1]} '{item.name}': {', '.join(values)}"
    new_name = values.pop("name", None)
    clear: dict = {}
    for key, value in values.items():
        if value is None:
            continue
        for other in _EXCLUDES.get(collection, {}).get(key, ()):
            if other not in values:
                clear[other] = None
    if collection == "sources" and (values.get("sound_power_dba") is not None
                                    or values.get("level_dba_1m") is not None) \
            and item.spectrum is None and "spectrum" not in values:
        clear["spectrum"] = DEFAULT_SPECTRUM
    was_cover = getattr(item, "covers", None)
    for key, value in {**clear, **values}.items():
        setattr(item, key, value)
    if collection == "candidates" and was_cover != item.covers and "material" not in values:
        # Made a cover of a units row or the other way: a default material of the old kind
        # becomes the default of the new one, so the row stays valid.
        # The keys of the old kind go (they would make the row invalid): a cover's area
        # limit, panel and price per area, or the units' count limit and price each.
        for key in (UNIT_KEYS if item.covers else COVER_KEYS):
            if key not in values and key not in ("surface", "walls"):
                setattr(item, key, None)
        swap = {DEFAULT_UNITS_MATERIAL: DEFAULT_COVER_MATERIAL,
                DEFAULT_COVER_MATERIAL: DEFAULT_UNITS_MATERIAL}
        if item.material in swap:
            item.material = swap[item.material]
            if item.material == DEFAULT_UNITS_MATERIAL and item.max_count is None:
                item.max_count = DEFAULT_UNITS_MAX      # a room has four vertical corners
    if new_name is not None and new_name != item.name:
        rename_item(spec, collection, index, new_name)
    return label


def use_typical_source(spec: RoomSpec, index: int, typical: TypicalSource) -> str:
    """Make source ``index`` a typical source: its A-weighted level at 1 m over the room's
    bands (``level_dba_1m``), its shape (``spectrum`` = its id) and where it usually stands
    (``placement``, which drops an own directivity). Where the typical source has no value at
    a band of the room, the source gets its band powers as its own instead (the nearest band
    repeated there, as :func:`change_bands` does). Returns an undo label."""
    bands = spec.bands
    if all(b in typical.levels_1m for b in bands):
        values = {"level_dba_1m": typical.level_dba_1m(bands), "spectrum": typical.id,
                  "placement": typical.placement}
    else:
        have = [b for b in bands if b in typical.levels_1m]
        lw = source_band_power(None, None, typical.level_dba_1m(have), typical.id,
                               PLACEMENT_Q[typical.placement], have)
        values = {"sound_power": nearest_band_fill([round(float(x), 1) for x in lw], have,
                                                   bands),
                  "placement": typical.placement}
    old = spec.sources[index].name
    set_item_fields(spec, "sources", index, values)
    # A row still named as it was added ("Source 2") takes the typical source's name, the
    # part before a comma ("Table saw"), if no other source has it; references follow.
    short = typical.name.split(",")[0].strip()
    if re.fullmatch(rf"{NEW_NAMES['sources']} \d+", old) \
            and short not in {x.name for x in spec.sources}:
        rename_item(spec, "sources", index, short)
    return f"source '{old}': {typical.name}"


def rename_item(spec: RoomSpec, collection: str, index: int, new: str) -> str:
    """Rename an item; whatever names it follows. Returns an undo label."""
    item = _items(spec, collection)[index]
    old = item.name
    item.name = new

    def swap(d: dict) -> dict:
        return {new if k == old else k: v for k, v in d.items()}

    if collection == "sources":
        for r in spec.receivers:
            r.distances = swap(r.distances)
            r.source_hours = swap(r.source_hours)
    elif collection == "surfaces":
        for c in spec.candidates:
            if c.surface == old:
                c.surface = new
            elif isinstance(c.surface, list):
                c.surface = [new if n == old else n for n in c.surface]
    elif collection == "receivers" and spec.target is not None:
        spec.target.max_level_dba = swap(spec.target.max_level_dba)
        spec.target.max_level_db = swap(spec.target.max_level_db)
    return f"rename {collection[:-1]} '{old}'"


def set_method(spec: RoomSpec, method: str | None) -> str:
    """Put a formula in force for the whole room (None: the recommended one). It is a setting
    of the room (top-level ``method``); a ``[target] method`` gives way to it, so the file
    names one formula. Returns an undo label."""
    spec.method = method
    if spec.target is not None:
        spec.target.method = None
    return f"formula: {method or 'recommended'}"


def _target(spec: RoomSpec):
    if spec.target is None:
        spec.target = TargetSpec()
    return spec.target


def set_criterion(spec: RoomSpec, criterion: str | None) -> str:
    """Judge the room by a criterion of the library (None: no RT target). A criterion and the
    room's own RT60 window exclude each other: setting one clears the other."""
    t = _target(spec)
    t.criterion = criterion
    t.rt60_max = t.rt60_min = None
    return f"target: {criterion or 'no RT target'}"


def parse_rt60_limit(text: str, n_bands: int):
    """The room's own RT60 limit as typed: one number (every band) or one per band [s],
    separated by spaces or semicolons (see :func:`roomcalc.study.typed.parse_numbers`; "0,6"
    is 0.6). Raises ValueError saying what is allowed."""
    try:
        vals = parse_numbers(text)
    except ValueError:
        raise ValueError("only numbers, in seconds, separated by spaces or semicolons") from None
    if len(vals) not in (1, n_bands):
        raise ValueError(f"{len(vals)} values: give one (every band) or {n_bands}, one per "
                         "band")
    low, high = RANGES["rt60_limit"].bounds()          # the room file's range
    if not all(low <= v <= high and math.isfinite(v) for v in vals):
        raise ValueError(f"each limit must be from {low:g} to {high:g} s")
    return vals[0] if len(vals) == 1 else vals


def set_own_rt60_limit(spec: RoomSpec, limit) -> str:
    """Judge the room by its own RT60 limit (one number, or a list per band) instead of a
    criterion."""
    t = _target(spec)
    t.criterion = None
    t.rt60_max = limit
    return "target: own RT60 limit"


def set_objective(spec: RoomSpec, objective: str) -> str:
    """What the plan minimises: "cost" or "area"."""
    _target(spec).objective = objective
    return f"target: least {objective}"


def nearest_band_fill(values, old_bands, new_bands) -> list | None:
    """A per-band list for ``new_bands``: kept where the band was there, else the value of the
    nearest old band on a log-frequency scale (shown in the tables, so it can be corrected).
    None stays None."""
    if values is None:
        return None
    by = dict(zip(old_bands, values))
    return [by[b] if b in by else by[_nearest(old_bands, b)] for b in new_bands]


def change_bands(spec: RoomSpec, bands, catalog: Catalog | None = None) -> list[str]:
    """Give the room new octave bands, keeping every per-band list in step.

    Removed bands are dropped from every list; an added band repeats the nearest band's
    value. A catalogue material with no value at an added band is replaced by its own values
    (the nearest band repeated) so the room stays valid; the returned note (one line) names
    those items and materials, so the user can check the values. ``bands`` equal to the default
    bands is stored as
    None (the file then omits ``bands_hz``).
    """
    old = list(spec.bands)
    new = sorted(int(b) for b in bands)
    spec.bands_hz = None if tuple(new) == tuple(DEFAULT_BANDS_HZ) else new
    new = list(spec.bands)
    if new == old:
        return []

    def fix(vals):
        return nearest_band_fill(vals, old, new)

    converted: dict[str, list[str]] = {}        # material id -> items now holding its values
    added = [b for b in new if b not in old]
    for coll in ("surfaces", "objects", "candidates"):
        for i, item in enumerate(getattr(spec, coll)):
            for key in ("alpha", "absorption"):
                if hasattr(item, key):
                    setattr(item, key, fix(getattr(item, key)))
            # The values a material stands for: alpha on a surface or a cover, absorption per
            # unit on an object or a candidate added as units.
            own = "alpha" if coll == "surfaces" or (coll == "candidates" and item.covers) \
                else "absorption"
            mid = _material_to_own(spec, item, own, catalog, new, added)
            if mid:
                converted.setdefault(mid, []).append(f"'{item.name}'")
    for s in spec.sources:
        s.sound_power = fix(s.sound_power)
        shape = _spectrum_to_own(s, old, new, added)
        if shape:
            converted.setdefault(f"spectrum '{shape}'", []).append(f"'{s.name}'")
    t = spec.target
    if t is not None:
        t.rt60_max = _limit_fix(t.rt60_max, old, new)
        t.rt60_min = _limit_fix(t.rt60_min, old, new)
        t.max_level_db = {k: _limit_fix(v, old, new) for k, v in t.max_level_db.items()}
    if not converted:
        return []
    items = [name for names in converted.values() for name in names]
    shown = ", ".join(items[:6]) + (f" and {len(items) - 6} more" if len(items) > 6 else "")
    return [f"{len(items)} item{'s' if len(items) != 1 else ''} ({shown}) used "
            f"catalogue or spectrum data with no value at "
            f"{', '.join(f'{b:g} Hz' for b in added)} ({', '.join(converted)}): "
            "the catalogue's values are now their own, with the nearest band repeated there. "
            "Check them against a test report."]


def _spectrum_to_own(source, old, new, added) -> str | None:
    """A source given in dB(A) whose spectrum shape has no value at an added band gets its
    band powers as its own (the shape's, at the old bands; the nearest band repeated).
    Returns the shape's name when it did."""
    shape = source.spectrum
    if (source.sound_power_dba is None and source.level_dba_1m is None) or not shape \
            or not added or shape not in spectrum_names():
        return None
    table = spectrum_shape(shape)
    if all(b in table for b in added):
        return None
    if source.directivity is None and source.placement not in (None, *PLACEMENT_Q):
        return None             # a placement the room check refuses: left for the user to fix
    q = source.q
    if source.level_dba_1m is not None and not (isinstance(q, float) and q > 0):
        return None
    lw = source_band_power(None, source.sound_power_dba, source.level_dba_1m, shape, q, old)
    source.sound_power = nearest_band_fill([round(float(x), 1) for x in lw], old, new)
    source.sound_power_dba = source.level_dba_1m = source.spectrum = None
    return shape


def _material_to_own(spec, item, key, catalog, new, added) -> str | None:
    """Replace a material that lacks an added band by its own values (nearest band repeated);
    returns the material's id when it did."""
    mid = getattr(item, "material", None)
    if not mid or not added or catalog is None:
        return None
    m = catalog.get(mid) or next((x for x in spec.materials if x.id == mid), None)
    if m is None:
        return None
    lacking = [b for b in added if b not in m.values]
    if not lacking:
        return None
    known = sorted(m.values)
    per = 1.0 if key == "alpha" else spec.unit_system.area   # m^2 per unit in file units
    values = [round((m.values[b] if b in m.values else m.values[_nearest(known, b)]) / per, 4)
              for b in new]
    item.material = None
    setattr(item, key, values)
    if m.occupant and hasattr(item, "occupant") and item.occupant is None:
        item.occupant = True        # still people: it leaves with them when assessed empty
    return mid


def _limit_fix(limit, old, new):
    """A band limit after a band change: one number stays; a list follows the bands; a table
    by band drops the removed bands (it sets none at the added ones)."""
    if limit is None or isinstance(limit, (int, float)):
        return limit
    if isinstance(limit, dict):
        return {b: v for b, v in limit.items() if b in new}
    return nearest_band_fill(limit, old, new)


def _nearest(bands, b):
    return min(bands, key=lambda o: abs(math.log(o / b)))


def convert_units(spec: RoomSpec, to: str) -> None:
    """Re-express every length, area, volume, temperature, absorption and cost per area in
    other units (rounded to 4 decimals, 3 for volumes, 2 for temperatures)."""
    src, dst = UNITS[spec.units], UNITS[to]
    if src.name == dst.name:
        return
    f = src.length / dst.length

    def length(x):
        return None if x is None else round(x * f, 4)

    def area(x):
        return None if x is None else round(x * f * f, 4)

    sh = spec.shape
    sh.length, sh.width, sh.height = length(sh.length), length(sh.width), length(sh.height)
    sh.volume = None if sh.volume is None else round(sh.volume * f ** 3, 3)
    if spec.air.temperature is not None:
        spec.air.temperature = round(dst.temperature_from_c(src.temperature_to_c(
            spec.air.temperature)), 2)
    for s in spec.surfaces:
        s.area = area(s.area)
    for o in spec.objects:
        if o.absorption is not None:
            o.absorption = [area(x) for x in o.absorption]
    for s in spec.sources:
        if s.position is not None:
            s.position = [length(x) for x in s.position]
    for r in spec.receivers:
        if r.position is not None:
            r.position = [length(x) for x in r.position]
        r.distances = {k: length(v) for k, v in r.distances.items()}
    convert_candidate_units(spec, to)       # areas, costs per area, absorption per unit
    spec.units = to


def _items(spec: RoomSpec, collection: str) -> list:
    if collection not in COLLECTIONS:
        raise ValueError(f"collection: {collection!r} is not one of {list(COLLECTIONS)}")
    return getattr(spec, collection)
