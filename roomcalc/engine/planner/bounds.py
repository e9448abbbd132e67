"""Reverberation goals as bounds on absorption: the planner's public closed forms."""

from __future__ import annotations

import math

import numpy as np

from roomcalc.engine import checks

__all__ = ["sabine_required_absorption", "eyring_required_absorption", "LN10"]

LN10 = math.log(10.0)


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

    and :math:`T \\ge T_{min} \\iff A \\le K V / T_{min} - 4 m V`. Millington-Sette's
    formula has the same bound on its absorption :math:`-\\sum_i S_i \\ln(1 - \\alpha_i)`.

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
    t = checks.positive("rt60", rt60, "s")
    v = checks.positive("volume", volume, "m^3")
    m = checks.non_negative("m", m, "1/m")
    k = 24.0 * LN10 / checks.positive("c", c, "m/s")
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
    t = checks.positive("rt60", rt60, "s")
    v = checks.positive("volume", volume, "m^3")
    s = checks.positive("surface_area", surface_area, "m^2")
    m = checks.non_negative("m", m, "1/m")
    k = 24.0 * LN10 / checks.positive("c", c, "m/s")
    return -s * np.expm1(-(k * v / t - 4.0 * m * v) / s)
