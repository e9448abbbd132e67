"""Shared fixtures. Tests never touch the user's real data folder."""

from __future__ import annotations

from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = ROOT / "example_rooms"


@pytest.fixture(autouse=True)
def _isolated_user_data(tmp_path_factory, monkeypatch):
    monkeypatch.setenv("ROOMCALC_DATA_DIR", str(tmp_path_factory.mktemp("userdata")))


@pytest.fixture(scope="session")
def catalog():
    from roomcalc.io.catalog import load_catalog

    return load_catalog(include_user=False)
