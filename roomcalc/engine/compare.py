"""Before and after: two evaluated rooms compared by one formula, the one in force for the room
before."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from roomcalc.engine.bands import db_from_ratio, energetic_sum
from roomcalc.engine.result import METHOD_TITLES, METHODS, RoomResult

__all__ = ["ReceiverChange", "Comparison", "compare"]


@dataclass(frozen=True, eq=False)
class ReceiverChange:
    name: str
    level_change_db: np.ndarray
    level_change_dba: float
    reverberant_change_dba: float
    inside_critical_distance: str | None


@dataclass(frozen=True, eq=False)
class Comparison:
    """Before and after: changes are after minus before (negative = shorter or quieter).

    ``method`` is the formula both rooms are compared by: the one in force for the room before
    (``before.method``). ``rt60_change_s`` holds the change by every formula both rooms have;
    :attr:`rt60_change_in_force_s` the change by ``method``.
    """

    before: RoomResult
    after: RoomResult
    rt60_change_s: dict[str, np.ndarray]
    reverberant_reduction_db: np.ndarray
    receivers: tuple[ReceiverChange, ...]
    notes: tuple[str, ...]
    method: str

    @property
    def rt60_change_in_force_s(self) -> np.ndarray:
        """RT60 after minus before by the formula in force for the room before [s]."""
        return self.rt60_change_s[self.method]


def compare(before: RoomResult, after: RoomResult) -> Comparison:
    """Compare two evaluated rooms, e.g. a room and its treated copy.

    Both rooms are compared by the formula in force for the room before (``before.method``),
    like for like, even where the treated room's own recommendation differs: a change of
    formula would show as a change of the room. ``ValueError`` when that formula is unavailable
    for the room after (e.g. Fitzroy when the treated room names no faces).

    Notes
    -----
    The reverberant-field reduction is

    .. math:: \\Delta L_{rev} = 10 \\lg(R_2 / R_1)

    and at a receiver at distance r the total change is
    :math:`10 \\lg[(Q/4\\pi r^2 + 4/R_1) / (Q/4\\pi r^2 + 4/R_2)]`, much smaller than the
    reverberant reduction inside the critical distance, where direct sound dominates.

    References
    ----------
    .. [1] Bies, Hansen & Howard, Engineering Noise Control, 5th ed. (2017), sec. 6.4
       (common practice).
    """
    if before.bands_hz != after.bands_hz:
        raise ValueError(f"bands: before has {list(before.bands_hz)} Hz, after has "
                         f"{list(after.bands_hz)} Hz; compare needs the same bands")
    method = before.method
    if method not in after.rt60_s:
        why = after.unavailable.get(method, "not computed")
        raise ValueError(f"method: {METHOD_TITLES[method]}, the formula in force for the room "
                         f"before, is unavailable for the room after ({why}); evaluate both "
                         "rooms with a formula both have")
    rt_change = {k: after.rt60_s[k] - before.rt60_s[k] for k in METHODS
                 if k in before.rt60_s and k in after.rt60_s}
    red = db_from_ratio(after.room_constant_m2 / before.room_constant_m2)
    b_rec = {r.name: r for r in before.receivers}
    b_src = {s.name: s for s in before.sources}
    bands = before.bands_hz
    i_mid = bands.index(1000) if 1000 in bands else len(bands) // 2
    changes, notes = [], []
    for ra in after.receivers:
        rb = b_rec.get(ra.name)
        if rb is None:
            continue
        d_band = ra.level_db - rb.level_db
        d_a = ra.level_dba - rb.level_dba
        d_rev = ra.reverberant_dba - rb.reverberant_dba
        inside = None
        if rb.per_source_db:
            loudest = max(rb.per_source_db, key=lambda n: energetic_sum(rb.per_source_db[n]))
            src = b_src.get(loudest)
            if src is not None:
                rc = float(src.critical_distance_m[i_mid])
                dist = rb.distances_m[loudest]
                if dist < rc:
                    inside = loudest
                # The note only when the reverberant field falls by a change the reports show
                # (0.1 dB at one decimal); rounded, then +0.0, so no "-0.0" is ever written.
                fall_rev, fall_a = round(-d_rev, 1) + 0.0, round(-d_a, 1) + 0.0
                if inside is not None and fall_rev > 0.0:
                    notes.append(
                        f"'{ra.name}' is {dist:.1f} m from '{loudest}', inside its critical "
                        f"distance ({rc:.1f} m at {bands[i_mid]} Hz): direct sound dominates "
                        f"there, so the level falls by {fall_a:.1f} dB(A) although the "
                        f"reverberant field falls by {fall_rev:.1f} dB(A). Absorption cannot "
                        "reduce direct sound; a screen, an enclosure or distance can.")
        changes.append(ReceiverChange(ra.name, d_band, float(d_a), float(d_rev), inside))
    return Comparison(before, after, rt_change, red, tuple(changes), tuple(notes), method)


