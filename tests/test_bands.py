"""Band centres, A-weighting and level arithmetic."""

from __future__ import annotations

import numpy as np
import pytest

from roomcalc.engine.bands import (a_weighted_total, a_weighting, band_edges, energetic_sum,
                                   exact_centre)

# Source: IEC 61672-1:2013, Table 3 -- A-weighting at octave nominal frequencies, dB.
IEC61672_A = {31.5: -39.4, 63: -26.2, 125: -16.1, 250: -8.6, 500: -3.2, 1000: 0.0,
              2000: 1.2, 4000: 1.0, 8000: -1.1}


def test_a_weighting_table():
    f = list(IEC61672_A)
    np.testing.assert_allclose(a_weighting(f), list(IEC61672_A.values()), atol=1e-12)


def test_a_weighting_matches_the_analytic_curve():
    # Source: IEC 61672-1:2013, eq. (E.6): A(f) = 20 lg(f4^2 f^4 / ((f^2 + f1^2)
    # sqrt(f^2 + f2^2) sqrt(f^2 + f3^2) (f^2 + f4^2))) - A1000, with f1 = 20.60 Hz,
    # f2 = 107.7 Hz, f3 = 737.9 Hz, f4 = 12194 Hz, evaluated at exact mid-band frequencies.
    f1, f2, f3, f4 = 20.598997, 107.65265, 737.86223, 12194.217
    def curve(f):
        f = np.asarray(f, dtype=float)
        return 20 * np.log10(f4**2 * f**4 / ((f**2 + f1**2) * np.sqrt(f**2 + f2**2)
                                             * np.sqrt(f**2 + f3**2) * (f**2 + f4**2)))
    bands = [63, 125, 250, 500, 1000, 2000, 4000, 8000]
    exact = curve(exact_centre(bands)) - curve(1000.0)
    # Table 3 is rounded to 0.1 dB.
    np.testing.assert_allclose(a_weighting(bands), exact, atol=0.051)


def test_exact_centres_iec61260():
    # Source: IEC 61260-1:2014, 5.4: f_m = 1000 * 10^(3x/10) for octaves (base ten).
    x = np.arange(-4, 4)
    expected = 1000.0 * 10.0 ** (3 * x / 10)
    np.testing.assert_allclose(exact_centre([63, 125, 250, 500, 1000, 2000, 4000, 8000]),
                               expected, rtol=1e-12)
    lo, hi = band_edges([1000])
    # Source: IEC 61260-1:2014, 5.6: edges f_m G^(-+1/2); for 1 kHz 707.9 and 1412.5 Hz.
    assert lo[0] == pytest.approx(707.946, rel=1e-5)
    assert hi[0] == pytest.approx(1412.538, rel=1e-5)


def test_not_a_band_is_refused():
    with pytest.raises(ValueError, match="nominal"):
        exact_centre([1100])


def test_energetic_sum_and_a_total():
    # Common practice: two equal incoherent levels sum to +3.01 dB; ten to +10 dB.
    assert energetic_sum([80.0, 80.0]) == pytest.approx(83.0103, abs=1e-4)
    assert energetic_sum([70.0] * 10) == pytest.approx(80.0, abs=1e-9)
    # Flat 80 dB in the six octaves 125-4000 Hz: by hand, 10 lg(sum 10^((80 + A)/10)).
    bands = [125, 250, 500, 1000, 2000, 4000]
    hand = 10 * np.log10(sum(10 ** ((80 + a) / 10) for a in (-16.1, -8.6, -3.2, 0, 1.2, 1.0)))
    assert a_weighted_total([80.0] * 6, bands) == pytest.approx(hand, abs=1e-9)
