"""The columns of a :class:`~roomcalc.tui.widgets.grid.CellGrid` and how wide each is drawn:
measured from the cells, narrowed to fit the view where text may be cut (names, never
numbers), and a cell's text cut with an ellipsis to its column.

Plain functions over plain data (no widget), so the grid calls them and they are easy to read.
"""

from __future__ import annotations

from dataclasses import dataclass

from rich.cells import cell_len

__all__ = ["PAD", "ELLIPSIS", "GridColumn", "is_heading", "measure_row", "column_widths",
           "fit_widths", "cut", "cell_texts"]

PAD = 1                                 # blank columns either side of a cell
ELLIPSIS = "\u2026"


@dataclass
class GridColumn:
    key: str
    label: str
    width: int | None = None            # fixed content width; None = as wide as the widest cell
    justify: str = "left"               # or "right"
    content_width: int = 0              # the width used now
    shrink_to: int | None = None        # text that may be cut (with an ellipsis) to this width
    #                                     so that the grid's first columns fit its view
    pad: tuple[int, int] = (PAD, PAD)   # blank columns left and right of the cell

    @property
    def outer_width(self) -> int:
        """The columns the cell takes on screen, its blanks included."""
        return self.content_width + self.pad[0] + self.pad[1]


def is_heading(row) -> bool:
    """A heading row: a first cell and no other (its text runs on over the empty cells)."""
    return len(row) > 1 and not any(row[1:])


def measure_row(row, headings: bool) -> tuple[int, ...]:
    """The width of each cell of a row; a heading row (where ``headings``) widens no column."""
    return (0,) * len(row) if headings and is_heading(row) else tuple(cell_len(c) for c in row)


def column_widths(columns: list[GridColumn], measured: list[tuple[int, ...]],
                  keep_narrow: bool) -> list[int]:
    """Each column's content width: its fixed width, else its longest cell or label. With
    ``keep_narrow`` false a column only grows (rows added or removed: copying a row and
    deleting it again does not redraw every row twice); true, it narrows to its longest cell
    (cells edited in place)."""
    widths = []
    for j, col in enumerate(columns):
        if col.width is not None:
            widths.append(col.width)
            continue
        w = cell_len(col.label) if keep_narrow else max(col.content_width, cell_len(col.label))
        for m in measured:
            if j < len(m) and m[j] > w:
                w = m[j]
        widths.append(w)
    return widths


def fit_widths(columns: list[GridColumn], widths: list[int], label_w: int, view: int,
               keep_in_view: int) -> None:
    """Narrow, in place, the cuttable columns among the first ``keep_in_view`` (the widest
    first, down to their ``shrink_to``) until those columns fit ``view``; the rest scroll
    sideways."""
    k = min(keep_in_view, len(widths))
    if not k or view <= 0:
        return
    excess = label_w + sum(widths[:k]) + sum(sum(c.pad) for c in columns[:k]) - view
    while excess > 0:
        cuttable = [j for j in range(k) if columns[j].shrink_to is not None
                    and widths[j] > columns[j].shrink_to]
        if not cuttable:
            return
        j = max(cuttable, key=lambda i: widths[i])
        widths[j] -= 1
        excess -= 1


def cut(text: str, width: int) -> str:
    """``text`` cut to ``width`` cells, its last one an ellipsis when anything was cut."""
    if cell_len(text) <= width:
        return text
    return text[:max(0, width - 1)] + ELLIPSIS if width > 1 else text[:width]


def cell_texts(columns: list[GridColumn], cells, cursor: int | None,
               headings: bool) -> list[tuple[str, bool]]:
    """A row's cells as the text drawn for each column (cut to it, justified, with its blanks)
    and whether the cursor is on it (``cursor``: its column, -1 for the whole row, None). A
    heading row (where ``headings``) whose label is wider than its column is one piece whose
    label runs on over the empty cells."""
    if headings and len(columns) > 1 and cells and is_heading(cells) \
            and cell_len(cells[0]) > columns[0].content_width:
        w = sum(c.outer_width for c in columns) - columns[0].pad[0] - columns[-1].pad[1]
        return [(" " * columns[0].pad[0] + cut(cells[0], w).ljust(w)
                 + " " * columns[-1].pad[1], cursor is not None)]
    out = []
    for j, col in enumerate(columns):
        w = col.content_width
        text = cut(cells[j] if j < len(cells) else "", w)
        n = cell_len(text)
        text = " " * (w - n) + text if col.justify == "right" else text + " " * (w - n)
        out.append((" " * col.pad[0] + text + " " * col.pad[1],
                    cursor is not None and cursor in (j, -1)))
    return out
