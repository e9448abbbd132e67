"""Plans by each of the five reverberation formulas, cover alphas above 1, and plan totals.

Every room here is a scenario of our own, written in the test. Each plan is made through the
command line (``roomcalc plan FILE --write TREATED``); the treated file is read back and judged
by the engine, and one number per formula is computed by hand from the published formula.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from roomcalc.cli import main
from roomcalc.engine.analysis import evaluate
from roomcalc.engine.planner import (ALPHA_MAX, PLAN_METHODS, Candidate, Goals, apply_to_room,
                                     plan)
from roomcalc.io import catalog as catalog_mod
from roomcalc.io import roomfile
from roomcalc.io.roomfile import read_room

BANDS = (125, 250, 500, 1000, 2000, 4000)
METHODS = ("sabine", "eyring", "millington", "fitzroy", "arau_puchades")
L, W, H = 8.0, 6.0, 3.0
V = L * W * H
#: The window of every plan here [s], by band.
WINDOW = {250: 1.6, 500: 1.3, 1000: 1.4, 2000: 1.4}

# Scenario values of our own (painted concrete floor and ceiling, plastered walls), not from a
# table.
STUDIO = """\
# A test room of our own: hard surfaces, absorption added on the ceiling only.
version = 1
title = "Method test studio"
units = "metric"

[air]
temperature = 20.0
relative_humidity = 50.0

[shape]
length = 8.0
width = 6.0
height = 3.0

[[surfaces]]
name = "Floor"
face = "floor"
alpha = [0.02, 0.02, 0.03, 0.03, 0.04, 0.05]

[[surfaces]]
name = "Ceiling"
face = "ceiling"
alpha = [0.02, 0.02, 0.03, 0.03, 0.04, 0.05]

[[surfaces]]
name = "Front"
face = "front"
alpha = [0.10, 0.08, 0.06, 0.05, 0.05, 0.05]

[[surfaces]]
name = "Back"
face = "back"
alpha = [0.10, 0.08, 0.06, 0.05, 0.05, 0.05]

[[surfaces]]
name = "Left"
face = "left"
alpha = [0.10, 0.08, 0.06, 0.05, 0.05, 0.05]

[[surfaces]]
name = "Right"
face = "right"
alpha = [0.10, 0.08, 0.06, 0.05, 0.05, 0.05]

[target]
method = "METHOD"
rt60_max = { 250 = 1.6, 500 = 1.3, 1000 = 1.4, 2000 = 1.4 }

[[candidates]]
name = "Ceiling panel"
surface = "Ceiling"
alpha = [0.30, 0.85, 1.00, 0.95, 0.90, 0.85]
cost_per_m2 = 40.0
"""

# Source: ISO 9613-1:1993, Table 1 -- air at 20 degC, 50 % RH, 101.325 kPa, octave centres
# 125 Hz to 4 kHz [dB/km] (3 significant figures; as quoted in ../shared/REFERENCES.md).
ISO_9613_20C_50RH_DB_PER_KM = np.array([0.445, 1.32, 2.73, 4.66, 9.86, 29.4])
# Source: ISO 354:2003, 8.1.2 -- m = alpha_air / (10 lg e) [1/m].
M_HAND = ISO_9613_20C_50RH_DB_PER_KM / 1000.0 / (10.0 / math.log(10.0))
# From memory of the usual textbook formula c = 331.3 sqrt(1 + t / 273.15) m/s; not checked
# against a copy (REFERENCES: 343.2 m/s at 20 degC). K = 24 ln 10 / c (Sabine's constant).
C_HAND = 331.3 * math.sqrt(1.0 + 20.0 / 273.15)
K_HAND = 24.0 * math.log(10.0) / C_HAND
# Common practice (the engine's convention, docs/methods.md): the logarithmic formulas take
# each alpha capped at 0.99, since ln(1 - alpha) has no value at 1.
CAP = 0.99
PAIRS = ({"front", "back"}, {"left", "right"}, {"floor", "ceiling"})


def hand_rt60(room, method):
    """RT60 per band by the published formula, from the room's surfaces, by hand."""
    area = np.array([s.area * s.count for s in room.surfaces])
    alpha = np.array([s.alpha for s in room.surfaces])
    s_tot = area.sum()
    air = 4.0 * M_HAND * V
    kv = K_HAND * V
    if method == "sabine":
        # Source: ISO 354:2003, eq. (3) -- T = 55.3 V / (c A) with A = sum S alpha + 4 m V
        # (55.3 = 24 ln 10); W. C. Sabine, Collected Papers on Acoustics (1922).
        return kv / (area @ alpha + air)
    a = np.minimum(alpha, CAP)
    if method == "eyring":
        # Source: C. F. Eyring, J. Acoust. Soc. Am. 1 (1930) 217 -- T = K V / (-S ln(1 - abar)
        # + 4 m V), abar = sum S alpha / S.
        return kv / (-s_tot * np.log(1.0 - (area @ a) / s_tot) + air)
    if method == "millington":
        # Source: G. Millington, J. Acoust. Soc. Am. 4 (1932) 69 -- T = K V /
        # (-sum S_i ln(1 - alpha_i) + 4 m V).
        return kv / (-(area @ np.log(1.0 - a)) + air)
    faces = [s.face for s in room.surfaces]
    t_axis, weights = [], []
    for pair in PAIRS:
        on = np.array([f in pair for f in faces])
        s_x = area[on].sum()
        abar_x = (area[on] @ a[on]) / s_x
        # Each face pair's own Eyring time, air as in ISO 354 (4 m V in the denominator).
        t_axis.append(kv / (-s_tot * np.log(1.0 - abar_x) + air))
        weights.append(s_x / s_tot)
    t_axis, weights = np.array(t_axis), np.array(weights)[:, None]
    if method == "fitzroy":
        # Source: D. Fitzroy, J. Acoust. Soc. Am. 31 (1959) 893 -- T = (K V / S^2) sum_x
        # -S_x / ln(1 - abar_x), i.e. sum_x (S_x / S) T_x; H. Kuttruff, Room Acoustics, 5th ed.
        # (2009), sec. 5.4, discusses it.
        return np.sum(weights * t_axis, axis=0)
    # Source: H. Arau-Puchades, Acustica 65 (1988) 163 -- T = prod_x T_x^(S_x / S).
    return np.prod(t_axis ** weights, axis=0)


def run_cli(capsys, *argv):
    code = main(list(argv))
    out = capsys.readouterr()
    return code, out.out, out.err


def plan_file(tmp_path, capsys, text, name="room"):
    src = tmp_path / f"{name}.toml"
    src.write_text(text, encoding="utf-8")
    treated = tmp_path / f"{name}-treated.toml"
    code, out, err = run_cli(capsys, "plan", str(src), "--format", "json", "--write",
                             str(treated))
    return code, (json.loads(out) if out.strip() else None), err, treated


def window_mask():
    return np.array([b in WINDOW for b in BANDS]), np.array([WINDOW.get(b, np.nan)
                                                             for b in BANDS])


def test_the_file_layer_and_the_planner_offer_the_five_formulas():
    assert PLAN_METHODS == METHODS == roomfile.METHODS
    # The planner's cover alpha range is the catalogue's.
    assert ALPHA_MAX == catalog_mod.ALPHA_MAX == roomfile.CANDIDATE_ALPHA_MAX


@pytest.mark.parametrize("method", METHODS)
def test_plan_meets_its_window_by_the_formula_in_force(tmp_path, capsys, catalog, method):
    code, d, err, treated = plan_file(tmp_path, capsys, STUDIO.replace("METHOD", method))
    assert code == 0, (err, d and d["reasons"])
    assert d["feasible"] and d["method"] == method
    assert d["items"] and d["items"][0]["area_m2"] > 0
    _, room = read_room(treated, catalog)
    res = evaluate(room, method=method)
    t = res.rt60_s[method]
    assessed, limit = window_mask()
    # Every assessed band meets the window by this formula, judged by the engine on the room
    # read back from the written file.
    assert np.all(t[assessed] <= limit[assessed] + 1e-6), (t, limit)
    np.testing.assert_allclose(d["rt60_after_s"], t, rtol=0, atol=1e-6)
    # One independent number: the same times by hand from the published formula, with air
    # absorption from the ISO 9613-1 table (3 significant figures: 1e-3 relative covers it).
    np.testing.assert_allclose(hand_rt60(room, method), d["rt60_after_s"], rtol=1e-3)
    # The plan is not more than it needs: the band that binds sits within 1 % of its limit
    # (continuous cover, rounded to 0.01 m^2; the non-linear formulas aim 0.2 % inside).
    # Regression value, no published source (the planner's own tolerance).
    assert np.max(t[assessed] / limit[assessed]) > 0.99


def test_absorption_on_one_face_pair_is_what_fitzroy_judges(tmp_path, capsys, catalog):
    # The ceiling treatment that meets the window by Eyring leaves the hard walls ringing, and
    # Fitzroy (whose axes are judged apart) says the room still misses: the Fitzroy plan must
    # cover more. Common practice: Fitzroy's time exceeds Eyring's when absorption sits on one
    # pair of faces (Kuttruff, Room Acoustics, 5th ed., sec. 5.4, from memory; not checked
    # against a copy).
    _, by_eyring, _, treated_e = plan_file(tmp_path, capsys, STUDIO.replace("METHOD", "eyring"),
                                           "e")
    _, by_fitzroy, _, _ = plan_file(tmp_path, capsys, STUDIO.replace("METHOD", "fitzroy"), "f")
    _, room_e = read_room(treated_e, catalog)
    t_fitzroy_of_eyring_plan = evaluate(room_e, method="fitzroy").rt60_s["fitzroy"]
    assessed, limit = window_mask()
    assert np.any(t_fitzroy_of_eyring_plan[assessed] > limit[assessed])
    assert by_fitzroy["total_area_m2"] > by_eyring["total_area_m2"]


def test_fitzroy_window_beyond_the_ceiling_says_why(tmp_path, capsys, catalog):
    # Ceiling-only treatment cannot bring Fitzroy's 1 kHz time to 0.9 s in this room: the
    # walls' own axes keep it longer. The plan covers the whole ceiling, exits 1, and the
    # reason gives the engine's Fitzroy time of that plan.
    text = STUDIO.replace("METHOD", "fitzroy").replace("1000 = 1.4", "1000 = 0.9")
    code, d, _, treated = plan_file(tmp_path, capsys, text)
    assert code == 1 and not d["feasible"]
    assert d["items"][0]["area_m2"] == pytest.approx(48.0)
    _, room = read_room(treated, catalog)
    t = evaluate(room, method="fitzroy").rt60_s["fitzroy"]
    assert t[3] > 0.9
    np.testing.assert_allclose(hand_rt60(room, "fitzroy")[3], t[3], rtol=1e-3)
    reason = " ".join(d["reasons"])
    assert "all 48.0 m^2 of 'Ceiling'" in reason
    assert f"1000 Hz at {t[3]:.2f} s against 0.90 s (Fitzroy)" in reason


def test_fitzroy_needs_a_box_with_faces(tmp_path, capsys):
    text = STUDIO.replace("METHOD", "fitzroy").replace('face = "front"\n', "area = 18.0\n")
    src = tmp_path / "room.toml"
    src.write_text(text, encoding="utf-8")
    code, out, err = run_cli(capsys, "plan", str(src))
    assert code == 2 and not out
    assert "target.method: 'fitzroy' cannot be used for this room" in err
    assert "Traceback" not in err


# ------------------------------------------------------------------- cover alpha above 1

HIGH_DENSITY = "mineral-wool-100mm-high-density-100mm-gap"


@pytest.mark.parametrize("method", ["sabine", "eyring"])
def test_cover_material_with_alpha_above_1_is_planned(tmp_path, capsys, catalog, method):
    # The catalogue gives this board 1.10 at 250 Hz (an ISO 354 report value above 1). A plan
    # takes it: Sabine as given, Eyring capped at 0.99 as the engine does.
    assert catalog[HIGH_DENSITY].values[250] == pytest.approx(1.10)
    text = (STUDIO.replace("METHOD", method)
            .replace("rt60_max = { 250 = 1.6, 500 = 1.3, 1000 = 1.4, 2000 = 1.4 }",
                     "rt60_max = { 250 = 1.2 }")
            .replace("alpha = [0.30, 0.85, 1.00, 0.95, 0.90, 0.85]",
                     f'material = "{HIGH_DENSITY}"'))
    code, d, err, treated = plan_file(tmp_path, capsys, text)
    assert code == 0, (err, d and d["reasons"])
    _, room = read_room(treated, catalog)
    t = evaluate(room, method=method).rt60_s[method]
    assert t[1] <= 1.2 + 1e-6
    x = d["items"][0]["area_m2"]
    # Hand: the least covered area x at 250 Hz solves the formula for T = 1.2 s exactly.
    # Untreated absorption (scenario values above): 48 m^2 floor and 48 m^2 ceiling at 0.02,
    # 2 x 18 + 2 x 24 = 84 m^2 of walls at 0.08: A0 = 1.92 + 6.72 = 8.64 m^2; S = 180 m^2.
    kv, air = K_HAND * V, 4.0 * M_HAND[1] * V
    a0, s_tot = 8.64, 180.0
    if method == "sabine":
        # Source: ISO 354:2003, eq. (3) (Sabine): A = K V / T - 4 m V.
        need = kv / 1.2 - air
        hand = (need - a0) / (1.10 - 0.02)
    else:
        # Source: Eyring 1930: A = S (1 - exp(-(K V / T - 4 m V) / S)), alpha capped at 0.99.
        need = s_tot * -math.expm1(-(kv / 1.2 - air) / s_tot)
        hand = (need - a0) / (0.99 - 0.02)
    # Continuous cover rounded to 0.01 m^2, with the planner's rounding margin on top.
    assert hand - 1e-6 <= x <= hand + 0.03


def test_engine_api_takes_alpha_up_to_the_catalogue_maximum():
    room = read_room_from_text(STUDIO.replace("METHOD", "sabine"))
    panel = Candidate("Panel", "cover", cost=1.0, surface=1,
                      alpha=[0.5, ALPHA_MAX, 1.0, 1.0, 1.0, 1.0])
    p = plan(room, [panel], Goals(method="sabine", rt60_max=[np.nan, 1.0] + [np.nan] * 4))
    assert p.feasible
    t = evaluate(apply_to_room(room, [panel], p.amounts), method="sabine").rt60_s["sabine"]
    assert t[1] <= 1.0 + 1e-6
    too_high = Candidate("Panel", "cover", surface=1, alpha=[0.5, 1.3, 1.0, 1.0, 1.0, 1.0])
    with pytest.raises(ValueError, match=r"candidates\[0\]\.alpha\[1\]: 1\.3 at 250 Hz must be "
                                         r"from 0 to 1\.2"):
        plan(room, [too_high], Goals(method="sabine", rt60_max=[1.0] * 6))


def read_room_from_text(text):
    from roomcalc.io.catalog import load_catalog
    from roomcalc.io.roomfile import check_room, parse_spec

    return check_room(parse_spec(text), load_catalog())


# ---------------------------------------------------------------------------------- totals

WITH_BAFFLES = STUDIO.replace("METHOD", "eyring").replace(
    "rt60_max = { 250 = 1.6, 500 = 1.3, 1000 = 1.4, 2000 = 1.4 }",
    "rt60_max = { 500 = 0.5, 1000 = 0.5 }") + """
[[candidates]]
name = "Baffle"
absorption = [0.2, 0.5, 1.0, 1.2, 1.2, 1.1]
max_count = 10
cost_each = 20.0
area_each = 1.5
"""


def test_totals_keep_area_and_units_apart(tmp_path, capsys, catalog):
    # Baffles are cheap per m^2 of absorption here (20 for 1.0 m^2 at 500 Hz against 40 for
    # 0.97), so the plan takes all 10 and covers the rest of the goal with panels.
    code, d, err, _ = plan_file(tmp_path, capsys, WITH_BAFFLES)
    assert code == 0, (err, d and d["reasons"])
    areas = [it["area_m2"] for it in d["items"] if "area_m2" in it]
    counts = [it["count"] for it in d["items"] if "count" in it]
    assert areas and counts == [10]
    assert d["total_area_m2"] == pytest.approx(sum(areas), abs=1e-9)
    assert d["total_units"] == 10
    src = tmp_path / "room.toml"
    code, out, _ = run_cli(capsys, "plan", str(src))
    total = next(ln for ln in out.splitlines() if ln.strip().startswith("total"))
    assert f"{sum(areas):.2f} m^2 and 10 units" in total
    # Only what is there: an area-only plan names no units.
    only = tmp_path / "only.toml"
    only.write_text(STUDIO.replace("METHOD", "eyring"), encoding="utf-8")
    code, out, _ = run_cli(capsys, "plan", str(only))
    total = next(ln for ln in out.splitlines() if ln.strip().startswith("total"))
    assert "m^2" in total and "unit" not in total


def test_plan_totals_from_the_engine_api():
    room = read_room_from_text(WITH_BAFFLES)
    panel = Candidate("Panel", "cover", cost=40.0, surface=1,
                      alpha=[0.30, 0.85, 1.00, 0.95, 0.90, 0.85])
    baffle = Candidate("Baffle", "units", cost=20.0, max_amount=10, area_each=1.5,
                       absorption=[0.2, 0.5, 1.0, 1.2, 1.2, 1.1])
    p = plan(room, [panel, baffle], Goals(method="eyring",
                                          rt60_max=[np.nan, np.nan, 0.5, 0.5, np.nan, np.nan]))
    assert p.feasible
    assert p.total_area == pytest.approx(p.amounts[0]) and p.total_units == p.amounts[1] == 10
    # The least-area objective still counts a unit as its area_each (15 m^2 for 10).
    by_area = plan(room, [panel, baffle], Goals(method="eyring", objective="area",
                                                rt60_max=[np.nan, np.nan, 0.5, 0.5, np.nan,
                                                          np.nan]))
    assert by_area.feasible and by_area.total_area == pytest.approx(by_area.amounts[0])


# ------------------------------------------------------ the linear model against the engine

@pytest.mark.parametrize("method", ["sabine", "eyring", "millington"])
def test_linear_model_is_the_engine_for_the_exact_formulas(method):
    # Consistency with the engine, no published source: for these three formulas the
    # planner's absorption is affine in the amounts and gives the engine's time exactly
    # (alpha above 1 as given by Sabine, capped at 0.99 by the logarithmic ones).
    from roomcalc.engine.planner.build import build_model

    room = read_room_from_text(WITH_BAFFLES)
    cands = [Candidate("Panel", "cover", surface=1, alpha=[0.3, 1.1, 1.0, 0.95, 0.9, 0.85]),
             Candidate("Wall", "cover", surface=4, alpha=[0.2, 0.5, 0.8, 0.9, 0.9, 0.9]),
             Candidate("Baffle", "units", max_amount=10, absorption=[0.2, 0.5, 1.0, 1.2, 1.2,
                                                                     1.1])]
    model = build_model(room, cands, Goals(method=method, rt60_max=[1.0] * 6), None)
    air = 4.0 * model.m * model.volume
    for x in ([0.0, 0.0, 0.0], [48.0, 0.0, 0.0], [12.5, 7.25, 3.0], [30.0, 18.0, 10.0]):
        a = model.a0_rt + np.asarray(x) @ model.g_rt
        t_lin = (model.kv / (-model.s_tot * np.log1p(-a / model.s_tot) + air)
                 if method == "eyring" else model.kv / (a + air))
        t_eng = evaluate(apply_to_room(room, cands, x), method=method).rt60_s[method]
        np.testing.assert_allclose(t_lin, t_eng, rtol=1e-12)


def test_engine_api_names_the_method_a_room_cannot_use():
    room = read_room_from_text(STUDIO.replace("METHOD", "eyring")
                               .replace('face = "front"\n', "area = 18.0\n"))
    panel = Candidate("Panel", "cover", surface=1, alpha=[0.3, 0.8, 1.0, 1.0, 1.0, 1.0])
    with pytest.raises(ValueError, match=r"goals\.method: Arau-Puchades is unavailable for "
                                         r"this room \(surfaces .*Front"):
        plan(room, [panel], Goals(method="arau_puchades", rt60_max=[1.0] * 6))
