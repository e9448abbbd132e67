"""Octave bands, A-weighting and decibel arithmetic.

All level arithmetic of the project lives here, so energetic sums are written once.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

__all__ = ["NOMINAL_OCTAVES_HZ", "DEFAULT_BANDS_HZ", "ALLOWED_BANDS_HZ", "OCTAVE_RATIO",
           "exact_centre", "band_edges", "a_weighting", "db_from_ratio", "ratio_from_db",
           "energetic_sum", "a_weighted_total", "a_weighted_total_from_energy",
           "band_constants"]

#: Nominal octave-band centre frequencies [Hz], IEC 61260-1:2014, Table E.1 (nominal values).
NOMINAL_OCTAVES_HZ = (31.5, 63, 125, 250, 500, 1000, 2000, 4000, 8000, 16000)

#: The bands a room works on unless its file lists others [Hz].
DEFAULT_BANDS_HZ = (125, 250, 500, 1000, 2000, 4000)

#: The bands a room may list [Hz].
ALLOWED_BANDS_HZ = (63, 125, 250, 500, 1000, 2000, 4000, 8000)

#: Octave ratio G = 10^(3/10), base-ten system, IEC 61260-1:2014, 5.2.
OCTAVE_RATIO = 10.0 ** 0.3

#: A-weighting at the octave nominal centres [dB], IEC 61672-1:2013, Table 3 (rounded to 0.1 dB).
_A_WEIGHT_TABLE_DB = {
    31.5: -39.4, 63: -26.2, 125: -16.1, 250: -8.6, 500: -3.2,
    1000: 0.0, 2000: 1.2, 4000: 1.0, 8000: -1.1, 16000: -6.6,
}


def _index_of(nominal_hz: np.ndarray) -> np.ndarray:
    nominal = np.asarray(nominal_hz, dtype=float)
    if nominal.ndim == 1:       # the usual case, asked once per source and receiver: kept
        return _index_of_bands(tuple(nominal.tolist()))
    return _index_of_any(nominal)


@lru_cache(maxsize=64)
def _index_of_bands(nominal: tuple[float, ...]) -> np.ndarray:
    idx = _index_of_any(np.asarray(nominal, dtype=float))
    idx.setflags(write=False)
    return idx


def _index_of_any(nominal: np.ndarray) -> np.ndarray:
    table = np.asarray(NOMINAL_OCTAVES_HZ, dtype=float)
    idx = np.argmin(np.abs(np.log(nominal[..., None] / table)), axis=-1)
    if not np.allclose(table[idx], nominal, rtol=1e-6):
        bad = nominal[~np.isclose(table[idx], nominal, rtol=1e-6)]
        raise ValueError(f"nominal_hz: {bad.tolist()} are not octave nominal centres "
                         f"{list(NOMINAL_OCTAVES_HZ)}")
    return idx


def exact_centre(nominal_hz) -> np.ndarray:
    """Exact mid-band frequency of octave bands given by their nominal centre.

    Parameters
    ----------
    nominal_hz : array_like -- nominal octave centres [Hz], e.g. 125, 1000

    Returns
    -------
    ndarray -- exact mid-band frequencies [Hz]

    Notes
    -----
    .. math:: f_m = 1000 \\, G^{x}, \\quad G = 10^{3/10}, \\; x = -5, \\dots, 4

    References
    ----------
    .. [1] IEC 61260-1:2014, Electroacoustics - Octave-band and fractional-octave-band filters,
       5.2 and 5.4 (base-ten system, odd band fraction).

    Examples
    --------
    >>> [round(float(f), 2) for f in exact_centre([125, 1000, 8000])]
    [125.89, 1000.0, 7943.28]
    """
    idx = _index_of(np.asarray(nominal_hz, dtype=float))
    x = idx - NOMINAL_OCTAVES_HZ.index(1000)
    return 1000.0 * OCTAVE_RATIO ** x.astype(float)


def band_edges(nominal_hz) -> tuple[np.ndarray, np.ndarray]:
    """Lower and upper edge frequencies of octave bands [Hz]: f_m G^(-1/2), f_m G^(1/2).

    References
    ----------
    .. [1] IEC 61260-1:2014, 5.6.
    """
    fm = exact_centre(nominal_hz)
    return fm / np.sqrt(OCTAVE_RATIO), fm * np.sqrt(OCTAVE_RATIO)


def a_weighting(nominal_hz) -> np.ndarray:
    """A-weighting correction at octave nominal centres [dB].

    Parameters
    ----------
    nominal_hz : array_like -- nominal octave centres [Hz]

    Returns
    -------
    ndarray -- weighting [dB], to be added to the band level

    References
    ----------
    .. [1] IEC 61672-1:2013, Electroacoustics - Sound level meters - Part 1, Table 3.

    Examples
    --------
    >>> a_weighting([125, 1000, 4000]).tolist()
    [-16.1, 0.0, 1.0]
    """
    idx = _index_of(np.asarray(nominal_hz, dtype=float))
    table = np.array([_A_WEIGHT_TABLE_DB[f] for f in NOMINAL_OCTAVES_HZ])
    return table[idx]


def db_from_ratio(ratio) -> np.ndarray:
    """Level of an energy ratio: L = 10 lg(ratio) [dB]. A zero ratio gives -inf."""
    with np.errstate(divide="ignore"):
        return 10.0 * np.log10(np.asarray(ratio, dtype=float))


def ratio_from_db(level_db) -> np.ndarray:
    """Energy ratio of a level: 10^(L/10)."""
    return 10.0 ** (np.asarray(level_db, dtype=float) / 10.0)


def energetic_sum(levels_db, axis=-1) -> np.ndarray:
    """Energetic (incoherent) sum of levels: L = 10 lg sum 10^(L_i / 10) [dB].

    Examples
    --------
    >>> round(float(energetic_sum([90.0, 90.0])), 2)
    93.01
    """
    return db_from_ratio(np.sum(ratio_from_db(levels_db), axis=axis))


def a_weighted_total(band_levels_db, nominal_hz, axis=-1) -> np.ndarray:
    """A-weighted total of octave-band levels: L_A = 10 lg sum 10^((L_k + A_k)/10) [dB(A)].

    The sum runs over the bands given; bands the room does not compute are not included.

    References
    ----------
    .. [1] IEC 61672-1:2013, Table 3 (weightings).
    """
    levels = np.moveaxis(np.asarray(band_levels_db, dtype=float), axis, -1)
    return energetic_sum(levels + a_weighting(nominal_hz), axis=-1)


def a_weighted_total_from_energy(band_energy, nominal_hz) -> np.ndarray:
    """A-weighted total of octave-band energies (ratios 10^(L/10)), on the last axis [dB(A)].

    Notes
    -----
    .. math:: L_A = 10 \\lg \\sum_k E_k \\, 10^{A_k/10}

    the sum of :func:`a_weighted_total` written on the energies, one weighted sum instead of a
    power per band.

    References
    ----------
    .. [1] IEC 61672-1:2013, Table 3 (weightings).

    Examples
    --------
    80 dB at 125 Hz and at 1 kHz: 80 + 10 lg(1 + 10^(-16.1/10)) = 80.1053 dB(A) (hand value):

    >>> e = ratio_from_db([80.0, 80.0])
    >>> round(float(a_weighted_total_from_energy(e, (125, 1000))), 4)
    80.1053
    """
    return db_from_ratio(np.asarray(band_energy, dtype=float)
                         @ _a_weight_energy(tuple(float(b) for b in nominal_hz)))


@lru_cache(maxsize=32)
def _a_weight_energy(nominal_hz: tuple) -> np.ndarray:
    w = ratio_from_db(a_weighting(nominal_hz))
    w.setflags(write=False)
    return w


@lru_cache(maxsize=32)
def band_constants(bands_hz: tuple) -> tuple[np.ndarray, np.ndarray]:
    """(exact centres [Hz], A-weighting [dB]) of a tuple of nominal centres, computed once."""
    fm, aw = exact_centre(bands_hz), a_weighting(bands_hz)
    fm.setflags(write=False)
    aw.setflags(write=False)
    return fm, aw
