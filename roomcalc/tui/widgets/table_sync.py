"""Update a DataTable to new rows by changing only the cells that differ.

Clearing a table and adding its rows again throws away every rendered cell; after an edit most
cells are unchanged, so this keeps them and updates the rest in place.
"""

from __future__ import annotations

from textual.widgets import DataTable


def sync_rows(table: DataTable, rows: list[list], labels: list[str] | None = None) -> None:
    """Make the table show ``rows`` (cells per row, in column order), keyed by position."""
    old: list[list] = getattr(table, "_synced_rows", None)
    if old is None or table.row_count != len(old):
        old = None
    columns = list(table.columns.keys())
    same_shape = old is not None and all(len(r) == len(columns) for r in rows)
    if not same_shape:
        table.clear()
        for i, cells in enumerate(rows):
            table.add_row(*cells, key=str(i), label=labels[i] if labels else None)
        table._synced_rows = [list(r) for r in rows]
        return
    n_common = min(len(old), len(rows))
    for i in range(n_common):
        for j, (a, b) in enumerate(zip(old[i], rows[i])):
            if _plain(a) != _plain(b) or getattr(a, "style", None) != getattr(b, "style", None):
                table.update_cell(str(i), columns[j], b, update_width=True)   # else cut off
    for i in range(len(old) - 1, n_common - 1, -1):
        table.remove_row(str(i))
    for i in range(n_common, len(rows)):
        table.add_row(*rows[i], key=str(i), label=labels[i] if labels else None)
    table._synced_rows = [list(r) for r in rows]
    table.check_idle()          # re-measure the columns now, not at the table's next message


def forget(table: DataTable) -> None:
    """After the table was cleared elsewhere (new columns), start again."""
    table._synced_rows = None


def _plain(cell) -> str:
    return getattr(cell, "plain", cell) if not isinstance(cell, str) else cell
