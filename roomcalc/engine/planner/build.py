"""Building the planner's linear programme (:class:`~.model.PlanModel`) from a room.

Public within the package: :func:`build_model` (the whole model, RT rows at the goals' own
window) and :func:`with_rt_limits` (the same model with the RT rows rebuilt for other limits,
which is how a formula that is not linear in the amounts is planned).
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from roomcalc.engine.analysis import ALPHA_LOG_MAX, METHOD_TITLES, evaluate
from roomcalc.engine.bands import band_constants
from roomcalc.engine.model import Room
from roomcalc.engine.planner.bounds import LN10
from roomcalc.engine.planner.goals import Goals, cover_shares, cover_surfaces
from roomcalc.engine.planner.inputs import check_candidates, check_goals
from roomcalc.engine.planner.model import (DB_PER_NEPER, EXACT_METHODS, BandLevelKey, DbaKey,
                                           LevelCut, PlanModel, Row, RtKey, SurfaceGroup)

__all__ = ["build_model", "with_rt_limits", "linear_method_of"]


def linear_method_of(method: str) -> str:
    """The linear formula a plan by ``method`` is made with: the method itself where its RT
    goal is linear in the amounts (Sabine, Eyring, Millington-Sette), else Eyring."""
    return method if method in EXACT_METHODS else "eyring"


def _gain(method: str, alpha_new, alpha_old) -> np.ndarray:
    """Change of the linear formula's absorption per m^2 covered [m^2/m^2], per band: Sabine
    takes alpha as given; the logarithmic formulas cap it at ALPHA_LOG_MAX as the engine
    does; Millington-Sette's absorption per m^2 is -ln(1 - alpha)."""
    if method == "sabine":
        return np.asarray(alpha_new) - np.asarray(alpha_old)
    a_new = np.minimum(alpha_new, ALPHA_LOG_MAX)
    a_old = np.minimum(alpha_old, ALPHA_LOG_MAX)
    if method == "millington":
        return np.log1p(-a_old) - np.log1p(-a_new)
    return a_new - a_old


def _base_absorption(method: str, areas, alphas, a_obj) -> np.ndarray:
    """The untreated room's absorption in the linear formula's terms [m^2] (air excluded)."""
    if method == "sabine":
        return areas @ alphas + a_obj
    a_log = np.minimum(alphas, ALPHA_LOG_MAX)
    if method == "millington":
        return -(areas @ np.log1p(-a_log)) + a_obj
    return areas @ a_log + a_obj


def _variables(room: Room, cands, objective, method, alphas, areas) -> dict:
    """Per-candidate columns: gains, steps, integrality, upper bounds, objective weights."""
    n, nb = len(cands), alphas.shape[1]
    out = {k: np.zeros((n, nb)) for k in ("g_rt", "g_log")}
    out.update(step=np.ones(n), integer=np.zeros(n, bool), ub_x=np.zeros(n),
               primary=np.zeros(n), secondary=np.zeros(n))
    groups: dict[int, list[tuple[int, float]]] = {}
    for j, cd in enumerate(cands):
        if cd.kind == "cover":
            # One amount spread over its surfaces in proportion to their areas: the gain per
            # m^2 is the share-weighted mean of the gains on each (Sabine: sum_i w_i
            # (alpha_j - alpha_i), from A = sum S alpha).
            sis = list(cover_surfaces(cd))
            w = cover_shares(areas[sis])
            for si, wi in zip(sis, w):
                groups.setdefault(si, []).append((j, float(wi)))
            out["g_rt"][j] = w @ np.array([_gain(method, cd.alpha, alphas[si]) for si in sis])
            out["g_log"][j] = w @ np.array([_gain("eyring", cd.alpha, alphas[si])
                                            for si in sis])
            out["ub_x"][j] = min(float(cd.max_amount), float(areas[sis].sum()))
            area_each = 1.0
            if cd.step is not None:
                out["step"][j], out["integer"][j] = float(cd.step), True
        else:
            out["g_rt"][j] = out["g_log"][j] = cd.absorption
            out["ub_x"][j] = float(cd.max_amount)
            area_each = float(cd.area_each)
            out["integer"][j] = bool(cd.integer)
        cost = float(cd.cost)
        out["primary"][j], out["secondary"][j] = ((cost, area_each) if objective == "cost"
                                                  else (area_each, cost))
    step, integer = out["step"], out["integer"]
    ub_y = out["ub_x"] / step
    out["ub_y"] = np.where(integer & np.isfinite(ub_y), np.floor(ub_y + 1e-9), ub_y)
    out["ub_x"] = np.where(integer, out["ub_y"] * step, out["ub_x"])
    out["surface_groups"] = tuple(
        SurfaceGroup(si, [j for j, _ in jw], float(areas[si]),
                     None if all(w == 1.0 for _, w in jw) else np.array([w for _, w in jw]))
        for si, jw in sorted(groups.items()))
    return out


def _rt_row(model_like: dict, key: RtKey, t: float) -> Row | None:
    """The linear row of one RT goal at limit t [s], or None when it always holds."""
    b, v, s_tot, cap_area = key.band, model_like["volume"], model_like["s_tot"], \
        model_like["cap_area"]
    logarithmic = model_like["linear_method"] == "eyring"
    y_need = model_like["kv"] / t - 4.0 * float(model_like["m"][b]) * v
    bound = -s_tot * math.expm1(-y_need / s_tot) if logarithmic else y_need
    g, a0 = model_like["g_rt"][:, b], float(model_like["a0_rt"][b])
    impossible = False
    if key.kind == "rt_max":
        if bound <= 0:
            return None                         # air alone is enough
        if logarithmic and bound > cap_area:
            impossible, bound = True, cap_area
        coef, rhs = g, bound - a0
    else:
        if logarithmic and bound >= cap_area:
            return None                         # the capped formula never goes below T_min
        coef, rhs = -g, a0 - bound
    # A slack s (relative RT beyond the limit, linearised at the bound) moves the row by
    # s * dA/d(ln T).
    frac = (max(1.0 - min(max(bound, 0.0), cap_area) / s_tot, 1.0 - ALPHA_LOG_MAX)
            if logarithmic else 1.0)
    return Row(key=key, coef=np.array(coef, dtype=float), rhs=float(rhs), bound=float(bound),
               slack_scale=float(model_like["kv"] / t * frac), impossible=impossible)


def _rt_rows(fields: dict, t_max, t_min) -> tuple[Row, ...]:
    rows = []
    for b in range(len(t_max)):
        for kind, t in (("rt_max", t_max[b]), ("rt_min", t_min[b])):
            if not np.isnan(t):
                row = _rt_row(fields, RtKey(kind, b), float(t))
                if row is not None:
                    rows.append(row)
    return tuple(rows)


def with_rt_limits(model: PlanModel, t_max, t_min) -> PlanModel:
    """``model`` with its RT rows made for the limits ``t_max``/``t_min`` [s] per band (NaN:
    none) instead of the goals' window; the level rows and cuts are kept."""
    fields = {f.name: getattr(model, f.name) for f in dataclasses.fields(model)}
    others = tuple(r for r in model.rows if not isinstance(r.key, RtKey))
    return dataclasses.replace(model, rows=_rt_rows(fields, t_max, t_min) + others)


def _direct_terms(room: Room, before, nb) -> dict:
    """Per receiver: the direct term D_b and total power P_b of all sources (relative)."""
    ra = before.receiver_arrays
    if ra is None:
        return {}
    power = 10.0 ** (np.array([s.sound_power_db for s in room.sources]).reshape(-1, nb) / 10.0)
    q = np.array([s.directivity for s in room.sources])
    return {name: ((q / (4.0 * np.pi * ra.distances_m[i] ** 2)) @ power, power.sum(axis=0))
            for i, name in enumerate(ra.names)}


def _level_goals(goals: Goals, direct, bands, g_log, u0, s_tot, cap_area):
    """Rows of the band level limits and cuts of the dB(A) limits."""
    rows, cuts = [], []
    w = 10.0 ** (band_constants(bands)[1] / 10.0)
    for gi, lg in enumerate(goals.levels):
        if lg.max_dba is None and lg.max_db is None:
            continue
        d, p = direct[lg.receiver]
        for b in range(len(bands)) if lg.max_db is not None else ():
            lmax = float(lg.max_db[b])
            if np.isnan(lmax):
                continue
            lim = 10.0 ** (lmax / 10.0)
            den = lim - d[b] + 4.0 * p[b] / s_tot
            need = 4.0 * p[b] / den if den > 0 else math.inf
            eff = min(need, cap_area)
            rows.append(Row(key=BandLevelKey(gi, b), coef=g_log[:, b].copy(),
                            rhs=float(eff - u0[b]), bound=float(eff),
                            slack_scale=float(eff ** 2 * lim / (4.0 * p[b] * DB_PER_NEPER)),
                            impossible=need > cap_area))
        if lg.max_dba is not None:
            cuts.append(LevelCut(key=DbaKey(gi), receiver=lg.receiver,
                                 limit_dba=float(lg.max_dba),
                                 lim=10.0 ** (float(lg.max_dba) / 10.0), w=w, d=d, p=p))
    return tuple(rows), tuple(cuts)


def _evaluate_before(room: Room, method: str):
    """The untreated room by ``method``; a ValueError naming ``goals.method`` when the room
    cannot be evaluated by it (Fitzroy and Arau-Puchades need a box with faces)."""
    try:
        return evaluate(room, method=method)
    except ValueError:
        plain = evaluate(room)                  # raises if the room itself is the problem
        if method in plain.rt60_s:
            raise
        why = getattr(plain, "unavailable", {}).get(method, "it cannot be evaluated here")
        raise ValueError(f"goals.method: {METHOD_TITLES[method]} is unavailable for this room "
                         f"({why}); plan with 'sabine', 'eyring' or 'millington'") from None


def build_model(room: Room, candidates, goals: Goals, objective) -> PlanModel:
    """Check the inputs, evaluate the untreated room and build its linear programme."""
    if not isinstance(room, Room):
        raise ValueError(f"room: must be a Room, got {type(room).__name__}")
    objective, rt_max, rt_min = check_goals(room, goals, objective)
    cands = check_candidates(room, candidates)
    method = goals.method
    before = _evaluate_before(room, method)
    lin = linear_method_of(method)
    bands = tuple(before.bands_hz)
    v, s_tot, m = before.volume_m3, before.surface_area_m2, before.air_m_per_m
    areas = np.array([sf.total_area for sf in room.surfaces])
    alphas = np.array([sf.alpha for sf in room.surfaces]).reshape(len(areas), len(bands))
    a_obj = before.object_absorption_m2
    cols = _variables(room, cands, objective, lin, alphas, areas)
    a0_log = _base_absorption("eyring", areas, alphas, a_obj)
    u0 = a0_log + 4.0 * m * v
    fields = dict(room=room, candidates=cands, goals=goals, method=method, linear_method=lin,
                  objective=objective, rt_max=rt_max, rt_min=rt_min, bands=bands,
                  before=before, n=len(cands), volume=v, s_tot=s_tot, m=m,
                  kv=24.0 * LN10 / before.speed_of_sound_m_s * v,
                  cap_area=ALPHA_LOG_MAX * s_tot,
                  a0_rt=_base_absorption(lin, areas, alphas, a_obj), a0_log=a0_log, u0=u0,
                  direct=_direct_terms(room, before, len(bands)) if goals.levels else {},
                  **cols)
    level_rows, cuts = _level_goals(goals, fields["direct"], bands, cols["g_log"], u0, s_tot,
                                    fields["cap_area"])
    return PlanModel(rows=_rt_rows(fields, rt_max, rt_min) + level_rows, levels=cuts, **fields)
