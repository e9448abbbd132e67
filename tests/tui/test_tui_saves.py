"""The user's edits are never lost: every way found to lose them, driven as a user would (Pilot),
with the recovery folder, the room's folder and the system temporary folder in tmp paths.

Saving failures are simulated: running as root, a read-only folder does not stop a write, so
the writer is made to fail (as a full disk or a read-only folder would make it fail) or the
folder is a path under a regular file (ENOTDIR, even for root).
"""

from __future__ import annotations

import errno
import os
import tempfile

import pytest

from roomcalc.io.roomfile import spec_to_toml
from roomcalc.tui import recovery as recovery_mod
from roomcalc.tui.app import RESTORE_COMMAND, AppConfig, make_app
from roomcalc.tui.document import Document
from roomcalc.tui.recovery import find_recoveries, find_recovery, recovery_path
from roomcalc.tui.screens.dialogs import Ask, AskText
from roomcalc.tui.screens.main import MainScreen

SIZE = (120, 40)


@pytest.fixture(autouse=True)
def _private_temp(tmp_path, monkeypatch):
    """The system temporary folder (the last recovery fallback) is a tmp path too."""
    folder = tmp_path / "systemp"
    folder.mkdir()
    monkeypatch.setattr(tempfile, "tempdir", str(folder))


def _app(path, catalog, **config):
    config.setdefault("offer_recovery", False)
    config.setdefault("theme", "textual-dark")
    return make_app(Document.open(path) if path else None, catalog, AppConfig(**config))


async def _settle(pilot, until, tries: int = 100):
    for _ in range(tries):
        await pilot.pause()
        if until():
            return
    raise AssertionError("the screen never got there")


async def _ready(pilot):
    app = pilot.app

    def done():
        s = app.screen
        return not isinstance(s, MainScreen) or (s.result is not None and s.query("#reverb-table")
                                                 and s.query_one("#reverb-table").row_count)
    await _settle(pilot, done)


async def _ask(pilot, button: str):
    """Wait for a question with ``button`` laid out, and click it."""
    app = pilot.app
    await _settle(pilot, lambda: isinstance(app.screen, Ask) and app.screen.query(f"#{button}")
                  and app.screen.query_one(f"#{button}").region)
    await pilot.click(f"#{button}")
    await pilot.pause()


def _fail_saving_to(monkeypatch, folder, err=errno.EACCES):
    """Writes into ``folder`` fail as a read-only (or full: ENOSPC) folder makes them fail."""
    from roomcalc.io import atomic

    real = atomic.tempfile.mkstemp

    def mkstemp(*args, dir=None, **kw):
        if dir is not None and os.path.realpath(dir) == os.path.realpath(folder):
            raise OSError(err, os.strerror(err), str(folder))
        return real(*args, dir=dir, **kw)
    monkeypatch.setattr(atomic.tempfile, "mkstemp", mkstemp)


def _crashed_session(path, material="mineral-wool-50mm-48kg"):
    """What a crashed session left: the ceiling changed, in a live recovery file newer than
    the room file."""
    crashed = Document.open(path)
    ceiling = next(s for s in crashed.spec.surfaces if s.name == "Ceiling")
    ceiling.material = material
    rec = crashed.write_recovery()
    then = rec.stat().st_mtime - 120
    os.utime(rec, (then, then))
    os.utime(path, (then - 60, then - 60))
    return spec_to_toml(crashed.spec)


# ---------------------------------------------------------------------------- 1. quit, save fails
async def test_failed_save_on_quit_keeps_the_app_open_with_the_reason(room_file, catalog,
                                                                       monkeypatch, record_notes):
    """Edit, Ctrl+Q at once, "Save" into a folder that refuses: the app stays open with the
    reason on screen, the edit is still there and already in the recovery file."""
    path = room_file("classroom.toml")
    original = path.read_bytes()
    _fail_saving_to(monkeypatch, path.parent)
    app = _app(path, catalog, recovery_delay_s=3600)     # no help from a timer
    async with app.run_test(size=SIZE) as pilot:
        notes = record_notes(app)
        await _ready(pilot)
        await pilot.press("a", "ctrl+q")
        await _ask(pilot, "save")
        assert app.is_running and app.return_code is None
        assert isinstance(app.screen, MainScreen) and app.screen.document.modified
        failed = [t for t, sev in notes if sev == "error" and t.startswith("Not saved")]
        assert failed and "Permission denied" in failed[0], notes
        edited = spec_to_toml(app.screen.document.spec)
        # "quitting always writes the recovery file first": before the question was asked
        assert spec_to_toml(Document.open(find_recovery(path)).spec) == edited
        # Ctrl+S at once after another edit: that fails too, and the edit is kept.
        notes.clear()
        await pilot.press("a", "ctrl+s")
        await pilot.pause()
        assert [sev for t, sev in notes if t.startswith("Not saved")] == ["error"]
        edited = spec_to_toml(app.screen.document.spec)
        assert spec_to_toml(Document.open(find_recovery(path)).spec) == edited
    assert path.read_bytes() == original


async def test_quit_writes_the_recovery_file_before_asking(room_file, catalog):
    """The recovery file holds an edit made just before Ctrl+Q by the time the question is
    on screen, even with a writer that would wait an hour."""
    path = room_file("classroom.toml")
    app = _app(path, catalog, recovery_delay_s=3600)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        await pilot.press("a", "ctrl+q")
        await _settle(pilot, lambda: isinstance(app.screen, Ask))
        edited = spec_to_toml(app.screen_stack[0].document.spec)
        assert find_recovery(path) is not None
        assert spec_to_toml(Document.open(find_recovery(path)).spec) == edited
        await _ask(pilot, "discard")
    assert app.return_code == 0
    assert find_recoveries(path) == []                    # "Don't save": discarded, explicitly


async def test_save_into_a_missing_folder_says_so_and_keeps_the_app(tmp_path, catalog,
                                                                    room_file, record_notes):
    """Save as into a folder that does not exist: the reason names the folder; quitting
    through "Save" then does not quit."""
    path = room_file("classroom.toml")
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        notes = record_notes(app)
        await _ready(pilot)
        await pilot.press("a")
        await pilot.pause()
        app.screen.document.path = tmp_path / "no-such-folder" / "room.toml"
        await pilot.press("ctrl+q")
        await _ask(pilot, "save")
        assert app.is_running and isinstance(app.screen, MainScreen)
        assert any("no-such-folder does not exist" in t for t, _ in notes), notes


async def test_save_as_cancelled_from_the_quit_question_keeps_everything(catalog, monkeypatch):
    """An untitled room: Ctrl+Q, "Save", then Escape in the file name box: nothing is closed,
    the room and its recovery file stay; "Save" with a name saves and then quits."""
    app = make_app(Document.new_box(5, 4, 3), catalog,
                   AppConfig(offer_recovery=False, theme="textual-dark"))
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        await pilot.press("a")
        await pilot.pause()
        await pilot.press("ctrl+q")
        await _ask(pilot, "save")
        await _settle(pilot, lambda: isinstance(app.screen, AskText))
        await pilot.press("escape")
        await pilot.pause()
        assert app.is_running and isinstance(app.screen, MainScreen)
        assert find_recovery(None) is not None
        assert spec_to_toml(Document.open(find_recovery(None)).spec) == \
            spec_to_toml(app.screen.document.spec)
        where = recovery_path(None).parent.parent / "saved-room.toml"
        await pilot.press("ctrl+q")
        await _ask(pilot, "save")
        await _settle(pilot, lambda: isinstance(app.screen, AskText))
        await pilot.press("end", "ctrl+u", *str(where), "enter")
        await _settle(pilot, lambda: not app.is_running, tries=50)
    assert app.return_code == 0 and where.exists()
    assert find_recovery(None) is None


async def test_dont_save_then_cancelled_open_keeps_the_recovery(room_file, catalog):
    """Ctrl+O on an edited room, "Don't save", then Escape instead of a file name: the room
    is still open with its edits, so its recovery file must stay."""
    path = room_file("classroom.toml")
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        await pilot.press("a")
        await pilot.pause()
        app.recovery.flush()
        assert find_recovery(path) is not None
        await pilot.press("ctrl+o")
        await _ask(pilot, "discard")
        await _settle(pilot, lambda: isinstance(app.screen, AskText))
        await pilot.press("escape")
        await pilot.pause()
        assert isinstance(app.screen, MainScreen) and app.screen.document.modified
        assert find_recovery(path) is not None


# ---------------------------------------------------------------------------- 2. "Not now"
async def test_not_now_then_quit_keeps_the_crash_recovery(room_file, catalog):
    path = room_file("classroom.toml")
    crashed = _crashed_session(path)
    app = _app(path, catalog, offer_recovery=True)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        await _ask(pilot, "later")
        await pilot.press("ctrl+q")                # nothing edited: no question
        await pilot.pause()
    assert app.return_code == 0
    kept = find_recoveries(path)
    assert len(kept) == 1 and spec_to_toml(Document.open(kept[0].path).spec) == crashed


async def test_not_now_then_edit_keeps_both_and_offers_them_again(room_file, catalog, record_notes):
    """After "Not now" an edit writes its own recovery file; the crash's stays beside it,
    named by its time, and is offered again: from the command palette's entry and on the next
    open. Only "Discard them" removes it."""
    path = room_file("classroom.toml")
    crashed = _crashed_session(path)
    app = _app(path, catalog, offer_recovery=True)
    async with app.run_test(size=SIZE) as pilot:
        notes = record_notes(app)
        await _ready(pilot)
        await _ask(pilot, "later")
        assert any(RESTORE_COMMAND in t for t, _ in notes), notes     # where to find it
        await pilot.press("a")
        await pilot.pause()
        app.recovery.flush()
        live = Document.open(find_recovery(path)).spec
        assert spec_to_toml(live) == spec_to_toml(app.screen.document.spec) != crashed
        texts = {spec_to_toml(Document.open(r.path).spec) for r in find_recoveries(path)}
        assert crashed in texts and len(texts) == 2
        palette = {c.title: c.callback for c in app.get_system_commands(app.screen)}
        palette[RESTORE_COMMAND]()
        await _settle(pilot, lambda: isinstance(app.screen, Ask))
        crash_time = [r for r in find_recoveries(path) if r.kept][0].when
        question = str(app.screen.query_one(".question").content)
        assert crash_time in question, question        # the crash's, not this session's own
        await _ask(pilot, "later")
        await pilot.press("ctrl+q")
        await _ask(pilot, "discard")                 # "Don't save" the new edit
    assert [spec_to_toml(Document.open(r.path).spec) for r in find_recoveries(path)] == [crashed]

    app = _app(path, catalog, offer_recovery=True)   # next open: offered again
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        assert isinstance(app.screen, Ask)
        await _ask(pilot, "discard")
        await pilot.press("ctrl+q")
        await pilot.pause()
    assert find_recoveries(path) == []


async def test_restore_moves_the_kept_changes_into_this_session(room_file, catalog):
    path = room_file("classroom.toml")
    crashed = _crashed_session(path)
    app = _app(path, catalog, offer_recovery=True)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        await _ask(pilot, "restore")
        assert spec_to_toml(app.screen.document.spec) == crashed
        kept = find_recoveries(path)
        assert [r.kept for r in kept] == [False]          # the session's own live file
        assert spec_to_toml(Document.open(kept[0].path).spec) == crashed


# ---------------------------------------------------------------------------- 3. nowhere to write
async def test_recovery_falls_back_beside_the_room_and_says_so(room_file, catalog, tmp_path,
                                                               monkeypatch, record_notes):
    """The recovery folder cannot be made (its parent is a regular file: ENOTDIR, even for
    root): the file goes beside the room as a hidden file, a notice says where, and
    find_recovery finds it there."""
    blocker = tmp_path / "not-a-folder"
    blocker.write_text("x")
    monkeypatch.setenv("ROOMCALC_DATA_DIR", str(blocker / "data"))
    path = room_file("classroom.toml")
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        notes = record_notes(app)
        await _ready(pilot)
        await pilot.press("a")
        await pilot.pause()
        app.recovery.flush()
        await _settle(pilot, lambda: any(sev == "warning" for _, sev in notes))
        rec = find_recovery(path)
        assert rec is not None and rec.parent == path.parent and rec.name.startswith(".")
        assert spec_to_toml(Document.open(rec).spec) == spec_to_toml(app.screen.document.spec)
        warning = [t for t, sev in notes if sev == "warning"][0]
        assert str(rec) in warning and "Not a directory" in warning


async def test_recovery_nowhere_is_an_error_notice_at_once(room_file, catalog, monkeypatch, record_notes):
    """Every place refuses (a full disk): an error notice says a crash would lose the work;
    when writing works again, a notice says so."""
    from roomcalc.tui import recovery

    real = recovery.write_text_atomic
    full = {"on": True}

    def refuse(path, text):
        if full["on"]:
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC), str(path))
        return real(path, text)
    monkeypatch.setattr(recovery, "write_text_atomic", refuse)
    path = room_file("classroom.toml")
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        notes = record_notes(app)
        await _ready(pilot)
        await pilot.press("a")
        await pilot.pause()
        app.recovery.flush()
        await _settle(pilot, lambda: any(sev == "error" for _, sev in notes))
        err = [t for t, sev in notes if sev == "error"][0]
        assert "cannot be kept" in err and "lost" in err and os.strerror(errno.ENOSPC) in err
        assert find_recoveries(path) == []
        full["on"] = False
        await pilot.press("a")
        await pilot.pause()
        app.recovery.flush()
        await _settle(pilot, lambda: any("again" in t for t, _ in notes))
        assert find_recovery(path) == recovery_path(path)


def test_find_recovery_looks_in_every_fallback(tmp_path, monkeypatch, room_file):
    """A recovery file in the system temporary folder (the last fallback) is found."""
    path = room_file("classroom.toml")
    old = path.stat().st_mtime - 60
    os.utime(path, (old, old))
    real = recovery_mod.write_text_atomic

    def only_temp(target, text):
        if recovery_mod.tempfile.gettempdir() not in str(target):
            raise OSError(errno.EROFS, os.strerror(errno.EROFS), str(target))
        return real(target, text)
    monkeypatch.setattr(recovery_mod, "write_text_atomic", only_temp)
    written = recovery_mod.write_recovery(path, "title = 'x'\n")
    assert len(written.passed) == 2 and written.path.parent.parent == tmp_path / "systemp"
    assert find_recovery(path) == written.path
    recovery_mod.discard_recovery(path)
    assert find_recovery(path) is None


# ---------------------------------------------------------------------------- 4. at once
async def test_an_edit_is_in_the_recovery_file_without_waiting(room_file, catalog):
    """With the default settings, the edit is on disk as soon as the writer has caught up,
    without any timer running (the event loop is not given time to fire one)."""
    path = room_file("classroom.toml")
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        await pilot.press("a")
        await pilot.pause()                            # the screen shows the edit
        assert app.recovery.flush(timeout=5)
        assert spec_to_toml(Document.open(find_recovery(path)).spec) == \
            spec_to_toml(app.screen.document.spec)
        await pilot.press("ctrl+z")                    # back to the file: nothing to keep
        app.recovery.flush()
        assert find_recoveries(path) == []


# ---------------------------------------------------------------------------- 5. temporaries
async def test_opening_removes_a_save_killed_half_way(room_file, catalog):
    path = room_file("classroom.toml")
    stale = path.parent / f".{path.name}.k1ll3d_x.tmp"
    stale.write_text("half a room")
    old = stale.stat().st_mtime - 3600
    os.utime(stale, (old, old))
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        assert not stale.exists()
