"""Steady sound field: room constant, critical distance and levels from direct plus reverberant
sound.

Levels are sound pressure levels re 20 uPa from sound power levels re 1 pW, with no rho-c correction
(the +10 lg(rho c / 400) term, about +0.1 dB, is left out; docs/methods.md says so).
"""

from __future__ import annotations

import numpy as np

from roomcalc.engine.bands import db_from_ratio
from roomcalc.engine.checks import in_range, non_negative, positive

__all__ = ["PLACEMENT_Q", "mean_alpha_with_air", "mean_alpha_with_air_unchecked",
           "room_constant", "room_constant_unchecked", "critical_distance",
           "critical_distance_unchecked", "direct_term", "direct_term_unchecked",
           "reverberant_term", "reverberant_term_unchecked", "levels",
           "barron_lee_reverberant_term", "barron_lee_reverberant_term_unchecked",
           "distance_curve", "sound_power_from_level"]

#: Directivity factor Q of a source by where it stands (common practice).
PLACEMENT_Q = {"free": 1.0, "surface": 2.0, "edge": 4.0, "corner": 8.0}

# Unchecked entry points (``*_unchecked``) run the formula of the public function of the same
# name without its input checks, for callers that check whole arrays once (evaluate).


def mean_alpha_with_air(surface_area, absorption_area, volume, m=0.0) -> np.ndarray:
    """Mean absorption coefficient including air, abar_t = (A + 4 m V) / S.

    References
    ----------
    .. [1] L. L. Beranek, Acoustics (1954), ch. 10.
    """
    s = positive("surface_area", surface_area, "m^2")
    a = non_negative("absorption_area", absorption_area, "m^2")
    v = positive("volume", volume, "m^3")
    m = non_negative("m", m, "1/m")
    return mean_alpha_with_air_unchecked(s, a, v, m)


def mean_alpha_with_air_unchecked(surface_area, absorption_area, volume, m):
    """:func:`mean_alpha_with_air` without input checks.

    Notes
    -----
    .. math:: \\bar\\alpha_t = (A + 4 m V) / S
    """
    return (absorption_area + 4.0 * m * volume) / surface_area


def room_constant(surface_area, mean_alpha) -> np.ndarray:
    """Room constant R of the diffuse reverberant field.

    Parameters
    ----------
    surface_area : array_like -- total surface area S [m^2]
    mean_alpha : array_like -- mean coefficient abar_t including air, 0 < abar_t < 1

    Returns
    -------
    ndarray -- R [m^2]

    Notes
    -----
    .. math:: R = \\frac{S \\bar\\alpha_t}{1 - \\bar\\alpha_t}, \\quad
              \\bar\\alpha_t = \\frac{A + 4 m V}{S}

    References
    ----------
    .. [1] L. L. Beranek, Acoustics (1954), ch. 10, eq. (10.26).

    Examples
    --------
    >>> round(float(room_constant(100.0, 0.2)), 6)
    25.0
    """
    s = positive("surface_area", surface_area, "m^2")
    a = in_range("mean_alpha", mean_alpha, 0.0, 1.0, low_inclusive=False, high_inclusive=False)
    return room_constant_unchecked(s, a)


def room_constant_unchecked(surface_area, mean_alpha):
    """:func:`room_constant` without input checks.

    Notes
    -----
    .. math:: R = S \\bar\\alpha_t / (1 - \\bar\\alpha_t)
    """
    return surface_area * mean_alpha / (1.0 - mean_alpha)


def critical_distance(directivity, room_constant_m2) -> np.ndarray:
    """Critical distance, where direct and reverberant energy are equal.

    Parameters
    ----------
    directivity : array_like -- directivity factor Q of the source, > 0
    room_constant_m2 : array_like -- room constant R [m^2]

    Returns
    -------
    ndarray -- r_c [m]

    Notes
    -----
    .. math:: r_c = \\sqrt{\\frac{Q R}{16 \\pi}}

    from :math:`Q / (4\\pi r^2) = 4 / R`.

    References
    ----------
    .. [1] L. L. Beranek, Acoustics (1954), ch. 10; Bies, Hansen & Howard, Engineering Noise
       Control, 5th ed. (2017), sec. 6.4.

    Examples
    --------
    >>> round(float(critical_distance(2.0, 50.0)), 4)
    1.4105
    """
    q = positive("directivity", directivity)
    r = positive("room_constant_m2", room_constant_m2, "m^2")
    return critical_distance_unchecked(q, r)


def critical_distance_unchecked(directivity, room_constant_m2):
    """:func:`critical_distance` without input checks.

    Notes
    -----
    .. math:: r_c = \\sqrt{Q R / (16 \\pi)}
    """
    return np.sqrt(directivity * room_constant_m2 / (16.0 * np.pi))


def direct_term(directivity, distance_m) -> np.ndarray:
    """Direct-field energy term Q / (4 pi r^2) [1/m^2] (inverse-square law)."""
    return direct_term_unchecked(positive("directivity", directivity),
                                 positive("distance_m", distance_m, "m"))


def direct_term_unchecked(directivity, distance_m):
    """:func:`direct_term` without input checks.

    Notes
    -----
    .. math:: Q / (4 \\pi r^2)
    """
    return directivity / (4.0 * np.pi * distance_m ** 2)


def sound_power_from_level(level_db, directivity, distance_m=1.0) -> np.ndarray:
    """Sound power level of a source from its free-field level at a distance.

    Parameters
    ----------
    level_db : array_like -- sound pressure level of the direct sound at ``distance_m``
        [dB re 20 uPa], per band or A-weighted (the same offset applies to every band)
    directivity : array_like -- directivity factor Q of the source where it stands, > 0
    distance_m : array_like -- the distance of that level [m], > 0 (1 m for a "level at 1 m")

    Returns
    -------
    ndarray -- Lw [dB re 1 pW] (LwA for an A-weighted level)

    Notes
    -----
    .. math:: L_w = L_p(r) + 10 \\lg \\frac{4 \\pi r^2}{Q}

    the inverse-square law of the direct field (:func:`direct_term`) solved for the power,
    with no rho-c correction, as in :func:`levels`.

    References
    ----------
    .. [1] Common practice: the free-field relation of sound power and pressure, the form used
       by ISO 3744 (a source over a reflecting plane: Q = 2, the hemisphere 2 pi r^2);
       Bies, Hansen & Howard, Engineering Noise Control, 5th ed. (2017), ch. 6 (from memory).

    Examples
    --------
    A talker of 60 dB(A) at 1 m, standing free (Q = 1): 60 + 10 lg(4 pi) = 70.99 dB(A); on a
    surface (Q = 2), 3.01 dB less (hand computation):

    >>> round(float(sound_power_from_level(60.0, 1.0)), 2)
    70.99
    >>> round(float(sound_power_from_level(60.0, 2.0, 1.0)), 2)
    67.98
    """
    lp = np.asarray(level_db, dtype=float)
    return lp - db_from_ratio(direct_term(directivity, distance_m))


def reverberant_term(room_constant_m2) -> np.ndarray:
    """Diffuse reverberant-field energy term 4 / R [1/m^2]."""
    return reverberant_term_unchecked(positive("room_constant_m2", room_constant_m2, "m^2"))


def reverberant_term_unchecked(room_constant_m2):
    """:func:`reverberant_term` without input checks.

    Notes
    -----
    .. math:: 4 / R
    """
    return 4.0 / room_constant_m2


def levels(sound_power_db, directivity, distance_m, room_constant_m2):
    """Sound pressure level from a source: direct, reverberant and total.

    Parameters
    ----------
    sound_power_db : array_like -- sound power level Lw [dB re 1 pW]
    directivity : array_like -- directivity factor Q
    distance_m : array_like -- source-receiver distance r [m], > 0
    room_constant_m2 : array_like -- room constant R [m^2]

    Returns
    -------
    (total, direct, reverberant) : tuple of ndarray -- Lp [dB re 20 uPa], broadcast over inputs

    Notes
    -----
    .. math:: L_p = L_w + 10 \\lg\\left(\\frac{Q}{4 \\pi r^2} + \\frac{4}{R}\\right)

    with the direct part :math:`L_w + 10\\lg(Q / 4\\pi r^2)` and the reverberant part
    :math:`L_w + 10\\lg(4/R)`. No rho-c correction is applied.

    References
    ----------
    .. [1] L. L. Beranek, Acoustics (1954), ch. 10, eq. (10.29); Bies, Hansen & Howard,
       Engineering Noise Control, 5th ed. (2017), eq. (6.44).

    Examples
    --------
    >>> [round(float(x), 2) for x in levels(90.0, 2.0, 2.0, 50.0)]
    [80.78, 76.0, 79.03]
    """
    lw = np.asarray(sound_power_db, dtype=float)
    d = direct_term(directivity, distance_m)
    rv = reverberant_term(room_constant_m2)
    return (lw + db_from_ratio(d + rv), lw + db_from_ratio(d),
            lw + db_from_ratio(rv * np.ones_like(d)))


def barron_lee_reverberant_term(rt60, volume, distance_m) -> np.ndarray:
    """Reverberant energy term by Barron & Lee's revised theory [1/m^2].

    Parameters
    ----------
    rt60 : array_like -- reverberation time T [s]
    volume : array_like -- room volume V [m^3]
    distance_m : array_like -- source-receiver distance r [m]

    Returns
    -------
    ndarray -- reverberant (early + late) energy, in the units of Q / (4 pi r^2), to replace 4/R

    Notes
    -----
    Relative to the direct sound of an omnidirectional source at 10 m, the reflected energy is

    .. math:: \\frac{31200\\, T}{V} e^{-0.04 r / T}

    (the sum of the early part, with factor :math:`1 - e^{-1.11/T}`, and the late part, with
    :math:`e^{-1.11/T}`). The direct sound at 10 m is :math:`1 / (4 \\pi \\cdot 100)`, so the term
    that replaces :math:`4/R` is :math:`31200\\, T\\, e^{-0.04 r/T} / (400 \\pi V)`. For small
    absorption it tends to 24.8 T / V, which is 4/R with R = 0.161 V / T.

    References
    ----------
    .. [1] M. Barron & L.-J. Lee, "Energy relations in concert auditoriums. I",
       J. Acoust. Soc. Am. 84 (1988) 618 (from memory; not checked against a copy).

    Examples
    --------
    >>> round(float(barron_lee_reverberant_term(1.0, 1000.0, 0.0)), 6)
    0.024828
    """
    t = positive("rt60", rt60, "s")
    v = positive("volume", volume, "m^3")
    r = non_negative("distance_m", distance_m, "m")
    return barron_lee_reverberant_term_unchecked(t, v, r)


def barron_lee_reverberant_term_unchecked(rt60, volume, distance_m):
    """:func:`barron_lee_reverberant_term` without input checks.

    Notes
    -----
    .. math:: 31200\\, T\\, e^{-0.04 r/T} / (400 \\pi V)
    """
    return (31200.0 * rt60 * np.exp(-0.04 * distance_m / rt60)
            / (400.0 * np.pi * volume))


def distance_curve(sound_power_db, directivity, distances_m, room_constant_m2=None, *,
                   rt60=None, volume=None, model="classic"):
    """Level against distance for one source, for every band: direct, reverberant and total.

    Parameters
    ----------
    sound_power_db : array_like, shape (bands,) -- Lw [dB re 1 pW]
    directivity : float -- Q
    distances_m : array_like, shape (points,) -- distances r [m], > 0
    room_constant_m2 : array_like, shape (bands,) -- R [m^2] (model "classic")
    rt60, volume : per-band T [s] and V [m^3] (model "barron-lee")
    model : "classic" (4/R) or "barron-lee"

    Returns
    -------
    (total, direct, reverberant) : tuple of ndarray, shape (points, bands) [dB]

    Notes
    -----
    The equation of :func:`levels` at every distance, with :math:`4/R` replaced by
    :func:`barron_lee_reverberant_term` for model "barron-lee".

    References
    ----------
    .. [1] L. L. Beranek, Acoustics (1954), ch. 10; M. Barron & L.-J. Lee, J. Acoust. Soc. Am. 84
       (1988) 618.
    """
    r = positive("distances_m", distances_m, "m")[:, None]
    lw = np.asarray(sound_power_db, dtype=float)[None, :]
    d = direct_term(directivity, r)
    if model == "classic":
        rv = reverberant_term(room_constant_m2)[None, :] * np.ones_like(d)
    elif model == "barron-lee":
        rv = barron_lee_reverberant_term(np.asarray(rt60, dtype=float)[None, :], volume, r)
    else:
        raise ValueError(f"model: {model!r} is not one of 'classic', 'barron-lee'")
    d = d * np.ones_like(rv)
    return lw + db_from_ratio(d + rv), lw + db_from_ratio(d), lw + db_from_ratio(rv)
