"""Choose a typical sound source for a row of the Sources table: its level at 1 m, spectrum and
placement, with where its numbers come from."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Static

from roomcalc.io.sources import TypicalSource
from roomcalc.present.sources import SOURCES_NOTE, source_details
from roomcalc.tui.widgets.grid import CellGrid


class SourceChooser(ModalScreen[str | None]):
    """The typical sources in a list, the highlighted one's details beside it. Dismisses with
    the chosen source's id, or None."""

    DEFAULT_CSS = """
    SourceChooser { align: center middle; }
    SourceChooser > Vertical { width: 96%; height: 94%; border: thick $primary;
                               background: $surface; padding: 0 1; }
    SourceChooser #body { height: 1fr; }
    SourceChooser #list { width: 1fr; }
    SourceChooser #details { width: 1fr; padding: 0 1; border-left: solid $primary;
                             overflow-y: auto; }
    SourceChooser #note { color: $text-muted; height: auto; }
    """
    BINDINGS = [Binding("escape", "dismiss_none", "Cancel", id="sources.cancel")]

    def __init__(self, sources: list[TypicalSource], bands, row: str) -> None:
        super().__init__()
        self.sources, self.bands, self.row = list(sources), tuple(bands), row

    def compose(self) -> ComposeResult:
        with Vertical():
            yield Static(f"Choose a typical source for {self.row} - Enter takes its level "
                         "at 1 m, spectrum and placement; Escape cancels", id="title",
                         markup=False)
            with Horizontal(id="body"):
                yield CellGrid(cursor_type="row", zebra_stripes=True, show_row_labels=False,
                               id="list")
                yield Static("", id="details", markup=False)
            yield Static(SOURCES_NOTE, id="note", markup=False)

    def on_mount(self) -> None:
        table = self.query_one("#list", CellGrid)
        table.add_column("dB(A) 1 m", key="level", justify="right")
        table.add_column("name", key="name")
        table.set_rows([[f"{t.level_dba_1m(self.bands):.1f}", t.name] for t in self.sources],
                       keys=[t.id for t in self.sources])
        table.move_cursor(row=0)
        table.focus()
        self._details()

    def _details(self) -> None:
        table = self.query_one("#list", CellGrid)
        if self.sources:
            t = self.sources[min(table.cursor_row, len(self.sources) - 1)]
            self.query_one("#details", Static).update(source_details(t, self.bands, width=0))

    def on_cell_grid_row_highlighted(self, event: CellGrid.RowHighlighted) -> None:
        self._details()

    def on_cell_grid_row_selected(self, event: CellGrid.RowSelected) -> None:
        self.dismiss(str(event.row_key))

    def action_dismiss_none(self) -> None:
        self.dismiss(None)
