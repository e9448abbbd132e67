"""Air: speed of sound and atmospheric absorption (ISO 9613-1:1993, formula, not a table)."""

from __future__ import annotations

import warnings

import numpy as np

from roomcalc.engine.checks import in_range, non_negative, positive

__all__ = ["REFERENCE_PRESSURE_KPA", "REFERENCE_TEMPERATURE_K", "TRIPLE_POINT_K",
           "DB_PER_NEPER_ENERGY", "ABSOLUTE_ZERO_C", "ACCURACY_TEMPERATURE_K",
           "ACCURACY_MOLAR_H_PERCENT",
           "AirRangeWarning", "speed_of_sound", "speed_of_sound_unchecked", "check_conditions",
           "attenuation_db_per_m", "attenuation_unchecked", "outside_accuracy_range",
           "energy_coefficient", "energy_coefficient_unchecked"]

#: Lowest air temperature the formulas take [degC] (absolute zero, excluded).
ABSOLUTE_ZERO_C = -273.15
#: Range of temperature [K] and of molar concentration of water vapour [%] where ISO 9613-1:1993
#: states the accuracy of its formula (clause 7).
ACCURACY_TEMPERATURE_K = (253.0, 323.0)
ACCURACY_MOLAR_H_PERCENT = (0.05, 5.0)

#: Reference ambient pressure p_r [kPa], ISO 9613-1:1993, 6.1.
REFERENCE_PRESSURE_KPA = 101.325
#: Reference air temperature T_0 [K], ISO 9613-1:1993, 6.2.
REFERENCE_TEMPERATURE_K = 293.15
#: Triple-point isotherm temperature T_01 [K], ISO 9613-1:1993, Annex B.
TRIPLE_POINT_K = 273.16
#: 10 lg e: converts an attenuation in dB to the energy coefficient m [1/m], ISO 354:2003, 8.1.2.
DB_PER_NEPER_ENERGY = 10.0 * np.log10(np.e)


class AirRangeWarning(UserWarning):
    """Air conditions outside the range where ISO 9613-1 states its accuracy."""


def speed_of_sound(temperature_c) -> np.ndarray:
    """Speed of sound in air from temperature.

    Parameters
    ----------
    temperature_c : array_like -- air temperature [degC], above -273.15

    Returns
    -------
    ndarray -- speed of sound [m/s]

    Notes
    -----
    .. math:: c = 331.3 \\sqrt{1 + t / 273.15}

    References
    ----------
    .. [1] Kinsler, Frey, Coppens & Sanders, Fundamentals of Acoustics, 4th ed. (2000), eq. 5.6.9
       (ideal-gas form; common practice).

    Examples
    --------
    >>> round(float(speed_of_sound(20.0)), 1)
    343.2
    """
    t = in_range("temperature_c", temperature_c, ABSOLUTE_ZERO_C, low_inclusive=False,
                 unit="degC")
    return speed_of_sound_unchecked(t)


def speed_of_sound_unchecked(temperature_c):
    """:func:`speed_of_sound` without input checks, for callers that checked the temperature.

    Notes
    -----
    .. math:: c = 331.3 \\sqrt{1 + t / 273.15}
    """
    return 331.3 * np.sqrt(1.0 + temperature_c / 273.15)


def check_conditions(temperature_c, relative_humidity, pressure_kpa):
    """Check air conditions; return them as float arrays, or raise ``ValueError`` naming the
    argument and its range.

    Notes
    -----
    Temperature above -273.15 degC, relative humidity from 0 to 100 %, pressure above 0 kPa:
    where the ISO 9613-1 formula has a value at all (its stated accuracy is narrower, see
    :func:`outside_accuracy_range`).
    """
    return (in_range("temperature_c", temperature_c, ABSOLUTE_ZERO_C, low_inclusive=False,
                     unit="degC"),
            in_range("relative_humidity", relative_humidity, 0.0, 100.0, unit="%"),
            positive("pressure_kpa", pressure_kpa, "kPa"))


def attenuation_db_per_m(frequency_hz, temperature_c=20.0, relative_humidity=50.0,
                         pressure_kpa=REFERENCE_PRESSURE_KPA) -> np.ndarray:
    """Pure-tone atmospheric absorption coefficient by the ISO 9613-1 formula.

    Parameters
    ----------
    frequency_hz : array_like -- frequency [Hz], > 0
    temperature_c : array_like -- air temperature [degC]
    relative_humidity : array_like -- relative humidity [%], 0 to 100
    pressure_kpa : array_like -- ambient pressure [kPa], > 0

    Returns
    -------
    ndarray -- attenuation alpha [dB/m], broadcast over the inputs

    Notes
    -----
    With :math:`T` in K, :math:`h_r` in %, :math:`p_a` ambient and :math:`p_r` reference pressure:

    .. math::
        C = -6.8346 (T_{01}/T)^{1.261} + 4.6151, \\quad
        h = h_r \\, 10^{C} \\, p_r / p_a

        f_{rO} = \\frac{p_a}{p_r}\\left(24 + 4.04\\times10^4 h \\frac{0.02 + h}{0.391 + h}\\right)

        f_{rN} = \\frac{p_a}{p_r}\\left(\\frac{T}{T_0}\\right)^{-1/2}
                 \\left(9 + 280 h \\, e^{-4.170[(T/T_0)^{-1/3} - 1]}\\right)

        \\alpha = 8.686 f^2 \\Big[1.84\\times10^{-11} \\frac{p_r}{p_a}\\left(\\frac{T}{T_0}\\right)^{1/2}
          + \\left(\\frac{T}{T_0}\\right)^{-5/2}\\Big(\\frac{0.01275 e^{-2239.1/T}}{f_{rO} + f^2/f_{rO}}
          + \\frac{0.1068 e^{-3352.0/T}}{f_{rN} + f^2/f_{rN}}\\Big)\\Big]

    Outside 253-323 K or 0.05-5 % molar water vapour the standard does not state its accuracy;
    an :class:`AirRangeWarning` is emitted and the formula is still evaluated.

    References
    ----------
    .. [1] ISO 9613-1:1993, Acoustics - Attenuation of sound during propagation outdoors -
       Part 1: Calculation of the absorption of sound by the atmosphere, eqs. (3)-(5), Annex B.

    Examples
    --------
    ISO 9613-1:1993 Table 1 gives 4.66 dB/km at 1 kHz, 20 degC, 50 % RH:

    >>> round(float(attenuation_db_per_m(1000.0, 20.0, 50.0)) * 1000, 2)
    4.66
    """
    f = positive("frequency_hz", frequency_hz, "Hz")
    t_c, hr, pa = check_conditions(temperature_c, relative_humidity, pressure_kpa)
    alpha, h = attenuation_unchecked(f, t_c, hr, pa)
    if outside_accuracy_range(t_c, h):
        warnings.warn("air: conditions outside ISO 9613-1 accuracy range (253-323 K, "
                      "0.05-5 % molar water vapour); absorption is approximate",
                      AirRangeWarning, stacklevel=2)
    return alpha


def attenuation_unchecked(frequency_hz, temperature_c, relative_humidity, pressure_kpa):
    """:func:`attenuation_db_per_m` without input checks or warning, for callers that checked
    the conditions (with :func:`check_conditions`) and report the range themselves.

    Returns
    -------
    (alpha, h) -- attenuation [dB/m] and the molar concentration of water vapour h [%]

    Notes
    -----
    ISO 9613-1:1993 eqs. (3)-(5) and Annex B, as written under :func:`attenuation_db_per_m`.
    """
    f, hr, pa = frequency_hz, relative_humidity, pressure_kpa
    t_k = temperature_c - ABSOLUTE_ZERO_C
    pr = REFERENCE_PRESSURE_KPA
    c_exp = -6.8346 * (TRIPLE_POINT_K / t_k) ** 1.261 + 4.6151
    h = hr * (10.0 ** c_exp) / (pa / pr)
    tr = t_k / REFERENCE_TEMPERATURE_K
    fro = (pa / pr) * (24.0 + 4.04e4 * h * (0.02 + h) / (0.391 + h))
    frn = (pa / pr) * tr ** -0.5 * (9.0 + 280.0 * h * np.exp(-4.170 * (tr ** (-1.0 / 3.0) - 1.0)))
    alpha = 8.686 * f ** 2 * (
        1.84e-11 * (pr / pa) * tr ** 0.5
        + tr ** -2.5 * (0.01275 * np.exp(-2239.1 / t_k) / (fro + f ** 2 / fro)
                        + 0.1068 * np.exp(-3352.0 / t_k) / (frn + f ** 2 / frn)))
    return alpha, h


def outside_accuracy_range(temperature_c, h) -> bool:
    """Whether any condition lies outside the range where ISO 9613-1 states its accuracy.

    Parameters
    ----------
    temperature_c : array_like -- air temperature [degC]
    h : array_like -- molar concentration of water vapour [%] (from :func:`attenuation_unchecked`)

    Notes
    -----
    Inside means 253 K <= T <= 323 K and 0.05 % <= h <= 5 %.

    References
    ----------
    .. [1] ISO 9613-1:1993, clause 7 (accuracy).
    """
    t_k, h = np.asarray(temperature_c) - ABSOLUTE_ZERO_C, np.asarray(h)
    (t_lo, t_hi), (h_lo, h_hi) = ACCURACY_TEMPERATURE_K, ACCURACY_MOLAR_H_PERCENT
    return bool(((t_k < t_lo) | (t_k > t_hi)).any() or ((h < h_lo) | (h > h_hi)).any())


def energy_coefficient(attenuation_db_m) -> np.ndarray:
    """Energy attenuation coefficient m of air for the 4 m V term.

    Parameters
    ----------
    attenuation_db_m : array_like -- air attenuation alpha [dB/m]

    Returns
    -------
    ndarray -- m [1/m]

    Notes
    -----
    .. math:: m = \\frac{\\alpha}{10 \\lg e} \\approx \\frac{\\alpha}{4.343}

    References
    ----------
    .. [1] ISO 354:2003, Acoustics - Measurement of sound absorption in a reverberation room, 8.1.2.

    Examples
    --------
    >>> round(float(energy_coefficient(0.00466)) * 1e3, 4)
    1.073
    """
    return energy_coefficient_unchecked(non_negative("attenuation_db_m", attenuation_db_m,
                                                     "dB/m"))


def energy_coefficient_unchecked(attenuation_db_m):
    """:func:`energy_coefficient` without input checks.

    Notes
    -----
    .. math:: m = \\alpha / (10 \\lg e)
    """
    return attenuation_db_m / DB_PER_NEPER_ENERGY
