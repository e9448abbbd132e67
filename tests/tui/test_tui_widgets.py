"""Widget tests: one widget (or one screen) in a throwaway app, driven with Pilot, with the
messages it sends collected through ``message_hook``."""

from __future__ import annotations

from pathlib import Path

from textual.app import App
from textual.coordinate import Coordinate
from roomcalc.tui.widgets.grid import CellGrid

from roomcalc.io.roomfile import SurfaceSpec, parse_spec
from roomcalc.study.edits import convert_units
from roomcalc.tui.messages import FieldEdited, MaterialWanted, RowAction
from roomcalc.tui.screens.materials import MaterialChooser
from roomcalc.tui.widgets.record_table import Column, RecordTable
from roomcalc.tui.widgets.room_form import RoomForm, Unparsed

EXAMPLES = Path(__file__).resolve().parents[2] / "example_rooms"

SIZE = (120, 40)
BANDS = (125, 250, 500, 1000, 2000, 4000)
COLUMNS = [Column("name", "Name", optional=False),
           Column("area", "Area [m^2]", "number"),
           Column("count", "n", "int", optional=False),
           Column("material", "Material", "material"),
           Column("alpha", "alpha per band", "numbers", length=len(BANDS))]
NAME, AREA, COUNT, MATERIAL, ALPHA = range(5)


class TableApp(App):
    def compose(self):
        yield RecordTable("surfaces", COLUMNS, help_text="keys", id="rt")


def _records():
    return [SurfaceSpec(name="Floor", area=20.0, material="concrete-floor-painted"),
            SurfaceSpec(name="Panel [/x]", area=2.5, count=3, alpha=[0.1] * len(BANDS))]


def _collector():
    got = []

    def hook(msg):
        # A bubbling message is posted again to each parent: keep each message once.
        if isinstance(msg, (FieldEdited, RowAction, MaterialWanted)) and \
                not any(m is msg for m in got):
            got.append(msg)
    return got, hook


async def _edit(pilot, table, row, column, text):
    table.query_one("#table", CellGrid).move_cursor(row=row, column=column, animate=False)
    await pilot.pause()
    await pilot.press("enter")
    await pilot.pause()
    await pilot.press("ctrl+u", *text, "enter")
    await pilot.pause()


def _edits(got):
    return [(m.collection, m.index, m.key, m.value) for m in got if isinstance(m, FieldEdited)]


async def test_record_table_sends_parsed_values():
    got, hook = _collector()
    app = TableApp()
    async with app.run_test(size=SIZE, message_hook=hook) as pilot:
        rt = app.query_one(RecordTable)
        rt.set_records(_records())
        await pilot.pause()
        table = rt.query_one("#table", CellGrid)
        assert table.row_count == 2
        # The cells as typed, a name with brackets too; headings with their units.
        assert [str(c) for c in table.get_row_at(1)] == ["Panel [/x]", "2.5", "3", "",
                                                         "0.1 0.1 0.1 0.1 0.1 0.1"]
        assert [str(c.label) for c in table.columns.values()][AREA] == "Area [m^2]"
        table.focus()

        # Enter on a number cell opens the editor with the value; Enter sends it parsed.
        table.move_cursor(row=0, column=AREA, animate=False)
        await pilot.press("enter")
        await pilot.pause()
        editor = rt.query_one("#editor")
        assert rt.has_class("editing") and editor.has_focus and editor.value == "20"
        await pilot.press("ctrl+u", *"9.5", "enter")
        await pilot.pause()
        assert _edits(got) == [("surfaces", 0, "area", 9.5)]
        assert isinstance(_edits(got)[0][3], float)
        assert not rt.has_class("editing") and table.has_focus

        # Text in a number column: the reason shows and nothing is sent.
        got.clear()
        await _edit(pilot, rt, 1, AREA, "abc")
        assert _edits(got) == []
        assert "'abc' is not a number" in str(rt.query_one("#editor-error").render())
        assert rt.has_class("editing")
        await pilot.press("escape")
        await pilot.pause()
        assert not rt.has_class("editing") and _edits(got) == []

        # Empty clears an optional field (None); a whole-number column takes an int.
        await _edit(pilot, rt, 1, AREA, "")
        await _edit(pilot, rt, 1, COUNT, "4")
        assert _edits(got) == [("surfaces", 1, "area", None), ("surfaces", 1, "count", 4)]
        assert type(_edits(got)[1][3]) is int

        # A list per band: the wrong count is refused; spaces, semicolons or a comma and a
        # space separate (a comma between two digits is a decimal comma).
        got.clear()
        await _edit(pilot, rt, 0, ALPHA, "1 2")
        assert _edits(got) == []
        assert f"2 values given; {len(BANDS)} are needed" in \
            str(rt.query_one("#editor-error").render())
        await pilot.press(*", 3; 4, 5 6", "enter")       # appended to "1 2"
        await pilot.pause()
        assert _edits(got) == [("surfaces", 0, "alpha", [1.0, 2.0, 3.0, 4.0, 5.0, 6.0])]

        # Enter on the material cell asks for the chooser instead of editing.
        table.move_cursor(row=1, column=MATERIAL, animate=False)
        await pilot.press("enter")
        await pilot.pause()
        wanted = [m for m in got if isinstance(m, MaterialWanted)]
        assert [(m.collection, m.index) for m in wanted] == [("surfaces", 1)]
        assert not rt.has_class("editing")


async def test_record_table_row_actions():
    got, hook = _collector()
    app = TableApp()
    async with app.run_test(size=SIZE, message_hook=hook) as pilot:
        rt = app.query_one(RecordTable)
        rt.set_records(_records())
        table = rt.query_one("#table", CellGrid)
        table.focus()
        await pilot.pause()
        table.move_cursor(row=1, column=0, animate=False)
        await pilot.press("a")
        await pilot.pause()
        await pilot.press("c")
        await pilot.pause()
        await pilot.press("x")
        await pilot.pause()
        table.move_cursor(row=0, column=0, animate=False)
        await pilot.press("ctrl+down")
        await pilot.pause()
        acts = [(m.collection, m.action, m.index) for m in got if isinstance(m, RowAction)]
        assert acts == [("surfaces", "add", 1), ("surfaces", "duplicate", 1),
                        ("surfaces", "delete", 1), ("surfaces", "down", 0)]
        # While the editor line is open, the letters are typed, not actions.
        got.clear()
        await pilot.press("enter")
        await pilot.pause()
        await pilot.press("a", "x")
        await pilot.pause()
        assert [m for m in got if isinstance(m, RowAction)] == []
        assert rt.query_one("#editor").value.endswith("ax")

        # An empty table says how to add a row; a still posts add with no row.
        await pilot.press("escape")
        rt.set_records([])
        await pilot.pause()
        assert "press a to add" in str(rt.query_one("#row-detail").render())
        got.clear()
        await pilot.press("a")
        await pilot.pause()
        assert [(m.action, m.index) for m in got if isinstance(m, RowAction)] == [("add", None)]


async def test_record_table_updates_cells_in_place():
    """New values for the same rows change the cells in place: row numbers stay and each
    column is re-measured, growing and shrinking with its longest cell."""
    app = TableApp()
    async with app.run_test(size=SIZE) as pilot:
        rt = app.query_one(RecordTable)
        records = _records()
        rt.set_records(records)
        await pilot.pause()
        table = rt.query_one("#table", CellGrid)
        records[0].name = "A much longer name for the floor"
        records[1].area = 12345.5
        rt.set_records(records)
        await pilot.pause()
        assert [str(c) for c in table.get_column("name")] == [r.name for r in records]
        assert str(table.get_cell_at(Coordinate(1, AREA))) == "12345.5"
        assert table.row_labels == ["1", "2"]
        assert table.columns["name"].content_width == len(records[0].name)
        records[0].name = "Floor"
        rt.set_records(records)
        await pilot.pause()
        assert table.columns["name"].content_width == len("Panel [/x]")
        # A row fewer: rebuilt, numbered again.
        rt.set_records(records[1:])
        await pilot.pause()
        assert table.row_count == 1 and table.row_labels == ["1"]


class ChooserApp(App):
    def __init__(self, catalog, kind="surface", current=None):
        super().__init__()
        self.catalog, self.kind, self.current = catalog, kind, current
        self.results = []

    def on_mount(self):
        self.push_screen(MaterialChooser(self.catalog, self.kind, BANDS, self.current),
                         self.results.append)


async def test_material_chooser_filters_and_picks(catalog):
    app = ChooserApp(catalog)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        lst = app.screen.query_one("#list", CellGrid)
        surfaces = catalog.search("", None, "surface")
        assert lst.row_count == len(surfaces) > 20
        # Objects are not offered for a surface.
        objects = set(catalog.ids("object"))
        assert objects and not objects & {lst.row_key(i) for i in
                                          range(lst.row_count)}
        await pilot.press(*"wool")
        await pilot.pause()
        want = [m.id for m in catalog.search("wool", None, "surface")]
        assert 1 < lst.row_count == len(want) < len(surfaces)
        await pilot.press("space", *"48kg")
        await pilot.pause()
        want = [m.id for m in catalog.search("wool 48kg", None, "surface")]
        assert lst.row_count == len(want) == 1
        # The details show the highlighted material's values at each band.
        m = catalog[want[0]]
        details = str(app.screen.query_one("#details").render())
        assert m.name in details and f"{m.values[500]:.2f}" in details
        await pilot.press("enter")
        await pilot.pause()
    assert app.results == [("material", want[0])]


async def test_material_chooser_row_and_category(catalog):
    app = ChooserApp(catalog, current="heavy-velour-flat")
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        lst = app.screen.query_one("#list", CellGrid)
        # The current material is highlighted.
        assert lst.row_key(lst.cursor_row) == "heavy-velour-flat"
        await pilot.press(*"vel")
        await pilot.pause()
        want = [m.id for m in catalog.search("vel", None, "surface")]
        # Tab to the list, one row down, Enter picks that row.
        lst.focus()
        lst.move_cursor(row=0)
        await pilot.press("down", "enter")
        await pilot.pause()
    assert app.results == [("material", want[1])]

    app = ChooserApp(catalog, kind="object")
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        lst = app.screen.query_one("#list", CellGrid)
        assert lst.row_count == len(catalog.ids("object"))
        category = sorted({catalog[i].category for i in catalog.ids("object")})[0]
        app.screen.query_one("#category").value = category
        await pilot.pause()
        want = [m.id for m in catalog.search("", category, "object")]
        assert [lst.row_key(i) for i in range(lst.row_count)] == want
        await pilot.press("escape")
        await pilot.pause()
    assert app.results == [None]


async def test_material_chooser_own_values(catalog):
    app = ChooserApp(catalog)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        own = app.screen.query_one("#own")
        # The field and its button are on the screen, not pushed off by their label.
        width = app.screen.size.width
        for w in (own, app.screen.query_one("#use-own")):
            assert w.region.width >= 10 and w.region.right <= width, w
        own.focus()
        err = app.screen.query_one("#own-error")
        await pilot.press(*".1 .2", "enter")
        await pilot.pause()
        assert str(err.render()) == f"2 values given; {len(BANDS)} are needed, one per band."
        assert isinstance(app.screen, MaterialChooser) and app.results == []
        await pilot.press("space", "x", "enter")
        await pilot.pause()
        assert "Only numbers" in str(err.render()) and app.results == []
        await pilot.press("backspace", *"0 0 0 2", "enter")      # ".1 .2 0 0 0 2"
        await pilot.pause()
        assert "2 is outside 0 to 1.2" in str(err.render()) and app.results == []
        await pilot.press("backspace", "1", "enter")
        await pilot.pause()
    assert app.results == [("values", [0.1, 0.2, 0.0, 0.0, 0.0, 1.0])]


class FormApp(App):
    def compose(self):
        yield RoomForm(id="form")


async def test_room_form_refuses_text_in_a_number_field():
    spec = parse_spec((EXAMPLES / "classroom.toml").read_text(encoding="utf-8"))
    got = []

    def hook(msg):
        if isinstance(msg, FieldEdited) and not any(m is msg for m in got):
            got.append(msg)
    app = FormApp()
    async with app.run_test(size=SIZE, message_hook=hook) as pilot:
        form = app.query_one(RoomForm)
        form.show(spec)
        await pilot.pause()
        assert got == []                        # showing the room sends nothing back
        length = form.query_one("#f-shape-length")
        shown = f"{spec.shape.length:g}"
        assert length.value == shown
        length.focus()
        await pilot.press("end", "x")
        await pilot.pause()
        assert str(form.query_one("#form-error").render()) == \
            f"shape.length: '{shown}x' is not a number"
        # Sent up marked as not a number (never a value to store).
        assert [(m.key, type(m.value)) for m in got] == [("shape.length", Unparsed)]
        await pilot.press("backspace")
        await pilot.pause()
        assert str(form.query_one("#form-error").render()) == ""
        assert [(m.key, m.value) for m in got[1:]] == [("shape.length", spec.shape.length)]
        assert type(got[1].value) is float


async def test_room_form_shows_imperial_units_without_converting():
    """Showing an imperial room sends no units change (the units Select's own first Changed,
    with its default "metric", must not turn into an edit); choosing metric does."""
    spec = parse_spec((EXAMPLES / "classroom.toml").read_text(encoding="utf-8"))
    convert_units(spec, "imperial")
    got = []

    def hook(msg):
        if isinstance(msg, FieldEdited) and not any(m is msg for m in got):
            got.append(msg)
    app = FormApp()
    async with app.run_test(size=SIZE, message_hook=hook) as pilot:
        form = app.query_one(RoomForm)
        await pilot.pause()
        form.show(spec)
        await pilot.pause()
        assert got == []
        assert form.query_one("#f-units").value == "imperial"
        assert str(form.query_one("#u-shape-length").render()) == "ft"
        form.query_one("#f-units").value = "metric"
        await pilot.pause()
        assert [(m.key, m.value) for m in got] == [("units", "metric")]
