"""Where roomcalc finds its shipped data and the user's own files.

Nothing is created at import time. ``ROOMCALC_DATA_DIR`` points the user data folder elsewhere
(tests use it); otherwise platformdirs gives the usual place for the platform.
"""

from __future__ import annotations

import os
from pathlib import Path

_PACKAGE = Path(__file__).resolve().parent.parent


def _shipped(name: str) -> Path:
    """A data folder shipped in the wheel (roomcalc/_data/NAME) or, from a source tree, ../NAME."""
    inside = _PACKAGE / "_data" / name
    if inside.is_dir():
        return inside
    return _PACKAGE.parent / name


def materials_dir() -> Path:
    """The built-in material catalogue folder."""
    return _shipped("materials")


def example_rooms_dir() -> Path:
    """The folder of example rooms, the demo among them."""
    return _shipped("example_rooms")


def demo_room_path() -> Path:
    """The built-in demo room: a converted garage used as a project studio."""
    return example_rooms_dir() / "garage-studio.toml"


def demo_treated_path() -> Path:
    """The demo room with its treatment, for ``compare --demo``."""
    return example_rooms_dir() / "garage-studio-treated.toml"


def user_data_dir() -> Path:
    """The user's roomcalc data folder (may not exist)."""
    env = os.environ.get("ROOMCALC_DATA_DIR")
    if env:
        return Path(env)
    import platformdirs

    return Path(platformdirs.user_data_dir("roomcalc", appauthor=False))


def user_catalog_dir() -> Path:
    """Folder whose ``*.toml`` files extend the catalogue (may not exist)."""
    return user_data_dir() / "materials"
