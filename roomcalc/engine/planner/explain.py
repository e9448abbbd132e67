"""Checking a plan with the engine, and explaining in words the goals it misses.

Public within the package: :func:`evaluate_plan`, :func:`violations`, :func:`describe`,
:func:`explain`.
"""

from __future__ import annotations

import numpy as np

from roomcalc.engine.analysis import METHOD_TITLES, evaluate
from roomcalc.engine.bands import band_constants
from roomcalc.engine.planner.apply import apply_to_room
from roomcalc.engine.planner.model import (LEVEL_TOL_DB, LOW_FREQUENCY_HZ, MAX_CUT_ROUNDS,
                                           RT_TOL_S, BandLevelKey, DbaKey, Miss, PlanModel,
                                           RtKey)
from roomcalc.engine.planner.solve import solve

__all__ = ["evaluate_plan", "violations", "describe", "explain"]


def evaluate_plan(model: PlanModel, x):
    """The engine's result for the room treated with amounts x, by the goals' formula."""
    return evaluate(apply_to_room(model.room, model.candidates, x), method=model.method)


def violations(model: PlanModel, res) -> list[Miss]:
    """Every goal the evaluated room misses, with the engine's value and the limit."""
    out = []
    t = res.rt60_s[model.method]
    for b in range(len(model.bands)):
        if not np.isnan(model.rt_max[b]) and t[b] > model.rt_max[b] + RT_TOL_S:
            out.append(Miss(key=RtKey("rt_max", b), value=float(t[b]),
                            limit=float(model.rt_max[b])))
        if not np.isnan(model.rt_min[b]) and t[b] < model.rt_min[b] - RT_TOL_S:
            out.append(Miss(key=RtKey("rt_min", b), value=float(t[b]),
                            limit=float(model.rt_min[b])))
    recs = {r.name: r for r in res.receivers}
    for gi, lg in enumerate(model.goals.levels):
        r = recs[lg.receiver]
        if lg.max_db is not None:
            for b in range(len(model.bands)):
                lim = float(lg.max_db[b])
                if not np.isnan(lim) and r.level_db[b] > lim + LEVEL_TOL_DB:
                    out.append(Miss(key=BandLevelKey(gi, b), value=float(r.level_db[b]),
                                    limit=lim, direct=float(r.direct_db[b])))
        if lg.max_dba is not None and r.level_dba > lg.max_dba + LEVEL_TOL_DB:
            out.append(Miss(key=DbaKey(gi), value=float(r.level_dba),
                            limit=float(lg.max_dba), direct=float(r.direct_dba)))
    return out


def describe(model: PlanModel, x) -> str:
    """The treatment x in words, for the reasons."""
    parts = []
    at_limit = x >= model.ub_x - 0.005
    for group in model.surface_groups:
        si, idx, area, share = group.surface, group.candidates, group.area, group.share()
        used = [j for j in idx if x[j] > 0]
        if not used:
            continue
        on = dict(zip(idx, (share * x[idx]).tolist()))      # m^2 of each on this surface
        total = float(sum(on[j] for j in used))
        names = [f"'{model.candidates[j].name}'" for j in used]
        with_ = (names[0] if len(used) == 1 else
                 " and ".join(f"{nm} ({on[j]:.1f} m^2)" for nm, j in zip(names, used)))
        sname = model.room.surfaces[si].name
        if total >= area - 0.005:
            parts.append(f"covering all {area:.1f} m^2 of '{sname}' with {with_}")
        else:
            limit = " (as much as it may)" if len(used) == 1 and at_limit[used[0]] else ""
            parts.append(f"covering {total:.1f} of the {area:.1f} m^2 of '{sname}' with "
                         f"{with_}{limit}")
    for j, cd in enumerate(model.candidates):
        if cd.kind == "units" and x[j] > 0:
            parts.append(f"adding {'all ' if at_limit[j] else ''}{x[j]:g} units of '{cd.name}'")
    if not parts:
        return ""
    return parts[0] if len(parts) == 1 else ", ".join(parts[:-1]) + " and " + parts[-1]


def _advice(band_hz, more=True) -> str:
    if not more:
        return ("remove absorption there or choose candidates that absorb less at "
                f"{band_hz:g} Hz (reflective or diffusing finishes)")
    if band_hz <= LOW_FREQUENCY_HZ:
        return "add low-frequency absorbers"
    return f"add more absorbing area, or candidates that absorb more at {band_hz:g} Hz"


def _cap(text: str) -> str:
    return text[0].upper() + text[1:]


def _rt_reason(model: PlanModel, miss: Miss, res, how: str) -> str:
    kind, b = miss.key.kind, miss.key.band
    band, title = model.bands[b], METHOD_TITLES[model.method]
    t_best = float(res.rt60_s[model.method][b])
    if kind == "rt_max" and t_best > miss.limit + RT_TOL_S:
        lead = (f"even {how} (the most absorption the candidates allow at {band:g} Hz)"
                if how else f"no candidate adds absorption at {band:g} Hz, so the room")
        return (f"{_cap(lead)} leaves {band:g} Hz at {t_best:.2f} s against "
                f"{miss.limit:.2f} s ({title}); {_advice(band)}")
    if kind == "rt_min" and t_best < miss.limit - RT_TOL_S:
        lead = f"even the least absorbing choice ({how})" if how else "even untreated, the room"
        return (f"{_cap(lead)} leaves {band:g} Hz at {t_best:.2f} s against a minimum of "
                f"{miss.limit:.2f} s ({title}): it is too dead there already; "
                f"{_advice(band, more=False)}")
    word = "at most" if kind == "rt_max" else "at least"
    return (f"{band:g} Hz ends at {miss.value:.2f} s against {word} {miss.limit:.2f} s "
            f"({title}): the candidates can meet this goal alone but not together with the "
            "others (this plan has the least total shortfall); "
            + (_advice(band) + " that leave the other bands alone" if kind == "rt_max"
               else _advice(band, more=False)))


def _level_reason(model: PlanModel, miss: Miss, res) -> str:
    key = miss.key
    name = model.goals.levels[key.goal].receiver
    rec = next(r for r in res.receivers if r.name == name)
    if key.kind == "dba":
        l_best, direct, unit, who = float(rec.level_dba), float(rec.direct_dba), "dB(A)", name
        rev = rec.reverberant_db + band_constants(model.bands)[1]
        band = model.bands[int(np.argmax(rev))]
    else:
        band = model.bands[key.band]
        l_best, direct, unit = float(rec.level_db[key.band]), float(rec.direct_db[key.band]), "dB"
        who = f"{name}, {band:g} Hz"
    lim = miss.limit
    if direct >= lim:
        return (f"{who}: {l_best:.1f} {unit} at best against {lim:.1f} {unit}; the direct "
                f"sound alone gives {direct:.1f} {unit} there, so absorption cannot reach it: "
                "move the receiver or the source, enclose or quieten the source")
    if l_best > lim + LEVEL_TOL_DB:
        return (f"{who}: {l_best:.1f} {unit} at best against {lim:.1f} {unit} (the direct "
                f"sound alone gives {direct:.1f} {unit}"
                + (f"; the reverberant sound is strongest at {band:g} Hz"
                   if key.kind == "dba" else "")
                + f"); the candidates cannot absorb enough: {_advice(band)}")
    return (f"{who}: {miss.value:.1f} {unit} against {lim:.1f} {unit}: the candidates can "
            "meet this goal alone but not together with the others (this plan has the least "
            "total shortfall)")


def explain(model: PlanModel, misses, stopped: bool) -> list[str]:
    """One reason per missed goal: what the candidates reach at best on that goal alone (the
    elastic solve of its row, judged by the engine), and why that is not enough (or that the
    goals conflict). ``model.rows`` are the rows the plan was made with."""
    reasons = []
    rows = {r.key: r for r in model.rows}
    levels = {g.key: g for g in model.levels}
    for miss in misses:
        key = miss.key
        if stopped and key.kind in ("dba", "band_level"):
            name = model.goals.levels[key.goal].receiver
            unit = "dB(A)" if key.kind == "dba" else f"dB at {model.bands[key.band]:g} Hz"
            reasons.append(f"'{name}': the cutting planes stopped after {MAX_CUT_ROUNDS} "
                           f"rounds at {miss.value:.1f} {unit} against {miss.limit:.1f}; the "
                           "plan may fall a little short of this goal")
            continue
        best = solve(model, [rows[key]] if key in rows else [],
                     [levels[key]] if key in levels else [], elastic=True)
        x_best = best.x if best.x is not None else np.zeros(model.n)
        res = evaluate_plan(model, x_best)
        if isinstance(key, RtKey):
            reasons.append(_rt_reason(model, miss, res, describe(model, x_best)))
        else:
            reasons.append(_level_reason(model, miss, res))
    return reasons
