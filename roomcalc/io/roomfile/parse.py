"""Reading a room file: TOML data to a checked :class:`RoomSpec`, every problem at once.

The planning tables (``[target]``, ``[[candidates]]``) are read by
:mod:`roomcalc.io.roomfile.parse_target`; materials are looked up when the spec is resolved
(:mod:`roomcalc.io.roomfile.resolve`).
"""

from __future__ import annotations

from roomcalc.engine.bands import ALLOWED_BANDS_HZ, DEFAULT_BANDS_HZ
from roomcalc.engine.field import PLACEMENT_Q
from roomcalc.engine.model import FACES
from roomcalc.io.catalog import parse_entries
from roomcalc.io.checks import Checker, kind_of, read_text_file, read_toml
from roomcalc.io.errors import Problem, RoomFileError
from roomcalc.io.limits import RANGES, limit
from roomcalc.io.roomfile.faces import missing_area
from roomcalc.io.roomfile.parse_target import check_one_method, parse_candidates, parse_target
from roomcalc.io.roomfile.spec import (AIR_KEYS, FORMAT_VERSION, METHODS, OBJECT_KEYS,
                                       RECEIVER_KEYS, SHAPE_KEYS, SOURCE_KEYS, SURFACE_KEYS,
                                       TOP_KEYS, ObjectSpec, ReceiverSpec, RoomSpec, SourceSpec,
                                       SurfaceSpec, band_text)
from roomcalc.io.sources import spectrum_names, spectrum_shape
from roomcalc.io.units import UNITS, Units


class SpecProblems(RoomFileError):
    """The parser's error, with the spec as far as it was read and the ids of the file's own
    [[materials]] entries that have problems (so that resolving can add what the catalogue
    says, and every problem shows at once)."""

    def __init__(self, problems, spec: RoomSpec, inline_ids: set):
        super().__init__(problems)
        self.spec, self.inline_ids = spec, inline_ids


def read_spec(path) -> RoomSpec:
    """Read and check a room file without resolving materials (a file that cannot be read is
    reported by :func:`roomcalc.io.checks.read_text_file`)."""
    return parse_spec(read_text_file(path), str(path))


def parse_spec(text: str, filename: str = "<room>") -> RoomSpec:
    """Check room-file text and build a RoomSpec; every problem is reported at once."""
    return parse_data(read_toml(text, filename), filename)


def parse_data(data: dict, filename: str = "<room>") -> RoomSpec:
    """Check a parsed room document (a dict as tomllib gives it) and build a RoomSpec.

    Raises :class:`SpecProblems` (a RoomFileError) with every problem found.
    """
    chk = Checker(filename)
    spec = _parse(chk, data)
    if chk.problems:
        entries = data.get("materials")
        inline_ids = {e["id"] for e in entries if isinstance(e, dict)
                      and isinstance(e.get("id"), str)} if isinstance(entries, list) else set()
        raise SpecProblems(chk.problems, spec, inline_ids - {m.id for m in spec.materials})
    return spec


def parse_with(data: dict, filename: str = "<room>", keep: bool = False) -> RoomSpec:
    """The spec of a parsed room document as far as it can be read, problems or not (they
    are not reported: :func:`parse_data` reports them); ``keep``: numbers outside their range
    are kept as written (:class:`roomcalc.io.checks.Checker`). For
    :mod:`roomcalc.io.roomfile.asread`."""
    return _parse(Checker(filename, keep=keep), data)


def _parse(chk: Checker, data: dict) -> RoomSpec:
    chk.keys(data, "", TOP_KEYS)
    spec = RoomSpec()
    version = chk.number(data, "version", "", required=True, integer=True)
    if version is not None and version != FORMAT_VERSION:
        chk.add("version", f"{version} is not a version this roomcalc reads (it reads "
                f"{FORMAT_VERSION})")
    spec.title = chk.text(data, "title", "", default="")
    spec.units = chk.text(data, "units", "", default="metric", choices=tuple(UNITS))
    u = UNITS[spec.units]
    spec.bands_hz = _bands(chk, data)
    spec.method = chk.text(data, "method", "", choices=METHODS)
    _air(chk, data, spec, u)
    _shape(chk, data, spec, u)
    _surfaces(chk, data, spec, u)
    _objects(chk, data, spec, u)
    bad_position = _sources(chk, data, spec, u)
    _receivers(chk, data, spec, u, bad_position)
    spec.target = parse_target(chk, data, spec.bands, [r.name for r in spec.receivers])
    check_one_method(chk, spec)
    spec.candidates = parse_candidates(chk, data, spec, u)
    spec.materials = parse_entries(chk.array_of_tables(data, "materials"), chk,
                                   where="materials")
    _positions_inside(chk, spec, u)
    return spec


def _bands(chk: Checker, data: dict) -> list[int] | None:
    if "bands_hz" not in data:
        return None
    b = data["bands_hz"]
    if not isinstance(b, list) or not all(isinstance(x, int) and not isinstance(x, bool)
                                          for x in b):
        chk.add("bands_hz", "must be a list of whole numbers such as [125, 250, 500, 1000, "
                "2000, 4000]")
        return None
    bad = [x for x in b if x not in ALLOWED_BANDS_HZ]
    missing = [x for x in DEFAULT_BANDS_HZ if x not in b]
    if bad:
        chk.add("bands_hz", f"{bad} are not allowed; bands are octaves from "
                f"{', '.join(map(str, ALLOWED_BANDS_HZ))} Hz")
    elif missing:
        chk.add("bands_hz", f"missing {missing}: 125 to 4000 Hz are always computed; "
                "63 and 8000 Hz may be added")
    elif b != sorted(set(b)):
        chk.add("bands_hz", "must list each band once, in rising order")
    else:
        return list(b)
    return None


def _air(chk: Checker, data: dict, spec: RoomSpec, u: Units) -> None:
    air = chk.table(data, "air", "")
    if air is None:
        return
    chk.keys(air, "air", AIR_KEYS)
    for key in ("temperature", "relative_humidity", "pressure_kpa"):
        setattr(spec.air, key, chk.number(air, key, "air", **limit(key, u)))


def _shape(chk: Checker, data: dict, spec: RoomSpec, u: Units) -> None:
    shape = chk.table(data, "shape", "", required=True)
    if shape is None:
        return
    chk.keys(shape, "shape", SHAPE_KEYS)
    for k in ("length", "width", "height"):
        setattr(spec.shape, k, chk.number(shape, k, "shape", **limit("length", u)))
    spec.shape.volume = chk.number(shape, "volume", "shape", **limit("volume", u))
    given = [k for k in ("length", "width", "height") if k in shape]
    if given and len(given) < 3:
        chk.add("shape", "a box needs length, width and height; "
                f"only {', '.join(given)} given")
    elif spec.shape.is_box and "volume" not in shape:
        _box_volume(chk, spec, u)
    if not given and "volume" not in shape:
        chk.add("shape", "give length, width and height (a box) or volume (a free shape)")


def _surfaces(chk: Checker, data: dict, spec: RoomSpec, u: Units) -> None:
    nb, bt = len(spec.bands), band_text(spec.bands)
    for i, s in enumerate(chk.array_of_tables(data, "surfaces")):
        w = f"surfaces[{i}]"
        chk.keys(s, w, SURFACE_KEYS)
        sp = SurfaceSpec(name=chk.text(s, "name", w, default=f"Surface {i + 1}",
                                       nonempty=True))
        sp.area = chk.number(s, "area", w, **limit("area", u))
        sp.count = chk.number(s, "count", w, integer=True, default=1,
                              **limit("surface_count", u))
        sp.face = chk.text(s, "face", w, choices=FACES)
        sp.material = chk.text(s, "material", w, nonempty=True)
        sp.alpha = chk.numbers(s, "alpha", w, length=nb, **limit("alpha", u, unit=bt))
        if "material" in s and "alpha" in s:
            chk.add(w, "give either material or alpha, not both")
        elif "material" not in s and "alpha" not in s:
            chk.add(w, "needs material (a catalogue id) or alpha (a list, " + bt + ")")
        problem = missing_area("area" in s, "face" in s)
        if problem:
            chk.add(f"{w}.area", problem)
        spec.surfaces.append(sp)
    if not data.get("surfaces"):
        chk.add("surfaces", "a room needs at least one [[surfaces]] entry")


def _objects(chk: Checker, data: dict, spec: RoomSpec, u: Units) -> None:
    nb, bt = len(spec.bands), band_text(spec.bands)
    for i, o in enumerate(chk.array_of_tables(data, "objects")):
        w = f"objects[{i}]"
        chk.keys(o, w, OBJECT_KEYS)
        op = ObjectSpec(name=chk.text(o, "name", w, default=f"Object {i + 1}", nonempty=True))
        op.count = float(chk.number(o, "count", w, default=1, **limit("object_count", u)))
        op.material = chk.text(o, "material", w, nonempty=True)
        op.absorption = chk.numbers(o, "absorption", w, length=nb,
                                    **limit("absorption", u, unit=bt))
        if ("material" in o) == ("absorption" in o):
            chk.add(w, "give either material (a catalogue id of kind object) or absorption "
                    f"({u.area_label} per unit, {bt})")
        if "occupant" in o:
            if isinstance(o["occupant"], bool):
                op.occupant = o["occupant"]
            else:
                chk.add(f"{w}.occupant", f"must be true or false, not {kind_of(o['occupant'])}")
        spec.objects.append(op)


def _sources(chk: Checker, data: dict, spec: RoomSpec, u: Units) -> set[str]:
    """The sources; returns the names of those whose position is reported as wrong."""
    bad_position = set()
    bt = band_text(spec.bands)
    for i, s in enumerate(chk.array_of_tables(data, "sources")):
        w = f"sources[{i}]"
        chk.keys(s, w, SOURCE_KEYS)
        sp = SourceSpec(name=chk.text(s, "name", w, default=f"Source {i + 1}", nonempty=True))
        if any(o.name == sp.name for o in spec.sources):
            chk.add(f"{w}.name", f"'{sp.name}' is used by another source; names must differ")
        sp.sound_power = chk.numbers(s, "sound_power", w, length=len(spec.bands),
                                     **limit("sound_power", unit=bt))
        sp.sound_power_dba = chk.number(s, "sound_power_dba", w, **limit("sound_power_dba"))
        sp.level_dba_1m = chk.number(s, "level_dba_1m", w, **limit("level_dba_1m"))
        sp.spectrum = chk.text(s, "spectrum", w, choices=spectrum_names(), nonempty=True)
        _source_power_rules(chk, s, w, sp, spec.bands)
        sp.directivity = chk.number(s, "directivity", w, **limit("directivity"))
        sp.placement = chk.text(s, "placement", w, choices=tuple(PLACEMENT_Q), nonempty=True)
        if "directivity" in s and "placement" in s:
            chk.add(w, "give either directivity (Q) or placement, not both")
        sp.position = _position(chk, s, w, u)
        if "position" in s and sp.position is None:
            bad_position.add(sp.name)
        spec.sources.append(sp)
    return bad_position


def _source_power_rules(chk: Checker, s: dict, w: str, sp: SourceSpec, bands) -> None:
    """One of sound_power, sound_power_dba and level_dba_1m; a spectrum with (only with) one
    of the two dB(A) keys."""
    given = [k for k in ("sound_power", "sound_power_dba", "level_dba_1m") if k in s]
    if len(given) != 1:
        chk.add(w, "give one of sound_power (dB re 1 pW, " + band_text(bands) + "), "
                "sound_power_dba with spectrum, or level_dba_1m (dB(A) at 1 m) with spectrum"
                + (f"; this source gives {' and '.join(given)}" if given else ""))
    dba = next((k for k in ("sound_power_dba", "level_dba_1m") if k in s), None)
    if dba and "spectrum" not in s:
        chk.add(f"{w}.spectrum", f"is required with {dba}; one of " + ", ".join(spectrum_names()))
    if sp.spectrum and dba is None and "sound_power" in s:
        chk.add(f"{w}.spectrum", "only goes with sound_power_dba or level_dba_1m")
    if sp.spectrum and dba:
        missing = [b for b in bands if b not in spectrum_shape(sp.spectrum)]
        if missing:
            chk.add(f"{w}.spectrum", f"'{sp.spectrum}' has no value at "
                    f"{', '.join(map(str, missing))} Hz")


def _receivers(chk: Checker, data: dict, spec: RoomSpec, u: Units, bad_position: set) -> None:
    """The receivers; ``bad_position``: sources whose position is reported already (no second
    problem for them here)."""
    sources = [s.name for s in spec.sources]
    for i, r in enumerate(chk.array_of_tables(data, "receivers")):
        w = f"receivers[{i}]"
        chk.keys(r, w, RECEIVER_KEYS)
        rp = ReceiverSpec(name=chk.text(r, "name", w, default=f"Receiver {i + 1}",
                                        nonempty=True))
        if any(o.name == rp.name for o in spec.receivers):
            chk.add(f"{w}.name", f"'{rp.name}' is used by another receiver; names must differ")
        rp.position = _position(chk, r, w, u)
        d = chk.table(r, "distances", w)
        for k, x in (d or {}).items():
            path = chk.name_key(k, f"{w}.distances", sources, "source")
            y = chk.value(x, path, **limit("distance", u))
            if y is not None:
                rp.distances[k] = float(y)
        given = d if d is not None else {}
        for s in spec.sources:
            if s.name in bad_position or ("position" in r and rp.position is None):
                continue  # the bad position is reported; no second problem for it
            if s.name not in given and (rp.position is None or s.position is None):
                chk.add(w, f"has no distance to source '{s.name}': give distances."
                        f"\"{s.name}\" or positions for both")
        _work_pattern(chk, r, w, rp, sources)
        spec.receivers.append(rp)


def _work_pattern(chk: Checker, r: dict, w: str, rp: ReceiverSpec, sources: list) -> None:
    """A receiver's hours per day, and the hours each source runs while it is there."""
    rp.hours = chk.number(r, "hours", w, **limit("hours"))
    sh = chk.table(r, "source_hours", w)
    if sh is None:
        return
    if "hours" not in r:
        chk.add(f"{w}.source_hours", "needs hours (the hours per day at this position), which "
                "no source's hours may exceed")
    for k, x in sh.items():
        path = chk.name_key(k, f"{w}.source_hours", sources, "source")
        y = chk.value(x, path, **limit("hours"))
        if y is None:
            continue
        if rp.hours is not None and y > rp.hours:
            chk.add(path, f"{y:g} h is more than hours ({rp.hours:g} h): a source runs at most as "
                    "long as the receiver is there")
            continue
        rp.source_hours[k] = float(y)


def _position(chk: Checker, table: dict, where: str, u: Units):
    if "position" not in table:
        return None
    return chk.numbers(table, "position", where, length=3,
                       **limit("position", u, unit=f"x, y, z in {u.length_label}"))


def box_size_problems(length, width, height, units: str = "metric",
                      filename: str = "<new room>") -> list[Problem]:
    """A box size given outside a file (the interface's new-room dialog), checked as the
    file's ``[shape]`` is: each side a number in the range of ``length`` (0.1 to 1000 m; in ft
    for imperial), then the box's volume in the range of ``volume``. The problems name the
    field (``shape.length``, ..., ``shape`` for the volume) with the file's messages; none
    when the size is good."""
    u = UNITS[units]
    chk = Checker(filename)
    spec = RoomSpec(units=units)
    shape = {"length": length, "width": width, "height": height}
    for k in ("length", "width", "height"):
        setattr(spec.shape, k, chk.number(shape, k, "shape", **limit("length", u)))
    if not chk.problems:
        _box_volume(chk, spec, u)
    return chk.problems


def _box_volume(chk: Checker, spec: RoomSpec, u: Units) -> None:
    """A box's volume (length x width x height) lies in the range of volume."""
    v = spec.shape.length * spec.shape.width * spec.shape.height
    lo, hi = RANGES["volume"].bounds(u)
    if not lo <= v <= hi:
        chk.add("shape", f"the box's volume, {v:.6g} {u.volume_label} (length x width x "
                f"height), is outside {lo:g} to {hi:g} {u.volume_label}")


def _positions_inside(chk: Checker, spec: RoomSpec, u: Units) -> None:
    """Positions of sources and receivers lie inside a box room."""
    if not spec.shape.is_box:
        return
    dims = (spec.shape.length, spec.shape.width, spec.shape.height)
    for group, items in (("sources", spec.sources), ("receivers", spec.receivers)):
        for i, it in enumerate(items):
            if it.position is not None and any(
                    not (0.0 <= p <= d) for p, d in zip(it.position, dims)):
                chk.add(f"{group}[{i}].position", f"{it.position} lies outside the box "
                        f"(0 to {dims[0]:g}, 0 to {dims[1]:g}, 0 to {dims[2]:g} "
                        f"{u.length_label})")
