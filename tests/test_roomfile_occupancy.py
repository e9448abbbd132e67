"""People in a room file: the catalogue's occupant marks and a room's ``occupant`` key, resolved
to the engine's people-marked surfaces and objects, and the room with its people gone."""

from __future__ import annotations

import tomllib

import numpy as np
import pytest

from roomcalc.engine.model import at_occupancy
from roomcalc.io.errors import RoomFileError
from roomcalc.io.roomfile import parse_spec, read_room, resolve, spec_to_toml

from conftest import EXAMPLES, ROOT

BANDS = [125, 250, 500, 1000, 2000, 4000]


def _catalogue_values(mid: str) -> np.ndarray:
    """An entry's values read straight from the shipped file (not through the catalogue code)."""
    data = tomllib.loads((ROOT / "materials" / "seats-and-people.toml").read_text("utf-8"))
    (entry,) = [e for e in data["materials"] if e["id"] == mid]
    return np.array([entry["values"][str(b)] for b in BANDS])


def test_classroom_pupils_and_teacher_are_people(catalog):
    _, room = read_room(EXAMPLES / "classroom.toml", catalog)
    pupils, teacher = room.objects
    assert (pupils.name, pupils.count, pupils.occupant) == ("Pupils at desks", 28.0, True)
    np.testing.assert_array_equal(pupils.absorption, _catalogue_values("school-desk-with-pupil"))
    np.testing.assert_array_equal(pupils.unoccupied_absorption,
                                  _catalogue_values("hard-chair-unoccupied"))
    assert (teacher.name, teacher.occupant, teacher.unoccupied_absorption) == \
        ("Teacher", True, None)                 # a person leaves whole
    assert all(s.unoccupied_alpha is None for s in room.surfaces)
    assert room.has_occupants


def test_classroom_with_nobody_in_it(catalog):
    _, room = read_room(EXAMPLES / "classroom.toml", catalog)
    empty = at_occupancy(room, 0.0)
    # The 28 places keep their count, each now an empty hard chair (the desk's own absorption
    # is neglected, as the catalogue's note says); the teacher is gone.
    (places,) = empty.objects
    assert (places.name, places.count) == ("Pupils at desks", 28.0)
    np.testing.assert_array_equal(places.absorption, _catalogue_values("hard-chair-unoccupied"))
    # Common practice: absorption areas add (Sabine), so the objects' total absorption of the
    # empty room is 28 chairs, and of the full room 28 pupils at desks plus one standing adult.
    chair, pupil = _catalogue_values("hard-chair-unoccupied"), \
        _catalogue_values("school-desk-with-pupil")
    adult = _catalogue_values("person-standing")
    total = lambda r: sum(o.count * o.absorption for o in r.objects)   # noqa: E731
    np.testing.assert_allclose(total(empty), 28 * chair, rtol=1e-12)
    np.testing.assert_allclose(total(room), 28 * pupil + adult, rtol=1e-12)
    # Half the people: each place halfway between a pupil and an empty chair, half a teacher.
    half = at_occupancy(room, 0.5)
    np.testing.assert_allclose(half.objects[0].absorption, (pupil + chair) / 2, rtol=1e-12)
    assert half.objects[1].count == 0.5
    np.testing.assert_array_equal(empty.surfaces[0].alpha, room.surfaces[0].alpha)


ROOM = """\
version = 1

[shape]
length = 10.0
width = 8.0
height = 4.0

[[surfaces]]
name = "Seating block"
area = 30.0
face = "floor"
material = "audience-upholstered-occupied"

[[surfaces]]
name = "Rest of the floor"
face = "floor"
material = "concrete-floor-painted"

[[surfaces]]
name = "Walls and ceiling"
area = 224.0
material = "plaster-on-masonry"
"""


def test_an_occupied_audience_area_keeps_its_empty_seats(catalog):
    room = resolve(parse_spec(ROOM), catalog)
    seats = room.surfaces[0]
    # Source: Bies, Hansen & Howard, Engineering Noise Control, 5th ed. (2017), Table 6.2, as
    # quoted (secondary quotation) in materials/seats-and-people.toml; not checked against a
    # copy here: well-upholstered seating, occupied and unoccupied, 125 to 4000 Hz.
    np.testing.assert_array_equal(seats.alpha, [0.52, 0.68, 0.85, 0.97, 0.93, 0.85])
    np.testing.assert_array_equal(seats.unoccupied_alpha, [0.44, 0.60, 0.77, 0.84, 0.82, 0.70])
    assert room.surfaces[1].unoccupied_alpha is None and room.surfaces[2].unoccupied_alpha is None
    empty = at_occupancy(room, 0.0)
    np.testing.assert_array_equal(empty.surfaces[0].alpha, seats.unoccupied_alpha)
    assert empty.surfaces[0].total_area == seats.total_area == 30.0   # a surface stays


def test_occupant_key_overrides_the_catalogue(catalog):
    text = ROOM + """
[[objects]]
name = "Pupils counted as furniture"
count = 10
material = "school-desk-with-pupil"
occupant = false

[[objects]]
name = "Choir"
count = 12
absorption = [0.2, 0.35, 0.45, 0.5, 0.5, 0.5]
occupant = true

[[objects]]
name = "Chairs"
count = 12
material = "hard-chair-unoccupied"
"""
    spec = parse_spec(text)
    assert [o.occupant for o in spec.objects] == [False, True, None]
    room = resolve(spec, catalog)
    assert [(o.occupant, o.unoccupied_absorption) for o in room.objects] == \
        [(False, None), (True, None), (False, None)]
    empty = at_occupancy(room, 0.0)
    assert [o.name for o in empty.objects] == ["Pupils counted as furniture", "Chairs"]
    # written back as given, and read back the same
    again = parse_spec(spec_to_toml(spec))
    assert again == spec and "occupant = false" in spec_to_toml(spec)


def test_occupant_must_be_true_or_false(tmp_path, catalog):
    path = tmp_path / "room.toml"
    path.write_text(ROOM + '\n[[objects]]\nname = "Crowd"\nmaterial = "person-standing"\n'
                    'occupant = "yes"\n')
    with pytest.raises(RoomFileError) as info:
        read_room(path, catalog)
    assert [(p.where, p.message) for p in info.value.problems] == \
        [("objects[0].occupant", "must be true or false, not text")]


def test_inline_people_entry_and_its_counterpart(tmp_path, catalog):
    text = ROOM + """
[[objects]]
name = "Dancers"
count = 20
material = "dancer"

[[materials]]
id = "dancer"
name = "Dancer, per person"
kind = "object"
values = { 125 = 0.2, 250 = 0.3, 500 = 0.4, 1000 = 0.5, 2000 = 0.5, 4000 = 0.5 }
source = "typical value, from memory; verify against a test report to ISO 354 / ASTM C423"
occupant = true
unoccupied = "hard-chair-unoccupied"
"""
    spec = parse_spec(text)
    room = resolve(spec, catalog)
    np.testing.assert_array_equal(room.objects[0].unoccupied_absorption,
                                  _catalogue_values("hard-chair-unoccupied"))
    assert parse_spec(spec_to_toml(spec)) == spec          # the marks are written back
    path = tmp_path / "room.toml"
    path.write_text(text.replace('unoccupied = "hard-chair-unoccupied"',
                                 'unoccupied = "plaster-on-masonry"'))
    with pytest.raises(RoomFileError) as info:
        read_room(path, catalog)
    assert [(p.where, p.message) for p in info.value.problems] == [
        ("materials[0].unoccupied", "'plaster-on-masonry' is of kind surface; the entry that "
         "remains when the people leave is of the same kind as this one (object)")]
