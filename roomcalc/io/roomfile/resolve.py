"""From a checked room spec to the engine's SI :class:`~roomcalc.engine.model.Room`: materials
looked up in the catalogue (with the room's own [[materials]]), units converted, the areas of
surfaces that fill the rest of a box face worked out.
"""

from __future__ import annotations

import math

from roomcalc.engine.model import Air, Receiver, Room, RoomObject, Source, Surface
from roomcalc.io.catalog import Catalog, Material, counterpart_problems
from roomcalc.io.checks import Checker, nearest
from roomcalc.io.criteria import check_criterion_id
from roomcalc.io.errors import Problem, RoomFileError
from roomcalc.io.limits import RANGES
from roomcalc.io.roomfile.faces import box_dimensions_m, surface_area_m2
from roomcalc.io.roomfile.parse import SpecProblems, parse_data, read_spec
from roomcalc.io.roomfile.spec import CandidateSpec, RoomSpec
from roomcalc.io.roomfile.write import spec_to_dict
from roomcalc.io.sources import source_band_power


def read_room(path, catalog: Catalog, criteria=None) -> tuple[RoomSpec, Room]:
    """Read, check and resolve a room file. Raises RoomFileError with every problem found.

    ``criteria`` (id -> Criterion) is what ``[target] criterion`` may name; None: the shipped
    criteria library, read only when a file names a criterion.
    """
    try:
        spec = read_spec(path)
    except SpecProblems as exc:  # add what the catalogue says, so every problem shows at once
        more = material_problems(exc.spec, exc.inline_ids, catalog, str(path), criteria)
        raise RoomFileError(list(exc.problems) + more) from None
    return spec, resolve(spec, catalog, str(path), criteria)


def check_room(spec: RoomSpec, catalog: Catalog, filename: str = "<room>",
               criteria=None) -> Room:
    """Check a spec as if it had been written and read back, then resolve it.

    The interface uses this after every edit: the same checks and messages as for a file,
    without writing one. ``criteria`` as for :func:`read_room`. Raises RoomFileError with
    every problem.
    """
    try:
        checked = parse_data(spec_to_dict(spec), filename)
    except SpecProblems as exc:
        more = material_problems(exc.spec, exc.inline_ids, catalog, filename, criteria)
        raise RoomFileError(list(exc.problems) + more) from None
    return resolve(checked, catalog, filename, criteria)


def material_problems(spec: RoomSpec, inline_ids: set, catalog: Catalog,
                      filename: str, criteria=None) -> list[Problem]:
    """Unknown materials, wrong kinds and missing bands of a spec that has other problems,
    and an unknown criterion.

    Ids of the file's own [[materials]] entries are skipped: those entries have problems of
    their own, already reported.
    """
    merged = dict(catalog.materials)
    merged.update({m.id: m for m in spec.materials if m.id not in merged})
    cat, chk = Catalog(merged), Checker(filename)
    for i, m in enumerate(spec.materials):
        if merged[m.id] is m:
            for _, msg in counterpart_problems(merged, [m]):
                chk.add(f"materials[{i}].unoccupied", msg)
    for group, items, kind in (("surfaces", spec.surfaces, "surface"),
                               ("objects", spec.objects, "object")):
        for i, it in enumerate(items):
            if it.material and it.material not in inline_ids:
                material_values(cat, chk, it.material, f"{group}[{i}]", kind, spec.bands)
    for i, c in enumerate(spec.candidates):
        if c.material and c.material not in inline_ids:
            candidate_material(cat, chk, c, i, spec.bands)
    if spec.target is not None and spec.target.criterion is not None:
        check_criterion_id(spec.target.criterion, chk, criteria)
    return chk.problems


def candidate_material(cat: Catalog, chk: Checker, c: CandidateSpec, i: int, bands):
    """The values of candidate i's material at the bands (alpha, or m^2 per unit), or None
    after reporting to chk why not."""
    kind = "surface" if c.covers else "object"
    need = ("a candidate that covers a surface needs kind surface" if c.covers else
            "a candidate added as units (without surface) needs kind object")
    return material_values(cat, chk, c.material, f"candidates[{i}]", kind, bands, need=need)


def material_values(cat: Catalog, chk: Checker, mid: str, where: str, kind: str, bands,
                    need: str | None = None):
    """A material's values at the bands, or None after reporting to chk why not (at
    ``WHERE.material``). ``need`` says who needs which kind (default: surfaces need kind
    surface, objects kind object)."""
    m = cat.get(mid)
    if m is None:
        near = nearest(mid, cat.ids(kind))
        chk.add(f"{where}.material", f"unknown material '{mid}'"
                + (f"; did you mean '{near}'?" if near else "")
                + " (search with: roomcalc materials WORDS)")
        return None
    if m.kind != kind:
        need = need or f"{'surfaces' if kind == 'surface' else 'objects'} need kind {kind}"
        chk.add(f"{where}.material", f"'{mid}' is a material of kind {m.kind}; {need}")
        return None
    return _values_at(m, chk, f"{where}.material", bands)


def _values_at(m: Material, chk: Checker, where: str, bands):
    try:
        return m.values_for(bands)
    except KeyError as exc:
        missing = ", ".join(map(str, exc.args[0]))
        chk.add(where, f"'{m.id}' has no value at {missing} Hz (it gives {m.bands_text}); "
                f"give the coefficients inline or remove {missing} from bands_hz")
        return None


def room_catalog(spec: RoomSpec, catalog: Catalog, chk: Checker) -> Catalog:
    """The catalogue with the room's own [[materials]]; a duplicate id is reported to chk."""
    fresh: list[Material] = []
    for i, m in enumerate(spec.materials):  # a duplicate id is reported with the rest
        if m.id in catalog or any(f.id == m.id for f in fresh):
            other = catalog[m.id].file if m.id in catalog else "this file"
            chk.add(f"materials[{i}].id", f"'{m.id}' is already defined in {other}")
        else:
            fresh.append(m)
    if not fresh:
        return catalog
    cat = catalog.with_materials(fresh)
    index = {id(m): i for i, m in enumerate(spec.materials)}
    for m, msg in counterpart_problems(cat.materials, fresh):
        chk.add(f"materials[{index[id(m)]}].unoccupied", msg)
    return cat


def unoccupied_values(cat: Catalog, chk: Checker, mid: str, where: str, bands):
    """The values at the bands of what remains of material ``mid`` when its people leave (its
    ``unoccupied`` counterpart), or None if it names none (or after reporting to chk that the
    counterpart lacks a band, at ``WHERE.material``).

    The counterpart itself (known, same kind, no people) is checked where entries are read:
    :func:`roomcalc.io.catalog.load_catalog` for catalogue files, :func:`room_catalog` for a
    room's own [[materials]]; one that fails those checks is reported there, not again here.
    """
    m = cat.get(mid)
    other = cat.get(m.unoccupied) if m is not None and m.unoccupied is not None else None
    if other is None or other.kind != m.kind:
        return None
    return _values_at(other, chk, f"{where}.material", bands)


def resolve(spec: RoomSpec, catalog: Catalog, filename: str = "<room>", criteria=None) -> Room:
    """Turn a RoomSpec into the engine's SI Room, looking materials up in the catalogue.

    Raises RoomFileError naming every unknown material, wrong kind, missing band or face area,
    and an unknown ``[target] criterion`` (``criteria`` as for :func:`read_room`). The
    candidates' materials are checked too; :mod:`roomcalc.io.planning` resolves them.
    """
    chk = Checker(filename)
    cat = room_catalog(spec, catalog, chk)
    u = spec.unit_system
    dims = box_dimensions_m(spec)
    volume = float(spec.shape.volume) * u.volume if spec.shape.volume is not None else \
        (math.prod(dims) if dims else None)
    if volume is None:
        chk.add("shape", "give length, width and height (a box) or volume (a free shape)")
    surfaces = _surfaces(spec, cat, chk)
    for i, c in enumerate(spec.candidates):
        if c.material:
            candidate_material(cat, chk, c, i, spec.bands)
    if spec.target is not None and spec.target.criterion is not None:
        check_criterion_id(spec.target.criterion, chk, criteria)
    objects = _objects(spec, cat, chk)
    sources = _sources(spec)
    receivers = _receivers(spec, sources, chk)
    if chk.problems:
        raise RoomFileError(chk.problems)
    return Room(bands_hz=spec.bands, volume=volume, surfaces=tuple(surfaces), dimensions=dims,
                air=_air(spec), objects=tuple(objects), sources=tuple(sources),
                receivers=tuple(receivers), title=spec.title)


def _surfaces(spec: RoomSpec, cat: Catalog, chk: Checker) -> list[Surface]:
    out = []
    for i, s in enumerate(spec.surfaces):
        w = f"surfaces[{i}]"
        alpha = material_values(cat, chk, s.material, w, "surface", spec.bands) \
            if s.material else s.alpha
        empty = unoccupied_values(cat, chk, s.material, w, spec.bands) \
            if s.material and alpha is not None else None
        area, problem = surface_area_m2(spec, i)
        if problem:
            chk.add(f"{w}.area", problem)
        elif alpha is not None:
            out.append(Surface(s.name, area, alpha, int(s.count), s.face, s.material,
                               unoccupied_alpha=empty))
    return out


def _objects(spec: RoomSpec, cat: Catalog, chk: Checker) -> list[RoomObject]:
    u = spec.unit_system
    out = []
    for i, o in enumerate(spec.objects):
        w = f"objects[{i}]"
        if o.material:
            a = material_values(cat, chk, o.material, w, "object", spec.bands)
        else:
            a = [x * u.area for x in o.absorption] if o.absorption is not None else None
        if a is None:
            continue
        m = cat.get(o.material) if o.material else None
        occupant = o.occupant if o.occupant is not None else bool(m and m.occupant)
        empty = unoccupied_values(cat, chk, o.material, w, spec.bands) \
            if occupant and m is not None and m.occupant else None
        out.append(RoomObject(o.name, a, float(o.count), o.material, occupant=occupant,
                              unoccupied_absorption=empty))
    return out


def _sources(spec: RoomSpec) -> list[Source]:
    u = spec.unit_system
    out = []
    for s in spec.sources:
        lw = source_band_power(s.sound_power, s.sound_power_dba, s.level_dba_1m, s.spectrum,
                               s.q, spec.bands)
        pos = tuple(x * u.length for x in s.position) if s.position else None
        out.append(Source(s.name, lw, s.q, pos))
    return out


def _receivers(spec: RoomSpec, sources: list[Source], chk: Checker) -> list[Receiver]:
    u = spec.unit_system
    out = []
    for i, r in enumerate(spec.receivers):
        pos = tuple(x * u.length for x in r.position) if r.position else None
        out.append(Receiver(r.name, pos, {k: v * u.length for k, v in r.distances.items()}))
        for s in sources:  # as a given distance: in the range of distance (in SI here)
            if s.name in r.distances or pos is None or s.position is None:
                continue
            d_m = math.dist(pos, s.position)
            rng = RANGES["distance"]
            if rng.low <= d_m <= rng.high:
                continue
            near, far = rng.bounds(u)
            d = d_m / u.length
            at = f"{d:.3g} {u.length_label} from source '{s.name}'" if d > 0 else \
                f"where source '{s.name}' is"
            chk.add(f"receivers[{i}].position", f"{r.position} is {at}; a receiver must be "
                    + (f"at least {near:g}" if d_m < rng.low else f"at most {far:g}")
                    + f" {u.length_label} from each source")
    return out


def _air(spec: RoomSpec) -> Air:
    a, u = spec.air, spec.unit_system
    return Air(temperature_c=u.temperature_to_c(a.temperature) if a.temperature is not None
               else 20.0,
               relative_humidity=a.relative_humidity if a.relative_humidity is not None
               else 50.0,
               pressure_kpa=a.pressure_kpa if a.pressure_kpa is not None else 101.325)
