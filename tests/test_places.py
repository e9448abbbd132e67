"""Problems named on screen as the user sees the rows (roomcalc/present/places.py): counted
from 1, with the row's name, under the tab's title."""

from __future__ import annotations

from roomcalc.io.errors import Problem
from roomcalc.io.roomfile import parse_spec
from roomcalc.present.places import place_on_screen, problem_on_screen

from conftest import EXAMPLES


def _classroom():
    return parse_spec((EXAMPLES / "classroom.toml").read_text(encoding="utf-8"), "classroom")


def test_rows_count_from_one_and_carry_their_names():
    spec = _classroom()
    second = spec.candidates[1].name
    assert place_on_screen("candidates[1].cost_per_m2", spec) == \
        f'Treatments row 2 "{second}", cost_per_m2'
    assert place_on_screen("surfaces[0]", spec) == f'Surfaces row 1 "{spec.surfaces[0].name}"'
    assert place_on_screen("receivers[1].position[2]", spec) == \
        f'Receivers row 2 "{spec.receivers[1].name}", position[2]'


def test_other_places_and_rows_beyond_the_list_stay_readable():
    spec = _classroom()
    assert place_on_screen("shape.width", spec) == "shape.width"
    assert place_on_screen("surfaces[99].area", spec) == "Surfaces row 100, area"
    assert problem_on_screen(Problem("f.toml", "", "not valid TOML"), spec) == "not valid TOML"
    assert problem_on_screen(Problem("f.toml", "objects[0].count", "must be 0 or more"),
                             spec) == \
        f'Objects row 1 "{spec.objects[0].name}", count: must be 0 or more'
