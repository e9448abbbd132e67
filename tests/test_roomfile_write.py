"""Writing room files back: whole counts stay whole, and what is saved reads back the same."""

from __future__ import annotations

import tomllib

import numpy as np

from roomcalc.io.roomfile import (CandidateSpec, ObjectSpec, parse_spec, read_room, save_spec,
                                  spec_to_toml)
from conftest import EXAMPLES


def _same_room(a, b):
    assert (a.bands_hz, a.volume, a.dimensions, a.air) == (b.bands_hz, b.volume, b.dimensions,
                                                          b.air)
    assert [(s.name, s.area, s.count, s.face, s.material) for s in a.surfaces] == \
        [(s.name, s.area, s.count, s.face, s.material) for s in b.surfaces]
    for x, y in zip(a.surfaces, b.surfaces):
        np.testing.assert_array_equal(x.alpha, y.alpha)
    assert [(o.name, o.count, o.material, o.occupant) for o in a.objects] == \
        [(o.name, o.count, o.material, o.occupant) for o in b.objects]
    for x, y in zip(a.objects, b.objects):
        np.testing.assert_array_equal(x.absorption, y.absorption)


def test_saved_classroom_keeps_whole_counts(tmp_path, catalog):
    spec, room = read_room(EXAMPLES / "classroom.toml", catalog)
    assert spec.objects[0].count == 28 and isinstance(spec.objects[0].count, float)
    out = tmp_path / "saved.toml"
    save_spec(spec, out)
    text = out.read_text(encoding="utf-8")
    assert "\ncount = 28\n" in text and "28.0" not in text
    assert "\ncount = 4\n" in text              # the windows (a surface's count)
    again_spec, again = read_room(out, catalog)
    assert again_spec == spec
    _same_room(room, again)


def test_counts_from_edits_are_written_whole_and_fractions_kept():
    spec = parse_spec((EXAMPLES / "workshop.toml").read_text(encoding="utf-8"))
    spec.objects = [ObjectSpec("Chairs", count=12.0, material="hard-chair-unoccupied"),
                    ObjectSpec("Curtain", count=2.5, absorption=[0.1] * 6)]
    spec.surfaces[0].count = 3.0                # as the interface types a number
    spec.candidates = [CandidateSpec("Baffle", absorption=[0.5] * 6, max_count=40.0,
                                     cost_each=10.0)]
    text = spec_to_toml(spec)
    data = tomllib.loads(text)
    assert [o["count"] for o in data["objects"]] == [12, 2.5]
    assert isinstance(data["objects"][0]["count"], int)
    assert data["surfaces"][0]["count"] == 3 and isinstance(data["surfaces"][0]["count"], int)
    assert data["candidates"][0]["max_count"] == 40
    assert isinstance(data["candidates"][0]["max_count"], int)
    # and the text is a valid room file that reads back to the same numbers
    again = parse_spec(text)
    assert [o.count for o in again.objects] == [12.0, 2.5] and again.surfaces[0].count == 3


def test_saved_over_the_original_keeps_whole_counts_and_reads_back_the_same(catalog):
    """The interface's writer (comments kept) obeys the same round trip as the plain one, for
    every example room, unchanged and edited as the interface types numbers."""
    from roomcalc.io.roomfile import resolve, spec_to_toml_keeping

    for path in sorted(EXAMPLES.glob("*.toml")):
        text = path.read_text(encoding="utf-8")
        spec = parse_spec(text)
        assert spec_to_toml_keeping(spec, text) == text
        for o in spec.objects:
            o.count = float(o.count) + 1.0          # as the interface types a number
        spec.surfaces[0].count = 2.0
        out = spec_to_toml_keeping(spec, text)
        data = tomllib.loads(out)
        assert all(isinstance(o["count"], int) for o in data.get("objects", []))
        assert isinstance(data["surfaces"][0]["count"], int)
        again = parse_spec(out)
        assert again == spec and spec_to_toml_keeping(again, out) == out
        _same_room(resolve(spec, catalog), resolve(again, catalog))
