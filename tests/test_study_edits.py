"""The edit rules of the core (roomcalc.study.edits), without any interface: band changes across
every per-band list, renames that carry to every reference, unit conversion, exclusive keys."""

from __future__ import annotations

import copy

import numpy as np
import pytest

from roomcalc.engine.analysis import evaluate
from roomcalc.io import paths
from roomcalc.io.roomfile import check_room, read_spec
from roomcalc.study.edits import (change_bands, convert_units, parse_rt60_limit, rename_item,
                                   set_criterion, set_item_fields, set_method, set_objective,
                                   set_own_rt60_limit)


def _example(name):
    return read_spec(paths.example_rooms_dir() / name)


def _per_band_lists(spec):
    """Every per-band list of a spec, by where it is, for checking their lengths."""
    out = {}
    for i, s in enumerate(spec.surfaces):
        if s.alpha is not None:
            out[f"surfaces[{i}].alpha"] = s.alpha
    for i, o in enumerate(spec.objects):
        if o.absorption is not None:
            out[f"objects[{i}].absorption"] = o.absorption
    for i, s in enumerate(spec.sources):
        if s.sound_power is not None:
            out[f"sources[{i}].sound_power"] = s.sound_power
    for i, c in enumerate(spec.candidates):
        for key in ("alpha", "absorption"):
            if getattr(c, key) is not None:
                out[f"candidates[{i}].{key}"] = getattr(c, key)
    t = spec.target
    if t is not None:
        for key in ("rt60_max", "rt60_min"):
            if isinstance(getattr(t, key), list):
                out[f"target.{key}"] = getattr(t, key)
        for name, lim in t.max_level_db.items():
            if isinstance(lim, list):
                out[f"target.max_level_db.{name}"] = lim
    return out


def test_workshop_with_63_hz_added_stays_valid(catalog):
    # The workshop has sources and a candidate with 6 values per band, catalogue materials
    # that give no 63 Hz value, and (here) per-band target lists: every one must follow.
    spec = _example("workshop.toml")
    spec.target.rt60_max = [0.9, 0.8, 0.8, 0.8, 0.8, 0.8]
    spec.target.max_level_db = {"Assembly bench": [90.0, 90.0, 88.0, 88.0, 88.0, 85.0]}
    before = copy.deepcopy(spec)
    notes = change_bands(spec, [63, 125, 250, 500, 1000, 2000, 4000], catalog)
    assert spec.bands == (63, 125, 250, 500, 1000, 2000, 4000)
    lists = _per_band_lists(spec)
    assert lists and all(len(v) == 7 for v in lists.values()), \
        {k: len(v) for k, v in lists.items() if len(v) != 7}
    # The added band repeats the nearest band (125 Hz); the others are unchanged.
    assert spec.sources[0].sound_power == [95.0] + before.sources[0].sound_power
    assert spec.target.rt60_max == [0.9] + before.target.rt60_max
    # Materials without a 63 Hz value became own values, each named in a note.
    steel = spec.surfaces[1]
    assert steel.material is None and len(steel.alpha) == 7
    assert any("steel-sheet-on-frame" in n and "63 Hz" in n and "'Roof'" in n for n in notes)
    cat_steel = catalog.get("steel-sheet-on-frame").values
    assert steel.alpha[1:] == [cat_steel[b] for b in (125, 250, 500, 1000, 2000, 4000)]
    # The room is valid as it is: the same checks as a file's.
    room = check_room(spec, catalog, "workshop.toml")
    assert room.bands_hz == (63, 125, 250, 500, 1000, 2000, 4000)
    # And back: every list shrinks to 6 again, the values at the kept bands as they were.
    change_bands(spec, [125, 250, 500, 1000, 2000, 4000], catalog)
    assert spec.bands_hz is None
    assert all(len(v) == 6 for v in _per_band_lists(spec).values())
    assert spec.sources[0].sound_power == before.sources[0].sound_power
    assert spec.target.max_level_db == before.target.max_level_db
    check_room(spec, catalog, "workshop.toml")


def test_band_table_limits_drop_removed_bands(catalog):
    spec = _example("workshop.toml")
    spec.target.rt60_max = {125: 1.0, 500: 0.8, 4000: 0.7}
    change_bands(spec, [125, 250, 500, 1000, 2000], catalog)
    assert spec.target.rt60_max == {125: 1.0, 500: 0.8}


def test_rename_follows_every_reference():
    spec = _example("workshop.toml")
    saw = spec.sources[0].name
    worker = next(r for r in spec.receivers if saw in r.source_hours or saw in r.distances)
    rename_item(spec, "sources", 0, "Circular saw")
    assert "Circular saw" in worker.source_hours or "Circular saw" in worker.distances
    assert all(saw not in r.source_hours and saw not in r.distances for r in spec.receivers)
    roof = next(i for i, s in enumerate(spec.surfaces)
                if any(c.surface == s.name for c in spec.candidates))
    old = spec.surfaces[roof].name
    rename_item(spec, "surfaces", roof, "Roof soffit")
    assert any(c.surface == "Roof soffit" for c in spec.candidates)
    assert not any(c.surface == old for c in spec.candidates)
    bench = next(i for i, r in enumerate(spec.receivers)
                 if r.name in spec.target.max_level_dba)
    rename_item(spec, "receivers", bench, "Bench 1")
    assert "Bench 1" in spec.target.max_level_dba


def test_rename_through_set_fields_and_exclusive_keys():
    spec = _example("workshop.toml")
    set_item_fields(spec, "surfaces", 0, {"alpha": [0.1] * 6})
    assert spec.surfaces[0].material is None
    set_item_fields(spec, "sources", 0, {"sound_power_dba": 100.0})
    assert spec.sources[0].sound_power is None and spec.sources[0].spectrum == "pink"
    set_item_fields(spec, "sources", 0, {"directivity": 4.0})
    assert spec.sources[0].placement is None
    name = spec.sources[1].name
    set_item_fields(spec, "sources", 1, {"name": "Thicknesser"})
    assert all(name not in r.distances and name not in r.source_hours for r in spec.receivers)


@pytest.mark.parametrize("name", ["workshop.toml", "classroom.toml", "garage-studio.toml"])
def test_unit_conversion_round_trip(name, catalog):
    spec = _example(name)
    res0 = evaluate(check_room(spec, catalog))
    convert_units(spec, "imperial")
    assert spec.units == "imperial"
    res1 = evaluate(check_room(spec, catalog))
    convert_units(spec, "metric")
    res2 = evaluate(check_room(spec, catalog))
    # Common practice: 1 ft = 0.3048 m exactly; lengths are kept to 4 decimals, so the room
    # is the same to about 1e-4 relative.
    for res in (res1, res2):
        assert res.volume_m3 == pytest.approx(res0.volume_m3, rel=1e-3)
        for k, v in res0.rt60_s.items():
            np.testing.assert_allclose(res.rt60_s[k], v, rtol=2e-3)


def test_set_method_is_a_room_setting():
    # The classroom names its formula in [target]; choosing one for the room moves it to the
    # top level, so the file never names two.
    spec = _example("classroom.toml")
    assert spec.target.method == "eyring"
    set_method(spec, "arau_puchades")
    assert spec.method == "arau_puchades" and spec.target.method is None
    assert spec.method_in_force == "arau_puchades"
    set_method(spec, None)
    assert spec.method_in_force is None


def test_criterion_and_own_limit_exclude_each_other():
    spec = _example("classroom.toml")
    assert spec.target.criterion == "ansi-s12.60-2010-core"
    set_own_rt60_limit(spec, parse_rt60_limit("0.6", len(spec.bands)))
    assert spec.target.criterion is None and spec.target.rt60_max == 0.6
    set_criterion(spec, "bb93-primary-new")
    assert spec.target.criterion == "bb93-primary-new" and spec.target.rt60_max is None
    set_objective(spec, "area")
    assert spec.target.plan_objective == "area"
    assert parse_rt60_limit("0.8 0.7 0.6 0.6 0.6 0.6", 6) == [0.8, 0.7, 0.6, 0.6, 0.6, 0.6]
    for bad, words in (("0.6 0.5", "2 values"), ("x", "only numbers"), ("0", "from 0.05 to"),
                       ("0.01", "from 0.05 to 20 s"), ("25", "from 0.05 to 20 s")):
        with pytest.raises(ValueError, match=words):
            parse_rt60_limit(bad, 6)


def test_people_stay_people_when_a_band_is_added(catalog):
    # The classroom's pupils at desks are people (catalogue mark); their material has no
    # 63 Hz value, so adding 63 Hz gives them own values: they must still count as people.
    spec = _example("classroom.toml")
    change_bands(spec, [63, 125, 250, 500, 1000, 2000, 4000], catalog)
    pupils = next(o for o in spec.objects if o.name == "Pupils at desks")
    assert pupils.material is None and pupils.occupant is True
    room = check_room(spec, catalog)
    assert next(o for o in room.objects if o.name == "Pupils at desks").occupant


def test_a_voice_given_in_dba_keeps_its_band_powers_when_63_hz_is_added(catalog):
    from roomcalc.engine.spectra import band_power_from_dba

    spec = _example("classroom.toml")
    voice = spec.sources[0]
    dba, shape, old = voice.sound_power_dba, voice.spectrum, list(spec.bands)
    notes = change_bands(spec, [63] + old, catalog)
    assert voice.sound_power_dba is None and voice.spectrum is None
    # Source: the shape's own band powers (IEC 61672-1 A-weighting in band_power_from_dba),
    # to 0.05 dB as stored, the 63 Hz value repeating 125 Hz.
    lw = band_power_from_dba(dba, shape, old)
    np.testing.assert_allclose(voice.sound_power[1:], lw, atol=0.05)
    assert voice.sound_power[0] == voice.sound_power[1]
    assert any(f"spectrum '{shape}'" in n for n in notes)
    check_room(spec, catalog)


# ---------------------------------------------------------------- new rows start valid
def test_a_new_row_of_every_table_is_valid_as_it_stands(catalog):
    """A receiver added to a room had no distance to its sources, so the room stopped being
    computed until the user found out what to type. Every new row (one after another, in
    every example room, metric and imperial) leaves the room without problems; a receiver
    gets a position where every source has one, else a distance to each source."""
    from pathlib import Path

    from roomcalc.io.roomfile import check_room, parse_spec
    from roomcalc.study.edits import COLLECTIONS, convert_units, new_item

    rooms = Path(__file__).resolve().parents[1] / "example_rooms"
    for path in sorted(rooms.glob("*.toml")):
        spec = parse_spec(path.read_text(encoding="utf-8"), str(path))
        for units in ("metric", "imperial"):
            if spec.units != units:
                convert_units(spec, units)
            for coll in COLLECTIONS:
                before = [x.name for x in getattr(spec, coll)]
                item = new_item(spec, coll)
                assert item.name not in before
                getattr(spec, coll).append(item)
                check_room(spec, catalog)           # raises RoomFileError with the problems
            new = spec.receivers[-1]
            if all(s.position is not None for s in spec.sources) and spec.shape.is_box:
                assert new.position is not None
            else:
                assert set(new.distances) == {s.name for s in spec.sources}


def test_a_new_source_keeps_receivers_placed_by_distance_valid(catalog):
    """A receiver given by its distance to the only source, then a second source added: the
    receiver gets a 2 m distance to it (a starting value shown in its row), so the room is
    still computed; one with a position is left alone."""
    from pathlib import Path

    from roomcalc.io.roomfile import ReceiverSpec, check_room, parse_spec
    from roomcalc.study.edits import add_item

    path = Path(__file__).resolve().parents[1] / "example_rooms" / "garage-studio.toml"
    spec = parse_spec(path.read_text(encoding="utf-8"), str(path))
    spec.receivers = [ReceiverSpec(name="By ear", distances={s.name: 2.5 for s in spec.sources}),
                      ReceiverSpec(name="Placed", position=[1.0, 1.0, 1.2])]
    check_room(spec, catalog)
    at = add_item(spec, "sources")
    new = spec.sources[at].name
    assert spec.receivers[0].distances[new] == 2.0
    assert spec.receivers[1].distances == {}
    check_room(spec, catalog)


def test_new_sources_do_not_share_a_point():
    """Each new source in a box room starts at its own point (they all started at one)."""
    from pathlib import Path

    from roomcalc.io.roomfile import parse_spec
    from roomcalc.study.edits import add_item

    path = Path(__file__).resolve().parents[1] / "example_rooms" / "workshop.toml"
    spec = parse_spec(path.read_text(encoding="utf-8"), str(path))
    spec.sources = []
    for _ in range(7):
        add_item(spec, "sources")
    points = [tuple(s.position) for s in spec.sources]
    assert len(set(points)) == len(points)
    box = spec.shape
    assert all(0 < x < box.length and 0 < y < box.width and 0 < z < box.height
               for x, y, z in points)
