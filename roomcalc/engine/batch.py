"""Reverberation of many rooms at once, given as arrays (a facilities office surveying all its
classrooms): Sabine, Eyring, Millington-Sette and the room constant, vectorised over rooms."""

from __future__ import annotations

import numpy as np

from roomcalc.engine import field as field_mod
from roomcalc.engine import reverb
from roomcalc.engine.checks import in_range, non_negative, positive

__all__ = ["batch_reverberation", "batch_reverberation_by_material"]


def batch_reverberation(volume, areas, alphas, object_absorption=0.0, m=0.0, c=343.0):
    """Sabine, Eyring, Millington-Sette and room constant for many rooms at once.

    Parameters
    ----------
    volume : array_like, shape (N,) -- volumes [m^3]
    areas : array_like, shape (N, n) -- surface areas [m^2] (pad with zero-area surfaces)
    alphas : array_like, shape (N, n, bands) -- coefficients, below 1
    object_absorption : array_like, shape (N, bands) or broadcastable -- objects [m^2]
    m : array_like, shape (bands,) or (N, bands) -- air coefficient [1/m]
    c : float -- speed of sound [m/s]

    Returns
    -------
    dict of (N, bands) arrays: ``sabine``, ``eyring``, ``millington``, ``room_constant``
    """
    v = np.asarray(volume, dtype=float)[:, None]
    s_i = np.asarray(areas, dtype=float)
    a_i = np.asarray(alphas, dtype=float)
    a_obj = np.broadcast_to(np.asarray(object_absorption, dtype=float), (v.shape[0], a_i.shape[-1]))
    s = s_i.sum(axis=1)[:, None]
    a = np.einsum("nk,nkb->nb", s_i, a_i) + a_obj
    return {
        "sabine": reverb.sabine(v, a, m, c),
        "eyring": reverb.eyring(v, s, a, m, c),
        "millington": reverb.millington(v, s_i, a_i, m, c, extra_absorption=a_obj),
        "room_constant": field_mod.room_constant(s, field_mod.mean_alpha_with_air(s, a, v, m)),
    }


def batch_reverberation_by_material(volume, areas, material, material_alpha,
                                    object_absorption=0.0, m=0.0, c=343.0):
    """Sabine, Eyring, Millington-Sette and room constant for many rooms built from one table
    of materials, e.g. a facilities office surveying all its classrooms.

    Parameters
    ----------
    volume : array_like, shape (N,) -- volumes [m^3]
    areas : array_like, shape (N, n) -- surface areas [m^2] (pad with zero areas)
    material : array_like of int, shape (N, n) -- row of ``material_alpha`` each surface uses
    material_alpha : array_like, shape (M, bands) -- coefficients of the M materials, below 1
    object_absorption : array_like, shape (N, bands) or broadcastable -- objects [m^2]
    m : array_like, shape (bands,) -- air coefficient [1/m]
    c : float -- speed of sound [m/s]

    Returns
    -------
    dict of (N, bands) arrays: ``sabine``, ``eyring``, ``millington``, ``room_constant``

    Notes
    -----
    The equations of :func:`batch_reverberation`. Because every surface takes its alpha from the
    table, each room's area per material W (N, M, sparse) is formed once, and then
    :math:`A = W \\alpha` and :math:`\\sum_i S_i \\ln(1 - \\alpha_i) = W \\ln(1 - \\alpha)`: the
    logarithm is taken M times, not N n times.
    """
    v = np.asarray(volume, dtype=float)
    s_i = np.asarray(areas, dtype=float)
    idx = np.asarray(material)
    alpha = np.asarray(material_alpha, dtype=float)
    n_rooms, n_mat = v.shape[0], alpha.shape[0]
    if s_i.shape != idx.shape or s_i.shape[0] != n_rooms:
        raise ValueError("areas and material must both have shape (rooms, surfaces)")
    if not np.issubdtype(idx.dtype, np.integer):
        raise ValueError(f"material: whole numbers from 0 to {n_mat - 1} (rows of "
                         "material_alpha)")
    in_range("material", idx, 0, n_mat - 1, why="rows of material_alpha")
    positive("volume", v, "m^3")
    non_negative("areas", s_i, "m^2")
    in_range("material_alpha", alpha, 0.0, 1.0, high_inclusive=False,
             why="ln(1 - alpha) has no value at 1")
    from scipy import sparse  # imported here: scipy.sparse is slow to import for one room

    n_surf = s_i.shape[1]
    w = sparse.csr_matrix((s_i.ravel(), idx.ravel(), np.arange(0, n_rooms * n_surf + 1, n_surf)),
                          shape=(n_rooms, n_mat))          # area of each material in each room
    nb = alpha.shape[1]
    both = w @ np.hstack([alpha, np.log1p(-alpha)])        # (N, 2 bands): A and sum S ln(1-a)
    a_obj = np.broadcast_to(np.asarray(object_absorption, dtype=float), (n_rooms, nb))
    s = s_i.sum(axis=1)[:, None]
    # Each whole-array operation costs about as much as the next here, so shared terms are
    # formed once.
    air4 = (4.0 * np.asarray(m, dtype=float)) * v[:, None]
    a = both[:, :nb]
    a += a_obj
    abar = a / s
    if (abar >= 1).any():
        raise ValueError("objects: mean alpha with objects reaches 1 in some room")
    kv = reverb.sabine_constant_unchecked(float(c)) * v[:, None]
    a_air = a + air4
    abar_t = a_air / s
    # The equations of reverb.sabine, reverb.eyring and reverb.millington written on the
    # shared terms: each is K V over its absorption (with air).
    eyr = np.log(1.0 - abar)              # log(1 - x): vectorised log, faster than log1p here
    eyr *= -s
    eyr += air4
    mil = air4 - both[:, nb:]
    mil += a_obj
    return {
        "sabine": kv / a_air,
        "eyring": kv / eyr,
        "millington": kv / mil,
        "room_constant": field_mod.room_constant_unchecked(s, abar_t),
    }
