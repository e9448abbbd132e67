"""A file that cannot be read (a folder, one the user may not read, bytes that are not UTF-8)
gets one message, named by its file, from every way in: the io reader, the command line
(report, check, check --format json, open), the interface's document and the catalogue."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from roomcalc.cli import main
from roomcalc.io.checks import read_text_file, read_toml_file
from roomcalc.io.errors import RoomFileError
from roomcalc.io.roomfile import read_spec

from conftest import EXAMPLES

FOLDER = "cannot read it: it is a folder"
DENIED = "cannot read it: permission denied"


def _binary(tmp_path) -> Path:
    p = tmp_path / "shop.toml"
    p.write_bytes(b'title = "x"\n\x00\xff\xfe junk\n')
    return p


def _message(fn, path) -> str:
    with pytest.raises(RoomFileError) as info:
        fn(path)
    (problem,) = info.value.problems
    assert problem.file == str(path)
    return problem.message


def _deny(monkeypatch, path):
    """Reading ``path`` fails as a file without read permission makes it fail (as root, chmod
    does not stop a read, so the read itself is made to fail)."""
    real = Path.read_bytes

    def read_bytes(self):
        if self == Path(path):
            raise PermissionError(13, "Permission denied", str(self))
        return real(self)
    monkeypatch.setattr(Path, "read_bytes", read_bytes)


@pytest.mark.parametrize("reader", [read_text_file, read_spec, read_toml_file])
def test_a_folder_is_named_as_a_folder(tmp_path, reader):
    assert _message(reader, tmp_path) == FOLDER


@pytest.mark.parametrize("reader", [read_text_file, read_spec, read_toml_file])
def test_bytes_not_utf8_name_the_file_the_byte_and_its_position(tmp_path, reader):
    p = _binary(tmp_path)
    # b'title = "x"\n' is 12 bytes: the NUL at 12 is valid UTF-8, 0xff at 13 is not.
    assert _message(reader, p) == "cannot read it: not UTF-8 text (byte 0xff at position 13)"


@pytest.mark.parametrize("reader", [read_text_file, read_spec, read_toml_file])
def test_permission_denied(tmp_path, monkeypatch, reader):
    p = tmp_path / "room.toml"
    p.write_text('title = "x"\n', encoding="utf-8")
    _deny(monkeypatch, p)
    assert _message(reader, p) == DENIED


def test_missing_file_still_says_no_such_file(tmp_path):
    assert _message(read_text_file, tmp_path / "nowhere.toml") == "no such file"


def test_a_stray_carriage_return_is_read_as_it_is(tmp_path):
    p = tmp_path / "cr.toml"
    p.write_bytes(b'a = 1\rb = 2\n')
    assert read_text_file(p) == 'a = 1\rb = 2\n'


def test_document_open_gives_the_same_message(tmp_path, monkeypatch):
    from roomcalc.tui.document import Document

    assert _message(Document.open, tmp_path) == FOLDER
    assert _message(Document.open, _binary(tmp_path)).startswith("cannot read it: not UTF-8")
    room = tmp_path / "room.toml"
    room.write_text((EXAMPLES / "classroom.toml").read_text(encoding="utf-8"), encoding="utf-8")
    _deny(monkeypatch, room)
    assert _message(Document.open, room) == DENIED


@pytest.mark.parametrize("command", [["report"], ["check"], ["report", "--format", "json"]])
def test_cli_folder_and_binary_exit_2_with_the_message(tmp_path, capsys, command):
    for path, want in ((tmp_path, FOLDER),
                       (_binary(tmp_path), "cannot read it: not UTF-8 text (byte 0xff")):
        code = main(command + [str(path)])
        err = capsys.readouterr().err
        assert code == 2
        assert f"{path}: {want}" in err and "Traceback" not in err


def test_cli_check_json_folder(tmp_path, capsys):
    code = main(["check", "--format", "json", str(tmp_path)])
    data = json.loads(capsys.readouterr().out)
    assert code == 2
    assert FOLDER in json.dumps(data) and str(tmp_path) in json.dumps(data)


def test_cli_permission_denied(tmp_path, capsys, monkeypatch):
    room = tmp_path / "room.toml"
    room.write_text((EXAMPLES / "classroom.toml").read_text(encoding="utf-8"), encoding="utf-8")
    _deny(monkeypatch, room)
    assert main(["check", str(room)]) == 2
    assert f"{room}: {DENIED}" in capsys.readouterr().err


def test_cli_open_folder_exits_2_before_the_interface(tmp_path, capsys, monkeypatch):
    """`roomcalc open FOLDER` in a terminal: the message and exit 2, no interface, no
    traceback (the terminal is faked; the tmux test runs it in a real one)."""
    import sys

    monkeypatch.setattr(sys.stdin, "isatty", lambda: True, raising=False)
    monkeypatch.setattr(sys.stdout, "isatty", lambda: True, raising=False)
    assert main(["open", str(tmp_path)]) == 2
    assert f"{tmp_path}: {FOLDER}" in capsys.readouterr().err


# ----------------------------------------------------------------- a box size outside a file
@pytest.mark.parametrize("size, units, want", [
    ((5000, 4, 2.7), "metric", [("shape.length", "5000 is outside 0.1 to 1000 m")]),
    ((-9, 4, 2.7), "metric", [("shape.length", "-9 is outside 0.1 to 1000 m")]),
    ((6, 1410, 2.7), "metric", [("shape.width", "1410 is outside 0.1 to 1000 m")]),
    ((6, 4, 2.7), "metric", []),
    # 1000 m = 3280.84 ft (1 ft = 0.3048 m exactly, by the international yard of 1959).
    ((3000, 12, 9), "imperial", []),
    ((3300, 12, 9), "imperial", [("shape.length", "3300 is outside 0.328084 to 3280.84 ft")]),
    ((0.5, 0.5, 0.5), "metric",
     [("shape", "the box's volume, 0.125 m^3 (length x width x height), is outside 1 to "
       "1e+06 m^3")]),
])
def test_box_size_is_checked_as_the_file_shape_is(size, units, want):
    from roomcalc.io.roomfile import box_size_problems, parse_spec

    got = [(p.where, p.message) for p in box_size_problems(*size, units)]
    assert got == want
    # The same size written in a file gives the same problems.
    L, W, H = size
    text = (f'units = "{units}"\n[shape]\nlength = {L}\nwidth = {W}\nheight = {H}\n'
            '[[surfaces]]\nname = "All"\nface = "floor"\nmaterial = "x"\n')
    try:
        parse_spec(text, "f.toml")
        from_file = []
    except RoomFileError as exc:
        from_file = [(p.where, p.message) for p in exc.problems if p.where.startswith("shape")]
    assert from_file == want
