"""Every way a room file can be wrong gives a problem naming the file, the field path, the value
and what is allowed, all problems at once, exit status 2 from the command line, never a
traceback. One small bad file per failure, each made from GOOD by one edit.

The expected texts are the messages the file format promises (docs/room-files.md); the ranges
are those of the format: areas and volumes above 0, alpha 0 to 1.2, relative humidity 0 to 100 %,
box sides up to 1000 m (1000 / 0.3048 = 3280.84 ft, the foot being 0.3048 m exactly).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from roomcalc import cli
from roomcalc.io.catalog import load_catalog
from roomcalc.io.errors import RoomFileError
from roomcalc.io.roomfile import (check_room, parse_spec, read_room, resolve, spec_to_dict,
                                  spec_to_toml)

from conftest import EXAMPLES

GOOD = """\
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

[[sources]]
name = "Fan"
sound_power = [80.0, 80.0, 80.0, 80.0, 80.0, 80.0]
position = [1.0, 1.0, 1.0]

[[receivers]]
name = "Desk"
position = [4.0, 3.0, 1.2]
"""

SIX = "one per band: 125, 250, 500, 1000, 2000, 4000 Hz"


def edit(*pairs, text=GOOD):
    """GOOD with each (old, new) replaced once; old must be there, so an edit cannot miss."""
    for old, new in pairs:
        assert text.count(old) == 1, f"{old!r} is not in the file exactly once"
        text = text.replace(old, new)
    return text


def problems(tmp_path, catalog, text, name="room.toml"):
    """The problem lines read_room reports for a file holding text."""
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    with pytest.raises(RoomFileError) as info:
        read_room(path, catalog)
    lines = [str(p) for p in info.value.problems]
    assert lines and all(line.startswith(f"{path}: ") for line in lines)
    assert str(info.value) == "\n".join(lines)
    return [line[len(f"{path}: "):] for line in lines]


def only(tmp_path, catalog, text):
    """The single problem of a file (without the file name)."""
    found = problems(tmp_path, catalog, text)
    assert len(found) == 1, found
    return found[0]


def test_the_good_file_is_good(tmp_path, catalog):
    # Every bad file below is GOOD plus one edit, so GOOD itself must be accepted.
    path = tmp_path / "room.toml"
    path.write_text(GOOD)
    spec, room = read_room(path, catalog)
    assert room.volume == pytest.approx(60.0)
    assert room.surfaces[0].area == pytest.approx(20.0)   # the floor: 5 m x 4 m
    assert room.receivers[0].position == (4.0, 3.0, 1.2)


# ----------------------------------------------------------------------------- values

@pytest.mark.parametrize("area, shown", [("-2.0", "-2"), ("0.0", "0"), ("-0.5", "-0.5")])
def test_area_not_above_zero(tmp_path, catalog, area, shown):
    got = only(tmp_path, catalog, edit(("area = 74.0", f"area = {area}")))
    assert got == f"surfaces[1].area: {shown} is outside 0.001 to 100000 m^2"


@pytest.mark.parametrize("volume", ["0.0", "-10.0"])
def test_volume_not_above_zero(tmp_path, catalog, volume):
    text = edit(("length = 5.0\nwidth = 4.0\nheight = 3.0", f"volume = {volume}"),
                ('face = "floor"\n', 'area = 20.0\n'))
    text = text.replace("position = [1.0, 1.0, 1.0]", "").replace("position = [4.0, 3.0, 1.2]",
                                                                  "distances = { Fan = 3.0 }")
    got = only(tmp_path, catalog, text)
    assert got == (f"shape.volume: {volume[:-2]} is outside 1 to 1e+06 m^3")


def test_negative_box_side(tmp_path, catalog):
    got = problems(tmp_path, catalog, edit(("width = 4.0", "width = -4.0")))
    assert got == ["shape.width: -4 is outside 0.1 to 1000 m"]


def test_alpha_above_range_names_the_element(tmp_path, catalog):
    # The example message of the file format, element index counted from 0.
    got = only(tmp_path, catalog, edit(("[0.02, 0.02, 0.03, 0.03,", "[0.02, 0.02, 0.03, 1.7,")))
    assert got == "surfaces[1].alpha[3]: 1.7 is outside 0 to 1.2"


def test_alpha_below_range(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(("[0.02, 0.02,", "[-0.1, 0.02,")))
    assert got == "surfaces[1].alpha[0]: -0.1 is outside 0 to 1.2"


def test_alpha_at_the_limits_is_accepted(tmp_path, catalog):
    path = tmp_path / "room.toml"
    path.write_text(edit(("[0.02, 0.02, 0.03, 0.03, 0.04, 0.05]", "[0, 0.02, 0.03, 1.2, 0.04, 1.2]")))
    _, room = read_room(path, catalog)
    assert room.surfaces[1].alpha.tolist() == [0.0, 0.02, 0.03, 1.2, 0.04, 1.2]


@pytest.mark.parametrize("values, n", [("[0.02, 0.02, 0.03, 0.03, 0.04]", 5),
                                       ("[0.02, 0.02, 0.03, 0.03, 0.04, 0.05, 0.06]", 7),
                                       ("[]", 0)])
def test_alpha_list_of_wrong_length(tmp_path, catalog, values, n):
    got = only(tmp_path, catalog, edit(("[0.02, 0.02, 0.03, 0.03, 0.04, 0.05]", values)))
    assert got == f"surfaces[1].alpha: has {n} values; 6 are needed ({SIX})"


def test_alpha_not_a_list(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(("[0.02, 0.02, 0.03, 0.03, 0.04, 0.05]", "0.3")))
    assert got == "surfaces[1].alpha: must be a list of numbers, not a number"


def test_non_numbers_in_a_list_each_reported(tmp_path, catalog):
    got = problems(tmp_path, catalog, edit(("[0.02, 0.02, 0.03, 0.03, 0.04, 0.05]",
                                            '["a", 0.02, true, 0.03, 0.04, nan]')))
    assert got == ["surfaces[1].alpha[0]: must be a number, not text",
                   "surfaces[1].alpha[2]: must be a number, not true/false",
                   "surfaces[1].alpha[5]: nan is not a finite number"]


@pytest.mark.parametrize("humidity", ["150.0", "-5.0", "100.5"])
def test_humidity_outside_0_to_100(tmp_path, catalog, humidity):
    text = edit(('units = "metric"\n', f'units = "metric"\n\n[air]\nrelative_humidity = {humidity}\n'))
    got = only(tmp_path, catalog, text)
    assert got == f"air.relative_humidity: {float(humidity):g} is outside 0 to 100 %"


def test_count_not_whole(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(("area = 74.0", "area = 30.0\ncount = 2.5")))
    assert got == "surfaces[1].count: must be a whole number, not 2.5"


def test_count_zero(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(("area = 74.0", "area = 30.0\ncount = 0")))
    assert got == "surfaces[1].count: 0 is outside 1 to 10000 units"


def test_integer_too_large_for_a_float(tmp_path, catalog):
    # tomllib reads integers of any length; one beyond float range must not crash float().
    got = only(tmp_path, catalog, edit(("area = 74.0", "area = 30.0\ncount = 1" + "0" * 400)))
    assert got == "surfaces[1].count: a whole number of 401 digits is far too large"


# ----------------------------------------------------------------------------- materials

def test_unknown_material_with_nearest(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(('"concrete-floor-painted"', '"concrete-flor-painted"')))
    assert got == ("surfaces[0].material: unknown material 'concrete-flor-painted'; did you mean "
                   "'concrete-floor-painted'? (search with: roomcalc materials WORDS)")


def test_surface_using_an_object_material(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(('"concrete-floor-painted"', '"person-seated"')))
    assert got == ("surfaces[0].material: 'person-seated' is a material of kind object; "
                   "surfaces need kind surface")


def test_object_using_a_surface_material(tmp_path, catalog):
    text = GOOD + '\n[[objects]]\nname = "Chair"\ncount = 2\nmaterial = "plaster-on-masonry"\n'
    got = only(tmp_path, catalog, text)
    assert got == ("objects[0].material: 'plaster-on-masonry' is a material of kind surface; "
                   "objects need kind object")


# The room files of a room listing 63 or 8000 Hz: GOOD with seven or eight values per list.
# plaster-on-masonry has 125-4000 Hz only; concrete-floor-painted has 63-8000 Hz.
@pytest.mark.parametrize("band, bands", [(63, "[63, 125, 250, 500, 1000, 2000, 4000]"),
                                         (8000, "[125, 250, 500, 1000, 2000, 4000, 8000]")])
def test_band_the_material_lacks(tmp_path, catalog, band, bands):
    text = edit(('units = "metric"\n', f'units = "metric"\nbands_hz = {bands}\n'),
                ('"concrete-floor-painted"', '"plaster-on-masonry"'),
                ("0.04, 0.05]", "0.04, 0.05, 0.05]"), ("80.0, 80.0]", "80.0, 80.0, 80.0]"))
    got = only(tmp_path, catalog, text)
    assert got == (f"surfaces[0].material: 'plaster-on-masonry' has no value at {band} Hz "
                   f"(it gives 125-4000 Hz); give the coefficients inline or remove {band} "
                   "from bands_hz")
    # The same room with a material that has the band is accepted.
    path = tmp_path / "ok.toml"
    path.write_text(text.replace('"plaster-on-masonry"', '"concrete-floor-painted"'))
    _, room = read_room(path, catalog)
    assert band in room.bands_hz and room.surfaces[0].alpha.shape == (7,)


def test_inline_material_bad_id(tmp_path, catalog):
    text = GOOD + ('\n[[materials]]\nid = "My Panel"\nname = "My panel"\nkind = "surface"\n'
                   'source = "invented for a test"\n'
                   'values = { 125 = 0.1, 250 = 0.3, 500 = 0.6, 1000 = 0.8, 2000 = 0.9, '
                   '4000 = 0.9 }\n')
    got = only(tmp_path, catalog, text)
    assert got == ("materials[0].id: 'My Panel' must be lowercase words joined by hyphens "
                   "(letters a-z, digits), e.g. 'mineral-wool-50mm'")


def test_inline_material_missing_a_band(tmp_path, catalog):
    text = GOOD + ('\n[[materials]]\nid = "my-panel"\nname = "My panel"\nkind = "surface"\n'
                   'source = "invented for a test"\n'
                   'values = { 125 = 0.1, 250 = 0.3, 500 = 0.6, 1000 = 0.8, 2000 = 0.9 }\n')
    got = only(tmp_path, catalog, text)
    assert got == "materials[0].values: missing bands 4000 Hz (125 to 4000 Hz are required)"


def test_inline_material_value_out_of_range_and_not_a_band(tmp_path, catalog):
    text = GOOD + ('\n[[materials]]\nid = "my-panel"\nname = "My panel"\nkind = "surface"\n'
                   'source = "invented for a test"\n'
                   'values = { 100 = 0.1, 125 = 0.1, 250 = 0.3, 500 = 1.5, 1000 = 0.8, '
                   '2000 = 0.9, 4000 = 0.9 }\n')
    assert problems(tmp_path, catalog, text) == [
        "materials[0].values.100: '100' is not a band; allowed: 63, 125, 250, 500, 1000, 2000, "
        "4000, 8000 Hz",
        "materials[0].values.500: 1.5 is outside 0 to 1.2 (alpha)"]


def test_inline_material_used_by_a_surface(tmp_path, catalog):
    text = edit(('"concrete-floor-painted"', '"my-panel"')) + (
        '\n[[materials]]\nid = "my-panel"\nname = "My panel"\nkind = "surface"\n'
        'source = "invented for a test"\n'
        'values = { 125 = 0.1, 250 = 0.3, 500 = 0.6, 1000 = 0.8, 2000 = 0.9, 4000 = 0.9 }\n')
    path = tmp_path / "room.toml"
    path.write_text(text)
    _, room = read_room(path, catalog)
    assert room.surfaces[0].alpha.tolist() == [0.1, 0.3, 0.6, 0.8, 0.9, 0.9]


def test_inline_material_id_already_in_the_catalogue(tmp_path, catalog):
    # Reported with the field path, and with the file's other problems (here a typo).
    text = edit(('"concrete-floor-painted"', '"concrete-flor-painted"')) + (
        '\n[[materials]]\nid = "plaster-on-masonry"\nname = "Mine"\nkind = "surface"\n'
        'source = "invented for a test"\n'
        'values = { 125 = 0.1, 250 = 0.3, 500 = 0.6, 1000 = 0.8, 2000 = 0.9, 4000 = 0.9 }\n')
    got = problems(tmp_path, catalog, text)
    assert len(got) == 2
    assert got[0] == ("materials[0].id: 'plaster-on-masonry' is already defined in "
                      f"{catalog['plaster-on-masonry'].file}")
    assert got[0].endswith("hard-surfaces.toml")
    assert got[1].startswith("surfaces[0].material: unknown material 'concrete-flor-painted'")


CAT_ENTRY = """\
[[materials]]
id = "{id}"
name = "Test panel {n}"
category = "user"
kind = "surface"
values = {{ 125 = 0.1, 250 = 0.2, 500 = 0.4, 1000 = 0.6, 2000 = 0.7, 4000 = 0.7 }}
source = "invented for a test"
"""


def test_duplicate_id_across_two_catalogue_files_names_both(tmp_path):
    a, b = tmp_path / "first-cat.toml", tmp_path / "second-cat.toml"
    a.write_text(CAT_ENTRY.format(id="test-panel", n=1))
    b.write_text(CAT_ENTRY.format(id="test-panel", n=2))
    with pytest.raises(RoomFileError) as info:
        load_catalog([a, b], include_user=False)
    (p,) = info.value.problems
    assert str(p) == f"{b}: materials id 'test-panel': is already defined in {a}"


def test_duplicate_id_across_catalog_options_on_the_command_line(tmp_path, capsys):
    a, b = tmp_path / "first-cat.toml", tmp_path / "second-cat.toml"
    a.write_text(CAT_ENTRY.format(id="test-panel", n=1))
    b.write_text(CAT_ENTRY.format(id="test-panel", n=2))
    room = tmp_path / "room.toml"
    room.write_text(GOOD)
    code = cli.main(["check", str(room), "--catalog", str(a), "--catalog", str(b)])
    out, err = capsys.readouterr()
    assert code == 2 and out == ""
    assert "first-cat.toml" in err and "second-cat.toml" in err and "'test-panel'" in err
    assert "Traceback" not in err
    # A catalogue file adds its materials: one file alone makes 'test-panel' usable.
    room.write_text(edit(('"concrete-floor-painted"', '"test-panel"')))
    assert cli.main(["check", str(room), "--catalog", str(a)]) == 0
    assert capsys.readouterr().out.startswith(f"{room}: ok (2 surfaces")


# ----------------------------------------------------------------------------- structure

def test_broken_toml_names_line_and_column(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(("length = 5.0", "length = = 5.0")))
    assert got.startswith("line 5, column 10: not valid TOML: ")


def test_broken_toml_unclosed_table_header(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(("[shape]", "[shape")))
    assert got.startswith("line 4, column ") and "not valid TOML" in got


def test_broken_toml_integer_too_long_to_read(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(("area = 74.0", "area = " + "7" * 5000)))
    assert got == "not valid TOML: a number has too many digits to read"


def test_broken_toml_nested_too_deeply(tmp_path, catalog):
    got = only(tmp_path, catalog, GOOD + "x = " + "[" * 5000 + "]" * 5000 + "\n")
    assert got == ("line 27: arrays or inline tables are nested more than 8 deep; at most 8 "
                   "levels are read")


def test_file_not_utf8_and_missing_file(tmp_path, catalog):
    bad = tmp_path / "latin1.toml"
    bad.write_bytes(GOOD.replace("Desk", "Bureau \u00e9t\u00e9").encode("latin-1"))
    with pytest.raises(RoomFileError) as info:
        read_room(bad, catalog)
    at = len(GOOD.split("Desk")[0].encode("latin-1")) + len("Bureau ")
    assert str(info.value) == f"{bad}: cannot read it: not UTF-8 text (byte 0xe9 at position {at})"
    with pytest.raises(RoomFileError) as info:
        read_room(tmp_path / "nowhere.toml", catalog)
    assert str(info.value) == f"{tmp_path / 'nowhere.toml'}: no such file"


@pytest.mark.parametrize("old, new, expected", [
    ("length = 5.0", "lenght = 5.0", "shape.lenght: unknown key 'lenght'; did you mean 'length'?"),
    ('units = "metric"', 'units = "metric"\ntitel = "x"',
     "titel: unknown key 'titel'; did you mean 'title'?"),
    ('name = "Floor"', 'name = "Floor"\nalpah = 0.1',
     "surfaces[0].alpah: unknown key 'alpah'; did you mean 'alpha'?"),
    ('name = "Fan"', 'name = "Fan"\nsoundpower = 80',
     "sources[0].soundpower: unknown key 'soundpower'; did you mean 'sound_power'?"),
    ('name = "Desk"', 'name = "Desk"\nqqq = 1',
     "receivers[0].qqq: unknown key 'qqq'; known keys: name, position, distances, hours, "
     "source_hours"),
])
def test_unknown_key_names_the_nearest_known_one(tmp_path, catalog, old, new, expected):
    got = problems(tmp_path, catalog, edit((old, new)))
    assert got[0] == expected
    if old.startswith("length"):
        # The misspelt key also leaves the box incomplete; both are said.
        assert got[1:] == ["shape: a box needs length, width and height; only width, height given"]
    else:
        assert len(got) == 1


def test_missing_version(tmp_path, catalog):
    assert only(tmp_path, catalog, edit(("version = 1\n", ""))) == "version: is required (a number)"


@pytest.mark.parametrize("version, expected", [
    ("2", "version: 2 is not a version this roomcalc reads (it reads 1)"),
    ("0", "version: 0 is not a version this roomcalc reads (it reads 1)"),
    ('"1"', "version: must be a whole number, not text"),
    ("1.0", "version: must be a whole number, not 1.0"),
])
def test_wrong_version(tmp_path, catalog, version, expected):
    assert only(tmp_path, catalog, edit(("version = 1", f"version = {version}"))) == expected


def test_missing_shape(tmp_path, catalog):
    text = edit(("[shape]\nlength = 5.0\nwidth = 4.0\nheight = 3.0\n", ""))
    assert only(tmp_path, catalog, text) == "shape: is required (a table)"


def test_partial_box_length_only(tmp_path, catalog):
    text = edit(("width = 4.0\nheight = 3.0\n", ""))
    assert only(tmp_path, catalog, text) == ("shape: a box needs length, width and height; "
                                             "only length given")


def test_empty_shape(tmp_path, catalog):
    text = edit(("length = 5.0\nwidth = 4.0\nheight = 3.0\n", ""))
    assert only(tmp_path, catalog, text) == ("shape: give length, width and height (a box) or "
                                             "volume (a free shape)")


def test_no_surfaces(tmp_path, catalog):
    start, end = GOOD.index("[[surfaces]]"), GOOD.index("[[sources]]")
    got = only(tmp_path, catalog, GOOD[:start] + GOOD[end:])
    assert got == "surfaces: a room needs at least one [[surfaces]] entry"


def test_imperial_units_range(tmp_path, catalog):
    # 1000 m = 3280.84 ft: the largest box side, in feet (1 ft = 0.3048 m exactly).
    text = edit(('units = "metric"', 'units = "imperial"'), ("length = 5.0", "length = 4000.0"))
    assert only(tmp_path, catalog, text) == "shape.length: 4000 is outside 0.328084 to 3280.84 ft"
    # Temperature in degF: 100 degF (37.8 degC) is fine, 150 degF is not.
    air = '\n[air]\ntemperature = {}\n'
    ok = edit(('units = "metric"', 'units = "imperial"' + air.format("100.0")))
    path = tmp_path / "ok.toml"
    path.write_text(ok)
    _, room = read_room(path, catalog)
    assert room.air.temperature_c == pytest.approx((100.0 - 32.0) * 5.0 / 9.0)
    assert room.volume == pytest.approx(60.0 * 0.3048 ** 3)
    hot = edit(('units = "metric"', 'units = "imperial"' + air.format("150.0")))
    assert only(tmp_path, catalog, hot) == "air.temperature: 150 is outside -40 to 140 degF"
    # The same 100 is too hot in degC.
    metric = edit(('units = "metric"', 'units = "metric"' + air.format("100.0")))
    assert only(tmp_path, catalog, metric) == "air.temperature: 100 is outside -40 to 60 degC"


def test_unknown_units(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(('units = "metric"', 'units = "metrc"')))
    assert got == "units: 'metrc' is not one of metric, imperial (did you mean 'metric'?)"


@pytest.mark.parametrize("bands, expected", [
    ("[100, 125, 250, 500, 1000, 2000, 4000]",
     "bands_hz: [100] are not allowed; bands are octaves from 63, 125, 250, 500, 1000, 2000, "
     "4000, 8000 Hz"),
    ("[125, 250, 500, 1000, 2000]",
     "bands_hz: missing [4000]: 125 to 4000 Hz are always computed; 63 and 8000 Hz may be added"),
    ("[250, 125, 500, 1000, 2000, 4000]", "bands_hz: must list each band once, in rising order"),
    ("[125, 125, 250, 500, 1000, 2000, 4000]",
     "bands_hz: must list each band once, in rising order"),
    ('"all"', "bands_hz: must be a list of whole numbers such as [125, 250, 500, 1000, 2000, "
              "4000]"),
])
def test_bad_bands(tmp_path, catalog, bands, expected):
    got = problems(tmp_path, catalog, edit(('units = "metric"\n',
                                            f'units = "metric"\nbands_hz = {bands}\n')))
    assert got == [expected]


# ----------------------------------------------------------------------------- surfaces

def test_surface_with_neither_material_nor_alpha(tmp_path, catalog):
    text = edit(("alpha = [0.02, 0.02, 0.03, 0.03, 0.04, 0.05]\n", ""))
    assert only(tmp_path, catalog, text) == ("surfaces[1]: needs material (a catalogue id) or "
                                             f"alpha (a list, {SIX})")


def test_surface_with_both_material_and_alpha(tmp_path, catalog):
    text = edit(("area = 74.0", 'area = 74.0\nmaterial = "plaster-on-masonry"'))
    assert only(tmp_path, catalog, text) == "surfaces[1]: give either material or alpha, not both"


def test_surface_with_neither_area_nor_face(tmp_path, catalog):
    text = edit(('face = "floor"\n', ""))
    assert only(tmp_path, catalog, text) == ("surfaces[0].area: is required unless face names a "
                                             "box face")


def test_unknown_face(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(('face = "floor"', 'face = "flor"')))
    assert got.startswith("surfaces[0].face: 'flor' is not one of front, back, left, right, "
                          "floor, ceiling")


@pytest.mark.parametrize("area, count, taken", [("25.0", 1, "25.00"), ("20.0", 1, "20.00"),
                                                ("8.0", 3, "24.00")])
def test_face_area_inference_when_other_surfaces_take_it_all(tmp_path, catalog, area, count,
                                                              taken):
    # The floor of a 5 m x 4 m box is 20 m^2; a rug on it takes all of it or more.
    rug = f'\n[[surfaces]]\nname = "Rug"\nface = "floor"\narea = {area}\ncount = {count}\n' \
          'material = "plaster-on-masonry"\n'
    got = only(tmp_path, catalog, GOOD + rug)
    assert got == (f"surfaces[0].area: the other surfaces on face 'floor' take {taken} m^2 of "
                   "its 20.00; nothing is left for this one")


def test_face_area_inference_gives_the_rest(tmp_path, catalog):
    # Independent value: floor 5 x 4 = 20 m^2, less a 2 x 3 m^2 rug = 14 m^2.
    rug = '\n[[surfaces]]\nname = "Rug"\nface = "floor"\narea = 3.0\ncount = 2\n' \
          'material = "plaster-on-masonry"\n'
    path = tmp_path / "room.toml"
    path.write_text(GOOD + rug)
    _, room = read_room(path, catalog)
    assert room.surfaces[0].area == pytest.approx(14.0)


def test_two_surfaces_on_a_face_without_area(tmp_path, catalog):
    text = GOOD + '\n[[surfaces]]\nname = "Rug"\nface = "floor"\nmaterial = "plaster-on-masonry"\n'
    got = problems(tmp_path, catalog, text)
    assert got == ["surfaces[0].area: is required: another surface on face 'floor' has no area "
                   "either",
                   "surfaces[2].area: is required: another surface on face 'floor' has no area "
                   "either"]


def test_face_without_area_in_a_volume_room(tmp_path, catalog):
    text = edit(("length = 5.0\nwidth = 4.0\nheight = 3.0", "volume = 60.0"))
    assert only(tmp_path, catalog, text) == ("surfaces[0].area: is required: face 'floor' has no "
                                             "size because the shape is a volume, not a box")


# ----------------------------------------------------------------------------- sources, receivers

def test_source_with_both_sound_power_and_dba(tmp_path, catalog):
    got = problems(tmp_path, catalog, edit(('name = "Fan"', 'name = "Fan"\nsound_power_dba = 85.0')))
    assert got[0] == (f"sources[0]: give one of sound_power (dB re 1 pW, {SIX}), "
                      "sound_power_dba with spectrum, or level_dba_1m (dB(A) at 1 m) with "
                      "spectrum; this source gives sound_power and sound_power_dba")
    assert len(got) == 2 and got[1].startswith("sources[0].spectrum: is required")


def test_source_with_neither_sound_power_nor_dba(tmp_path, catalog):
    text = edit(("sound_power = [80.0, 80.0, 80.0, 80.0, 80.0, 80.0]\n", ""))
    assert only(tmp_path, catalog, text) == (f"sources[0]: give one of sound_power (dB re 1 pW, "
                                             f"{SIX}), sound_power_dba with spectrum, or "
                                             "level_dba_1m (dB(A) at 1 m) with spectrum")


def test_sound_power_dba_without_spectrum(tmp_path, catalog):
    text = edit(("sound_power = [80.0, 80.0, 80.0, 80.0, 80.0, 80.0]", "sound_power_dba = 85.0"))
    assert only(tmp_path, catalog, text) == ("sources[0].spectrum: is required with "
                                             "sound_power_dba; one of pink, white, brown, "
                                             "speech-male, voice-normal, voice-raised, "
                                             "table-saw, planer, guitar-combo, "
                                             "studio-monitors-mixing")


def test_level_at_1m_checked_and_exclusive(tmp_path, catalog):
    # A level at 1 m needs a spectrum, lies in its range, and goes alone.
    text = edit(("sound_power = [80.0, 80.0, 80.0, 80.0, 80.0, 80.0]", "level_dba_1m = 66.0"))
    assert only(tmp_path, catalog, text) == ("sources[0].spectrum: is required with "
                                             "level_dba_1m; one of pink, white, brown, "
                                             "speech-male, voice-normal, voice-raised, "
                                             "table-saw, planer, guitar-combo, "
                                             "studio-monitors-mixing")
    text = edit(("sound_power = [80.0, 80.0, 80.0, 80.0, 80.0, 80.0]",
                 'level_dba_1m = 190.0\nspectrum = "voice-raised"'))
    assert only(tmp_path, catalog, text) == \
        "sources[0].level_dba_1m: 190 is outside 0 to 180 dB(A)"
    text = edit(("sound_power = [80.0, 80.0, 80.0, 80.0, 80.0, 80.0]",
                 'level_dba_1m = 66.0\nsound_power_dba = 80.0\nspectrum = "pink"'))
    assert only(tmp_path, catalog, text).endswith(
        "this source gives sound_power_dba and level_dba_1m")


def test_unknown_spectrum(tmp_path, catalog):
    text = edit(("sound_power = [80.0, 80.0, 80.0, 80.0, 80.0, 80.0]",
                 'sound_power_dba = 85.0\nspectrum = "grey"'))
    got = only(tmp_path, catalog, text)
    assert got.startswith("sources[0].spectrum: 'grey' is not one of pink, white, brown, "
                          "speech-male")


def test_spectrum_without_a_band_of_the_room(tmp_path, catalog):
    # speech-male has no 63 Hz value; the room lists 63 Hz.
    text = edit(('units = "metric"\n', 'units = "metric"\nbands_hz = [63, 125, 250, 500, 1000, '
                 '2000, 4000]\n'),
                ("0.04, 0.05]", "0.04, 0.05, 0.05]"),
                ("sound_power = [80.0, 80.0, 80.0, 80.0, 80.0, 80.0]",
                 'sound_power_dba = 70.0\nspectrum = "speech-male"'))
    assert only(tmp_path, catalog, text) == "sources[0].spectrum: 'speech-male' has no value at 63 Hz"


def test_sound_power_out_of_range(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(("[80.0, 80.0, 80.0, 80.0, 80.0, 80.0]",
                                        "[80.0, 80.0, 80.0, 80.0, 80.0, 250.0]")))
    assert got == "sources[0].sound_power[5]: 250 is outside 0 to 200"


def test_unknown_placement(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(('name = "Fan"', 'name = "Fan"\nplacement = "wall"')))
    assert got.startswith("sources[0].placement: 'wall' is not one of free, surface, edge, corner")


def test_placement_and_directivity_together(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(('name = "Fan"',
                                        'name = "Fan"\nplacement = "free"\ndirectivity = 2.0')))
    assert got == "sources[0]: give either directivity (Q) or placement, not both"


def test_duplicate_source_names(tmp_path, catalog):
    second = '\n[[sources]]\nname = "Fan"\nsound_power = [70.0, 70.0, 70.0, 70.0, 70.0, 70.0]\n' \
             'position = [2.0, 2.0, 1.0]\n'
    assert only(tmp_path, catalog, GOOD + second) == ("sources[1].name: 'Fan' is used by another "
                                                      "source; names must differ")


def test_receiver_distance_to_an_unknown_source(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(('name = "Desk"', 'name = "Desk"\ndistances = { Fann = 2.0 }')))
    assert got == "receivers[0].distances.Fann: 'Fann' is not a source of this room (sources: Fan)"


def test_receiver_distance_not_above_zero(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(('name = "Desk"', 'name = "Desk"\ndistances = { Fan = 0.0 }')))
    assert got == "receivers[0].distances.Fan: 0 is outside 0.01 to 10000 m"


def test_receiver_with_no_way_to_get_a_distance(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(("position = [4.0, 3.0, 1.2]\n", "")))
    assert got == ("receivers[0]: has no distance to source 'Fan': give distances.\"Fan\" or "
                   "positions for both")


def test_receiver_at_the_source_position(tmp_path, catalog):
    # The engine needs a distance above 0; the file layer says so with the field path.
    got = only(tmp_path, catalog, edit(("position = [4.0, 3.0, 1.2]", "position = [1.0, 1.0, 1.0]")))
    assert got == ("receivers[0].position: [1.0, 1.0, 1.0] is where source 'Fan' is; a receiver "
                   "must be at least 0.01 m from each source")


@pytest.mark.parametrize("old, new, expected", [
    ("position = [1.0, 1.0, 1.0]", "position = [6.0, 1.0, 1.0]",
     "sources[0].position: [6.0, 1.0, 1.0] lies outside the box (0 to 5, 0 to 4, 0 to 3 m)"),
    ("position = [4.0, 3.0, 1.2]", "position = [4.0, -0.1, 1.2]",
     "receivers[0].position: [4.0, -0.1, 1.2] lies outside the box (0 to 5, 0 to 4, 0 to 3 m)"),
    ("position = [4.0, 3.0, 1.2]", "position = [4.0, 3.0, 3.01]",
     "receivers[0].position: [4.0, 3.0, 3.01] lies outside the box (0 to 5, 0 to 4, 0 to 3 m)"),
])
def test_position_outside_the_box(tmp_path, catalog, old, new, expected):
    assert only(tmp_path, catalog, edit((old, new))) == expected


def test_position_of_wrong_length(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(("position = [1.0, 1.0, 1.0]", "position = [1.0, 1.0]")))
    assert got == "sources[0].position: has 2 values; 3 are needed (x, y, z in m)"


# ----------------------------------------------------------------------------- all at once

def test_several_problems_all_reported(tmp_path, catalog):
    text = edit(("version = 1", "version = 3"),
                ("width = 4.0", "width = 0.0"),
                ('"concrete-floor-painted"', '"person-seated"'),
                ("area = 74.0", "area = -74.0\nzzz = \"red\""),
                ("[0.02, 0.02, 0.03, 0.03,", "[0.02, 0.02, 0.03, 1.7,"),
                ('name = "Fan"', 'name = "Fan"\nplacement = "wall"'),
                ('name = "Desk"', 'name = "Desk"\ndistances = { Fann = 2.0 }'))
    text = text.replace('units = "metric"\n', 'units = "metric"\n\n[air]\nrelative_humidity = 101\n')
    got = problems(tmp_path, catalog, text)
    assert got == [
        "version: 3 is not a version this roomcalc reads (it reads 1)",
        "air.relative_humidity: 101 is outside 0 to 100 %",
        "shape.width: 0 is outside 0.1 to 1000 m",
        "surfaces[1].zzz: unknown key 'zzz'; known keys: name, area, count, face, "
        "material, alpha",
        "surfaces[1].area: -74 is outside 0.001 to 100000 m^2",
        "surfaces[1].alpha[3]: 1.7 is outside 0 to 1.2",
        "sources[0].placement: 'wall' is not one of free, surface, edge, corner",
        "receivers[0].distances.Fann: 'Fann' is not a source of this room (sources: Fan)",
        # The catalogue's answer comes with the file's other problems, not after they are fixed.
        "surfaces[0].material: 'person-seated' is a material of kind object; surfaces need "
        "kind surface",
    ]


def test_resolve_problems_all_reported(tmp_path, catalog):
    # Problems only the catalogue and the box geometry reveal, three of them, in one report.
    text = edit(('"concrete-floor-painted"', '"no-such-material"'),
                ("area = 74.0", 'area = 74.0\nface = "ceiling"')) + (
        '\n[[surfaces]]\nname = "Ceiling"\nface = "ceiling"\nmaterial = "plaster-on-masonry"\n'
        '\n[[objects]]\nname = "Desk"\ncount = 1\nmaterial = "plaster-on-masonry"\n')
    got = problems(tmp_path, catalog, text)
    assert [g.split(":")[0] for g in got] == ["surfaces[0].material", "surfaces[2].area",
                                              "objects[0].material"]
    assert "unknown material 'no-such-material'" in got[0]
    assert "take 74.00 m^2 of its 20.00" in got[1]
    assert "kind surface; objects need kind object" in got[2]


# ----------------------------------------------------------------------------- command line

BAD = edit(("[0.02, 0.02, 0.03, 0.03,", "[0.02, 0.02, 0.03, 1.7,"),
           ('"concrete-floor-painted"', '"concrete-flor-painted"'))


@pytest.mark.parametrize("command", ["check", "report"])
def test_cli_bad_file_exit_2_problems_on_stderr(tmp_path, capsys, command):
    path = tmp_path / "bad-room.toml"
    path.write_text(BAD)
    code = cli.main([command, str(path)])
    out, err = capsys.readouterr()
    assert code == 2
    assert out == ""
    assert "Traceback" not in err
    lines = err.strip().splitlines()
    assert lines[0] == f"{path}: surfaces[1].alpha[3]: 1.7 is outside 0 to 1.2"
    assert lines[1].startswith(f"{path}: surfaces[0].material: unknown material "
                               "'concrete-flor-painted'; did you mean 'concrete-floor-painted'?")
    assert lines[2] == "roomcalc: 2 problems found; nothing was computed."


def test_cli_compare_with_a_bad_file(tmp_path, capsys):
    good, bad = tmp_path / "good.toml", tmp_path / "bad.toml"
    good.write_text(GOOD)
    bad.write_text(edit(("version = 1", "version = 2")))
    code = cli.main(["compare", str(good), str(bad)])
    out, err = capsys.readouterr()
    assert (code, out) == (2, "")
    assert err.splitlines()[0] == f"{bad}: version: 2 is not a version this roomcalc reads (it reads 1)"


@pytest.mark.parametrize("text", ["version = 1\n[shape\n", "\x00", "", "version = 1\n"])
def test_cli_broken_files_exit_2(tmp_path, capsys, text):
    path = tmp_path / "broken.toml"
    path.write_text(text)
    code = cli.main(["check", str(path)])
    out, err = capsys.readouterr()
    assert code == 2 and out == "" and "Traceback" not in err
    assert err.startswith(f"{path}: ")
    assert err.rstrip().splitlines()[-1].endswith("found; nothing was computed.")


def test_cli_missing_file(tmp_path, capsys):
    code = cli.main(["check", str(tmp_path / "nowhere.toml")])
    out, err = capsys.readouterr()
    assert (code, out) == (2, "")
    assert err.splitlines()[0] == f"{tmp_path / 'nowhere.toml'}: no such file"


@pytest.mark.parametrize("name", sorted(p.name for p in EXAMPLES.glob("*.toml")))
def test_cli_check_good_example_exits_0(capsys, name):
    path = EXAMPLES / name
    code = cli.main(["check", str(path)])
    out, err = capsys.readouterr()
    assert code == 0, err
    assert out.startswith(f"{path}: ok (")
    assert "Traceback" not in out + err


# ----------------------------------------------------------------------------- round trip

@pytest.mark.parametrize("name", sorted(p.name for p in EXAMPLES.glob("*.toml")))
def test_example_round_trips(name, catalog):
    text = (EXAMPLES / name).read_text(encoding="utf-8")
    spec = parse_spec(text, name)
    again = parse_spec(spec_to_toml(spec), name)
    assert spec_to_dict(again) == spec_to_dict(spec)
    a, b = resolve(spec, catalog, name), resolve(again, catalog, name)
    assert a.bands_hz == b.bands_hz and a.title == b.title
    assert a.volume == b.volume and a.dimensions == b.dimensions and a.air == b.air
    assert [(s.name, s.area, s.count, s.face, s.material) for s in a.surfaces] == \
        [(s.name, s.area, s.count, s.face, s.material) for s in b.surfaces]
    for x, y in zip(a.surfaces, b.surfaces):
        np.testing.assert_array_equal(x.alpha, y.alpha)
    assert len(a.objects) == len(b.objects) and len(a.sources) == len(b.sources)
    for x, y in zip(a.objects, b.objects):
        assert (x.name, x.count) == (y.name, y.count)
        np.testing.assert_array_equal(x.absorption, y.absorption)
    for x, y in zip(a.sources, b.sources):
        assert (x.name, x.directivity, x.position) == (y.name, y.directivity, y.position)
        np.testing.assert_array_equal(x.sound_power_db, y.sound_power_db)
    assert a.receivers == b.receivers


def test_round_trip_keeps_imperial_units_and_inline_materials(catalog):
    text = edit(('units = "metric"', 'units = "imperial"'),
                ('"concrete-floor-painted"', '"my-panel"')) + (
        '\n[[materials]]\nid = "my-panel"\nname = "My panel"\nkind = "surface"\n'
        'source = "invented for a test"\n'
        'values = { 125 = 0.1, 250 = 0.3, 500 = 0.6, 1000 = 0.8, 2000 = 0.9, 4000 = 0.9 }\n')
    spec = parse_spec(text, "r.toml")
    again = parse_spec(spec_to_toml(spec), "r.toml")
    assert spec_to_dict(again) == spec_to_dict(spec)
    a, b = resolve(spec, catalog, "r.toml"), resolve(again, catalog, "r.toml")
    # 5 x 4 x 3 ft = 60 ft^3 = 60 x 0.3048^3 m^3; floor 20 ft^2 = 20 x 0.3048^2 m^2.
    assert a.volume == b.volume == pytest.approx(60 * 0.3048 ** 3, rel=1e-12)
    assert a.surfaces[0].area == b.surfaces[0].area == pytest.approx(20 * 0.3048 ** 2, rel=1e-12)
    assert a.surfaces[0].alpha.tolist() == b.surfaces[0].alpha.tolist() == [0.1, 0.3, 0.6, 0.8,
                                                                            0.9, 0.9]
    assert math.dist(a.receivers[0].position, a.sources[0].position) == \
        pytest.approx(math.dist((4.0, 3.0, 1.2), (1.0, 1.0, 1.0)) * 0.3048)


# ----------------------------------------------------------------------------- planning keys

# GOOD with a working pattern, a [target] and one candidate of each kind (the example).
PLAN = GOOD.replace("position = [4.0, 3.0, 1.2]\n",
                    "position = [4.0, 3.0, 1.2]\nhours = 8.0\nsource_hours = { Fan = 2.5 }\n") + """
[target]
method = "eyring"
rt60_max = [1.0, 0.7, 0.6, 0.6, 0.6, 0.6]
max_level_dba = { "Desk" = 80.0 }

[[candidates]]
name = "Wall panel, 50 mm wool"
surface = "Walls and ceiling"
alpha = [0.20, 0.55, 0.95, 1.00, 0.95, 0.90]
max_area = 40.0
cost_per_m2 = 65.0

[[candidates]]
name = "Hanging baffle"
absorption = [0.30, 0.60, 1.10, 1.40, 1.40, 1.30]
max_count = 40
cost_each = 55.0
"""

ALL_CRITERIA = ("ansi-s12.60-2010-core, din-18041-2016-a1, din-18041-2016-a2, din-18041-2016-a3, "
                "din-18041-2016-a4, din-18041-2016-a5, bb93-primary-new, bb93-secondary-new, "
                "bb93-hearing-impaired, ebu-tech-3276-listening")


def test_the_good_planning_file_is_good(tmp_path, catalog):
    path = tmp_path / "room.toml"
    path.write_text(PLAN)
    spec, room = read_room(path, catalog)
    assert spec.target.rt60_max == [1.0, 0.7, 0.6, 0.6, 0.6, 0.6]
    assert spec.target.max_level_dba == {"Desk": 80.0}
    assert [c.name for c in spec.candidates] == ["Wall panel, 50 mm wool", "Hanging baffle"]
    assert (spec.receivers[0].hours, spec.receivers[0].source_hours) == (8.0, {"Fan": 2.5})
    # The planning keys change nothing of the room itself.
    plain = resolve(parse_spec(GOOD), catalog)
    assert [s.total_area for s in room.surfaces] == [s.total_area for s in plain.surfaces]
    text = spec_to_toml(spec)
    assert parse_spec(text) == spec and spec_to_toml(parse_spec(text)) == text


@pytest.mark.parametrize("old, new, expected", [
    # unknown keys name the nearest known key
    ("rt60_max = [1.0,", "rt60max = [1.0,",
     "target.rt60max: unknown key 'rt60max'; did you mean 'rt60_max'?"),
    ("max_count = 40", "max_count = 40\nareaeach = 1.0",
     "candidates[1].areaeach: unknown key 'areaeach'; did you mean 'area_each'?"),
    ('method = "eyring"', 'method = "eyring"\nzzz = 1',
     "target.zzz: unknown key 'zzz'; known keys: method, objective, currency, criterion, "
     "rt60_max, rt60_min, max_level_dba, max_level_db"),
    # a surface that does not exist lists the surfaces
    ('surface = "Walls and ceiling"', 'surface = "Walls"',
     "candidates[0].surface: 'Walls' is not a surface of this room (surfaces: Floor, Walls and "
     "ceiling)"),
    ('surface = "Walls and ceiling"', 'surface = "Walls and ceilings"',
     "candidates[0].surface: 'Walls and ceilings' is not a surface of this room; did you mean "
     "'Walls and ceiling'? (surfaces: Floor, Walls and ceiling)"),
    # band counts say how many
    ("alpha = [0.20, 0.55, 0.95, 1.00, 0.95, 0.90]", "alpha = [0.20, 0.55, 0.95, 1.00, 0.95]",
     f"candidates[0].alpha: has 5 values; 6 are needed ({SIX})"),
    ("1.40, 1.40, 1.30]", "1.40, 1.40, 1.30, 1.2]",
     f"candidates[1].absorption: has 7 values; 6 are needed ({SIX})"),
    ("rt60_max = [1.0, 0.7, 0.6, 0.6, 0.6, 0.6]", "rt60_max = [1.0, 0.7, 0.6]",
     f"target.rt60_max: has 3 values; 6 are needed ({SIX})"),
    # ranges
    # A candidate's alpha is 0 to 1.2, the catalogue's range, as a surface's.
    ("alpha = [0.20, 0.55,", "alpha = [0.20, 1.25,", "candidates[0].alpha[1]: 1.25 is outside 0 to 1.2"),
    ("alpha = [0.20, 0.55,", "alpha = [0.20, 1.55,", "candidates[0].alpha[1]: 1.55 is outside 0 to 1.2"),
    ("alpha = [0.20,", "alpha = [-0.20,", "candidates[0].alpha[0]: -0.2 is outside 0 to 1.2"),
    ("cost_per_m2 = 65.0", "cost_per_m2 = -65.0",
     "candidates[0].cost_per_m2: -65 is outside 0 to 1e+09 per m^2"),
    ("cost_each = 55.0", "cost_each = -55.0",
     "candidates[1].cost_each: -55 is outside 0 to 1e+09 per unit"),
    ("max_area = 40.0", "max_area = -40.0",
     "candidates[0].max_area: -40 is outside 0 to 1e+09 m^2"),
    ("max_count = 40", "max_count = -40",
     "candidates[1].max_count: -40 is outside 0 to 1e+06 units"),
    ("max_area = 40.0", "max_area = 40.0\nstep = 0.0",
     "candidates[0].step: 0 is outside 0.001 to 100000 m^2"),
    ('{ "Desk" = 80.0 }', '{ "Desk" = -80.0 }',
     "target.max_level_dba.Desk: -80 is outside 0 to 200 dB(A)"),
    ("rt60_max = [1.0,", "rt60_max = [0.0,",
     "target.rt60_max[0]: 0 is outside 0.05 to 20 s"),
    ("hours = 8.0", "hours = 25.0", "receivers[0].hours: 25 is outside 0 to 24 h per day"),
    ("{ Fan = 2.5 }", "{ Fan = 9.0 }",
     "receivers[0].source_hours.Fan: 9 h is more than hours (8 h): a source runs at most as long "
     "as the receiver is there"),
    ("hours = 8.0\n", "",
     "receivers[0].source_hours: needs hours (the hours per day at this position), which no "
     "source's hours may exceed"),
    # names that do not exist
    ('{ "Desk" = 80.0 }', '{ "Dsk" = 80.0 }',
     "target.max_level_dba.Dsk: 'Dsk' is not a receiver of this room (receivers: Desk)"),
    ("{ Fan = 2.5 }", "{ Fna = 2.5 }",
     "receivers[0].source_hours.Fna: 'Fna' is not a source of this room (sources: Fan)"),
    # which keys go together
    ('method = "eyring"', 'method = "eyring"\ncriterion = "din-18041-2016-a3"',
     "target: give either criterion or rt60_max, not both: keep criterion to plan to its "
     "published window, or keep rt60_max (and remove criterion) to plan to your own"),
    ("rt60_max = [1.0, 0.7, 0.6, 0.6, 0.6, 0.6]",
     "rt60_max = [1.0, 0.7, 0.6, 0.6, 0.6, 0.6]\nrt60_min = { 500 = 0.8 }",
     "target.rt60_min: 0.8 s at 500 Hz is above rt60_max (0.6 s); the window would be empty"),
    ("rt60_max = [1.0, 0.7, 0.6, 0.6, 0.6, 0.6]", "rt60_max = 0.6\nrt60_min = 0.7",
     "target.rt60_min: 0.7 s is above rt60_max (0.6 s); the window would be empty"),
    ("rt60_max = [1.0, 0.7, 0.6, 0.6, 0.6, 0.6]", "rt60_max = { 630 = 0.6 }",
     "target.rt60_max.630: '630' is not a band of this room (125, 250, 500, 1000, 2000, 4000 Hz)"),
    ("rt60_max = [1.0, 0.7, 0.6, 0.6, 0.6, 0.6]", 'rt60_max = "short"',
     f"target.rt60_max: must be a number (every band), a list ({SIX}) or a table by band such "
     "as { 500 = ..., 1000 = ... } (only those bands), not text"),
    # [target] method takes the five formulas of a room's top-level method
    ('method = "eyring"', 'method = "millingtin"',
     "target.method: 'millingtin' is not one of sabine, eyring, millington, fitzroy, "
     "arau_puchades (did you mean 'millington'?)"),
    ("max_area = 40.0", "max_area = 40.0\nmax_count = 3",
     "candidates[0].max_count: only goes with a candidate added as units (one without "
     "surface); this one covers a surface"),
    ("max_count = 40", "max_count = 40\nstep = 0.72",
     "candidates[1].step: only goes with a candidate that covers a surface: give surface (one "
     "of Floor, Walls and ceiling), or leave it out to add the candidate as units"),
    ("cost_per_m2 = 65.0", "cost_per_ft2 = 65.0",
     "candidates[0].cost_per_ft2: a metric file gives areas in m^2, so the cost per m^2: use "
     "cost_per_m2"),
    ("max_count = 40", "max_count = 2.5",
     "candidates[1].max_count: must be a whole number for whole units, not 2.5 (or set "
     "whole = false)"),
    ("max_count = 40", "max_count = 40\nwhole = 0",
     "candidates[1].whole: must be true or false, not a number"),
    ('name = "Hanging baffle"', 'name = "Wall panel, 50 mm wool"',
     "candidates[1].name: 'Wall panel, 50 mm wool' is used by another candidate; names must "
     "differ"),
    ('absorption = [0.30, 0.60, 1.10, 1.40, 1.40, 1.30]\n', '',
     "candidates[1]: give either material (a catalogue id of kind object) or absorption (m^2 "
     f"per unit, {SIX}); or surface, to cover part of a surface"),
])
def test_planning_key_problems(tmp_path, catalog, old, new, expected):
    assert only(tmp_path, catalog, edit((old, new), text=PLAN)) == expected


def test_planning_whole_units_limit_may_be_written_as_a_float(tmp_path, catalog):
    # 40.0 is a whole number (the interface types numbers as floats); 2.5 is not (above).
    path = tmp_path / "room.toml"
    path.write_text(edit(("max_count = 40", "max_count = 40.0"), text=PLAN))
    spec, _ = read_room(path, catalog)
    assert spec.candidates[1].max_count == 40.0 and spec.candidates[1].whole is None


def test_planning_costs_and_goals_are_needed_to_plan_not_to_read(tmp_path, catalog):
    # A room file may be a planning draft: a [target] without a goal yet, candidates without
    # costs. The room reads and evaluates; planning it says what is missing.
    from roomcalc.io.planning import resolve_candidates, resolve_goals

    text = edit(("rt60_max = [1.0, 0.7, 0.6, 0.6, 0.6, 0.6]\n", ""),
                ('max_level_dba = { "Desk" = 80.0 }\n', ""), ("cost_per_m2 = 65.0\n", ""),
                ("cost_each = 55.0\n", ""), text=PLAN)
    path = tmp_path / "draft.toml"
    path.write_text(text)
    spec, room = read_room(path, catalog)
    with pytest.raises(RoomFileError) as info:
        resolve_goals(spec, room, filename=str(path))
    assert str(info.value) == (f"{path}: target: sets no goal: give criterion, rt60_max or "
                               "rt60_min, max_level_dba or max_level_db")
    with pytest.raises(RoomFileError) as info:
        resolve_candidates(spec, room, catalog, filename=str(path))
    assert [f"{p.where}: {p.message}" for p in info.value.problems] == [
        "candidates[0].cost_per_m2: is required to plan for the least cost: the cost of 1 m^2 "
        "covered, 0 or more",
        "candidates[1].cost_each: is required to plan for the least cost: the cost of one "
        "unit, 0 or more"]
    # The least area needs no cost, but what one unit counts for.
    with pytest.raises(RoomFileError) as info:
        resolve_candidates(spec, room, catalog, objective="area")
    assert [f"{p.where}: {p.message}" for p in info.value.problems] == [
        "candidates[1].area_each: is required to plan for the least area: the area one unit "
        "counts for (m^2), above 0"]
    spec.candidates[1].area_each = 0.72
    panel, baffle = resolve_candidates(spec, room, catalog, objective="area")
    assert (panel.cost, baffle.cost, baffle.area_each) == (0.0, 0.0, 0.72)


def test_planning_unknown_criterion_lists_the_known(tmp_path, catalog):
    text = edit(("rt60_max = [1.0, 0.7, 0.6, 0.6, 0.6, 0.6]", 'criterion = "din-18041-a3"'),
                text=PLAN)
    assert only(tmp_path, catalog, text) == (
        "target.criterion: unknown criterion 'din-18041-a3'; did you mean 'din-18041-2016-a3'? "
        f"(known: {ALL_CRITERIA})")


@pytest.mark.parametrize("old, new, expected", [
    ('alpha = [0.20, 0.55, 0.95, 1.00, 0.95, 0.90]', 'material = "person-seated"',
     "candidates[0].material: 'person-seated' is a material of kind object; a candidate that "
     "covers a surface needs kind surface"),
    ('absorption = [0.30, 0.60, 1.10, 1.40, 1.40, 1.30]', 'material = "plaster-on-masonry"',
     "candidates[1].material: 'plaster-on-masonry' is a material of kind surface; a candidate "
     "added as units (without surface) needs kind object"),
    ('absorption = [0.30, 0.60, 1.10, 1.40, 1.40, 1.30]', 'material = "person-sated"',
     "candidates[1].material: unknown material 'person-sated'; did you mean 'person-seated'? "
     "(search with: roomcalc materials WORDS)"),
])
def test_planning_material_of_the_wrong_kind(tmp_path, catalog, old, new, expected):
    assert only(tmp_path, catalog, edit((old, new), text=PLAN)) == expected
    # check_room (the interface's path) says the same.
    with pytest.raises(RoomFileError) as info:
        check_room(parse_spec(edit((old, new), text=PLAN)), catalog)
    assert [f"{p.where}: {p.message}" for p in info.value.problems] == [expected]


def test_planning_imperial_costs_are_per_square_foot(tmp_path, catalog):
    text = edit(('units = "metric"', 'units = "imperial"'), text=PLAN)
    assert only(tmp_path, catalog, text) == ("candidates[0].cost_per_m2: an imperial file gives "
                                             "areas in ft^2, so the cost per ft^2: use "
                                             "cost_per_ft2")
    path = tmp_path / "ok.toml"
    path.write_text(text.replace("cost_per_m2", "cost_per_ft2"))
    spec, _ = read_room(path, catalog)
    assert spec.candidates[0].cost_per_ft2 == 65.0
    assert "cost_per_ft2 = 65.0" in spec_to_toml(spec)


def test_planning_surface_named_twice(tmp_path, catalog):
    text = edit(('name = "Floor"', 'name = "Walls and ceiling"'), text=PLAN)
    assert only(tmp_path, catalog, text) == (
        "candidates[0].surface: 'Walls and ceiling' names 2 surfaces (surfaces[0], "
        "surfaces[1]); give them different names so that one can be treated")


def test_planning_problems_all_reported_with_the_rest(tmp_path, catalog):
    text = edit(("area = 74.0", "area = -74.0"),
                ("rt60_max = [1.0, 0.7, 0.6, 0.6, 0.6, 0.6]", 'criterion = "no-such"'),
                ('{ "Desk" = 80.0 }', '{ "Dsk" = 80.0 }'),
                ("hours = 8.0", "hours = 30"),
                ("alpha = [0.20, 0.55, 0.95, 1.00, 0.95, 0.90]", 'material = "person-seated"'),
                ("cost_each = 55.0", "cost_each = -1"), text=PLAN)
    assert problems(tmp_path, catalog, text) == [
        "surfaces[1].area: -74 is outside 0.001 to 100000 m^2",
        "receivers[0].hours: 30 is outside 0 to 24 h per day",
        "target.max_level_dba.Dsk: 'Dsk' is not a receiver of this room (receivers: Desk)",
        "candidates[1].cost_each: -1 is outside 0 to 1e+09 per unit",
        # What the catalogue and the criteria library say comes in the same report.
        "candidates[0].material: 'person-seated' is a material of kind object; a candidate "
        "that covers a surface needs kind surface",
        f"target.criterion: unknown criterion 'no-such' (known: {ALL_CRITERIA})",
    ]


def test_planning_cli_check(tmp_path, capsys):
    path = tmp_path / "plan.toml"
    path.write_text(PLAN)
    assert cli.main(["check", str(path)]) == 0
    capsys.readouterr()
    path.write_text(edit(("max_count = 40", "max_count = -40"), text=PLAN))
    assert cli.main(["check", str(path)]) == 2
    out, err = capsys.readouterr()
    assert out == "" and err.splitlines()[0] == (
        f"{path}: candidates[1].max_count: -40 is outside 0 to 1e+06 units")


# ----------------------------------------------------------------------------- empty ids

@pytest.mark.parametrize("where, text", [
    ("surfaces[0].material", edit(('"concrete-floor-painted"', '""'))),
    ("objects[0].material",
     GOOD + '\n[[objects]]\nname = "Chairs"\ncount = 4\nmaterial = ""\n'),
    ("objects[0].material",
     GOOD + '\n[[objects]]\nname = "Chairs"\ncount = 4\nmaterial = "  "\n'),
    ("candidates[0].material",
     GOOD + '\n[[candidates]]\nname = "Baffle"\nmaterial = ""\ncost_each = 10.0\n'),
])
def test_empty_material_is_a_problem(tmp_path, catalog, where, text):
    # An empty id used to drop its surface or object from the room without a word.
    assert only(tmp_path, catalog, text) == f"{where}: is empty: give a value, or leave the key out"


def test_empty_material_in_an_edited_spec(catalog):
    # The interface's path (check_room) says the same of a spec edited to an empty id.
    spec = parse_spec(GOOD)
    spec.surfaces[0].material = ""
    with pytest.raises(RoomFileError) as info:
        check_room(spec, catalog)
    assert [str(p) for p in info.value.problems] == [
        "<room>: surfaces[0].material: is empty: give a value, or leave the key out"]


# ----------------------------------------------------------------------------- method

@pytest.mark.parametrize("method", ["sabine", "eyring", "millington", "fitzroy",
                                    "arau_puchades"])
def test_top_level_method_is_kept_and_written_back(method):
    spec = parse_spec(edit(('units = "metric"\n', f'units = "metric"\nmethod = "{method}"\n')))
    assert spec.method == method and spec.method_in_force == method
    text = spec_to_toml(spec)
    assert f'\nmethod = "{method}"\n' in text
    assert parse_spec(text) == spec


def test_method_in_force_comes_from_the_room_then_the_target():
    spec = parse_spec(GOOD)
    assert spec.method is None and spec.method_in_force is None      # the engine recommends
    spec = parse_spec(GOOD + '\n[target]\nmethod = "millington"\nrt60_max = 0.8\n')
    assert spec.method is None and spec.target.plan_method == "millington"
    assert spec.method_in_force == "millington"
    spec = parse_spec(GOOD + '\n[target]\nrt60_max = 0.8\n')
    assert spec.target.plan_method is None and spec.method_in_force is None   # no default
    same = edit(('units = "metric"\n', 'units = "metric"\nmethod = "fitzroy"\n')) + \
        '\n[target]\nmethod = "fitzroy"\n'
    assert parse_spec(same).method_in_force == "fitzroy"


def test_unknown_top_level_method(tmp_path, catalog):
    got = only(tmp_path, catalog, edit(('units = "metric"\n',
                                        'units = "metric"\nmethod = "eyrng"\n')))
    assert got == ("method: 'eyrng' is not one of sabine, eyring, millington, fitzroy, "
                   "arau_puchades (did you mean 'eyring'?)")


def test_two_different_methods_are_a_problem(tmp_path, catalog):
    text = edit(('units = "metric"\n', 'units = "metric"\nmethod = "sabine"\n')) + \
        '\n[target]\nmethod = "eyring"\n'
    assert only(tmp_path, catalog, text) == (
        "target.method: 'eyring' differs from the top-level method 'sabine'; the room is "
        "evaluated and planned with one formula: give it once (top-level method) or the same "
        "in both")
