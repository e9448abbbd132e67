"""Speech transmission index (STI) by the indirect method: from the reverberation time, the
direct and reverberant parts of the talker's sound at the listener and the noise there.

IEC 60268-16:2020 (Ed. 5), the indirect method of its Annex A, seven octave bands 125-8000 Hz
and 14 modulation frequencies 0.63-12.5 Hz in one-third-octave steps. The standard's text was
not at hand: the modulation transfer formula is Houtgast & Steeneken's as the standard states it;
the weights, the auditory masking and the reception threshold are the values that three open
implementations agree on (``secondary, not checked against the standard's text``, say so where
they are used); the qualification bands are from memory of the standard's Annex (2011 edition,
also in 2020), not checked.

Everything here is numpy over the last axes, so a grid of listening points is one call.
"""

from __future__ import annotations

import numpy as np

from roomcalc.engine import checks

__all__ = ["STI_BANDS_HZ", "MODULATION_HZ", "MALE_ALPHA", "MALE_BETA", "THRESHOLD_DB",
           "STI_RATINGS", "modulation_transfer", "masking_slope_db", "masked_transfer",
           "transmission_index", "sti_from_transfer", "sti", "sti_rating"]

#: The octave bands of the STI [Hz].
STI_BANDS_HZ = (125, 250, 500, 1000, 2000, 4000, 8000)
#: The 14 modulation frequencies, one-third-octave steps from 0.63 to 12.5 Hz [Hz].
MODULATION_HZ = np.array([0.63, 0.8, 1.0, 1.25, 1.6, 2.0, 2.5, 3.15, 4.0, 5.0, 6.3, 8.0, 10.0,
                          12.5])
#: Male speech weighting factors alpha_k and redundancy factors beta_k (IEC 60268-16 Ed. 4/5;
#: secondary, not checked against the standard's text). sum(alpha) - sum(beta) = 1.
MALE_ALPHA = np.array([0.085, 0.127, 0.230, 0.233, 0.309, 0.224, 0.173])
MALE_BETA = np.array([0.085, 0.078, 0.065, 0.011, 0.047, 0.095])
#: Absolute speech reception threshold per band [dB] (secondary, not checked).
THRESHOLD_DB = np.array([46.0, 27.0, 12.0, 6.5, 7.5, 8.0, 12.0])
#: Qualification bands: (lowest STI of the band, its letter), best first (from memory of
#: IEC 60268-16 Annex F; not checked against the standard's text).
STI_RATINGS = ((0.76, "A+"), (0.72, "A"), (0.68, "B"), (0.64, "C"), (0.60, "D"), (0.56, "E"),
               (0.52, "F"), (0.48, "G"), (0.44, "H"), (0.40, "I"), (0.36, "J"), (0.0, "U"))


def modulation_transfer(rt60_s, direct, reverberant, snr_db=np.inf, freqs_hz=MODULATION_HZ):
    """Modulation transfer per band and modulation frequency (Houtgast & Steeneken; IEC
    60268-16 Annex A):

        m_k(F) = |D_k + R_k / (1 + j 2 pi F T_k / 13.8)| / (D_k + R_k)
                 x 1 / (1 + 10^(-SNR_k / 10))

    Parameters
    ----------
    rt60_s : array (..., bands) -- reverberation time T_k [s], > 0
    direct, reverberant : arrays (..., bands) -- the direct and reverberant intensities at the
        listener, any common scale (Q / 4 pi r^2 and 4 / R); D = 0 is a pure diffuse field
    snr_db : array (..., bands) -- speech level over noise level per band [dB]; inf: no noise
    freqs_hz : array (F,) -- modulation frequencies

    Returns
    -------
    array (..., bands, F) in [0, 1]
    """
    t = np.asarray(rt60_s, dtype=float)[..., None]
    d = np.asarray(direct, dtype=float)[..., None]
    r = np.asarray(reverberant, dtype=float)[..., None]
    w = 2j * np.pi * np.asarray(freqs_hz, dtype=float) * t / 13.8
    room = np.abs(d + r / (1.0 + w)) / (d + r)
    snr = np.asarray(snr_db, dtype=float)[..., None]
    with np.errstate(over="ignore"):
        noise = 1.0 / (1.0 + 10.0 ** (-snr / 10.0))
    return room * noise


def masking_slope_db(level_db):
    """The level-dependent auditory masking slope from a band's level L (signal plus noise)
    onto the next band up [dB] (IEC 60268-16:2020; secondary, not checked):
    0.5 L - 65 below 63 dB; 1.8 L - 146.9 from 63 to 67; 0.5 L - 59.8 from 67 to 100; -10 from
    100 dB up."""
    level = np.asarray(level_db, dtype=float)
    return np.select([level < 63.0, level < 67.0, level < 100.0],
                     [0.5 * level - 65.0, 1.8 * level - 146.9, 0.5 * level - 59.8], -10.0)


def masked_transfer(m, level_db):
    """Modulation transfer reduced by auditory masking from the band below and by the
    absolute reception threshold (IEC 60268-16:2020 Annex A; secondary, not checked):

        m'_k = m_k I_k / (I_k + I_am,k + I_rt,k),  I_am,k = I_(k-1) 10^(amdB(L_(k-1)) / 10),
        I_rt,k = 10^(threshold_k / 10), I_k = 10^(L_k / 10)

    ``m``: array (..., 7, F); ``level_db``: the level of signal plus noise per band (..., 7)
    [dB re 20 uPa]. The lowest band has no masking from below."""
    level = np.asarray(level_db, dtype=float)
    intensity = 10.0 ** (level / 10.0)
    masking = np.zeros_like(intensity)
    masking[..., 1:] = intensity[..., :-1] * 10.0 ** (masking_slope_db(level[..., :-1]) / 10.0)
    threshold = 10.0 ** (THRESHOLD_DB / 10.0)
    factor = intensity / (intensity + masking + threshold)
    return np.asarray(m, dtype=float) * factor[..., None]


def transmission_index(m):
    """Transmission index per band and modulation frequency: the effective signal-to-noise
    ratio SNR_eff = 10 lg(m / (1 - m)) clipped to +-15 dB, TI = (SNR_eff + 15) / 30
    (IEC 60268-16)."""
    m = np.clip(np.asarray(m, dtype=float), 1e-12, 1.0 - 1e-12)
    snr = np.clip(10.0 * np.log10(m / (1.0 - m)), -15.0, 15.0)
    return (snr + 15.0) / 30.0


def sti_from_transfer(m):
    """STI from the modulation transfer (..., 7, F): the modulation transfer index per band
    MTI_k (mean transmission index over F), then

        STI = sum alpha_k MTI_k - sum beta_k sqrt(MTI_k MTI_(k+1))

    with the male weights (IEC 60268-16 Ed. 4/5). Returns (STI (...), MTI (..., 7))."""
    mti = transmission_index(m).mean(axis=-1)
    sti = (mti * MALE_ALPHA).sum(axis=-1) - (
        np.sqrt(mti[..., :-1] * mti[..., 1:]) * MALE_BETA).sum(axis=-1)
    return np.clip(sti, 0.0, 1.0), mti


def sti(rt60_s, direct, reverberant, speech_db=None, noise_db=None, masking: bool = True):
    """STI by the indirect method over the seven bands 125-8000 Hz.

    Parameters
    ----------
    rt60_s, direct, reverberant : arrays (..., 7) -- as :func:`modulation_transfer`
    speech_db : array (..., 7) or None -- the talker's level at the listener [dB]; needed for
        noise and for masking (None: no noise, no masking, no threshold)
    noise_db : array (..., 7) or None -- the noise level there [dB] (None: no noise)
    masking : bool -- apply the auditory masking and reception threshold (with ``speech_db``)

    Returns
    -------
    (sti (...), mti (..., 7))

    Raises
    ------
    ValueError -- a value missing for a band, a time not above 0, an intensity below 0, no
    sound at all in a band, a level that is not a finite number

    >>> round(float(sti([1.0] * 7, [0.0] * 7, [1.0] * 7)[0]), 3)
    0.588
    """
    n = len(STI_BANDS_HZ)
    rt60_s = checks.positive("rt60_s", checks.per_band("rt60_s", rt60_s, n), "s")
    direct = checks.non_negative("direct", checks.per_band("direct", direct, n))
    reverberant = checks.non_negative("reverberant",
                                      checks.per_band("reverberant", reverberant, n))
    if not np.all(np.asarray(direct) + np.asarray(reverberant) > 0):
        raise ValueError("direct + reverberant: must be above 0 in every band (some sound "
                         "must reach the listener)")
    if speech_db is not None:
        speech_db = checks.finite("speech_db", checks.per_band("speech_db", speech_db, n), "dB")
    if noise_db is not None:
        noise_db = checks.finite("noise_db", checks.per_band("noise_db", noise_db, n), "dB")
    if speech_db is None:
        snr = np.inf
    elif noise_db is None:
        snr = np.inf
    else:
        snr = np.asarray(speech_db, dtype=float) - np.asarray(noise_db, dtype=float)
    m = modulation_transfer(rt60_s, direct, reverberant, snr)
    if masking and speech_db is not None:
        total = np.asarray(speech_db, dtype=float)
        if noise_db is not None:
            total = 10.0 * np.log10(10.0 ** (total / 10.0)
                                    + 10.0 ** (np.asarray(noise_db, dtype=float) / 10.0))
        m = masked_transfer(m, total)
    return sti_from_transfer(m)


def sti_rating(value) -> str:
    """The qualification band of an STI value ("A+" ... "J", "U"; from memory of IEC 60268-16
    Annex F, not checked).

    >>> sti_rating(0.62), sti_rating(0.30)
    ('D', 'U')
    """
    v = float(value)
    for low, letter in STI_RATINGS:
        if v >= low:
            return letter
    return "U"
