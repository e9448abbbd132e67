"""Opening what is not a room file from the interface (Ctrl+O = RoomApp.open_path, and the
recovery restore) names the file and what is wrong, as `roomcalc check` does; saving a room with
problems saves it and says what is wrong (Pilot)."""

from __future__ import annotations

import tempfile
from pathlib import Path

import pytest

from roomcalc.io.roomfile import read_spec
from roomcalc.tui.app import AppConfig, make_app
from roomcalc.tui.document import Document
from roomcalc.tui.screens.main import MainScreen

SIZE = (120, 40)


@pytest.fixture(autouse=True)
def _private(tmp_path, monkeypatch):
    folder = tmp_path / "systemp"
    folder.mkdir()
    monkeypatch.setattr(tempfile, "tempdir", str(folder))
    monkeypatch.setenv("ROOMCALC_DATA_DIR", str(tmp_path / "data"))


def _app(path, catalog, **config):
    config.setdefault("offer_recovery", False)
    config.setdefault("theme", "textual-dark")
    return make_app(Document.open(path), catalog, AppConfig(**config))


async def _ready(pilot):
    app = pilot.app
    for _ in range(100):
        await pilot.pause()
        s = app.screen
        if isinstance(s, MainScreen) and s.result is not None:
            return
    raise AssertionError("the screen never got there")


async def test_open_a_folder_or_binary_file_names_it(room_file, catalog, tmp_path, record_notes):
    path = room_file("classroom.toml")
    binary = tmp_path / "shop.toml"
    binary.write_bytes(b"\xff\xfe\x00")
    app = _app(path, catalog)
    notes = record_notes(app)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        app.open_path(str(tmp_path))
        await pilot.pause()
        assert notes[-1] == (f"Cannot open it:\n{tmp_path}: cannot read it: it is a folder",
                             "error")
        app.open_path(str(binary))
        await pilot.pause()
        assert notes[-1] == (f"Cannot open it:\n{binary}: cannot read it: not UTF-8 text "
                             "(byte 0xff at position 0)", "error")
        assert app.screen.document.path == path          # the room open stays open


async def test_open_permission_denied_names_it(room_file, catalog, monkeypatch, record_notes):
    path = room_file("classroom.toml")
    other = room_file("workshop.toml")
    real = Path.read_bytes

    def read_bytes(self):
        if self == other:
            raise PermissionError(13, "Permission denied", str(self))
        return real(self)
    app = _app(path, catalog)
    notes = record_notes(app)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        monkeypatch.setattr(Path, "read_bytes", read_bytes)
        app.open_path(str(other))
        await pilot.pause()
        assert notes[-1] == (f"Cannot open it:\n{other}: cannot read it: permission denied",
                             "error")


async def test_restoring_an_unreadable_recovery_file_names_it(room_file, catalog, tmp_path, record_notes):
    path = room_file("classroom.toml")
    rec = tmp_path / "kept.toml"
    rec.write_bytes(b'title = "a"\n\xc3(\n')
    app = _app(path, catalog)
    notes = record_notes(app)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        app._restore(app.screen.document, rec)
        await pilot.pause()
        text, severity = notes[-1]
        assert severity == "error"
        assert f"{rec}: cannot read it: not UTF-8 text (byte 0xc3 at position 12)" in text
        assert rec.exists()


async def test_saving_a_room_with_problems_saves_it_and_says_what_is_wrong(room_file, catalog, record_notes):
    path = room_file("classroom.toml")
    app = _app(path, catalog)
    notes = record_notes(app)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        doc = app.screen.document
        doc.change(lambda s: setattr(s.air, "relative_humidity", 150.0), "humidity")
        assert app._write(doc, path)
        await pilot.pause()
        text, severity = notes[-1]
        assert severity == "warning"
        assert text.startswith(f"Saved {path}, but the room has 1 problem: "
                               "air.relative_humidity: 150")
        assert "0 to 100 %" in text        # the file's range (roomcalc.io.limits)
        # Saved all the same: the file holds the user's value.
        assert "relative_humidity = 150" in path.read_text(encoding="utf-8")
        # Two problems: each on its own line.
        doc.change(lambda s: setattr(s.air, "pressure_kpa", 5.0), "pressure")
        assert app._write(doc, path)
        await pilot.pause()
        text, severity = notes[-1]
        lines = text.splitlines()
        assert severity == "warning" and lines[0] == f"Saved {path}, but the room has 2 problems:"
        assert sorted(x.split(":")[0] for x in lines[1:]) == ["air.pressure_kpa",
                                                             "air.relative_humidity"]
        doc.change(lambda s: setattr(s.air, "pressure_kpa", None), "pressure")
        # A valid room saves with the plain notice.
        doc.change(lambda s: setattr(s.air, "relative_humidity", 50.0), "humidity")
        assert app._write(doc, path)
        await pilot.pause()
        assert notes[-1] == (f"Saved {path}", "information")
        assert read_spec(path).air.relative_humidity == 50.0


async def _type(pilot, field: str, text: str) -> None:
    """Empty ``field`` and type ``text`` into it key by key, as a user would."""
    from textual.widgets import Input

    inp = pilot.app.screen.query_one(f"#{field}", Input)
    inp.focus()
    inp.value = ""
    await pilot.pause()
    for ch in text:
        await pilot.press({"-": "minus", ".": "full_stop"}.get(ch, ch))
    await pilot.pause()


def _message(app, field: str) -> str:
    from textual.widgets import Static

    return str(app.screen.query_one(f"#{field}-error", Static).content)


async def test_new_room_sizes_are_checked_with_the_file_ranges(room_file, catalog):
    """The room file's ranges (roomcalc.io.limits: a box side 0.1 to 1000 m, volume 1 to
    1e6 m^3) and messages, under the field; the dialog stays until the size is good."""
    from textual.widgets import Input, Select

    from roomcalc.tui.screens.dialogs import AskBox

    path = room_file("classroom.toml")
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        before = app.screen.document
        await pilot.press("ctrl+n")
        await pilot.pause()
        assert isinstance(app.screen, AskBox)
        for typed, want in (("-9", "-9 is outside 0.1 to 1000 m"),
                            ("5000", "5000 is outside 0.1 to 1000 m"),
                            ("1410", "1410 is outside 0.1 to 1000 m"),
                            ("abc", "'abc' is not a number")):
            await _type(pilot, "length", typed)
            assert app.screen.query_one("#length", Input).value == typed   # "-" is kept
            await pilot.press("enter")
            await pilot.pause()
            assert isinstance(app.screen, AskBox), typed       # not closed
            assert _message(app, "length") == want
            assert _message(app, "width") == ""
        # The box's volume: 0.5 x 0.5 x 0.5 m = 0.125 m^3 is below 1 m^3.
        for field in ("length", "width", "height"):
            await _type(pilot, field, "0.5")
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, AskBox)
        assert "the box's volume, 0.125 m^3" in str(app.screen.query_one("#error").content)
        # Imperial: the sides are in ft (1000 m = 3280.84 ft), so 3000 is a good side; a
        # decimal comma is read as a point ("12,5" ft).
        app.screen.query_one("#units", Select).value = "imperial"
        await _type(pilot, "length", "3000")
        await _type(pilot, "width", "12,5")
        await _type(pilot, "height", "9")
        await pilot.press("enter")
        for _ in range(20):
            await pilot.pause()
            if isinstance(app.screen, MainScreen) and app.screen.document is not before:
                break
        doc = app.screen.document
        assert doc is not before
        assert (doc.spec.units, doc.spec.shape.length, doc.spec.shape.width,
                doc.spec.shape.height) == ("imperial", 3000.0, 12.5, 9.0)
