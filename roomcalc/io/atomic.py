"""Atomic saving: a reader sees the old file or the new one, never half of one."""

from __future__ import annotations

import os
import re
import tempfile
import time
from pathlib import Path

STALE_TEMPORARY_S = 30.0    # a temporary file this old is left from a save that was killed
_RANDOM = "[a-z0-9_]{8}"    # the part tempfile.mkstemp makes up (8 of these characters)


def write_text_atomic(path, text: str) -> None:
    """Write text to path atomically.

    The text goes to a temporary file ``.NAME.XXXXXXXX.tmp`` in the same folder, is flushed and
    fsynced, then replaces the target with ``os.replace``, and the folder is fsynced so that
    the rename itself survives a power cut (where the system can fsync a folder). On any
    failure the temporary file is removed and the old file stays as it was. Temporary files of
    the same target left by an earlier save that was killed are removed first.
    """
    path = Path(path)
    folder = path.parent or Path(".")
    remove_stale_temporaries(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
            fh.flush()
            os.fsync(fh.fileno())
        if path.exists():
            os.chmod(tmp, path.stat().st_mode & 0o777)
        else:
            os.chmod(tmp, 0o644)
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise
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
    only those not changed for ``older_than_s`` seconds (a save in progress writes its file in
    well under a second). Never raises; returns what was removed."""
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
            if not os.path.isfile(p) or os.path.islink(p) or now - st.st_mtime < older_than_s:
                continue
            os.unlink(p)
            removed.append(p)
        except OSError:
            continue
    return removed
