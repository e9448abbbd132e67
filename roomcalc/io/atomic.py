"""Atomic saving: a reader sees the old file or the new one, never half of one."""

from __future__ import annotations

import os
import re
import tempfile
import time
from pathlib import Path

try:                        # POSIX: a save holds a lock on its temporary file while it runs
    import fcntl
except ImportError:         # pragma: no cover - Windows: staleness by age alone
    fcntl = None

STALE_TEMPORARY_S = 30.0    # without locks: a temporary file this old is left from a killed save
_RANDOM = "[a-z0-9_]{8}"    # the part tempfile.mkstemp makes up (8 of these characters)


def write_text_atomic(path, text: str) -> None:
    """Write text to path atomically.

    The text goes to a temporary file ``.NAME.XXXXXXXX.tmp`` in the same folder, is flushed and
    fsynced, then replaces the target with ``os.replace``, and the folder is fsynced so that
    the rename itself survives a power cut (where the system can fsync a folder). On any
    failure the temporary file is removed and the old file stays as it was. Temporary files of
    the same target left by an earlier save that was killed are removed first. Where the system
    has ``flock``, the save holds a lock on its temporary file until the rename, which is how
    another save knows the file is not left over (the lock goes with the process).
    """
    path = Path(path)
    folder = path.parent or Path(".")
    remove_stale_temporaries(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    fh = None
    try:
        if fcntl is not None:
            fcntl.flock(fd, fcntl.LOCK_EX)
        fh = os.fdopen(fd, "w", encoding="utf-8", newline="\n")
        fh.write(text)
        fh.flush()
        os.fsync(fh.fileno())
        if path.exists():
            os.chmod(tmp, path.stat().st_mode & 0o777)
        else:
            os.chmod(tmp, 0o644)
        if fcntl is None:          # Windows cannot rename a file that is open
            fh.close()
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise
    finally:
        if fh is not None:
            fh.close()
        else:
            os.close(fd)
    fsync_folder(folder)


def fsync_folder(folder) -> bool:
    """Flush a folder's entries (a rename in it) to disk. Returns False, quietly, where the
    system cannot open a folder for that (no ``os.O_DIRECTORY``, e.g. Windows) or refuses."""
    flag = getattr(os, "O_DIRECTORY", None)
    if flag is None:
        return False
    try:
        fd = os.open(folder, os.O_RDONLY | flag)
    except OSError:
        return False
    try:
        os.fsync(fd)
        return True
    except OSError:
        return False
    finally:
        os.close(fd)


def temporary_pattern(path) -> re.Pattern:
    """The names of the temporary files :func:`write_text_atomic` makes for ``path``."""
    return re.compile(r"\." + re.escape(Path(path).name) + r"\." + _RANDOM + r"\.tmp\Z")


def remove_stale_temporaries(path, older_than_s: float = STALE_TEMPORARY_S) -> list[Path]:
    """Remove the temporary files of ``path`` left by saves that were killed before they
    finished: only names of our own pattern (``.NAME.XXXXXXXX.tmp``, for this very NAME) and
    only those no save is writing: where the system has ``flock``, those whose lock is free
    (a live save holds it); elsewhere those not changed for ``older_than_s`` seconds (a save in
    progress writes its file in well under a second). Never raises; returns what was
    removed."""
    path = Path(path)
    folder = path.parent or Path(".")
    pattern = temporary_pattern(path)
    removed = []
    try:
        names = [n for n in os.listdir(folder) if pattern.match(n)]
    except OSError:
        return removed
    now = time.time()
    for name in names:
        p = folder / name
        try:
            st = p.lstat()
            if not os.path.isfile(p) or os.path.islink(p):
                continue
            if fcntl is None:
                if now - st.st_mtime < older_than_s:
                    continue
                os.unlink(p)
            elif not _unlink_if_unlocked(p):
                continue
            removed.append(p)
        except OSError:
            continue
    return removed


def _unlink_if_unlocked(p: Path) -> bool:
    """Remove ``p`` if no process holds its lock (the save that made it has ended)."""
    fd = os.open(p, os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0))
    try:
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            return False              # a save is writing it now
        os.unlink(p)
        return True
    finally:
        os.close(fd)
