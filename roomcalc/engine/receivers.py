"""The steady sound field of an evaluated room at its sources and receivers: critical distances,
levels from every source summed energetically, level against distance, and the hearing
caution. The equations are those of :mod:`roomcalc.engine.field`, applied to all receiver and
source pairs at once."""

from __future__ import annotations

import numpy as np

from roomcalc.engine import field as field_mod
from roomcalc.engine.bands import (a_weighted_total, a_weighted_total_from_energy,
                                   db_from_ratio)
from roomcalc.engine.checks import finite, in_range, positive
from roomcalc.engine.model import Room
from roomcalc.engine.result import Finding, ReceiverArrays, RoomResult, SourceResult

__all__ = ["CAUTION_DBA", "MIN_DISTANCE_M", "CLOSE_DISTANCE_M", "HEARING_CAUTION",
           "sources_and_receivers", "distance_curves"]

#: exposure action value).
CAUTION_DBA = 80.0

#: Closest a receiver may be to a source [m]; nearer, the point-source level has no meaning.
MIN_DISTANCE_M = 1e-3

HEARING_CAUTION = (
    "Levels of 80 dB(A) or more can damage hearing over a working day. As examples of the rules: "
    "EU Directive 2003/10/EC sets exposure action values of 80 and 85 dB(A) and a limit of "
    "87 dB(A) (LEX,8h); OSHA 29 CFR 1910.95 sets a permissible limit of 90 dBA over 8 h (5 dB "
    "exchange rate) with a hearing-conservation action level of 85 dBA. Wear hearing protection "
    "where such levels occur. These are estimates: they do not replace a measurement by a "
    "competent person, and the regulations and codes that apply where you are govern."
)

#: Receivers nearer a source than this get a warning [m]: a real source is not a point there
#: (common practice).
CLOSE_DISTANCE_M = 0.5


def _distances(room: Room) -> np.ndarray:
    """Distances [m] receiver x source: given ones, else from the positions, in one array."""
    srcs, recs = room.sources, room.receivers
    sp = np.array([s.position if s.position is not None else (np.nan,) * 3 for s in srcs],
                  dtype=float).reshape(len(srcs), 3)
    rp = np.array([r.position if r.position is not None else (np.nan,) * 3 for r in recs],
                  dtype=float).reshape(len(recs), 3)
    diff = rp[:, None, :] - sp[None, :, :]
    dist = np.sqrt(np.einsum("rsk,rsk->rs", diff, diff))
    index = {s.name: j for j, s in enumerate(srcs)}
    for i, r in enumerate(recs):
        for name, d in r.distances.items():
            j = index.get(name)
            if j is not None:
                dist[i, j] = d
    if np.isnan(dist).any():
        i, j = (int(x[0]) for x in np.nonzero(np.isnan(dist)))
        raise ValueError(f"receiver {recs[i].name!r}: no distance to source {srcs[j].name!r} "
                         "and no positions to compute it from")
    return in_range("receivers: distance to a source", dist, MIN_DISTANCE_M, unit="m",
                    why="nearer, a receiver is at a source's position")


def sources_and_receivers(room: Room, r_const, rt60, reverberant_model, found):
    """Critical distances per source and levels per receiver, all pairs at once.

    Returns (source results, receiver arrays or None, cautions); appends a Finding for
    receivers closer than CLOSE_DISTANCE_M to a source. ``rt60`` is the time in force (for
    Barron & Lee's reverberant term)."""
    srcs = room.sources
    if not srcs:
        return (), None, []
    lw, q = _source_inputs(room)
    rc = field_mod.critical_distance_unchecked(q[:, None], r_const[None, :])
    src_results = tuple(SourceResult(s.name, float(q[j]), s.sound_power_db, rc[j])
                        for j, s in enumerate(srcs))
    if not room.receivers:
        return src_results, None, []
    dist = _distances(room)                                                # (R, S)
    arrays = _levels(room, lw, q, dist, r_const, rt60, reverberant_model)
    return src_results, arrays, _cautions_and_closeness(room, arrays, found)


def _source_inputs(room: Room):
    """Sound power (sources, bands) [dB] and directivity (sources,), checked."""
    nb = len(room.bands_hz)
    srcs = room.sources
    if any(s.sound_power_db.shape != (nb,) for s in srcs):
        raise ValueError(f"sources: sound power needs {nb} values per source")
    lw = finite("sources: sound power",
                np.concatenate([s.sound_power_db for s in srcs]), "dB").reshape(len(srcs), nb)
    q = positive("sources: directivity Q", np.array([s.directivity for s in srcs], dtype=float))
    return lw, q


def _levels(room, lw, q, dist, r_const, rt60, reverberant_model) -> ReceiverArrays:
    """Total, direct and reverberant levels at every receiver, per band and A-weighted."""
    power = 10.0 ** (lw / 10.0)                                            # (S, B)
    e_dir = field_mod.direct_term_unchecked(q[None, :, None], dist[:, :, None]) * power[None]
    if reverberant_model == "classic":
        e_rev = field_mod.reverberant_term_unchecked(r_const)[None, None, :] * power[None]
    else:
        e_rev = field_mod.barron_lee_reverberant_term_unchecked(
            rt60[None, None, :], room.volume, dist[:, :, None]) * power[None]
    d_sum = e_dir.sum(axis=1)                                              # (R, B)
    r_sum = np.broadcast_to(e_rev.sum(axis=1), d_sum.shape)
    energy = np.stack([d_sum + r_sum, d_sum, r_sum])                       # (3, R, B)
    levels = db_from_ratio(energy)
    la = a_weighted_total_from_energy(energy, room.bands_hz)               # (3, R)
    return ReceiverArrays(tuple(r.name for r in room.receivers),
                          tuple(s.name for s in room.sources), dist, levels[0], levels[1],
                          levels[2], la, e_dir + e_rev)


def _cautions_and_closeness(room: Room, arrays: ReceiverArrays, found) -> list[str]:
    la, dist, names = arrays.dba, arrays.distances_m, arrays.source_names
    cautions = [f"'{room.receivers[i].name}': estimated {la[0, i]:.1f} dB(A)."
                for i in np.nonzero(la[0] >= CAUTION_DBA)[0]]
    close = np.argwhere(dist < CLOSE_DISTANCE_M)
    if close.size:
        found.append(Finding("receiver-close",
            "; ".join(f"'{room.receivers[i].name}' is {dist[i, j]:.2f} m from '{names[j]}'"
                      for i, j in close[:6]) +
            (f" (and {len(close) - 6} more)" if len(close) > 6 else "") +
            f": closer than {CLOSE_DISTANCE_M} m, where a real source is not a point and the "
            "inverse-square estimate is rough."))
    if cautions:
        cautions.append(HEARING_CAUTION)
    return cautions


def distance_curves(result: RoomResult, source: str, distances_m=None, points: int = 200):
    """Level against distance for one source of an evaluated room, per band and A-weighted.

    Parameters
    ----------
    result : RoomResult -- an evaluated room
    source : str -- the source's name
    distances_m : array_like, optional -- distances [m]; default ``points`` values spaced
        logarithmically from 0.1 m to the room's largest dimension (or the cube root of V x 2)
    points : int -- number of points when distances are not given

    Returns
    -------
    dict with ``distance_m`` (points,), ``total_db``, ``direct_db``, ``reverberant_db``
    (points, bands), the same A-weighted (``*_dba``, (points,)), and ``critical_distance_m``
    (bands,).
    """
    room = result.room
    src = next((s for s in room.sources if s.name == source), None)
    if src is None:
        raise ValueError(f"source: {source!r} is not a source of this room")
    if distances_m is None:
        far = max(room.dimensions) * 1.2 if room.dimensions else 2.0 * room.volume ** (1 / 3)
        distances_m = np.geomspace(0.1, max(far, 0.2), points)
    d = np.asarray(distances_m, dtype=float)
    tot, dr, rv = field_mod.distance_curve(src.sound_power_db, src.directivity, d,
                                           result.room_constant_m2, rt60=result.rt60_in_force,
                                           volume=result.volume_m3,
                                           model=result.reverberant_model)
    bands = result.bands_hz
    return {"distance_m": d, "total_db": tot, "direct_db": dr, "reverberant_db": rv,
            "total_dba": a_weighted_total(tot, bands), "direct_dba": a_weighted_total(dr, bands),
            "reverberant_dba": a_weighted_total(rv, bands),
            "critical_distance_m": field_mod.critical_distance(src.directivity,
                                                               result.room_constant_m2)}

