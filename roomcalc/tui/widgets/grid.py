"""A light table widget: a header line, rows of cells, a cursor, and a rendered line cached per row.

After an edit most rows of a table are unchanged. This widget keeps each row's rendered line
until that row's cells (or the cursor on it, the column widths, the focus or the theme) change,
so redrawing a 100-row table after one edit renders one or two lines, not all of them.

Cells are plain strings (never read as markup); a column is justified left or right, and a row
may carry a style (``"bold"``). Rows are addressed by position; each may carry a key (a string)
that the row messages report.

Keys: arrows move the cursor, Page Up/Down move by a screen, Home/End go to the first/last
column (ctrl+Home/End to the first/last row), Enter selects. A click moves the cursor; a click
on the cell already under the cursor selects it.
"""

from __future__ import annotations

from typing import ClassVar

from rich.cells import cell_len
from rich.segment import Segment
from rich.style import Style
from textual import events
from textual.binding import Binding, BindingType
from textual.coordinate import Coordinate
from textual.geometry import Size
from textual.message import Message
from textual.scroll_view import ScrollView
from textual.strip import Strip

from roomcalc.tui.widgets.grid_columns import (PAD, GridColumn, cell_texts, column_widths,
                                               fit_widths, measure_row)

class CellGrid(ScrollView, can_focus=True):
    """Rows of cells under a fixed header line, with a cell or row cursor."""

    COMPONENT_CLASSES: ClassVar[set[str]] = {
        "cell-grid--header", "cell-grid--label", "cell-grid--even-row", "cell-grid--cursor",
    }

    DEFAULT_CSS = """
    CellGrid {
        background: $surface;
        color: $foreground;
        height: auto;
        max-height: 100%;
        & > .cell-grid--header { text-style: bold; background: $panel; color: $foreground; }
        & > .cell-grid--label { color: $text-muted; }
        & > .cell-grid--even-row { background: $surface-lighten-1 50%; }
        & > .cell-grid--cursor {
            background: $block-cursor-blurred-background;
            color: $block-cursor-blurred-foreground;
            text-style: $block-cursor-blurred-text-style;
        }
        &:focus {
            background-tint: $foreground 5%;
            & > .cell-grid--cursor {
                background: $block-cursor-background;
                color: $block-cursor-foreground;
                text-style: $block-cursor-text-style;
            }
        }
    }
    """

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("enter", "select_cursor", "Select", show=False),
        Binding("up", "cursor(-1, 0)", "Up", show=False),
        Binding("down", "cursor(1, 0)", "Down", show=False),
        Binding("left", "cursor(0, -1)", "Left", show=False),
        Binding("right", "cursor(0, 1)", "Right", show=False),
        Binding("pageup", "page(-1)", "Page up", show=False),
        Binding("pagedown", "page(1)", "Page down", show=False),
        Binding("home", "cursor_to(None, 0)", "First column", show=False),
        Binding("end", "cursor_to(None, -1)", "Last column", show=False),
        Binding("ctrl+home", "cursor_to(0, None)", "First row", show=False),
        Binding("ctrl+end", "cursor_to(-1, None)", "Last row", show=False),
    ]

    class CellHighlighted(Message):
        def __init__(self, grid: "CellGrid", coordinate: Coordinate) -> None:
            super().__init__()
            self.grid, self.coordinate = grid, coordinate

        @property
        def control(self) -> "CellGrid":
            return self.grid

    class CellSelected(CellHighlighted):
        pass

    class RowHighlighted(Message):
        def __init__(self, grid: "CellGrid", cursor_row: int, row_key: str | None) -> None:
            super().__init__()
            self.grid, self.cursor_row, self.row_key = grid, cursor_row, row_key

        @property
        def control(self) -> "CellGrid":
            return self.grid

    class RowSelected(RowHighlighted):
        pass

    def __init__(self, *, cursor_type: str = "cell", zebra_stripes: bool = True,
                 show_row_labels: bool = True, id: str | None = None,
                 classes: str | None = None) -> None:
        super().__init__(id=id, classes=classes)
        self.cursor_type = cursor_type              # "cell", "row" or "none"
        self.zebra_stripes = zebra_stripes
        self.show_row_labels = show_row_labels
        # Called at once when the cursor moves (the messages arrive a frame later).
        self.cursor_moved = None
        self.columns: dict[str, GridColumn] = {}
        self._rows: list[tuple[str, ...]] = []
        self._row_styles: list[str] = []
        self._keys: list[str | None] = []
        self._labels: list[str] = []
        self._versions: list[int] = []              # a new number when a row's cells change
        self._next_version = 0
        self._cursor = Coordinate(0, 0)
        self._cache: dict[int, dict] = {}     # row version -> its drawn segments, by background
        self._widths: dict[int, tuple[int, ...]] = {}      # row version -> its cells' widths
        self._style_gen = 0                         # bumped on theme, focus or width change
        self._styles: dict[str, Style] = {}
        self._parsed: dict[str, Style] = {}
        self._label_width = 0
        # How many leading columns must fit the view without scrolling sideways: columns with
        # a ``shrink_to`` among them are cut to make room (names, never numbers).
        self.keep_in_view = 0
        # Rows with a first cell only are headings whose text runs on over the empty cells.
        self.headings = False

    # ------------------------------------------------------------------ columns and rows
    def add_column(self, label: str, *, key: str | None = None, width: int | None = None,
                   justify: str = "left", shrink_to: int | None = None,
                   pad: tuple[int, int] = (PAD, PAD)) -> str:
        """A column; ``pad`` = blanks left and right of its cells ((1, 0) packs columns of
        right-aligned numbers one blank apart)."""
        key = key if key is not None else str(len(self.columns))
        self.columns[key] = GridColumn(key, str(label), width, justify, shrink_to=shrink_to,
                                       pad=pad)
        self._cache.clear()
        self._widths.clear()
        self._changed()
        return key

    def clear(self, columns: bool = False) -> None:
        """Remove every row (and every column too when ``columns``)."""
        self._rows, self._row_styles, self._keys, self._labels, self._versions = [], [], [], [], []
        if columns:
            self.columns = {}
        for col in self.columns.values():
            col.content_width = 0
        self._cursor = Coordinate(0, 0)
        self._cache.clear()
        self._widths.clear()
        self._changed()

    def set_rows(self, rows: list, *, labels: list[str] | None = None,
                 keys: list[str | None] | None = None,
                 styles: list[str] | None = None) -> None:
        """Show exactly these rows (cells as strings), drawing again only the rows whose cells
        or style differ from a row shown before."""
        old_rows, old_styles, old_versions = self._rows, self._row_styles, self._versions
        n = len(rows)
        self._rows = [tuple(r) for r in rows]
        self._row_styles = list(styles) if styles is not None else [""] * n
        self._labels = [str(x) for x in labels] if labels is not None else [""] * n
        self._keys = list(keys) if keys is not None else [None] * n
        # A row keeps its drawn pieces when the same cells were shown before, at any position
        # (a row inserted above only moves the others down).
        old = {}
        for sig, version in zip(zip(old_rows, old_styles), old_versions):
            old.setdefault(sig, version)
        self._versions = [old.pop(sig, None) or self._bump()
                          for sig in zip(self._rows, self._row_styles)]
        live = set(self._versions)
        for cache in (self._cache, self._widths):
            for version in [v for v in cache if v not in live]:
                del cache[version]
        self._changed(keep_narrow=len(old_rows) == n)

    def get_cell_at(self, coordinate: Coordinate):
        return self._rows[coordinate.row][coordinate.column]

    def get_row_at(self, index: int) -> list:
        return list(self._rows[index])

    def get_column(self, key: str) -> list:
        j = list(self.columns).index(key)
        return [cells[j] if j < len(cells) else "" for cells in self._rows]

    def get_row_style(self, index: int) -> str:
        return self._row_styles[index]

    @property
    def row_count(self) -> int:
        return len(self._rows)

    @property
    def row_labels(self) -> list[str]:
        return list(self._labels)

    def row_key(self, index: int) -> str | None:
        return self._keys[index]

    # ------------------------------------------------------------------ cursor
    @property
    def cursor_coordinate(self) -> Coordinate:
        return self._cursor

    @property
    def cursor_row(self) -> int:
        return self._cursor.row

    @property
    def cursor_column(self) -> int:
        return self._cursor.column

    def move_cursor(self, *, row: int | None = None, column: int | None = None,
                    animate: bool = False) -> None:
        r = self._cursor.row if row is None else row
        c = self._cursor.column if column is None else column
        self._set_cursor(r, c)

    def _set_cursor(self, row: int, column: int, post: bool = True) -> None:
        row = max(0, min(row, self.row_count - 1)) if self.row_count else 0
        column = max(0, min(column, len(self.columns) - 1)) if self.columns else 0
        new = Coordinate(row, column)
        old = self._cursor
        self._cursor = new
        if new != old:
            self.refresh()
            if self.cursor_moved is not None and self.row_count:
                self.cursor_moved(new)          # now, so that it is drawn in the same frame
            if post and self.row_count and self.cursor_type != "none":
                if self.cursor_type == "row":
                    if new.row != old.row:
                        self.post_message(self.RowHighlighted(self, row, self._keys[row]))
                else:
                    self.post_message(self.CellHighlighted(self, new))
        self._scroll_to_cursor()

    def _scroll_to_cursor(self) -> None:
        if not self.row_count or self.size.height <= 1:
            return
        body = self.size.height - 1
        y = self.scroll_offset.y
        row = self._cursor.row
        if row < y:
            y = row
        elif row >= y + body:
            y = row - body + 1
        x = self.scroll_offset.x
        if self.cursor_type == "cell" and self.columns:
            start, end = self._column_span(self._cursor.column)
            if start < x + self._label_width:
                x = max(0, start - self._label_width)
            elif end > x + self.size.width:
                x = end - self.size.width
        if (x, y) != tuple(self.scroll_offset):
            self.scroll_to(x, y, animate=False, immediate=True)

    def _column_span(self, index: int) -> tuple[int, int]:
        x = self._label_width
        for i, col in enumerate(self.columns.values()):
            w = col.outer_width
            if i == index:
                return x, x + w
            x += w
        return x, x

    def action_cursor(self, rows: int, columns: int) -> None:
        if self.cursor_type == "row":
            columns = 0
        if not self.row_count:
            return
        self._set_cursor(self._cursor.row + rows, self._cursor.column + columns)

    def action_page(self, direction: int) -> None:
        self.action_cursor(direction * max(1, self.size.height - 2), 0)

    def action_cursor_to(self, row: int | None, column: int | None) -> None:
        r = self._cursor.row if row is None else (row if row >= 0 else self.row_count - 1)
        c = self._cursor.column if column is None else (
            column if column >= 0 else len(self.columns) - 1)
        self._set_cursor(r, c)

    def action_select_cursor(self) -> None:
        if not self.row_count or self.cursor_type == "none":
            return
        if self.cursor_type == "row":
            row = self._cursor.row
            self.post_message(self.RowSelected(self, row, self._keys[row]))
        else:
            self.post_message(self.CellSelected(self, self._cursor))

    def _on_click(self, event: events.Click) -> None:
        hit = self._cell_at(event.x, event.y)
        if hit is None or self.cursor_type == "none":
            return
        event.stop()
        again = Coordinate(*hit) == self._cursor
        self._set_cursor(*hit)
        if again:
            self.action_select_cursor()

    def _cell_at(self, x: int, y: int) -> tuple[int, int] | None:
        """The (row, column) under a point of the widget, or None (the header, a label)."""
        if y < 1:
            return None
        row = y - 1 + self.scroll_offset.y
        if not (0 <= row < self.row_count):
            return None
        vx = x + self.scroll_offset.x
        if vx < self._label_width:
            return row, self._cursor.column
        for i in range(len(self.columns)):
            start, end = self._column_span(i)
            if start <= vx < end:
                return row, i
        return row, max(0, len(self.columns) - 1)

    # ------------------------------------------------------------------ changes
    def _bump(self) -> int:
        self._next_version += 1
        return self._next_version

    def _changed(self, keep_narrow: bool = True) -> None:
        """After rows or columns changed: measure the columns, set the scrolled size."""
        measured = [self._widths.get(v) for v in self._versions]
        for i, m in enumerate(measured):
            if m is None:
                m = self._widths[self._versions[i]] = measure_row(self._rows[i], self.headings)
                measured[i] = m
        cols = list(self.columns.values())
        widths = column_widths(cols, measured, keep_narrow)
        label_w = (max((cell_len(x) for x in self._labels), default=0) + 2 * PAD
                   if self.show_row_labels and any(self._labels) else 0)
        view = self.size.width - (self.scrollbar_size_vertical if self.is_mounted else 0)
        fit_widths(cols, widths, label_w, view, self.keep_in_view)
        if widths != [c.content_width for c in self.columns.values()] \
                or label_w != self._label_width:
            for col, w in zip(self.columns.values(), widths):
                col.content_width = w
            self._label_width = label_w
            self._style_gen += 1
        if self.row_count:
            self._cursor = Coordinate(min(self._cursor.row, self.row_count - 1),
                                      min(self._cursor.column, max(0, len(self.columns) - 1)))
        width = self._label_width + sum(c.outer_width for c in self.columns.values())
        size = Size(width, self.row_count + 1)
        if size != self.virtual_size:
            old = self.virtual_size
            view = self.size
            if self.is_mounted and view and not self.styles.height.is_auto \
                    and not self.styles.width.is_auto \
                    and (old.height > view.height) == (size.height > view.height) \
                    and (old.width > view.width) == (size.width > view.width):
                # The widget keeps its size and its scrollbars: no layout of the screen,
                # only the scrollbars' thumbs move (in the same frame as the rows).
                self.set_reactive(CellGrid.virtual_size, size)
                self._move_thumbs(size)
            else:
                self.virtual_size = size
                if self.is_mounted and self.container_size:
                    self._scroll_update(size)   # the scrollbars now, in the same frame
        self.refresh()

    def on_resize(self, event: events.Resize) -> None:
        if self.keep_in_view:
            self._changed()

    def _move_thumbs(self, size: Size) -> None:
        """Tell the scrollbars the new scrolled size; each redraws only if its own numbers
        changed (more rows move the vertical thumb, not the horizontal one)."""
        width, height = self.container_size
        if self.show_vertical_scrollbar and self.styles.scrollbar_size_vertical:
            bar = self.vertical_scrollbar
            bar.window_virtual_size = size.height
            bar.window_size = height - self.scrollbar_size_horizontal
        if self.show_horizontal_scrollbar and self.styles.scrollbar_size_horizontal:
            bar = self.horizontal_scrollbar
            bar.window_virtual_size = size.width
            bar.window_size = width - self.scrollbar_size_vertical
        self.scroll_x = self.validate_scroll_x(self.scroll_x)
        self.scroll_y = self.validate_scroll_y(self.scroll_y)

    def _size_updated(self, size: Size, virtual_size: Size, container_size: Size,
                      layout: bool = True) -> bool:
        # Textual's scroll view compares the compositor's content size with our virtual size,
        # which never match, so after every layout it updated the scrollbars again, and that
        # took one more frame per edit. The scrollbars follow the rows in _changed; here only
        # a change of the widget's own size matters. (Private API of Textual 8, pinned <9.)
        if self.size == size and container_size == self.container_size:
            return False
        return super()._size_updated(size, virtual_size, container_size, layout)

    def notify_style_update(self) -> None:
        super().notify_style_update()
        self._styles.clear()
        self._style_gen += 1

    def _on_focus(self, event: events.Focus) -> None:
        super()._on_focus(event)
        self.notify_style_update()
        self.refresh()

    def _on_blur(self, event: events.Blur) -> None:
        super()._on_blur(event)
        self.notify_style_update()
        self.refresh()

    # ------------------------------------------------------------------ drawing
    def _style(self, name: str) -> Style:
        style = self._styles.get(name)
        if style is None:
            style = self._styles[name] = self.get_component_rich_style(name)
        return style

    def _base(self) -> Style:
        style = self._styles.get("")
        if style is None:
            style = self._styles[""] = self.rich_style
        return style

    def _parse(self, spec: str) -> Style:
        if not spec:
            return Style.null()
        style = self._parsed.get(spec)
        if style is None:
            style = self._parsed[spec] = Style.parse(spec)
        return style

    def _cell_pieces(self, cells, row_style: str, cursor: int | None) -> list[tuple[str, Style]]:
        """The cells of a row (or the header) as (text, own style) pieces, padded to their
        columns; the row's background goes under them when the line is drawn."""
        own = self._parse(row_style)
        on = own + self._style("cell-grid--cursor")
        return [(text, on if at_cursor else own) for text, at_cursor in
                cell_texts(list(self.columns.values()), cells, cursor, self.headings)]

    def _row_segments(self, index: int, base: Style) -> tuple[list[Segment], int]:
        """The row's cells as segments over ``base`` (the row's background), and their width.
        Kept per row for each background it was drawn on (rows that move down after an
        insertion swap stripes, and swap back when it is deleted)."""
        cursor = None
        if self.cursor_type != "none" and index == self._cursor.row:
            cursor = -1 if self.cursor_type == "row" else self._cursor.column
        key = (cursor, self._style_gen, base)
        drawn = self._cache.setdefault(self._versions[index], {})
        hit = drawn.get(key)
        if hit is None:
            if len(drawn) > 4:
                drawn.clear()
            pieces = self._cell_pieces(self._rows[index], self._row_styles[index], cursor)
            hit = drawn[key] = ([Segment(text, base + style) for text, style in pieces],
                                sum(cell_len(t) for t, _ in pieces))
        return hit

    def _line(self, label: str | None, label_style: Style, base: Style,
              cells: tuple[list[Segment], int]) -> Strip:
        """One screen line: the label, then the cells, cropped to the view."""
        segs, total = cells
        if self._label_width:
            text = "" if label is None else label
            segs = [Segment(text.rjust(self._label_width - PAD) + " " * PAD,
                            base + label_style), *segs]
            total += self._label_width
        width = self.size.width
        scroll_x = self.scroll_offset.x
        if scroll_x == 0 and total <= width:
            if total < width:
                segs = [*segs, Segment(" " * (width - total), base)]
            return Strip(segs, width)
        return Strip(segs, total).crop_extend(scroll_x, scroll_x + width, base)

    def render_line(self, y: int) -> Strip:
        base = self._base()
        if y == 0:
            header = base + self._style("cell-grid--header")
            pieces = self._cell_pieces([c.label for c in self.columns.values()], "", None)
            cells = ([Segment(text, header + style) for text, style in pieces],
                     sum(cell_len(t) for t, _ in pieces))
            return self._line(None, Style.null(), header, cells)
        row = self.scroll_offset.y + y - 1
        if not (0 <= row < self.row_count):
            return Strip.blank(self.size.width, base)
        if self.zebra_stripes and row % 2 == 1:
            base = base + self._style("cell-grid--even-row")
        return self._line(self._labels[row], self._style("cell-grid--label"), base,
                          self._row_segments(row, base))
