"""Reverberation time per band by the published diffuse-field formulas.

Every function broadcasts with numpy: per-band quantities sit on the last axis, and any leading
axes (a batch of rooms) broadcast. All inputs are SI: volume [m^3], areas [m^2], m [1/m], c [m/s].
"""

from __future__ import annotations

import numpy as np

LN10 = np.log(10.0)


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
    c = _positive("c", c)
    return 24.0 * LN10 / c


def _positive(name, x):
    x = np.asarray(x, dtype=float)
    if not np.all(np.isfinite(x)) or np.any(x <= 0):
        raise ValueError(f"{name}: must be finite and above 0")
    return x


def _non_negative(name, x):
    x = np.asarray(x, dtype=float)
    if not np.all(np.isfinite(x)) or np.any(x < 0):
        raise ValueError(f"{name}: must be finite and 0 or more")
    return x


def _alpha_log(name, alpha):
    """Check coefficients for a logarithmic formula: 0 <= alpha < 1."""
    a = np.asarray(alpha, dtype=float)
    if not np.all(np.isfinite(a)) or np.any(a < 0) or np.any(a >= 1):
        raise ValueError(f"{name}: must be 0 or more and below 1 for this method "
                         f"(ln(1 - alpha) is undefined at 1); got min {np.min(a):.3g}, "
                         f"max {np.max(a):.3g}")
    return a


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
    v = _positive("volume", volume)
    a = _non_negative("absorption_area", absorption_area)
    m = _non_negative("m", m)
    if np.any(a + 4.0 * m * v <= 0):
        raise ValueError("absorption_area: total absorption (with air) must be above 0 m^2")
    return _sabine(v, a, m, sabine_constant(c))


def _sabine(v, a, m, k):
    return k * v / (a + 4.0 * m * v)


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
    v = _positive("volume", volume)
    s = _positive("surface_area", surface_area)
    a = _non_negative("absorption_area", absorption_area)
    abar = _alpha_log("absorption_area / surface_area", a / s)
    m = _non_negative("m", m)
    return _eyring(v, s, abar, m, sabine_constant(c))


def _eyring(v, s, abar, m, k):
    return k * v / (-s * np.log1p(-abar) + 4.0 * m * v)


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
    v = _positive("volume", volume)
    s = _non_negative("areas", areas)
    a = _alpha_log("alphas", alphas)
    m = _non_negative("m", m)
    extra = _non_negative("extra_absorption", extra_absorption)
    if a.shape[:-1][-1:] != s.shape[-1:]:
        raise ValueError(f"alphas: shape {a.shape} does not match areas {s.shape} "
                         "(expected (..., n, bands) with n surfaces)")
    return _millington(v, s, a, m, sabine_constant(c), extra)


def _millington(v, s, a, m, k, extra):
    absorption = -np.einsum("...i,...ib->...b", s, np.log1p(-a)) + extra
    return k * v / (absorption + 4.0 * m * v)


def _axis_times(volume, axis_areas, axis_alphas, m, c):
    """Per-axis Eyring times T_x = K V / (-S ln(1 - abar_x) + 4 m V) and weights S_x / S."""
    v = _positive("volume", volume)
    sx = _positive("axis_areas", axis_areas)
    ax = _alpha_log("axis_alphas", axis_alphas)
    m = _non_negative("m", m)
    if sx.shape[-1] != 3 or ax.shape[-2] != 3:
        raise ValueError("axis_areas must have shape (..., 3) and axis_alphas (..., 3, bands): "
                         "one entry per axis x, y, z")
    return _axis_times_impl(v, sx, ax, m, sabine_constant(c))


def _axis_times_impl(v, sx, ax, m, k):
    s = np.sum(sx, axis=-1)
    v, m, k = (_per_axis(x) for x in (v, m, k))
    tx = k * v / (-s[..., None, None] * np.log1p(-ax) + 4.0 * m * v)
    weights = (sx / s[..., None])[..., None]
    return tx, weights


def _fitzroy(tx, w):
    return np.sum(w * tx, axis=-2)


def _arau_puchades(tx, w):
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
    return _fitzroy(tx, w)


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
    return _arau_puchades(tx, w)


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
    t = _positive("rt60", rt60)
    v = _positive("volume", volume)
    return 2000.0 * np.sqrt(t / v)
