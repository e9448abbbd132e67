"""Whole-room evaluation: the engine's numbers against independent hand calculations, the
recommendation, warnings, cautions and the before/after comparison."""

from __future__ import annotations

import math

import numpy as np
import pytest

from roomcalc.engine import air
from roomcalc.engine.analysis import compare, distance_curves, evaluate
from roomcalc.engine.bands import exact_centre
from roomcalc.engine.model import Air, Receiver, Room, RoomObject, Source, Surface

BANDS = (125, 250, 500, 1000, 2000, 4000)


def box_room(alpha_walls=0.05, alpha_ceiling=0.05, objects=(), sources=(), receivers=(),
             dims=(8.0, 6.0, 3.0), faces=True):
    L, W, H = dims
    def s(name, area, a, face):
        return Surface(name, area, [a] * 6, face=face if faces else None)
    surfaces = (s("floor", L * W, 0.05, "floor"), s("ceiling", L * W, alpha_ceiling, "ceiling"),
                s("front", W * H, alpha_walls, "front"), s("back", W * H, alpha_walls, "back"),
                s("left", L * H, alpha_walls, "left"), s("right", L * H, alpha_walls, "right"))
    return Room(BANDS, L * W * H, surfaces, dims, Air(20.0, 50.0, 101.325), tuple(objects),
                tuple(sources), tuple(receivers), "test box")


def test_sabine_with_air_and_objects_by_hand():
    obj = RoomObject("people", [0.23, 0.37, 0.44, 0.45, 0.45, 0.45], count=10)
    room = box_room(objects=[obj])
    res = evaluate(room)
    L, W, H = 8.0, 6.0, 3.0
    s = 2 * (L * W + L * H + W * H)
    v = L * W * H
    c = 331.3 * math.sqrt(1 + 20 / 273.15)
    f = exact_centre(BANDS)
    m = air.attenuation_db_per_m(f, 20.0, 50.0) / (10 * math.log10(math.e))
    for i in range(6):
        a = 0.05 * s + 10 * obj.absorption[i]
        hand = 24 * math.log(10) / c * v / (a + 4 * m[i] * v)
        assert res.rt60_s["sabine"][i] == pytest.approx(hand, rel=1e-12)
        hand_e = 24 * math.log(10) / c * v / (-s * math.log(1 - a / s) + 4 * m[i] * v)
        assert res.rt60_s["eyring"][i] == pytest.approx(hand_e, rel=1e-12)
        abar_t = (a + 4 * m[i] * v) / s
        assert res.room_constant_m2[i] == pytest.approx(s * abar_t / (1 - abar_t), rel=1e-12)


def test_levels_sum_sources_energetically_and_critical_distance():
    src = (Source("a", [90.0] * 6, 2.0, (1.0, 1.0, 1.0)),
           Source("b", [85.0] * 6, 1.0, (7.0, 5.0, 1.5)))
    rec = (Receiver("p", (4.0, 3.0, 1.2)),)
    res = evaluate(box_room(sources=src, receivers=rec))
    r_a = math.dist((4.0, 3.0, 1.2), (1.0, 1.0, 1.0))
    r_b = math.dist((4.0, 3.0, 1.2), (7.0, 5.0, 1.5))
    R = res.room_constant_m2
    for i in range(6):
        e = (10 ** 9.0 * (2 / (4 * math.pi * r_a ** 2) + 4 / R[i])
             + 10 ** 8.5 * (1 / (4 * math.pi * r_b ** 2) + 4 / R[i]))
        assert res.receivers[0].level_db[i] == pytest.approx(10 * math.log10(e), abs=1e-9)
    assert res.sources[0].critical_distance_m == pytest.approx(np.sqrt(2 * R / (16 * np.pi)))
    # dB(A) of the total, IEC 61672-1 Table 3 weights.
    wa = np.array([-16.1, -8.6, -3.2, 0.0, 1.2, 1.0])
    la = 10 * np.log10(np.sum(10 ** ((res.receivers[0].level_db + wa) / 10)))
    assert res.receivers[0].level_dba == pytest.approx(la)


def test_recommendation_rules():
    live = evaluate(box_room(alpha_walls=0.05))
    assert live.recommended == "sabine"
    dead = evaluate(box_room(alpha_walls=0.5, alpha_ceiling=0.5))
    assert dead.recommended == "eyring"
    ceiling = evaluate(box_room(alpha_walls=0.03, alpha_ceiling=0.9))
    assert ceiling.recommended == "arau_puchades"
    assert any(w.code == "concentrated" for w in ceiling.warnings)
    # Common practice: absorption on one face pair makes Sabine/Eyring too short; Fitzroy is
    # longer than Eyring there.
    assert ceiling.rt60_s["fitzroy"][3] > ceiling.rt60_s["eyring"][3]


def test_fitzroy_unavailable_without_faces():
    res = evaluate(box_room(faces=False))
    assert "fitzroy" not in res.rt60_s
    assert "box face" in res.unavailable["fitzroy"]
    with pytest.raises(ValueError, match="unavailable"):
        evaluate(box_room(faces=False), method="fitzroy")


def test_warnings():
    res = evaluate(box_room(alpha_walls=0.6, alpha_ceiling=0.6, dims=(20.0, 3.0, 3.0),
                            sources=[Source("s", [90.0] * 6, 1.0, (1.0, 1.0, 1.0))],
                            receivers=[Receiver("near", (1.2, 1.1, 1.0))]))
    codes = {w.code for w in res.warnings}
    assert {"proportions", "high-alpha", "receiver-close"} <= codes
    small = evaluate(box_room(dims=(3.0, 2.5, 2.4)))
    assert "schroeder" in {w.code for w in small.warnings}
    # Areas off by more than 5 %.
    r = box_room()
    r2 = Room(r.bands_hz, r.volume, r.surfaces[:-1], r.dimensions, r.air)
    assert "area-mismatch" in {w.code for w in evaluate(r2).warnings}


def test_alpha_above_one_allowed_for_sabine_capped_for_logs():
    r = box_room()
    hot = Surface("wool", 10.0, [1.1] * 6, face="left")
    r2 = Room(r.bands_hz, r.volume, r.surfaces + (hot,), r.dimensions, r.air)
    res = evaluate(r2)
    assert "alpha-capped" in {w.code for w in res.warnings}
    assert np.all(np.isfinite(res.rt60_s["millington"]))
    # Sabine used the value as given: A includes 11 m^2 from the panel.
    assert res.absorption_area_m2[0] == pytest.approx(0.05 * r.surface_area + 11.0)


def test_caution_at_80_dba():
    loud = evaluate(box_room(sources=[Source("saw", [100.0] * 6, 2.0, (2.0, 2.0, 1.0))],
                             receivers=[Receiver("op", (2.5, 2.5, 1.5))]))
    assert loud.cautions and "2003/10/EC" in loud.cautions[-1] and "1910.95" in loud.cautions[-1]
    quiet = evaluate(box_room(sources=[Source("radio", [50.0] * 6, 2.0, (2.0, 2.0, 1.0))],
                              receivers=[Receiver("op", (2.5, 2.5, 1.5))]))
    assert not quiet.cautions


def test_compare_inside_critical_distance():
    src = [Source("saw", [100.0] * 6, 2.0, (2.0, 2.0, 1.0))]
    rec = [Receiver("operator", (2.5, 2.0, 1.0)), Receiver("far", (7.5, 5.5, 1.5))]
    before = evaluate(box_room(sources=src, receivers=rec))
    after = evaluate(box_room(alpha_walls=0.6, sources=src, receivers=rec))
    cmp = compare(before, after)
    # Reverberant-field reduction 10 lg(R2 / R1) (common practice).
    np.testing.assert_allclose(cmp.reverberant_reduction_db,
                               10 * np.log10(after.room_constant_m2 / before.room_constant_m2))
    op = next(c for c in cmp.receivers if c.name == "operator")
    far = next(c for c in cmp.receivers if c.name == "far")
    # At distance r the change is 10 lg[(Q/4 pi r^2 + 4/R1) / (Q/4 pi r^2 + 4/R2)].
    d = 2.0 / (4 * np.pi * 0.5 ** 2)
    hand = 10 * np.log10((d + 4 / after.room_constant_m2) / (d + 4 / before.room_constant_m2))
    np.testing.assert_allclose(op.level_change_db, hand, atol=1e-9)
    assert op.inside_critical_distance == "saw" and far.inside_critical_distance is None
    assert abs(op.level_change_dba) < abs(far.level_change_dba)
    assert any("inside its critical distance" in n for n in cmp.notes)


def test_distance_curve_of_room():
    src = [Source("spk", [90.0] * 6, 2.0, (1.0, 1.0, 1.0))]
    res = evaluate(box_room(sources=src))
    cur = distance_curves(res, "spk", points=50)
    assert cur["total_db"].shape == (50, 6)
    # Total equals direct + reverberant energetically, and reverberant is flat (classic model).
    e = 10 ** (cur["direct_db"] / 10) + 10 ** (cur["reverberant_db"] / 10)
    np.testing.assert_allclose(cur["total_db"], 10 * np.log10(e))
    assert np.ptp(cur["reverberant_db"], axis=0).max() < 1e-9
    # At r_c direct and reverberant parts are equal.
    rc = cur["critical_distance_m"][3]
    at = distance_curves(res, "spk", distances_m=[rc])
    assert at["direct_db"][0, 3] == pytest.approx(at["reverberant_db"][0, 3])


def test_barron_lee_model_lower_far_away():
    src = [Source("spk", [90.0] * 6, 2.0, (1.0, 1.0, 1.0))]
    rec = [Receiver("far", (7.0, 5.0, 1.2))]
    classic = evaluate(box_room(sources=src, receivers=rec))
    bl = evaluate(box_room(sources=src, receivers=rec), reverberant_model="barron-lee")
    # Revised theory: the reflected level falls with distance, so it is lower far away.
    assert np.all(bl.receivers[0].reverberant_db < classic.receivers[0].reverberant_db + 0.5)


def test_batch_matches_single(catalog):
    from roomcalc.engine.analysis import batch_reverberation
    rng = np.random.default_rng(1)
    v = rng.uniform(50, 500, 20)
    areas = rng.uniform(5, 60, (20, 6))
    alphas = rng.uniform(0.02, 0.6, (20, 6, 6))
    m = np.array([0.0001, 0.0003, 0.0006, 0.001, 0.002, 0.006])
    out = batch_reverberation(v, areas, alphas, 2.0, m, 343.0)
    from roomcalc.engine import reverb
    for i in range(20):
        a = areas[i] @ alphas[i] + 2.0
        assert out["sabine"][i] == pytest.approx(reverb.sabine(v[i], a, m, 343.0))
        assert out["eyring"][i] == pytest.approx(reverb.eyring(v[i], areas[i].sum(), a, m, 343.0))


def test_dry_air_is_reported_not_raised():
    r = box_room()
    dry = Room(r.bands_hz, r.volume, r.surfaces, r.dimensions, Air(20.0, 1.0, 101.325))
    assert "air-range" in {w.code for w in evaluate(dry).warnings}
    assert "air-range" not in {w.code for w in evaluate(r).warnings}


def test_batch_by_material_matches_per_surface():
    from roomcalc.engine.analysis import batch_reverberation, batch_reverberation_by_material
    rng = np.random.default_rng(7)
    table = rng.uniform(0.01, 0.9, (15, 6))
    idx = rng.integers(0, 15, (40, 8))
    areas = rng.uniform(0, 50, (40, 8))
    v = rng.uniform(80, 900, 40)
    m = np.array([0.0001, 0.0003, 0.0006, 0.001, 0.002, 0.006])
    a = batch_reverberation_by_material(v, areas, idx, table, 1.5, m, 343.0)
    b = batch_reverberation(v, areas, table[idx], 1.5, m, 343.0)
    for key in ("sabine", "eyring", "millington", "room_constant"):
        np.testing.assert_allclose(a[key], b[key], rtol=1e-12)
    with pytest.raises(ValueError, match="material"):
        batch_reverberation_by_material(v, areas, idx + 15, table)
