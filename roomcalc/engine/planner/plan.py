"""The planner's entry point: :func:`plan`."""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from roomcalc.engine.analysis import METHOD_TITLES
from roomcalc.engine.model import Room
from roomcalc.engine.planner.build import build_model, with_rt_limits
from roomcalc.engine.planner.explain import evaluate_plan, explain, violations
from roomcalc.engine.planner.goals import Candidate, Goals, Plan, PlanItem, cover_surfaces
from roomcalc.engine.planner.model import (MAX_CUT_ROUNDS, MAX_SURROGATE_ROUNDS,
                                           SURROGATE_MARGIN, Miss, PlanModel, RtKey)
from roomcalc.engine.progress import PlanWatch
from roomcalc.engine.planner.solve import Outcome, solve

__all__ = ["plan"]


@dataclass(frozen=True, kw_only=True)
class _Search:
    """Where the rounds of planning ended: the model (RT rows as last tightened), the strict
    solve, the elastic one when the strict one failed, the amounts and the engine's verdict."""

    model: PlanModel
    out: Outcome
    partial: Outcome | None
    x: np.ndarray
    after: object
    missed: list
    rounds: int


class _Limits:
    """The linear RT limits per band [s] while a formula is planned through another: each
    missed band's limit moves by a secant step in log-log terms (the first step scales it
    by the observed ratio), aiming at SURROGATE_MARGIN inside the goal."""

    #: Bounds of the secant's slope d ln(limit) / d ln(T by the formula in force).
    SLOPE_MIN, SLOPE_MAX = 1.0, 200.0

    def __init__(self, model: PlanModel):
        self.t = {"rt_max": model.rt_max.copy(), "rt_min": model.rt_min.copy()}
        self.last: dict = {}                  # goal key -> (ln limit, error, slope)

    def tighten(self, misses: list[Miss]) -> None:
        for mi in misses:
            kind, b = mi.key
            aim = 1.0 - SURROGATE_MARGIN if kind == "rt_max" else 1.0 + SURROGATE_MARGIN
            s, f = math.log(self.t[kind][b]), math.log(mi.value / (mi.limit * aim))
            slope = self.SLOPE_MIN
            if mi.key in self.last:
                s0, f0, slope0 = self.last[mi.key]
                slope = (s - s0) / (f - f0) if f != f0 else 2.0 * slope0
                if not math.isfinite(slope) or slope <= 0:
                    slope = 2.0 * slope0
                slope = min(max(slope, self.SLOPE_MIN), self.SLOPE_MAX)
            self.last[mi.key] = (s, f, slope)
            self.t[kind][b] = math.exp(s - slope * f)


def _search(model: PlanModel, watch: PlanWatch) -> _Search:
    """Plan with the linear rows; where the engine finds an RT goal missed by the formula in
    force (a formula planned through Eyring's bound, or rounding), tighten that band's limit
    and plan again, until the engine confirms, the rows can no longer be met, or
    MAX_SURROGATE_ROUNDS plans were made."""
    limits = _Limits(model)
    cur = model
    watch.max_attempts = MAX_SURROGATE_ROUNDS
    for rounds in range(1, MAX_SURROGATE_ROUNDS + 1):
        watch.attempt = rounds
        out = solve(cur, cur.rows, cur.levels, elastic=False, watch=watch)
        if out.status not in ("optimal", "stopped"):
            break
        watch.step("checking")
        after = evaluate_plan(cur, out.x)
        missed = violations(cur, after)
        rt_missed = [mi for mi in missed if isinstance(mi.key, RtKey)]
        if not rt_missed or rounds == MAX_SURROGATE_ROUNDS:
            return _Search(model=cur, out=out, partial=None, x=np.asarray(out.x, dtype=float),
                           after=after, missed=missed, rounds=rounds)
        limits.tighten(rt_missed)
        cur = with_rt_limits(model, limits.t["rt_max"], limits.t["rt_min"])
    partial = solve(cur, cur.rows, cur.levels, elastic=True, watch=watch)
    x = np.asarray(partial.x if partial.x is not None else np.zeros(model.n), dtype=float)
    watch.step("checking", elastic=True)
    after = evaluate_plan(cur, x)
    return _Search(model=cur, out=out, partial=partial, x=x, after=after,
                   missed=violations(cur, after), rounds=rounds)


def _status(s: _Search, stopped: bool) -> str:
    last = s.partial if s.partial is not None else s.out
    n_cuts = last.cuts
    text = f", {n_cuts} level cut{'s' if n_cuts != 1 else ''}" if n_cuts else ""
    if s.rounds > 1:
        text += (f", {s.rounds} plans to meet {METHOD_TITLES[s.model.method]} through "
                 "tightened linear bounds")
    solved = s.partial is None
    if not s.missed:
        if s.out.status == "stopped":
            return f"stopped after {MAX_CUT_ROUNDS} rounds of level cuts, within tolerance"
        return ("optimal" if solved else "met after rounding") + text
    if s.model.n == 0:
        return "infeasible: no candidates"
    if solved:
        return (f"stopped after {MAX_CUT_ROUNDS} rounds of level cuts" if stopped else
                "solved, but the engine finds a goal missed") + text
    return "infeasible: least total shortfall" + text


def _items(model: PlanModel, x) -> tuple[list, float, float, float]:
    items, cost_sum, area_sum, units_sum = [], 0.0, 0.0, 0.0
    for j, cd in enumerate(model.candidates):
        if x[j] <= 0:
            continue
        cost = float(x[j] * cd.cost)
        sname = (", ".join(model.room.surfaces[i].name for i in cover_surfaces(cd))
                 if cd.kind == "cover" else None)
        items.append(PlanItem(cd.name, cd.kind, sname, float(x[j]), cost))
        cost_sum += cost
        if cd.kind == "cover":
            area_sum += float(x[j])
        else:
            units_sum += float(x[j])
    return items, cost_sum, area_sum, units_sum


def plan(room: Room, candidates: Sequence[Candidate], goals: Goals, *,
         objective: str | None = None, progress=None, cancel=None,
         watch: PlanWatch | None = None) -> Plan:
    """The cheapest (or smallest) treatment that brings a room to its goals.

    Parameters
    ----------
    room : Room -- the untreated room
    candidates : sequence of Candidate -- what the plan may use; surfaces by index
    goals : Goals -- RT60 window per band (by ``goals.method``, one of PLAN_METHODS) and/or
        levels at receivers
    objective : "cost" (sum of cost x amount) or "area" (m^2 covered plus units x area_each);
        None takes ``goals.objective``
    progress : callable or None -- called with a
        :class:`~roomcalc.engine.progress.PlanProgress` at each step (building, each
        solver call, each cutting-plane round, each check of the treated room); steps count
        up from 1
    cancel : callable returning True to stop, an object with ``is_set()`` (such as
        ``threading.Event``), or None -- checked at each of those steps; when it says stop,
        :class:`~roomcalc.engine.progress.PlanCancelled` is raised (nothing is
        returned; the room and candidates are not changed)
    watch : PlanWatch or None -- both of the above already together (a caller that reports
        further steps of its own, numbered on from the planner's); replaces them

    Raises
    ------
    PlanCancelled -- when ``cancel`` said stop between two steps

    Returns
    -------
    Plan -- amounts per candidate (m^2 to 0.01, whole units and whole steps), cost, covered
    area and units apart, and the engine's RT (by ``goals.method``) and dB(A) levels before
    and after. ``feasible`` False: the plan with the least total shortfall, and ``reasons``
    band by band.

    Notes
    -----
    Variables: :math:`0 \\le x_j \\le x_{j,max}`, and the covers on each surface add up to at
    most its area. Per band, absorption is affine in x,
    :math:`A_b(x) = A_{0,b} + \\sum_j \\Delta A_{jb} x_j`, with :math:`\\Delta A_{jb}` the
    change per m^2 covered of surface i, or the absorption per unit. A cover over several
    surfaces puts :math:`w_i x_j` on surface i, :math:`w_i = S_i / \\sum_k S_k`
    (:func:`~roomcalc.engine.planner.goals.cover_shares`): its :math:`\\Delta A_{jb}` is
    :math:`\\sum_i w_i \\Delta A_{jb,i}`, and surface i holds
    :math:`\\sum_j w_{ij} x_j \\le S_i`. With
    :math:`Y_b = K V / T_{max} - 4 m_b V` (air as in the engine, outside A):

    - Sabine [1]_: :math:`\\Delta A = \\alpha_j - \\alpha_i` (alpha as given, above 1 too);
      :math:`T_b \\le T_{max} \\iff A_b \\ge Y_b`.
    - Millington-Sette [2]_: :math:`\\Delta A = -\\ln(1 - \\alpha'_j) + \\ln(1 - \\alpha'_i)`,
      :math:`\\alpha' = \\min(\\alpha, 0.99)` as the engine caps it;
      :math:`T_b \\le T_{max} \\iff A_b \\ge Y_b`.
    - Eyring [3]_: :math:`\\Delta A = \\alpha'_j - \\alpha'_i`, objects in the mean
      coefficient, :math:`\\bar\\alpha` capped at 0.99;
      :math:`T_b \\le T_{max} \\iff A_b \\ge S (1 - e^{-Y_b / S})`, which no treatment
      reaches when the right side exceeds 0.99 S.
    - Fitzroy [4]_ and Arau-Puchades [5]_ are not linear in x: the plan is made with Eyring's
      bound, the treated room is evaluated by the formula in force, and each band that misses
      gets its Eyring limit moved (first scaled by :math:`T_{max} / T_b`, then by secant
      steps in :math:`\\ln T`, aiming at SURROGATE_MARGIN inside the goal) and the plan is
      made again, until the engine confirms, the bounds can no longer be met
      (then the least-shortfall plan and its reasons), or MAX_SURROGATE_ROUNDS plans. The same
      rounds catch a rounded plan that an exact formula finds a hair short.

    ``rt60_min`` gives the same expressions as upper bounds.

    Levels, classic diffuse field [6]_: with :math:`u_b = A^{log}_b + 4 m_b V` and the engine's
    room constant :math:`R_b = S \\bar\\alpha_t / (1 - \\bar\\alpha_t)`,
    :math:`\\bar\\alpha_t = \\min(u_b / S, 0.99)`, the level at a receiver is
    :math:`E_b = D_b + P_b \\cdot 4 / R_b` with :math:`D_b = \\sum_s Q_s W_{sb} / (4 \\pi
    r_s^2)` and :math:`P_b = \\sum_s W_{sb}`. A band limit is a bound
    :math:`u_b \\ge 4 P_b / (10^{L_{max}/10} - D_b + 4 P_b / S)`; a dB(A) limit is

    .. math:: \\sum_b w_b \\left(D_b + \\frac{4 P_b}{\\min(u_b, 0.99 S)} - \\frac{4 P_b}{S}
              \\right) \\le 10^{L_{max}/10}, \\quad w_b = 10^{A_b/10}

    convex in x, met by cutting planes [7]_ (at most MAX_CUT_ROUNDS rounds).

    The objective is normalised and a tie-break of TIE_WEIGHT on the other measure (area or
    cost) keeps answers stable. When no plan meets every goal, every goal gets a slack; the
    least sum of slacks is found first, then the least objective with it. Continuous amounts
    are rounded to 0.01 after solving; the linear goals keep a margin for it. ``feasible`` is
    what :func:`~roomcalc.engine.analysis.evaluate` says of the treated room.

    References
    ----------
    .. [1] W. C. Sabine, Collected Papers on Acoustics (1922); ISO 354:2003, eq. (1)-(3).
    .. [2] G. Millington, J. Acoust. Soc. Am. 4 (1932) 69; W. J. Sette, J. Acoust. Soc. Am.
       4 (1933) 193.
    .. [3] C. F. Eyring, "Reverberation time in 'dead' rooms", J. Acoust. Soc. Am. 1 (1930) 217.
    .. [4] D. Fitzroy, "Reverberation formula which seems to be more accurate with nonuniform
       distribution of absorption", J. Acoust. Soc. Am. 31 (1959) 893.
    .. [5] H. Arau-Puchades, "An improved reverberation formula", Acustica 65 (1988) 163.
    .. [6] L. L. Beranek, Acoustics (1954), ch. 10, eq. (10.26), (10.29).
    .. [7] J. E. Kelley, "The cutting-plane method for solving convex programs", J. SIAM 8
       (1960) 703; Q. Huangfu & J. A. J. Hall, Math. Prog. Comp. 10 (2018) 119 (HiGHS, through
       scipy.optimize.linprog and milp).
    """
    watch = watch if watch is not None else PlanWatch(progress, cancel)
    watch.step("building", detail=f"{len(candidates)} candidate"
               + ("s" if len(candidates) != 1 else ""))
    model = build_model(room, candidates, goals, objective)
    has_goals = bool(model.rows or model.levels)
    if model.n == 0 or not has_goals:
        x = np.zeros(model.n)
        watch.step("checking")
        after = evaluate_plan(model, x)
        s = _Search(model=model, out=Outcome(status="optimal", x=x), partial=None, x=x,
                    after=after, missed=violations(model, after), rounds=1)
        solver = "none needed" if not has_goals else "none (no candidates)"
    else:
        s = _search(model, watch)
        solver = ("scipy.optimize.milp (HiGHS)" if model.integer.any() else
                  "scipy.optimize.linprog (HiGHS)")
    stopped = s.out.status == "stopped" or (s.partial is not None
                                            and s.partial.status == "stopped")
    reasons = explain(s.model, s.missed, stopped) if s.missed else []
    if s.partial is not None and s.partial.status in ("infeasible", "error"):
        reasons.insert(0, f"the solver could not find a partial plan: {s.partial.message}")
    items, total_cost, total_area, total_units = _items(model, s.x)
    wanted = ({lg.receiver for lg in goals.levels} if goals.levels else
              {r.name for r in room.receivers})
    return Plan(feasible=not s.missed, items=tuple(items), total_cost=total_cost,
                total_area=total_area, total_units=total_units, method=model.method,
                objective=model.objective, rt60_before=model.before.rt60_s[model.method],
                rt60_after=s.after.rt60_s[model.method], amounts=s.x, reasons=tuple(reasons),
                levels_before={r.name: float(r.level_dba) for r in model.before.receivers
                               if r.name in wanted},
                levels_after={r.name: float(r.level_dba) for r in s.after.receivers
                              if r.name in wanted},
                solver=solver, status=_status(s, stopped), cautions=tuple(s.after.cautions))
