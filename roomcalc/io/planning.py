"""Planning from a room file: the goals, candidates and working patterns of a checked spec in
the planner's SI terms, and the treated room a plan makes, written back as a room spec.

The planning keys (``[target]``, ``[[candidates]]``, a receiver's ``hours`` and
``source_hours``) are read and checked by :mod:`roomcalc.io.roomfile` with the rest of the file;
docs/room-files.md describes them. The functions here take a spec that passed those checks and
the :class:`~roomcalc.engine.model.Room` it resolved to (``read_room`` or ``check_room``).

Conversions at this edge: areas in ft^2 times 0.09290304 (1 ft = 0.3048 m exactly), so object
absorption in sabins (ft^2) becomes m^2; a cost per ft^2 becomes a cost per m^2 by dividing by
0.09290304. Reverberation times [s] and levels [dB] need none.
"""

from __future__ import annotations

import copy
import math

import numpy as np

from roomcalc.engine.criteria import applicability, target_window
from roomcalc.engine.planner import (Candidate, Goals, LevelGoal, Plan, cover_shares,
                                     cover_surfaces)
from roomcalc.io.catalog import Catalog
from roomcalc.io.checks import Checker
from roomcalc.io.criteria import check_criterion_id, shipped_criteria
from roomcalc.io.errors import Problem, RoomFileError
from roomcalc.io.roomfile import (AREA_COST_KEY, CandidateSpec,
                                  ObjectSpec, RoomSpec, SurfaceSpec, candidate_material,
                                  limit_values, room_catalog, surface_area_m2)
from roomcalc.io.units import UNITS

#: A cover leaving less than this share of its surface uncovered covers all of it (the rest
#: would be a sliver of rounding, which a room file cannot hold as an area above 0).
FULL_COVER_SHARE = 1e-6
#: Tolerance of amounts against their limits (relative), for plans computed in floating point.
AMOUNT_RTOL = 1e-9


def resolve_goals(spec: RoomSpec, room, criteria=None, *, method: str | None = None,
                  filename: str = "<room>") -> Goals:
    """The planner's goals from a room's ``[target]`` table.

    Parameters
    ----------
    spec : RoomSpec -- a checked spec with a ``[target]`` table
    room : Room -- the room ``spec`` resolved to (its volume [m^3] and bands are used)
    criteria : dict of id -> Criterion, optional -- the library ``criterion`` names; None:
        the shipped library (:func:`roomcalc.io.criteria.load_criteria`)
    method : str, optional -- the formula in force (roomcalc.study passes it); None: the one
        the file names, else Eyring
    filename : str -- named in problems

    Returns
    -------
    Goals -- ``rt60_max`` / ``rt60_min`` [s] per band of ``room.bands_hz``, NaN where a band
    has no limit (None where no band has one); level goals per receiver [dB(A)] and [dB];
    ``source`` the criterion id ("" for the file's own limits)

    Raises
    ------
    RoomFileError -- no ``[target]``, or one that sets no goal (a room file may hold such a
    draft; a plan needs a goal); an unknown criterion; a criterion that does not apply to this
    volume (with its reason) or that assesses a band the room does not compute

    Notes
    -----
    A criterion's window at the room's volume comes from
    :func:`roomcalc.engine.criteria.target_window`. A criterion assessed on the mean of its
    bands (BB93's T_mf) is planned with its window in each of those bands: a little stricter
    than the criterion, and sufficient for it, since values that each lie in the window have a
    mean in it.
    """
    t = spec.target
    if t is None:
        raise RoomFileError([Problem(filename, "target", "is required to plan: a [target] "
                                     "table with criterion, rt60_max or rt60_min, or levels "
                                     "(docs/room-files.md)")])
    if not (t.criterion is not None or t.rt60_max is not None or t.rt60_min is not None
            or t.max_level_dba or t.max_level_db):
        raise RoomFileError([Problem(filename, "target", "sets no goal: give criterion, "
                                     "rt60_max or rt60_min, max_level_dba or max_level_db")])
    bands = tuple(room.bands_hz)
    rt_max = rt_min = None
    if t.criterion is not None:
        rt_min, rt_max = _criterion_window(t.criterion, room, criteria, filename)
    else:
        if t.rt60_max is not None:
            rt_max = np.array(limit_values(t.rt60_max, bands), dtype=float)
        if t.rt60_min is not None:
            rt_min = np.array(limit_values(t.rt60_min, bands), dtype=float)
    levels = []
    for r in spec.receivers:
        if r.name in t.max_level_dba or r.name in t.max_level_db:
            dba = t.max_level_dba.get(r.name)
            db = t.max_level_db.get(r.name)
            levels.append(LevelGoal(r.name, float(dba) if dba is not None else None,
                                    np.array(limit_values(db, bands)) if db is not None
                                    else None))
    # The core (roomcalc.study) passes the formula in force; other callers get the file's.
    return Goals(method=method or spec.method_in_force or "eyring", rt60_max=rt_max,
                 rt60_min=rt_min, levels=tuple(levels), objective=t.plan_objective,
                 source=t.criterion or "")


def _criterion_window(cid: str, room, criteria, filename: str):
    """(rt60_min, rt60_max) per room band of a criterion at the room's volume; None for a side
    the criterion does not limit in any band."""
    chk = Checker(filename)
    if not check_criterion_id(cid, chk, criteria):
        raise RoomFileError(chk.problems)
    c = (criteria if criteria is not None else shipped_criteria())[cid]
    ok, reason = applicability(c, room.volume)
    if not ok:
        raise RoomFileError([Problem(filename, "target.criterion",
                                     f"'{cid}' does not apply to this room: {reason}")])
    _, lo, hi = target_window(c, room.volume)
    bands = np.asarray(room.bands_hz, dtype=float)
    out_lo, out_hi = np.full(bands.size, np.nan), np.full(bands.size, np.nan)
    for b, x, y in zip(c.bands_hz, lo, hi):
        k = np.flatnonzero(np.isclose(bands, b, rtol=1e-6, atol=0.0))
        if k.size == 0:
            chk.add("target.criterion", f"'{cid}' assesses {b:g} Hz, a band this room does "
                    f"not compute; add {b:g} to bands_hz")
            continue
        out_lo[k[0]], out_hi[k[0]] = x, y
    if chk.problems:
        raise RoomFileError(chk.problems)
    return (None if np.all(np.isnan(out_lo)) else out_lo,
            None if np.all(np.isnan(out_hi)) else out_hi)


def resolve_candidates(spec: RoomSpec, room, catalog: Catalog, *, objective: str | None = None,
                       filename: str = "<room>") -> list[Candidate]:
    """The planner's candidates from a room's ``[[candidates]]``, in file order, SI units.

    Parameters
    ----------
    spec : RoomSpec -- a checked spec
    room : Room -- the room ``spec`` resolved to (``room.surfaces`` in the order of
        ``spec.surfaces``)
    catalog : Catalog -- the catalogue the room was resolved with (the room's own
        [[materials]] are added, as when resolving)
    objective : "cost" or "area", optional -- what the plan will minimise; None: the file's
        ``[target] objective`` (default "cost"). Each candidate must give what it measures.
    filename : str -- named in problems

    Returns
    -------
    list of Candidate -- the candidates not marked ``applied`` (those are built into the room
    already, so planning them again would count them twice; :func:`applied_candidates` names
    them); cover: ``surface`` the index into ``room.surfaces`` (a tuple of them for a
    candidate over several surfaces or ``walls``), ``alpha`` per band, ``max_amount`` [m^2]
    (default: the total area of its surfaces, over their counts), ``cost`` per m^2, ``step``
    [m^2] (``step``, else ``panel`` width x height), ``panel`` (width, height) [m]; units:
    ``absorption`` [m^2 per unit] per band, ``max_amount``
    units (default: no limit), ``cost`` per unit, ``integer`` (default True), ``area_each``
    [m^2]. A cost not given (allowed when the objective is area) is 0.

    Raises
    ------
    RoomFileError -- a material the catalogue lacks, of the wrong kind or without a band; a
    cost missing when the objective is cost, an ``area_each`` missing when it is area (a room
    file may leave them out while it is drafted; a plan needs them)
    ValueError -- ``room`` does not have ``spec``'s surfaces
    """
    if len(room.surfaces) != len(spec.surfaces) or any(
            a.name != b.name for a, b in zip(room.surfaces, spec.surfaces)):
        raise ValueError("room: its surfaces are not those of spec; pass the room that spec "
                         "resolved to")
    u = spec.unit_system
    bands = tuple(room.bands_hz)
    chk = Checker(filename)
    cat = room_catalog(spec, catalog, chk)
    index = {s.name: i for i, s in enumerate(spec.surfaces)}
    if objective is None:
        objective = spec.target.plan_objective if spec.target is not None else "cost"
    if objective not in ("cost", "area"):
        raise ValueError(f"objective: {objective!r} is not one of 'cost', 'area'")
    cost_key = AREA_COST_KEY[u.name]
    out = []
    for i, c in enumerate(spec.candidates):
        if c.applied:
            continue            # built into the room already: planning it again would double it
        w = f"candidates[{i}]"
        if objective == "cost" and c.covers and c.area_cost is None:
            chk.add(f"{w}.{cost_key}", f"is required to plan for the least cost: the cost of "
                    f"1 {u.area_label} covered, 0 or more")
        elif objective == "cost" and not c.covers and c.cost_each is None:
            chk.add(f"{w}.cost_each", "is required to plan for the least cost: the cost of "
                    "one unit, 0 or more")
        elif objective == "area" and not c.covers and c.area_each is None:
            chk.add(f"{w}.area_each", "is required to plan for the least area: the area one "
                    f"unit counts for ({u.area_label}), above 0")
        values = candidate_material(cat, chk, c, i, bands) if c.material else None
        if c.material and values is None:
            continue
        if c.covers:
            js = [index[n] for n in c.surface_names(spec)]
            alpha = values if values is not None else c.alpha
            step = c.panel_area
            out.append(Candidate(
                name=c.name, kind="cover", cost=(c.area_cost or 0.0) / u.area,
                max_amount=c.max_area * u.area if c.max_area is not None
                else sum(room.surfaces[j].total_area for j in js),
                surface=js[0] if len(js) == 1 else tuple(js), alpha=alpha,
                step=step * u.area if step is not None else None, material=c.material,
                panel=tuple(x * u.length for x in c.panel) if c.panel else None))
        else:
            absorption = values if values is not None else [x * u.area for x in c.absorption]
            extra = {"area_each": c.area_each * u.area} if c.area_each is not None else {}
            out.append(Candidate(
                name=c.name, kind="units", cost=float(c.cost_each or 0.0),
                max_amount=float(c.max_count) if c.max_count is not None else math.inf,
                absorption=absorption, integer=c.whole is not False, material=c.material,
                **extra))
    if chk.problems:
        raise RoomFileError(chk.problems)
    return out


def apply_plan(spec: RoomSpec, plan: Plan, candidates: list[Candidate]) -> RoomSpec:
    """The treated room: a new spec (in the file's units) with a plan's treatment built in.

    Parameters
    ----------
    spec : RoomSpec -- the planned room (left unchanged)
    plan : Plan -- ``plan.amounts`` per candidate in candidate order: m^2 covered (in total
        over the surface's count) or units
    candidates : list of Candidate -- the candidates the plan was made with:
        :func:`resolve_candidates` of ``spec``, or some of them (each found in ``spec`` by
        its name, which is unique)

    Returns
    -------
    RoomSpec -- each covered part a new surface "<surface> - <candidate>" right after its
    surface (a candidate over several surfaces makes one on each, its area spread in
    proportion to their total areas, as the planner spreads it), with the candidate's material or
    alpha, the surface's face and count, and the
    covered area per copy; the surface keeps the rest (a surface without area, the rest of its
    face, keeps no area and so shrinks by itself; a surface covered whole is removed). Each
    candidate added as units becomes an [[objects]] entry with its count. ``[target]``, the
    working patterns and [[materials]] are kept, and so are the ``[[candidates]]``: each one
    the plan uses (an amount above 0) is marked ``applied = true``, so that a plan made on the
    treated room leaves it out rather than counting it twice (un-marking it makes it a
    candidate again). A plan that is not feasible is applied as it stands.

    Raises
    ------
    ValueError -- amounts that do not match the candidates, are negative, exceed a limit or a
    surface's area, or are not whole for whole units; a candidate that is not the spec's
    """
    amounts = np.asarray(plan.amounts, dtype=float)
    if amounts.shape != (len(candidates),):
        raise ValueError(f"plan.amounts: {amounts.size} amounts for {len(candidates)} "
                         "candidates; one per candidate")
    if not np.all(np.isfinite(amounts)):
        raise ValueError("plan.amounts: every amount must be a finite number")
    u = spec.unit_system
    by_name = {cs.name: cs for cs in spec.candidates}
    new = copy.deepcopy(spec)
    new_by_name = {cs.name: cs for cs in new.candidates}
    covers: dict[int, list[tuple[CandidateSpec, float]]] = {}
    for c, a in zip(candidates, amounts.tolist()):
        cs = by_name.get(c.name)
        if cs is None or cs.covers != (c.kind == "cover") or (
                c.kind == "cover" and [spec.surfaces[i].name for i in cover_surfaces(c)]
                != cs.surface_names(spec)):
            raise ValueError(f"candidates: '{c.name}' ({c.kind}) is not a candidate of spec; "
                             "pass resolve_candidates(spec, ...) or some of them")
        tol = AMOUNT_RTOL * max(1.0, abs(c.max_amount) if math.isfinite(c.max_amount) else 1.0)
        if a < -tol:
            raise ValueError(f"plan.amounts: {a:g} for '{c.name}' is below 0")
        if a > c.max_amount + tol:
            raise ValueError(f"plan.amounts: {a:g} for '{c.name}' is above its limit "
                             f"{c.max_amount:g}")
        if a <= tol:
            continue
        new_by_name[c.name].applied = True
        if c.kind == "cover":
            # Spread over its surfaces as the planner spread it (in proportion to their areas).
            sis = list(cover_surfaces(c))
            shares = cover_shares([_total_area_m2(spec, i) for i in sis])
            for i, wi in zip(sis, shares.tolist()):
                covers.setdefault(i, []).append((cs, a * wi))
            continue
        if c.integer:
            if abs(a - round(a)) > 1e-6:
                raise ValueError(f"plan.amounts: {a:g} units of '{c.name}', which is bought "
                                 "in whole units")
            count: float = round(a)
        else:
            count = _tidy(a)
        new.objects.append(ObjectSpec(
            name=cs.name, count=count, material=cs.material,
            absorption=list(cs.absorption) if cs.absorption is not None else None))

    names = {s.name for s in spec.surfaces}
    surfaces = []
    for i, s in enumerate(new.surfaces):
        if i not in covers:
            surfaces.append(s)
            continue
        total = _total_area_m2(spec, i)
        used = sum(a for _, a in covers[i])
        if used > total * (1.0 + AMOUNT_RTOL):
            raise ValueError(f"plan.amounts: the plan covers {used:g} m^2 of surface '{s.name}', "
                             f"which has {total:g} m^2")
        parts = []
        for cs, a in covers[i]:
            name = _unique(f"{s.name} - {cs.name}", names)
            names.add(name)
            parts.append(SurfaceSpec(name=name, material=cs.material,
                                     alpha=list(cs.alpha) if cs.alpha is not None else None,
                                     area=_tidy(a / s.count / u.area), count=s.count,
                                     face=s.face))
        whole = total - used <= FULL_COVER_SHARE * total
        if not whole:
            if s.area is not None:
                s.area = _tidy(s.area - sum(p.area for p in parts))
            surfaces.append(s)
        surfaces.extend(parts)
    new.surfaces = surfaces
    return new


def applied_candidates(spec: RoomSpec) -> list[str]:
    """The names of the candidates marked ``applied`` (built into the room already), in file
    order: a plan leaves them out and says so."""
    return [c.name for c in spec.candidates if c.applied]


def _total_area_m2(spec: RoomSpec, i: int) -> float:
    """A surface's total area [m^2] over its count (:func:`roomcalc.io.roomfile.surface_area_m2`:
    its own area, or the rest of its box face)."""
    area, problem = surface_area_m2(spec, i)
    if problem:
        raise ValueError(f"surfaces[{i}].area: {problem}")
    return area * spec.surfaces[i].count


def _tidy(x: float) -> float:
    """A number for a file: 10 significant digits (12.96, not 12.959999999999999)."""
    return float(f"{x:.10g}")


def _unique(name: str, taken: set) -> str:
    if name not in taken:
        return name
    k = 2
    while f"{name} ({k})" in taken:
        k += 1
    return f"{name} ({k})"


def work_patterns(spec: RoomSpec) -> dict[str, tuple[float, dict[str, float]]]:
    """Each receiver's working pattern, for the daily exposure.

    Returns
    -------
    dict -- receiver name -> (hours per day at that position [h], {source name: hours the
    source runs while the receiver is there [h]}), every source of the room listed (a source
    not in ``source_hours`` runs the whole ``hours``). Receivers without ``hours`` have no
    working pattern and are left out.
    """
    out = {}
    for r in spec.receivers:
        if r.hours is None:
            continue
        h = float(r.hours)
        out[r.name] = (h, {s.name: float(r.source_hours.get(s.name, h)) for s in spec.sources})
    return out


def convert_candidate_units(spec: RoomSpec, to: str) -> None:
    """Re-express the candidates of a spec in other units, in place: ``max_area``, ``step``,
    ``panel`` (lengths), ``area_each`` and ``absorption`` per unit in m^2 or ft^2, and the cover
    cost under the
    key of the new units (``cost_per_m2`` or ``cost_per_ft2``, the same money per the new
    unit of area). Rounded to 4 decimals, as the interface rounds areas when it converts a
    room. ``spec.units`` is left to the caller, who converts the rest of the room.
    """
    src, dst = spec.unit_system, UNITS[to]
    if src.name == dst.name:
        return
    f = src.area / dst.area                     # new area units per old one

    def area(x):
        return None if x is None else round(x * f, 4)

    for c in spec.candidates:
        c.max_area, c.step, c.area_each = area(c.max_area), area(c.step), area(c.area_each)
        if c.panel is not None:
            c.panel = [round(x * src.length / dst.length, 4) for x in c.panel]
        if c.absorption is not None:
            c.absorption = [area(x) for x in c.absorption]
        cost = c.area_cost
        c.cost_per_m2 = c.cost_per_ft2 = None
        if cost is not None:
            setattr(c, AREA_COST_KEY[dst.name], round(cost / f, 4))
