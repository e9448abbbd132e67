"""Treatments as people buy them: a plan applied keeps its candidates (marked applied, never
planned twice), one treatment over several surfaces or every wall, panels of a stated size
shown as a count, and new treatment rows that are valid as they stand.

The room below is a scenario of our own (a 6 x 5 x 3 m rehearsal room); the catalogue entries
it names carry their own sources in materials/*.toml. Sabine's absorption area A = sum S alpha
(Sabine 1922; ISO 354:2003, 3.4) is the hand computation the spreading is checked against.
"""

from __future__ import annotations

import json
from types import SimpleNamespace

import numpy as np
import pytest

from roomcalc.engine.analysis import evaluate
from roomcalc.engine.planner import Candidate, Plan, PlanItem
from roomcalc.io.errors import RoomFileError
from roomcalc.io.planning import apply_plan, convert_candidate_units, resolve_candidates
from roomcalc.io.roomfile import (check_room, parse_spec, read_room, spec_to_toml,
                                  spec_to_toml_keeping)
from roomcalc.io.units import IMPERIAL, METRIC
from roomcalc.present import sections
from roomcalc.study import Study
from roomcalc.study.edits import (DEFAULT_COVER_MATERIAL, DEFAULT_UNITS_MATERIAL,
                                  new_candidate, set_item_fields)

ROOM = """\
version = 1
title = "Rehearsal room"

[shape]
length = 6.0
width = 5.0
height = 3.0

[[surfaces]]
name = "Floor"
face = "floor"
material = "concrete-floor-painted"

[[surfaces]]
name = "Ceiling"
face = "ceiling"
material = "plaster-on-masonry"

[[surfaces]]
name = "Front"
face = "front"
material = "plaster-on-masonry"

[[surfaces]]
name = "Back"
face = "back"
material = "plaster-on-masonry"

[[surfaces]]
name = "Left"
face = "left"
material = "plaster-on-masonry"

[[surfaces]]
name = "Right"
face = "right"
material = "plaster-on-masonry"

[target]
method = "sabine"
rt60_max = 0.6
currency = "EUR"

# The panels the shop sells.
[[candidates]]
name = "Wall panel"
walls = true
material = "glass-fibre-board-50mm-fabric"
panel = [1.2, 0.6]
cost_per_m2 = 40.0

[[candidates]]
name = "Bass trap"
material = "corner-trap-porous-floor-to-ceiling"
max_count = 4
cost_each = 200.0
"""
# Wall areas (hand): front and back 5 x 3 = 15 m^2, left and right 6 x 3 = 18 m^2; 66 m^2.
WALLS = {"Front": 15.0, "Back": 15.0, "Left": 18.0, "Right": 18.0}


def _write(tmp_path, text=ROOM, name="room.toml"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def _hand_plan(amounts):
    a = np.asarray(amounts, dtype=float)
    six = np.ones(6)
    return Plan(feasible=True, items=(), total_cost=0.0, total_area=0.0, method="sabine",
                objective="cost", rt60_before=six, rt60_after=six, amounts=a)


# ----------------------------------------------------------------------------- applied

def test_apply_then_save_keeps_the_candidates_marked_applied(tmp_path, catalog):
    study = Study.from_file(_write(tmp_path), catalog)
    run = study.plan(enabled={"Wall panel"})
    assert run.plan.items and run.plan.items[0].candidate == "Wall panel"
    out = tmp_path / "treated.toml"
    study.write_treated(run, out)
    text = out.read_text(encoding="utf-8")
    assert "# The panels the shop sells." in text             # the comment-keeping writer
    again, _ = read_room(out, catalog)
    assert [(c.name, bool(c.applied)) for c in again.candidates] == \
        [("Wall panel", True), ("Bass trap", False)]
    assert text.count("applied = true") == 1
    # The plain writer and the reader agree on the key too.
    assert parse_spec(spec_to_toml(again)) == again


def test_applying_twice_does_not_double_the_treatment(tmp_path, catalog):
    study = Study.from_file(_write(tmp_path), catalog)
    first = study.plan(enabled={"Wall panel"})
    treated = study.treated_spec(first)
    parts = {s.name: s.area for s in treated.surfaces if s.name.endswith(" - Wall panel")}
    assert set(parts) == {f"{w} - Wall panel" for w in WALLS}

    again = Study(treated, catalog, filename="treated.toml")
    second = again.plan()
    # The applied panel is left out of the next plan, which says so; only the trap is planned.
    assert [c.name for c in second.candidates] == ["Bass trap"]
    assert second.applied == ("Wall panel",)
    assert "Left out, already applied to the room: 'Wall panel'" in \
        sections.plan_text(second, width=0)
    assert sections.plan_dict(second)["applied_left_out"] == ["Wall panel"]
    twice = again.treated_spec(second)
    assert {s.name: s.area for s in twice.surfaces if "Wall panel" in s.name} == parts
    a_once = evaluate(check_room(treated, catalog)).surface_absorption_m2
    a_twice = evaluate(check_room(twice, catalog)).surface_absorption_m2
    np.testing.assert_allclose(a_twice, a_once, rtol=1e-12)


def test_a_room_whose_candidates_are_all_applied_has_nothing_to_plan(tmp_path, catalog):
    spec = parse_spec(ROOM)
    for c in spec.candidates:
        c.applied = True
    with pytest.raises(ValueError, match="'Wall panel' and 'Bass trap' are applied to the "
                                         "room already"):
        Study(spec, catalog).plan()
    # Un-marked (as the interface does: "no" in the Applied column), it is planned again.
    set_item_fields(spec, "candidates", 1, {"applied": None})
    assert [c.name for c in resolve_candidates(spec, check_room(spec, catalog), catalog)] == \
        ["Bass trap"]


def test_applied_must_be_true_or_false():
    with pytest.raises(RoomFileError, match=r"candidates\[1\].applied: must be true or false"):
        parse_spec(ROOM.replace('max_count = 4', 'max_count = 4\napplied = "yes"'))
    assert parse_spec(ROOM.replace('max_count = 4', 'max_count = 4\napplied = false')) \
        .candidates[1].applied is None


def test_an_applied_candidate_may_name_a_surface_covered_whole(catalog):
    text = ROOM.replace('walls = true', 'surface = "Ceiling"')
    spec = parse_spec(text)
    treated = apply_plan(spec, _hand_plan([30.0, 0.0]),      # the whole 6 x 5 m ceiling
                         resolve_candidates(spec, check_room(spec, catalog), catalog))
    assert "Ceiling" not in [s.name for s in treated.surfaces]
    again = parse_spec(spec_to_toml(treated))               # still a valid room
    assert again.candidates[0].applied and again.candidates[0].surface == "Ceiling"
    again.candidates[0].applied = None                      # un-marked: it needs a surface
    with pytest.raises(RoomFileError, match="'Ceiling' is not a surface of this room"):
        parse_spec(spec_to_toml(again))


def test_marking_applied_keeps_the_comments(catalog):
    spec = parse_spec(ROOM)
    set_item_fields(spec, "candidates", 0, {"applied": True})
    text = spec_to_toml_keeping(spec, ROOM)
    assert "# The panels the shop sells." in text and "applied = true" in text
    assert parse_spec(text) == spec
    # Only the new key was written: the rest is as it was.
    assert text.replace("applied = true\n", "") == \
        spec_to_toml_keeping(parse_spec(ROOM), ROOM)


# ----------------------------------------------------------------------------- several surfaces

def test_walls_covers_every_surface_on_a_wall_face(catalog):
    spec = parse_spec(ROOM)
    room = check_room(spec, catalog)
    assert spec.candidates[0].surface_names(spec) == list(WALLS)
    panel = resolve_candidates(spec, room, catalog)[0]
    assert panel.surface == (2, 3, 4, 5)
    assert panel.max_amount == pytest.approx(66.0, rel=1e-12)        # all four walls (hand)
    assert panel.step == pytest.approx(0.72) and panel.panel == pytest.approx((1.2, 0.6))


def test_one_treatment_over_several_surfaces_against_sabine_by_hand(catalog):
    # 33 m^2 over the four walls, in proportion to their areas: half of each wall (hand:
    # 33 / 66). Sabine A = sum S alpha: the walls' absorption grows by 33 (alpha_panel -
    # alpha_plaster) per band, the panel's and the plaster's values from the catalogue.
    spec = parse_spec(ROOM)
    room = check_room(spec, catalog)
    cands = resolve_candidates(spec, room, catalog)
    treated = apply_plan(spec, _hand_plan([33.12, 0.0]), cands)   # 46 panels of 0.72 m^2
    parts = {s.name: s.area for s in treated.surfaces if s.name.endswith(" - Wall panel")}
    assert parts == pytest.approx({f"{w} - Wall panel": a * 33.12 / 66 for w, a in
                                   WALLS.items()}, rel=1e-9)
    rest = {s.name: s.area for s in treated.surfaces if s.name in WALLS}
    assert rest == dict.fromkeys(WALLS)      # no area: the rest of each face, shrunk by itself
    after = check_room(treated, catalog)
    panel = [catalog.get(DEFAULT_COVER_MATERIAL).values[b] for b in room.bands_hz]
    plaster = [catalog.get("plaster-on-masonry").values[b] for b in room.bands_hz]
    hand = 33.12 * (np.array(panel) - np.array(plaster))
    np.testing.assert_allclose(evaluate(after).surface_absorption_m2
                               - evaluate(room).surface_absorption_m2, hand, rtol=1e-9)


def test_a_list_of_surfaces(catalog):
    text = ROOM.replace('walls = true', 'surface = ["Left", "Right"]')
    spec = parse_spec(text)
    assert spec.candidates[0].surface == ["Left", "Right"]
    assert parse_spec(spec_to_toml(spec)) == spec
    panel = resolve_candidates(spec, check_room(spec, catalog), catalog)[0]
    assert panel.surface == (4, 5) and panel.max_amount == pytest.approx(36.0)


def test_renaming_a_surface_follows_into_a_list(catalog):
    from roomcalc.study.edits import rename_item

    text = ROOM.replace('walls = true', 'surface = ["Left", "Right"]  # two walls')
    spec = parse_spec(text)
    rename_item(spec, "surfaces", 4, "Left wall")
    assert spec.candidates[0].surface == ["Left wall", "Right"]
    out = spec_to_toml_keeping(spec, text)
    assert 'surface = ["Left wall", "Right"]  # two walls' in out
    assert parse_spec(out) == spec


@pytest.mark.parametrize("change, field, message", [
    ('surface = ["Left", "Rigth"]', "surface", "'Rigth' is not a surface of this room; did "
     "you mean 'Right'?"),
    ('surface = ["Left", "Left"]', "surface", "names a surface twice"),
    ('surface = []', "surface", "one or more surface names"),
    ('walls = false', "walls", "must be true"),
    ('walls = true\nsurface = "Left"', "", "not both"),
])
def test_bad_surface_lists_name_the_field(change, field, message):
    text = ROOM.replace('walls = true', change)
    with pytest.raises(RoomFileError) as exc:
        parse_spec(text, "room.toml")
    where = "candidates[0]" + (f".{field}" if field else "")
    assert any(p.where == where and message in p.message for p in exc.value.problems), \
        exc.value.problems


def test_walls_in_a_room_without_wall_faces_says_what_to_give():
    text = ROOM.replace('face = "front"', 'area = 15.0').replace('face = "back"', 'area = 15.0') \
        .replace('face = "left"', 'area = 18.0').replace('face = "right"', 'area = 18.0')
    with pytest.raises(RoomFileError, match="no surface here has such a face"):
        parse_spec(text)


# ----------------------------------------------------------------------------- panels

def test_panel_and_step_must_agree():
    with pytest.raises(RoomFileError, match=r"candidates\[0\].step: 0.5 m\^2 is not the "
                                            r"panel's area \(1.2 x 0.6 = 0.72 m\^2\)"):
        parse_spec(ROOM.replace('panel = [1.2, 0.6]', 'panel = [1.2, 0.6]\nstep = 0.5'))
    with pytest.raises(RoomFileError, match=r"candidates\[0\].panel\[1\]: 0.01 is outside "
                                            r"0.05 to 100 m$"):
        parse_spec(ROOM.replace('panel = [1.2, 0.6]', 'panel = [1.2, 0.01]'))
    with pytest.raises(RoomFileError, match=r"panel: must be \[width, height\] of one panel "
                                            r"\(m\), not 1 value$"):
        parse_spec(ROOM.replace('panel = [1.2, 0.6]', 'panel = [1.2]'))
    # An imperial file is told its range in ft (0.05 m / 0.3048 = 0.164042 ft).
    imperial = ROOM.replace("version = 1", 'version = 1\nunits = "imperial"') \
        .replace("cost_per_m2", "cost_per_ft2").replace("panel = [1.2, 0.6]", "panel = [4, 0.1]")
    with pytest.raises(RoomFileError, match=r"panel\[1\]: 0.1 is outside 0.164042 to "
                                            r"328.084 ft"):
        parse_spec(imperial)
    # In the interface a panel size and an area per panel replace each other: never at odds.
    spec = parse_spec(ROOM)
    set_item_fields(spec, "candidates", 0, {"step": 0.5})
    assert (spec.candidates[0].step, spec.candidates[0].panel) == (0.5, None)
    set_item_fields(spec, "candidates", 0, {"panel": [0.6, 0.6]})
    assert (spec.candidates[0].step, spec.candidates[0].panel) == (None, [0.6, 0.6])


def _run(cand, amount):
    return SimpleNamespace(candidates=(cand,)), PlanItem(cand.name, "cover", "Left", amount, 0.0)


def test_panels_are_shown_as_a_count():
    sized = Candidate("Wall panel", "cover", surface=0, alpha=[0.5] * 6, step=0.72,
                      panel=(1.2, 0.6))
    run, item = _run(sized, 5.04)
    assert sections.amount_text(run, item) == "7 panels of 1.2 x 0.6 m = 5.04 m^2"
    area_only = Candidate("Wall panel", "cover", surface=0, alpha=[0.5] * 6, step=0.72)
    run, item = _run(area_only, 5.04)
    assert sections.amount_text(run, item) == "7 panels of 0.72 m^2 = 5.04 m^2"
    any_area = Candidate("Wall panel", "cover", surface=0, alpha=[0.5] * 6)
    run, item = _run(any_area, 5.04)
    assert sections.amount_text(run, item) == "5.04 m^2"
    # Imperial: 4 ft x 2 ft panels (1 ft = 0.3048 m exactly), 7 of them = 56 ft^2.
    ft = 0.3048
    imperial = Candidate("Wall panel", "cover", surface=0, alpha=[0.5] * 6,
                         step=8 * ft * ft, panel=(4 * ft, 2 * ft))
    run, item = _run(imperial, 56 * ft * ft)
    assert sections.amount_text(run, item, IMPERIAL) == "7 panels of 4 x 2 ft = 56.00 ft^2"
    assert sections.amount_text(run, PlanItem("Trap", "units", None, 1.0, 0.0), METRIC) == \
        "1 unit"


def test_a_plan_of_panels_says_how_many_in_every_output(tmp_path, catalog):
    study = Study.from_file(_write(tmp_path), catalog)
    run = study.plan(enabled={"Wall panel"})
    item = run.plan.items[0]
    n = round(item.amount / 0.72)
    assert item.amount == pytest.approx(n * 0.72)
    words = f"{n} panels of 1.2 x 0.6 m = {item.amount:.2f} m^2"
    assert words in sections.plan_text(run)
    d = json.loads(json.dumps(sections.plan_dict(run)))
    assert d["items"][0]["panels"] == {"count": n, "area_each_m2": pytest.approx(0.72),
                                       "width_m": 1.2, "height_m": 0.6}
    assert d["items"][0]["how_much"] == words
    assert d["items"][0]["surface"] == "Front, Back, Left, Right"
    assert d["items"][0]["surfaces"] == ["Front", "Back", "Left", "Right"]


def test_panel_sizes_follow_a_change_of_units():
    spec = parse_spec(ROOM)
    convert_candidate_units(spec, "imperial")
    # 1.2 m / 0.3048 = 3.9370 ft; 0.6 m / 0.3048 = 1.9685 ft.
    assert spec.candidates[0].panel == [3.937, 1.9685]


# ----------------------------------------------------------------------------- new rows

def test_a_new_treatment_row_is_valid_as_it_stands(catalog):
    spec = parse_spec(ROOM)
    spec.candidates.append(new_candidate(spec, "Treatment 3"))
    c = spec.candidates[-1]
    assert (c.surface, c.material) == ("Front", DEFAULT_COVER_MATERIAL)   # the first wall
    check_room(spec, catalog)                    # no problems: RoomFileError otherwise
    # Made a units row (surface cleared), its default material follows: still valid.
    set_item_fields(spec, "candidates", 2, {"surface": None})
    assert c.material == DEFAULT_UNITS_MATERIAL
    assert c.max_count == 4          # corner traps: a box room has four vertical corners
    check_room(spec, catalog)
    set_item_fields(spec, "candidates", 2, {"walls": True})
    assert c.material == DEFAULT_COVER_MATERIAL and c.surface is None
    check_room(spec, catalog)


def test_a_new_row_in_a_room_without_faces_covers_its_first_surface(catalog):
    spec = parse_spec(ROOM.replace('walls = true', 'surface = "Left"'))
    for s in spec.surfaces:
        s.face, s.area = None, 10.0
    spec.shape.length = spec.shape.width = spec.shape.height = None
    spec.shape.volume = 90.0
    c = new_candidate(spec, "Treatment 3")
    assert c.surface == "Floor"
    spec.candidates.append(c)
    check_room(spec, catalog)


def test_adding_a_row_in_the_interface_gives_no_problems(catalog):
    from roomcalc.tui.document import Document

    doc = Document.new_box(6.0, 4.0, 2.7)
    doc.add("candidates")
    doc.add("candidates")
    assert [c.name for c in doc.spec.candidates] == ["Treatment 1", "Treatment 2"]
    check_room(doc.spec, catalog)


def test_the_interface_reads_names_and_yes_no():
    from roomcalc.tui.widgets.record_table import Column, fmt_value, parse_value

    names = Column("surface", "Covers surface", "names")
    assert parse_value("Left", names) == "Left"
    assert parse_value("Left; Right ;", names) == ["Left", "Right"]
    assert fmt_value(["Left", "Right"], "names") == "Left; Right"
    with pytest.raises(ValueError, match="twice"):
        parse_value("Left; Left", names)
    flag = Column("applied", "Applied", "flag")
    assert parse_value("yes", flag) is True and parse_value("No", flag) is None
    assert fmt_value(True, "flag") == "yes" and fmt_value(None, "flag") == "no"
    with pytest.raises(ValueError, match="yes or no"):
        parse_value("maybe", flag)


def test_the_plan_command_counts_panels_in_every_format(tmp_path, capsys):
    import csv
    import io

    from roomcalc.cli import main

    path = _write(tmp_path, ROOM.replace("rt60_max = 0.6", "rt60_max = 1.2"))
    outputs = {}
    for form in ("text", "markdown", "json", "csv"):
        main(["plan", str(path), "--format", form])
        outputs[form] = capsys.readouterr().out
    d = json.loads(outputs["json"])
    item = next(i for i in d["items"] if i["candidate"] == "Wall panel")
    n = item["panels"]["count"]
    assert n >= 1 and item["area_m2"] == pytest.approx(n * 0.72)
    words = f"{n} panels of 1.2 x 0.6 m = {item['area_m2']:.2f} m^2"
    assert words in outputs["text"] and words in outputs["markdown"]
    rows = list(csv.DictReader(io.StringIO(outputs["csv"])))
    row = next(r for r in rows if r["candidate"] == "Wall panel")
    assert (int(row["panels"]), float(row["panel_width_m"]), row["how_much"]) == (n, 1.2, words)
    assert outputs["markdown"].startswith("# Treatment plan")


def test_a_second_new_treatment_row_covers_another_wall(catalog):
    """The second row added covered the same wall as the first; it now takes a wall no
    treatment covers yet (and is valid as it stands)."""
    from roomcalc.io.roomfile import check_room
    from roomcalc.study.edits import add_item

    from pathlib import Path

    path = Path(__file__).resolve().parents[1] / "example_rooms" / "garage-studio.toml"
    spec = parse_spec(path.read_text(encoding="utf-8"))
    spec.candidates = []
    first = spec.candidates[add_item(spec, "candidates")]
    second = spec.candidates[add_item(spec, "candidates")]
    assert first.surface != second.surface
    check_room(spec, catalog)


def test_a_treatment_made_units_or_cover_drops_the_other_kinds_keys(catalog):
    """A cover with an area limit and a price per m^2 made units (its surface cleared): the
    limit and price go (they would make the row invalid), the default trap gets four; made a
    cover again, the count limit goes."""
    spec = parse_spec(ROOM)
    at = len(spec.candidates)
    spec.candidates.append(new_candidate(spec, "Treatment 9"))
    set_item_fields(spec, "candidates", at, {"max_area": 5.0, "cost_per_m2": 40.0})
    check_room(spec, catalog)
    set_item_fields(spec, "candidates", at, {"surface": None})
    c = spec.candidates[at]
    assert (c.max_area, c.cost_per_m2, c.max_count) == (None, None, 4)
    check_room(spec, catalog)
    set_item_fields(spec, "candidates", at, {"walls": True})
    assert c.max_count is None and c.covers
    check_room(spec, catalog)
