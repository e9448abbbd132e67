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


# ----------------------------------------------------------------------------- occupancy marks

def test_people_entries_are_marked(catalog):
    # Common practice: people are the part of a room's absorption that comes and goes; each
    # entry that is, or includes, people says so, and names what remains when they leave.
    expect = {"person-seated": None, "person-standing": None, "child-seated": None,
              "child-standing": None,
              "audience-upholstered-occupied": "upholstered-seating-unoccupied",
              "audience-hard-seats-occupied": "hard-seating-unoccupied",
              "upholstered-seat-occupied": "upholstered-seat-unoccupied",
              "school-desk-with-pupil": "hard-chair-unoccupied"}
    marked = {m.id: m.unoccupied for m in catalog.materials.values() if m.occupant}
    assert marked == expect
    for mid, other in expect.items():
        if other is not None:
            assert catalog[other].kind == catalog[mid].kind and not catalog[other].occupant
    assert all(m.unoccupied is None for m in catalog.materials.values() if not m.occupant)
    # A surface cannot leave with its people, so a surface occupant always has a counterpart.
    assert all(m.unoccupied for m in catalog.materials.values()
               if m.occupant and m.kind == "surface")


PEOPLE = """[[materials]]
id = "{id}"
name = "Test entry"
category = "seats and people"
kind = "{kind}"
values = {{ 125 = 0.1, 250 = 0.3, 500 = 0.6, 1000 = 0.8, 2000 = 0.8, 4000 = 0.8 }}
source = "typical value, from memory; verify against a test report to ISO 354 / ASTM C423"
{extra}
"""


@pytest.mark.parametrize("entries, where, message", [
    ([("crowd", "object", 'occupant = "yes"')], "materials[0].occupant",
     "must be true or false, not text"),
    ([("crowd", "object", 'unoccupied = "hard-chair-unoccupied"')], "materials[0].unoccupied",
     "only goes with occupant = true"),
    ([("crowd", "surface", "occupant = true")], "materials[0].unoccupied",
     "is required with occupant = true for a surface"),
    ([("crowd", "object", 'occupant = true\nunoccupied = "crowd"')], "materials[0].unoccupied",
     "'crowd' is this entry"),
    ([("crowd", "object", 'occupant = true\nunoccupied = "hard-chair-unocupied"')],
     "materials id 'crowd': unoccupied",
     "unknown entry 'hard-chair-unocupied'; did you mean 'hard-chair-unoccupied'?"),
    ([("crowd", "object", 'occupant = true\nunoccupied = "upholstered-seating-unoccupied"')],
     "materials id 'crowd': unoccupied",
     "'upholstered-seating-unoccupied' is of kind surface; the entry that remains when the "
     "people leave is of the same kind as this one (object)"),
    ([("crowd", "object", 'occupant = true\nunoccupied = "person-seated"')],
     "materials id 'crowd': unoccupied",
     "'person-seated' is marked occupant itself; name an entry without people (no chains)"),
])
def test_bad_occupancy_marks(tmp_path, entries, where, message):
    f = tmp_path / "mine.toml"
    f.write_text("".join(PEOPLE.format(id=i, kind=k, extra=x) for i, k, x in entries))
    with pytest.raises(RoomFileError) as e:
        load_catalog([f], include_user=False)
    (p,) = e.value.problems
    assert (p.file, p.where) == (str(f), where) and p.message.startswith(message), p


def test_user_entry_may_name_a_shipped_counterpart(tmp_path):
    f = tmp_path / "mine.toml"
    f.write_text(PEOPLE.format(id="pupil-at-bench", kind="object",
                               extra='occupant = true\nunoccupied = "hard-chair-unoccupied"'))
    m = load_catalog([f], include_user=False)["pupil-at-bench"]
    assert (m.occupant, m.unoccupied) == (True, "hard-chair-unoccupied")


# Words people use for things (common practice: everyday and trade names, British and American
# spellings), and what each must find in our catalogue.
@pytest.mark.parametrize("words,must_find", [
    ("drywall", "gypsum-board-on-studs"),
    ("plasterboard", "gypsum-board-on-studs"),
    ("gypsum", "plasterboard-ceiling-suspended"),
    ("window", "double-glazing-sealed-unit"),
    ("glazing", "window-glass-ordinary"),
    ("bass trap", "corner-trap-membrane"),
    ("baffle", "mineral-wool-50mm-48kg"),
    ("hanging panel", "glass-fibre-board-50mm-fabric"),
    ("rockwool 50mm", "mineral-wool-50mm-48kg"),
    ("fiberglass", "glass-fibre-board-25mm-fabric"),
])
def test_search_finds_what_people_call_things(catalog, words, must_find):
    assert must_find in [m.id for m in catalog.search(words)]


def test_search_words_still_narrow(catalog):
    """Every word must match (a synonym counts as its word): more words, fewer materials."""
    wide = {m.id for m in catalog.search("bass trap")}
    narrow = {m.id for m in catalog.search("bass trap membrane")}
    assert narrow and narrow < wide
    assert catalog.search("drywall linoleum") == []


def test_a_search_with_no_hit_says_so_and_suggests_categories(catalog, capsys):
    from roomcalc.cli import main

    assert catalog.suggest_categories("woool") == ["ceilings", "porous panels"]
    assert "glazing and doors" in catalog.suggest_categories("glas")
    assert catalog.suggest_categories("zzz") == catalog.categories()
    assert main(["materials", "woool"]) == 0
    out = " ".join(capsys.readouterr().out.split())      # wrapped to the report's width
    assert "No material matches 'woool'" in out and "porous panels" in out
    assert "0 material(s)" not in out
    assert main(["materials", "woool", "--format", "json"]) == 0
    got = capsys.readouterr()
    assert got.out.strip() == "[]" and "No material matches" in got.err


def test_search_puts_materials_named_by_the_words_first(catalog):
    """Enter in the chooser picks the first row: a search for "wood" gave a rug first (its
    notes mention a wooden floor). Materials whose name holds every word now come first, then
    those whose id or category does, then those with the words only in their notes."""
    def rank(m, words):
        name = m.name.lower()
        if all(w in name for w in words.split()):
            return 0
        if all(w in f"{m.id} {m.name} {m.category}".lower() for w in words.split()):
            return 1
        return 2

    for words in ("wood", "carpet", "panel"):
        found = catalog.search(words)
        ranks = [rank(m, words) for m in found]
        assert ranks == sorted(ranks), words
        assert ranks[0] == 0, words


def test_search_lists_the_preferred_categories_first_among_equals(catalog):
    """A ceiling's chooser: "tile" listed carpet tiles first; with ceilings preferred the
    ceiling tiles come first, and every material found is still listed."""
    plain = catalog.search("tile", kind="surface")
    ceiling = catalog.search("tile", kind="surface", prefer=("ceilings",))
    assert {m.id for m in plain} == {m.id for m in ceiling}
    assert ceiling[0].category == "ceilings"
    assert any(m.category != "ceilings" for m in ceiling)


def test_the_chooser_prefers_the_categories_of_the_face():
    """Floors and carpets for a floor, ceilings for a ceiling (also for a treatment covering
    it), porous panels for a treatment on a wall, nothing for a wall or an object."""
    from pathlib import Path

    from roomcalc.io.roomfile import parse_spec
    from roomcalc.present.materials import preferred_categories
    from roomcalc.study.edits import new_candidate

    path = Path(__file__).resolve().parents[1] / "example_rooms" / "classroom.toml"
    spec = parse_spec(path.read_text(encoding="utf-8"), str(path))
    by_face = {s.face: s for s in spec.surfaces}
    assert preferred_categories(spec, "surfaces", by_face["floor"]) == ("floors", "carpets")
    assert preferred_categories(spec, "surfaces", by_face["ceiling"]) == ("ceilings",)
    assert preferred_categories(spec, "surfaces", by_face["left"]) == ()
    cand = new_candidate(spec, "T")
    assert preferred_categories(spec, "candidates", cand) == ("porous panels",)
    cand.surface = by_face["ceiling"].name
    assert preferred_categories(spec, "candidates", cand) == ("ceilings",)
    assert preferred_categories(spec, "objects", spec.objects[0]) == ()
