"""Reading the planning tables of a room file: ``[target]`` (what a plan must reach) and
``[[candidates]]`` (what it may use). :mod:`roomcalc.io.planning` turns them into the planner's
SI goals and candidates.
"""

from __future__ import annotations

import math

from roomcalc.io.checks import Checker, kind_of, nearest
from roomcalc.io.limits import limit
from roomcalc.io.roomfile.spec import (AREA_COST_KEY, CANDIDATE_KEYS, COVER_KEYS, METHODS,
                                       OBJECTIVES,
                                       TARGET_KEYS, UNIT_KEYS, BandLimit, CandidateSpec,
                                       RoomSpec, TargetSpec, band_text, limit_values)
from roomcalc.io.units import Units


def parse_target(chk: Checker, data: dict, bands, receivers: list) -> TargetSpec | None:
    """The [target] table (None if the file has none); ``receivers``: the room's receiver
    names, which the level limits may name."""
    t = chk.table(data, "target", "")
    if t is None:
        return None
    w = "target"
    chk.keys(t, w, TARGET_KEYS)
    tp = TargetSpec()
    tp.method = chk.text(t, "method", w, choices=METHODS, nonempty=True)
    tp.objective = chk.text(t, "objective", w, choices=OBJECTIVES, nonempty=True)
    tp.currency = chk.text(t, "currency", w, nonempty=True)
    tp.criterion = chk.text(t, "criterion", w, nonempty=True)
    for key in ("rt60_max", "rt60_min"):
        setattr(tp, key, band_limit(chk, t, key, w, bands, **limit("rt60_limit")))
    own = [k for k in ("rt60_max", "rt60_min") if k in t]
    if "criterion" in t and own:
        keys = " and ".join(own)
        chk.add(w, f"give either criterion or {keys}, not both: keep criterion to plan to its "
                f"published window, or keep {keys} (and remove criterion) to plan to your own")
    _window_not_empty(chk, tp, bands)
    _level_limits(chk, t, tp, bands, receivers)
    return tp


def check_one_method(chk: Checker, spec: RoomSpec) -> None:
    """Top-level ``method`` and ``[target] method``, when both are given, name the same formula
    (the room is evaluated and planned with one)."""
    t = spec.target
    if spec.method is not None and t is not None and t.method is not None \
            and t.method != spec.method:
        chk.add("target.method", f"'{t.method}' differs from the top-level method "
                f"'{spec.method}'; the room is evaluated and planned with one formula: give "
                "it once (top-level method) or the same in both")


def _window_not_empty(chk: Checker, tp: TargetSpec, bands) -> None:
    """rt60_min is not above rt60_max in any band."""
    if tp.rt60_max is None or tp.rt60_min is None:
        return
    lo, hi = limit_values(tp.rt60_min, bands), limit_values(tp.rt60_max, bands)
    bad = [(b, x, y) for b, x, y in zip(bands, lo, hi) if x > y]
    if bad and not isinstance(tp.rt60_min, (list, dict)) and \
            not isinstance(tp.rt60_max, (list, dict)):
        chk.add("target.rt60_min", f"{bad[0][1]:g} s is above rt60_max ({bad[0][2]:g} s); "
                "the window would be empty")
        return
    for b, x, y in bad:
        chk.add("target.rt60_min", f"{x:g} s at {b} Hz is above rt60_max ({y:g} s); the "
                "window would be empty")


def _level_limits(chk: Checker, t: dict, tp: TargetSpec, bands, receivers: list) -> None:
    """max_level_dba and max_level_db: limits at named receivers."""
    w = "target"
    for key, rng in (("max_level_dba", "level_limit_dba"), ("max_level_db", "level_limit")):
        levels = chk.table(t, key, w)
        for k, x in (levels or {}).items():
            path = chk.name_key(k, f"{w}.{key}", receivers, "receiver")
            if key == "max_level_dba":
                y = chk.value(x, path, **limit(rng))
                y = None if y is None else float(y)
            else:
                y = band_limit(chk, levels, k, f"{w}.{key}", bands, **limit(rng),
                               path=path)
            if y is not None:
                getattr(tp, key)[k] = y


def band_limit(chk: Checker, table: dict, key: str, where: str, bands, *, low, high,
               unit, low_open=False, path=None) -> BandLimit | None:
    """A limit per band: one number (every band), a list (one per band) or a table by band.
    ``path``: the field path of the limit (default ``WHERE.KEY``)."""
    if key not in table:
        return None
    v, path = table[key], path or f"{where}.{key}"

    def one(x, p):
        y = chk.value(x, p, low=low, high=high, low_open=low_open, unit=unit)
        return None if y is None else float(y)

    if isinstance(v, list):
        if len(v) != len(bands):
            chk.add(path, f"has {len(v)} values; {len(bands)} are needed ({band_text(bands)})")
            return None
        out = [one(x, f"{path}[{i}]") for i, x in enumerate(v)]
        return None if None in out else out
    if isinstance(v, dict):
        if not v:
            chk.add(path, "is an empty table: a table limits the bands it names, e.g. "
                    "{ 500 = ..., 1000 = ... }; give at least one")
            return None
        return chk.band_table(v, path, bands, one, "this room")
    if isinstance(v, (int, float)) and not isinstance(v, bool):
        return one(v, path)
    chk.add(path, f"must be a number (every band), a list ({band_text(bands)}) or a table by "
            f"band such as {{ 500 = ..., 1000 = ... }} (only those bands), not {kind_of(v)}")
    return None


def parse_candidates(chk: Checker, data: dict, spec: RoomSpec, u: Units) -> list[CandidateSpec]:
    """The [[candidates]] entries: each covers part of a surface or is added as units."""
    out: list[CandidateSpec] = []
    for i, c in enumerate(chk.array_of_tables(data, "candidates")):
        w = f"candidates[{i}]"
        chk.keys(c, w, CANDIDATE_KEYS)
        cp = CandidateSpec(name=chk.text(c, "name", w, default=f"Candidate {i + 1}",
                                         nonempty=True))
        if any(o.name == cp.name for o in out):
            chk.add(f"{w}.name", f"'{cp.name}' is used by another candidate; names must differ")
        cp.material = chk.text(c, "material", w, nonempty=True)
        if "applied" in c:
            if isinstance(c["applied"], bool):
                cp.applied = c["applied"] or None
            else:
                chk.add(f"{w}.applied", f"must be true or false, not {kind_of(c['applied'])}")
        if "surface" in c or "walls" in c:
            _cover(chk, c, w, cp, spec, u)
        else:
            _units(chk, c, w, cp, spec, u)
        out.append(cp)
    return out


def _cover(chk: Checker, c: dict, w: str, cp: CandidateSpec, spec: RoomSpec, u: Units) -> None:
    """A candidate that covers part of one surface, of several (a list), or of every wall."""
    if "walls" in c:
        if c["walls"] is True:
            cp.walls = True
            if "surface" in c:
                chk.add(w, "give surface (one name or a list) or walls = true (every wall), "
                        "not both")
            elif not cp.surface_names(spec):
                chk.add(f"{w}.walls", "covers the surfaces on the box's wall faces (front, "
                        "back, left, right), and no surface here has such a face; give "
                        "surface instead")
        else:
            chk.add(f"{w}.walls", "must be true (every surface on a wall face), or left out")
    if "surface" in c:
        v = c["surface"]
        if isinstance(v, list):
            if not v or not all(isinstance(x, str) and x.strip() for x in v):
                chk.add(f"{w}.surface", "a list must hold one or more surface names (text)")
            elif len(set(v)) < len(v):
                chk.add(f"{w}.surface", "names a surface twice; give each once")
            else:
                cp.surface = list(v)
        else:
            cp.surface = chk.text(c, "surface", w, nonempty=True)
    if cp.surface is not None and not cp.applied:
        # An applied candidate may name a surface its plan covered whole (and so removed).
        _known_surfaces(chk, w, cp.surface_names(spec), [s.name for s in spec.surfaces])
    for k in UNIT_KEYS:
        if k in c:
            chk.add(f"{w}.{k}", "only goes with a candidate added as units (one "
                    "without surface); this one covers a surface")
    bt = band_text(spec.bands)
    cp.alpha = chk.numbers(c, "alpha", w, length=len(spec.bands), **limit("alpha", unit=bt))
    if ("material" in c) == ("alpha" in c):
        chk.add(w, "give either material (a catalogue id of kind surface) or alpha ("
                + bt + ") for the covered part")
    cp.max_area = chk.number(c, "max_area", w, **limit("max_area", u))
    cp.step = chk.number(c, "step", w, **limit("step", u))
    cp.panel = _panel(chk, c, w, u)
    if cp.panel is not None and cp.step is not None and not math.isclose(
            cp.panel[0] * cp.panel[1], cp.step, rel_tol=1e-3):
        chk.add(f"{w}.step", f"{cp.step:g} {u.area_label} is not the panel's area "
                f"({cp.panel[0]:g} x {cp.panel[1]:g} = {cp.panel[0] * cp.panel[1]:g} "
                f"{u.area_label}); give panel alone, or both in agreement")
    cost_key = AREA_COST_KEY[u.name]
    other_cost = AREA_COST_KEY["imperial" if u.name == "metric" else "metric"]
    if other_cost in c:
        chk.add(f"{w}.{other_cost}", f"a{'n' if u.name == 'imperial' else ''} "
                f"{u.name} file gives areas in {u.area_label}, so the cost per "
                f"{u.area_label}: use {cost_key}")
    setattr(cp, cost_key, chk.number(c, cost_key, w,
                                     **limit("cost", unit=f"per {u.area_label}")))


def _panel(chk: Checker, c: dict, w: str, u: Units) -> list[float] | None:
    """``panel = [width, height]``, each in the range of a panel side (in the file's units)."""
    if "panel" not in c:
        return None
    v = c["panel"]
    if not isinstance(v, list) or len(v) != 2:
        chk.add(f"{w}.panel", f"must be [width, height] of one panel ({u.length_label}), not "
                + (f"{len(v)} value{'' if len(v) == 1 else 's'}" if isinstance(v, list)
                   else kind_of(v)))
        return None
    sides = [chk.value(x, f"{w}.panel[{i}]", **limit("panel", u)) for i, x in enumerate(v)]
    return None if None in sides else [float(x) for x in sides]


def _known_surfaces(chk: Checker, w: str, names: list[str], surfaces: list[str]) -> None:
    """Each name a candidate covers is one surface of the room (exactly one)."""
    for name in names:
        hits = [f"surfaces[{j}]" for j, n in enumerate(surfaces) if n == name]
        if not hits:
            near = nearest(name, surfaces)
            chk.add(f"{w}.surface", f"'{name}' is not a surface of this room"
                    + (f"; did you mean '{near}'?" if near else "")
                    + f" (surfaces: {', '.join(surfaces) or 'none'})")
        elif len(hits) > 1:
            chk.add(f"{w}.surface", f"'{name}' names {len(hits)} surfaces "
                    f"({', '.join(hits)}); give them different names so that one can "
                    "be treated")


def _units(chk: Checker, c: dict, w: str, cp: CandidateSpec, spec: RoomSpec, u: Units) -> None:
    """A candidate added as units (without surface)."""
    surfaces = [s.name for s in spec.surfaces]
    for k in COVER_KEYS:
        if k in c:
            chk.add(f"{w}.{k}", "only goes with a candidate that covers a surface: "
                    "give surface (one of " + (", ".join(surfaces) or "none")
                    + "), or leave it out to add the candidate as units")
    bt = band_text(spec.bands)
    cp.absorption = chk.numbers(c, "absorption", w, length=len(spec.bands),
                                **limit("absorption", u, unit=bt))
    if ("material" in c) == ("absorption" in c) and "alpha" not in c:
        chk.add(w, "give either material (a catalogue id of kind object) or absorption "
                f"({u.area_label} per unit, {bt}); or surface, to cover part "
                "of a surface")
    if "whole" in c:
        if isinstance(c["whole"], bool):
            cp.whole = c["whole"]
        else:
            chk.add(f"{w}.whole", f"must be true or false, not {kind_of(c['whole'])}")
    cp.max_count = chk.number(c, "max_count", w, **limit("max_count"))
    if cp.max_count is not None and cp.whole is not False and \
            not float(cp.max_count).is_integer():       # 40 or 40.0, not 2.5
        chk.add(f"{w}.max_count", f"must be a whole number for whole units, not "
                f"{cp.max_count!r} (or set whole = false)")
        cp.max_count = None
    cp.cost_each = chk.number(c, "cost_each", w, **limit("cost", unit="per unit"))
    cp.area_each = chk.number(c, "area_each", w, **limit("area_each", u))
