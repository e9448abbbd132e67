"""The linear programme the planner solves, as typed, keyword-only records.

Shared by the package's modules (public within the package; the package's ``__init__`` exports
only what users need):

- goal keys -- :class:`RtKey`, :class:`BandLevelKey`, :class:`DbaKey` (named tuples);
- :class:`Row` -- one linear goal ``coef . x >= rhs``; :class:`LevelCut` -- one dB(A) goal,
  met by cutting planes; :class:`Miss` -- a goal the engine finds missed;
- :class:`PlanModel` -- everything the solver needs about one room, its candidates and goals;
- the tolerances and limits of the planner (module constants).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

from roomcalc.engine.model import Room
from roomcalc.engine.planner.goals import Candidate, Goals

__all__ = ["LEVEL_TOL_DB", "RT_TOL_S", "MAX_CUT_ROUNDS", "MAX_SURROGATE_ROUNDS",
           "SURROGATE_MARGIN", "AMOUNT_STEP", "TIE_WEIGHT", "MILP_TIME_LIMIT_S",
           "LOW_FREQUENCY_HZ", "DB_PER_NEPER", "EXACT_METHODS", "RtKey", "BandLevelKey",
           "DbaKey", "GoalKey", "Row", "LevelCut", "Miss", "SurfaceGroup", "PlanModel"]

#: A level goal counts as met when the engine's level is at most this much above it [dB]; the
#: cutting planes stop there.
LEVEL_TOL_DB = 0.05
#: An RT goal counts as met when the engine's RT is at most this much beyond it [s].
RT_TOL_S = 1e-6
#: Most rounds of cutting planes in one solve.
MAX_CUT_ROUNDS = 50
#: Most plans made while tightening the linear bound of a formula that is not linear in the
#: amounts (Fitzroy, Arau-Puchades), or after rounding made an exact one miss.
MAX_SURROGATE_ROUNDS = 25
#: Extra relative tightening of a missed band's linear limit per round, beyond the observed
#: ratio (so that the rounds end rather than creep up on the limit).
SURROGATE_MARGIN = 2e-3
#: Continuous amounts are rounded to this [m^2 or units]; the linear goals keep a margin so
#: that the rounded plan still meets them.
AMOUNT_STEP = 0.01
#: Weight of the tie-break (area for the cost objective, cost for the area one) against the
#: main objective, both scaled so that their largest coefficient is 1.
TIE_WEIGHT = 1e-6
#: Longest time one MILP solve may take [s].
MILP_TIME_LIMIT_S = 30.0
#: Bands at or below this get the advice to add low-frequency absorbers [Hz].
LOW_FREQUENCY_HZ = 250
#: 10 lg e: dB per unit of relative energy (linearised dB).
DB_PER_NEPER = 10.0 / math.log(10.0)
#: Formulas whose RT goal is exactly linear in the amounts (the engine's treatment of alpha
#: included); the others are planned through Eyring's bound, tightened until the engine agrees.
EXACT_METHODS = ("sabine", "eyring", "millington")


class RtKey(NamedTuple):
    """An RT goal: ``kind`` "rt_max" or "rt_min" in band index ``band``."""

    kind: str
    band: int


class BandLevelKey(NamedTuple):
    """A band level goal: ``goals.levels[goal]`` in band index ``band``."""

    goal: int
    band: int

    @property
    def kind(self) -> str:
        return "band_level"


class DbaKey(NamedTuple):
    """A dB(A) goal: ``goals.levels[goal]``."""

    goal: int

    @property
    def kind(self) -> str:
        return "dba"


GoalKey = RtKey | BandLevelKey | DbaKey


@dataclass(frozen=True, kw_only=True, eq=False)
class Row:
    """A linear goal: ``coef . x >= rhs``, x the candidates' amounts. ``bound`` is the goal as
    a bound on the absorption it constrains [m^2]; ``slack_scale`` turns a slack in the goal's
    normalised units (relative RT or dB) into the row's units; ``impossible``: no amount of
    absorption reaches the goal's bound."""

    key: GoalKey
    coef: np.ndarray
    rhs: float
    bound: float
    slack_scale: float
    impossible: bool = False


@dataclass(frozen=True, kw_only=True, eq=False)
class LevelCut:
    """A dB(A) goal at a receiver, as energies relative to the reference:
    ``sum_b w_b (D_b + P_b (4 / min(u_b, cap) - 4 / S)) <= lim``."""

    key: DbaKey
    receiver: str
    limit_dba: float
    lim: float
    w: np.ndarray
    d: np.ndarray
    p: np.ndarray


@dataclass(frozen=True, kw_only=True)
class Miss:
    """A goal the engine finds missed: its value and limit (s, dB or dB(A)), and for levels
    the direct sound's share alone."""

    key: GoalKey
    value: float
    limit: float
    direct: float | None = None


class SurfaceGroup(NamedTuple):
    """The cover candidates on one surface, whose areas on it add up to at most ``area``
    [m^2]: candidate ``candidates[k]`` puts ``weights[k]`` of its amount on this surface (1
    for a candidate of one surface; its share, :func:`~.goals.cover_shares`, for one spread
    over several)."""

    surface: int
    candidates: list
    area: float
    weights: np.ndarray | None = None       # None: all 1

    def share(self) -> np.ndarray:
        """The weights as an array (ones when not given)."""
        return (np.ones(len(self.candidates)) if self.weights is None
                else np.asarray(self.weights, dtype=float))


@dataclass(frozen=True, kw_only=True, eq=False)
class PlanModel:
    """One room, its candidates and goals as a linear programme in the amounts x.

    ``g_rt``/``a0_rt``: the absorption the RT rows bound, per band, affine in x
    (:math:`A_b(x) = A_{0,b} + \\sum_j g_{jb} x_j`), for the linear formula ``linear_method``
    (the goal's own formula where it is linear, else Eyring); ``g_log``/``a0_log``: the
    absorption with every alpha capped at 0.99, which the levels use. ``step``: solver values
    y give amounts x = step y; ``integer``: whole y."""

    room: Room
    candidates: tuple[Candidate, ...]
    goals: Goals
    method: str
    linear_method: str
    objective: str
    rt_max: np.ndarray
    rt_min: np.ndarray
    bands: tuple
    before: object                  # RoomResult of the untreated room
    n: int
    volume: float
    s_tot: float
    m: np.ndarray
    kv: float
    cap_area: float                 # ALPHA_LOG_MAX * S
    a0_rt: np.ndarray
    g_rt: np.ndarray                # (n, bands)
    a0_log: np.ndarray
    g_log: np.ndarray               # (n, bands)
    u0: np.ndarray                  # a0_log + 4 m V
    step: np.ndarray
    integer: np.ndarray
    ub_x: np.ndarray
    ub_y: np.ndarray
    surface_groups: tuple[SurfaceGroup, ...]
    primary: np.ndarray
    secondary: np.ndarray
    rows: tuple[Row, ...]
    levels: tuple[LevelCut, ...]
    direct: dict                    # receiver name -> (D (bands), P (bands))

    def u(self, x) -> np.ndarray:
        """The levels' absorption with air, :math:`u_b = A^{log}_b + 4 m_b V` [m^2]."""
        return self.u0 + x @ self.g_log

    def level_energy(self, g: LevelCut, x) -> tuple[float, np.ndarray]:
        """The dB(A) goal's energy sum at amounts x, and its gradient in x."""
        u = np.maximum(self.u(x), 1e-12)
        active = u < self.cap_area
        uc = np.where(active, u, self.cap_area)
        f = float(np.sum(g.w * (g.d + g.p * (4.0 / uc - 4.0 / self.s_tot))))
        dfdu = np.where(active, -4.0 * g.w * g.p / uc ** 2, 0.0)
        return f, self.g_log @ dfdu

    def to_amounts(self, y, rounded: bool = True) -> np.ndarray:
        """Amounts x from solver values y: whole units and steps exact, continuous amounts
        rounded to AMOUNT_STEP (down where rounding would pass a limit)."""
        y = np.maximum(np.asarray(y, dtype=float), 0.0)
        x = y * self.step
        if not rounded:
            return x
        cont = ~self.integer
        out = np.where(self.integer, np.round(y) * self.step, x)
        near = np.round(x / AMOUNT_STEP) * AMOUNT_STEP
        low = np.floor(x / AMOUNT_STEP + 1e-9) * AMOUNT_STEP
        out[cont] = np.where(near[cont] > self.ub_x[cont] * (1 + 1e-12), low[cont], near[cont])
        for group in self.surface_groups:
            idx = group.candidates
            if out[idx] @ group.share() > group.area * (1 + 1e-12):
                c = [j for j in idx if cont[j]]
                out[c] = low[c]
        out = np.minimum(np.maximum(out, 0.0), self.ub_x)
        return np.round(out, 9)
