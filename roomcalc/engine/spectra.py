"""Named spectrum shapes, for a source given by its A-weighted sound power only.

A shape gives the relative octave-band sound power [dB]; the absolute level is then set so that the
A-weighted sum over the room's bands equals the stated dB(A).
"""

from __future__ import annotations

import numpy as np

from roomcalc.engine.bands import a_weighting, db_from_ratio, ratio_from_db

__all__ = ["SPECTRUM_SHAPES", "SPECTRUM_DESCRIPTIONS", "band_power_from_dba"]

_OCTAVES = (63, 125, 250, 500, 1000, 2000, 4000, 8000)

#: Relative octave-band power [dB] of each shape.
SPECTRUM_SHAPES: dict[str, dict[int, float]] = {
    # Equal power in every octave band (pink noise): a definition, no source needed.
    "pink": {f: 0.0 for f in _OCTAVES},
    # Equal power per hertz (white noise): octave power grows with bandwidth, +10 lg(f / 1 kHz).
    "white": {f: round(10.0 * np.log10(f / 1000.0), 2) for f in _OCTAVES},
    # Power falling 3 dB per octave (brown or red noise): -10 lg(f / 1 kHz).
    "brown": {f: round(-10.0 * np.log10(f / 1000.0), 2) for f in _OCTAVES},
    # Male speech, relative octave levels of IEC 60268-16 (Ed. 4, Table A.2); from memory, not
    # checked against a copy. No 63 Hz value.
    "speech-male": {125: 2.9, 250: 2.9, 500: -0.8, 1000: -6.8, 2000: -12.8, 4000: -18.8,
                    8000: -24.8},
}

#: One line per shape, for help texts.
SPECTRUM_DESCRIPTIONS = {
    "pink": "equal power in every octave band",
    "white": "equal power per hertz: +3 dB per octave",
    "brown": "falling 3 dB per octave",
    "speech-male": "male speech, IEC 60268-16 relative octave levels (from memory)",
}


def band_power_from_dba(level_dba, shape, bands_hz) -> np.ndarray:
    """Octave-band sound power levels with a named shape and a given A-weighted total.

    Parameters
    ----------
    level_dba : float -- A-weighted sound power level [dB(A) re 1 pW]
    shape : str or mapping -- a key of :data:`SPECTRUM_SHAPES`, or relative octave levels
        {band [Hz]: dB} of a shape of the caller's (only their differences count)
    bands_hz : sequence -- nominal octave centres the room works on [Hz]

    Returns
    -------
    ndarray -- Lw per band [dB re 1 pW]

    Notes
    -----
    .. math:: L_{w,k} = L_{wA} + s_k - 10 \\lg \\sum_j 10^{(s_j + A_j)/10}

    with the shape :math:`s_k` and the A-weighting :math:`A_k` of IEC 61672-1:2013 Table 3.

    Examples
    --------
    >>> lw = band_power_from_dba(90.0, "pink", [125, 250, 500, 1000, 2000, 4000])
    >>> from roomcalc.engine.bands import a_weighted_total
    >>> round(float(a_weighted_total(lw, [125, 250, 500, 1000, 2000, 4000])), 6)
    90.0
    """
    if isinstance(shape, str):
        if shape not in SPECTRUM_SHAPES:
            raise ValueError(f"shape: {shape!r} is not one of {sorted(SPECTRUM_SHAPES)}")
        table = SPECTRUM_SHAPES[shape]
    else:
        table = {int(k): float(v) for k, v in shape.items()}
    missing = [int(b) for b in bands_hz if int(b) not in table]
    if missing:
        raise ValueError(f"shape: {shape!r} has no value at {', '.join(map(str, missing))} Hz")
    s = np.array([table[int(b)] for b in bands_hz])
    offset = db_from_ratio(np.sum(ratio_from_db(s + a_weighting(bands_hz))))
    return float(level_dba) + s - offset
