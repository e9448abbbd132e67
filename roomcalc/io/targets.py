"""What the room must reach, whether it does, the workers' daily exposure, and the plan: the
numbers (from the engine) turned into report sections and dictionaries. No Textual here.

- :func:`target_check` -- the room against its ``[target]``: RT60 per band against the
  criterion's or the file's own window (by the target's method), levels at receivers.
- :func:`exposures` -- each receiver with a working pattern: LAeq, LEX,8h, EU action values,
  OSHA dose and TWA, NIOSH dose, with the caution.
- :func:`make_plan` -- the planner run on a room file's target and candidates.
- ``*_text`` and ``*_dict`` -- the same as report sections (80 columns) and JSON (SI).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from roomcalc.engine.analysis import RoomResult, evaluate
from roomcalc.engine.bands import a_weighted_total
from roomcalc.engine.criteria import Assessment, assess, user_window
from roomcalc.engine.exposure import (EXPOSURE_CAUTION, ExposureSummary, compare_exposure,
                                      day_periods, exposure_summary)
from roomcalc.engine.model import Room
from roomcalc.engine.planner import Candidate, Plan
from roomcalc.io.roomfile import RoomSpec
from roomcalc.io.units import METRIC, Units

METHOD_NAMES = {"sabine": "Sabine", "eyring": "Eyring"}


def _f(x, nd=2) -> str:
    return "-" if x is None or not math.isfinite(float(x)) else f"{float(x):.{nd}f}"


def _band(b) -> str:
    return f"{b:g}" if b < 1000 else f"{b / 1000:g}k"


# ----------------------------------------------------------------------------- target check

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


@dataclass(frozen=True)
class TargetCheck:
    """The room against its target: the RT60 assessment (None when the target sets no RT
    window) by ``method``, and the level goals."""

    method: str
    assessment: Assessment | None
    levels: tuple[LevelCheck, ...]

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


def target_check(spec: RoomSpec, room: Room, result: RoomResult, criteria=None,
                 filename: str = "<room>") -> TargetCheck | None:
    """The room against its ``[target]`` (None if it has none). Raises RoomFileError when the
    target cannot be resolved (an unknown criterion, one that does not apply)."""
    from roomcalc.io.planning import resolve_goals

    if spec.target is None:
        return None
    goals = resolve_goals(spec, room, criteria, filename=filename)
    method = goals.method
    rt = result.rt60_s[method]
    assessment = None
    if spec.target.criterion:
        from roomcalc.io.criteria import load_criteria

        library = criteria if criteria is not None else load_criteria()
        assessment = assess(library[spec.target.criterion], room.volume, room.bands_hz, rt)
    elif goals.rt60_max is not None or goals.rt60_min is not None:
        window = user_window(room.bands_hz, goals.rt60_min, goals.rt60_max,
                             id="room-file", title="the room file's own window")
        assessment = assess(window, room.volume, room.bands_hz, rt)
    levels = []
    by_name = {r.name: r for r in result.receivers}
    for g in goals.levels:
        r = by_name.get(g.receiver)
        if r is not None and g.max_dba is not None:
            levels.append(LevelCheck(g.receiver, float(r.level_dba), float(g.max_dba)))
    return TargetCheck(method, assessment, tuple(levels))


def target_text(check: TargetCheck, width=None) -> str:
    """The target section of the text report (``width`` 0: lines unwrapped)."""
    from roomcalc.io.report import wrap

    lines = [f"Target (RT60 by {METHOD_NAMES.get(check.method, check.method)})"]
    a = check.assessment
    if a is not None:
        c = a.criterion
        lines.append(f"  {c.title}" + (f" ({c.edition})" if c.edition else ""))
        if not a.applicable:
            lines.append(wrap(f"not applicable: {a.reason}", "  ", "    ", width=width))
        else:
            if math.isfinite(a.nominal_s):
                lines.append(f"  nominal target {a.nominal_s:.2f} s")
            lines.append(f"  {'band':>6} {'min [s]':>8} {'max [s]':>8} {'estimate':>9} "
                         f"{'margin':>7}  verdict")
            for i, b in enumerate(a.bands_hz):
                if not a.in_assessment[i]:
                    continue
                lines.append(f"  {_band(b):>6} {_f(a.target_min_s[i]):>8} "
                             f"{_f(a.target_max_s[i]):>8} {_f(a.estimate_s[i]):>9} "
                             f"{_f(a.margin_s[i]):>7}  {a.band_status[i]}")
            if math.isfinite(a.mean_s):
                lines.append(f"  mean of the assessed bands {a.mean_s:.2f} s against "
                             f"{_f(a.mean_min_s)}-{_f(a.mean_max_s)} s, margin "
                             f"{_f(a.mean_margin_s)} s: {a.mean_status}")
            lines.append(f"  overall: {a.status}")
        if c.source:
            lines.append(wrap(f"source: {c.source}", "  ", "    ", width=width))
        if a.provenance:
            lines.append(wrap(f"values: {a.provenance}", "  ", "    ", width=width))
        if math.isfinite(a.background_dba):
            lines.append(f"  background noise limit (not checked here): {a.background_dba:g} "
                         "dB(A)")
        lines.append(wrap(a.governs, "  ", "  ", width=width))
    for lc in check.levels:
        lines.append(f"  {lc.receiver}: {lc.level_dba:.1f} dB(A) against at most "
                     f"{lc.max_dba:.1f} dB(A), margin {lc.margin_db:+.1f} dB: "
                     f"{'pass' if lc.passed else 'fail'}")
    return "\n".join(lines) + "\n"


def target_dict(check: TargetCheck) -> dict:
    a = check.assessment
    out = {"method": check.method, "status": check.status, "levels": [
        {"receiver": lc.receiver, "level_dba": lc.level_dba, "max_dba": lc.max_dba,
         "margin_db": lc.margin_db, "pass": lc.passed} for lc in check.levels]}
    if a is not None:
        def nan_none(x):
            return [None if not math.isfinite(float(v)) else float(v) for v in x]
        out["rt60"] = {
            "criterion": a.criterion.id, "title": a.criterion.title,
            "applicable": a.applicable, "reason": a.reason, "status": a.status,
            "bands_hz": [int(b) for b in a.bands_hz], "estimate_s": nan_none(a.estimate_s),
            "min_s": nan_none(a.target_min_s), "max_s": nan_none(a.target_max_s),
            "margin_s": nan_none(a.margin_s), "verdict": list(a.band_status),
            "provenance": a.provenance, "governs": a.governs}
    return out


# ----------------------------------------------------------------------------- exposure

def exposures(spec: RoomSpec, result: RoomResult) -> dict[str, ExposureSummary]:
    """Each receiver with a working pattern (``hours``): its day by every rule in
    :mod:`roomcalc.engine.exposure`, from each source's A-weighted level at it."""
    from roomcalc.io.planning import work_patterns

    out = {}
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


def exposure_text(days: dict[str, ExposureSummary], after: dict | None = None,
                  width=None) -> str:
    """The daily-exposure section of the text report (``width`` 0: lines unwrapped)."""
    from roomcalc.io.report import wrap

    if not days:
        return ""
    lines = ["Daily noise exposure (receivers with a working pattern)"]
    for name, d in days.items():
        lines.append(f"  {name}: {d.total_hours:g} h; LAeq {d.laeq_dba:.1f} dB(A), "
                     f"LEX,8h {d.lex_8h_dba:.1f} dB(A)")
        lines.append(wrap(f"EU 2003/10/EC: {d.eu.label}", "    ", "    ", width=width))
        lines.append(wrap(f"OSHA dose {d.osha_dose_percent:.0f} % (TWA {d.osha_twa_dba:.1f} dBA"
                           f"{', action level reached' if d.osha_action_level_reached else ''}"
                           f"{', PEL exceeded' if d.osha_pel_exceeded else ''}); NIOSH dose "
                           f"{d.niosh_dose_percent:.0f} %"
                           f"{' (REL exceeded)' if d.niosh_rel_exceeded else ''}",
                           "    ", "    ", width=width))
        if after and name in after:
            ch = compare_exposure(d, after[name])
            lines.append(f"    after the plan: LEX,8h {after[name].lex_8h_dba:.1f} dB(A) "
                         f"({ch.lex_8h_change_db:+.1f} dB), OSHA dose "
                         f"{after[name].osha_dose_percent:.0f} %")
    lines.append(wrap(EXPOSURE_CAUTION, "  ! ", "    ", width=width))
    return "\n".join(lines) + "\n"


def exposure_dict(days: dict[str, ExposureSummary]) -> dict:
    return {name: {"hours": d.total_hours, "laeq_dba": d.laeq_dba, "lex_8h_dba": d.lex_8h_dba,
                   "eu_band": d.eu.band, "osha_dose_percent": d.osha_dose_percent,
                   "osha_twa_dba": d.osha_twa_dba, "niosh_dose_percent": d.niosh_dose_percent,
                   "caution": d.caution} for name, d in days.items()}


# ----------------------------------------------------------------------------- plan

@dataclass(frozen=True, eq=False)
class PlanRun:
    """A plan made from a room file, with what is needed to show and apply it."""

    plan: Plan
    candidates: tuple[Candidate, ...]
    currency: str
    before: RoomResult
    after_room: Room


def make_plan(spec: RoomSpec, room: Room, catalog, criteria=None, *, objective=None,
              enabled=None, filename: str = "<room>") -> PlanRun:
    """Run the planner on a room file's ``[target]`` and ``[[candidates]]`` (``enabled``: the
    names of the candidates to use, None = all). Raises RoomFileError when the target or a
    candidate cannot be resolved, ValueError when there is nothing to plan with."""
    from roomcalc.engine.planner import apply_to_room, plan
    from roomcalc.io.planning import resolve_candidates, resolve_goals

    goals = resolve_goals(spec, room, criteria, filename=filename)
    cands = resolve_candidates(spec, room, catalog, objective=objective, filename=filename)
    if enabled is not None:
        cands = [c for c in cands if c.name in enabled]
    if not cands:
        raise ValueError("there are no candidates to plan with: add [[candidates]] to the room "
                         "file (or tick some)")
    p = plan(room, cands, goals, objective=objective)
    return PlanRun(p, tuple(cands), spec.target.currency or "", evaluate(room),
                   apply_to_room(room, cands, p.amounts))


def plan_dict(run: PlanRun, u: Units = METRIC) -> dict:
    """The plan as JSON (SI): ``feasible``, ``items`` (``candidate``, ``surface`` or null,
    ``area_m2`` or ``count``, ``cost``), ``total_cost``, ``rt60_after_s``, ``method``, and more."""
    p = run.plan
    items = []
    for it in p.items:
        d = {"candidate": it.candidate, "surface": it.surface}
        d["area_m2" if it.kind == "cover" else "count"] = it.amount
        d["cost"] = it.cost
        items.append(d)
    return {"feasible": p.feasible, "method": p.method, "objective": p.objective,
            "currency": run.currency, "items": items, "total_cost": p.total_cost,
            "total_area_m2": p.total_area, "bands_hz": [int(b) for b in run.before.bands_hz],
            "rt60_before_s": [float(x) for x in p.rt60_before],
            "rt60_after_s": [float(x) for x in p.rt60_after],
            "levels_before_dba": {k: float(v) for k, v in p.levels_before.items()},
            "levels_after_dba": {k: float(v) for k, v in p.levels_after.items()},
            "reasons": list(p.reasons), "solver": p.solver}


def plan_text(run: PlanRun, u: Units = METRIC, goals_window=None) -> str:
    p = run.plan
    lines = [f"Treatment plan ({'meets the target' if p.feasible else 'CANNOT meet the target'}"
             f"; least {p.objective}; RT60 by {METHOD_NAMES.get(p.method, p.method)})"]
    if p.items:
        cost_head = f"cost{' ' + run.currency if run.currency else ''}"
        lines.append(f"  {'what':34} {'where':18} {'how much':>12} {cost_head[:10]:>10}")
        for it in p.items:
            amount = (f"{it.amount / u.area:.2f} {u.area_label}" if it.kind == "cover"
                      else f"{it.amount:g} units")
            lines.append(f"  {it.candidate[:34]:34} {(it.surface or 'added')[:18]:18} "
                         f"{amount:>12} {it.cost:>10.2f}")
        lines.append(f"  {'total':34} {'':18} {p.total_area / u.area:>8.2f} {u.area_label:>3} "
                     f"{p.total_cost:>10.2f}")
    else:
        lines.append("  nothing to add: the room already meets its target" if p.feasible
                     else "  no candidate helps")
    bands = run.before.bands_hz
    lines.append("  " + f"{'RT60 [s]':16}" + "".join(f"{_band(b):>7}" for b in bands))
    lines.append("  " + f"{'before':16}" + "".join(f"{_f(x):>7}" for x in p.rt60_before))
    lines.append("  " + f"{'after':16}" + "".join(f"{_f(x):>7}" for x in p.rt60_after))
    if goals_window is not None:
        lo, hi = goals_window
        if hi is not None:
            lines.append("  " + f"{'at most':16}" + "".join(f"{_f(x):>7}" for x in hi))
        if lo is not None:
            lines.append("  " + f"{'at least':16}" + "".join(f"{_f(x):>7}" for x in lo))
    for name, before in p.levels_before.items():
        after = p.levels_after.get(name)
        lines.append(f"  {name}: {before:.1f} -> {after:.1f} dB(A) ({after - before:+.1f} dB)")
    from roomcalc.io.report import wrap

    for r in p.reasons:
        lines.append(wrap(r, "  ! ", "    "))
    return "\n".join(lines) + "\n"


def window_of(goals) -> tuple:
    """(rt60_min, rt60_max) arrays of a Goals, for showing beside a plan."""
    def arr(x):
        return None if x is None else np.asarray(x, dtype=float)
    return arr(goals.rt60_min), arr(goals.rt60_max)
