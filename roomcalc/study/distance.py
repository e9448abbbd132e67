"""Level against distance for one source of an evaluated room, with the receivers' levels from
that source as points: what the interface's distance plot (and, later, the hand-off report)
shows."""

from __future__ import annotations

from dataclasses import dataclass

from roomcalc.engine.analysis import RoomResult, distance_curves
from roomcalc.engine.bands import a_weighted_total

__all__ = ["DistancePicture", "distance_picture"]


@dataclass(frozen=True, eq=False)
class DistancePicture:
    """``curves`` as :func:`roomcalc.engine.analysis.distance_curves` gives them; ``band_index``
    the band shown (None: dB(A)); ``points`` (receiver, distance [m], level [dB]) from this
    source alone."""

    source: str
    curves: dict
    band_index: int | None
    points: tuple[tuple[str, float, float], ...]


def distance_picture(result: RoomResult, source: str, band_hz: int | None = None,
                     points: int = 120) -> DistancePicture:
    """The curves of ``source`` in ``band_hz`` (None: A-weighted) and each receiver's level
    from it. Raises ValueError for a source or band the room does not have."""
    names = [s.name for s in result.sources]
    if source not in names:
        raise ValueError(f"source: {source!r} is not a source of this room")
    bands = list(result.bands_hz)
    if band_hz is not None and band_hz not in bands:
        raise ValueError(f"band: {band_hz} Hz is not a band of this room")
    bi = None if band_hz is None else bands.index(band_hz)
    pts = []
    for r in result.receivers:
        lev = r.per_source_db[source]
        level = float(a_weighted_total(lev, result.bands_hz)) if bi is None else float(lev[bi])
        pts.append((r.name, float(r.distances_m[source]), level))
    return DistancePicture(source, distance_curves(result, source, points=points), bi,
                           tuple(pts))
