"""Room constant, critical distance and levels against hand calculations of the published formulas."""

from __future__ import annotations

import math

import numpy as np
import pytest

from roomcalc.engine import field, reverb


def test_room_constant_by_hand():
    # Beranek, Acoustics (1954), ch. 10: R = S abar / (1 - abar). S = 200, abar = 0.25 -> 66.67.
    assert field.room_constant(200.0, 0.25) == pytest.approx(200 * 0.25 / 0.75)
    abar_t = field.mean_alpha_with_air(200.0, 40.0, 300.0, m=0.002)
    assert abar_t == pytest.approx((40.0 + 4 * 0.002 * 300.0) / 200.0)


def test_critical_distance_by_hand():
    # Beranek: Q / (4 pi r^2) = 4 / R at r_c = sqrt(Q R / (16 pi)).
    q, r = 2.0, 50.0
    rc = field.critical_distance(q, r)
    assert rc == pytest.approx(math.sqrt(q * r / (16 * math.pi)))
    assert field.direct_term(q, rc) == pytest.approx(field.reverberant_term(r), rel=1e-12)


def test_critical_distance_rule_of_thumb():
    # Common practice: for small abar, r_c ~ 0.057 sqrt(Q V / T) (with T by Sabine).
    v, s = 500.0, 400.0
    for abar in (0.02, 0.05):
        a = s * abar
        t = reverb.sabine(v, a, c=343.0)
        rc = field.critical_distance(1.0, field.room_constant(s, abar))
        rule = 0.057 * math.sqrt(v / t)
        # Exact only as abar -> 0: R = A / (1 - abar) ~ A; 0.057 is itself rounded.
        assert rc == pytest.approx(rule, rel=abar + 0.01)


def test_levels_by_hand():
    # Bies, Hansen & Howard, Engineering Noise Control (5th ed.), eq. 6.44:
    # Lp = Lw + 10 lg(Q / (4 pi r^2) + 4 / R). Lw 100 dB, Q 2, r 4 m, R 80 m^2.
    lw, q, r, rr = 100.0, 2.0, 4.0, 80.0
    tot, d, rev = field.levels(lw, q, r, rr)
    assert d == pytest.approx(lw + 10 * math.log10(q / (4 * math.pi * 16)))
    assert rev == pytest.approx(lw + 10 * math.log10(4 / 80))
    assert tot == pytest.approx(10 * math.log10(10 ** (d / 10) + 10 ** (rev / 10)))
    # Hand value: 2 / 201.06 = 0.009947, 4 / 80 = 0.05 -> 100 + 10 lg 0.059947 = 87.777 dB.
    assert tot == pytest.approx(87.777, abs=1e-3)


def test_free_field_inverse_square():
    # Common practice: -6 dB per doubling of distance in the direct field.
    d1 = field.levels(90.0, 1.0, 1.0, 1e9)[1]
    d2 = field.levels(90.0, 1.0, 2.0, 1e9)[1]
    assert d1 - d2 == pytest.approx(20 * math.log10(2), abs=1e-9)
    # And the known free-field value: Lp = Lw - 11 dB at 1 m for Q = 1 (10 lg 4 pi = 10.99).
    assert d1 == pytest.approx(90.0 - 10.99, abs=0.01)


def test_barron_lee_reduces_to_classic_for_small_absorption():
    # Barron & Lee (1988), from memory: reflected energy (31200 T / V) e^(-0.04 r / T) re the
    # direct sound at 10 m; at r = 0 this is 24.8 T / V, i.e. 4/R for R = 0.161 V / T.
    v, t = 2000.0, 1.5
    bl = field.barron_lee_reverberant_term(t, v, 0.0)
    classic = 4.0 / (24 * math.log(10) / 343.0 * v / t)
    assert bl == pytest.approx(classic, rel=0.01)
    # It falls with distance by 0.04 r / T nepers: 10 lg e^(-0.04 * 10 / 1.5) = -1.16 dB.
    far = field.barron_lee_reverberant_term(t, v, 10.0)
    assert 10 * math.log10(far / bl) == pytest.approx(-0.4 / 1.5 * 10 * math.log10(math.e))


def test_distance_curve_shapes_and_values():
    lw = np.array([90.0, 95.0])
    r = np.array([0.5, 1.0, 2.0, 4.0])
    rr = np.array([20.0, 40.0])
    tot, d, rev = field.distance_curve(lw, 2.0, r, rr)
    assert tot.shape == (4, 2)
    for i in range(4):
        for j in range(2):
            t1, d1, r1 = field.levels(lw[j], 2.0, r[i], rr[j])
            assert (tot[i, j], d[i, j], rev[i, j]) == pytest.approx((t1, d1, r1))


def test_bad_distance():
    with pytest.raises(ValueError, match="distance_m"):
        field.levels(90.0, 1.0, 0.0, 10.0)
