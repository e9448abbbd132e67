"""Widget tests for our own table (CellGrid), the braille chart and the line of keys: what they
draw, the messages they send (collected through ``message_hook``), and that an edit redraws
only what changed."""

from __future__ import annotations

import math

from textual.app import App
from textual.binding import Binding
from textual.coordinate import Coordinate

from roomcalc.tui.widgets.chart import Chart, ChartData, Series, _wrap_legend, log_ticks, \
    nice_ticks
from roomcalc.tui.widgets.grid import CellGrid
from roomcalc.tui.widgets.keystrip import KeyStrip

SIZE = (80, 24)


class GridApp(App):
    def __init__(self, cursor_type="cell"):
        super().__init__()
        self.cursor_type = cursor_type

    def compose(self):
        yield CellGrid(cursor_type=self.cursor_type, id="grid")

    def on_mount(self):
        g = self.query_one(CellGrid)
        g.add_column("Name", key="name")
        g.add_column("Area", key="area", justify="right")
        g.set_rows([["Floor", "20"], ["Wall [b]x[/b]", "7.5"], ["Door", "2"]],
                   labels=["1", "2", "3"], keys=["a", "b", "c"])
        g.focus()


def _line_text(grid: CellGrid, y: int) -> str:
    return grid.render_line(y).text


def _collect(kinds):
    got = []

    def hook(msg):
        if isinstance(msg, kinds) and not any(m is msg for m in got):
            got.append(msg)
    return got, hook


async def test_grid_draws_header_rows_labels_and_justifies():
    app = GridApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        g = app.query_one(CellGrid)
        # Columns as wide as their longest cell (13 and 4), one blank either side; labels
        # right-aligned in their own column.
        def line(label, name, area):
            return f"{label:>2} " + f" {name:<13} " + f" {area:>4} "
        assert _line_text(g, 0).rstrip() == line("", "Name", "Area").rstrip()
        assert _line_text(g, 1).rstrip() == line("1", "Floor", "20").rstrip()
        # Square brackets are text, not markup.
        assert _line_text(g, 2).rstrip() == line("2", "Wall [b]x[/b]", "7.5").rstrip()
        assert g.columns["name"].content_width == len("Wall [b]x[/b]")
        assert g.virtual_size.height == 4          # header + 3 rows


async def test_grid_cursor_keys_and_messages():
    app = GridApp()
    got, hook = _collect((CellGrid.CellHighlighted, CellGrid.CellSelected))
    async with app.run_test(size=SIZE, message_hook=hook) as pilot:
        await pilot.pause()
        g = app.query_one(CellGrid)
        assert g.cursor_coordinate == Coordinate(0, 0)
        await pilot.press("down", "right")
        await pilot.pause()
        assert g.cursor_coordinate == Coordinate(1, 1)
        assert [type(m).__name__ for m in got] == ["CellHighlighted", "CellHighlighted"]
        assert got[-1].coordinate == Coordinate(1, 1)
        await pilot.press("down", "down", "down")          # stops at the last row
        await pilot.press("enter")
        await pilot.pause()
        assert g.cursor_coordinate == Coordinate(2, 1)
        assert isinstance(got[-1], CellGrid.CellSelected)
        assert got[-1].coordinate == Coordinate(2, 1)
        await pilot.press("ctrl+home", "home")
        await pilot.pause()
        assert g.cursor_coordinate == Coordinate(0, 0)


async def test_grid_click_moves_then_selects():
    app = GridApp()
    got, hook = _collect((CellGrid.CellSelected,))
    async with app.run_test(size=SIZE, message_hook=hook) as pilot:
        await pilot.pause()
        g = app.query_one(CellGrid)
        # Row 3 ("Door") is screen line 3; the Area column starts after label (4) + name (15).
        await pilot.click(CellGrid, offset=(22, 3))
        await pilot.pause()
        assert g.cursor_coordinate == Coordinate(2, 1) and not got
        await pilot.click(CellGrid, offset=(22, 3))
        await pilot.pause()
        assert len(got) == 1 and got[0].coordinate == Coordinate(2, 1)


async def test_grid_row_cursor_reports_keys():
    app = GridApp(cursor_type="row")
    got, hook = _collect((CellGrid.RowHighlighted, CellGrid.RowSelected))
    async with app.run_test(size=SIZE, message_hook=hook) as pilot:
        await pilot.pause()
        await pilot.press("down", "enter")
        await pilot.pause()
        assert [(type(m).__name__, m.cursor_row, m.row_key) for m in got] == \
            [("RowHighlighted", 1, "b"), ("RowSelected", 1, "b")]


async def test_grid_redraws_only_changed_rows():
    """Rows whose cells are unchanged keep their drawn segments, wherever they move to; a
    changed row is drawn again."""
    app = GridApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        g = app.query_one(CellGrid)
        drawn = []
        original = g._cell_pieces

        def counting(cells, style, cursor):
            drawn.append(cells[0])
            return original(cells, style, cursor)
        g._cell_pieces = counting
        for y in range(4):
            g.render_line(y)
        drawn.clear()
        # Insert a row at the top: the three old rows move down (and swap stripes).
        g.set_rows([["Ceiling", "20"], ["Floor", "20"], ["Wall [b]x[/b]", "7.5"], ["Door", "2"]],
                   labels=["1", "2", "3", "4"])
        for y in range(1, 5):
            g.render_line(y)
        g.set_rows([["Floor", "20"], ["Wall [b]x[/b]", "7.5"], ["Door", "2"]],
                   labels=["1", "2", "3"])
        first = list(drawn)
        for y in range(1, 4):
            g.render_line(y)
        # The inserted row and the rows on their other stripe were drawn; going back to the
        # first rows drew nothing new.
        assert "Ceiling" in first and drawn == first
        assert _line_text(g, 1).startswith(" 1  Floor ")
        # An edited cell: only that row is drawn again.
        drawn.clear()
        g.set_rows([["Floor", "21"], ["Wall [b]x[/b]", "7.5"], ["Door", "2"]],
                   labels=["1", "2", "3"])
        for y in range(1, 4):
            g.render_line(y)
        assert drawn == ["Floor"]
        assert _line_text(g, 1).rstrip().endswith(" 21") and "Floor" in _line_text(g, 1)


async def test_grid_columns_narrow_on_edits_and_not_on_row_changes():
    app = GridApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        g = app.query_one(CellGrid)
        g.set_rows([["A name much longer than before", "1"]], labels=["1"])
        assert g.columns["name"].content_width == 30
        g.set_rows([["Short", "1"]], labels=["1"])              # same rows: narrows
        assert g.columns["name"].content_width == len("Short")
        g.set_rows([["Short", "1"], ["A name much longer than before", "1"]], labels=["1", "2"])
        g.set_rows([["Short", "1"]], labels=["1"])              # a row fewer: keeps its width
        assert g.columns["name"].content_width == 30
        g.clear()
        g.set_rows([["Short", "1"]], labels=["1"])
        assert g.columns["name"].content_width == len("Short")


def test_nice_ticks_and_log_ticks():
    # 1-2-5 steps (common practice for axis ticks).
    assert nice_ticks(0.0, 1.2, 5) == [0.0, 0.5, 1.0]
    assert nice_ticks(84.0, 117.0, 5) == [90.0, 100.0, 110.0]
    assert log_ticks(0.1, 7.2) == [0.1, 0.2, 0.5, 1.0, 2.0, 5.0]
    assert _wrap_legend(["Sabine", "Eyring", "Millington-Sette"], 30, 2) == [[0, 1], [2]]
    assert _wrap_legend(["Sabine", "Eyring", "Millington-Sette"], 30, 1) == [[0, 1]]


class ChartApp(App):
    def compose(self):
        yield Chart(id="chart")


def _braille_cells(chart: Chart) -> dict[tuple[int, int], int]:
    """Every braille character on the chart: (row, column) -> its dot bits."""
    out = {}
    for y in range(chart.size.height):
        for x, ch in enumerate(chart.render_line(y).text):
            if 0x2800 < ord(ch) <= 0x28FF:
                out[(y, x)] = ord(ch) - 0x2800
    return out


async def test_chart_puts_dots_where_the_data_are():
    """A horizontal line at y = 1 on a 0..2 axis lands on the middle row of the plot; a single
    rising line goes from the bottom left to the top right."""
    app = ChartApp()
    async with app.run_test(size=(60, 20)) as pilot:
        await pilot.pause()
        c = app.query_one(Chart)
        c.show_data(ChartData(title="flat", series=[Series("one", [0.0, 10.0], [1.0, 1.0])],
                              x_range=(0.0, 10.0), y_range=(0.0, 2.0)))
        await pilot.pause()
        cells = _braille_cells(c)
        w, h = c.size
        plot_rows = h - 4                    # title, axis, tick labels, legend
        dots_h = 4 * plot_rows
        row_of_y1 = 1 + round((dots_h - 1) / 2) // 4
        assert {r for r, _ in cells} == {row_of_y1}
        # The line spans the plot: from the first plot column to the last.
        cols = sorted(x for _, x in cells)
        assert cols[0] == 8 and cols[-1] == w - 2
        assert "1 " in c.render_line(row_of_y1).text[:8] or "1" in c.render_line(
            row_of_y1).text[:7]
        assert "━ one" in c.render_line(h - 1).text

        c.show_data(ChartData(series=[Series("up", [0.0, 1.0], [0.0, 1.0])],
                              x_range=(0.0, 1.0), y_range=(0.0, 1.0)))
        await pilot.pause()
        cells = _braille_cells(c)
        top = min(cells, key=lambda rc: rc[0])
        bottom = max(cells, key=lambda rc: rc[0])
        assert top[1] > bottom[1]                    # higher on the right
        assert bottom[0] == plot_rows and top[0] == 1


async def test_chart_log_axis_marker_and_points():
    app = ChartApp()
    async with app.run_test(size=(70, 20)) as pilot:
        await pilot.pause()
        c = app.query_one(Chart)
        c.show_data(ChartData(series=[Series("total", [0.1, 10.0], [90.0, 70.0])], x_log=True,
                              x_range=(0.1, 10.0), y_range=(60.0, 100.0),
                              vlines=[(1.0, "r_c 1.00 m")], points=[(3.0, 80.0, "Desk")]))
        await pilot.pause()
        text = "\n".join(c.render_line(y).text for y in range(c.size.height))
        assert "r_c 1.00 m" in text and "xDesk" in text
        ticks = c.render_line(c.size.height - 2).text
        assert ticks.split() == ["0.1", "0.2", "0.5", "1", "2", "5", "10"]
        # 1 m is the middle of a 0.1-10 m log axis: the marker line's column.
        w = c.size.width
        mid = 8 + round((2 * (w - 9) - 1) / 2) // 2
        assert c.render_line(2).text[mid] != " "
        assert math.isclose(c.data.vlines[0][0], 1.0)


class KeysApp(App):
    BINDINGS = [Binding("a", "add_one", "Add one"), Binding("z", "nothing", "Hidden", show=False)]

    def __init__(self):
        super().__init__()
        self.count = 0

    def compose(self):
        yield KeyStrip(id="keys")

    def action_add_one(self):
        self.count += 1


async def test_key_strip_lists_shown_keys_and_a_click_presses_one():
    app = KeysApp()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        strip = app.query_one(KeyStrip)
        text = str(strip.render())
        assert "a Add one" in text and "Hidden" not in text and "Commands" in text
        await pilot.click(KeyStrip, offset=(2, 0))
        await pilot.pause()
        assert app.count == 1
