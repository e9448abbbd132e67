"""The room-file layer of treatment planning: [target], [[candidates]] and working patterns,
read, checked and resolved to the planner's SI goals and candidates (roomcalc.io.planning), and
a plan built into a treated room that is written, read back and evaluated.

Unit conversions: 1 ft = 0.3048 m exactly (international yard and pound agreement, 1959), so
1 ft^2 = 0.09290304 m^2 and 1 ft^3 = 0.028316846592 m^3 exactly (common practice). A cost per
ft^2 is the same money per 0.09290304 m^2, so the cost per m^2 is cost_per_ft2 / 0.09290304.

The worked classroom below is a scenario of our own. Its inline coefficients (the wall panel's
alpha, the baffle's sabins) are invented for the test, not taken from a product; the catalogue
entries it names carry their own sources in materials/*.toml.
"""

from __future__ import annotations

import math
import tomllib

import numpy as np
import pytest
import tomli_w
from hypothesis import HealthCheck, event, given, settings
from hypothesis import strategies as st

from roomcalc.engine import planner
from roomcalc.engine.analysis import evaluate
from roomcalc.engine.criteria import user_window
from roomcalc.engine.planner import Plan
from roomcalc.io import roomfile
from roomcalc.io.criteria import shipped_criteria
from roomcalc.io.errors import RoomFileError
from roomcalc.io.planning import apply_plan, resolve_candidates, resolve_goals, work_patterns
from roomcalc.io.roomfile import (check_room, parse_spec, read_room, save_spec, spec_to_dict,
                                  spec_to_toml)

FT2 = 0.09290304      # m^2 per ft^2, exact
FT3 = 0.028316846592  # m^3 per ft^3, exact

# A classroom of 32 ft x 25 ft x 10 ft = 8000 ft^3, in imperial units.
CLASSROOM = """\
version = 1
title = "Classroom, planning test"
units = "imperial"

[shape]
length = 32.0
width = 25.0
height = 10.0

[[surfaces]]
name = "Floor"
face = "floor"
material = "linoleum-vinyl-on-concrete"

[[surfaces]]
name = "Ceiling"
face = "ceiling"
material = "plaster-on-masonry"

[[surfaces]]
name = "Windows"
area = 24.0
count = 4
face = "left"
material = "window-glass-ordinary"

[[surfaces]]
name = "Window wall"
face = "left"
material = "plaster-on-masonry"

[[surfaces]]
name = "Corridor wall"
area = 320.0
face = "right"
material = "plaster-on-masonry"

[[surfaces]]
name = "Front wall"
face = "front"
material = "plaster-on-masonry"

[[surfaces]]
name = "Back wall"
face = "back"
material = "plaster-on-masonry"

[[objects]]
name = "Pupils at desks"
count = 24
material = "school-desk-with-pupil"

[[sources]]
name = "Teacher's voice"
sound_power_dba = 70.0
spectrum = "speech-male"
placement = "free"
position = [4.0, 12.5, 5.2]

[[sources]]
name = "Projector fan"
sound_power_dba = 45.0
spectrum = "pink"
position = [16.0, 12.5, 9.5]

[[receivers]]
name = "Teacher"
position = [5.0, 10.0, 5.2]
hours = 6.0
source_hours = { "Projector fan" = 2.0 }

[[receivers]]
name = "Back row"
position = [28.0, 6.0, 3.6]

[target]
method = "eyring"
criterion = "din-18041-2016-a3"
currency = "USD"

[[candidates]]
name = "Ceiling tiles"
surface = "Ceiling"
material = "mineral-tile-13mm-suspended-500mm"
step = 8.0
cost_per_ft2 = 3.5

[[candidates]]
name = "Wall panels"
surface = "Corridor wall"
alpha = [0.15, 0.45, 0.85, 1.0, 0.95, 0.9]
max_area = 120.0
step = 8.0
cost_per_ft2 = 6.0

[[candidates]]
name = "Hanging baffles"
absorption = [2.0, 4.0, 8.0, 10.0, 10.0, 9.0]
max_count = 20
cost_each = 45.0
area_each = 8.0

[[candidates]]
name = "Bookcases"
material = "bookcase-full"
max_count = 4
cost_each = 300.0
"""

# The catalogue entries the classroom names (materials/*.toml; sources given there).
PLASTER = [0.013, 0.015, 0.02, 0.03, 0.04, 0.05]          # plaster-on-masonry
TILE = [0.75, 0.7, 0.65, 0.85, 0.85, 0.9]                 # mineral-tile-13mm-suspended-500mm
BOOKCASE = [0.2, 0.3, 0.4, 0.5, 0.5, 0.5]                 # bookcase-full, m^2 per unit
PANEL = [0.15, 0.45, 0.85, 1.0, 0.95, 0.9]                # inline, invented for the test
BAFFLE_SABINS = [2.0, 4.0, 8.0, 10.0, 10.0, 9.0]          # inline, invented for the test


def _classroom(tmp_path, catalog, text=CLASSROOM):
    path = tmp_path / "classroom.toml"
    path.write_text(text, encoding="utf-8")
    return read_room(path, catalog)


def _plan(amounts):
    """A Plan made by hand (the solver is not needed to test the file layer)."""
    a = np.asarray(amounts, dtype=float)
    six = np.ones(6)
    return Plan(feasible=True, items=(), total_cost=0.0, total_area=0.0, method="eyring",
                objective="cost", rt60_before=six, rt60_after=six, amounts=a)


# ----------------------------------------------------------------------------- the worked example

def test_worked_classroom_goals_are_the_din_18041_a3_window(tmp_path, catalog):
    spec, room = _classroom(tmp_path, catalog)
    assert check_room(spec, catalog).volume == room.volume
    # V = 32 x 25 x 10 ft^3 = 8000 ft^3 = 8000 x 0.028316846592 m^3 = 226.534773 m^3.
    assert room.volume == pytest.approx(8000 * FT3, rel=1e-12)
    assert room.volume == pytest.approx(226.534773, abs=1e-6)
    goals = resolve_goals(spec, room)
    assert (goals.method, goals.objective, goals.source) == ("eyring", "cost",
                                                             "din-18041-2016-a3")
    # Source: DIN 18041:2016-03, T_soll of group A3 (teaching, communication) for 30-5000 m^3,
    # as quoted in a secondary copy: T_soll = 0.32 lg(V / 1 m^3) - 0.17 s.
    #   lg 226.534773 = 2.355135; 0.32 x 2.355135 = 0.753643; T_soll = 0.583643 s.
    # Tolerance factors of T / T_soll (from memory, low confidence, as the criteria file says):
    # 125 Hz 0.65-1.45, 250-2000 Hz 0.8-1.2, 4000 Hz 0.65-1.2. So, by hand:
    #   125 Hz  0.65 x 0.583643 = 0.379368   1.45 x 0.583643 = 0.846283
    #   250-2k  0.80 x 0.583643 = 0.466915   1.20 x 0.583643 = 0.700372
    #   4000    0.65 x 0.583643 = 0.379368   1.20 x 0.583643 = 0.700372
    # Tolerance 2e-6 s: the hand values are rounded to 6 decimals.
    np.testing.assert_allclose(goals.rt60_min, [0.379368, 0.466915, 0.466915, 0.466915,
                                                0.466915, 0.379368], atol=2e-6)
    np.testing.assert_allclose(goals.rt60_max, [0.846283, 0.700372, 0.700372, 0.700372,
                                                0.700372, 0.700372], atol=2e-6)
    assert goals.levels == ()


def test_worked_classroom_candidates_in_si(tmp_path, catalog):
    spec, room = _classroom(tmp_path, catalog)
    tiles, panels, baffles, books = resolve_candidates(spec, room, catalog)
    names = [s.name for s in room.surfaces]

    assert (tiles.kind, tiles.surface, names[tiles.surface]) == ("cover", 1, "Ceiling")
    np.testing.assert_array_equal(tiles.alpha, TILE)
    assert tiles.material == "mineral-tile-13mm-suspended-500mm"
    # No max_area: the whole ceiling, 32 x 25 = 800 ft^2 = 74.322432 m^2.
    assert tiles.max_amount == pytest.approx(74.322432, rel=1e-12)
    assert tiles.step == pytest.approx(0.74322432, rel=1e-12)          # 2 ft x 4 ft = 8 ft^2
    # 3.50 per ft^2 = 3.5 / 0.09290304 = 37.673686 per m^2.
    assert tiles.cost == pytest.approx(37.673686, abs=1e-6)

    assert (panels.kind, names[panels.surface]) == ("cover", "Corridor wall")
    np.testing.assert_array_equal(panels.alpha, PANEL)
    assert panels.material is None
    assert panels.max_amount == pytest.approx(11.1483648, rel=1e-12)    # 120 ft^2
    assert panels.cost == pytest.approx(64.583463, abs=1e-6)            # 6 / 0.09290304

    assert (baffles.kind, baffles.surface, baffles.integer) == ("units", None, True)
    # Sabins (ft^2) per unit to m^2: 2 ft^2 = 0.18580608 m^2, ..., 9 ft^2 = 0.83612736 m^2.
    np.testing.assert_allclose(baffles.absorption, [0.18580608, 0.37161216, 0.74322432,
                                                    0.9290304, 0.9290304, 0.83612736],
                               rtol=1e-12)
    assert (baffles.max_amount, baffles.cost) == (20.0, 45.0)
    assert baffles.area_each == pytest.approx(0.74322432, rel=1e-12)    # 8 ft^2

    # A catalogue object is in m^2 per unit whatever the file's units.
    np.testing.assert_array_equal(books.absorption, BOOKCASE)
    assert (books.max_amount, books.cost, books.integer, books.material) == \
        (4.0, 300.0, True, "bookcase-full")


def test_worked_classroom_work_patterns(tmp_path, catalog):
    spec, _ = _classroom(tmp_path, catalog)
    # The teacher is there 6 h a day; the projector fan runs 2 of them, the voice (not in
    # source_hours) all 6. The back row has no working pattern.
    assert work_patterns(spec) == {"Teacher": (6.0, {"Teacher's voice": 6.0,
                                                     "Projector fan": 2.0})}


def test_worked_classroom_round_trip_is_byte_stable(catalog):
    spec = parse_spec(CLASSROOM, "c.toml")
    text = spec_to_toml(spec)
    again = parse_spec(text, "c.toml")
    assert again == spec
    assert spec_to_toml(again) == text
    assert "cost_per_ft2 = 3.5" in text and "cost_per_m2" not in text
    assert 'source_hours = { "Projector fan" = 2.0 }' in text
    assert 'criterion = "din-18041-2016-a3"' in text
    assert check_room(again, catalog).volume == pytest.approx(8000 * FT3, rel=1e-12)


# ----------------------------------------------------------------------------- the treated room

def test_apply_plan_covers_all_of_a_rest_of_face_surface_and_part_of_a_sized_one(tmp_path,
                                                                                   catalog):
    spec, room = _classroom(tmp_path, catalog)
    cands = resolve_candidates(spec, room, catalog)
    # The whole ceiling in tiles (800 ft^2), 10 wall panels (80 ft^2), 6 baffles, no bookcase.
    plan = _plan([800 * FT2, 80 * FT2, 6, 0])
    treated = apply_plan(spec, plan, cands)
    assert [s.name for s in spec.surfaces][1] == "Ceiling"                 # spec is unchanged
    assert spec.candidates and len(spec.objects) == 1

    by_name = {s.name: s for s in treated.surfaces}
    assert "Ceiling" not in by_name                                       # covered whole
    tiles = by_name["Ceiling - Ceiling tiles"]
    assert (tiles.area, tiles.face, tiles.count, tiles.material, tiles.alpha) == \
        (800.0, "ceiling", 1, "mineral-tile-13mm-suspended-500mm", None)
    assert by_name["Corridor wall"].area == 240.0                          # 320 - 80 ft^2
    panel = by_name["Corridor wall - Wall panels"]
    assert (panel.area, panel.face, panel.material, panel.alpha) == (80.0, "right", None, PANEL)
    assert [s.name for s in treated.surfaces] == [
        "Floor", "Ceiling - Ceiling tiles", "Windows", "Window wall", "Corridor wall",
        "Corridor wall - Wall panels", "Front wall", "Back wall"]
    baffle = treated.objects[-1]
    assert (baffle.name, baffle.count, baffle.absorption, baffle.material) == \
        ("Hanging baffles", 6, BAFFLE_SABINS, None)
    assert isinstance(baffle.count, int) and len(treated.objects) == 2     # no bookcase entry
    # The candidates stay, those the plan used marked applied (not planned twice); the
    # ceiling's candidate keeps naming the ceiling the plan covered whole.
    assert [c.name for c in treated.candidates] == [c.name for c in spec.candidates]
    assert [bool(c.applied) for c in treated.candidates] == [True, True, True, False]
    assert not any(c.applied for c in spec.candidates) and treated.target == spec.target
    assert work_patterns(treated) == work_patterns(spec)

    # Written, read back, evaluated.
    path = tmp_path / "treated.toml"
    save_spec(treated, path)
    again, room_after = read_room(path, catalog)
    assert again == treated
    before, after = evaluate(room), evaluate(room_after)
    assert room_after.surface_area == pytest.approx(room.surface_area, rel=1e-12)
    # Independent arithmetic: the tiles replace plaster over 800 ft^2, the panels over 80 ft^2,
    # and six baffles add 6 x their sabins, all in m^2.
    d_surf = (np.subtract(TILE, PLASTER) * 800 + np.subtract(PANEL, PLASTER) * 80) * FT2
    np.testing.assert_allclose(after.surface_absorption_m2 - before.surface_absorption_m2,
                               d_surf, rtol=1e-9)
    np.testing.assert_allclose(after.object_absorption_m2 - before.object_absorption_m2,
                               6 * np.array(BAFFLE_SABINS) * FT2, rtol=1e-9)
    assert np.all(after.rt60_s["eyring"] < before.rt60_s["eyring"])


def test_apply_plan_part_of_a_rest_of_face_surface_shrinks_by_itself(tmp_path, catalog):
    spec, room = _classroom(tmp_path, catalog)
    cands = resolve_candidates(spec, room, catalog)
    treated = apply_plan(spec, _plan([400 * FT2, 0, 0, 2]), cands)
    ceiling = next(s for s in treated.surfaces if s.name == "Ceiling")
    assert ceiling.area is None                     # still the rest of its face
    books = treated.objects[-1]
    assert (books.name, books.count, books.material) == ("Bookcases", 2, "bookcase-full")
    room_after = check_room(treated, catalog)
    areas = {s.name: s.total_area for s in room_after.surfaces}
    # The ceiling face is 800 ft^2; the tiles take 400 ft^2, the rest keeps 400 ft^2.
    assert areas["Ceiling"] == pytest.approx(400 * FT2, rel=1e-12)
    assert areas["Ceiling - Ceiling tiles"] == pytest.approx(400 * FT2, rel=1e-12)
    a = evaluate(room_after).object_absorption_m2 - evaluate(room).object_absorption_m2
    np.testing.assert_allclose(a, 2 * np.array(BOOKCASE), rtol=1e-12)


def test_apply_plan_surface_with_count_metric(catalog):
    # Metric, a surface counted 4 times (4 windows of 2.4 m^2): covering 3.6 m^2 in total puts
    # 0.9 m^2 on each copy and leaves 1.5 m^2 of each.
    text = ROOM + """
[[candidates]]
name = "Window film"
surface = "Windows"
alpha = [0.3, 0.3, 0.3, 0.3, 0.3, 0.3]
cost_per_m2 = 10.0
"""
    spec = parse_spec(text)
    room = check_room(spec, catalog)
    (film,) = resolve_candidates(spec, room, catalog)
    assert film.max_amount == pytest.approx(9.6)                      # 4 x 2.4 m^2
    treated = apply_plan(spec, _plan([3.6]), [film])
    w = {s.name: s for s in treated.surfaces}
    assert (w["Windows"].area, w["Windows"].count) == (1.5, 4)
    assert (w["Windows - Window film"].area, w["Windows - Window film"].count) == (0.9, 4)
    after = check_room(treated, catalog)
    assert after.surface_area == pytest.approx(room.surface_area, rel=1e-12)


def test_apply_plan_with_some_of_the_candidates(tmp_path, catalog):
    # A plan made with the candidates the user ticked: only the wall panels and the bookcases.
    spec, room = _classroom(tmp_path, catalog)
    _, panels, _, books = resolve_candidates(spec, room, catalog)
    treated = apply_plan(spec, _plan([40 * FT2, 3]), [panels, books])
    assert {s.name: s.area for s in treated.surfaces}["Corridor wall - Wall panels"] == 40.0
    assert {s.name: s.area for s in treated.surfaces}["Corridor wall"] == 280.0
    assert [(o.name, o.count) for o in treated.objects] == [("Pupils at desks", 24),
                                                            ("Bookcases", 3)]
    other = resolve_candidates(parse_spec(PLAN_ROOM), check_room(parse_spec(PLAN_ROOM),
                                                                 catalog), catalog)
    with pytest.raises(ValueError, match="'Hanging baffle' \\(units\\) is not a candidate"):
        apply_plan(spec, _plan([1]), other[1:])


@pytest.mark.parametrize("amounts, message", [
    ([1.0], "1 amounts for 4 candidates"),
    ([-1.0, 0, 0, 0], "-1 for 'Ceiling tiles' is below 0"),
    ([0, 12.0, 0, 0], "for 'Wall panels' is above its limit 11.1484"),
    ([0, 0, 2.5, 0], "2.5 units of 'Hanging baffles', which is bought in whole units"),
    ([0, 0, 21, 0], "21 for 'Hanging baffles' is above its limit 20"),
    ([0, 0, math.nan, 0], "every amount must be a finite number"),
])
def test_apply_plan_refuses_bad_amounts(tmp_path, catalog, amounts, message):
    spec, room = _classroom(tmp_path, catalog)
    cands = resolve_candidates(spec, room, catalog)
    with pytest.raises(ValueError, match="plan.amounts: ") as info:
        apply_plan(spec, _plan(amounts), cands)
    assert message in str(info.value)


def test_apply_plan_refuses_covering_more_than_the_surface(catalog):
    # max_area above the surface's area is allowed (the surface is a limit too), but a plan
    # that covers more than the surface has is refused.
    text = ROOM + """
[[candidates]]
name = "Film"
surface = "Windows"
alpha = [0.3, 0.3, 0.3, 0.3, 0.3, 0.3]
max_area = 50.0
cost_per_m2 = 10.0
"""
    spec = parse_spec(text)
    cands = resolve_candidates(spec, check_room(spec, catalog), catalog)
    with pytest.raises(ValueError, match="covers 10 m\\^2 of surface 'Windows', which has 9.6"):
        apply_plan(spec, _plan([10.0]), cands)


def test_fractional_units_are_written_as_they_are(catalog):
    text = ROOM + """
[[candidates]]
name = "Curtain, per m of track"
absorption = [0.2, 0.5, 0.9, 1.0, 1.0, 1.0]
whole = false
max_count = 12.5
cost_each = 20.0
"""
    spec = parse_spec(text)
    (c,) = resolve_candidates(spec, check_room(spec, catalog), catalog)
    assert (c.integer, c.max_amount) == (False, 12.5)
    treated = apply_plan(spec, _plan([7.25]), [c])
    assert treated.objects[-1].count == 7.25
    assert spec_to_toml(parse_spec(spec_to_toml(spec))) == spec_to_toml(spec)
    assert "whole = false" in spec_to_toml(spec)


# ----------------------------------------------------------------------------- goals

# A small metric room with a receiver, for the goal forms. 5 x 4 x 3 m = 60 m^3.
ROOM = """\
version = 1

[shape]
length = 5.0
width = 4.0
height = 3.0

[[surfaces]]
name = "Floor"
face = "floor"
material = "concrete-floor-painted"

[[surfaces]]
name = "Windows"
area = 2.4
count = 4
alpha = [0.35, 0.25, 0.18, 0.12, 0.07, 0.04]

[[surfaces]]
name = "Walls and ceiling"
area = 64.4
material = "plaster-on-masonry"

[[sources]]
name = "Saw"
sound_power = [95.0, 97.0, 99.0, 100.0, 98.0, 95.0]
position = [1.0, 1.0, 1.0]

[[receivers]]
name = "Bench"
position = [4.0, 3.0, 1.5]
"""


def _goals(target, catalog, criteria=None):
    spec = parse_spec(ROOM + "\n[target]\n" + target)
    room = check_room(spec, catalog, criteria=criteria)
    return resolve_goals(spec, room, criteria)


def test_own_limits_number_list_and_table(catalog):
    g = _goals('method = "sabine"\nobjective = "area"\nrt60_max = 0.8\n'
               'rt60_min = { 500 = 0.3, 1000 = 0.3 }\n', catalog)
    assert (g.method, g.objective, g.source) == ("sabine", "area", "")
    np.testing.assert_array_equal(g.rt60_max, [0.8] * 6)
    np.testing.assert_array_equal(g.rt60_min, [np.nan, np.nan, 0.3, 0.3, np.nan, np.nan])
    g = _goals("rt60_max = [1.0, 0.7, 0.6, 0.6, 0.6, 0.6]\n", catalog)
    assert (g.method, g.objective) == ("eyring", "cost")                  # the defaults
    np.testing.assert_array_equal(g.rt60_max, [1.0, 0.7, 0.6, 0.6, 0.6, 0.6])
    assert g.rt60_min is None


def test_goals_plan_with_the_rooms_method(catalog):
    # The top-level method is the formula in force; [target] need not repeat it.
    spec = parse_spec(ROOM.replace("version = 1\n", 'version = 1\nmethod = "sabine"\n', 1)
                      + "\n[target]\nrt60_max = 0.8\n")
    assert spec.method == "sabine"
    assert resolve_goals(spec, check_room(spec, catalog)).method == "sabine"


def test_level_goals(catalog):
    g = _goals('max_level_dba = { Bench = 80.0 }\n'
               'max_level_db = { Bench = { 125 = 85.0, 4000 = 70 } }\n', catalog)
    assert g.rt60_max is None and g.rt60_min is None
    (lv,) = g.levels
    assert (lv.receiver, lv.max_dba) == ("Bench", 80.0)
    np.testing.assert_array_equal(lv.max_db, [85.0, np.nan, np.nan, np.nan, np.nan, 70.0])
    (lv,) = _goals("max_level_db = { Bench = 75 }\n", catalog).levels
    assert lv.max_dba is None and lv.max_db.tolist() == [75.0] * 6


def test_criterion_assessed_on_the_mean_is_planned_band_by_band(catalog):
    # BB93 (2015) primary classrooms, new build: T_mf (mean of 500, 1000, 2000 Hz) <= 0.6 s
    # (from memory, as the criteria file marks it). Planned as <= 0.6 s in each of those bands.
    g = _goals('criterion = "bb93-primary-new"\n', catalog)
    np.testing.assert_array_equal(g.rt60_max, [np.nan, np.nan, 0.6, 0.6, 0.6, np.nan])
    assert g.rt60_min is None and g.source == "bb93-primary-new"


def test_criterion_by_volume_steps(catalog):
    # Source: ANSI/ASA S12.60-2010 Part 1 (as quoted in a secondary copy): RT60 <= 0.6 s for a
    # core learning space up to 283 m^3 (10,000 ft^3); assessed at 500, 1000, 2000 Hz (memory).
    g = _goals('criterion = "ansi-s12.60-2010-core"\n', catalog)
    np.testing.assert_array_equal(g.rt60_max, [np.nan, np.nan, 0.6, 0.6, 0.6, np.nan])
    assert g.rt60_min is None


def test_criterion_that_does_not_apply_to_the_volume(catalog):
    # DIN 18041 A3 covers 30-5000 m^3; a 3 x 3 x 2.5 m room is 22.5 m^3.
    text = ROOM.replace("length = 5.0\nwidth = 4.0", "length = 3.0\nwidth = 3.0").replace(
        "height = 3.0", "height = 2.5").replace("[4.0, 3.0, 1.5]", "[2.0, 2.0, 1.5]")
    spec = parse_spec(text.replace("64.4", "20.0") + '\n[target]\ncriterion = '
                      '"din-18041-2016-a3"\n', "small.toml")
    room = check_room(spec, catalog)            # the file itself is fine
    with pytest.raises(RoomFileError) as info:
        resolve_goals(spec, room, filename="small.toml")
    assert str(info.value) == (
        "small.toml: target.criterion: 'din-18041-2016-a3' does not apply to this room: "
        "V = 22.5 m^3 is below 30 m^3, the smallest volume DIN 18041:2016 group A3 (teaching, "
        "communication) covers. DIN 18041:2016 gives T_soll for group A3 only from 30 to "
        "5000 m^3.")


def test_criterion_of_a_band_the_room_lacks(catalog):
    own = user_window([63, 125], rt60_max=[1.2, 1.0], id="low-bands")
    with pytest.raises(RoomFileError) as info:
        _goals('criterion = "low-bands"\n', catalog, criteria={"low-bands": own})
    assert str(info.value) == ("<room>: target.criterion: 'low-bands' assesses 63 Hz, a band "
                               "this room does not compute; add 63 to bands_hz")


def test_unknown_criterion_in_check_room_lists_the_known(catalog):
    spec = parse_spec(ROOM + '\n[target]\ncriterion = "din-18041-2016-a9"\n')
    with pytest.raises(RoomFileError) as info:
        check_room(spec, catalog)
    (p,) = info.value.problems
    known = sorted(shipped_criteria())
    assert p.where == "target.criterion"
    assert p.message.startswith("unknown criterion 'din-18041-2016-a9'; did you mean "
                                "'din-18041-2016-a")
    assert all(k in p.message for k in known) and len(known) >= 10


def test_resolve_goals_without_a_target(catalog):
    spec = parse_spec(ROOM)
    with pytest.raises(RoomFileError, match=r"<room>: target: is required to plan"):
        resolve_goals(spec, check_room(spec, catalog))


def test_the_file_layer_repeats_the_planner_constants():
    # A room file names any formula the planner can plan with.
    assert set(planner.PLAN_METHODS) <= set(roomfile.METHODS)
    assert roomfile.OBJECTIVES == planner.OBJECTIVES
    assert set(roomfile.CANDIDATE_KEYS) == set(roomfile.COVER_KEYS) | set(roomfile.UNIT_KEYS) \
        | {"name", "material", "applied"}


def test_a_file_without_planning_keys_has_none(catalog):
    spec = parse_spec(ROOM)
    assert spec.target is None and spec.candidates == []
    assert "target" not in spec_to_dict(spec) and "candidates" not in spec_to_dict(spec)
    assert work_patterns(spec) == {}
    assert resolve_candidates(spec, check_room(spec, catalog), catalog) == []


# ----------------------------------------------------------------------------- fuzzing

FUZZ = settings(max_examples=150, deadline=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
junk = st.one_of(st.floats(allow_nan=True, allow_infinity=True), st.integers(-5, 50),
                 st.booleans(), st.text(max_size=6),
                 st.sampled_from(["Bench", "Saw", "Floor", "Windows", "eyring", "area",
                                  "din-18041-2016-a3", "bb93-primary-new", "person-seated",
                                  "plaster-on-masonry", "125", "500"]),
                 st.lists(st.one_of(st.floats(-1, 3), st.integers(-1, 3)), max_size=7),
                 st.dictionaries(st.sampled_from(["Bench", "Saw", "500", "x", "125"]),
                                 st.one_of(st.floats(-1, 100), st.lists(st.floats(0, 100),
                                                                        max_size=6)),
                                 max_size=2))
PLAN_KEYS = roomfile.TARGET_KEYS + roomfile.CANDIDATE_KEYS + ("hours", "source_hours")


@st.composite
def planning_docs(draw):
    """ROOM with a valid [target], candidates and working pattern, then up to 3 corruptions."""
    doc = tomllib.loads(ROOM)
    six = st.lists(st.floats(0.0, 1.0), min_size=6, max_size=6)
    doc["target"] = {"method": draw(st.sampled_from(["sabine", "eyring"])),
                     "objective": draw(st.sampled_from(["cost", "area"]))}
    if draw(st.booleans()):
        doc["target"]["criterion"] = draw(st.sampled_from(["din-18041-2016-a3",
                                                           "bb93-primary-new"]))
    else:
        doc["target"]["rt60_max"] = draw(st.one_of(st.floats(0.3, 3.0), st.lists(
            st.floats(0.3, 3.0), min_size=6, max_size=6)))
    if draw(st.booleans()):
        doc["target"]["max_level_dba"] = {"Bench": draw(st.floats(40.0, 120.0))}
    doc["receivers"][0]["hours"] = 8.0
    doc["receivers"][0]["source_hours"] = {"Saw": draw(st.floats(0.0, 8.0))}
    cands = []
    for i in range(draw(st.integers(0, 3))):
        c = {"name": f"C{i}", "cost_per_m2": 1.0, "cost_each": 1.0, "area_each": 1.0}
        if draw(st.booleans()):
            c["surface"] = draw(st.sampled_from(["Floor", "Windows", "Walls and ceiling"]))
            c["alpha"] = draw(six)
            del c["cost_each"], c["area_each"]
        else:
            c["absorption"] = draw(six)
            c["max_count"] = draw(st.integers(0, 30))
            del c["cost_per_m2"]
        cands.append(c)
    if cands:
        doc["candidates"] = cands
    tables = [doc["target"], doc["receivers"][0]] + cands
    for _ in range(draw(st.integers(0, 3))):
        t = draw(st.sampled_from(tables))
        action = draw(st.sampled_from(["junk", "drop", "add"]))
        if action == "add" or not t:
            t[draw(st.sampled_from(PLAN_KEYS))] = draw(junk)
        elif action == "junk":
            t[draw(st.sampled_from(sorted(t)))] = draw(junk)
        else:
            del t[draw(st.sampled_from(sorted(t)))]
    return doc


@FUZZ
@given(doc=planning_docs())
def test_planning_tables_raise_only_room_file_errors(doc, catalog):
    text = tomli_w.dumps(doc)
    try:
        spec = parse_spec(text, "p.toml")
        room = check_room(spec, catalog, "p.toml")
    except RoomFileError as exc:
        assert exc.problems and all(str(p).startswith("p.toml: ") for p in exc.problems)
        event("refused")
        return
    event("accepted")
    assert parse_spec(spec_to_toml(spec), "p.toml") == spec
    try:
        # A draft may lack a goal or a cost; planning says so. Both criteria cover 60 m^3.
        goals = resolve_goals(spec, room, filename="p.toml")
        cands = resolve_candidates(spec, room, catalog, filename="p.toml")
    except RoomFileError as exc:
        assert exc.problems and all(str(p).startswith("p.toml: ") for p in exc.problems)
        assert {p.where.split(".")[0].split("[")[0] for p in exc.problems} <= {"target",
                                                                                "candidates"}
        event("accepted, not ready to plan")
        return
    event("ready to plan")
    assert goals.method in planner.PLAN_METHODS and goals.objective in planner.OBJECTIVES
    assert len(cands) == len(spec.candidates)
    # A quarter of each candidate's limit (or 3 units) is a plan that must build a valid room,
    # even with three candidates on one surface.
    amounts = [min(c.max_amount, room.surfaces[c.surface].total_area) / 4 if c.kind == "cover"
               else (float(math.floor(min(3.0, c.max_amount))) if c.integer
                     else min(3.0, c.max_amount)) for c in cands]
    treated = apply_plan(spec, _plan(amounts), cands)
    check_room(treated, catalog)


def test_convert_candidate_units_metric_to_imperial_and_back(catalog):
    from roomcalc.io.planning import convert_candidate_units

    spec = parse_spec(PLAN_ROOM)
    convert_candidate_units(spec, "imperial")
    spec.units = "imperial"          # the caller converts the rest of the room
    panel, baffle = spec.candidates
    # 40 m^2 = 40 / 0.09290304 ft^2 = 430.5564 ft^2; 0.72 m^2 = 7.7500 ft^2.
    assert (panel.max_area, panel.step) == (430.5564, 7.75)
    # 65 per m^2 is 65 x 0.09290304 = 6.0387 per ft^2, under the imperial key.
    assert (panel.cost_per_m2, panel.cost_per_ft2) == (None, 6.0387)
    # 0.30 m^2 = 3.2292 sabins (ft^2).
    assert baffle.absorption[0] == 3.2292 and baffle.cost_each == 55.0
    convert_candidate_units(spec, "metric")
    spec.units = "metric"
    assert spec.candidates[0].max_area == pytest.approx(40.0, abs=1e-4)
    assert spec.candidates[0].cost_per_m2 == pytest.approx(65.0, abs=1e-3)


# The example of docs/room-files.md, in a room with the surface and source it names.
PLAN_ROOM = """\
version = 1

[shape]
length = 10.0
width = 8.0
height = 4.0

[[surfaces]]
name = "Floor"
face = "floor"
material = "concrete-floor-painted"

[[surfaces]]
name = "Walls"
area = 144.0
material = "plaster-on-masonry"

[[surfaces]]
name = "Ceiling"
face = "ceiling"
material = "plaster-on-masonry"

[[sources]]
name = "Planer"
sound_power_dba = 100.0
spectrum = "pink"
position = [2.0, 2.0, 1.0]
"""


def _docs_example() -> str:
    from conftest import ROOT

    text = (ROOT / "docs" / "room-files.md").read_text(encoding="utf-8")
    start = text.index("```toml\n[[receivers]]") + len("```toml\n")
    return text[start:text.index("```", start)]


PLAN_ROOM += _docs_example()


def test_the_docs_example_reads_and_resolves(catalog):
    spec = parse_spec(PLAN_ROOM, "docs.toml")
    room = check_room(spec, catalog)
    goals = resolve_goals(spec, room)
    np.testing.assert_array_equal(goals.rt60_max, [1.0, 0.7, 0.6, 0.6, 0.6, 0.6])
    assert goals.levels[0].receiver == "Operator" and goals.levels[0].max_dba == 80.0
    assert spec.target.currency == "EUR"
    panel, baffle = resolve_candidates(spec, room, catalog)
    assert (panel.surface, panel.max_amount, panel.step, panel.cost) == (1, 40.0, 0.72, 65.0)
    assert (baffle.max_amount, baffle.cost, baffle.area_each) == (40.0, 55.0, 0.72)
    assert work_patterns(spec) == {"Operator": (8.0, {"Planer": 2.5})}
    # 20 panels of 0.72 m^2 (14.4 m^2) and 10 baffles: the walls keep 144 - 14.4 = 129.6 m^2.
    treated = apply_plan(spec, _plan([14.4, 10]), resolve_candidates(spec, room, catalog))
    walls = {s.name: s for s in treated.surfaces}
    assert walls["Walls"].area == 129.6 and walls["Walls - Wall panel, 50 mm wool"].area == 14.4
    assert treated.objects[-1].count == 10
    evaluate(check_room(treated, catalog))


def test_the_written_treated_room_matches_the_engines_treated_room(tmp_path, catalog):
    # Two implementations of one rule: apply_plan writes the treated room as a file (areas in
    # ft^2, rest-of-face surfaces left to resolve), roomcalc.engine.planner.apply_to_room
    # builds it in SI. Read back and evaluated, they must give the same room acoustics.
    spec, room = _classroom(tmp_path, catalog)
    cands = resolve_candidates(spec, room, catalog)
    amounts = [800 * FT2, 80 * FT2, 6, 2]
    path = tmp_path / "treated.toml"
    save_spec(apply_plan(spec, _plan(amounts), cands), path)
    _, written = read_room(path, catalog)
    a, b = evaluate(written), evaluate(planner.apply_to_room(room, cands, amounts))
    assert a.surface_area_m2 == pytest.approx(b.surface_area_m2, rel=1e-12)
    np.testing.assert_allclose(a.absorption_area_m2, b.absorption_area_m2, rtol=1e-9)
    for method in ("sabine", "eyring"):
        np.testing.assert_allclose(a.rt60_s[method], b.rt60_s[method], rtol=1e-9)


def test_cover_material_with_alpha_above_1_can_be_planned(catalog):
    # thick-porous-panel-200mm gives alpha 1.05 at 250 Hz (a test-report value above 1, allowed
    # on a surface); a cover candidate takes it too (the catalogue's range, up to 1.2), as
    # given (Sabine) or capped at 0.99 (the logarithmic formulas, as the engine does). This
    # test used to pin the old refusal of such a material.
    text = ROOM + """
[target]
method = "sabine"
rt60_max = 0.5

[[candidates]]
name = "Thick panel"
surface = "Walls and ceiling"
material = "thick-porous-panel-200mm"
cost_per_m2 = 80.0
"""
    spec = parse_spec(text)
    room = check_room(spec, catalog)
    assert catalog["thick-porous-panel-200mm"].values[250] == 1.05
    (cand,) = resolve_candidates(spec, room, catalog)
    assert cand.alpha[1] == 1.05
    p = planner.plan(room, [cand], resolve_goals(spec, room))
    assert p.feasible and p.total_area > 0
    t = evaluate(planner.apply_to_room(room, [cand], p.amounts), method="sabine").rt60_s["sabine"]
    assert np.all(t <= 0.5 + 1e-6)
