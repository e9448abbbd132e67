"""Nothing essential cut at 120x40 or 80x24: the surface table's Material and Area, the sixth
tab, the plan's cost column and Apply button, the key line's help and quit (each of these was
cut before)."""

from __future__ import annotations

from textual.widgets import TabbedContent

from roomcalc.tui.app import AppConfig, make_app
from roomcalc.tui.document import Document


def _app(path, catalog):
    return make_app(Document.open(path), catalog,
                    AppConfig(offer_recovery=False, theme="textual-dark"))


async def _settle(pilot, n: int = 8):
    for _ in range(n):
        await pilot.pause()


async def _planned(pilot) -> None:
    """Press r in the Plan tab and wait until the plan can be applied."""
    await pilot.press("r")
    for _ in range(200):
        await pilot.pause()
        if not pilot.app.screen.query_one("#plan-apply").disabled:
            return
    raise AssertionError("no plan to apply came")


def _right_edge_of_column(grid, key: str) -> int:
    """Where a column ends, in the grid's own columns (0 = its left edge)."""
    x = grid._label_width if hasattr(grid, "_label_width") else 0
    for k, col in grid.columns.items():
        x += col.outer_width
        if k == key:
            return x
    raise KeyError(key)


def _inside(inner, outer) -> bool:
    return inner.x >= outer.x and inner.right <= outer.right


async def test_the_surface_table_shows_material_and_area_without_scrolling(room_file, catalog):
    for size in ((120, 40), (80, 24)):
        app = _app(room_file("workshop.toml"), catalog)
        async with app.run_test(size=size) as pilot:
            await _settle(pilot, 20)
            grid = app.screen.query_one("#t-surfaces #table")
            assert grid.scroll_x == 0
            for key in ("area", "material"):
                assert _right_edge_of_column(grid, key) <= grid.size.width, (size, key)
            # Names are cut with an ellipsis, numbers never: every area is shown whole.
            areas = [row[list(grid.columns).index("area")] for row in grid._rows]
            assert all(grid.columns["area"].content_width >= len(a) for a in areas)
            # Every one of the room's tabs can be seen, the sixth too.
            edit = app.screen.query_one("#edit", TabbedContent)
            bar = edit.query_one("ContentTabs")
            for coll in ("room", "surfaces", "candidates"):
                assert _inside(edit.get_tab(coll).region, bar.region), (size, coll)


async def test_the_plan_shows_its_costs_and_apply_button(room_file, catalog):
    app = _app(room_file("workshop.toml"), catalog)
    async with app.run_test(size=(120, 40)) as pilot:
        await _settle(pilot, 20)
        await pilot.press("f9")
        await _settle(pilot)
        await _planned(pilot)
        screen = app.screen
        view = screen.query_one("#plan-view")
        cands = screen.query_one("#plan-candidates")
        assert _right_edge_of_column(cands, "cost") <= cands.size.width
        items = screen.query_one("#plan-items")
        assert _right_edge_of_column(items, "cost") <= items.size.width
        assert _inside(screen.query_one("#plan-apply").region, view.region)


async def test_the_key_line_keeps_help_and_quit_at_80x24(room_file, catalog):
    app = _app(room_file("classroom.toml"), catalog)
    async with app.run_test(size=(80, 24)) as pilot:
        await _settle(pilot, 20)
        for keys in ((), ("1", "down"), ("f9",)):
            for k in keys:
                await pilot.press(k)
            await _settle(pilot)
            strip = app.screen.query_one("#keys")
            text = str(strip.content)
            assert "Help" in text and "Quit" in text, (keys, text)
            assert len(text) <= strip.size.width, (keys, text)


async def test_before_after_shows_every_band_and_dba_at_120x40(room_file, catalog):
    app = _app(room_file("workshop.toml"), catalog)
    async with app.run_test(size=(120, 40)) as pilot:
        await _settle(pilot, 20)
        await pilot.press("p", "f9")
        await _settle(pilot)
        await _planned(pilot)
        await pilot.press("a")
        await _settle(pilot)
        await pilot.press("f8")
        await _settle(pilot)
        table = app.screen.query_one("#compare-table")
        assert table.row_count > 5
        assert _right_edge_of_column(table, "extra") <= table.size.width
        # Headings run on over the empty cells: the receivers' names are whole.
        first = str(app.screen.document.spec.receivers[0].name)
        line = "".join(seg.text for seg in table.render_line(
            [str(r[0]).strip() for r in table._rows].index(f"{first} [dB]") + 1))
        assert f"{first} [dB]" in line


async def test_at_80x24_the_half_being_used_gets_more_height(room_file, catalog):
    """One column at 80x24: the Plan tab's controls and list did not fit a quarter of the
    screen, and the surface table showed one row while a cell was edited."""
    app = _app(room_file("classroom.toml"), catalog)
    async with app.run_test(size=(80, 24)) as pilot:
        await _settle(pilot, 20)
        screen = app.screen
        left, right = screen.query_one("#left"), screen.query_one("#right")
        await pilot.press("enter")                 # edit a cell of the surfaces
        await _settle(pilot)
        assert left.size.height > right.size.height
        assert screen.query_one("#t-surfaces #table").size.height >= 4
        await pilot.press("escape", "f9")
        await _settle(pilot)
        assert right.size.height > left.size.height
        assert screen.query_one("#plan-candidates").region.height >= 2
