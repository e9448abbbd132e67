"""The planner's public data model: what it may use, what it must reach, and its answer.

The file layer builds these from a room file's ``[target]`` and ``[[candidates]]`` tables, in
SI units, with surfaces named by their index in the engine ``Room``:

- :class:`Candidate` -- one treatment the planner may use, either *covering* part of a surface
  (replacing that surface's alpha over the covered area) or *added as units* (free-hanging
  panels, baffles, bass traps: absorption area per unit).
- :class:`Goals` -- what the room must reach: an RT60 window per band (by one of
  :data:`PLAN_METHODS`), and/or maximum levels at receivers (per band or dB(A)).
- :class:`Plan` / :class:`PlanItem` -- the answer.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

__all__ = ["OBJECTIVES", "PLAN_METHODS", "KINDS", "Candidate", "LevelGoal", "Goals",
           "PlanItem", "Plan", "frozen_array", "cover_surfaces", "cover_shares"]

#: What a plan minimises: the total cost, or the total area (m^2 covered plus units x
#: ``area_each``).
OBJECTIVES = ("cost", "area")
#: The formulas a plan can be made with (the engine's names). Sabine, Eyring and
#: Millington-Sette are linear in the amounts and planned exactly; Fitzroy and Arau-Puchades
#: are planned through Eyring's linear bound, tightened band by band until the engine confirms.
PLAN_METHODS = ("sabine", "eyring", "millington", "fitzroy", "arau_puchades")
#: The two kinds of candidate.
KINDS = ("cover", "units")


def frozen_array(x) -> np.ndarray | None:
    """``x`` as a read-only float array (None stays None); shared by the planner's modules."""
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
    the surface's own total area is a hard limit too. ``surface`` may be a tuple of indices:
    one treatment over several surfaces (all walls), with one limit and one price for the area
    covered over all of them, spread over them in proportion to their total areas
    (:func:`cover_shares`). ``alpha`` may exceed 1 up to the
    catalogue's largest (ISO 354 reports give such values): Sabine takes it as given, the
    logarithmic formulas cap it at 0.99 as the engine does. ``step`` [m^2], if given, makes the
    covered area a whole number of steps (whole panels, e.g. 1.2 x 0.6 = 0.72 m^2).
    kind "units": adds up to ``max_amount`` units of ``absorption`` [m^2 per unit per band];
    whole units unless ``integer`` is False. ``area_each`` [m^2] is what one unit counts for
    when the objective is the least area.
    ``cost`` is per m^2 (cover) or per unit (units), in the file's currency. ``panel``
    (width, height) [m] is the panel ``step`` is the area of, when the file states it; it is
    only shown (the planner uses ``step``).
    """

    name: str
    kind: str                                   # "cover" or "units"
    cost: float = 0.0
    max_amount: float = float("inf")            # m^2 (cover) or units
    surface: int | tuple[int, ...] | None = None    # cover: index (indices) into room.surfaces
    alpha: np.ndarray | None = None             # cover: alpha per band
    absorption: np.ndarray | None = None        # units: m^2 per unit per band
    step: float | None = None                   # cover: whole steps of this many m^2
    integer: bool = True                        # units: whole numbers of units
    area_each: float = 1.0                      # units: m^2 each, for the least-area objective
    material: str | None = None                 # catalogue id, kept for writing the room back
    panel: tuple[float, float] | None = None    # cover: one panel's width and height [m], shown

    def __post_init__(self):
        object.__setattr__(self, "alpha", frozen_array(self.alpha))
        object.__setattr__(self, "absorption", frozen_array(self.absorption))
        if isinstance(self.surface, list):
            object.__setattr__(self, "surface", tuple(self.surface))


def cover_surfaces(cd: Candidate) -> tuple[int, ...]:
    """The indices of the surfaces a cover candidate covers (one or more), in its order."""
    s = cd.surface
    return tuple(int(i) for i in s) if isinstance(s, tuple) else (int(s),)


def cover_shares(total_areas) -> np.ndarray:
    """How one cover candidate's area spreads over the surfaces it covers: in proportion to
    their total areas, :math:`w_i = S_i / \\sum_k S_k`, so that each surface gets the same
    share of itself covered (covering x m^2 in all covers :math:`x / \\sum_k S_k` of each).
    ``total_areas`` [m^2], one per surface; all 0: equal shares.

    >>> cover_shares([30.0, 10.0]).tolist()
    [0.75, 0.25]
    """
    a = np.asarray(total_areas, dtype=float)
    tot = float(a.sum())
    return a / tot if tot > 0 else np.full(a.size, 1.0 / max(a.size, 1))


@dataclass(frozen=True, eq=False)
class LevelGoal:
    """A maximum level at a receiver: ``max_dba`` (A-weighted total of all sources) and/or
    ``max_db`` per band (NaN where there is no limit)."""

    receiver: str
    max_dba: float | None = None
    max_db: np.ndarray | None = None

    def __post_init__(self):
        object.__setattr__(self, "max_db", frozen_array(self.max_db))


@dataclass(frozen=True, eq=False)
class Goals:
    """What the plan must reach. ``rt60_max``/``rt60_min`` per band [s], NaN where there is no
    limit (None: no limit in any band); ``method`` (one of :data:`PLAN_METHODS`) is the formula
    the window is judged by."""

    method: str = "eyring"
    rt60_max: np.ndarray | None = None
    rt60_min: np.ndarray | None = None
    levels: tuple[LevelGoal, ...] = ()
    objective: str = "cost"
    source: str = ""                            # where the window came from (a criterion id)

    def __post_init__(self):
        object.__setattr__(self, "rt60_max", frozen_array(self.rt60_max))
        object.__setattr__(self, "rt60_min", frozen_array(self.rt60_min))
        object.__setattr__(self, "levels", tuple(self.levels))


@dataclass(frozen=True)
class PlanItem:
    """One line of a plan: how much of a candidate, and what it costs."""

    candidate: str
    kind: str
    surface: str | None          # the covered surface's name (cover; several: "A, B"), None (units)
    amount: float                # m^2 (cover) or units
    cost: float


@dataclass(frozen=True, eq=False)
class Plan:
    """The planner's answer. ``feasible`` False: ``items`` is the best partial plan (least
    total violation) and ``reasons`` say, band by band, why the goals cannot be met.

    ``total_area`` [m^2] counts covered area only; ``total_units`` counts the units added
    (the two are never summed). ``rt60_before`` and ``rt60_after`` [s] are the engine's, by
    ``method``; ``feasible`` is the engine's verdict on the treated room."""

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
    status: str = ""                         # the solver's outcome in words
    cautions: tuple[str, ...] = ()           # hearing cautions of the treated room
    total_units: float = 0.0                 # units added (count)
