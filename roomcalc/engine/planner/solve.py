"""Solving the planner's linear programme: LP (``scipy.optimize.linprog``) or MILP
(``scipy.optimize.milp``), both by HiGHS; Kelley's cutting planes for dB(A) limits; and the
elastic form that finds the least total shortfall when no plan meets every goal.

Public within the package: :class:`Outcome`, :func:`lp`, :func:`solve`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from roomcalc.engine.planner.model import (AMOUNT_STEP, DB_PER_NEPER, LEVEL_TOL_DB,
                                           MAX_CUT_ROUNDS, MILP_TIME_LIMIT_S, TIE_WEIGHT,
                                           PlanModel)
from roomcalc.engine.progress import PlanWatch

__all__ = ["Outcome", "lp", "solve"]


@dataclass(kw_only=True)
class Outcome:
    """One solve: ``status`` "optimal", "stopped" (cut rounds or time ran out), "infeasible"
    or "error"; amounts ``x``, slacks (elastic), solver calls, cuts added and the message."""

    status: str
    x: np.ndarray | None = None
    slack: np.ndarray | None = None
    rounds: int = 0
    cuts: int = 0
    message: str = ""


def lp(c, a_ub, b_ub, lo, hi, integrality) -> tuple[str, np.ndarray | None, str]:
    """Minimise ``c . z`` subject to ``a_ub z <= b_ub`` and ``lo <= z <= hi`` (whole numbers
    where ``integrality``), by HiGHS. Returns (status, z, message)."""
    from scipy.optimize import Bounds, LinearConstraint, linprog, milp

    nz = len(c)
    if nz == 0:
        ok = all(bi >= -1e-9 for bi in b_ub)
        return ("optimal" if ok else "infeasible"), np.zeros(0), ""
    a = np.array(a_ub, dtype=float).reshape(len(b_ub), nz)
    b = np.asarray(b_ub, dtype=float)
    if integrality.any():
        cons = [LinearConstraint(a, -np.inf, b)] if len(b) else None
        res = milp(c, constraints=cons, bounds=Bounds(lo, hi), integrality=integrality.astype(int),
                   options={"mip_rel_gap": 1e-9, "time_limit": MILP_TIME_LIMIT_S})
    else:
        res = linprog(c, A_ub=a if len(b) else None, b_ub=b if len(b) else None,
                      bounds=np.column_stack([lo, hi]), method="highs")
    if res.status == 0:
        return "optimal", res.x, res.message
    if res.status == 2:
        return "infeasible", None, res.message
    if res.x is not None:
        return "stopped", res.x, res.message
    return "error", None, res.message


class _Problem:
    """The programme in the solver's variables z = (y, slacks): fixed rows, goal rows, cuts."""

    def __init__(self, model: PlanModel, rows, levels, elastic: bool,
                 watch: PlanWatch | None = None):
        n = model.n
        self.model, self.rows, self.levels, self.elastic = model, list(rows), list(levels), elastic
        self.watch = watch
        self.k = len(self.rows) + len(self.levels) if elastic else 0
        self.nz = nz = n + self.k
        sy = model.step
        self.base_a, self.base_b = [], []
        for group in model.surface_groups:
            if len(group.candidates) > 1:
                row = np.zeros(nz)
                row[group.candidates] = sy[group.candidates] * group.share()
                self.base_a.append(row)
                self.base_b.append(group.area)
        self.goal_a = []
        for i, r in enumerate(self.rows):
            row = np.zeros(nz)
            row[:n] = -r.coef * sy
            if elastic:
                row[n + i] = -r.slack_scale
            self.goal_a.append(row)
        self.lo = np.zeros(nz)
        self.hi = np.concatenate([model.ub_y, np.full(self.k, np.inf)])
        self.integ = np.concatenate([model.integer, np.zeros(self.k, bool)])
        self.cuts = []              # (row in z, rhs before the margin, |gradient| in x)
        self.slack_col = ({g.key: n + len(self.rows) + i for i, g in enumerate(self.levels)}
                          if elastic else {})
        self.solves = 0

    def objective(self) -> np.ndarray:
        """Normalised main objective plus the tie-break, in z."""
        m = self.model
        pmax = float(m.primary.max(initial=0.0))
        qmax = float(m.secondary.max(initial=0.0))
        p = m.primary / pmax if pmax > 0 else np.zeros(m.n)
        q = m.secondary / qmax if qmax > 0 else np.zeros(m.n)
        c_x = p + (TIE_WEIGHT if pmax > 0 else 1.0) * q
        return np.concatenate([c_x * m.step, np.zeros(self.k)])

    def matrices(self, guard, extra_a, extra_b):
        """A_ub, b_ub with the rounding margin of the guarded candidates."""
        b_goal = [-(r.rhs + AMOUNT_STEP * float(np.abs(r.coef[guard]).sum())
                    + 1e-9 * (1.0 + abs(r.bound))) for r in self.rows]
        b_cut = [rhs - AMOUNT_STEP * float(gabs[guard].sum()) for _, rhs, gabs in self.cuts]
        return (self.base_a + self.goal_a + extra_a + [ct[0] for ct in self.cuts],
                self.base_b + b_goal + extra_b + b_cut)

    def add_cuts(self, x, z, tol) -> bool:
        """Add a tangent plane for every dB(A) goal the amounts x miss; True if any."""
        m, n, added = self.model, self.model.n, False
        for g in self.levels:
            f, grad = m.level_energy(g, x)
            allowed = 1.0 + (max(z[self.slack_col[g.key]], 0.0) / DB_PER_NEPER
                             if self.elastic else 0.0)
            if f / g.lim <= allowed * 10.0 ** (tol / 10.0):
                continue
            gl = grad / g.lim
            row = np.zeros(self.nz)
            row[:n] = gl * m.step
            if self.elastic:
                row[self.slack_col[g.key]] = -1.0 / DB_PER_NEPER
            self.cuts.append((row, 1.0 - f / g.lim + float(gl @ x), np.abs(gl)))
            added = True
        return added

    def kelley(self, c, extra_a, extra_b, integral: bool, guard) -> Outcome:
        """Solve, cut the dB(A) goals the answer misses, repeat (at most MAX_CUT_ROUNDS)."""
        tol = LEVEL_TOL_DB if integral else LEVEL_TOL_DB / 5.0
        n, last = self.model.n, None
        integ = self.integ if integral else np.zeros(self.nz, bool)
        for rnd in range(1, MAX_CUT_ROUNDS + 1):
            if self.watch is not None:      # between solver calls: report, or stop if asked
                if rnd == 1:
                    self.watch.step("solving", integral=bool(integ.any()),
                                    elastic=self.elastic)
                else:
                    self.watch.step("cutting", cut=rnd - 1, max_cuts=MAX_CUT_ROUNDS - 1,
                                    integral=bool(integ.any()), elastic=self.elastic)
            self.solves += 1
            a_ub, b_ub = self.matrices(guard, extra_a, extra_b)
            status, z, msg = lp(c, a_ub, b_ub, self.lo, self.hi, integ)
            if status in ("infeasible", "error"):
                return Outcome(status=status, rounds=rnd, message=msg)
            x = self.model.to_amounts(z[:n], rounded=integral)
            last = Outcome(status=status, x=x, slack=z[n:], rounds=rnd, message=msg)
            if not self.add_cuts(x, z, tol):
                return last
        last.status = "stopped"
        return last

    def rows_hold(self, x, slack) -> bool:
        for i, r in enumerate(self.rows):
            s = r.slack_scale * max(float(slack[i]), 0.0) if self.elastic else 0.0
            if float(r.coef @ x) + s < r.rhs - 1e-7:       # HiGHS' feasibility tolerance
                return False
        return True

    def run(self, c, extra_a=(), extra_b=()) -> Outcome:
        """Solve with rounding margins on the candidates rounding can move: none at first
        (elastic: all continuous ones), then those in use whenever the rounded answer misses
        a row, until every candidate in use is guarded."""
        extra_a, extra_b = list(extra_a), list(extra_b)
        cont = ~self.model.integer
        guard = cont.copy() if self.elastic else np.zeros(self.model.n, bool)
        for _ in range(self.model.n + 1):
            if self.integ.any() and self.levels:
                self.kelley(c, extra_a, extra_b, False, guard)  # cheap cuts from the relaxation
            out = self.kelley(c, extra_a, extra_b, True, guard)
            if out.x is None or self.rows_hold(out.x, out.slack):
                break
            used = cont & (out.x > 0)
            if not (used & ~guard).any():
                used = cont                                # guard every candidate then
            if not (used & ~guard).any():
                break
            guard = guard | used
        out.rounds, out.cuts = self.solves, len(self.cuts)
        return out


def solve(model: PlanModel, rows, levels, *, elastic: bool,
          watch: PlanWatch | None = None) -> Outcome:
    """Least objective amounts meeting ``rows`` and ``levels`` (cutting planes for the latter).

    elastic: every goal gets a slack; first the least total slack, then the least objective
    with that slack. Without it, an unreachable goal makes the problem infeasible.

    Continuous amounts are rounded to AMOUNT_STEP afterwards; a row keeps a margin of
    AMOUNT_STEP |coef_j| for each continuous candidate j it guards, so that rounding cannot
    break it.

    watch: told before each solver call (a first solve, then each round of cutting planes);
    raises PlanCancelled there when its cancel check says stop.
    """
    if not elastic and any(r.impossible for r in rows):
        return Outcome(status="infeasible",
                       message="a goal is beyond what any absorption can reach")
    prob = _Problem(model, rows, levels, elastic, watch)
    if not elastic:
        return prob.run(prob.objective())
    n, k = model.n, prob.k
    first = prob.run(np.concatenate([np.zeros(n), np.ones(k)]))
    if first.status in ("infeasible", "error"):
        return first
    s1 = float(np.sum(first.slack))
    row = np.concatenate([np.zeros(n), np.ones(k)])
    second = prob.run(prob.objective(), [row], [s1 + 1e-6 * (1.0 + s1)])
    if second.status in ("infeasible", "error"):
        return first
    return second
