"""Atomic saving: a reader sees the old file or the new one, never half of one."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path


def write_text_atomic(path, text: str) -> None:
    """Write text to path atomically.

    The text goes to a temporary file in the same folder, is flushed and fsynced, then replaces
    the target with ``os.replace``; on any failure the temporary file is removed and the old file
    stays as it was.
    """
    path = Path(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent or ".")
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
