"""A treatment applied to a room, as the engine sees it."""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Sequence

import numpy as np

from roomcalc.engine.model import Room, RoomObject, Surface
from roomcalc.engine.planner.goals import Candidate, cover_shares, cover_surfaces
from roomcalc.engine.planner.inputs import check_candidates

__all__ = ["apply_to_room"]


def _check_amounts(cands, amounts) -> np.ndarray:
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
    return x


def apply_to_room(room: Room, candidates: Sequence[Candidate], amounts) -> Room:
    """The room with a treatment applied, as the engine sees it.

    Parameters
    ----------
    room : Room -- the untreated room
    candidates : sequence of Candidate -- the treatments, as given to
        :func:`~roomcalc.engine.planner.plan`
    amounts : array_like, shape (len(candidates),) -- each candidate's amount [m^2 or units]

    Returns
    -------
    Room -- a new room: each covered part of a surface is a new Surface with the candidate's
    alpha and material and the same face and count, placed after the surface it covers, whose
    area shrinks by what is covered (and which is left out when nothing of it remains; what
    remains keeps every other field, people-marked alpha included); units
    become RoomObjects with ``count`` = amount. A candidate over several surfaces puts
    :math:`w_i x` on surface i, :math:`w_i = S_i / \\sum_k S_k`
    (:func:`~roomcalc.engine.planner.goals.cover_shares`).

    Notes
    -----
    The total surface area S is unchanged; covering an area :math:`x` of surface i with
    candidate j changes the absorption by :math:`x (\\alpha_j - \\alpha_i)` per band, and n
    units add :math:`n A_j`. Evaluating this room is how the planner checks its answer.

    References
    ----------
    .. [1] ISO 354:2003, 3.4-3.6 (equivalent absorption area of a surface and of an object).
    """
    cands = check_candidates(room, candidates)
    x = _check_amounts(cands, amounts)
    covers: dict[int, list[tuple[int, float]]] = {}     # surface -> (candidate, m^2 on it)
    areas = np.array([sf.total_area for sf in room.surfaces])
    for j, cd in enumerate(cands):
        if cd.kind == "cover" and x[j] > 0:
            sis = list(cover_surfaces(cd))
            for si, w in zip(sis, cover_shares(areas[sis])):
                covers.setdefault(si, []).append((j, float(w * x[j])))
    surfaces = []
    for si, sf in enumerate(room.surfaces):
        idx = covers.get(si, [])
        total = sf.total_area
        used = float(sum(a for _, a in idx))
        if used > total * (1 + 1e-9) + 1e-9:
            raise ValueError(f"amounts: the cover candidates on surface {si} ('{sf.name}') "
                             f"cover {used:g} m^2, more than its {total:g} m^2")
        rest = total - used
        if rest > 1e-9 * max(total, 1.0):
            surfaces.append(dataclasses.replace(sf, area=rest / sf.count))
        for j, a in idx:
            cd = cands[j]
            surfaces.append(Surface(f"{sf.name} ({cd.name})", a / sf.count, cd.alpha,
                                    count=sf.count, face=sf.face, material=cd.material))
    objects = list(room.objects) + [
        RoomObject(cd.name, cd.absorption, count=float(x[j]), material=cd.material)
        for j, cd in enumerate(cands) if cd.kind == "units" and x[j] > 0]
    return Room(bands_hz=room.bands_hz, volume=room.volume, surfaces=tuple(surfaces),
                dimensions=room.dimensions, air=room.air, objects=tuple(objects),
                sources=room.sources, receivers=room.receivers, title=room.title)
