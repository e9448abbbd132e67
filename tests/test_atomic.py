"""Atomic saving (roomcalc/io/atomic.py): temporaries left by a killed save are removed, only
ours and only stale ones; the folder is fsynced after the rename where the system can.

Why the folder: a rename is an entry in the folder, and it reaches the disk with the folder's
own fsync, not the file's (POSIX fsync(2); the Linux fsync(2) manual page says so explicitly;
common practice for atomic saves).
"""

from __future__ import annotations

import os
import stat
import time

import pytest

from roomcalc.io import atomic
from roomcalc.io.atomic import (STALE_TEMPORARY_S, fsync_folder, remove_stale_temporaries,
                                write_text_atomic)


def _age(path, seconds):
    t = time.time() - seconds
    os.utime(path, (t, t))


def _left_by_kill(folder, target="room.toml", random="abc_1234", age=3600.0):
    """A temporary file as write_text_atomic names it, as a killed save leaves it."""
    p = folder / f".{target}.{random}.tmp"
    p.write_text("half a room")
    _age(p, age)
    return p


def test_write_replaces_and_leaves_no_temporary(tmp_path):
    target = tmp_path / "room.toml"
    target.write_text("old")
    os.chmod(target, 0o600)
    write_text_atomic(target, "new\n")
    assert target.read_text() == "new\n"
    assert stat.S_IMODE(target.stat().st_mode) == 0o600       # the user's mode is kept
    assert sorted(p.name for p in tmp_path.iterdir()) == ["room.toml"]


def test_a_failed_write_keeps_the_old_file_and_removes_its_temporary(tmp_path, monkeypatch):
    target = tmp_path / "room.toml"
    target.write_text("old")

    def broken(src, dst):
        raise OSError(28, "No space left on device")
    monkeypatch.setattr(atomic.os, "replace", broken)
    with pytest.raises(OSError):
        write_text_atomic(target, "new")
    assert target.read_text() == "old"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["room.toml"]


def test_next_save_removes_a_stale_temporary_of_the_same_target(tmp_path):
    target = tmp_path / "room.toml"
    target.write_text("old")
    stale = _left_by_kill(tmp_path)
    write_text_atomic(target, "new")
    assert not stale.exists() and target.read_text() == "new"


def test_other_files_are_untouched(tmp_path):
    """Only ``.room.toml.XXXXXXXX.tmp`` (8 characters of mkstemp's alphabet) of this very
    target, and only when stale: another target's temporary, a name that merely starts the
    same, a user's file and a temporary a save is writing now (it holds the lock) all stay."""
    target = tmp_path / "room.toml"
    keep = [
        _left_by_kill(tmp_path, target="other.toml"),              # another target
        _left_by_kill(tmp_path, target="room.toml.bak"),           # starts like ours
        _left_by_kill(tmp_path, random="toolongname"),             # not mkstemp's length
        _left_by_kill(tmp_path, random="fresh123", age=0.0),       # being written now
        tmp_path / "room.toml.tmp",                                 # the user's own file
    ]
    keep[-1].write_text("mine")
    _age(keep[-1], 3600)
    stale = _left_by_kill(tmp_path, random="zz9_zz9z")
    with _held(keep[3]):
        removed = remove_stale_temporaries(target)
    assert removed == [stale] and not stale.exists()
    assert all(p.exists() for p in keep)


@pytest.mark.skipif(atomic.fcntl is None, reason="no flock on this system")
def test_a_temporary_of_a_killed_save_goes_at_once_a_locked_one_stays(tmp_path):
    """With locks, staleness does not wait: a temporary nobody holds goes on the next save
    however new it is (the save that made it was killed: its lock went with its process);
    one a live save holds stays however old."""
    target = tmp_path / "room.toml"
    new = _left_by_kill(tmp_path, random="new_0001", age=0.0)
    old = _left_by_kill(tmp_path, random="old_0001", age=3600.0)
    with _held(old):
        assert remove_stale_temporaries(target) == [new]
    assert old.exists() and not new.exists()


def _held(path):
    """A context holding ``path``'s lock, as a save in progress does."""
    import contextlib

    @contextlib.contextmanager
    def hold():
        fd = os.open(path, os.O_RDONLY)
        try:
            if atomic.fcntl is not None:
                atomic.fcntl.flock(fd, atomic.fcntl.LOCK_EX)
            yield
        finally:
            os.close(fd)
    return hold()


def test_without_locks_stale_means_older_than_the_threshold(tmp_path, monkeypatch):
    monkeypatch.setattr(atomic, "fcntl", None)
    target = tmp_path / "room.toml"
    p = _left_by_kill(tmp_path, age=STALE_TEMPORARY_S - 5)
    assert remove_stale_temporaries(target) == [] and p.exists()
    _age(p, STALE_TEMPORARY_S + 5)
    assert remove_stale_temporaries(target) == [p] and not p.exists()


def test_cleaning_a_folder_that_cannot_be_read_does_not_raise(tmp_path):
    blocker = tmp_path / "file"
    blocker.write_text("x")
    assert remove_stale_temporaries(blocker / "room.toml") == []     # ENOTDIR, quietly


def test_the_folder_is_fsynced_after_the_rename(tmp_path, monkeypatch):
    """os.fsync is called on the file, then on a descriptor of the folder, after os.replace."""
    if getattr(os, "O_DIRECTORY", None) is None:
        pytest.skip("this system cannot open a folder for fsync (no os.O_DIRECTORY)")
    calls = []
    real_fsync, real_replace = os.fsync, os.replace

    def fsync(fd):
        st = os.fstat(fd)
        calls.append(("fsync", "folder" if stat.S_ISDIR(st.st_mode) else "file", st.st_ino))
        return real_fsync(fd)

    def replace(src, dst):
        calls.append(("replace",))
        return real_replace(src, dst)
    monkeypatch.setattr(atomic.os, "fsync", fsync)
    monkeypatch.setattr(atomic.os, "replace", replace)
    write_text_atomic(tmp_path / "room.toml", "x")
    assert [c[:2] for c in calls] == [("fsync", "file"), ("replace",), ("fsync", "folder")]
    assert calls[-1][2] == tmp_path.stat().st_ino


def test_without_o_directory_the_folder_fsync_is_skipped_quietly(tmp_path, monkeypatch):
    monkeypatch.delattr(atomic.os, "O_DIRECTORY", raising=False)
    assert fsync_folder(tmp_path) is False
    write_text_atomic(tmp_path / "room.toml", "x")            # still saves
    assert (tmp_path / "room.toml").read_text() == "x"


def test_a_folder_that_refuses_fsync_is_skipped_quietly(tmp_path, monkeypatch):
    if getattr(os, "O_DIRECTORY", None) is None:
        pytest.skip("no os.O_DIRECTORY")

    def refuse(fd):
        if stat.S_ISDIR(os.fstat(fd).st_mode):
            raise OSError(22, "Invalid argument")
    monkeypatch.setattr(atomic.os, "fsync", refuse)
    assert fsync_folder(tmp_path) is False
