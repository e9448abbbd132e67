"""Reverberation time per band by the published diffuse-field formulas.

Every function broadcasts with numpy: per-band quantities sit on the last axis, and any leading
axes (a batch of rooms) broadcast. All inputs are SI: volume [m^3], areas [m^2], m [1/m], c [m/s].
"""

from __future__ import annotations

import numpy as np

from roomcalc.engine.checks import in_range, non_negative, positive

__all__ = ["LN10", "ALPHA_LOG_MAX", "sabine_constant", "sabine_constant_unchecked", "sabine",
           "sabine_unchecked", "eyring", "eyring_unchecked", "millington",
           "millington_unchecked", "millington_capped_share", "fitzroy", "fitzroy_unchecked",
           "arau_puchades", "arau_puchades_unchecked", "axis_times_unchecked",
           "schroeder_frequency", "schroeder_frequency_unchecked"]

LN10 = np.log(10.0)

#: Largest alpha the logarithmic formulas (Eyring, Millington-Sette, Fitzroy, Arau-Puchades)
#: are given; larger coefficients, including the values above 1 that ISO 354 test reports show
#: for thick absorbers, are capped at it. ln(1 - alpha) has no value at 1, so some cap is needed,
#: and any cap is a choice: 0.99 is the largest coefficient below 1 that a report giving two
#: decimals can state. At the cap a surface counts -ln(0.01) = 4.6 times its area (Sabine counts
#: it once), so where capped surfaces dominate a sum the cap, not the room, sets the result: see
#: :func:`millington_capped_share` and docs/methods.md.
ALPHA_LOG_MAX = 0.99

#: What the logarithmic formulas' alpha checks say about their range.
_WHY_BELOW_1 = "ln(1 - alpha) has no value at 1"

#: Unchecked entry points (``*_unchecked``) run the same formula as the public function of the
#: same name without its input checks, for callers that check whole arrays once
#: (:func:`roomcalc.engine.analysis.evaluate`). Their ``k`` is Sabine's constant
#: (:func:`sabine_constant`), computed once per room.


def sabine_constant(c=343.0) -> np.ndarray:
    """The constant K of Sabine's formula, K = 24 ln 10 / c [s/m].

    References
    ----------
    .. [1] Kuttruff, Room Acoustics, 5th ed. (2009), eq. (5.21) (common practice: 0.161 s/m at
       c = 343 m/s).

    Examples
    --------
    >>> round(float(sabine_constant(343.0)), 4)
    0.1611
    """
    return sabine_constant_unchecked(positive("c", c, "m/s"))


def sabine_constant_unchecked(c):
    """:func:`sabine_constant` without input checks.

    Notes
    -----
    .. math:: K = 24 \\ln 10 / c
    """
    return 24.0 * LN10 / c


def _alpha_log(name, alpha):
    """Coefficients for a logarithmic formula: 0 <= alpha < 1."""
    return in_range(name, alpha, 0.0, 1.0, high_inclusive=False, why=_WHY_BELOW_1)


def sabine(volume, absorption_area, m=0.0, c=343.0) -> np.ndarray:
    """Reverberation time by Sabine's formula with air absorption.

    Parameters
    ----------
    volume : array_like -- room volume V [m^3]
    absorption_area : array_like -- equivalent absorption area A of surfaces and objects [m^2]
    m : array_like -- energy attenuation coefficient of air [1/m]
    c : array_like -- speed of sound [m/s]

    Returns
    -------
    ndarray -- T [s]

    Notes
    -----
    .. math:: T = \\frac{K V}{A + 4 m V}, \\quad K = \\frac{24 \\ln 10}{c}

    References
    ----------
    .. [1] W. C. Sabine, Collected Papers on Acoustics (1922); ISO 354:2003, eq. (1)-(3).

    Examples
    --------
    The check room of REFERENCES (V = 3000 m^3, A = 399 m^2, c = 343 m/s):

    >>> round(float(sabine(3000.0, 399.0)), 4)
    1.2114
    """
    v = positive("volume", volume, "m^3")
    a = non_negative("absorption_area", absorption_area, "m^2")
    m = non_negative("m", m, "1/m")
    if np.any(a + 4.0 * m * v <= 0):
        raise ValueError("absorption_area: total absorption (with air) must be above 0 m^2")
    return sabine_unchecked(v, a, m, sabine_constant(c))


def sabine_unchecked(volume, absorption_area, m, k):
    """:func:`sabine` without input checks; ``k`` is Sabine's constant [s/m].

    Notes
    -----
    .. math:: T = \\frac{K V}{A + 4 m V}
    """
    return k * volume / (absorption_area + 4.0 * m * volume)


def eyring(volume, surface_area, absorption_area, m=0.0, c=343.0) -> np.ndarray:
    """Reverberation time by Eyring's formula with air absorption.

    Parameters
    ----------
    volume : array_like -- room volume V [m^3]
    surface_area : array_like -- total surface area S [m^2]
    absorption_area : array_like -- A of surfaces and objects [m^2]; A / S must be below 1
    m : array_like -- energy attenuation coefficient of air [1/m]
    c : array_like -- speed of sound [m/s]

    Returns
    -------
    ndarray -- T [s]

    Notes
    -----
    .. math:: T = \\frac{K V}{-S \\ln(1 - \\bar\\alpha) + 4 m V}, \\quad \\bar\\alpha = A / S

    References
    ----------
    .. [1] C. F. Eyring, "Reverberation time in 'dead' rooms", J. Acoust. Soc. Am. 1 (1930) 217.

    Examples
    --------
    >>> round(float(eyring(3000.0, 1340.0, 399.0)), 4)
    1.0204
    """
    v = positive("volume", volume, "m^3")
    s = positive("surface_area", surface_area, "m^2")
    a = non_negative("absorption_area", absorption_area, "m^2")
    abar = _alpha_log("absorption_area / surface_area", a / s)
    m = non_negative("m", m, "1/m")
    return eyring_unchecked(v, s, abar, m, sabine_constant(c))


def eyring_unchecked(volume, surface_area, mean_alpha, m, k):
    """:func:`eyring` without input checks, from the mean alpha (below 1) instead of A; ``k``
    is Sabine's constant [s/m].

    Notes
    -----
    .. math:: T = \\frac{K V}{-S \\ln(1 - \\bar\\alpha) + 4 m V}
    """
    return k * volume / (-surface_area * np.log1p(-mean_alpha) + 4.0 * m * volume)


def millington(volume, areas, alphas, m=0.0, c=343.0, extra_absorption=0.0) -> np.ndarray:
    """Reverberation time by the Millington-Sette formula with air absorption.

    Parameters
    ----------
    volume : array_like -- room volume V [m^3]
    areas : array_like, shape (..., n) -- surface areas S_i [m^2]
    alphas : array_like, shape (..., n, bands) -- coefficients alpha_i, each below 1
    m : array_like -- energy attenuation coefficient of air [1/m]
    c : array_like -- speed of sound [m/s]
    extra_absorption : array_like -- absorption area of objects not part of the boundary [m^2]

    Returns
    -------
    ndarray -- T [s], shape (..., bands)

    Notes
    -----
    .. math:: T = \\frac{K V}{-\\sum_i S_i \\ln(1 - \\alpha_i) + A_{obj} + 4 m V}

    References
    ----------
    .. [1] R. H. Millington, "A note on the reverberation time", J. Sci. Instrum. 9 (1932) 226;
       W. H. Sette, J. Acoust. Soc. Am. 4 (1933) 193.

    Examples
    --------
    >>> round(float(millington(3000.0, [240.0, 600.0, 500.0], [[0.10], [0.25], [0.45]])[0]), 4)
    0.9729
    """
    v = positive("volume", volume, "m^3")
    s = non_negative("areas", areas, "m^2")
    a = _alpha_log("alphas", alphas)
    m = non_negative("m", m, "1/m")
    extra = non_negative("extra_absorption", extra_absorption, "m^2")
    _match_surfaces(s, a)
    return millington_unchecked(v, s, a, m, sabine_constant(c), extra)


def _match_surfaces(s, a):
    if a.shape[:-1][-1:] != s.shape[-1:]:
        raise ValueError(f"alphas: shape {a.shape} does not match areas {s.shape} "
                         "(expected (..., n, bands) with n surfaces)")


def millington_unchecked(volume, areas, alphas, m, k, extra_absorption):
    """:func:`millington` without input checks (alphas below 1); ``k`` is Sabine's constant.

    Notes
    -----
    .. math:: T = \\frac{K V}{-\\sum_i S_i \\ln(1 - \\alpha_i) + A_{obj} + 4 m V}
    """
    absorption = -np.einsum("...i,...ib->...b", areas, np.log1p(-alphas)) + extra_absorption
    return k * volume / (absorption + 4.0 * m * volume)


def millington_capped_share(areas, alphas, extra_absorption=0.0) -> np.ndarray:
    """Share of the Millington-Sette absorption that each capped surface contributes.

    Parameters
    ----------
    areas : array_like, shape (..., n) -- surface areas S_i [m^2]
    alphas : array_like, shape (..., n, bands) -- coefficients as given (0 or more; values
        above :data:`ALPHA_LOG_MAX` are the capped ones)
    extra_absorption : array_like -- absorption area of objects [m^2]

    Returns
    -------
    ndarray, shape (..., n, bands) -- share of each surface's term in the sum, 0 for surfaces
    that are not capped in that band

    Notes
    -----
    With :math:`\\alpha'_i = \\min(\\alpha_i, \\alpha_{max})`:

    .. math:: q_i = \\frac{-S_i \\ln(1 - \\alpha'_i)}
              {-\\sum_j S_j \\ln(1 - \\alpha'_j) + A_{obj}}
              \\quad (\\alpha_i > \\alpha_{max}), \\qquad q_i = 0 \\text{ otherwise}

    A capped surface counts :math:`-\\ln(1 - 0.99) = 4.6` times its area, a number set by the
    cap, not by the material. When such terms make up most of the sum, Millington-Sette's time
    is the cap's (it tends to 0 as any one alpha tends to 1, however small that surface).

    References
    ----------
    .. [1] R. H. Millington, J. Sci. Instrum. 9 (1932) 226 (the sum of -S_i ln(1 - alpha_i));
       the failure of the formula for a nearly totally absorbing surface is common practice
       (from memory of H. Kuttruff, Room Acoustics, 5th ed. (2009), ch. 5; not checked
       against a copy).

    Examples
    --------
    10 m^2 at alpha 1.1 (capped at 0.99) and 90 m^2 at 0.1: 10 ln 100 = 46.05 and
    -90 ln 0.9 = 9.48, so the capped surface is 46.05 / 55.53 = 0.829 of the sum:

    >>> [round(float(x), 3) for x in millington_capped_share([10.0, 90.0], [[1.1], [0.1]])[:, 0]]
    [0.829, 0.0]
    """
    s = non_negative("areas", areas, "m^2")
    a = non_negative("alphas", alphas)
    extra = non_negative("extra_absorption", extra_absorption, "m^2")
    _match_surfaces(s, a)
    terms = -s[..., None] * np.log1p(-np.minimum(a, ALPHA_LOG_MAX))
    total = terms.sum(axis=-2) + extra
    with np.errstate(invalid="ignore", divide="ignore"):
        share = np.where(a > ALPHA_LOG_MAX, terms / total[..., None, :], 0.0)
    return share


def _axis_times(volume, axis_areas, axis_alphas, m, c):
    """Checked inputs of Fitzroy and Arau-Puchades, then :func:`axis_times_unchecked`."""
    v = positive("volume", volume, "m^3")
    sx = positive("axis_areas", axis_areas, "m^2")
    ax = _alpha_log("axis_alphas", axis_alphas)
    m = non_negative("m", m, "1/m")
    if sx.shape[-1:] != (3,) or ax.shape[-2:-1] != (3,):
        raise ValueError("axis_areas must have shape (..., 3) and axis_alphas (..., 3, bands): "
                         "one entry per axis x, y, z")
    return axis_times_unchecked(v, sx, ax, m, sabine_constant(c))


def axis_times_unchecked(volume, axis_areas, axis_alphas, m, k):
    """Per-axis Eyring times and weights, the common part of Fitzroy and Arau-Puchades, without
    input checks; ``k`` is Sabine's constant [s/m].

    Returns
    -------
    (tx, w) -- T_x [s], shape (..., 3, bands), and weights S_x / S, shape (..., 3, 1)

    Notes
    -----
    .. math:: T_x = \\frac{K V}{-S \\ln(1 - \\bar\\alpha_x) + 4 m V}, \\quad w_x = S_x / S
    """
    s = np.sum(axis_areas, axis=-1)
    v, m, k = (_per_axis(x) for x in (volume, m, k))
    tx = k * v / (-s[..., None, None] * np.log1p(-axis_alphas) + 4.0 * m * v)
    weights = (axis_areas / s[..., None])[..., None]
    return tx, weights


def fitzroy_unchecked(tx, w):
    """Fitzroy's time from the per-axis times and weights of :func:`axis_times_unchecked`.

    Notes
    -----
    .. math:: T = \\sum_x w_x T_x
    """
    return np.sum(w * tx, axis=-2)


def arau_puchades_unchecked(tx, w):
    """Arau-Puchades' time from the per-axis times and weights of
    :func:`axis_times_unchecked`.

    Notes
    -----
    .. math:: T = \\prod_x T_x^{w_x}
    """
    return np.exp(np.sum(w * np.log(tx), axis=-2))


def _per_axis(x):
    """Insert the axis dimension before the band axis of a quantity broadcast over bands."""
    return x[..., None, :] if np.ndim(x) else x


def fitzroy(volume, axis_areas, axis_alphas, m=0.0, c=343.0) -> np.ndarray:
    """Reverberation time by Fitzroy's formula, for absorption unevenly spread over a box.

    Parameters
    ----------
    volume : array_like -- room volume V [m^3]
    axis_areas : array_like, shape (..., 3) -- S_x, S_y, S_z: the two faces normal to each axis [m^2]
    axis_alphas : array_like, shape (..., 3, bands) -- mean alpha of each face pair, below 1
    m : array_like -- energy attenuation coefficient of air [1/m]
    c : array_like -- speed of sound [m/s]

    Returns
    -------
    ndarray -- T [s], shape (..., bands)

    Notes
    -----
    .. math:: T = \\sum_{x,y,z} \\frac{S_x}{S} \\,
              \\frac{K V}{-S \\ln(1 - \\bar\\alpha_x) + 4 m V}

    which without air is Fitzroy's :math:`T = \\frac{K V}{S^2}\\sum -S_x / \\ln(1-\\bar\\alpha_x)`.
    The air term is added to each axis' Eyring time (our choice, stated in docs/methods.md).

    References
    ----------
    .. [1] D. Fitzroy, "Reverberation formula which seems to be more accurate with nonuniform
       distribution of absorption", J. Acoust. Soc. Am. 31 (1959) 893.

    Examples
    --------
    A box of V = 3000 m^3 whose six faces are 240, 240, 600, 600, 500, 500 m^2 with alpha 0.10,
    0.25, 0.45 per axis (the Fitzroy check value of REFERENCES):

    >>> round(float(fitzroy(3000.0, [480.0, 1200.0, 1000.0], [[0.10], [0.25], [0.45]])[0]), 4)
    0.6999
    """
    tx, w = _axis_times(volume, axis_areas, axis_alphas, m, c)
    return fitzroy_unchecked(tx, w)


def arau_puchades(volume, axis_areas, axis_alphas, m=0.0, c=343.0) -> np.ndarray:
    """Reverberation time by Arau-Puchades' formula, for absorption unevenly spread over a box.

    Parameters are as for :func:`fitzroy`.

    Notes
    -----
    .. math:: T = \\prod_{x,y,z} \\left[\\frac{K V}{-S \\ln(1 - \\bar\\alpha_x) + 4 m V}\\right]^{S_x / S}

    References
    ----------
    .. [1] H. Arau-Puchades, "An improved reverberation formula", Acustica 65 (1988) 163.

    Examples
    --------
    >>> round(float(arau_puchades(3000.0, [240.0, 600.0, 500.0], [[0.10], [0.25], [0.45]])[0]), 4)
    1.1424
    """
    tx, w = _axis_times(volume, axis_areas, axis_alphas, m, c)
    return arau_puchades_unchecked(tx, w)


def schroeder_frequency(rt60, volume) -> np.ndarray:
    """Schroeder frequency, above which a room's modes overlap into a diffuse field.

    Parameters
    ----------
    rt60 : array_like -- reverberation time T [s]
    volume : array_like -- room volume V [m^3]

    Returns
    -------
    ndarray -- f_S [Hz]

    Notes
    -----
    .. math:: f_S = 2000 \\sqrt{T / V}

    References
    ----------
    .. [1] M. R. Schroeder & K. H. Kuttruff, "On frequency response curves in rooms",
       J. Acoust. Soc. Am. 34 (1962) 76.

    Examples
    --------
    >>> round(float(schroeder_frequency(0.5, 50.0)), 1)
    200.0
    """
    return schroeder_frequency_unchecked(positive("rt60", rt60, "s"),
                                         positive("volume", volume, "m^3"))


def schroeder_frequency_unchecked(rt60, volume):
    """:func:`schroeder_frequency` without input checks.

    Notes
    -----
    .. math:: f_S = 2000 \\sqrt{T / V}
    """
    return 2000.0 * np.sqrt(rt60 / volume)
