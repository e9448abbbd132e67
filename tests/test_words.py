"""Words a non-expert understands: where a material's values come from, as a sentence."""

from __future__ import annotations

import json

from roomcalc.cli import main
from roomcalc.io.catalog import Material, load_catalog_file
from roomcalc.present.materials import MEMORY_SOURCE, materials_text, source_sentence


def test_memory_source_reads_as_a_sentence_that_keeps_from_memory(catalog):
    m = next(x for x in catalog.materials.values() if x.source == MEMORY_SOURCE)
    text = source_sentence(m)
    assert "[memory]" not in text and "verify against" not in text
    assert "from memory" in text        # the honesty stays
    assert text.startswith("typical value from handbooks, remembered")
    assert "not a test of this product" in text and "ISO 354" in text


def test_handbook_source_names_the_book_and_table(catalog):
    m = next(x for x in catalog.materials.values() if "Bies" in x.source)
    text = source_sentence(m)
    assert text.startswith("from Bies, Hansen & Howard, Engineering Noise Control, 5th ed.")
    assert "Table 6.2" in text and "quoted at second hand" in text
    assert "not a test of this product; check a test report to ISO 354" in text


def test_users_own_source_is_quoted_as_given(tmp_path):
    f = tmp_path / "mine.toml"
    f.write_text('[[materials]]\nid = "my-panel"\nname = "My panel"\nkind = "surface"\n'
                 'values = { 125 = 0.1, 250 = 0.2, 500 = 0.5, 1000 = 0.8, 2000 = 0.9, '
                 '4000 = 0.9 }\nsource = "Lab X report 12, 2024"\n', encoding="utf-8")
    m = load_catalog_file(f)[0]
    assert source_sentence(m) == "your own value, from: Lab X report 12, 2024"
    assert "not a test of this product" not in source_sentence(m)
    assert source_sentence(Material("x", "X", "user", "surface", {}, "ISO 354 test")) \
        .startswith("from ISO 354 test")


def test_every_listing_says_the_sentence(catalog, capsys):
    mats = [m for m in catalog.materials.values() if m.source == MEMORY_SOURCE][:2]
    sentence = source_sentence(mats[0])
    assert "typical value from handbooks, remembered (from memory" in \
        " ".join(materials_text(mats).split())
    assert sentence in materials_text(mats, "markdown")
    assert json.loads(materials_text(mats, "json"))[0]["source_sentence"] == sentence
    assert sentence in materials_text(mats, "csv")
    assert main(["materials", "carpet tiles"]) == 0
    out = " ".join(capsys.readouterr().out.split())
    assert "values: typical value from handbooks, remembered" in out
