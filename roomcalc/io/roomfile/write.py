"""Writing a room spec back: the TOML document, its text (keys in the order of
docs/room-files.md, each list on one line), and atomic saving."""

from __future__ import annotations

import re

import tomli_w

from roomcalc.io.atomic import write_text_atomic
from roomcalc.io.roomfile.spec import CANDIDATE_KEYS, SHAPE_KEYS, RoomSpec


def spec_to_dict(spec: RoomSpec) -> dict:
    """The TOML document of a spec, keys in the order of docs/room-files.md; what a file with
    problems held that the spec cannot (unknown keys, values as read) is written back as it
    was read (:func:`with_as_read`), so that checking the spec reports it."""
    return with_as_read(spec_fields_dict(spec), spec)


def with_as_read(d: dict, obj) -> dict:
    """``d``, the TOML table of a spec object ``obj`` (a room, its [air], a surface, ...), with
    the keys ``obj`` kept as read (:class:`roomcalc.io.roomfile.spec.AsRead`): a value as read
    stands while its field still has the value it was read with; unknown keys follow. The
    tables and entries inside a room get theirs too."""
    if not isinstance(d, dict):
        return d
    for key, (raw, held) in obj.as_read.items():
        if getattr(obj, key, None) == held:
            d[key] = raw
    for key, raw in obj.unknown_keys.items():
        d.setdefault(key, raw)
    if isinstance(obj, RoomSpec):
        for key in ("air", "shape", "target"):
            sub = getattr(obj, key)
            if sub is not None and (sub.as_read or sub.unknown_keys) and key not in obj.as_read:
                d[key] = with_as_read(dict(d.get(key) or {}), sub)
        for key in ("surfaces", "objects", "sources", "receivers", "candidates"):
            items = getattr(obj, key)
            if key in d and isinstance(d[key], list) and len(d[key]) == len(items):
                d[key] = [with_as_read(x, it) if (it.as_read or it.unknown_keys) else x
                          for x, it in zip(d[key], items)]
    return d


def spec_fields_dict(spec: RoomSpec) -> dict:
    """The TOML document of a spec's own fields, without what it keeps as read."""
    d: dict = {"version": spec.version} if spec.version is not None else {}
    if spec.title:
        d["title"] = spec.title
    d["units"] = spec.units
    if spec.bands_hz:
        d["bands_hz"] = list(spec.bands_hz)
    if spec.method is not None:
        d["method"] = spec.method
    air = {k: v for k, v in (("temperature", spec.air.temperature),
                             ("relative_humidity", spec.air.relative_humidity),
                             ("pressure_kpa", spec.air.pressure_kpa)) if v is not None}
    if air:
        d["air"] = air
    shape = {k: getattr(spec.shape, k) for k in SHAPE_KEYS if getattr(spec.shape, k) is not None}
    if shape:                   # none: a room without a shape yet (its check says so)
        d["shape"] = shape
    d["surfaces"] = [_clean({"name": s.name, "area": s.area,
                             "count": _whole(s.count) if s.count != 1 else None, "face": s.face,
                             "material": s.material, "alpha": s.alpha}) for s in spec.surfaces]
    if spec.objects:
        d["objects"] = [_clean({"name": o.name, "count": _whole(o.count),
                                "material": o.material, "absorption": o.absorption,
                                "occupant": o.occupant})
                        for o in spec.objects]
    if spec.sources:
        d["sources"] = [_clean({"name": s.name, "sound_power": s.sound_power,
                                "sound_power_dba": s.sound_power_dba,
                                "level_dba_1m": s.level_dba_1m, "spectrum": s.spectrum,
                                "directivity": s.directivity, "placement": s.placement,
                                "position": s.position}) for s in spec.sources]
    if spec.receivers:
        d["receivers"] = [_clean({"name": r.name, "position": r.position,
                                  "distances": dict(r.distances) or None, "hours": r.hours,
                                  "source_hours": dict(r.source_hours) or None})
                          for r in spec.receivers]
    _planning(spec, d)
    if spec.materials:
        d["materials"] = [_clean({"id": m.id, "name": m.name, "category": m.category,
                                  "kind": m.kind,
                                  "values": {str(k): v for k, v in sorted(m.values.items())},
                                  "source": m.source, "notes": m.notes or None,
                                  "occupant": m.occupant or None, "unoccupied": m.unoccupied})
                          for m in spec.materials]
    return d


def _planning(spec: RoomSpec, d: dict) -> None:
    """[target] and [[candidates]] into the document ``d``."""
    if spec.target is not None:
        t = spec.target
        d["target"] = _clean({
            "method": t.method, "objective": t.objective, "currency": t.currency,
            "criterion": t.criterion, "rt60_max": _limit_out(t.rt60_max),
            "rt60_min": _limit_out(t.rt60_min), "max_level_dba": dict(t.max_level_dba) or None,
            "max_level_db": {k: _limit_out(v) for k, v in t.max_level_db.items()} or None})
    if spec.candidates:
        d["candidates"] = [_candidate_out(c) for c in spec.candidates]


def _candidate_out(c) -> dict:
    d = {k: _limit_out(getattr(c, k)) for k in CANDIDATE_KEYS}
    d["max_count"] = _whole(c.max_count)
    d["applied"] = True if c.applied else None      # false is the default: left out
    return _clean(d)


def _whole(v):
    """A count as a file keeps it: a whole number without a decimal point (28, not 28.0)."""
    if isinstance(v, float) and v.is_integer() and abs(v) < 2.0 ** 53:
        return int(v)
    return v


def _limit_out(v):
    """A value as TOML holds it: a table by band gets text keys; lists are copied."""
    if isinstance(v, dict):
        return {str(k): x for k, x in v.items()}
    return list(v) if isinstance(v, list) else v


def _clean(d: dict) -> dict:
    return {k: v for k, v in d.items() if v is not None}


def spec_to_toml(spec: RoomSpec) -> str:
    """Room-file text of a spec: top-level keys, then [air] and [shape], then one [[table]] per
    surface, object, source and receiver, then [target], one [[table]] per candidate and per
    material, each list of numbers on one line.
    ``tomllib.loads(spec_to_toml(s)) == spec_to_dict(s)`` (a test checks it)."""
    d = spec_to_dict(spec)

    def tables(v) -> bool:          # an array of tables ([[...]]), not a list kept as read
        return isinstance(v, list) and bool(v) and all(isinstance(x, dict) for x in v)
    out = [f"{toml_key(k)} = {toml_value(v)}" for k, v in d.items()
           if not isinstance(v, dict) and not tables(v)]
    for k, v in d.items():
        if isinstance(v, dict):
            out += ["", f"[{toml_key(k)}]"] + [f"{toml_key(a)} = {toml_value(b)}"
                                               for a, b in v.items()]
        elif tables(v):
            for item in v:
                out += ["", f"[[{toml_key(k)}]]"] + [f"{toml_key(a)} = {toml_value(b)}"
                                                     for a, b in item.items()]
    return "\n".join(out) + "\n"


_BARE_KEY = re.compile(r"[A-Za-z0-9_-]+")


def toml_key(k: str) -> str:
    """A key as a room file writes it: bare if it can be, else quoted."""
    return k if _BARE_KEY.fullmatch(k) else toml_value(k)


def toml_value(v) -> str:
    """A value as a room file writes it (a list of numbers on one line; floats by ``repr``,
    the shortest text that reads back to the same float)."""
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, (int, float)):
        return repr(v)
    if isinstance(v, str):
        return tomli_w.dumps({"x": v})[4:].rstrip("\n")
    if isinstance(v, list):
        return "[" + ", ".join(toml_value(x) for x in v) + "]"
    if isinstance(v, dict):
        return "{ " + ", ".join(f"{toml_key(a)} = {toml_value(b)}" for a, b in v.items()) + " }" \
            if v else "{}"
    try:        # a date or time, kept as read from a file with problems
        return tomli_w.dumps({"x": v})[4:].rstrip("\n")
    except TypeError:
        raise TypeError(f"cannot write {type(v).__name__} to a room file") from None


def save_spec(spec: RoomSpec, path) -> None:
    """Write a spec to a room file atomically (temporary file, fsync, rename)."""
    write_text_atomic(path, spec_to_toml(spec))
