"""Checks of the planner's inputs: candidates and goals against the room.

Per-band arrays go through :func:`roomcalc.engine.checks.band_values` (the engine's one home of
input checks); what is particular to a plan (kinds, surfaces by index, receivers by name, a
window whose minimum is above its maximum) is checked here. Messages name the field as
``candidates[i].field`` or ``goals.field`` and the allowed range.
"""

from __future__ import annotations

import math
import operator

import numpy as np

from roomcalc.engine import checks
from roomcalc.engine.model import Room
from roomcalc.engine.planner.goals import (KINDS, OBJECTIVES, PLAN_METHODS, Candidate, Goals,
                                           LevelGoal)

__all__ = ["ALPHA_MAX", "check_candidates", "check_goals"]

#: Largest alpha a cover candidate may have: the catalogue's largest (ISO 354 test reports
#: give values above 1; roomcalc.io.catalog.ALPHA_MAX, which a test keeps equal to this).
ALPHA_MAX = 1.2


def _check_cover(cd: Candidate, at: str, who: str, ns: int, bands) -> None:
    if cd.surface is None or isinstance(cd.surface, bool) or cd.surface == ():
        raise ValueError(f"{at}.surface: a cover candidate needs a surface, an index "
                         f"0 to {ns - 1} into the room's surfaces (or a tuple of them){who}")
    seen = set()
    for s in (cd.surface if isinstance(cd.surface, tuple) else (cd.surface,)):
        try:
            if isinstance(s, bool):
                raise TypeError
            si = operator.index(s)
        except TypeError:
            raise ValueError(f"{at}.surface: {s!r} must be a whole number 0 to "
                             f"{ns - 1} (an index into the room's surfaces){who}") from None
        if not 0 <= si < ns:
            raise ValueError(f"{at}.surface: {si} is out of range 0 to {ns - 1} (the room "
                             f"has {ns} surfaces){who}")
        if si in seen:
            raise ValueError(f"{at}.surface: {si} is given twice; each surface once{who}")
        seen.add(si)
    if cd.alpha is None:
        raise ValueError(f"{at}.alpha: a cover candidate needs alpha, {len(bands)} values "
                         f"from 0 to {ALPHA_MAX:g}{who}")
    checks.band_values(f"{at}.alpha", cd.alpha, bands, 0.0, ALPHA_MAX)
    if cd.step is not None:
        st = float(cd.step)
        if not (math.isfinite(st) and st > 0):
            raise ValueError(f"{at}.step: {cd.step!r} must be finite and above 0 m^2 "
                             f"(or None for any area){who}")


def _check_units(cd: Candidate, at: str, who: str, bands) -> None:
    if cd.absorption is None:
        raise ValueError(f"{at}.absorption: a units candidate needs absorption, {len(bands)} "
                         f"values of 0 or more [m^2 per unit]{who}")
    checks.band_values(f"{at}.absorption", cd.absorption, bands, 0.0, unit="m^2 per unit")
    ae = float(cd.area_each)
    if not (math.isfinite(ae) and ae >= 0):
        raise ValueError(f"{at}.area_each: {cd.area_each!r} must be finite and 0 or "
                         f"more [m^2]{who}")


def check_candidates(room: Room, candidates) -> tuple[Candidate, ...]:
    """The candidates as a tuple, each checked against ``room``; ``ValueError`` naming
    ``candidates[i].field`` and the allowed range otherwise."""
    bands = tuple(room.bands_hz)
    ns = len(room.surfaces)
    out = []
    for i, cd in enumerate(candidates):
        if not isinstance(cd, Candidate):
            raise ValueError(f"candidates[{i}]: must be a Candidate, got {type(cd).__name__}")
        at = f"candidates[{i}]"
        who = f" (candidate '{cd.name}')"
        if cd.kind not in KINDS:
            raise ValueError(f"{at}.kind: {cd.kind!r} is not one of {list(KINDS)}{who}")
        cost = float(cd.cost)
        if not (math.isfinite(cost) and cost >= 0):
            raise ValueError(f"{at}.cost: {cd.cost!r} must be finite and 0 or more{who}")
        mx = float(cd.max_amount)
        if math.isnan(mx) or mx < 0:
            raise ValueError(f"{at}.max_amount: {cd.max_amount!r} must be 0 or more "
                             f"(inf for no limit) [m^2 or units]{who}")
        if cd.kind == "cover":
            _check_cover(cd, at, who, ns, bands)
        else:
            _check_units(cd, at, who, bands)
        out.append(cd)
    return tuple(out)


def _window(goals: Goals, bands) -> tuple[np.ndarray, np.ndarray]:
    nb = len(bands)
    rt = {}
    for key in ("rt60_max", "rt60_min"):
        val = getattr(goals, key)
        rt[key] = (np.full(nb, np.nan) if val is None else
                   checks.band_values(f"goals.{key}", val, bands, 0.0, low_inclusive=False,
                                      nan_ok=True, unit="s"))
    crossed = rt["rt60_min"] > rt["rt60_max"]          # False where either is NaN
    if crossed.any():
        i = int(np.nonzero(crossed)[0][0])
        raise ValueError(f"goals.rt60_min[{i}]: {rt['rt60_min'][i]:g} s at {bands[i]:g} Hz is "
                         f"above rt60_max ({rt['rt60_max'][i]:g} s); the minimum must be at "
                         "most the maximum")
    return rt["rt60_max"], rt["rt60_min"]


def _check_level(room: Room, lg, i: int, bands) -> None:
    at = f"goals.levels[{i}]"
    if not isinstance(lg, LevelGoal):
        raise ValueError(f"{at}: must be a LevelGoal, got {type(lg).__name__}")
    names = [r.name for r in room.receivers]
    if lg.receiver not in names:
        raise ValueError(f"{at}.receiver: {lg.receiver!r} is not a receiver of the room "
                         f"(receivers: {', '.join(repr(n) for n in names) or 'none'})")
    if lg.max_dba is not None and not math.isfinite(float(lg.max_dba)):
        raise ValueError(f"{at}.max_dba: {lg.max_dba!r} must be a finite level [dB(A)] "
                         "or None")
    if lg.max_db is not None:
        checks.band_values(f"{at}.max_db", lg.max_db, bands, nan_ok=True, unit="dB")
    if not room.sources and (lg.max_dba is not None or lg.max_db is not None):
        raise ValueError(f"{at}: a level goal needs at least one source in the room")


def check_goals(room: Room, goals: Goals, objective) -> tuple[str, np.ndarray, np.ndarray]:
    """Check ``goals`` (and ``objective``, None for ``goals.objective``) against ``room``.

    Returns (objective, rt60_max, rt60_min), the window per band with NaN for no limit.
    Whether ``goals.method`` can be evaluated for this room (Fitzroy and Arau-Puchades need a
    box whose surfaces name their faces) is checked where the room is first evaluated.
    """
    if not isinstance(goals, Goals):
        raise ValueError(f"goals: must be a Goals, got {type(goals).__name__}")
    bands = tuple(room.bands_hz)
    if goals.method not in PLAN_METHODS:
        raise ValueError(f"goals.method: {goals.method!r} is not one of {list(PLAN_METHODS)}")
    objective = goals.objective if objective is None else objective
    if objective not in OBJECTIVES:
        raise ValueError(f"objective: {objective!r} is not one of {list(OBJECTIVES)}")
    rt_max, rt_min = _window(goals, bands)
    for i, lg in enumerate(goals.levels):
        _check_level(room, lg, i, bands)
    return objective, rt_max, rt_min
