"""Air: speed of sound and atmospheric absorption (ISO 9613-1:1993, formula, not a table)."""

from __future__ import annotations

import warnings

import numpy as np

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
    t = np.asarray(temperature_c, dtype=float)
    if not np.all(np.isfinite(t)) or np.any(t <= -273.15):
        raise ValueError(f"temperature_c: {t} must be finite and above -273.15 degC")
    return 331.3 * np.sqrt(1.0 + t / 273.15)


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
    f = np.asarray(frequency_hz, dtype=float)
    t_c = np.asarray(temperature_c, dtype=float)
    hr = np.asarray(relative_humidity, dtype=float)
    pa = np.asarray(pressure_kpa, dtype=float)
    for name, val in (("frequency_hz", f), ("temperature_c", t_c),
                      ("relative_humidity", hr), ("pressure_kpa", pa)):
        if not np.all(np.isfinite(val)):
            raise ValueError(f"{name}: must be finite")
    if np.any(f <= 0):
        raise ValueError("frequency_hz: must be above 0 Hz")
    if np.any(hr < 0) or np.any(hr > 100):
        raise ValueError("relative_humidity: must be 0 to 100 %")
    if np.any(pa <= 0):
        raise ValueError("pressure_kpa: must be above 0 kPa")
    if np.any(t_c <= -273.15):
        raise ValueError("temperature_c: must be above -273.15 degC")
    alpha, h = _iso9613_1(f, t_c + 273.15, hr, pa)
    t_k = t_c + 273.15
    if np.any(t_k < 253.0) or np.any(t_k > 323.0) or np.any(h < 0.05) or np.any(h > 5.0):
        warnings.warn("air: conditions outside ISO 9613-1 accuracy range (253-323 K, "
                      "0.05-5 % molar water vapour); absorption is approximate",
                      AirRangeWarning, stacklevel=2)
    return alpha


def _iso9613_1(f, t_k, hr, pa):
    """ISO 9613-1 eqs. (3)-(5); returns (alpha [dB/m], molar water vapour h [%])."""
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
    a = np.asarray(attenuation_db_m, dtype=float)
    if np.any(a < 0) or not np.all(np.isfinite(a)):
        raise ValueError("attenuation_db_m: must be finite and >= 0 dB/m")
    return a / DB_PER_NEPER_ENERGY
