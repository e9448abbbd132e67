"""Saving from the interface keeps the comments the user wrote in the room file."""

from __future__ import annotations

from roomcalc.io.roomfile import parse_spec
from roomcalc.tui.app import AppConfig, make_app
from roomcalc.tui.document import Document

SIZE = (120, 40)
AREA_COL = 2                    # the surfaces table's area column


async def _ready(pilot, tries: int = 100):
    for _ in range(tries):
        await pilot.pause()
        if pilot.app.screen.query("#reverb-table"):
            return


async def test_editing_a_value_and_saving_keeps_the_comments(room_file, catalog, pilot_keys):
    path = room_file("classroom.toml")
    before = path.read_text(encoding="utf-8")
    assert "# What the room must reach" in before
    app = make_app(Document.open(path), catalog,
                   AppConfig(offer_recovery=False, theme="textual-dark"))
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        doc = app.screen.document
        windows = [s.name for s in doc.spec.surfaces].index("Windows")
        await pilot_keys.edit_cell(pilot, app.screen.query_one("#t-surfaces"), windows,
                                   AREA_COL, "2.5")
        assert doc.spec.surfaces[windows].area == 2.5 and doc.modified
        assert doc.comments_lost() == []
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert not doc.modified
    after = path.read_text(encoding="utf-8")
    assert after != before
    comments = [ln for ln in before.splitlines() if ln.startswith("#")]
    assert [ln for ln in after.splitlines() if ln.startswith("#")] == comments
    assert "# What the room must reach" in after
    # Only the edited line differs, and the file reads back to the edited room.
    changed = [(a, b) for a, b in zip(before.splitlines(), after.splitlines()) if a != b]
    assert changed == [("area = 2.4", "area = 2.5")]
    assert parse_spec(after) == doc.spec


async def test_a_save_that_drops_comments_asks_first(room_file, catalog):
    """Deleting an entry that holds a comment: Ctrl+S names the comment and asks; Cancel
    writes nothing, "Save without them" saves."""
    from roomcalc.tui.screens.dialogs import Ask

    path = room_file("classroom.toml")
    text = path.read_text(encoding="utf-8").replace(
        'name = "Door"', '# The old door: to be replaced next summer\nname = "Door"')
    path.write_text(text, encoding="utf-8")
    app = make_app(Document.open(path), catalog,
                   AppConfig(offer_recovery=False, theme="textual-dark"))
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        doc = app.screen.document
        doc.delete("surfaces", [s.name for s in doc.spec.surfaces].index("Door"))
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert isinstance(app.screen, Ask)
        assert "# The old door: to be replaced next summer" in app.screen.question
        await pilot.click("#cancel")
        await pilot.pause()
        assert path.read_text(encoding="utf-8") == text and doc.modified
        await pilot.press("ctrl+s")
        await pilot.pause()
        await pilot.click("#save")
        await pilot.pause()
        assert not doc.modified
    after = path.read_text(encoding="utf-8")
    assert "The old door" not in after and 'name = "Door"' not in after
    assert parse_spec(after) == doc.spec


def test_adding_to_an_empty_list_returns_where_the_entry_is():
    """The index ``Document.add`` returns is the new entry's, also below the end of a short
    list (the cursor of an empty table is row 0)."""
    doc = Document.new_box(5.0, 4.0, 3.0)
    assert doc.spec.objects == []
    at = doc.add("objects", 0)
    assert at == 0 and doc.spec.objects[at].name == "Object 1"
    assert doc.add("objects", 7) == 1 and len(doc.spec.objects) == 2
