"""What the room must reach and whether it does, the workers' daily exposure, and the plan:
the engine's numbers for one room, put together the same way for every front end.

- :func:`target_check` -- the room against its ``[target]``: RT60 per band against the
  criterion's or the file's own window, by the formula in force, at the occupancy the
  criterion is assessed at; levels at receivers.
- :func:`exposures` -- each receiver with a working pattern: LAeq, LEX,8h, EU action values,
  OSHA dose and TWA, NIOSH dose, with the caution.
- :func:`make_plan` -- the planner run on the room's target and candidates, by the formula in
  force, at the assessed occupancy.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from roomcalc.engine.analysis import RoomResult, evaluate
from roomcalc.engine.bands import a_weighted_total
from roomcalc.engine.criteria import Assessment, Criterion, assess, user_window
from roomcalc.engine.model import Room, at_occupancy
from roomcalc.io.roomfile import RoomSpec, limit_values

if TYPE_CHECKING:   # the planner and the exposure rules are imported when they are needed
    from roomcalc.engine.exposure import ExposureSummary
    from roomcalc.engine.planner import Candidate, Goals, Plan

__all__ = ["Occupancy", "LevelCheck", "TargetCheck", "PlanRun", "criterion_of", "occupancy_for",
           "target_check", "exposures", "make_plan"]


@dataclass(frozen=True, eq=False)
class Occupancy:
    """The occupancy a verdict is for: ``share`` of the described people present (0:
    unoccupied), in words, with where the criterion says so; ``result`` is the room evaluated
    at that occupancy (None when it is the room as described)."""

    share: float | None
    label: str
    source: str
    room: Room
    result: RoomResult | None

    @property
    def differs(self) -> bool:
        return self.result is not None


@dataclass(frozen=True)
class LevelCheck:
    receiver: str
    level_dba: float
    max_dba: float

    @property
    def margin_db(self) -> float:
        return self.max_dba - self.level_dba

    @property
    def passed(self) -> bool:
        return self.level_dba <= self.max_dba + 1e-9


@dataclass(frozen=True, eq=False)
class TargetCheck:
    """The room against its target: the RT60 assessment (None when the target sets no RT
    window) by ``method`` at ``occupancy``, and the level goals (room as described)."""

    method: str
    assessment: Assessment | None
    levels: tuple[LevelCheck, ...]
    occupancy: Occupancy

    @property
    def status(self) -> str:
        parts = []
        if self.assessment is not None:
            parts.append(self.assessment.status)
        parts += ["pass" if c.passed else "fail" for c in self.levels]
        if "fail" in parts:
            return "fail"
        if parts and all(p == "not-applicable" for p in parts):
            return "not-applicable"
        return "pass" if parts else "no-target"


@dataclass(frozen=True, eq=False)
class PlanRun:
    """A plan made for a room, with what is needed to show and apply it. ``before`` is the
    room the plan was made for (at the assessed occupancy), by the formula in force."""

    plan: Plan
    candidates: tuple[Candidate, ...]
    currency: str
    before: RoomResult
    after_room: Room
    goals: Goals
    occupancy: Occupancy
    described_before: RoomResult      # the room as described (all its people), by the method
    described_after: RoomResult       # the same with the plan's treatment
    #: Candidates left out because they are marked ``applied`` (built into the room already).
    applied: tuple[str, ...] = ()


def criterion_of(spec: RoomSpec, criteria: dict) -> Criterion | None:
    """The criterion the spec's target names (None: none named). Raises KeyError if unknown
    (the room file's checks have named it already)."""
    t = spec.target
    if t is None or not t.criterion:
        return None
    return criteria[t.criterion]


def occupancy_for(criterion: Criterion | None, room: Room, result: RoomResult,
                  method: str) -> Occupancy:
    """The room at the occupancy ``criterion`` is assessed at, evaluated by ``method``."""
    share = None if criterion is None else criterion.assessed_share
    source = "" if criterion is None else criterion.occupancy_source
    if share is None:
        return Occupancy(None, "as described", source, room, None)
    if share == 1.0:
        return Occupancy(share, "occupied, all the people described present", source, room,
                         None)
    label = "unoccupied (its people removed)" if share == 0.0 else \
        f"occupied, {share * 100:.0f} % of the people described present"
    if not room.has_occupants:
        # Nobody to remove or scale: the room as described is the assessed one.
        return Occupancy(share, label + "; the room file marks no people", source, room, None)
    assessed = at_occupancy(room, share)
    res = evaluate(assessed, reverberant_model=result.reverberant_model, method=method)
    return Occupancy(share, label, source, assessed, res)


def target_check(spec: RoomSpec, room: Room, result: RoomResult, criteria: dict,
                 filename: str = "<room>") -> TargetCheck | None:
    """The room against its ``[target]`` (None if it has none), by ``result.method`` (the
    formula in force). Raises RoomFileError when the target cannot be resolved (an unknown
    criterion, one that does not apply)."""
    if spec.target is None:
        return None
    method = result.method
    t = spec.target
    crit = criterion_of(spec, criteria)
    occ = occupancy_for(crit, room, result, method)
    judged = occ.result if occ.result is not None else result
    rt = judged.rt60_s[method]
    bands = room.bands_hz
    assessment = None
    if crit is not None:            # a criterion that does not apply says why in its verdict
        assessment = assess(crit, room.volume, bands, rt)
    elif t.rt60_max is not None or t.rt60_min is not None:
        def lim(x):
            return None if x is None else np.array(limit_values(x, bands), dtype=float)
        window = user_window(bands, lim(t.rt60_min), lim(t.rt60_max),
                             id="room-file", title="the room file's own window")
        assessment = assess(window, room.volume, bands, rt)
    levels = []
    by_name = {r.name: r for r in result.receivers}
    for name, max_dba in t.max_level_dba.items():
        r = by_name.get(name)
        if r is not None:
            levels.append(LevelCheck(name, float(r.level_dba), float(max_dba)))
    return TargetCheck(method, assessment, tuple(levels), occ)


def exposures(spec: RoomSpec, result: RoomResult) -> dict[str, ExposureSummary]:
    """Each receiver with a working pattern (``hours``): its day by every rule in
    :mod:`roomcalc.engine.exposure`, from each source's A-weighted level at it."""
    out = {}
    if not any(r.hours is not None for r in spec.receivers):
        return out
    from roomcalc.engine.exposure import day_periods, exposure_summary
    from roomcalc.io.planning import work_patterns

    by_name = {r.name: r for r in result.receivers}
    for name, (hours, source_hours) in work_patterns(spec).items():
        r = by_name.get(name)
        if r is None or hours <= 0:
            continue
        per_source = {s: float(a_weighted_total(lv, result.bands_hz))
                      for s, lv in r.per_source_db.items()}
        if not per_source:
            continue
        lv, h = day_periods(per_source, hours,
                            {s: v for s, v in source_hours.items() if s in per_source})
        out[name] = exposure_summary(lv, h)
    return out


def make_plan(spec: RoomSpec, room: Room, result: RoomResult, catalog, criteria: dict, *,
              objective=None, enabled=None, filename: str = "<room>", progress=None,
              cancel=None) -> PlanRun:
    """Run the planner on the room's ``[target]`` and ``[[candidates]]`` by the formula in
    force (``result.method``), for the room at the criterion's occupancy (``enabled``: the
    names of the candidates to use, None = all; candidates marked ``applied`` are built into
    the room already and always left out, named in ``PlanRun.applied``). Raises RoomFileError when
    the target or a
    candidate cannot be resolved, ValueError when there is nothing to plan with.

    ``progress`` (called with each PlanProgress, steps counting up) and ``cancel`` (a callable
    returning True to stop, or a ``threading.Event``) go to the planner, which checks the
    latter between its steps; this function checks it once more before evaluating the room as
    described. Stopped: PlanCancelled is raised, and nothing (spec, room, catalogue) has been
    changed."""
    from roomcalc.engine.planner import PlanWatch, apply_to_room, plan
    from roomcalc.io.planning import applied_candidates, resolve_candidates, resolve_goals

    method = result.method
    goals = resolve_goals(spec, room, criteria, method=method, filename=filename)
    occ = occupancy_for(criterion_of(spec, criteria), room, result, method)
    planned_room = occ.room
    cands = resolve_candidates(spec, planned_room, catalog, objective=objective,
                               filename=filename)
    if enabled is not None:
        cands = [c for c in cands if c.name in enabled]
    applied = tuple(applied_candidates(spec))
    if not cands:
        if applied:
            raise ValueError(f"there are no candidates to plan with: {_names(applied)} "
                             f"{'is' if len(applied) == 1 else 'are'} applied to the room "
                             "already (un-mark applied to plan again), and no other is "
                             "ticked or given")
        raise ValueError("there are no candidates to plan with: add [[candidates]] to the room "
                         "file (or tick some)")
    watch = PlanWatch(progress, cancel)
    p = plan(planned_room, cands, goals, objective=objective, watch=watch)
    watch.step("checking", detail="the room as described")
    before = occ.result if occ.result is not None else result
    treated = apply_to_room(planned_room, cands, p.amounts)
    if occ.result is None:
        described_after = evaluate(treated, reverberant_model=result.reverberant_model,
                                   method=method)
    else:
        described_after = evaluate(apply_to_room(room, cands, p.amounts),
                                   reverberant_model=result.reverberant_model, method=method)
    return PlanRun(p, tuple(cands), spec.target.currency or "", before, treated, goals, occ,
                   result, described_after, applied)


def _names(names) -> str:
    """'A', 'B' and 'C'."""
    q = [f"'{n}'" for n in names]
    return q[0] if len(q) == 1 else ", ".join(q[:-1]) + " and " + q[-1]
