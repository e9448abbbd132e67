"""Choose a material from the catalogue, or type coefficients of your own."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Select, Static

from roomcalc.io.catalog import Catalog, Material
from roomcalc.present.materials import no_match_text, source_sentence
from roomcalc.study.typed import parse_numbers
from roomcalc.tui.widgets.grid import CellGrid


def material_details(m: Material, bands) -> str:
    """What the chooser shows of one material: values per band, ratings, source."""
    unit = "alpha" if m.kind == "surface" else "m^2 per unit"
    lines = [f"{m.name}", f"id {m.id}  [{m.category}, {m.kind}]", ""]
    lines.append("  ".join(f"{b:>5}" for b in sorted(m.values)) + "  Hz")
    lines.append("  ".join(f"{m.values[b]:>5.2f}" for b in sorted(m.values)) + f"  {unit}")
    missing = [b for b in bands if b not in m.values]
    if missing:
        lines.append(f"no value at {', '.join(map(str, missing))} Hz: this room needs them")
    r = m.ratings()
    if r:
        lines += ["", f"NRC {r[0]:.2f}   SAA~ {r[1]:.2f} (octave estimate)   "
                      f"alpha_w {r[2].label()}  class {r[2].absorption_class}"]
    lines += ["", f"values: {source_sentence(m)}"]
    if m.notes:
        lines.append(f"notes: {m.notes}")
    return "\n".join(lines)


class MaterialChooser(ModalScreen[tuple | None]):
    """Search the catalogue by words and category. Dismisses with ("material", id),
    ("values", [..]) for typed coefficients, or None."""

    DEFAULT_CSS = """
    MaterialChooser { align: center middle; }
    MaterialChooser > Vertical { width: 96%; height: 94%; border: thick $primary;
                                 background: $surface; padding: 0 1; }
    MaterialChooser #title { text-style: bold; }
    MaterialChooser #hint { color: $text-muted; }
    MaterialChooser #search-row { height: auto; }
    MaterialChooser #words { width: 1fr; }
    MaterialChooser #category { width: 30; }
    MaterialChooser #body { height: 1fr; }
    MaterialChooser #list { width: 3fr; }
    MaterialChooser #details { width: 2fr; padding: 0 1; border-left: solid $primary; }
    MaterialChooser #own-row { height: auto; }
    MaterialChooser #own-label { height: auto; padding: 1 0 0 0; }
    MaterialChooser #own { width: 1fr; }
    MaterialChooser #own-error { color: $error; height: auto; }
    """
    BINDINGS = [Binding("escape", "dismiss_none", "Cancel", id="chooser.cancel"),
                Binding("ctrl+f", "focus_search", "Search", id="chooser.search")]

    def __init__(self, catalog: Catalog, kind: str, bands, current: str | None = None,
                 current_values: list | None = None, changes: str = "",
                 prefer: tuple = ()) -> None:
        """``changes``: the row the choice will change, as the screen names it
        (``Surfaces row 1 "Floor"``), shown in the title."""
        super().__init__()
        self.changes = changes
        self.prefer = prefer            # categories listed first among equals
        self.catalog, self.kind, self.bands = catalog, kind, tuple(bands)
        self.current, self.current_values = current, current_values
        self._shown: list[Material] = []
        self._rows: dict[str, list] = {}

    def compose(self) -> ComposeResult:
        with Vertical():
            what = "surface material" if self.kind == "surface" else "kind of object"
            target = f" for {self.changes}" if self.changes else ""
            yield Static(f"Choose a {what}{target}", id="title", markup=False)
            yield Static("Type words to search; Enter picks the highlighted row; Esc leaves "
                         "it as it was", id="hint")
            with Horizontal(id="search-row"):
                yield Input(placeholder="search: words of the name, e.g. wool 50", id="words")
                cats = sorted({m.category for m in self.catalog.materials.values()
                               if m.kind == self.kind})
                yield Select([(c, c) for c in cats], prompt="all categories", id="category")
            with Horizontal(id="body"):
                yield CellGrid(cursor_type="row", zebra_stripes=True, show_row_labels=False,
                               id="list")
                yield Static("", id="details", markup=False)
            unit = "alpha per band" if self.kind == "surface" else "m^2 per unit per band"
            # The words on a line of their own, so that the field and its button keep their
            # room on a narrow screen.
            yield Static(f"Or your own {unit} ({', '.join(map(str, self.bands))} Hz):",
                         id="own-label")
            with Horizontal(id="own-row"):
                yield Input(" ".join(f"{x:g}" for x in (self.current_values or [])),
                            placeholder="0.10 0.25 0.60 0.85 0.90 0.90", id="own")
                yield Button("Use these", id="use-own")
            yield Static("", id="own-error")

    def on_mount(self) -> None:
        table = self.query_one("#list", CellGrid)
        # The name first, cut to fit before the ratings are (the id is in the details).
        table.add_column("name", key="name", shrink_to=16)
        if self.kind == "surface":
            table.add_column("NRC", key="nrc", justify="right")
            table.add_column("alpha_w", key="aw")
        else:
            table.add_column("500 Hz m^2", key="v500", justify="right")
        table.add_column("id", key="id")
        table.keep_in_view = len(table.columns) - 1
        self._fill()
        self.query_one("#words", Input).focus()

    def _fill(self) -> None:
        words = self.query_one("#words", Input).value
        cat = self.query_one("#category", Select).value
        category = cat if isinstance(cat, str) else None
        self._shown = self.catalog.search(words, category, self.kind, prefer=self.prefer)
        table = self.query_one("#list", CellGrid)
        table.set_rows([self._row(m) for m in self._shown], keys=[m.id for m in self._shown])
        table.move_cursor(row=0)
        if self.current and any(m.id == self.current for m in self._shown):
            table.move_cursor(row=[m.id for m in self._shown].index(self.current))
        self._details()

    def _row(self, m: Material) -> list:
        """The list's cells for a material (ratings computed once per material)."""
        row = self._rows.get(m.id)
        if row is None:
            if self.kind == "surface":
                nrc, _saa, aw = m.ratings()
                row = [m.name, f"{nrc:.2f}", f"{aw.label()} {aw.absorption_class}", m.id]
            else:
                row = [m.name, f"{m.values.get(500, 0):.2f}", m.id]
            self._rows[m.id] = row
        return row

    def _details(self) -> None:
        table = self.query_one("#list", CellGrid)
        det = self.query_one("#details", Static)
        if not self._shown:
            words = self.query_one("#words", Input).value
            cat = self.query_one("#category", Select).value
            det.update(no_match_text(words, self.catalog.suggest_categories(words),
                                     cat if isinstance(cat, str) else None))
            return
        m = self._shown[min(table.cursor_row, len(self._shown) - 1)]
        det.update(material_details(m, self.bands))

    def on_input_changed(self, event: Input.Changed) -> None:
        if event.input.id == "words":
            self._fill()

    def on_select_changed(self, event: Select.Changed) -> None:
        self._fill()

    def on_cell_grid_row_highlighted(self, event: CellGrid.RowHighlighted) -> None:
        self._details()

    def on_cell_grid_row_selected(self, event: CellGrid.RowSelected) -> None:
        self.dismiss(("material", str(event.row_key)))

    def on_input_submitted(self, event: Input.Submitted) -> None:
        if event.input.id == "words":
            if self._shown:
                table = self.query_one("#list", CellGrid)
                self.dismiss(("material", self._shown[table.cursor_row].id))
        elif event.input.id == "own":
            self._use_own()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        if event.button.id == "use-own":
            self._use_own()

    def _use_own(self) -> None:
        text = self.query_one("#own", Input).value
        err = self.query_one("#own-error", Static)
        try:
            vals = parse_numbers(text)
        except ValueError:
            err.update("Only numbers, separated by spaces or semicolons.")
            return
        if len(vals) != len(self.bands):
            err.update(f"{len(vals)} values given; {len(self.bands)} are needed, one per band.")
            return
        high = 1.2 if self.kind == "surface" else None
        bad = [v for v in vals if v < 0 or (high is not None and v > high)]
        if bad:
            err.update(f"{bad[0]:g} is outside 0 to 1.2" if high else f"{bad[0]:g} is below 0")
            return
        self.dismiss(("values", vals))

    def action_focus_search(self) -> None:
        self.query_one("#words", Input).focus()

    def action_dismiss_none(self) -> None:
        self.dismiss(None)
