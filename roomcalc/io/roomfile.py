"""Room files, version 1 (TOML): read, check, resolve against the catalogue, write back.

A room file is read into a :class:`RoomSpec`, which keeps what the user wrote (file units,
material ids). :func:`resolve` turns a spec into the engine's SI :class:`~roomcalc.engine.model.Room`.
docs/room-files.md describes every key.

The planning tables (``[target]``, ``[[candidates]]``, and a receiver's working pattern) are read
and checked here with the rest of the file; :mod:`roomcalc.io.planning` turns them into the
planner's SI goals and candidates.
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass, field
from pathlib import Path

import tomli_w

from roomcalc.engine.bands import ALLOWED_BANDS_HZ, DEFAULT_BANDS_HZ
from roomcalc.engine.exposure import MAX_DAY_HOURS
from roomcalc.engine.field import PLACEMENT_Q
from roomcalc.engine.model import FACES, Air, Receiver, Room, RoomObject, Source, Surface
from roomcalc.engine.spectra import SPECTRUM_SHAPES, band_power_from_dba
from roomcalc.io.atomic import write_text_atomic
from roomcalc.io.catalog import ALPHA_MAX, Catalog, Material, parse_entries
from roomcalc.io.checks import Checker, read_toml
from roomcalc.io.criteria import RT60_LIMIT_MAX_S
from roomcalc.io.errors import Problem, RoomFileError
from roomcalc.io.units import UNITS, Units

FORMAT_VERSION = 1
TOP_KEYS = ("version", "title", "units", "bands_hz", "air", "shape", "surfaces", "objects",
            "sources", "receivers", "target", "candidates", "materials")
AIR_KEYS = ("temperature", "relative_humidity", "pressure_kpa")
SHAPE_KEYS = ("length", "width", "height", "volume")
SURFACE_KEYS = ("name", "area", "count", "face", "material", "alpha")
OBJECT_KEYS = ("name", "count", "material", "absorption")
SOURCE_KEYS = ("name", "sound_power", "sound_power_dba", "spectrum", "directivity", "placement",
               "position")
RECEIVER_KEYS = ("name", "position", "distances", "hours", "source_hours")
TARGET_KEYS = ("method", "objective", "currency", "criterion", "rt60_max", "rt60_min",
               "max_level_dba", "max_level_db")
#: Keys of a candidate that covers part of a surface, of one added as units, and of both.
COVER_KEYS = ("surface", "alpha", "max_area", "step", "cost_per_m2", "cost_per_ft2")
UNIT_KEYS = ("absorption", "max_count", "whole", "cost_each", "area_each")
CANDIDATE_KEYS = ("name", "surface", "material", "alpha", "absorption", "max_area", "step",
                  "cost_per_m2", "cost_per_ft2", "max_count", "whole", "cost_each", "area_each")
#: Largest alpha of a cover candidate: the catalogue's largest, as for a surface
#: (roomcalc.engine.planner.ALPHA_MAX; the logarithmic formulas cap alpha at 0.99).
CANDIDATE_ALPHA_MAX = ALPHA_MAX
#: The key of a cover candidate's cost per unit area, by the file's units.
AREA_COST_KEY = {"metric": "cost_per_m2", "imperial": "cost_per_ft2"}
DEFAULT_PLACEMENT = "surface"
#: The planner's formulas and objectives (roomcalc.engine.planner.PLAN_METHODS and OBJECTIVES,
#: repeated so that reading a room file never loads the solver; a test keeps them equal).
PLAN_METHODS = ("sabine", "eyring", "millington", "fitzroy", "arau_puchades")
OBJECTIVES = ("cost", "area")
DEFAULT_PLAN_METHOD = "eyring"
DEFAULT_OBJECTIVE = "cost"
#: Largest level accepted as a limit at a receiver [dB], as for sound power.
LEVEL_LIMIT_MAX_DB = 200.0


@dataclass
class AirSpec:
    temperature: float | None = None        # file units (degC or degF); None = default
    relative_humidity: float | None = None  # %
    pressure_kpa: float | None = None


@dataclass
class ShapeSpec:
    length: float | None = None
    width: float | None = None
    height: float | None = None
    volume: float | None = None

    @property
    def is_box(self) -> bool:
        return None not in (self.length, self.width, self.height)


@dataclass
class SurfaceSpec:
    name: str
    material: str | None = None
    alpha: list[float] | None = None
    area: float | None = None
    count: int = 1
    face: str | None = None


@dataclass
class ObjectSpec:
    name: str
    count: float = 1
    material: str | None = None
    absorption: list[float] | None = None


@dataclass
class SourceSpec:
    name: str
    sound_power: list[float] | None = None
    sound_power_dba: float | None = None
    spectrum: str | None = None
    directivity: float | None = None
    placement: str | None = None
    position: list[float] | None = None

    @property
    def q(self) -> float:
        if self.directivity is not None:
            return float(self.directivity)
        return PLACEMENT_Q[self.placement or DEFAULT_PLACEMENT]


@dataclass
class ReceiverSpec:
    name: str
    position: list[float] | None = None
    distances: dict[str, float] = field(default_factory=dict)
    hours: float | None = None              # working pattern: hours per day here; None = none
    source_hours: dict[str, float] = field(default_factory=dict)  # hours each source runs


#: A limit per band as written: one number (every band), a list (one per band) or a table
#: band [Hz] -> value (only the bands it names).
BandLimit = float | list[float] | dict[int, float]


@dataclass
class TargetSpec:
    """The [target] table as written. None = not given (the defaults apply)."""

    method: str | None = None
    objective: str | None = None
    currency: str | None = None
    criterion: str | None = None
    rt60_max: BandLimit | None = None       # s
    rt60_min: BandLimit | None = None       # s
    max_level_dba: dict[str, float] = field(default_factory=dict)      # receiver -> dB(A)
    max_level_db: dict[str, BandLimit] = field(default_factory=dict)   # receiver -> dB per band

    @property
    def plan_method(self) -> str:
        return self.method or DEFAULT_PLAN_METHOD

    @property
    def plan_objective(self) -> str:
        return self.objective or DEFAULT_OBJECTIVE


@dataclass
class CandidateSpec:
    """One [[candidates]] entry as written (file units). With ``surface`` it covers part of that
    surface; without, it is added as units."""

    name: str
    surface: str | None = None
    material: str | None = None
    alpha: list[float] | None = None        # cover
    absorption: list[float] | None = None   # units: area per unit per band (m^2 or ft^2)
    max_area: float | None = None           # cover, m^2 or ft^2; None = the whole surface
    step: float | None = None               # cover, m^2 or ft^2 per panel
    cost_per_m2: float | None = None        # cover, metric files
    cost_per_ft2: float | None = None       # cover, imperial files
    max_count: float | None = None          # units; None = no limit
    whole: bool | None = None               # units; None = whole units
    cost_each: float | None = None          # units
    area_each: float | None = None          # units, m^2 or ft^2 each

    @property
    def covers(self) -> bool:
        return self.surface is not None

    @property
    def area_cost(self) -> float | None:
        """The cost per unit area of the file's units, whichever key holds it."""
        return self.cost_per_m2 if self.cost_per_m2 is not None else self.cost_per_ft2


@dataclass
class RoomSpec:
    """A room as written in its file (file units, material ids)."""

    title: str = ""
    units: str = "metric"
    bands_hz: list[int] | None = None
    air: AirSpec = field(default_factory=AirSpec)
    shape: ShapeSpec = field(default_factory=ShapeSpec)
    surfaces: list[SurfaceSpec] = field(default_factory=list)
    objects: list[ObjectSpec] = field(default_factory=list)
    sources: list[SourceSpec] = field(default_factory=list)
    receivers: list[ReceiverSpec] = field(default_factory=list)
    materials: list[Material] = field(default_factory=list)
    version: int = FORMAT_VERSION
    target: TargetSpec | None = None
    candidates: list[CandidateSpec] = field(default_factory=list)

    @property
    def bands(self) -> tuple[int, ...]:
        return tuple(self.bands_hz) if self.bands_hz else DEFAULT_BANDS_HZ

    @property
    def unit_system(self) -> Units:
        return UNITS[self.units]


# ----------------------------------------------------------------------------- reading

def read_room(path, catalog: Catalog, criteria=None) -> tuple[RoomSpec, Room]:
    """Read, check and resolve a room file. Raises RoomFileError with every problem found.

    ``criteria`` (id -> Criterion) is what ``[target] criterion`` may name; None: the shipped
    criteria library, read only when a file names a criterion.
    """
    try:
        spec = read_spec(path)
    except _SpecProblems as exc:  # add what the catalogue says, so every problem shows at once
        more = _material_problems(exc.spec, exc.inline_ids, catalog, str(path), criteria)
        raise RoomFileError(list(exc.problems) + more) from None
    return spec, resolve(spec, catalog, str(path), criteria)


class _SpecProblems(RoomFileError):
    """parse_spec's error, with the spec as far as it was read (for read_room)."""

    def __init__(self, problems, spec: "RoomSpec", inline_ids: set):
        super().__init__(problems)
        self.spec, self.inline_ids = spec, inline_ids


def _material_problems(spec: "RoomSpec", inline_ids: set, catalog: Catalog,
                       filename: str, criteria=None) -> list[Problem]:
    """Unknown materials, wrong kinds and missing bands of a spec that has other problems,
    and an unknown criterion.

    Ids of the file's own [[materials]] entries are skipped: those entries have problems of
    their own, already reported.
    """
    merged = dict(catalog.materials)
    merged.update({m.id: m for m in spec.materials if m.id not in merged})
    cat, chk = Catalog(merged), Checker(filename)
    for group, items, kind in (("surfaces", spec.surfaces, "surface"),
                               ("objects", spec.objects, "object")):
        for i, it in enumerate(items):
            if it.material and it.material not in inline_ids:
                _lookup(cat, chk, it.material, f"{group}[{i}]", kind, spec.bands)
    for i, c in enumerate(spec.candidates):
        if c.material and c.material not in inline_ids:
            candidate_material(cat, chk, c, i, spec.bands)
    if spec.target is not None and spec.target.criterion is not None:
        check_criterion_id(spec.target.criterion, chk, criteria)
    return chk.problems


def candidate_material(cat: Catalog, chk: Checker, c: "CandidateSpec", i: int, bands):
    """The values of candidate i's material at the bands (alpha, or m^2 per unit), or None
    after reporting to chk why not."""
    kind = "surface" if c.covers else "object"
    need = ("a candidate that covers a surface needs kind surface" if c.covers else
            "a candidate added as units (without surface) needs kind object")
    return _lookup(cat, chk, c.material, f"candidates[{i}]", kind, bands, need=need)


def check_criterion_id(cid: str, chk: Checker, criteria=None) -> bool:
    """Whether the criteria library (None: the shipped one) has ``cid``; if not, report
    ``target.criterion`` to chk with the nearest and the known ids."""
    known = criteria if criteria is not None else shipped_criteria()
    if cid not in known:
        near = _near(cid, list(known))
        chk.add("target.criterion", f"unknown criterion '{cid}'"
                + (f"; did you mean '{near}'?" if near else "")
                + f" (known: {', '.join(known) or 'none'})")
        return False
    return True


def shipped_criteria() -> dict:
    """The shipped criteria library (roomcalc.io.criteria.load_criteria()), id -> Criterion.

    Read once (the shipped files do not change while roomcalc runs, and the interface checks
    the room after every edit); each call returns a new dict of the same criteria.
    """
    return dict(_shipped_criteria())


@functools.lru_cache(maxsize=1)
def _shipped_criteria() -> dict:
    from roomcalc.io.criteria import load_criteria

    return load_criteria()


def read_spec(path) -> RoomSpec:
    """Read and check a room file without resolving materials."""
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise RoomFileError([Problem(str(path), "", "no such file")]) from None
    except (OSError, UnicodeDecodeError) as exc:
        reason = getattr(exc, "strerror", None) or str(exc)
        raise RoomFileError([Problem(str(path), "", f"cannot be read: {reason}")]) from None
    return parse_spec(text, str(path))


def parse_spec(text: str, filename: str = "<room>") -> RoomSpec:
    """Check room-file text and build a RoomSpec; every problem is reported at once."""
    return parse_data(read_toml(text, filename), filename)


def check_room(spec: "RoomSpec", catalog: Catalog, filename: str = "<room>",
               criteria=None) -> Room:
    """Check a spec as if it had been written and read back, then resolve it.

    The interface uses this after every edit: the same checks and messages as for a file,
    without writing one. ``criteria`` as for :func:`read_room`. Raises RoomFileError with
    every problem.
    """
    try:
        checked = parse_data(spec_to_dict(spec), filename)
    except _SpecProblems as exc:
        more = _material_problems(exc.spec, exc.inline_ids, catalog, filename, criteria)
        raise RoomFileError(list(exc.problems) + more) from None
    return resolve(checked, catalog, filename, criteria)


def parse_data(data: dict, filename: str = "<room>") -> RoomSpec:
    """Check a parsed room document (a dict as tomllib gives it) and build a RoomSpec."""
    chk = Checker(filename)
    chk.keys(data, "", TOP_KEYS)
    spec = RoomSpec()
    version = chk.number(data, "version", "", required=True, integer=True)
    if version is not None and version != FORMAT_VERSION:
        chk.add("version", f"{version} is not a version this roomcalc reads (it reads "
                f"{FORMAT_VERSION})")
    spec.title = chk.text(data, "title", "", default="")
    spec.units = chk.text(data, "units", "", default="metric", choices=tuple(UNITS))
    u = UNITS[spec.units]

    if "bands_hz" in data:
        b = data["bands_hz"]
        if not isinstance(b, list) or not all(isinstance(x, int) and not isinstance(x, bool)
                                              for x in b):
            chk.add("bands_hz", "must be a list of whole numbers such as [125, 250, 500, 1000, "
                    "2000, 4000]")
        else:
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
                spec.bands_hz = list(b)
    nb = len(spec.bands)
    band_text = f"one per band: {', '.join(map(str, spec.bands))} Hz"

    air = chk.table(data, "air", "")
    if air is not None:
        chk.keys(air, "air", AIR_KEYS)
        lo, hi = (-40.0, 60.0) if u.name == "metric" else (-40.0, 140.0)
        spec.air.temperature = chk.number(air, "temperature", "air", low=lo, high=hi,
                                          unit=u.temperature_label)
        spec.air.relative_humidity = chk.number(air, "relative_humidity", "air", low=0.0,
                                                high=100.0, unit="%")
        spec.air.pressure_kpa = chk.number(air, "pressure_kpa", "air", low=50.0, high=120.0,
                                           unit="kPa")

    shape = chk.table(data, "shape", "", required=True)
    if shape is not None:
        chk.keys(shape, "shape", SHAPE_KEYS)
        for k in ("length", "width", "height"):
            setattr(spec.shape, k, chk.number(shape, k, "shape", low=0.0, low_open=True,
                                              high=1000.0 / u.length, unit=u.length_label))
        spec.shape.volume = chk.number(shape, "volume", "shape", low=0.0, low_open=True,
                                       high=1e7 / u.volume, unit=u.volume_label)
        given = [k for k in ("length", "width", "height") if k in shape]
        if given and len(given) < 3:
            chk.add("shape", "a box needs length, width and height; "
                    f"only {', '.join(given)} given")
        if not given and "volume" not in shape:
            chk.add("shape", "give length, width and height (a box) or volume (a free shape)")

    for i, s in enumerate(chk.array_of_tables(data, "surfaces")):
        w = f"surfaces[{i}]"
        chk.keys(s, w, SURFACE_KEYS)
        sp = SurfaceSpec(name=chk.text(s, "name", w, default=f"Surface {i + 1}"))
        sp.area = chk.number(s, "area", w, low=0.0, low_open=True, unit=u.area_label)
        sp.count = chk.number(s, "count", w, low=1, integer=True, default=1)
        sp.face = chk.text(s, "face", w, choices=FACES)
        sp.material = chk.text(s, "material", w)
        sp.alpha = chk.numbers(s, "alpha", w, length=nb, low=0.0, high=ALPHA_MAX,
                               unit=band_text)
        if "material" in s and "alpha" in s:
            chk.add(w, "give either material or alpha, not both")
        elif "material" not in s and "alpha" not in s:
            chk.add(w, "needs material (a catalogue id) or alpha (a list, " + band_text + ")")
        if "area" not in s and "face" not in s:
            chk.add(f"{w}.area", "is required unless face names a box face")
        spec.surfaces.append(sp)
    if not data.get("surfaces"):
        chk.add("surfaces", "a room needs at least one [[surfaces]] entry")

    for i, o in enumerate(chk.array_of_tables(data, "objects")):
        w = f"objects[{i}]"
        chk.keys(o, w, OBJECT_KEYS)
        op = ObjectSpec(name=chk.text(o, "name", w, default=f"Object {i + 1}"))
        op.count = chk.number(o, "count", w, low=0.0, default=1)
        op.material = chk.text(o, "material", w)
        op.absorption = chk.numbers(o, "absorption", w, length=nb, low=0.0,
                                    high=1000.0 / u.area, unit=band_text)
        if ("material" in o) == ("absorption" in o):
            chk.add(w, "give either material (a catalogue id of kind object) or absorption "
                    f"({u.area_label} per unit, {band_text})")
        spec.objects.append(op)

    names = []
    bad_position = set()  # sources whose position is reported already
    for i, s in enumerate(chk.array_of_tables(data, "sources")):
        w = f"sources[{i}]"
        chk.keys(s, w, SOURCE_KEYS)
        sp = SourceSpec(name=chk.text(s, "name", w, default=f"Source {i + 1}"))
        if sp.name in names:
            chk.add(f"{w}.name", f"'{sp.name}' is used by another source; names must differ")
        names.append(sp.name)
        sp.sound_power = chk.numbers(s, "sound_power", w, length=nb, low=0.0, high=200.0,
                                     unit=band_text)
        sp.sound_power_dba = chk.number(s, "sound_power_dba", w, low=0.0, high=200.0,
                                        unit="dB(A)")
        sp.spectrum = chk.text(s, "spectrum", w, choices=tuple(SPECTRUM_SHAPES))
        if ("sound_power" in s) == ("sound_power_dba" in s):
            chk.add(w, "give either sound_power (dB re 1 pW, " + band_text + ") or "
                    "sound_power_dba with spectrum")
        if "sound_power_dba" in s and "spectrum" not in s:
            chk.add(f"{w}.spectrum", "is required with sound_power_dba; one of "
                    + ", ".join(SPECTRUM_SHAPES))
        if sp.spectrum and "sound_power" in s:
            chk.add(f"{w}.spectrum", "only goes with sound_power_dba")
        if sp.spectrum and "sound_power_dba" in s:
            missing = [b for b in spec.bands if b not in SPECTRUM_SHAPES[sp.spectrum]]
            if missing:
                chk.add(f"{w}.spectrum", f"'{sp.spectrum}' has no value at "
                        f"{', '.join(map(str, missing))} Hz")
        sp.directivity = chk.number(s, "directivity", w, low=0.0, low_open=True, high=100.0,
                                    unit="(Q)")
        sp.placement = chk.text(s, "placement", w, choices=tuple(PLACEMENT_Q))
        if "directivity" in s and "placement" in s:
            chk.add(w, "give either directivity (Q) or placement, not both")
        sp.position = _position(chk, s, w)
        if "position" in s and sp.position is None:
            bad_position.add(sp.name)
        spec.sources.append(sp)

    rnames = []
    for i, r in enumerate(chk.array_of_tables(data, "receivers")):
        w = f"receivers[{i}]"
        chk.keys(r, w, RECEIVER_KEYS)
        rp = ReceiverSpec(name=chk.text(r, "name", w, default=f"Receiver {i + 1}"))
        if rp.name in rnames:
            chk.add(f"{w}.name", f"'{rp.name}' is used by another receiver; names must differ")
        rnames.append(rp.name)
        rp.position = _position(chk, r, w)
        d = chk.table(r, "distances", w)
        if d is not None:
            for k, x in d.items():
                if k not in names:
                    chk.add(f"{w}.distances.{k}", f"'{k}' is not a source of this room"
                            + (f" (sources: {', '.join(names)})" if names else ""))
                y = chk.value(x, f"{w}.distances.{k}", low=0.0, low_open=True,
                              high=10000.0, unit=u.length_label)
                if y is not None:
                    rp.distances[k] = float(y)
        given = d if d is not None else {}
        for s in spec.sources:
            if s.name in bad_position or ("position" in r and rp.position is None):
                continue  # the bad position is reported; no second problem for it
            if s.name not in given and (rp.position is None or s.position is None):
                chk.add(w, f"has no distance to source '{s.name}': give distances."
                        f"\"{s.name}\" or positions for both")
        _work_pattern(chk, r, w, rp, names)
        spec.receivers.append(rp)

    spec.target = _target(chk, data, spec.bands, rnames)
    spec.candidates = _candidates(chk, data, spec, u)

    spec.materials = parse_entries(chk.array_of_tables(data, "materials"), chk,
                                   where="materials")
    if spec.shape.is_box:
        dims = (spec.shape.length, spec.shape.width, spec.shape.height)
        for group, items in (("sources", spec.sources), ("receivers", spec.receivers)):
            for i, it in enumerate(items):
                if it.position is not None and any(
                        not (0.0 <= p <= d) for p, d in zip(it.position, dims)):
                    chk.add(f"{group}[{i}].position", f"{it.position} lies outside the box "
                            f"(0 to {dims[0]:g}, 0 to {dims[1]:g}, 0 to {dims[2]:g} "
                            f"{u.length_label})")
    if chk.problems:
        entries = data.get("materials")
        inline_ids = {e["id"] for e in entries if isinstance(e, dict)
                      and isinstance(e.get("id"), str)} if isinstance(entries, list) else set()
        raise _SpecProblems(chk.problems, spec, inline_ids - {m.id for m in spec.materials})
    return spec


def _work_pattern(chk: Checker, r: dict, w: str, rp: ReceiverSpec, sources: list) -> None:
    """A receiver's hours per day, and the hours each source runs while it is there."""
    rp.hours = chk.number(r, "hours", w, low=0.0, high=MAX_DAY_HOURS, unit="h per day")
    sh = chk.table(r, "source_hours", w)
    if sh is None:
        return
    if "hours" not in r:
        chk.add(f"{w}.source_hours", "needs hours (the hours per day at this position), which "
                "no source's hours may exceed")
    for k, x in sh.items():
        path = f"{w}.source_hours.{k}"
        if k not in sources:
            chk.add(path, f"'{k}' is not a source of this room"
                    + (f" (sources: {', '.join(sources)})" if sources else ""))
        y = chk.value(x, path, low=0.0, high=MAX_DAY_HOURS, unit="h per day")
        if y is None:
            continue
        if rp.hours is not None and y > rp.hours:
            chk.add(path, f"{y:g} h is more than hours ({rp.hours:g} h): a source runs at most as "
                    "long as the receiver is there")
            continue
        rp.source_hours[k] = float(y)


def _target(chk: Checker, data: dict, bands, receivers: list) -> TargetSpec | None:
    t = chk.table(data, "target", "")
    if t is None:
        return None
    w = "target"
    chk.keys(t, w, TARGET_KEYS)
    tp = TargetSpec()
    tp.method = chk.text(t, "method", w, choices=PLAN_METHODS)
    tp.objective = chk.text(t, "objective", w, choices=OBJECTIVES)
    tp.currency = chk.text(t, "currency", w)
    tp.criterion = chk.text(t, "criterion", w)
    for key in ("rt60_max", "rt60_min"):
        setattr(tp, key, _band_limit(chk, t, key, w, bands, low=0.0, low_open=True,
                                     high=RT60_LIMIT_MAX_S, unit="s"))
    own = [k for k in ("rt60_max", "rt60_min") if k in t]
    if "criterion" in t and own:
        keys = " and ".join(own)
        chk.add(w, f"give either criterion or {keys}, not both: keep criterion to plan to its "
                f"published window, or keep {keys} (and remove criterion) to plan to your own")
    if tp.rt60_max is not None and tp.rt60_min is not None:
        lo, hi = limit_values(tp.rt60_min, bands), limit_values(tp.rt60_max, bands)
        bad = [(b, x, y) for b, x, y in zip(bands, lo, hi) if x > y]
        if bad and not isinstance(tp.rt60_min, (list, dict)) and \
                not isinstance(tp.rt60_max, (list, dict)):
            chk.add(f"{w}.rt60_min", f"{bad[0][1]:g} s is above rt60_max ({bad[0][2]:g} s); "
                    "the window would be empty")
        else:
            for b, x, y in bad:
                chk.add(f"{w}.rt60_min", f"{x:g} s at {b} Hz is above rt60_max ({y:g} s); the "
                        "window would be empty")
    rlist = f" (receivers: {', '.join(receivers)})" if receivers else " (it has none)"
    for key, unit in (("max_level_dba", "dB(A)"), ("max_level_db", "dB")):
        levels = chk.table(t, key, w)
        for k, x in (levels or {}).items():
            path = f"{w}.{key}.{k}"
            if k not in receivers:
                chk.add(path, f"'{k}' is not a receiver of this room{rlist}")
            if key == "max_level_dba":
                y = chk.value(x, path, low=0.0, high=LEVEL_LIMIT_MAX_DB, unit=unit)
                y = None if y is None else float(y)
            else:
                y = _band_limit(chk, levels, k, f"{w}.{key}", bands, low=0.0,
                                high=LEVEL_LIMIT_MAX_DB, unit=unit)
            if y is not None:
                getattr(tp, key)[k] = y
    return tp


def _band_limit(chk: Checker, table: dict, key: str, where: str, bands, *, low, high,
                unit, low_open=False) -> BandLimit | None:
    """A limit per band: one number (every band), a list (one per band) or a table by band."""
    if key not in table:
        return None
    v, path = table[key], f"{where}.{key}"
    band_text = f"one per band: {', '.join(map(str, bands))} Hz"

    def one(x, p):
        y = chk.value(x, p, low=low, high=high, low_open=low_open, unit=unit)
        return None if y is None else float(y)

    if isinstance(v, list):
        if len(v) != len(bands):
            chk.add(path, f"has {len(v)} values; {len(bands)} are needed ({band_text})")
            return None
        out = [one(x, f"{path}[{i}]") for i, x in enumerate(v)]
        return None if None in out else out
    if isinstance(v, dict):
        if not v:
            chk.add(path, "is an empty table: a table limits the bands it names, e.g. "
                    "{ 500 = ..., 1000 = ... }; give at least one")
            return None
        known = [str(b) for b in bands]
        out, ok = {}, True
        for k, x in v.items():
            if k not in known:
                chk.add(f"{path}.{k}", f"'{k}' is not a band of this room ({', '.join(known)} Hz)")
                ok = False
                continue
            y = one(x, f"{path}.{k}")
            ok &= y is not None
            out[int(k)] = y
        return out if ok else None
    if isinstance(v, (int, float)) and not isinstance(v, bool):
        return one(v, path)
    chk.add(path, f"must be a number (every band), a list ({band_text}) or a table by band "
            f"such as {{ 500 = ..., 1000 = ... }} (only those bands), not {_kind(v)}")
    return None


def limit_values(limit: BandLimit | None, bands) -> list[float]:
    """A band limit as one value per band, NaN where it sets none (None: NaN everywhere)."""
    if limit is None:
        return [math.nan] * len(bands)
    if isinstance(limit, dict):
        return [float(limit[b]) if b in limit else math.nan for b in bands]
    if isinstance(limit, list):
        return [float(x) for x in limit]
    return [float(limit)] * len(bands)


def _candidates(chk: Checker, data: dict, spec: RoomSpec, u: Units) -> list[CandidateSpec]:
    out: list[CandidateSpec] = []
    nb = len(spec.bands)
    band_text = f"one per band: {', '.join(map(str, spec.bands))} Hz"
    surfaces = [s.name for s in spec.surfaces]
    cost_key = AREA_COST_KEY[u.name]
    other_cost = AREA_COST_KEY["imperial" if u.name == "metric" else "metric"]
    for i, c in enumerate(chk.array_of_tables(data, "candidates")):
        w = f"candidates[{i}]"
        chk.keys(c, w, CANDIDATE_KEYS)
        cp = CandidateSpec(name=chk.text(c, "name", w, default=f"Candidate {i + 1}"))
        if any(o.name == cp.name for o in out):
            chk.add(f"{w}.name", f"'{cp.name}' is used by another candidate; names must differ")
        cp.material = chk.text(c, "material", w)
        if "surface" in c:
            cp.surface = chk.text(c, "surface", w)
            if cp.surface is not None:
                hits = [f"surfaces[{j}]" for j, n in enumerate(surfaces) if n == cp.surface]
                if not hits:
                    near = _near(cp.surface, surfaces)
                    chk.add(f"{w}.surface", f"'{cp.surface}' is not a surface of this room"
                            + (f"; did you mean '{near}'?" if near else "")
                            + f" (surfaces: {', '.join(surfaces) or 'none'})")
                elif len(hits) > 1:
                    chk.add(f"{w}.surface", f"'{cp.surface}' names {len(hits)} surfaces "
                            f"({', '.join(hits)}); give them different names so that one can "
                            "be treated")
            for k in UNIT_KEYS:
                if k in c:
                    chk.add(f"{w}.{k}", "only goes with a candidate added as units (one "
                            "without surface); this one covers a surface")
            cp.alpha = chk.numbers(c, "alpha", w, length=nb, low=0.0, high=CANDIDATE_ALPHA_MAX,
                                   unit=band_text)
            if ("material" in c) == ("alpha" in c):
                chk.add(w, "give either material (a catalogue id of kind surface) or alpha ("
                        + band_text + ") for the covered part")
            cp.max_area = chk.number(c, "max_area", w, low=0.0, unit=u.area_label)
            cp.step = chk.number(c, "step", w, low=0.0, low_open=True, unit=u.area_label)
            if other_cost in c:
                chk.add(f"{w}.{other_cost}", f"a{'n' if u.name == 'imperial' else ''} "
                        f"{u.name} file gives areas in {u.area_label}, so the cost per "
                        f"{u.area_label}: use {cost_key}")
            setattr(cp, cost_key, chk.number(c, cost_key, w, low=0.0,
                                             unit=f"per {u.area_label}"))
        else:
            for k in COVER_KEYS:
                if k in c:
                    chk.add(f"{w}.{k}", "only goes with a candidate that covers a surface: "
                            "give surface (one of " + (", ".join(surfaces) or "none")
                            + "), or leave it out to add the candidate as units")
            cp.absorption = chk.numbers(c, "absorption", w, length=nb, low=0.0,
                                        high=1000.0 / u.area, unit=band_text)
            if ("material" in c) == ("absorption" in c) and "alpha" not in c:
                chk.add(w, "give either material (a catalogue id of kind object) or absorption "
                        f"({u.area_label} per unit, {band_text}); or surface, to cover part "
                        "of a surface")
            if "whole" in c:
                if isinstance(c["whole"], bool):
                    cp.whole = c["whole"]
                else:
                    chk.add(f"{w}.whole", f"must be true or false, not {_kind(c['whole'])}")
            cp.max_count = chk.number(c, "max_count", w, low=0.0, unit="units")
            if cp.max_count is not None and cp.whole is not False and \
                    not float(cp.max_count).is_integer():       # 40 or 40.0, not 2.5
                chk.add(f"{w}.max_count", f"must be a whole number for whole units, not "
                        f"{cp.max_count!r} (or set whole = false)")
                cp.max_count = None
            cp.cost_each = chk.number(c, "cost_each", w, low=0.0, unit="per unit")
            cp.area_each = chk.number(c, "area_each", w, low=0.0, low_open=True,
                                      unit=u.area_label)
        out.append(cp)
    return out


def _kind(v) -> str:
    return {bool: "true/false", str: "text", list: "a list", dict: "a table", int: "a number",
            float: "a number"}.get(type(v), type(v).__name__)


def _position(chk: Checker, table: dict, where: str):
    if "position" not in table:
        return None
    p = chk.numbers(table, "position", where, length=3, unit="x, y, z")
    return p


# ----------------------------------------------------------------------------- resolving

def resolve(spec: RoomSpec, catalog: Catalog, filename: str = "<room>", criteria=None) -> Room:
    """Turn a RoomSpec into the engine's SI Room, looking materials up in the catalogue.

    Raises RoomFileError naming every unknown material, wrong kind, missing band or face area,
    and an unknown ``[target] criterion`` (``criteria`` as for :func:`read_room`). The
    candidates' materials are checked too; :mod:`roomcalc.io.planning` resolves them.
    """
    chk = Checker(filename)
    cat = room_catalog(spec, catalog, chk)
    u = spec.unit_system
    bands = spec.bands
    dims = None
    if spec.shape.is_box:
        dims = tuple(float(x) * u.length for x in (spec.shape.length, spec.shape.width,
                                                   spec.shape.height))
    volume = float(spec.shape.volume) * u.volume if spec.shape.volume is not None else \
        (math.prod(dims) if dims else None)
    if volume is None:
        chk.add("shape", "give length, width and height (a box) or volume (a free shape)")

    def lookup(mid, where, kind):
        return _lookup(cat, chk, mid, where, kind, bands)

    face_area = {}
    if dims:
        L, W, H = dims
        face_area = {"floor": L * W, "ceiling": L * W, "front": W * H, "back": W * H,
                     "left": L * H, "right": L * H}
    surfaces = []
    for i, s in enumerate(spec.surfaces):
        w = f"surfaces[{i}]"
        alpha = lookup(s.material, w, "surface") if s.material else s.alpha
        area = float(s.area) * u.area if s.area is not None else None
        if area is None:
            if s.face is None:
                chk.add(f"{w}.area", "is required unless face names a box face")
                continue
            if not dims:
                chk.add(f"{w}.area", f"is required: face '{s.face}' has no size because the "
                        "shape is a volume, not a box")
                continue
            sharing = [o for o in spec.surfaces if o is not s and o.face == s.face]
            if any(o.area is None for o in sharing):
                chk.add(f"{w}.area", f"is required: another surface on face '{s.face}' has "
                        "no area either")
                continue
            taken = sum(float(o.area) * u.area * o.count for o in sharing)
            area = (face_area[s.face] - taken) / s.count
            if area <= 0:
                chk.add(f"{w}.area", f"the other surfaces on face '{s.face}' take "
                        f"{taken / u.area:.2f} {u.area_label} of its "
                        f"{face_area[s.face] / u.area:.2f}; nothing is left for this one")
                continue
        if alpha is not None:
            surfaces.append(Surface(s.name, area, alpha, int(s.count), s.face, s.material))
    for i, c in enumerate(spec.candidates):
        if c.material:
            candidate_material(cat, chk, c, i, bands)
    if spec.target is not None and spec.target.criterion is not None:
        check_criterion_id(spec.target.criterion, chk, criteria)
    objects = []
    for i, o in enumerate(spec.objects):
        w = f"objects[{i}]"
        if o.material:
            a = lookup(o.material, w, "object")
        else:
            a = [x * u.area for x in o.absorption] if o.absorption is not None else None
        if a is not None:
            objects.append(RoomObject(o.name, a, float(o.count), o.material))
    sources = []
    for s in spec.sources:
        if s.sound_power is not None:
            lw = s.sound_power
        else:
            lw = band_power_from_dba(s.sound_power_dba, s.spectrum, bands)
        pos = tuple(x * u.length for x in s.position) if s.position else None
        sources.append(Source(s.name, lw, s.q, pos))
    receivers = []
    for i, r in enumerate(spec.receivers):
        pos = tuple(x * u.length for x in r.position) if r.position else None
        receivers.append(Receiver(r.name, pos, {k: v * u.length for k, v in r.distances.items()}))
        for s in sources:  # the engine needs a distance above 0 (its own norm, in SI)
            if s.name not in r.distances and pos is not None and s.position is not None and \
                    not math.dist(pos, s.position) > 0:
                chk.add(f"receivers[{i}].position", f"{r.position} is where source "
                        f"'{s.name}' is; a receiver must be some distance from each source")
    if chk.problems:
        raise RoomFileError(chk.problems)
    a = spec.air
    air = Air(temperature_c=u.temperature_to_c(a.temperature) if a.temperature is not None
              else 20.0,
              relative_humidity=a.relative_humidity if a.relative_humidity is not None else 50.0,
              pressure_kpa=a.pressure_kpa if a.pressure_kpa is not None else 101.325)
    return Room(bands_hz=bands, volume=volume, surfaces=tuple(surfaces), dimensions=dims,
                air=air, objects=tuple(objects), sources=tuple(sources),
                receivers=tuple(receivers), title=spec.title)


def room_catalog(spec: RoomSpec, catalog: Catalog, chk: Checker) -> Catalog:
    """The catalogue with the room's own [[materials]]; a duplicate id is reported to chk."""
    fresh: list[Material] = []
    for i, m in enumerate(spec.materials):  # a duplicate id is reported with the rest
        if m.id in catalog or any(f.id == m.id for f in fresh):
            other = catalog[m.id].file if m.id in catalog else "this file"
            chk.add(f"materials[{i}].id", f"'{m.id}' is already defined in {other}")
        else:
            fresh.append(m)
    return catalog.with_materials(fresh) if fresh else catalog


def _lookup(cat: Catalog, chk: Checker, mid: str, where: str, kind: str, bands,
            need: str | None = None):
    """A material's values at the bands, or None after reporting why not. ``need`` says who
    needs which kind (default: surfaces need kind surface, objects kind object)."""
    m = cat.get(mid)
    if m is None:
        near = _near(mid, cat.ids(kind))
        chk.add(f"{where}.material", f"unknown material '{mid}'"
                + (f"; did you mean '{near}'?" if near else "")
                + " (search with: roomcalc materials WORDS)")
        return None
    if m.kind != kind:
        need = need or f"{'surfaces' if kind == 'surface' else 'objects'} need kind {kind}"
        chk.add(f"{where}.material", f"'{mid}' is a material of kind {m.kind}; {need}")
        return None
    try:
        return m.values_for(bands)
    except KeyError as exc:
        missing = exc.args[0]
        chk.add(f"{where}.material", f"'{mid}' has no value at {', '.join(map(str, missing))} Hz (it gives "
                f"{m.bands_text}); give the coefficients inline or remove "
                f"{', '.join(map(str, missing))} from bands_hz")
        return None


def _near(word, choices):
    import difflib

    m = difflib.get_close_matches(word, choices, n=1, cutoff=0.6)
    return m[0] if m else None


# ----------------------------------------------------------------------------- writing

def spec_to_dict(spec: RoomSpec) -> dict:
    """The TOML document of a spec, keys in the order of docs/room-files.md."""
    d: dict = {"version": spec.version}
    if spec.title:
        d["title"] = spec.title
    d["units"] = spec.units
    if spec.bands_hz:
        d["bands_hz"] = list(spec.bands_hz)
    air = {k: v for k, v in (("temperature", spec.air.temperature),
                             ("relative_humidity", spec.air.relative_humidity),
                             ("pressure_kpa", spec.air.pressure_kpa)) if v is not None}
    if air:
        d["air"] = air
    d["shape"] = {k: getattr(spec.shape, k) for k in SHAPE_KEYS
                  if getattr(spec.shape, k) is not None}
    d["surfaces"] = [_clean({"name": s.name, "area": s.area,
                             "count": s.count if s.count != 1 else None, "face": s.face,
                             "material": s.material, "alpha": s.alpha}) for s in spec.surfaces]
    if spec.objects:
        d["objects"] = [_clean({"name": o.name, "count": o.count, "material": o.material,
                                "absorption": o.absorption}) for o in spec.objects]
    if spec.sources:
        d["sources"] = [_clean({"name": s.name, "sound_power": s.sound_power,
                                "sound_power_dba": s.sound_power_dba, "spectrum": s.spectrum,
                                "directivity": s.directivity, "placement": s.placement,
                                "position": s.position}) for s in spec.sources]
    if spec.receivers:
        d["receivers"] = [_clean({"name": r.name, "position": r.position,
                                  "distances": dict(r.distances) or None, "hours": r.hours,
                                  "source_hours": dict(r.source_hours) or None})
                          for r in spec.receivers]
    if spec.target is not None:
        t = spec.target
        d["target"] = _clean({
            "method": t.method, "objective": t.objective, "currency": t.currency,
            "criterion": t.criterion, "rt60_max": _limit_out(t.rt60_max),
            "rt60_min": _limit_out(t.rt60_min), "max_level_dba": dict(t.max_level_dba) or None,
            "max_level_db": {k: _limit_out(v) for k, v in t.max_level_db.items()} or None})
    if spec.candidates:
        d["candidates"] = [_clean({k: _limit_out(getattr(c, k)) for k in CANDIDATE_KEYS})
                           for c in spec.candidates]
    if spec.materials:
        d["materials"] = [_clean({"id": m.id, "name": m.name, "category": m.category,
                                  "kind": m.kind,
                                  "values": {str(k): v for k, v in sorted(m.values.items())},
                                  "source": m.source, "notes": m.notes or None})
                          for m in spec.materials]
    return d


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
    out = [f"{_key(k)} = {_value(v)}" for k, v in d.items() if not isinstance(v, (dict, list))
           or (isinstance(v, list) and not (v and isinstance(v[0], dict)))]
    for k, v in d.items():
        if isinstance(v, dict):
            out += ["", f"[{_key(k)}]"] + [f"{_key(a)} = {_value(b)}" for a, b in v.items()]
        elif isinstance(v, list) and v and isinstance(v[0], dict):
            for item in v:
                out += ["", f"[[{_key(k)}]]"] + [f"{_key(a)} = {_value(b)}"
                                                 for a, b in item.items()]
    return "\n".join(out) + "\n"


def _key(k: str) -> str:
    import re

    return k if re.fullmatch(r"[A-Za-z0-9_-]+", k) else _value(k)


def _value(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, (int, float)):
        return repr(v)
    if isinstance(v, str):
        return tomli_w.dumps({"x": v})[4:].rstrip("\n")
    if isinstance(v, list):
        return "[" + ", ".join(_value(x) for x in v) + "]"
    if isinstance(v, dict):
        return "{ " + ", ".join(f"{_key(a)} = {_value(b)}" for a, b in v.items()) + " }" \
            if v else "{}"
    raise TypeError(f"cannot write {type(v).__name__} to a room file")


def save_spec(spec: RoomSpec, path) -> None:
    """Write a spec to a room file atomically (temporary file, fsync, rename)."""
    write_text_atomic(path, spec_to_toml(spec))
