"""Recovery files: unsaved changes kept on disk until the user saves or discards them. No
Textual here.

Where: the user data folder (``recovery/``), else, when that cannot be written, a hidden file
beside the room file, else a private folder in the system's temporary folder. Every reader
looks in all three.

Two kinds of file per room:

* the *live* file, ``NAME-DIGEST.toml``: the changes of the session running now, rewritten on
  every edit by :class:`RecoveryWriter` (one background thread; the newest text wins; never
  two writes at once), removed when the room is saved or the user chooses "Don't save";
* *kept* files, ``NAME-DIGEST.YYYYMMDD-HHMMSS.toml``: the live file of a session that ended
  without saving (a crash, a kill), set aside under its time when the room is opened again,
  so that the new session's edits never overwrite it. A kept file goes only when the user
  restores it or discards it.
"""

from __future__ import annotations

import hashlib
import os
import re
import tempfile
import threading
import time
from dataclasses import dataclass
from pathlib import Path

from roomcalc.io import paths
from roomcalc.io.atomic import write_text_atomic

_STAMP = re.compile(r"\.(\d{8}-\d{6}(?:-\d+)?)\.toml\Z")


@dataclass(frozen=True)
class _Place:
    folder: Path
    prefix: str = ""          # "." beside the room file: a hidden file there
    suffix: str = ""
    private: bool = False     # a folder of our own in a shared place (created 0700, ours only)

    def live(self, base: str) -> Path:
        return self.folder / f"{self.prefix}{base}{self.suffix}.toml"

    def kept(self, base: str) -> list[Path]:
        head = f"{self.prefix}{base}{self.suffix}"
        try:
            names = os.listdir(self.folder)
        except OSError:
            return []
        return [self.folder / n for n in names
                if n.startswith(head + ".") and _STAMP.fullmatch(n[len(head):])]


def _base(room: Path | None) -> str:
    key = str(Path(room).resolve()) if room else "untitled"
    digest = hashlib.sha1(key.encode("utf-8")).hexdigest()[:16]
    return f"{Path(room).stem if room else 'untitled'}-{digest}"


def _temp_folder() -> Path:
    user = os.getuid() if hasattr(os, "getuid") else os.environ.get("USERNAME", "user")
    return Path(tempfile.gettempdir()) / f"roomcalc-recovery-{user}"


def _places(room: Path | None) -> list[_Place]:
    """Where a room's recovery file may be, in order of preference."""
    places = [_Place(paths.user_data_dir() / "recovery")]
    if room is not None:
        places.append(_Place(Path(room).resolve().parent, prefix=".", suffix=".recovery"))
    places.append(_Place(_temp_folder(), private=True))
    return places


def recovery_path(room: Path | None) -> Path:
    """Where the live recovery file of a room goes when the user data folder can be written."""
    return _places(room)[0].live(_base(room))


def recovery_paths(room: Path | None) -> list[Path]:
    """Every place the live recovery file of a room may be, preferred first."""
    base = _base(room)
    return [p.live(base) for p in _places(room)]


@dataclass(frozen=True)
class Recovery:
    """A recovery file found on disk."""

    path: Path
    saved_at: float            # its modification time (seconds since the epoch)
    kept: bool                 # set aside from a session that ended without saving
    older_than_room: bool      # the room file was changed after it

    @property
    def when(self) -> str:
        return time.strftime("%Y-%m-%d %H:%M:%S", time.localtime(self.saved_at))


def _room_mtime(room: Path | None) -> float | None:
    try:
        return Path(room).stat().st_mtime if room is not None else None
    except OSError:
        return None


def find_recoveries(room: Path | None) -> list[Recovery]:
    """Every recovery file of a room, live and kept, in every place; newest first."""
    base, room_t = _base(room), _room_mtime(room)
    found = []
    for place in _places(room):
        for p, kept in [(place.live(base), False)] + [(k, True) for k in place.kept(base)]:
            try:
                t = p.stat().st_mtime
            except OSError:
                continue
            found.append(Recovery(p, t, kept, room_t is not None and room_t > t))
    return sorted(found, key=lambda r: r.saved_at, reverse=True)


def find_recovery(room: Path | None) -> Path | None:
    """The newest live recovery file newer than the room file (in any place), if one is left
    from a session that ended without saving."""
    for r in find_recoveries(room):
        if not r.kept and not r.older_than_room:
            return r.path
    return None


def set_aside(rec: Path) -> Path:
    """Rename a live recovery file to a kept one named by its time (same folder), so that
    nothing writes over it; returns the new path."""
    rec = Path(rec)
    stamp = time.strftime("%Y%m%d-%H%M%S", time.localtime(rec.stat().st_mtime))
    stem = rec.name[:-len(".toml")]
    target, n = rec.with_name(f"{stem}.{stamp}.toml"), 1
    while target.exists():
        n += 1
        target = rec.with_name(f"{stem}.{stamp}-{n}.toml")
    os.replace(rec, target)
    return target


def take_over(room: Path | None, room_text: str | None = None) -> list[Path]:
    """On opening a room: set aside every live recovery file left by an earlier session (one
    with exactly the room file's text holds nothing unsaved and is removed). Returns the kept
    files made."""
    made = []
    for path in recovery_paths(room):
        try:
            if not path.is_file():
                continue
            if room_text is not None and path.read_text(encoding="utf-8") == room_text:
                path.unlink()
                continue
            made.append(set_aside(path))
        except (OSError, UnicodeDecodeError):
            continue
    return made


def discard_recovery(room: Path | None) -> None:
    """Remove the live recovery file of a room, in every place (kept files stay)."""
    for p in recovery_paths(room):
        discard_file(p)


def discard_file(path: Path) -> None:
    try:
        os.unlink(path)
    except FileNotFoundError:
        pass
    except OSError:
        pass


class RecoveryUnavailable(OSError):
    """No place could take the recovery file."""


@dataclass(frozen=True)
class Written:
    """Where a recovery file went, and why the places before it were passed over."""

    path: Path
    passed: tuple[str, ...] = ()      # "FOLDER: reason" for each place that failed

    @property
    def fallback(self) -> bool:
        return bool(self.passed)


def _reason(exc: OSError) -> str:
    return exc.strerror or str(exc)


def write_recovery(room: Path | None, text: str) -> Written:
    """Write the live recovery file in the first place that takes it. Raises
    RecoveryUnavailable (naming every place and why) when none does."""
    base, passed = _base(room), []
    for place in _places(room):
        path = place.live(base)
        try:
            if place.private:
                place.folder.mkdir(mode=0o700, exist_ok=True)
                if hasattr(os, "getuid") and place.folder.stat().st_uid != os.getuid():
                    raise PermissionError(13, "the folder belongs to another user")
            else:
                place.folder.mkdir(parents=True, exist_ok=True)
            write_text_atomic(path, text)
        except OSError as exc:
            passed.append(f"{place.folder}: {_reason(exc)}")
            continue
        return Written(path, tuple(passed))
    raise RecoveryUnavailable("; ".join(passed))


@dataclass(frozen=True)
class Status:
    """The writer's last outcome: ``ok`` (the preferred place), ``fallback`` (another place),
    ``failed`` (nowhere), with the message a user should read."""

    kind: str
    path: Path | None = None
    message: str = ""


@dataclass
class _Job:
    room: Path | None
    text: object               # a str, a zero-argument callable giving one, or None: discard
    asked_at: float
    waiting_since: float = 0.0  # the first request of the room not yet done (for the delay)


class RecoveryWriter:
    """Keeps the live recovery file of the room being edited up to date, off the main thread.

    ``keep(room, text)`` and ``discard(room)`` return at once; one daemon thread does the
    work, one room at a time, always with the newest request for that room (older ones are
    dropped, never written after a newer one), at most ``delay_s`` after the first request
    not yet done (steady typing does not put it off). ``text`` may be a callable, run in the thread
    (the snapshot it reads must not change after the call). ``flush()`` waits until all is on
    disk. ``report(status)`` is called, from the thread, when the outcome changes kind or
    place (to tell the user at once that a crash would lose their work).
    """

    def __init__(self, report=None, delay_s: float = 0.0):
        self.report = report
        self.delay_s = delay_s
        self.status = Status("ok")
        self.last_write: tuple[float, float] | None = None   # (asked_at, on disk), perf_counter
        self._jobs: dict[str, _Job] = {}
        self._busy = False
        self._hurry = False
        self._closed = False
        self._cond = threading.Condition()
        self._thread: threading.Thread | None = None

    def keep(self, room: Path | None, text) -> None:
        self._put(_Job(room, text, time.perf_counter()))

    def discard(self, room: Path | None) -> None:
        self._put(_Job(room, None, time.perf_counter()))

    def _put(self, job: _Job) -> None:
        key = str(job.room)
        with self._cond:
            older = self._jobs.pop(key, None)
            job.waiting_since = older.waiting_since if older is not None else job.asked_at
            self._jobs[key] = job
            if self._thread is None and not self._closed:
                self._thread = threading.Thread(target=self._run, name="roomcalc-recovery",
                                                daemon=True)
                self._thread.start()
            self._cond.notify_all()

    def flush(self, timeout: float = 10.0) -> bool:
        """Wait until every request so far is on disk (True) or ``timeout`` passes."""
        with self._cond:
            if self._thread is None:
                self._run_here()
                return True
            self._hurry = True
            self._cond.notify_all()
            done = self._cond.wait_for(lambda: not self._jobs and not self._busy, timeout)
            self._hurry = False
            return done

    def close(self, timeout: float = 10.0) -> None:
        """Finish what was asked, then stop the thread."""
        self.flush(timeout)
        with self._cond:
            self._closed = True
            self._cond.notify_all()
            thread = self._thread
        if thread is not None and thread is not threading.current_thread():
            thread.join(timeout)

    def _run_here(self) -> None:
        # No thread (closed): do what is left on the calling thread. Called holding the lock.
        while self._jobs:
            job = self._jobs.pop(next(iter(self._jobs)))
            self._do(job)

    def _run(self) -> None:
        while True:
            with self._cond:
                while not self._jobs and not self._closed:
                    self._cond.wait()
                if not self._jobs:
                    self._thread = None
                    return
                key = next(iter(self._jobs))
                while self.delay_s > 0 and not self._hurry and key in self._jobs:
                    left = self._jobs[key].waiting_since + self.delay_s - time.perf_counter()
                    if left <= 0:
                        break
                    self._cond.wait(left)
                job = self._jobs.pop(key, None)
                self._busy = job is not None
            try:
                if job is not None:
                    self._do(job)
            finally:
                with self._cond:
                    self._busy = False
                    self._cond.notify_all()

    def _do(self, job: _Job) -> None:
        if job.text is None:
            discard_recovery(job.room)
            return
        try:
            text = job.text() if callable(job.text) else job.text
            written = write_recovery(job.room, text)
        except RecoveryUnavailable as exc:
            self._set(Status("failed", None, f"Unsaved changes cannot be kept for recovery "
                             f"({exc}). If roomcalc or the computer stops now, they are lost: "
                             "save them (Ctrl+S, or F2 to save in another folder)."))
            return
        except Exception as exc:          # noqa: BLE001 - a thread must tell, not die silently
            self._set(Status("failed", None, f"Unsaved changes cannot be kept for recovery "
                             f"({type(exc).__name__}: {exc}). Save them (Ctrl+S)."))
            return
        self.last_write = (job.asked_at, time.perf_counter())
        if written.fallback:
            self._set(Status("fallback", written.path,
                             f"The recovery folder cannot be written ({written.passed[0]}); "
                             f"unsaved changes are kept in {written.path} instead."))
        else:
            self._set(Status("ok", written.path,
                             f"Unsaved changes are kept for recovery again ({written.path})."))

    def _set(self, status: Status) -> None:
        before = self.status
        self.status = status
        same = before.kind == status.kind and (status.kind != "fallback"
                                               or before.path == status.path)
        if not same and self.report is not None:
            try:
                self.report(status)
            except Exception:             # noqa: BLE001 - the app may be closing
                pass
