"""The shipped material catalogue: size, sources, REFERENCES values, and user catalogues."""

from __future__ import annotations

import pytest

from roomcalc.io.catalog import ID_PATTERN, load_catalog
from roomcalc.io.errors import RoomFileError

MEMORY = "typical value, from memory; verify against a test report to ISO 354 / ASTM C423"

# Source: Bies, Hansen & Howard, Engineering Noise Control, 5th ed. (2017), Table 6.2
# (secondary quotation, as in shared REFERENCES), 125-4000 Hz.
BIES_TABLE_6_2 = {
    "Concrete or terrazzo": [.01, .01, .01, .02, .02, .02],
    "Heavy carpet on concrete": [.02, .06, .14, .37, .60, .65],
    "Mineral wool 50 mm, 16 kg/m^3": [.17, .45, .80, .89, .97, .94],
    "Mineral wool 50 mm, 48 kg/m^3": [.30, .80, 1.0, 1.0, 1.0, 1.0],
    "Ordinary window glass": [.35, .25, .18, .12, .07, .04],
    "Gypsum board on studs": [.29, .10, .05, .04, .07, .09],
}


def test_size_and_fields(catalog):
    assert len(catalog) >= 60
    for m in catalog.materials.values():
        assert ID_PATTERN.match(m.id)
        assert m.kind in ("surface", "object")
        assert all(b in m.values for b in (125, 250, 500, 1000, 2000, 4000))
        # Every value names its source, or says it is from memory.
        assert m.source == MEMORY or any(w in m.source for w in ("Table", "App.", "ISO", "ASTM"))


def test_published_values_present(catalog):
    bands = [125, 250, 500, 1000, 2000, 4000]
    found = {}
    for m in catalog.materials.values():
        if "Bies" in m.source:
            found[tuple(m.values_for(bands))] = m
    for name, vals in BIES_TABLE_6_2.items():
        assert tuple(vals) in found, name


def test_user_catalog_and_duplicates(tmp_path, monkeypatch):
    entry = """[[materials]]
id = "{id}"
name = "Test panel"
category = "porous panels"
kind = "surface"
values = {{ 125 = 0.1, 250 = 0.3, 500 = 0.6, 1000 = 0.8, 2000 = 0.8, 4000 = 0.8 }}
source = "{src}"
"""
    user = tmp_path / "user"
    (user / "materials").mkdir(parents=True)
    (user / "materials" / "mine.toml").write_text(entry.format(id="my-panel", src=MEMORY))
    monkeypatch.setenv("ROOMCALC_DATA_DIR", str(user))
    assert "my-panel" in load_catalog()
    dup = tmp_path / "dup.toml"
    dup.write_text(entry.format(id="my-panel", src=MEMORY))
    with pytest.raises(RoomFileError) as e:
        load_catalog([dup])
    msg = str(e.value)
    assert "dup.toml" in msg and "mine.toml" in msg and "my-panel" in msg
