"""No wrong or unreadable numbers from a file that was accepted.

What a reliability run found, each with the test that proves it fixed:

1. an empty name or id (``material = ""``) was accepted and its item silently left out;
2. a receiver nearer a source than the engine allows passed the loader and failed later with a
   message naming neither file nor field;
3. values such as ``directivity = 5e-324`` or ``volume = 1e-12`` were accepted and gave
   ``-inf`` levels, RT 0.00 s and columns that run together;
4. outputs held ``-inf`` / ``-Infinity`` (strict JSON parsers refuse those);
5. an 80 kB file with one 40,000-part dotted key took 24 s and 6 GB in the TOML parser.

The engine limits the loader must enforce first are read from the engine itself (its
constants and its checks), so the two cannot drift apart.
"""

from __future__ import annotations

import json
import math
import re
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from roomcalc.cli import main
from roomcalc.engine.analysis import evaluate
from roomcalc.io.errors import RoomFileError
from roomcalc.io.roomfile import read_room

from conftest import EXAMPLES, ROOT

BOX = """\
version = 1
units = "metric"

[shape]
length = 5.0
width = 4.0
height = 3.0

[[surfaces]]
name = "Floor"
face = "floor"
material = "concrete-floor-painted"

[[surfaces]]
name = "Walls and ceiling"
area = 74.0
alpha = [0.02, 0.02, 0.03, 0.03, 0.04, 0.05]

[[objects]]
name = "Audience"
count = 100
material = "person-seated"

[[sources]]
name = "Fan"
sound_power = [80.0, 80.0, 80.0, 80.0, 80.0, 80.0]
position = [1.0, 1.0, 1.0]

[[receivers]]
name = "Desk"
position = [4.0, 3.0, 1.2]
hours = 8.0
source_hours = { "Fan" = 4.0 }

[target]
currency = "EUR"
rt60_max = 0.8
max_level_dba = { "Desk" = 85.0 }

[[candidates]]
name = "Panels"
surface = "Walls and ceiling"
material = "mineral-wool-50mm-48kg"
cost_per_m2 = 40.0
"""


def edit(*pairs, text=BOX):
    """BOX with each (old, new) replaced once; old must be there exactly once."""
    for old, new in pairs:
        assert text.count(old) == 1, f"{old!r} is not in the file exactly once"
        text = text.replace(old, new)
    return text


def refused(tmp_path, catalog, text, name="room.toml") -> list[str]:
    """The problems ``read_room`` reports, each "field: message" after checking the file
    name leads it."""
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    with pytest.raises(RoomFileError) as info:
        read_room(path, catalog)
    lines = [str(p) for p in info.value.problems]
    assert lines and all(line.startswith(f"{path}: ") for line in lines)
    return [line[len(f"{path}: "):] for line in lines]


def cli(capsys, *argv):
    code = main(list(argv))
    out = capsys.readouterr()
    return code, out.out, out.err


def test_the_base_room_is_accepted(tmp_path, catalog):
    path = tmp_path / "room.toml"
    path.write_text(BOX, encoding="utf-8")
    spec, room = read_room(path, catalog)
    assert len(room.surfaces) == 2 and len(room.objects) == 1
    evaluate(room)


# ----------------------------------------------------------------------------- 1. empty names

EMPTY_NAMES = [
    # (edit, field path as the user sees it)
    (('material = "person-seated"', 'material = ""'), "objects[0].material"),
    (('material = "concrete-floor-painted"', 'material = "  "'), "surfaces[0].material"),
    (('name = "Floor"', 'name = ""'), "surfaces[0].name"),
    (('name = "Audience"', 'name = " "'), "objects[0].name"),
    (('name = "Desk"', 'name = ""'), "receivers[0].name"),
    (('currency = "EUR"', 'currency = ""'), "target.currency"),
    (('rt60_max = 0.8', 'criterion = ""'), "target.criterion"),
    (('name = "Panels"', 'name = ""'), "candidates[0].name"),
    (('surface = "Walls and ceiling"', 'surface = ""'), "candidates[0].surface"),
    (('material = "mineral-wool-50mm-48kg"', 'material = ""'), "candidates[0].material"),
    (('position = [1.0, 1.0, 1.0]', 'position = [1.0, 1.0, 1.0]\nplacement = ""'),
     "sources[0].placement"),
]


@pytest.mark.parametrize("pair, field", EMPTY_NAMES, ids=[f for _, f in EMPTY_NAMES])
def test_an_empty_name_or_id_is_refused_with_its_field(tmp_path, catalog, pair, field):
    got = refused(tmp_path, catalog, edit(pair))
    assert f"{field}: is empty: give a value, or leave the key out" in got, got


def test_an_empty_source_name_is_refused(tmp_path, catalog):
    text = edit(('name = "Fan"', 'name = ""'), ('source_hours = { "Fan" = 4.0 }', ''))
    got = refused(tmp_path, catalog, text)
    assert "sources[0].name: is empty: give a value, or leave the key out" in got


@pytest.mark.parametrize("pair, field", [
    (('source_hours = { "Fan" = 4.0 }', 'source_hours = { "" = 4.0 }'),
     'receivers[0].source_hours.""'),
    (('position = [4.0, 3.0, 1.2]', 'position = [4.0, 3.0, 1.2]\ndistances = { " " = 3.0 }'),
     'receivers[0].distances." "'),
    (('max_level_dba = { "Desk" = 85.0 }', 'max_level_dba = { "" = 85.0 }'),
     'target.max_level_dba.""'),
])
def test_an_empty_name_as_a_key_is_refused(tmp_path, catalog, pair, field):
    got = refused(tmp_path, catalog, edit(pair))
    assert any(g.startswith(f"{field}: is an empty name: give the name of a ") for g in got), got


def test_check_never_says_ok_for_a_file_with_an_empty_material(tmp_path, capsys):
    # The reliability run: "ok (6 surfaces)" for a file with 7, a 100-person audience gone.
    path = tmp_path / "room.toml"
    path.write_text(edit(('material = "person-seated"', 'material = ""')), encoding="utf-8")
    code, out, err = cli(capsys, "check", str(path))
    assert code == 2 and "ok (" not in out
    assert f"{path}: objects[0].material: is empty" in err
    assert "Traceback" not in err


CATALOGUE_ENTRY = """\
[[materials]]
id = "test-panel"
name = "Test panel"
category = "user"
kind = "surface"
source = "invented for a test"
values = { 125 = 0.1, 250 = 0.2, 500 = 0.3, 1000 = 0.4, 2000 = 0.5, 4000 = 0.6 }
"""


@pytest.mark.parametrize("old, new, field", [
    ('id = "test-panel"', 'id = ""', "materials[0].id"),
    ('name = "Test panel"', 'name = " "', "materials[0].name"),
    ('source = "invented for a test"', 'source = ""', "materials[0].source"),
])
def test_an_empty_text_in_a_catalogue_file_is_refused(tmp_path, old, new, field):
    from roomcalc.io.catalog import load_catalog_file

    path = tmp_path / "mine.toml"
    path.write_text(edit((old, new), text=CATALOGUE_ENTRY), encoding="utf-8")
    with pytest.raises(RoomFileError) as info:
        load_catalog_file(path)
    got = [str(p) for p in info.value.problems]
    assert f"{path}: {field}: is empty: give a value" in got, got


def test_a_catalogue_object_value_outside_its_range_is_refused(tmp_path):
    from roomcalc.io.catalog import load_catalog_file

    path = tmp_path / "mine.toml"
    path.write_text(edit(('kind = "surface"', 'kind = "object"'), ("125 = 0.1", "125 = 1e9"),
                         text=CATALOGUE_ENTRY), encoding="utf-8")
    with pytest.raises(RoomFileError) as info:
        load_catalog_file(path)
    assert [str(p) for p in info.value.problems] == [
        f"{path}: materials[0].values.125: 1e+09 is outside 0 to 1000 m^2"]


@pytest.mark.parametrize("key", ["title", "source", "governs"])
def test_an_empty_text_in_a_criteria_file_is_refused(tmp_path, key):
    from roomcalc.io.criteria import load_criteria_file

    shipped = (ROOT / "materials" / "criteria" / "reverberation.toml").read_text(encoding="utf-8")
    text, n = re.subn(rf'(?m)^{key} = ".*"$', f'{key} = ""', shipped, count=1)
    if n == 0:      # the value is written over several lines
        text, n = re.subn(rf'(?ms)^{key} = """.*?"""', f'{key} = ""', shipped, count=1)
    assert n == 1
    path = tmp_path / "criteria.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(RoomFileError) as info:
        load_criteria_file(path)
    assert any(str(p).startswith(f"{path}: criteria[0].{key}: is empty: give a value")
               for p in info.value.problems), info.value.problems


# ----------------------------------------------------------------------------- 2. engine limits

def test_a_receiver_a_hair_from_a_source_is_refused_by_the_loader(tmp_path, catalog, capsys):
    text = edit(('position = [4.0, 3.0, 1.2]', 'position = [1.0, 1.0, 1.0000001]'))
    got = refused(tmp_path, catalog, text)
    assert got == ["receivers[0].position: [1.0, 1.0, 1.0000001] is 1e-07 m from source "
                   "'Fan'; a receiver must be at least 0.01 m from each source"]
    # and the command line says the same, never the engine's message
    code, out, err = cli(capsys, "report", str(tmp_path / "room.toml"))
    assert code == 2 and "receivers[0].position" in err and "distance to a source" not in err


def test_positions_too_far_apart_are_refused_as_a_distance_would_be(tmp_path, catalog):
    text = edit(("length = 5.0\nwidth = 4.0\nheight = 3.0", "volume = 60.0"),
                ('face = "floor"', "area = 20.0"),
                ('position = [1.0, 1.0, 1.0]', 'position = [-9000.0, 0.0, 0.0]'),
                ('position = [4.0, 3.0, 1.2]', 'position = [9000.0, 0.0, 0.0]'))
    assert refused(tmp_path, catalog, text) == [
        "receivers[0].position: [9000.0, 0.0, 0.0] is 1.8e+04 m from source 'Fan'; a "
        "receiver must be at most 10000 m from each source"]


def test_a_given_distance_below_the_engine_limit_is_refused(tmp_path, catalog):
    text = edit(('position = [4.0, 3.0, 1.2]',
                 'position = [4.0, 3.0, 1.2]\ndistances = { "Fan" = 0.0005 }'))
    assert refused(tmp_path, catalog, text) == [
        "receivers[0].distances.Fan: 0.0005 is outside 0.01 to 10000 m"]


def test_the_loader_ranges_lie_inside_the_engine_limits():
    # The engine's own limits, read from the engine: the loader must refuse first.
    from roomcalc.engine.air import ABSOLUTE_ZERO_C
    from roomcalc.engine.exposure import MAX_DAY_HOURS
    from roomcalc.engine.receivers import MIN_DISTANCE_M
    from roomcalc.engine.planner.inputs import ALPHA_MAX as PLANNER_ALPHA_MAX
    from roomcalc.io.limits import RANGES

    assert RANGES["distance"].low >= MIN_DISTANCE_M
    assert RANGES["hours"].high == MAX_DAY_HOURS and RANGES["hours"].low == 0.0
    assert RANGES["temperature"].low > ABSOLUTE_ZERO_C
    assert 0.0 <= RANGES["relative_humidity"].low and RANGES["relative_humidity"].high <= 100.0
    assert RANGES["pressure_kpa"].low > 0.0
    assert RANGES["alpha"].high <= PLANNER_ALPHA_MAX
    for key in ("volume", "length", "area", "directivity", "step", "area_each", "rt60_limit"):
        assert RANGES[key].low > 0.0, key       # the engine checks these as positive
    for key, r in RANGES.items():
        assert math.isfinite(r.low) and math.isfinite(r.high) and r.low < r.high, key


# Every range at both ends, one key at a time, in a room that is otherwise ordinary: the
# loader accepts it and the engine evaluates it to finite numbers, never a ValueError.
EXTREMES = [
    ("length = 5.0", "length = {}", "length"),
    ("area = 74.0", "area = {}", "area"),
    ("count = 100", "count = {}", "object_count"),
    ("position = [1.0, 1.0, 1.0]", "position = [1.0, 1.0, 1.0]\ndirectivity = {}", "directivity"),
    ("sound_power = [80.0, 80.0, 80.0, 80.0, 80.0, 80.0]", "sound_power = [{0}, {0}, {0}, {0}, "
     "{0}, {0}]", "sound_power"),
    ("alpha = [0.02, 0.02, 0.03, 0.03, 0.04, 0.05]", "alpha = [{0}, {0}, {0}, {0}, {0}, {0}]",
     "alpha"),
    ('units = "metric"', 'units = "metric"\n[air]\ntemperature = {}', "temperature"),
    ('units = "metric"', 'units = "metric"\n[air]\nrelative_humidity = {}', "relative_humidity"),
    ('units = "metric"', 'units = "metric"\n[air]\npressure_kpa = {}', "pressure_kpa"),
    ("hours = 8.0\nsource_hours = { \"Fan\" = 4.0 }", "hours = {}", "hours"),
    ('position = [4.0, 3.0, 1.2]', 'distances = {{ "Fan" = {} }}', "distance"),
]


@pytest.mark.parametrize("end", ["low", "high"])
@pytest.mark.parametrize("old, new, key", EXTREMES, ids=[k for _, _, k in EXTREMES])
def test_each_range_end_is_accepted_and_evaluates_to_finite_numbers(tmp_path, catalog, old,
                                                                    new, key, end):
    from roomcalc.io.limits import RANGES

    x = getattr(RANGES[key], end)
    text = edit((old, new.format(repr(float(x)) if key != "object_count" else int(x))))
    if key == "length":     # positions would fall outside a 0.1 m box: distances instead
        text = text.replace("position = [1.0, 1.0, 1.0]\n", "").replace(
            "position = [4.0, 3.0, 1.2]", 'distances = { "Fan" = 3.0 }')
    path = tmp_path / "room.toml"
    path.write_text(text, encoding="utf-8")
    spec, room = read_room(path, catalog)
    res = evaluate(room)
    for v in res.rt60_s.values():
        assert np.all(np.isfinite(v)) and np.all(v > 0)
    for r in res.receivers:
        assert np.all(np.isfinite(r.level_db)) and math.isfinite(r.level_dba)


def test_the_loader_refuses_before_the_engine_at_the_extremes(tmp_path, catalog):
    # Fuzz-like: many corner rooms; read_room either refuses with a RoomFileError or the
    # engine evaluates the room. A ValueError from the engine is a defect of the loader.
    from roomcalc.io.limits import RANGES

    rng = np.random.default_rng(7)
    tried = evaluated = 0
    for _ in range(150):
        picks = {k: (RANGES[k].low, RANGES[k].high)[rng.integers(2)] for k in RANGES}
        vol = picks["volume"]
        side = vol ** (1 / 3)
        text = f"""\
version = 1
[air]
temperature = {picks['temperature']!r}
relative_humidity = {picks['relative_humidity']!r}
pressure_kpa = {picks['pressure_kpa']!r}
[shape]
volume = {vol!r}
[[surfaces]]
area = {float(min(max(6 * side * side, RANGES['area'].low), RANGES['area'].high))!r}
alpha = {[picks['alpha']] * 6!r}
count = {int(picks['surface_count'])}
[[objects]]
count = {picks['object_count']!r}
absorption = {[picks['absorption']] * 6!r}
[[sources]]
name = "S"
sound_power = {[picks['sound_power']] * 6!r}
directivity = {picks['directivity']!r}
[[receivers]]
distances = {{ "S" = {picks['distance']!r} }}
hours = {picks['hours']!r}
"""
        path = tmp_path / "corner.toml"
        path.write_text(text, encoding="utf-8")
        tried += 1
        try:
            spec, room = read_room(path, catalog)
        except RoomFileError:
            continue
        res = evaluate(room)
        evaluated += 1
        for v in res.rt60_s.values():
            assert np.all(np.isfinite(v)), text
        assert all(np.all(np.isfinite(r.level_db)) for r in res.receivers), text
    assert evaluated == tried                   # every corner is a room the loader accepts


# ----------------------------------------------------------------------------- 3. ranges

@pytest.mark.parametrize("pair, expected", [
    (('position = [1.0, 1.0, 1.0]', 'position = [1.0, 1.0, 1.0]\ndirectivity = 5e-324'),
     "sources[0].directivity: 4.94066e-324 is outside 0.1 to 100 (Q)"),
    (("length = 5.0\nwidth = 4.0\nheight = 3.0", "volume = 1e-12"),
     "shape.volume: 1e-12 is outside 1 to 1e+06 m^3"),
    (("length = 5.0", "length = 0.01"), "shape.length: 0.01 is outside 0.1 to 1000 m"),
    (("length = 5.0\nwidth = 4.0\nheight = 3.0", "length = 0.5\nwidth = 0.5\nheight = 0.5"),
     "shape: the box's volume, 0.125 m^3 (length x width x height), is outside 1 to 1e+06 m^3"),
    (("area = 74.0", "area = 1e-9"), "surfaces[1].area: 1e-09 is outside 0.001 to 100000 m^2"),
    (("count = 100", "count = 1e9"), "objects[0].count: 1e+09 is outside 0 to 100000 units"),
    (('hours = 8.0\nsource_hours = { "Fan" = 4.0 }', "hours = 25.0"),
     "receivers[0].hours: 25 is outside 0 to 24 h per day"),
    (("rt60_max = 0.8", "rt60_max = 1e-9"), "target.rt60_max: 1e-09 is outside 0.05 to 20 s"),
    (('{ "Desk" = 85.0 }', '{ "Desk" = 1e5 }'),
     "target.max_level_dba.Desk: 100000 is outside 0 to 200 dB(A)"),
    (("cost_per_m2 = 40.0", "cost_per_m2 = 1e300"),
     "candidates[0].cost_per_m2: 1e+300 is outside 0 to 1e+09 per m^2"),
    (("cost_per_m2 = 40.0", "cost_per_m2 = 40.0\nstep = 1e-12"),
     "candidates[0].step: 1e-12 is outside 0.001 to 100000 m^2"),
])
def test_a_value_outside_its_range_is_refused_with_field_and_range(tmp_path, catalog, pair,
                                                                   expected):
    got = refused(tmp_path, catalog, edit(pair))
    assert expected in got, got


def test_an_imperial_file_is_told_its_ranges_in_feet(tmp_path, catalog):
    text = edit(('units = "metric"', 'units = "imperial"'),
                ("length = 5.0\nwidth = 4.0\nheight = 3.0", "volume = 20.0"),
                ('face = "floor"', 'area = 200.0'),
                ("area = 74.0", "area = 0.001"),
                ('position = [1.0, 1.0, 1.0]', ''),
                ('position = [4.0, 3.0, 1.2]', 'distances = { "Fan" = 0.02 }'),
                ('surface = "Walls and ceiling"\n', ''),
                ('cost_per_m2 = 40.0', 'absorption = [1.0, 1.0, 1.0, 1.0, 1.0, 1.0]'),
                ('material = "mineral-wool-50mm-48kg"\n', ''))
    got = refused(tmp_path, catalog, text)
    assert "shape.volume: 20 is outside 35.3147 to 3.53147e+07 ft^3" in got, got
    assert "surfaces[1].area: 0.001 is outside 0.0107639 to 1.07639e+06 ft^2" in got, got
    assert "receivers[0].distances.Fan: 0.02 is outside 0.0328084 to 32808.4 ft" in got, got


def test_the_documented_ranges_are_the_ones_in_force():
    from roomcalc.io.limits import ranges_table

    from roomcalc.io import limits

    doc = (ROOT / "docs" / "room-files.md").read_text(encoding="utf-8")
    assert ranges_table() in doc
    assert f"| file size | at most {limits.MAX_FILE_BYTES:,} bytes " in doc
    assert f"| line length | at most {limits.MAX_LINE_CHARS:,} characters |" in doc
    assert f"in a key or a table header | at most {limits.MAX_KEY_PARTS} |" in doc
    assert f"(`[[1]]` is 2) | at most {limits.MAX_NESTING} |" in doc


def test_wide_numbers_keep_their_columns_apart():
    from roomcalc.present.tables import BandRows

    for bands in ([125, 250, 500, 1000, 2000, 4000], [63, 125, 250, 500, 1000, 2000, 4000, 8000]):
        rows = BandRows("RT60 [s]", bands)
        rows.add("Sabine", [8900.123, 190000.0, -12345.6, 0.5, 1e7, 3.0][:len(bands)]
                 + [1.0] * (len(bands) - 6))
        line = rows.text().splitlines()[1]
        assert len(line.split()) == 1 + len(bands), line


# ----------------------------------------------------------------------------- 4. outputs

BAD_TOKEN = re.compile(r"(?<![A-Za-z])(nan|inf|infinity)(?![A-Za-z])", re.IGNORECASE)


def _no_bad_numbers(text: str, what: str):
    m = BAD_TOKEN.search(text)
    assert m is None, f"{what}: {m.group()!r} in ...{text[max(0, m.start() - 80):m.end() + 40]}"


def _strict_json(text: str, what: str):
    def refuse(name):
        raise AssertionError(f"{what}: JSON holds {name}")
    return json.loads(text, parse_constant=refuse)


EDGE_ROOMS = {
    # A clerk by a quiet fan all day: below the range of the OSHA formula.
    "quiet-worker": edit(("sound_power = [80.0, 80.0, 80.0, 80.0, 80.0, 80.0]",
                          "sound_power = [20.0, 20.0, 20.0, 20.0, 20.0, 20.0]")),
    # Far beyond the room from the source (distances given).
    "far-receiver": edit(('position = [4.0, 3.0, 1.2]', 'distances = { "Fan" = 10000.0 }')),
    # Every surface as absorbing as the range allows.
    "dead-room": edit(("alpha = [0.02, 0.02, 0.03, 0.03, 0.04, 0.05]",
                       "alpha = [1.2, 1.2, 1.2, 1.2, 1.2, 1.2]"),
                      ('material = "concrete-floor-painted"',
                       "alpha = [1.2, 1.2, 1.2, 1.2, 1.2, 1.2]")),
    # No absorption but the air's, in hot humid air where the air absorbs least.
    "live-room": edit(("alpha = [0.02, 0.02, 0.03, 0.03, 0.04, 0.05]",
                       "alpha = [0.0, 0.0, 0.0, 0.0, 0.0, 0.0]"),
                      ('material = "concrete-floor-painted"',
                       "alpha = [0.0, 0.0, 0.0, 0.0, 0.0, 0.0]"),
                      ("count = 100", "count = 0"),
                      ('units = "metric"', 'units = "metric"\n[air]\ntemperature = 60.0\n'
                       'relative_humidity = 100.0')),
}


def _room_files(tmp_path) -> list[Path]:
    files = sorted(EXAMPLES.glob("*.toml"))
    for name, text in EDGE_ROOMS.items():
        p = tmp_path / f"{name}.toml"
        p.write_text(text, encoding="utf-8")
        files.append(p)
    return files


def test_no_output_holds_nan_or_infinity(tmp_path, capsys):
    files = _room_files(tmp_path)
    runs = []
    for f in files:
        for fmt in ("text", "markdown", "json", "csv"):
            runs.append(("report", str(f), "--format", fmt))
            runs.append(("compare", str(f), str(files[0]), "--format", fmt))
        for fmt in ("text", "json"):
            runs.append(("check", str(f), "--format", fmt))
            runs.append(("plan", str(f), "--format", fmt))
    for fmt in ("text", "markdown", "json", "csv"):
        runs.append(("materials", "--format", fmt))
    seen = 0
    for argv in runs:
        code, out, err = cli(capsys, *argv)
        out, err = (x.replace(str(tmp_path), "<tmp>") for x in (out, err))   # its name has nan
        what = " ".join(argv)
        if argv[0] == "compare" and code == 2:   # a formula unavailable for one of the two
            assert "Traceback" not in err and err.startswith("roomcalc: "), what
            continue
        if argv[0] == "plan" and code == 2:      # a room without [target]: nothing to plan
            assert "has no [target] table" in err and "Traceback" not in err, what
            continue
        assert code in (0, 1), f"{what}: exit {code}: {err}"
        assert out.strip(), what
        _no_bad_numbers(out, what)
        _no_bad_numbers(err, what)
        if "json" in argv:
            _strict_json(out, what)
        seen += 1
    assert seen >= len(runs) - len(files)         # nearly every run gave an output


def test_the_quiet_worker_is_below_the_formula_not_minus_infinity(tmp_path, capsys):
    from roomcalc.present.numbers import NO_VALUE

    p = tmp_path / "quiet.toml"
    p.write_text(EDGE_ROOMS["quiet-worker"], encoding="utf-8")
    code, out, _ = cli(capsys, "report", str(p))
    assert code == 0 and f"(TWA {NO_VALUE}" in out
    code, out, _ = cli(capsys, "report", str(p), "--format", "json")
    exposure = _strict_json(out, "json")["exposure"]["Desk"]
    assert exposure["osha_twa_dba"] is None and exposure["osha_dose_percent"] == 0.0
    code, out, _ = cli(capsys, "report", str(p), "--format", "csv")
    assert f"osha_twa,Desk,dBA,,,,,,,{NO_VALUE}" in out.splitlines()


def test_the_live_room_report_keeps_its_columns(tmp_path, capsys):
    # Eight bands (narrower columns) and RT of thousands of seconds at 63 Hz: every number
    # stays a number of its own.
    text = EDGE_ROOMS["live-room"].split("[target]")[0]
    text = text.replace('units = "metric"', 'units = "metric"\n'
                        "bands_hz = [63, 125, 250, 500, 1000, 2000, 4000, 8000]")
    text = re.sub(r"\[\[objects\]\][^\[]*", "", text)
    for x in ("0.0", "80.0"):
        text = text.replace("[" + ", ".join([x] * 6) + "]", "[" + ", ".join([x] * 8) + "]")
    p = tmp_path / "live.toml"
    p.write_text(text, encoding="utf-8")
    code, out, err = cli(capsys, "report", str(p))
    assert code == 0, err
    lines = out.splitlines()
    for head in ("RT60 [s]", "Room  ", "Critical dist."):
        start = next(i for i, x in enumerate(lines) if x.startswith(head))
        for line in lines[start + 1:]:
            if not line.strip() or line.startswith("  "):
                break
            cells = line[26:].split()
            assert len(cells) == 8 and all(re.fullmatch(r"-?[\d.]+(e[+-]\d+)?", x)
                                           for x in cells), line


# ----------------------------------------------------------------------------- 5. size guard

LAST = BOX.count("\n") + 1                  # the line after BOX
HOSTILE = "a" + ".a" * 39999 + " = 1\n"       # 80 kB, one key of 40,000 parts


def test_the_hostile_dotted_key_is_refused_before_parsing(tmp_path, catalog, capsys):
    path = tmp_path / "hostile.toml"
    path.write_text(HOSTILE, encoding="utf-8")
    got = refused(tmp_path, catalog, HOSTILE, name="hostile.toml")
    assert got == ["line 1: a dotted key has more than 8 parts; keys of at most 8 parts are "
                   "read (room files use 2 or 3)"]
    code, out, err = cli(capsys, "check", str(path))
    assert code == 2 and f"{path}: line 1: a dotted key has more than 8 parts" in err


def test_a_dotted_key_of_many_parts_on_a_short_line_is_refused(tmp_path, catalog):
    text = BOX + "x" + ".x" * 8 + " = 1\n"
    assert refused(tmp_path, catalog, text)[0].startswith(
        f"line {LAST}: a dotted key has more than 8 parts")


def test_a_dotted_table_header_counts_its_parts_too(tmp_path, catalog):
    text = BOX + "[" + ".".join(["t"] * 40) + "]\n"
    assert refused(tmp_path, catalog, text)[0].startswith(f"line {LAST}: a dotted key has more")


def test_dots_in_values_and_strings_are_not_key_parts(tmp_path, catalog):
    # Numbers, strings and comments hold dots that are no key's; the box file stays good.
    text = edit(('currency = "EUR"', 'currency = "' + "." * 100 + '"  # ' + "." * 100))
    path = tmp_path / "room.toml"
    path.write_text(text, encoding="utf-8")
    read_room(path, catalog)


def test_deep_brackets_are_refused_before_parsing(tmp_path, catalog):
    text = BOX + "y = " + "[" * 9 + "]" * 9 + "\n"
    assert refused(tmp_path, catalog, text) == [
        f"line {LAST}: arrays or inline tables are nested more than 8 deep; at most 8 "
        "levels are read"]


def test_a_long_line_is_refused(tmp_path, catalog):
    from roomcalc.io.limits import MAX_LINE_CHARS

    text = BOX + 'z = "' + "z" * MAX_LINE_CHARS + '"\n'
    assert refused(tmp_path, catalog, text) == [
        f"line {LAST}: is {MAX_LINE_CHARS + 6:,} characters long; lines of at most "
        f"{MAX_LINE_CHARS:,} are read"]


def test_a_file_too_large_is_refused_without_reading_it(tmp_path, catalog):
    from roomcalc.io.limits import MAX_FILE_BYTES

    path = tmp_path / "huge.toml"
    with open(path, "wb") as f:
        f.write(b"# " + b"x" * 60 + b"\n")
        f.truncate(MAX_FILE_BYTES + 1)       # a sparse file: no need to write 4 MB
    with pytest.raises(RoomFileError) as info:
        read_room(path, catalog)
    assert str(info.value) == (f"{path}: is {MAX_FILE_BYTES + 1:,} bytes; roomcalc reads data "
                               f"files of at most {MAX_FILE_BYTES:,} bytes (4 MB; a room of "
                               "2,000 surfaces is about 200 kB)")


def test_a_room_of_2000_surfaces_passes_the_guard(tmp_path, catalog):
    panels = "".join(f'\n[[surfaces]]\nname = "Panel {i}"\narea = 0.5\n'
                     "alpha = [0.1, 0.2, 0.3, 0.4, 0.5, 0.6]\n" for i in range(2000))
    path = tmp_path / "big.toml"
    path.write_text(BOX + panels, encoding="utf-8")
    spec, room = read_room(path, catalog)
    assert len(room.surfaces) == 2002


def test_the_guard_covers_catalogue_and_criteria_files(tmp_path):
    from roomcalc.io.catalog import load_catalog_file
    from roomcalc.io.criteria import load_criteria_file

    for loader, name in ((load_catalog_file, "mine.toml"), (load_criteria_file, "crit.toml")):
        path = tmp_path / name
        path.write_text(HOSTILE, encoding="utf-8")
        with pytest.raises(RoomFileError) as info:
            loader(path)
        assert str(info.value).startswith(f"{path}: line 1: a dotted key has more than 8 parts")


GUARD_FUZZ = settings(max_examples=150, deadline=None,
                      suppress_health_check=[HealthCheck.too_slow])


@GUARD_FUZZ
@given(st.text(alphabet=st.sampled_from(list("ab.=[]{},\"'#\n 1")), max_size=200))
def test_the_guard_refuses_only_with_a_room_file_error(text):
    from roomcalc.io.checks import read_toml

    try:
        read_toml(text, "f.toml")
    except RoomFileError as exc:
        assert all(p.file == "f.toml" for p in exc.problems)
