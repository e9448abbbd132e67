"""STI by the indirect method (roomcalc.engine.speech) against check values computed by hand
from the published formulas, and its behaviour where the answer is known in direction.

Sources: the modulation transfer function of Houtgast & Steeneken as IEC 60268-16 (Annex A)
states it; the male weights, masking and threshold as transcribed in three open implementations
that cite IEC 60268-16:2020 (secondary, not checked against the standard's text). The check
values 0.588 (T = 1 s), 0.736 (0.5 s), 0.437 (2 s) and 0.500 (no reverberation, SNR 0 dB) are
computed by hand from those formulas, with no masking and no threshold.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from roomcalc.engine.speech import (MALE_ALPHA, MALE_BETA, MODULATION_HZ, masking_slope_db,
                                    modulation_transfer, sti, sti_rating, transmission_index)

SEVEN = np.ones(7)


def _hand_sti_diffuse(t_s: float) -> float:
    """STI of a pure diffuse field with no noise, T in every band, by hand: every band has the
    same MTI (the mean over F of the transmission index of m(F) = 1 / sqrt(1 + (2 pi F T /
    13.8)^2)), and sum(alpha) - sum(beta) = 1, so the STI is that MTI."""
    tis = []
    for f in [0.63, 0.8, 1.0, 1.25, 1.6, 2.0, 2.5, 3.15, 4.0, 5.0, 6.3, 8.0, 10.0, 12.5]:
        m = 1.0 / math.sqrt(1.0 + (2.0 * math.pi * f * t_s / 13.8) ** 2)
        snr = max(-15.0, min(15.0, 10.0 * math.log10(m / (1.0 - m))))
        tis.append((snr + 15.0) / 30.0)
    return sum(tis) / len(tis)


def test_the_weights_sum_so_that_equal_bands_give_their_index():
    # sum alpha - sum beta = 1 (IEC 60268-16 Ed. 4/5 male weights): a check on the table.
    assert math.isclose(MALE_ALPHA.sum() - MALE_BETA.sum(), 1.0, abs_tol=1e-12)
    assert len(MODULATION_HZ) == 14 and MODULATION_HZ[0] == 0.63 and MODULATION_HZ[-1] == 12.5


@pytest.mark.parametrize("t_s,published", [(1.0, 0.588), (0.5, 0.736), (2.0, 0.437)])
def test_diffuse_field_without_noise(t_s, published):
    """Check values computed from the formulas (see the module docstring)."""
    value, mti = sti(t_s * SEVEN, 0 * SEVEN, SEVEN)
    assert round(float(value), 3) == published
    assert math.isclose(float(value), _hand_sti_diffuse(t_s), abs_tol=1e-9)
    assert np.allclose(mti, mti[0])


def test_no_reverberation_and_snr_0_db_gives_one_half():
    """m = 1 / (1 + 10^0) = 0.5 in every band and at every F: SNR_eff 0 dB, TI 0.5, STI 0.500
    (by hand from the formulas; no masking, no threshold)."""
    value, _ = sti(SEVEN, SEVEN, 0 * SEVEN, speech_db=60 * SEVEN, noise_db=60 * SEVEN,
                   masking=False)
    assert math.isclose(float(value), 0.5, abs_tol=1e-12)


def test_transmission_index_clips_at_plus_and_minus_15_db():
    assert transmission_index([1.0, 0.0, 0.5]).tolist() == pytest.approx([1.0, 0.0, 0.5])


def test_the_masking_slope_pieces_meet_where_published():
    """The slope's pieces (IEC 60268-16:2020, secondary): 0.5 L - 65, 1.8 L - 146.9,
    0.5 L - 59.8, -10; at 63 and 67 dB the neighbouring pieces agree to 0.1 dB."""
    assert masking_slope_db(62.999) == pytest.approx(0.5 * 63 - 65, abs=1e-2)
    assert masking_slope_db(63.0) == pytest.approx(1.8 * 63 - 146.9)
    assert abs((1.8 * 67 - 146.9) - (0.5 * 67 - 59.8)) < 0.11
    assert masking_slope_db(100.0) == -10.0


def test_a_grid_is_one_call():
    """Any leading shape: a (4, 3) grid of listeners gives a (4, 3) STI array, each equal to
    the single-listener call."""
    rng = np.random.default_rng(7)
    t = rng.uniform(0.3, 2.0, (4, 3, 7))
    d = rng.uniform(0.0, 1.0, (4, 3, 7))
    r = rng.uniform(0.1, 1.0, (4, 3, 7))
    grid, mti = sti(t, d, r)
    assert grid.shape == (4, 3) and mti.shape == (4, 3, 7)
    assert float(grid[2, 1]) == pytest.approx(float(sti(t[2, 1], d[2, 1], r[2, 1])[0]))


@settings(max_examples=60, deadline=None)
@given(t=st.floats(0.2, 3.0), near=st.floats(0.0, 5.0), snr=st.floats(-10.0, 30.0),
       more=st.floats(0.5, 20.0))
def test_more_direct_sound_helps_and_more_noise_hurts(t, near, snr, more):
    """Common practice, and what the formula implies: more direct sound (a listener closer to
    the talker) never lowers the STI; more noise never raises it."""
    base, _ = sti(t * SEVEN, near * SEVEN, SEVEN, speech_db=65 * SEVEN,
                  noise_db=(65 - snr) * SEVEN)
    closer, _ = sti(t * SEVEN, (near + more) * SEVEN, SEVEN, speech_db=65 * SEVEN,
                    noise_db=(65 - snr) * SEVEN)
    noisier, _ = sti(t * SEVEN, near * SEVEN, SEVEN, speech_db=65 * SEVEN,
                     noise_db=(65 - snr + more) * SEVEN)
    assert closer >= base - 1e-12
    assert noisier <= base + 1e-12


def test_masking_and_threshold_lower_the_transfer():
    m = modulation_transfer(SEVEN, 0 * SEVEN, SEVEN)
    quiet, _ = sti(SEVEN, 0 * SEVEN, SEVEN, speech_db=20 * SEVEN)      # near the threshold
    loud, _ = sti(SEVEN, 0 * SEVEN, SEVEN, speech_db=70 * SEVEN)
    bare, _ = sti(SEVEN, 0 * SEVEN, SEVEN)
    assert m.shape == (7, 14)
    assert quiet < loud <= bare


def test_ratings():
    """Qualification bands (from memory of IEC 60268-16 Annex F, not checked)."""
    assert [sti_rating(x) for x in (0.80, 0.76, 0.75, 0.62, 0.50, 0.36, 0.2)] == \
        ["A+", "A+", "A", "D", "G", "J", "U"]


@pytest.mark.parametrize("args,named", [
    ((np.ones(6), SEVEN, SEVEN), "rt60_s"),
    ((0 * SEVEN, SEVEN, SEVEN), "rt60_s"),
    ((SEVEN, -SEVEN, SEVEN), "direct"),
    ((SEVEN, 0 * SEVEN, 0 * SEVEN), "direct + reverberant"),
])
def test_bad_inputs_are_named(args, named):
    with pytest.raises(ValueError, match=named.replace("+", r"\+")):
        sti(*args)
