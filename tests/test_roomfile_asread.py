"""A room file with problems read as far as it goes (roomcalc.io.roomfile.asread), for the
interface to open and fix: the room's check finds exactly the problems the command line finds
in the file (`roomcalc check` reads the file itself: that reader is the reference), saving
writes back what could not be held, and an edited field's value stands."""

from __future__ import annotations

import tomllib

import pytest
import tomli_w
from hypothesis import given

from roomcalc.io.errors import RoomFileError
from roomcalc.io.roomfile import (check_room, parse_spec, parse_spec_as_read, read_room,
                                  settle_as_read, spec_to_dict, spec_to_toml,
                                  spec_to_toml_keeping)
from roomcalc.study.edits import set_item_fields
from roomcalc.study.fixes import (add_version, remove_key, unknown_keys, use_key,
                                  version_missing)

from conftest import EXAMPLES
from test_roomfile_fuzz import FUZZ, documents, text_mutations

NAME = "room.toml"
CLASSROOM = (EXAMPLES / "classroom.toml").read_text(encoding="utf-8")


def _edit(*pairs, text=CLASSROOM) -> str:
    for old, new in pairs:
        assert text.count(old) == 1, old
        text = text.replace(old, new)
    return text


def _file_problems(text, catalog, folder) -> set | None:
    """What the command line's reader finds in the text as a file (None: a good room)."""
    path = folder / NAME
    path.write_text(text, encoding="utf-8")
    try:
        read_room(path, catalog)
    except RoomFileError as exc:
        return {(p.where, p.message) for p in exc.problems}
    return None


def _spec_problems(spec, catalog) -> set | None:
    try:
        check_room(spec, catalog, NAME)
    except RoomFileError as exc:
        return {(p.where, p.message) for p in exc.problems}
    return None


def _same_problems(text, catalog, folder):
    """The spec as read has the file's problems; written out (plain, or over the text) it
    reads back with the same problems: nothing the user wrote is lost on saving."""
    try:
        parse_spec(text, NAME)
    except RoomFileError as exc:
        if exc.problems[0].where.startswith("line") or not exc.problems[0].where:
            with pytest.raises(RoomFileError):      # not TOML: refused by both
                parse_spec_as_read(text, NAME)
            return
    spec = parse_spec_as_read(text, NAME)
    want = _file_problems(text, catalog, folder)
    assert _spec_problems(spec, catalog) == want
    for written in (spec_to_toml(spec), spec_to_toml_keeping(spec, text)):
        assert _file_problems(written, catalog, folder) == want
    assert spec_to_toml_keeping(spec, text) == spec_to_toml_keeping(
        parse_spec_as_read(spec_to_toml_keeping(spec, text), NAME), text)


@FUZZ
@given(doc=documents())
def test_corrupted_documents_keep_every_problem(doc, catalog, tmp_path_factory):
    _same_problems(tomli_w.dumps(doc), catalog, tmp_path_factory.mktemp("doc"))


@FUZZ
@given(text=text_mutations())
def test_mutated_examples_keep_every_problem(text, catalog, tmp_path_factory):
    _same_problems(text, catalog, tmp_path_factory.mktemp("text"))


def test_a_good_file_reads_as_parse_spec_reads_it():
    assert parse_spec_as_read(CLASSROOM, NAME) == parse_spec(CLASSROOM, NAME)


def test_bad_values_stay_where_they_are_and_give_way_to_an_edit(catalog):
    text = _edit(("area = 2.4", "area = -2.4"), ("relative_humidity = 50.0",
                                                  "relative_humidity = 150"),
                 ('name = "Door"\narea = 2.0\nface = "back"',
                  'name = "Door"\narea = "two"\nface = "bak"'))
    spec = parse_spec_as_read(text, NAME)
    # A number out of range is in its field, as the interface keeps a value typed so.
    assert spec.surfaces[2].area == -2.4 and spec.air.relative_humidity == 150
    # What the field cannot hold is kept as read, with the field as the reader left it.
    door = spec.surfaces[5]
    assert door.area is None and door.face is None
    assert door.as_read == {"area": ("two", None), "face": ("bak", None)}
    assert {w for w, _ in _spec_problems(spec, catalog)} == {
        "surfaces[2].area", "air.relative_humidity", "surfaces[5].area", "surfaces[5].face"}
    # Edited, the field's value stands; cleared again later, the old text does not come back.
    set_item_fields(spec, "surfaces", 5, {"area": 2.0, "face": "back"})
    settle_as_read(spec)
    assert door.as_read == {}
    set_item_fields(spec, "surfaces", 5, {"area": None})
    assert "area" not in spec_to_dict(spec)["surfaces"][5]


def test_unknown_keys_are_named_read_as_meant_or_removed(catalog):
    text = _edit(("temperature = 21.0", "temprature = 21.0"),
                 ('name = "Door"\narea = 2.0', 'name = "Door"\naera = 2.0\nsupplier = "Acme"'),
                 ("version = 1\n", ""))
    spec = parse_spec_as_read(text, NAME)
    got = [(u.where, u.meant) for u in unknown_keys(spec)]
    assert got == [("air.temprature", "temperature"), ("surfaces[5].aera", "area"),
                   ("surfaces[5].supplier", None)]
    assert version_missing(spec)
    assert {w for w, _ in _spec_problems(spec, catalog)} == {
        "version", "air.temprature", "surfaces[5].aera", "surfaces[5].supplier"}
    use_key(spec, "air", "temprature", "temperature")
    use_key(spec, "surfaces[5]", "aera", "area")
    assert spec.air.temperature == 21.0 and spec.surfaces[5].area == 2.0
    with pytest.raises(ValueError, match="gives 'area' already"):
        spec.surfaces[5].unknown_keys["aera"] = 3.0
        use_key(spec, "surfaces[5]", "aera", "area")
    remove_key(spec, "surfaces[5]", "aera")
    remove_key(spec, "surfaces[5]", "supplier")
    add_version(spec)
    assert _spec_problems(spec, catalog) is None
    saved = spec_to_toml_keeping(spec, text)
    assert tomllib.loads(saved)["air"] == {"temperature": 21.0, "relative_humidity": 50.0}
    assert "aera" not in saved and "supplier" not in saved and "version = 1" in saved
