"""Opening a room file with problems (an unknown material, a negative area, a misspelled key):
the interface opens it, shows every problem where it is, lets the user fix it there, and saving
writes the fixed room (Pilot). The problems shown are those `roomcalc check` finds in the same
file (the command line's reader, not the screen's code, is the reference); a room saved
before it is fixed keeps every word the user wrote."""

from __future__ import annotations

import tempfile

import pytest
from textual.command import CommandList

from roomcalc.cli import main as cli_main
from roomcalc.io.errors import RoomFileError
from roomcalc.io.roomfile import read_room
from roomcalc.present.places import problem_on_screen
from roomcalc.tui.app import AppConfig, make_app
from roomcalc.tui.document import Document
from roomcalc.tui.screens.dialogs import Ask
from roomcalc.tui.screens.file_fixes import FIX_KEYS_COMMAND
from roomcalc.tui.screens.main import MainScreen
from roomcalc.tui.screens.materials import MaterialChooser
from roomcalc.tui.widgets.results import FindingsStrip

SIZE = (120, 40)
MATERIAL_COL, AREA_COL = 4, 2          # columns of the surfaces table


@pytest.fixture(autouse=True)
def _private(tmp_path, monkeypatch):
    folder = tmp_path / "systemp"
    folder.mkdir()
    monkeypatch.setattr(tempfile, "tempdir", str(folder))
    monkeypatch.setenv("ROOMCALC_DATA_DIR", str(tmp_path / "data"))


def _bad_classroom(room_file):
    """The example classroom with three problems and a comment of the user's."""
    path = room_file("classroom.toml")
    text = path.read_text(encoding="utf-8")
    for old, new in (
            ('area = 2.4', 'area = -2.4  # measured on site'),          # negative area
            ('name = "Ceiling"\nface = "ceiling"\nmaterial = "plaster-on-masonry"',
             'name = "Ceiling"\nface = "ceiling"\nmaterial = "plaster-on-masonery"'),  # unknown
            ('area = 2.0', 'aera = 2.0')):                                # a misspelled key
        assert text.count(old) == 1
        text = text.replace(old, new)
    path.write_text(text, encoding="utf-8")
    return path


def _check_problems(path, capsys) -> list[str]:
    """What `roomcalc check` says of the file, one problem a line, without the file name."""
    code = cli_main(["check", str(path)])
    err = capsys.readouterr().err.splitlines()
    assert code == 2
    return [line[len(f"{path}: "):] for line in err[:-1]]


async def _settle(pilot):
    for _ in range(5):
        await pilot.pause()


def _row(doc, name: str) -> int:
    return next(i for i, s in enumerate(doc.spec.surfaces) if s.name == name)


async def test_open_a_room_with_problems_fix_it_in_place_and_save(room_file, catalog, capsys,
                                                                  pilot_keys, record_notes):
    path = _bad_classroom(room_file)
    found = _check_problems(path, capsys)
    assert len(found) == 3 and any("aera" in p for p in found)
    with pytest.raises(RoomFileError):
        read_room(path, catalog)

    doc = Document.open(path)             # the old code refused the file here
    app = make_app(doc, catalog, AppConfig(offer_recovery=False, theme="textual-dark"))
    notes = record_notes(app)
    async with app.run_test(size=SIZE) as pilot:
        await _settle(pilot)
        screen = app.screen
        assert isinstance(screen, MainScreen)
        # Every problem the command line finds, each named as the screen names its row.
        with pytest.raises(RoomFileError) as info:
            read_room(path, catalog)
        want = [problem_on_screen(p, doc.spec) for p in info.value.problems]
        assert sorted(screen.problems) == sorted(want)
        assert 'Surfaces row 3 "Windows", area: -2.4 is outside 0.001 to 100000 m^2' in want
        strip = str(screen.query_one(FindingsStrip).render())
        assert screen.problems[0] in strip      # the strip may fold the rest away
        # The user is told, once, what to do.
        said = [n for n in notes if n[1] == "warning" and "problems" in n[0]]
        assert len(said) == 1 and FIX_KEYS_COMMAND in said[0][0] and "'aera'" in said[0][0]
        # The bad value is in its cell, as written.
        cells = [str(c) for c in screen.query_one("#t-surfaces #table").get_row_at(
            _row(doc, "Windows"))]
        assert "-2.4" in cells

        # 1. The negative area: typed again in its cell.
        await pilot_keys.edit_cell(pilot, screen.query_one("#t-surfaces"),
                                   _row(doc, "Windows"), AREA_COL, "2.4")
        assert doc.spec.surfaces[_row(doc, "Windows")].area == 2.4
        assert not any("-2.4" in p for p in screen.problems)

        # 2. The unknown material: chosen in the material chooser.
        ceiling = _row(doc, "Ceiling")
        await pilot_keys.edit_cell(pilot, screen.query_one("#t-surfaces"), ceiling,
                                   MATERIAL_COL, None)
        assert isinstance(app.screen, MaterialChooser)
        await pilot_keys.type_words(pilot, "plaster masonry")
        await pilot.press("enter")
        await _settle(pilot)
        assert isinstance(app.screen, MainScreen)
        assert doc.spec.surfaces[ceiling].material in catalog.ids("surface")

        # 3. The misspelled key: Ctrl+P, the command the notice named; its question reads
        # the key as the key it meant.
        await pilot.press("ctrl+p")
        await _settle(pilot)
        await pilot.press(*FIX_KEYS_COMMAND)
        for _ in range(50):             # the palette searches in the background
            await pilot.pause(0.02)
            found = app.screen.query(CommandList)
            if found and found.first().option_count:
                break
        await pilot.press("enter")
        await _settle(pilot)
        assert isinstance(app.screen, Ask)
        assert "'aera = 2.0'" in app.screen.question and "'area'" in app.screen.question
        await pilot.press("enter")            # the first button: Read it as 'area'
        await _settle(pilot)
        assert isinstance(app.screen, MainScreen)
        assert doc.spec.surfaces[_row(doc, "Door")].area == 2.0
        assert screen.problems == [] and screen.result is not None and not screen.stale

        await pilot.press("ctrl+s")
        await _settle(pilot)
        assert not doc.modified
    text = path.read_text(encoding="utf-8")
    assert "aera" not in text and "area = 2.0" in text and "# measured on site" in text
    assert cli_main(["check", str(path)]) == 0          # the saved room is a good room
    capsys.readouterr()


async def test_saving_before_fixing_keeps_what_the_user_wrote(room_file, catalog, capsys,
                                                              pilot_keys, record_notes):
    path = _bad_classroom(room_file)
    found = _check_problems(path, capsys)
    app = make_app(Document.open(path), catalog,
                   AppConfig(offer_recovery=False, theme="textual-dark"))
    notes = record_notes(app)
    async with app.run_test(size=SIZE) as pilot:
        await _settle(pilot)
        doc = app.screen.document
        # An edit elsewhere (the floor's count), then save: the room has problems, so the
        # save says so; none of the user's text is lost.
        await pilot_keys.edit_cell(pilot, app.screen.query_one("#t-surfaces"),
                                   _row(doc, "Floor"), 3, "1")
        app.screen.apply(lambda s: setattr(s, "title", "Classroom 4B"), "title")
        await pilot.press("ctrl+s")
        await _settle(pilot)
        assert any(n[1] == "warning" and n[0].startswith(f"Saved {path}, but the room has 3 "
                                                         "problems") for n in notes)
    text = path.read_text(encoding="utf-8")
    assert 'title = "Classroom 4B"' in text
    for kept in ("area = -2.4  # measured on site", 'material = "plaster-on-masonery"',
                 "aera = 2.0"):
        assert kept in text
    assert _check_problems(path, capsys) == found


async def test_ctrl_o_opens_a_room_with_problems_and_refuses_only_broken_toml(
        room_file, catalog, tmp_path, record_notes):
    good = room_file("workshop.toml")
    bad = _bad_classroom(room_file)
    broken = tmp_path / "broken.toml"
    broken.write_text('version = 1\n[shape]\nlength = [6.0,\nwidth = 4.0\n', encoding="utf-8")
    app = make_app(Document.open(good), catalog,
                   AppConfig(offer_recovery=False, theme="textual-dark"))
    notes = record_notes(app)
    async with app.run_test(size=SIZE) as pilot:
        await _settle(pilot)
        app.open_path(str(broken))
        await _settle(pilot)
        assert notes[-1] == (f"Cannot open it:\n{broken}: line 3, column 10: not valid TOML: "
                             "the list opened here with '[' is not closed (a ']' is missing)\n"
                             "    3 | length = [6.0,\n"
                             "      |          ^", "error")
        assert app.screen.document.path == good
        app.open_path(str(bad))
        await _settle(pilot)
        assert app.screen.document.path == bad
        assert len(app.screen.problems) == 3
        assert notes[-1][1] == "warning" and notes[-1][0].startswith(
            "classroom.toml has 3 problems")


async def test_restoring_kept_changes_with_problems_restores_them(room_file, catalog, tmp_path, record_notes):
    """Changes kept from a session that ended without saving may hold a room with problems
    (the interface lets a room be invalid while it is edited): they are restored, problems
    and all, to be fixed."""
    rec = tmp_path / "kept.toml"
    rec.write_text(_bad_classroom(room_file).read_text(encoding="utf-8"), encoding="utf-8")
    good = room_file("workshop.toml")
    app = make_app(Document.open(good), catalog,
                   AppConfig(offer_recovery=False, theme="textual-dark"))
    notes = record_notes(app)
    async with app.run_test(size=SIZE) as pilot:
        await _settle(pilot)
        doc = app.screen.document
        app._restore(doc, rec)
        await _settle(pilot)
        assert doc.modified and len(app.screen.problems) == 3
        assert doc.spec.surfaces[2].area == -2.4
        assert notes[-1][1] == "warning" and "has 3 problems" in notes[-1][0]
        assert not rec.exists()          # now this session's own recovery file holds them


async def test_a_value_of_the_wrong_kind_shows_as_written_until_its_cell_is_given_one(
        room_file, catalog, pilot_keys):
    path = room_file("classroom.toml")
    text = path.read_text(encoding="utf-8")
    path.write_text(text.replace('area = 2.0\nface = "back"', 'area = "two"\nface = "bak"'),
                    encoding="utf-8")
    app = make_app(Document.open(path), catalog,
                   AppConfig(offer_recovery=False, theme="textual-dark"))
    async with app.run_test(size=SIZE) as pilot:
        await _settle(pilot)
        screen, doc = app.screen, app.screen.document
        door = _row(doc, "Door")
        grid = screen.query_one("#t-surfaces #table")
        assert [str(c) for c in grid.get_row_at(door)][1:3] == ['"bak"', '"two"']
        assert len(screen.problems) == 2
        await pilot_keys.edit_cell(pilot, screen.query_one("#t-surfaces"), door, 1, "back")
        await pilot_keys.edit_cell(pilot, screen.query_one("#t-surfaces"), door, AREA_COL,
                                   "2,0")
        assert [str(c) for c in grid.get_row_at(door)][1:3] == ["back", "2"]
        assert screen.problems == [] and screen.result is not None


async def test_a_room_with_its_own_materials_opens(catalog, tmp_path):
    """A room that defines its own [[materials]] (docs/room-files.md) opens and edits (copying
    the room for undo used to fail on the materials, which cannot be changed)."""
    path = tmp_path / "own.toml"
    path.write_text('version = 1\n[shape]\nvolume = 50\n[[surfaces]]\nname = "Panel wall"\n'
                    'area = 20\nmaterial = "my-panel"\n[[materials]]\nid = "my-panel"\n'
                    'name = "My panel"\nkind = "surface"\nsource = "invented for a test"\n'
                    'values = { 125 = 0.1, 250 = 0.2, 500 = 0.4, 1000 = 0.5, 2000 = 0.5, '
                    '4000 = 0.5 }\n', encoding="utf-8")
    doc = Document.open(path)
    app = make_app(doc, catalog, AppConfig(offer_recovery=False, theme="textual-dark"))
    async with app.run_test(size=SIZE) as pilot:
        await _settle(pilot)
        assert app.screen.problems == [] and app.screen.result is not None
        app.screen.apply(lambda s: setattr(s.surfaces[0], "area", 25.0), "area")
        await _settle(pilot)
        assert doc.modified and app.screen.result.room.surfaces[0].area == 25.0
        await pilot.press("ctrl+z")
        await _settle(pilot)
        assert not doc.modified
