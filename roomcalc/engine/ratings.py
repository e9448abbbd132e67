"""Single-number ratings of a sound absorber: NRC, SAA (octave estimate), alpha_w (ISO 11654)."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from roomcalc.engine.checks import per_band

__all__ = ["ISO11654_REFERENCE", "ISO11654_BANDS_HZ", "nrc", "saa_octave_estimate",
           "WeightedAlpha", "practical_alpha", "absorption_class", "weighted_alpha"]

#: ISO 11654:1997 reference curve at 250, 500, 1000, 2000, 4000 Hz (from memory, consistent with
#: the standard's Annex A worked examples).
ISO11654_REFERENCE = (0.80, 1.00, 1.00, 1.00, 0.90)
ISO11654_BANDS_HZ = (250, 500, 1000, 2000, 4000)


def _pick(bands_hz, alpha, wanted):
    bands = [int(round(float(b))) for b in bands_hz]
    missing = [w for w in wanted if w not in bands]
    if missing:
        raise ValueError(f"bands_hz: the rating needs {missing} Hz, which are missing")
    a = per_band("alpha", alpha, len(bands))
    return a[..., [bands.index(w) for w in wanted]]


def _round_half_up(x, step):
    """Round to the nearest multiple of step, halves upward (ASTM C423 practice)."""
    return np.floor(np.asarray(x) / step + 0.5 + 1e-9) * step


def nrc(bands_hz, alpha) -> np.ndarray:
    """Noise reduction coefficient: mean alpha at 250-2000 Hz rounded to the nearest 0.05.

    References
    ----------
    .. [1] ASTM C423-17, Standard Test Method for Sound Absorption ..., 3.1 (NRC).

    Examples
    --------
    >>> round(float(nrc([125, 250, 500, 1000, 2000, 4000], [.17, .45, .80, .89, .97, .94])), 2)
    0.8
    """
    return np.round(_round_half_up(np.mean(_pick(bands_hz, alpha, (250, 500, 1000, 2000)),
                                           axis=-1), 0.05), 2)


def saa_octave_estimate(bands_hz, alpha) -> np.ndarray:
    """Estimate of the sound absorption average from octave data, rounded to 0.01.

    ASTM C423 defines SAA as the mean of the twelve one-third-octave coefficients 200-2500 Hz.
    With octave data only, the mean of the 250, 500, 1000 and 2000 Hz octave values stands in;
    it is an estimate, not the rated SAA.

    References
    ----------
    .. [1] ASTM C423-17, 3.1 (SAA).
    """
    mean = np.mean(_pick(bands_hz, alpha, (250, 500, 1000, 2000)), axis=-1)
    return np.round(_round_half_up(mean, 0.01), 2)


@dataclass(frozen=True)
class WeightedAlpha:
    """ISO 11654 rating: alpha_w, shape indicators (``""``, ``"L"``, ``"MH"``...), class."""

    alpha_w: float
    shape: str
    absorption_class: str

    def label(self) -> str:
        """alpha_w with its indicators, e.g. ``0.60(MH)``."""
        return f"{self.alpha_w:.2f}" + (f"({self.shape})" if self.shape else "")


def practical_alpha(alpha_octave) -> np.ndarray:
    """Practical coefficient alpha_p from octave data: rounded to 0.05 and capped at 1.00.

    ISO 11654 takes the mean of the three one-third-octave values in each octave; with octave
    data the octave value stands in for that mean.

    References
    ----------
    .. [1] ISO 11654:1997, 4.1.
    """
    return np.minimum(np.round(_round_half_up(alpha_octave, 0.05), 2), 1.0)


def absorption_class(alpha_w: float) -> str:
    """Sound absorption class A-E of ISO 11654:1997 Annex B, or ``"not classified"``."""
    hundredths = int(round(alpha_w * 100))
    for cls, low in (("A", 90), ("B", 80), ("C", 60), ("D", 30), ("E", 15)):
        if hundredths >= low:
            return cls
    return "not classified"


def weighted_alpha(bands_hz, alpha) -> WeightedAlpha:
    """Weighted sound absorption coefficient alpha_w with shape indicators, ISO 11654.

    Parameters
    ----------
    bands_hz : sequence -- nominal octave centres [Hz]; must include 250-4000
    alpha : array_like, shape (bands,) -- absorption coefficients

    Returns
    -------
    WeightedAlpha

    Notes
    -----
    The reference curve (0.80, 1.00, 1.00, 1.00, 0.90 at 250-4000 Hz) is shifted down in steps of
    0.05 until the sum of unfavourable deviations (alpha_p below the curve) is at most 0.10;
    alpha_w is the shifted curve's value at 500 Hz. An indicator L, M or H is added where alpha_p
    exceeds the shifted curve by 0.25 or more at 250 Hz, 500-1000 Hz or 2000-4000 Hz.

    References
    ----------
    .. [1] ISO 11654:1997, Acoustics - Sound absorbers for use in buildings - Rating of sound
       absorption, clause 4 and Annex A (reference curve from memory, consistent with Annex A).

    Examples
    --------
    ISO 11654:1997 Annex A:

    >>> weighted_alpha([250, 500, 1000, 2000, 4000], [.35, 1.0, .65, .60, .55]).label()
    '0.60(M)'
    """
    ap = np.rint(practical_alpha(_pick(bands_hz, alpha, ISO11654_BANDS_HZ)) * 100).astype(int)
    ref = np.rint(np.asarray(ISO11654_REFERENCE) * 100).astype(int)
    shift = 0
    while True:
        curve = ref - shift
        if np.sum(np.maximum(curve - ap, 0)) <= 10 or curve[1] <= 0:
            break
        shift += 5
    aw = max(int(curve[1]), 0) / 100.0
    over = ap - curve
    shape = ("L" if over[0] >= 25 else "") + ("M" if np.any(over[1:3] >= 25) else "") + \
        ("H" if np.any(over[3:5] >= 25) else "")
    return WeightedAlpha(aw, shape, absorption_class(aw))
