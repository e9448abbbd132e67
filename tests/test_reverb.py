"""Reverberation formulas against the published check room and hand calculations."""

from __future__ import annotations

import math

import numpy as np
import pytest

from roomcalc.engine import reverb

# Check room: c = 343 m/s, no air; faces normal to x, y, z have
# S = 240, 600, 500 m^2, alpha 0.10, 0.25, 0.45, V = 3000 m^3.
# Source: test data of a general-purpose acoustics library, recomputed (REFERENCES).
V = 3000.0
S_AXIS = np.array([240.0, 600.0, 500.0])
A_AXIS = np.array([0.10, 0.25, 0.45])


def test_sabine_check_room():
    a = float(S_AXIS @ A_AXIS)
    assert reverb.sabine(V, a, c=343.0) == pytest.approx(1.2114, abs=5e-5)


def test_eyring_check_room():
    a = float(S_AXIS @ A_AXIS)
    assert reverb.eyring(V, S_AXIS.sum(), a, c=343.0) == pytest.approx(1.0204, abs=5e-5)


def test_arau_puchades_check_room():
    t = reverb.arau_puchades(V, S_AXIS, A_AXIS[:, None], c=343.0)
    assert t[0] == pytest.approx(1.1424, abs=5e-5)


def test_fitzroy_check_room():
    # The published Fitzroy value 0.6999 s belongs to a box whose six faces are 240, 240, 600,
    # 600, 500, 500 m^2 (the library's test passes six faces), i.e. face pairs of 480, 1200 and
    # 1000 m^2; the other check values use the three areas as the totals per axis. With pairs
    # of 240, 600, 500 m^2 Fitzroy gives twice that, 1.3997 s (computed from the formula).
    t6 = reverb.fitzroy(V, 2 * S_AXIS, A_AXIS[:, None], c=343.0)
    assert t6[0] == pytest.approx(0.6999, abs=5e-5)
    t3 = reverb.fitzroy(V, S_AXIS, A_AXIS[:, None], c=343.0)
    assert t3[0] == pytest.approx(2 * t6[0], rel=1e-12)


def test_millington_by_hand():
    # Independent hand calculation of Millington-Sette (Millington 1932; Sette 1933):
    # T = 0.161... V / (-sum S_i ln(1 - alpha_i)), K = 24 ln10 / 343.
    k = 24 * math.log(10) / 343.0
    denom = -(240 * math.log(0.90) + 600 * math.log(0.75) + 500 * math.log(0.55))
    hand = k * V / denom
    assert hand == pytest.approx(0.9729, abs=5e-5)  # REFERENCES [computed]
    t = reverb.millington(V, S_AXIS, A_AXIS[:, None], c=343.0)
    assert t[0] == pytest.approx(hand, rel=1e-12)


def test_sabine_constant():
    # Common practice: K = 0.161 s/m at c = 343 m/s; 0.049 s/ft at 1126 ft/s.
    assert reverb.sabine_constant(343.0) == pytest.approx(0.1611, abs=1e-4)
    assert reverb.sabine_constant(1126.0) == pytest.approx(0.049, abs=5e-4)


def test_uniform_absorption_all_log_formulas_agree():
    # Fitzroy and Arau-Puchades reduce to Eyring when every axis has the same alpha, and
    # Millington to Eyring when every surface has it (definitions of the formulas).
    alpha = np.array([0.05, 0.2, 0.5, 0.8])
    m = np.array([0.0, 0.001, 0.003, 0.01])
    e = reverb.eyring(V, S_AXIS.sum(), S_AXIS.sum() * alpha, m)
    f = reverb.fitzroy(V, S_AXIS, np.tile(alpha, (3, 1)), m)
    a = reverb.arau_puchades(V, S_AXIS, np.tile(alpha, (3, 1)), m)
    ms = reverb.millington(V, S_AXIS, np.tile(alpha, (3, 1)), m)
    np.testing.assert_allclose(f, e, rtol=1e-12)
    np.testing.assert_allclose(a, e, rtol=1e-12)
    np.testing.assert_allclose(ms, e, rtol=1e-12)


def test_eyring_tends_to_sabine_at_low_absorption_and_is_shorter():
    # Common practice: -ln(1 - a) ~ a for small a, and -ln(1 - a) > a always.
    s = 1340.0
    for abar in (1e-4, 0.01, 0.1, 0.3, 0.6):
        ts = reverb.sabine(V, s * abar)
        te = reverb.eyring(V, s, s * abar)
        assert te < ts
        assert te / ts == pytest.approx(abar / -math.log1p(-abar), rel=1e-12)


def test_air_term_shortens():
    # ISO 354:2003, eq. (2): T = 55.3 V / (c A + 4 c m V) -- air adds 4 m V to A.
    t0 = reverb.sabine(200.0, 40.0)
    t1 = reverb.sabine(200.0, 40.0, m=0.01)
    assert t1 == pytest.approx(reverb.sabine(200.0, 40.0 + 4 * 0.01 * 200.0), rel=1e-12)
    assert t1 < t0


def test_batch_broadcasting():
    v = np.array([[100.0], [400.0]])
    a = np.array([[10.0, 20.0], [30.0, 40.0]])
    t = reverb.sabine(v, a)
    for i in range(2):
        for j in range(2):
            assert t[i, j] == pytest.approx(reverb.sabine(v[i, 0], a[i, j]))


@pytest.mark.parametrize("call, field", [
    (lambda: reverb.sabine(-1.0, 10.0), "volume"),
    (lambda: reverb.sabine(10.0, -1.0), "absorption_area"),
    (lambda: reverb.eyring(10.0, 20.0, 20.0), "absorption_area / surface_area"),
    (lambda: reverb.millington(10.0, [5.0], [[1.0]]), "alphas"),
    (lambda: reverb.fitzroy(10.0, [1.0, 2.0], [[0.1], [0.1]]), "axis"),
])
def test_bad_input_names_the_argument(call, field):
    with pytest.raises(ValueError, match=field.replace("/", ".")):
        call()


def test_schroeder_frequency():
    # Source: Schroeder & Kuttruff (1962): f_S = 2000 sqrt(T / V); T = 1 s, V = 100 m^3 -> 200 Hz.
    assert reverb.schroeder_frequency(1.0, 100.0) == pytest.approx(200.0)
