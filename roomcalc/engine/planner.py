"""The treatment planner: the cheapest (or smallest) treatment that brings a room to its goals.

Data model (this part is fixed; the file layer builds these from a room file's ``[target]``
and ``[[candidates]]`` tables, in SI units, with surfaces named by their index in the engine
``Room``):

- :class:`Candidate` -- one treatment the planner may use, either *covering* part of a surface
  (replacing that surface's alpha over the covered area) or *added as units* (free-hanging
  panels, baffles, bass traps: absorption area per unit).
- :class:`Goals` -- what the room must reach: an RT60 window per band (by Sabine or Eyring),
  and/or maximum levels at receivers (per band or dB(A)).
- :class:`Plan` / :class:`PlanItem` -- the answer.

The solver (:func:`plan`) is below the data model.
"""

from __future__ import annotations

import math
import operator
from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np

from roomcalc.engine.analysis import ALPHA_LOG_MAX, METHOD_TITLES, evaluate
from roomcalc.engine.bands import band_constants
from roomcalc.engine.model import Room, RoomObject, Surface
# The same input checks as the reverberation formulas (same messages).
from roomcalc.engine.reverb import _non_negative as _non_negative_array
from roomcalc.engine.reverb import _positive as _positive_array

OBJECTIVES = ("cost", "area")
PLAN_METHODS = ("sabine", "eyring")


def _array(x) -> np.ndarray | None:
    if x is None:
        return None
    a = np.array(x, dtype=float)
    a.setflags(write=False)
    return a


@dataclass(frozen=True, eq=False)
class Candidate:
    """One treatment the planner may use.

    kind "cover": covers up to ``max_amount`` m^2 of ``room.surfaces[surface]`` (in total over
    its ``count`` copies), replacing that surface's alpha by ``alpha`` over the covered area;
    the surface's own total area is a hard limit too. ``step`` [m^2], if given, makes the
    covered area a whole number of steps (whole panels, e.g. 1.2 x 0.6 = 0.72 m^2).
    kind "units": adds up to ``max_amount`` units of ``absorption`` [m^2 per unit per band];
    whole units unless ``integer`` is False. ``area_each`` [m^2] is what one unit counts for
    when the objective is the least area.
    ``cost`` is per m^2 (cover) or per unit (units), in the file's currency.
    """

    name: str
    kind: str                                   # "cover" or "units"
    cost: float = 0.0
    max_amount: float = float("inf")            # m^2 (cover) or units
    surface: int | None = None                  # cover: index into room.surfaces
    alpha: np.ndarray | None = None             # cover: alpha per band
    absorption: np.ndarray | None = None        # units: m^2 per unit per band
    step: float | None = None                   # cover: whole steps of this many m^2
    integer: bool = True                        # units: whole numbers of units
    area_each: float = 1.0                      # units: m^2 each, for the least-area objective
    material: str | None = None                 # catalogue id, kept for writing the room back

    def __post_init__(self):
        object.__setattr__(self, "alpha", _array(self.alpha))
        object.__setattr__(self, "absorption", _array(self.absorption))


@dataclass(frozen=True, eq=False)
class LevelGoal:
    """A maximum level at a receiver: ``max_dba`` (A-weighted total of all sources) and/or
    ``max_db`` per band (NaN where there is no limit)."""

    receiver: str
    max_dba: float | None = None
    max_db: np.ndarray | None = None

    def __post_init__(self):
        object.__setattr__(self, "max_db", _array(self.max_db))


@dataclass(frozen=True, eq=False)
class Goals:
    """What the plan must reach. ``rt60_max``/``rt60_min`` per band [s], NaN where there is no
    limit (None: no limit in any band); ``method`` is the formula the plan is made with."""

    method: str = "eyring"
    rt60_max: np.ndarray | None = None
    rt60_min: np.ndarray | None = None
    levels: tuple[LevelGoal, ...] = ()
    objective: str = "cost"
    source: str = ""                            # where the window came from (a criterion id)

    def __post_init__(self):
        object.__setattr__(self, "rt60_max", _array(self.rt60_max))
        object.__setattr__(self, "rt60_min", _array(self.rt60_min))
        object.__setattr__(self, "levels", tuple(self.levels))


@dataclass(frozen=True)
class PlanItem:
    """One line of a plan: how much of a candidate, and what it costs."""

    candidate: str
    kind: str
    surface: str | None          # the covered surface's name (cover), None (units)
    amount: float                # m^2 (cover) or units
    cost: float


@dataclass(frozen=True, eq=False)
class Plan:
    """The planner's answer. ``feasible`` False: ``items`` is the best partial plan (least
    total violation) and ``reasons`` say, band by band, why the goals cannot be met."""

    feasible: bool
    items: tuple[PlanItem, ...]
    total_cost: float
    total_area: float
    method: str
    objective: str
    rt60_before: np.ndarray
    rt60_after: np.ndarray
    amounts: np.ndarray                      # per candidate, in candidate order
    reasons: tuple[str, ...] = ()
    levels_before: dict = field(default_factory=dict)   # receiver -> dB(A)
    levels_after: dict = field(default_factory=dict)
    solver: str = ""
    status: str = ""                         # the solver's outcome in words (added field)
    cautions: tuple[str, ...] = ()           # hearing cautions of the treated room (added field)


# ---------------------------------------------------------------------------------------------
# The solver
# ---------------------------------------------------------------------------------------------

KINDS = ("cover", "units")

#: A level goal counts as met when the engine's level is at most this much above it [dB]; the
#: cutting planes stop there.
LEVEL_TOL_DB = 0.05
#: An RT goal counts as met when the engine's RT is at most this much beyond it [s].
RT_TOL_S = 1e-6
#: Most rounds of cutting planes in one solve.
MAX_CUT_ROUNDS = 50
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

_DB = 10.0 / math.log(10.0)         # 10 lg e: dB per unit of relative energy (linearised dB)
_LN10 = math.log(10.0)


# --- public bounds ---------------------------------------------------------------------------

def sabine_required_absorption(rt60, volume, m=0.0, c=343.0) -> np.ndarray:
    """Absorption area at which Sabine's formula gives exactly ``rt60``.

    Parameters
    ----------
    rt60 : array_like -- reverberation time T [s], > 0
    volume : array_like -- room volume V [m^3], > 0
    m : array_like -- energy attenuation coefficient of air [1/m]
    c : array_like -- speed of sound [m/s]

    Returns
    -------
    ndarray -- A [m^2] of surfaces and objects (air not included); negative where air alone
    brings the time below ``rt60``

    Notes
    -----
    T falls as A grows, so a goal on T is a bound on A:

    .. math:: T = \\frac{K V}{A + 4 m V} \\le T_{max} \\iff
              A \\ge \\frac{K V}{T_{max}} - 4 m V, \\qquad K = \\frac{24 \\ln 10}{c}

    and :math:`T \\ge T_{min} \\iff A \\le K V / T_{min} - 4 m V`.

    References
    ----------
    .. [1] W. C. Sabine, Collected Papers on Acoustics (1922); ISO 354:2003, eq. (1)-(3).
    .. [2] ISO 3382-2:2008 (the reverberation time as the time of a 60 dB decay).

    Examples
    --------
    The check room of REFERENCES (V = 3000 m^3, c = 343 m/s, no air) has T = 1.2114 s with
    A = 399 m^2:

    >>> round(float(sabine_required_absorption(1.2114, 3000.0)), 1)
    399.0
    """
    t = _positive_array("rt60", rt60)
    v = _positive_array("volume", volume)
    m = _non_negative_array("m", m)
    k = 24.0 * _LN10 / _positive_array("c", c)
    return k * v / t - 4.0 * m * v


def eyring_required_absorption(rt60, volume, surface_area, m=0.0, c=343.0) -> np.ndarray:
    """Absorption area at which Eyring's formula gives exactly ``rt60``.

    Parameters
    ----------
    rt60 : array_like -- reverberation time T [s], > 0
    volume : array_like -- room volume V [m^3], > 0
    surface_area : array_like -- total surface area S [m^2], > 0
    m : array_like -- energy attenuation coefficient of air [1/m]
    c : array_like -- speed of sound [m/s]

    Returns
    -------
    ndarray -- A = S abar [m^2] of surfaces and objects (air not included); negative where air
    alone brings the time below ``rt60``. A value of S or more cannot be reached.

    Notes
    -----
    With :math:`\\bar\\alpha = A / S` (objects included in A, as in the engine),

    .. math:: T = \\frac{K V}{-S \\ln(1 - A/S) + 4 m V} \\le T_{max} \\iff
              A \\ge S \\left(1 - e^{-(K V / T_{max} - 4 m V) / S}\\right)

    because the denominator grows with A; :math:`T \\ge T_{min}` gives the same expression as
    an upper bound.

    References
    ----------
    .. [1] C. F. Eyring, "Reverberation time in 'dead' rooms", J. Acoust. Soc. Am. 1 (1930) 217.

    Examples
    --------
    The check room of REFERENCES (V = 3000 m^3, S = 1340 m^2, no air) has T = 1.0204 s with
    A = 399 m^2:

    >>> round(float(eyring_required_absorption(1.0204, 3000.0, 1340.0)), 1)
    399.0
    """
    t = _positive_array("rt60", rt60)
    v = _positive_array("volume", volume)
    s = _positive_array("surface_area", surface_area)
    m = _non_negative_array("m", m)
    k = 24.0 * _LN10 / _positive_array("c", c)
    return -s * np.expm1(-(k * v / t - 4.0 * m * v) / s)


# --- checking the inputs ---------------------------------------------------------------------

def _band_values(name, x, nb, bands, *, low=None, high=None, nan_ok=False):
    """Check one per-band array: nb values, finite (or NaN where allowed), within [low, high]."""
    a = np.asarray(x, dtype=float)
    if a.shape != (nb,):
        raise ValueError(f"{name}: must have {nb} values, one per band "
                         f"({', '.join(f'{b:g}' for b in bands)} Hz); got shape {a.shape}")
    given = ~np.isnan(a) if nan_ok else np.ones(nb, bool)
    v = a[given]
    rng = ("between " + f"{low:g} and {high:g}" if high is not None else
           f"{low:g} or more" if low is not None else "finite")
    bad = ~np.isfinite(v)
    if low is not None:
        bad |= v < low
    if high is not None:
        bad |= v > high
    if bad.any():
        i = int(np.nonzero(given)[0][np.nonzero(bad)[0][0]])
        raise ValueError(f"{name}[{i}]: {a[i]:g} at {bands[i]:g} Hz must be {rng}"
                         + (" (NaN for no limit)" if nan_ok else ""))
    return a


def _check_candidates(room: Room, candidates) -> tuple[Candidate, ...]:
    bands = tuple(room.bands_hz)
    nb, ns = len(bands), len(room.surfaces)
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
            if cd.surface is None or isinstance(cd.surface, bool):
                raise ValueError(f"{at}.surface: a cover candidate needs a surface, an index "
                                 f"0 to {ns - 1} into the room's surfaces{who}")
            try:
                si = operator.index(cd.surface)
            except TypeError:
                raise ValueError(f"{at}.surface: {cd.surface!r} must be a whole number 0 to "
                                 f"{ns - 1} (an index into the room's surfaces){who}") from None
            if not 0 <= si < ns:
                raise ValueError(f"{at}.surface: {si} is out of range 0 to {ns - 1} (the room "
                                 f"has {ns} surfaces){who}")
            if cd.alpha is None:
                raise ValueError(f"{at}.alpha: a cover candidate needs alpha, {nb} values "
                                 f"between 0 and 1{who}")
            _band_values(f"{at}.alpha", cd.alpha, nb, bands, low=0.0, high=1.0)
            if cd.step is not None:
                st = float(cd.step)
                if not (math.isfinite(st) and st > 0):
                    raise ValueError(f"{at}.step: {cd.step!r} must be finite and above 0 m^2 "
                                     f"(or None for any area){who}")
        else:
            if cd.absorption is None:
                raise ValueError(f"{at}.absorption: a units candidate needs absorption, {nb} "
                                 f"values of 0 or more [m^2 per unit]{who}")
            _band_values(f"{at}.absorption", cd.absorption, nb, bands, low=0.0)
            ae = float(cd.area_each)
            if not (math.isfinite(ae) and ae >= 0):
                raise ValueError(f"{at}.area_each: {cd.area_each!r} must be finite and 0 or "
                                 f"more [m^2]{who}")
        out.append(cd)
    return tuple(out)


def _check_goals(room: Room, goals: Goals, objective):
    if not isinstance(goals, Goals):
        raise ValueError(f"goals: must be a Goals, got {type(goals).__name__}")
    bands = tuple(room.bands_hz)
    nb = len(bands)
    if goals.method not in PLAN_METHODS:
        raise ValueError(f"goals.method: {goals.method!r} is not one of {list(PLAN_METHODS)}")
    objective = goals.objective if objective is None else objective
    if objective not in OBJECTIVES:
        raise ValueError(f"objective: {objective!r} is not one of {list(OBJECTIVES)}")
    rt = {}
    for key in ("rt60_max", "rt60_min"):
        val = getattr(goals, key)
        if val is None:
            rt[key] = np.full(nb, np.nan)
            continue
        a = _band_values(f"goals.{key}", val, nb, bands, nan_ok=True)
        bad = ~np.isnan(a) & ~(np.isfinite(a) & (a > 0))
        if bad.any():
            i = int(np.nonzero(bad)[0][0])
            raise ValueError(f"goals.{key}[{i}]: {a[i]:g} at {bands[i]:g} Hz must be finite "
                             "and above 0 s (NaN for no limit)")
        rt[key] = a
    both = ~np.isnan(rt["rt60_max"]) & ~np.isnan(rt["rt60_min"])
    crossed = both & (rt["rt60_min"] > rt["rt60_max"])
    if crossed.any():
        i = int(np.nonzero(crossed)[0][0])
        raise ValueError(f"goals.rt60_min[{i}]: {rt['rt60_min'][i]:g} s at {bands[i]:g} Hz is "
                         f"above rt60_max ({rt['rt60_max'][i]:g} s); the minimum must be at "
                         "most the maximum")
    names = [r.name for r in room.receivers]
    for i, lg in enumerate(goals.levels):
        at = f"goals.levels[{i}]"
        if not isinstance(lg, LevelGoal):
            raise ValueError(f"{at}: must be a LevelGoal, got {type(lg).__name__}")
        if lg.receiver not in names:
            raise ValueError(f"{at}.receiver: {lg.receiver!r} is not a receiver of the room "
                             f"(receivers: {', '.join(repr(n) for n in names) or 'none'})")
        if lg.max_dba is not None and not math.isfinite(float(lg.max_dba)):
            raise ValueError(f"{at}.max_dba: {lg.max_dba!r} must be a finite level [dB(A)] "
                             "or None")
        if lg.max_db is not None:
            _band_values(f"{at}.max_db", lg.max_db, nb, bands, nan_ok=True)
        if not room.sources and (lg.max_dba is not None or lg.max_db is not None):
            raise ValueError(f"{at}: a level goal needs at least one source in the room")
    return objective, rt["rt60_max"], rt["rt60_min"]


# --- the linear model of the room ------------------------------------------------------------

@dataclass(eq=False)
class _Row:
    """A linear goal: coef . x >= rhs, x the candidates' amounts. ``key`` names the goal;
    ``slack_scale`` turns a slack in the goal's normalised units (relative RT or dB) into
    the row's units; ``impossible``: no amount of absorption reaches the goal's bound."""

    key: tuple
    coef: np.ndarray
    rhs: float
    bound: float
    slack_scale: float
    impossible: bool = False


@dataclass(eq=False)
class _LevelCut:
    """A dB(A) goal at a receiver: sum_b w_b (D_b + P_b (4/min(u_b, cap) - 4/S)) <= lim."""

    key: tuple
    receiver: str
    limit_dba: float
    lim: float
    w: np.ndarray
    d: np.ndarray
    p: np.ndarray


@dataclass(eq=False)
class _Model:
    room: Room
    candidates: tuple
    goals: Goals
    method: str
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
    a0_sab: np.ndarray
    a0_log: np.ndarray
    g_sab: np.ndarray               # (n, bands)
    g_log: np.ndarray
    u0: np.ndarray                  # a0_log + 4 m V
    step: np.ndarray                # x_j = step_j * y_j
    integer: np.ndarray
    ub_x: np.ndarray
    ub_y: np.ndarray
    surface_groups: list            # (surface index, candidate indices, total area)
    primary: np.ndarray
    secondary: np.ndarray
    rows: list
    levels: list
    direct: dict                    # receiver name -> (D (bands), P (bands))

    def u(self, x):
        return self.u0 + x @ self.g_log

    def level_energy(self, g: _LevelCut, x):
        """The dB(A) goal's energy sum at amounts x, and its gradient in x."""
        u = np.maximum(self.u(x), 1e-12)
        active = u < self.cap_area
        uc = np.where(active, u, self.cap_area)
        f = float(np.sum(g.w * (g.d + g.p * (4.0 / uc - 4.0 / self.s_tot))))
        dfdu = np.where(active, -4.0 * g.w * g.p / uc ** 2, 0.0)
        return f, self.g_log @ dfdu

    def to_amounts(self, y, rounded=True):
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
        for _, idx, area in self.surface_groups:
            if out[idx].sum() > area * (1 + 1e-12):
                c = [j for j in idx if cont[j]]
                out[c] = low[c]
        out = np.minimum(np.maximum(out, 0.0), self.ub_x)
        return np.round(out, 9)


def _build(room: Room, candidates, goals: Goals, objective) -> _Model:
    if not isinstance(room, Room):
        raise ValueError(f"room: must be a Room, got {type(room).__name__}")
    objective, rt_max, rt_min = _check_goals(room, goals, objective)
    cands = _check_candidates(room, candidates)
    before = evaluate(room)
    bands = before.bands_hz
    nb, n = len(bands), len(cands)
    v, s_tot = before.volume_m3, before.surface_area_m2
    m = before.air_m_per_m
    kv = 24.0 * _LN10 / before.speed_of_sound_m_s * v
    cap = ALPHA_LOG_MAX
    areas = np.array([sf.total_area for sf in room.surfaces])
    alphas = np.array([sf.alpha for sf in room.surfaces]).reshape(len(areas), nb)
    a_obj = before.object_absorption_m2
    a0_sab = before.absorption_area_m2
    a0_log = areas @ np.minimum(alphas, cap) + a_obj

    g_sab = np.zeros((n, nb))
    g_log = np.zeros((n, nb))
    step = np.ones(n)
    integer = np.zeros(n, bool)
    ub_x = np.zeros(n)
    primary = np.zeros(n)
    secondary = np.zeros(n)
    groups: dict[int, list[int]] = {}
    for j, cd in enumerate(cands):
        if cd.kind == "cover":
            si = operator.index(cd.surface)
            groups.setdefault(si, []).append(j)
            g_sab[j] = cd.alpha - alphas[si]
            g_log[j] = np.minimum(cd.alpha, cap) - np.minimum(alphas[si], cap)
            ub_x[j] = min(float(cd.max_amount), areas[si])
            area_each = 1.0
            if cd.step is not None:
                step[j] = float(cd.step)
                integer[j] = True
        else:
            g_sab[j] = g_log[j] = cd.absorption
            ub_x[j] = float(cd.max_amount)
            area_each = float(cd.area_each)
            integer[j] = bool(cd.integer)
        cost = float(cd.cost)
        primary[j], secondary[j] = (cost, area_each) if objective == "cost" else (area_each, cost)
    ub_y = ub_x / step
    ub_y = np.where(integer & np.isfinite(ub_y), np.floor(ub_y + 1e-9), ub_y)
    ub_x = np.where(integer, ub_y * step, ub_x)
    surface_groups = [(si, idx, float(areas[si])) for si, idx in sorted(groups.items())]

    rows: list[_Row] = []
    sabine = goals.method == "sabine"
    g_rt = g_sab if sabine else g_log
    a0_rt = a0_sab if sabine else a0_log
    cap_area = cap * s_tot
    for b in range(nb):
        for key, t in (("rt_max", rt_max[b]), ("rt_min", rt_min[b])):
            if np.isnan(t):
                continue
            y_need = kv / t - 4.0 * m[b] * v
            bound = y_need if sabine else -s_tot * math.expm1(-y_need / s_tot)
            impossible = False
            if key == "rt_max":
                if bound <= 0:
                    continue                    # air alone is enough
                if not sabine and bound > cap_area:
                    impossible, bound_eff = True, cap_area
                else:
                    bound_eff = bound
                coef, rhs = g_rt[:, b], bound_eff - a0_rt[b]
            else:
                if not sabine and bound >= cap_area:
                    continue                    # the capped formula can never go below T_min
                bound_eff = bound
                coef, rhs = -g_rt[:, b], a0_rt[b] - bound_eff
            # A slack s (relative RT beyond the limit, linearised at the bound) moves the row
            # by s * dA/d(ln T).
            frac = 1.0 if sabine else max(1.0 - min(max(bound_eff, 0.0), cap_area) / s_tot,
                                          1.0 - cap)
            rows.append(_Row((key, b), coef.copy(), float(rhs), float(bound_eff),
                             float(kv / t * frac), impossible))

    levels: list[_LevelCut] = []
    direct = {}
    _, aw = band_constants(bands)
    w = 10.0 ** (aw / 10.0)
    if goals.levels and before.receiver_arrays is not None:
        ra = before.receiver_arrays
        lw = np.array([src.sound_power_db for src in room.sources]).reshape(-1, nb)
        power = 10.0 ** (lw / 10.0)
        q = np.array([src.directivity for src in room.sources])
        p_tot = power.sum(axis=0)
        for i, name in enumerate(ra.names):
            dterm = q / (4.0 * np.pi * ra.distances_m[i] ** 2)
            direct[name] = (dterm @ power, p_tot)
    u0 = a0_log + 4.0 * m * v
    for gi, lg in enumerate(goals.levels):
        if lg.max_dba is None and lg.max_db is None:
            continue
        d, p = direct[lg.receiver]
        if lg.max_db is not None:
            for b in range(nb):
                lmax = float(lg.max_db[b])
                if np.isnan(lmax):
                    continue
                lim = 10.0 ** (lmax / 10.0)
                den = lim - d[b] + 4.0 * p[b] / s_tot
                need = 4.0 * p[b] / den if den > 0 else math.inf
                impossible = need > cap_area
                need_eff = min(need, cap_area)
                rows.append(_Row(("band_level", gi, b), g_log[:, b].copy(),
                                 float(need_eff - u0[b]), float(need_eff),
                                 float(need_eff ** 2 * lim / (4.0 * p[b] * _DB)), impossible))
        if lg.max_dba is not None:
            levels.append(_LevelCut(("dba", gi), lg.receiver, float(lg.max_dba),
                                    10.0 ** (float(lg.max_dba) / 10.0), w, d, p))

    return _Model(room, cands, goals, goals.method, objective, rt_max, rt_min, bands, before, n,
                  v, s_tot, m, kv, cap_area, a0_sab, a0_log, g_sab, g_log, u0, step, integer,
                  ub_x, ub_y, surface_groups, primary, secondary, rows, levels, direct)


# --- solving ---------------------------------------------------------------------------------

@dataclass
class _Outcome:
    status: str                     # "optimal", "stopped", "infeasible", "error"
    x: np.ndarray | None = None
    slack: np.ndarray | None = None
    rounds: int = 0                 # LP/MILP solves
    cuts: int = 0                   # cutting planes added for the level goals
    message: str = ""


def _lp(c, a_ub, b_ub, lo, hi, integrality):
    """One LP (linprog) or MILP (milp), both by HiGHS. Returns (status, z, message)."""
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


def _solve(model: _Model, rows, levels, *, elastic: bool) -> _Outcome:
    """Least objective amounts meeting ``rows`` and ``levels`` (cutting planes for the latter).

    elastic: every goal gets a slack; first the least total slack, then the least objective
    with that slack. Without it, an unreachable goal makes the problem infeasible.

    Continuous amounts are rounded to AMOUNT_STEP afterwards; a row keeps a margin of
    AMOUNT_STEP |coef_j| for each continuous candidate j it guards, so that rounding cannot
    break it. Without elastic, the first solve guards none; if the rounded answer then misses
    a row, the candidates it uses are guarded and it is solved again (rounding moves only
    candidates in use), until the guarded set holds every candidate in use.
    """
    n = model.n
    k = len(rows) + len(levels) if elastic else 0
    nz = n + k
    if not elastic and any(r.impossible for r in rows):
        return _Outcome("infeasible", message="a goal is beyond what any absorption can reach")
    sy = model.step
    cont = ~model.integer
    base_a, base_b = [], []
    for _, idx, area in model.surface_groups:
        if len(idx) > 1:
            row = np.zeros(nz)
            row[idx] = sy[idx]
            base_a.append(row)
            base_b.append(area)
    goal_a = []
    for i, r in enumerate(rows):
        row = np.zeros(nz)
        row[:n] = -r.coef * sy
        if elastic:
            row[n + i] = -r.slack_scale
        goal_a.append(row)
    lo = np.zeros(nz)
    hi = np.concatenate([model.ub_y, np.full(k, np.inf)])
    integ = np.concatenate([model.integer, np.zeros(k, bool)])
    pmax = float(model.primary.max(initial=0.0))
    qmax = float(model.secondary.max(initial=0.0))
    p = model.primary / pmax if pmax > 0 else np.zeros(n)
    q = model.secondary / qmax if qmax > 0 else np.zeros(n)
    c_x = p + (TIE_WEIGHT if pmax > 0 else 1.0) * q
    c_obj = np.concatenate([c_x * sy, np.zeros(k)])
    cuts = []                       # (row in z, rhs before the margin, |gradient| in x)
    slack_col = {g.key: n + len(rows) + i for i, g in enumerate(levels)} if elastic else {}
    solves = [0]

    def matrices(guard, extra_a, extra_b):
        b_goal = [-(r.rhs + AMOUNT_STEP * float(np.abs(r.coef[guard]).sum())
                    + 1e-9 * (1.0 + abs(r.bound))) for r in rows]
        b_cut = [rhs - AMOUNT_STEP * float(gabs[guard].sum()) for _, rhs, gabs in cuts]
        return (base_a + goal_a + extra_a + [ct[0] for ct in cuts],
                base_b + b_goal + extra_b + b_cut)

    def kelley(c, extra_a, extra_b, integral, guard):
        tol = LEVEL_TOL_DB if integral else LEVEL_TOL_DB / 5.0
        last = None
        for rnd in range(1, MAX_CUT_ROUNDS + 1):
            solves[0] += 1
            a_ub, b_ub = matrices(guard, extra_a, extra_b)
            status, z, msg = _lp(c, a_ub, b_ub, lo, hi, integ if integral else np.zeros(nz, bool))
            if status in ("infeasible", "error"):
                return _Outcome(status, rounds=rnd, message=msg)
            x = model.to_amounts(z[:n], rounded=integral)
            last = _Outcome(status, x, z[n:], rnd, message=msg)
            added = False
            for g in levels:
                f, grad = model.level_energy(g, x)
                allowed = 1.0 + (max(z[slack_col[g.key]], 0.0) / _DB if elastic else 0.0)
                if f / g.lim <= allowed * 10.0 ** (tol / 10.0):
                    continue
                gl = grad / g.lim
                row = np.zeros(nz)
                row[:n] = gl * sy
                if elastic:
                    row[slack_col[g.key]] = -1.0 / _DB
                cuts.append((row, 1.0 - f / g.lim + float(gl @ x), np.abs(gl)))
                added = True
            if not added:
                return last
        last.status = "stopped"
        return last

    def rows_hold(x, slack):
        for i, r in enumerate(rows):
            s = r.slack_scale * max(float(slack[i]), 0.0) if elastic else 0.0
            if float(r.coef @ x) + s < r.rhs - 1e-7:       # HiGHS' feasibility tolerance
                return False
        return True

    def run(c, extra_a=(), extra_b=()):
        extra_a, extra_b = list(extra_a), list(extra_b)
        guard = cont.copy() if elastic else np.zeros(n, bool)
        for _ in range(n + 1):
            if integ.any() and levels:
                kelley(c, extra_a, extra_b, False, guard)   # cheap cuts from the relaxation
            out = kelley(c, extra_a, extra_b, True, guard)
            if out.x is None or rows_hold(out.x, out.slack):
                break
            used = cont & (out.x > 0)
            if not (used & ~guard).any():
                used = cont                                # guard every candidate then
            if not (used & ~guard).any():
                break
            guard = guard | used
        out.rounds, out.cuts = solves[0], len(cuts)
        return out

    if not elastic:
        return run(c_obj)
    c_slack = np.concatenate([np.zeros(n), np.ones(k)])
    first = run(c_slack)
    if first.status in ("infeasible", "error"):
        return first
    s1 = float(np.sum(first.slack))
    row = np.concatenate([np.zeros(n), np.ones(k)])
    second = run(c_obj, [row], [s1 + 1e-6 * (1.0 + s1)])
    if second.status in ("infeasible", "error"):
        return first
    return second


# --- checking a plan with the engine ---------------------------------------------------------

def _violations(model: _Model, res) -> list[dict]:
    """Every goal the evaluated room misses, with the engine's value and the limit."""
    out = []
    t = res.rt60_s[model.method]
    for b in range(len(model.bands)):
        if not np.isnan(model.rt_max[b]) and t[b] > model.rt_max[b] + RT_TOL_S:
            out.append({"key": ("rt_max", b), "value": float(t[b]), "limit": model.rt_max[b]})
        if not np.isnan(model.rt_min[b]) and t[b] < model.rt_min[b] - RT_TOL_S:
            out.append({"key": ("rt_min", b), "value": float(t[b]), "limit": model.rt_min[b]})
    recs = {r.name: r for r in res.receivers}
    for gi, lg in enumerate(model.goals.levels):
        r = recs[lg.receiver]
        if lg.max_db is not None:
            for b in range(len(model.bands)):
                lim = float(lg.max_db[b])
                if not np.isnan(lim) and r.level_db[b] > lim + LEVEL_TOL_DB:
                    out.append({"key": ("band_level", gi, b), "value": float(r.level_db[b]),
                                "limit": lim, "direct": float(r.direct_db[b])})
        if lg.max_dba is not None and r.level_dba > lg.max_dba + LEVEL_TOL_DB:
            out.append({"key": ("dba", gi), "value": float(r.level_dba),
                        "limit": float(lg.max_dba), "direct": float(r.direct_dba)})
    return out


def _describe(model: _Model, x) -> str:
    """The treatment x in words, for the reasons."""
    parts = []
    at_limit = x >= model.ub_x - 0.005
    for si, idx, area in model.surface_groups:
        used = [j for j in idx if x[j] > 0]
        if not used:
            continue
        total = float(sum(x[j] for j in used))
        names = [f"'{model.candidates[j].name}'" for j in used]
        with_ = (names[0] if len(used) == 1 else
                 " and ".join(f"{nm} ({x[j]:.1f} m^2)" for nm, j in zip(names, used)))
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


def _explain(model: _Model, violations, stopped: bool) -> list[str]:
    """One reason per missed goal: what the candidates reach at best on that goal alone, and
    why that is not enough (or that the goals conflict)."""
    reasons = []
    title = METHOD_TITLES[model.method]
    rows = {r.key: r for r in model.rows}
    levels = {g.key: g for g in model.levels}
    for vi in violations:
        key = vi["key"]
        kind = key[0]
        if stopped and kind in ("dba", "band_level"):
            name = model.goals.levels[key[1]].receiver
            unit = "dB(A)" if kind == "dba" else f"dB at {model.bands[key[2]]:g} Hz"
            reasons.append(f"'{name}': the cutting planes stopped after {MAX_CUT_ROUNDS} rounds "
                           f"at {vi['value']:.1f} {unit} against {vi['limit']:.1f}; the plan "
                           "may fall a little short of this goal")
            continue
        alone_rows = [rows[key]] if key in rows else []
        alone_levels = [levels[key]] if key in levels else []
        best = _solve(model, alone_rows, alone_levels, elastic=True)
        x_best = best.x if best.x is not None else np.zeros(model.n)
        res = evaluate(apply_to_room(model.room, model.candidates, x_best))
        how = _describe(model, x_best)
        if kind in ("rt_max", "rt_min"):
            b = key[1]
            band = model.bands[b]
            t_best = float(res.rt60_s[model.method][b])
            if kind == "rt_max" and t_best > vi["limit"] + RT_TOL_S:
                lead = (f"even {how} (the most absorption the candidates allow at {band:g} Hz)"
                        if how else f"no candidate adds absorption at {band:g} Hz, so the room")
                reasons.append(f"{lead[0].upper() + lead[1:]} leaves {band:g} Hz at "
                               f"{t_best:.2f} s against {vi['limit']:.2f} s ({title}); "
                               f"{_advice(band)}")
            elif kind == "rt_min" and t_best < vi["limit"] - RT_TOL_S:
                lead = (f"even the least absorbing choice ({how})" if how else
                        "even untreated, the room")
                reasons.append(f"{lead[0].upper() + lead[1:]} leaves {band:g} Hz at "
                               f"{t_best:.2f} s against a minimum of {vi['limit']:.2f} s "
                               f"({title}): it is too dead there already; "
                               f"{_advice(band, more=False)}")
            else:
                word = "at most" if kind == "rt_max" else "at least"
                reasons.append(f"{band:g} Hz ends at {vi['value']:.2f} s against {word} "
                               f"{vi['limit']:.2f} s ({title}): the candidates can meet this "
                               "goal alone but not together with the others (this plan has "
                               "the least total shortfall); "
                               + (_advice(band) + " that leave the other bands alone"
                                  if kind == "rt_max" else _advice(band, more=False)))
            continue
        name = model.goals.levels[key[1]].receiver
        rec = next(r for r in res.receivers if r.name == name)
        if kind == "dba":
            l_best, direct, unit = float(rec.level_dba), float(rec.direct_dba), "dB(A)"
            rev = rec.reverberant_db + band_constants(model.bands)[1]
            band = model.bands[int(np.argmax(rev))]
            who = name
        else:
            b = key[2]
            band = model.bands[b]
            l_best, direct, unit = float(rec.level_db[b]), float(rec.direct_db[b]), "dB"
            who = f"{name}, {band:g} Hz"
        lim = vi["limit"]
        if direct >= lim:
            reasons.append(f"{who}: {l_best:.1f} {unit} at best against {lim:.1f} {unit}; "
                           f"the direct sound alone gives {direct:.1f} {unit} there, so "
                           "absorption cannot reach it: move the receiver or the source, "
                           "enclose or quieten the source")
        elif l_best > lim + LEVEL_TOL_DB:
            reasons.append(f"{who}: {l_best:.1f} {unit} at best against {lim:.1f} {unit} "
                           f"(the direct sound alone gives {direct:.1f} {unit}"
                           + (f"; the reverberant sound is strongest at {band:g} Hz"
                              if kind == "dba" else "")
                           + f"); the candidates cannot absorb enough: {_advice(band)}")
        else:
            reasons.append(f"{who}: {vi['value']:.1f} {unit} against {lim:.1f} {unit}: "
                           "the candidates can meet this goal alone but not together with the "
                           "others (this plan has the least total shortfall)")
    return reasons


# --- the public functions --------------------------------------------------------------------

def apply_to_room(room: Room, candidates: Sequence[Candidate], amounts) -> Room:
    """The room with a treatment applied, as the engine sees it.

    Parameters
    ----------
    room : Room -- the untreated room
    candidates : sequence of Candidate -- the treatments, as given to :func:`plan`
    amounts : array_like, shape (len(candidates),) -- each candidate's amount [m^2 or units]

    Returns
    -------
    Room -- a new room: each covered part of a surface is a new Surface with the candidate's
    alpha and material and the same face and count, placed after the surface it covers, whose
    area shrinks by what is covered (and which is left out when nothing of it remains); units
    become RoomObjects with ``count`` = amount.

    Notes
    -----
    The total surface area S is unchanged; covering an area :math:`x` of surface i with
    candidate j changes the absorption by :math:`x (\\alpha_j - \\alpha_i)` per band, and n
    units add :math:`n A_j`. Evaluating this room is how :func:`plan` checks its answer.

    References
    ----------
    .. [1] ISO 354:2003, 3.4-3.6 (equivalent absorption area of a surface and of an object).
    """
    cands = _check_candidates(room, candidates)
    x = np.asarray(amounts, dtype=float)
    if x.shape != (len(cands),):
        raise ValueError(f"amounts: must have {len(cands)} values, one per candidate; got "
                         f"shape {x.shape}")
    for j, cd in enumerate(cands):
        if not (math.isfinite(x[j]) and x[j] >= 0):
            raise ValueError(f"amounts[{j}]: {x[j]:g} must be finite and 0 or more "
                             f"(candidate '{cd.name}')")
        if x[j] > float(cd.max_amount) * (1 + 1e-9) + 1e-9:
            raise ValueError(f"amounts[{j}]: {x[j]:g} is above the candidate's max_amount "
                             f"{float(cd.max_amount):g} (candidate '{cd.name}')")
    covers: dict[int, list[int]] = {}
    for j, cd in enumerate(cands):
        if cd.kind == "cover" and x[j] > 0:
            covers.setdefault(operator.index(cd.surface), []).append(j)
    surfaces = []
    for si, sf in enumerate(room.surfaces):
        idx = covers.get(si, [])
        total = sf.total_area
        used = float(sum(x[j] for j in idx))
        if used > total * (1 + 1e-9) + 1e-9:
            raise ValueError(f"amounts: the cover candidates on surface {si} ('{sf.name}') "
                             f"cover {used:g} m^2, more than its {total:g} m^2")
        rest = total - used
        if rest > 1e-9 * max(total, 1.0):
            surfaces.append(Surface(sf.name, rest / sf.count, sf.alpha, count=sf.count,
                                    face=sf.face, material=sf.material))
        for j in idx:
            cd = cands[j]
            surfaces.append(Surface(f"{sf.name} ({cd.name})", x[j] / sf.count, cd.alpha,
                                    count=sf.count, face=sf.face, material=cd.material))
    objects = list(room.objects) + [
        RoomObject(cd.name, cd.absorption, count=float(x[j]), material=cd.material)
        for j, cd in enumerate(cands) if cd.kind == "units" and x[j] > 0]
    return Room(bands_hz=room.bands_hz, volume=room.volume, surfaces=tuple(surfaces),
                dimensions=room.dimensions, air=room.air, objects=tuple(objects),
                sources=room.sources, receivers=room.receivers, title=room.title)


def plan(room: Room, candidates: Sequence[Candidate], goals: Goals, *,
         objective: str | None = None) -> Plan:
    """The cheapest (or smallest) treatment that brings a room to its goals.

    Parameters
    ----------
    room : Room -- the untreated room
    candidates : sequence of Candidate -- what the plan may use; surfaces by index
    goals : Goals -- RT60 window per band (by ``goals.method``) and/or levels at receivers
    objective : "cost" (sum of cost x amount) or "area" (m^2 covered plus units x area_each);
        None takes ``goals.objective``

    Returns
    -------
    Plan -- amounts per candidate (m^2 to 0.01, whole units and whole steps), cost, area, and
    the engine's RT (plan's method) and dB(A) levels before and after. ``feasible`` False:
    the plan with the least total shortfall, and ``reasons`` band by band.

    Notes
    -----
    Variables: :math:`0 \\le x_j \\le x_{j,max}`, and the covers on each surface add up to at
    most its area. Per band, absorption is affine in x,
    :math:`A_b(x) = A_{0,b} + \\sum_j \\Delta A_{jb} x_j`, with :math:`A_0` the surfaces'
    :math:`\\sum S_i \\alpha_i` plus the objects' absorption (air not included), and
    :math:`\\Delta A_{jb} = \\alpha_{jb} - \\alpha_{ib}` per m^2 covered of surface i, or the
    absorption per unit.

    Sabine (air as in the engine, outside A) [1]_:

    .. math:: T_b \\le T_{max} \\iff A_b \\ge K V / T_{max} - 4 m_b V

    Eyring as the engine computes it [2]_: objects count in the mean coefficient and every
    alpha is capped at 0.99 (so :math:`A^{log}_b = \\sum S_i \\min(\\alpha_i, 0.99) + A_{obj}`),
    :math:`T_b = K V / (-S \\ln(1 - \\min(A^{log}_b / S, 0.99)) + 4 m_b V)`, so

    .. math:: T_b \\le T_{max} \\iff A^{log}_b \\ge S (1 - e^{-(K V / T_{max} - 4 m_b V)/S})

    which no treatment reaches when the right side exceeds 0.99 S. ``rt60_min`` gives the same
    expressions as upper bounds.

    Levels, classic diffuse field [3]_: with :math:`u_b = A^{log}_b + 4 m_b V` and the engine's
    room constant :math:`R_b = S \\bar\\alpha_t / (1 - \\bar\\alpha_t)`,
    :math:`\\bar\\alpha_t = \\min(u_b / S, 0.99)`, so that :math:`4 / R_b = 4 / \\min(u_b,
    0.99 S) - 4 / S`, the level at a receiver is
    :math:`E_b = D_b + P_b \\cdot 4 / R_b` with :math:`D_b = \\sum_s Q_s W_{sb} / (4 \\pi r_s^2)`
    and :math:`P_b = \\sum_s W_{sb}`, :math:`W_{sb} = 10^{L_{W,sb}/10}`. A band limit is a
    bound :math:`u_b \\ge 4 P_b / (10^{L_{max}/10} - D_b + 4 P_b / S)`; a dB(A) limit is

    .. math:: \\sum_b w_b \\left(D_b + \\frac{4 P_b}{\\min(u_b, 0.99 S)} - \\frac{4 P_b}{S}
              \\right) \\le 10^{L_{max}/10}, \\quad w_b = 10^{A_b/10}

    convex in x, met by cutting planes [4]_: solve, evaluate the exact sum at the (rounded)
    answer, add its tangent plane, repeat until within LEVEL_TOL_DB (at most MAX_CUT_ROUNDS
    rounds; ``status`` says if it stopped). With whole units or steps the cuts of the LP
    relaxation are gathered first, then the MILP is cut the same way.

    The objective is normalised and a tie-break of TIE_WEIGHT on the other measure (area or
    cost) keeps answers stable. When no plan meets every goal, every goal gets a slack (RT
    beyond its limit relative to the limit, level excess in linearised dB); the least sum of
    slacks is found first, then the least objective with it. Continuous amounts are rounded to
    0.01 after solving; the linear goals keep a margin for it. The result is checked by
    :func:`~roomcalc.engine.analysis.evaluate` on :func:`apply_to_room`'s room: ``feasible``
    is what the engine says.

    References
    ----------
    .. [1] W. C. Sabine, Collected Papers on Acoustics (1922); ISO 354:2003, eq. (1)-(3);
       ISO 3382-2:2008 (reverberation time).
    .. [2] C. F. Eyring, "Reverberation time in 'dead' rooms", J. Acoust. Soc. Am. 1 (1930) 217.
    .. [3] L. L. Beranek, Acoustics (1954), ch. 10, eq. (10.26), (10.29).
    .. [4] J. E. Kelley, "The cutting-plane method for solving convex programs", J. SIAM 8
       (1960) 703; Q. Huangfu & J. A. J. Hall, "Parallelizing the dual revised simplex method",
       Math. Prog. Comp. 10 (2018) 119 (HiGHS, through scipy.optimize.linprog and milp).
    """
    model = _build(room, candidates, goals, objective)
    n = model.n
    solver = ("scipy.optimize.milp (HiGHS)" if model.integer.any() else
              "scipy.optimize.linprog (HiGHS)")
    has_goals = bool(model.rows or model.levels)
    if n == 0 or not has_goals:
        out = _Outcome("optimal", np.zeros(n), rounds=0)
        solver = "none needed" if not has_goals else "none (no candidates)"
    else:
        out = _solve(model, model.rows, model.levels, elastic=False)
    solved = out.status in ("optimal", "stopped")
    partial = None
    if not solved:
        partial = _solve(model, model.rows, model.levels, elastic=True)
        x = partial.x if partial.x is not None else np.zeros(n)
    else:
        x = out.x
    x = np.asarray(x, dtype=float)
    after = evaluate(apply_to_room(room, model.candidates, x))
    missed = _violations(model, after)
    stopped = (out.status == "stopped") or (partial is not None and partial.status == "stopped")
    reasons = _explain(model, missed, stopped) if missed else []
    if partial is not None and partial.status in ("infeasible", "error"):
        reasons.insert(0, f"the solver could not find a partial plan: {partial.message}")

    last = partial if partial is not None else out
    n_cuts = last.cuts
    cut_text = f", {n_cuts} level cut{'s' if n_cuts != 1 else ''}" if n_cuts else ""
    if not missed:
        status = ("optimal" if solved else "met after rounding") + cut_text
        if out.status == "stopped":
            status = f"stopped after {MAX_CUT_ROUNDS} rounds of level cuts, within tolerance"
    elif n == 0:
        status = "infeasible: no candidates"
    elif solved:
        status = (f"stopped after {MAX_CUT_ROUNDS} rounds of level cuts" if stopped else
                  "solved, but the engine finds a goal missed") + cut_text
    else:
        status = "infeasible: least total shortfall" + cut_text

    items, total_cost, total_area = [], 0.0, 0.0
    for j, cd in enumerate(model.candidates):
        if x[j] <= 0:
            continue
        cost = float(x[j] * cd.cost)
        sname = model.room.surfaces[cd.surface].name if cd.kind == "cover" else None
        items.append(PlanItem(cd.name, cd.kind, sname, float(x[j]), cost))
        total_cost += cost
        total_area += float(x[j]) * (1.0 if cd.kind == "cover" else float(cd.area_each))
    wanted = ({lg.receiver for lg in goals.levels} if goals.levels else
              {r.name for r in room.receivers})
    lv_before = {r.name: float(r.level_dba) for r in model.before.receivers if r.name in wanted}
    lv_after = {r.name: float(r.level_dba) for r in after.receivers if r.name in wanted}
    return Plan(feasible=not missed, items=tuple(items), total_cost=total_cost,
                total_area=total_area, method=model.method, objective=model.objective,
                rt60_before=model.before.rt60_s[model.method],
                rt60_after=after.rt60_s[model.method], amounts=x, reasons=tuple(reasons),
                levels_before=lv_before, levels_after=lv_after, solver=solver, status=status,
                cautions=tuple(after.cautions))
