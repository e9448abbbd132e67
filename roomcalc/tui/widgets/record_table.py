"""A table of records (surfaces, objects, sources, receivers) with an editor line under it.

Columns are described by :class:`Column`. Enter (or a click) on a cell opens the editor line
with the cell's value; Enter there sends :class:`FieldEdited` up, Escape cancels. A value that
does not parse (text in a number field) is shown under the editor with the reason and is not
sent. Range checks happen above, in the room check, and come back through :meth:`show_problems`.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.validation import ValidationResult, Validator
from textual.widgets import Input, Static

from roomcalc.io.roomfile import toml_value
from roomcalc.study.typed import parse_number, parse_numbers, split_entries
from roomcalc.tui.messages import FieldEdited, MaterialWanted, RowAction
from roomcalc.tui.widgets.grid import CellGrid


@dataclass
class Column:
    """One column: the record attribute, its heading, and how to show, parse and edit it.

    kind: text, number, int, choice, material, numbers (a list), position, distances, names
    (one name, or several separated by semicolons: a list), flag (yes / no: True or None).
    """

    key: str
    label: str
    kind: str = "text"
    choices: tuple = ()
    width: int | None = None
    length: int | None = None          # for numbers: how many values
    optional: bool = True
    hint: str = ""
    show: object = None                # callable(record) -> str, overrides the default
    extra: dict = field(default_factory=dict)


#: The narrowest a column of text may be cut to (with an ellipsis) so that the table's
#: leading columns fit its pane; other kinds (numbers) are never cut.
SHRINK_TO = {"text": 8, "material": 10, "choice": 6}


def fmt_value(v, kind: str) -> str:
    if kind == "flag":
        return "yes" if v else "no"
    if v is None:
        return ""
    if kind in ("numbers", "position"):
        return " ".join(f"{x:g}" for x in v)
    if kind == "distances":
        return ", ".join(f"{k}={x:g}" for k, x in v.items())
    if kind == "names" and isinstance(v, list):
        return "; ".join(v)
    if isinstance(v, float):
        return f"{v:g}"
    return str(v)


def as_read_text(rec, col: Column) -> str:
    """A cell of a row from a file with problems: a value its field cannot hold is shown as
    the file has it (``"two"`` in a number column), until the cell is given a value
    (roomcalc.io.roomfile.asread)."""
    kept = rec.as_read.get(col.key)
    if kept is not None and getattr(rec, col.key, None) == kept[1]:
        try:
            return toml_value(kept[0])
        except TypeError:
            return "?"
    return col.show(rec) if col.show else fmt_value(getattr(rec, col.key, None), col.kind)


def parse_value(text: str, col: Column):
    """The typed text as a value for the column; ValueError with the reason when it does not
    parse. Empty text clears an optional field (None)."""
    t = text.strip()
    if not t:
        if col.optional:
            return {} if col.kind == "distances" else None
        raise ValueError(f"{col.label} cannot be empty")
    if col.kind == "text":
        return t
    if col.kind == "names":
        names = [n.strip() for n in t.split(";") if n.strip()]
        if len(set(names)) < len(names):
            raise ValueError("a name is given twice; give each once")
        return names[0] if len(names) == 1 else names
    if col.kind == "flag":
        low = t.lower()
        if low in ("yes", "y", "true", "1"):
            return True
        if low in ("no", "n", "false", "0"):
            return None
        raise ValueError(f"'{t}': type yes or no")
    if col.kind == "number":
        return parse_number(t)             # "9,5" or "9.5"
    if col.kind == "int":
        try:
            return int(t)
        except ValueError:
            raise ValueError(f"'{t}' is not a whole number") from None
    if col.kind == "choice":
        if t not in col.choices:
            raise ValueError(f"'{t}' is not one of: {', '.join(col.choices)}")
        return t
    if col.kind in ("numbers", "position"):
        vals = parse_numbers(t)            # spaces, semicolons or ", " between; decimal commas
        n = 3 if col.kind == "position" else col.length
        if n is not None and len(vals) != n:
            raise ValueError(f"{len(vals)} values given; {n} are needed")
        return vals
    if col.kind == "distances":
        out = {}
        for part in split_entries(t):
            if not part.strip():
                continue
            if "=" not in part:
                raise ValueError(f"'{part.strip()}': write source=distance, e.g. Amp=3.2")
            k, _, x = part.partition("=")
            out[k.strip()] = parse_number(x)
        return out
    return t


class _ParseValidator(Validator):
    def __init__(self, col: Column) -> None:
        super().__init__()
        self.col = col

    def validate(self, value: str) -> ValidationResult:
        try:
            parse_value(value, self.col)
        except ValueError as exc:
            return self.failure(str(exc))
        return self.success()


class RecordTable(Vertical):
    """A table of one collection of the room, with its editor line."""

    DEFAULT_CSS = """
    RecordTable { height: 1fr; }
    RecordTable CellGrid { height: 1fr; }
    RecordTable #editor-row { height: auto; display: none; }
    RecordTable.editing #editor-row { display: block; }
    RecordTable #editor-label { padding: 0 1; color: $text-muted; }
    RecordTable #editor { width: 1fr; margin: 0 1; }
    RecordTable #editor-error { color: $error; height: auto; padding: 0 1; display: none; }
    RecordTable #row-help { color: $text-muted; height: auto; padding: 0 1; }
    RecordTable #row-detail { height: 2; padding: 0 1; }
    RecordTable #problems { color: $error; height: auto; max-height: 4; padding: 0 1;
                            display: none; }
    """

    BINDINGS = [
        Binding("a", "row('add')", "Add", id="row.add"),
        Binding("c", "row('duplicate')", "Copy row", id="row.duplicate"),
        Binding("delete,x", "row('delete')", "Delete", id="row.delete"),
        Binding("ctrl+up,K", "row('up')", "Move up", show=False, id="row.up"),
        Binding("ctrl+down,J", "row('down')", "Move down", show=False, id="row.down"),
        Binding("escape", "cancel_edit", "Cancel", show=False, id="row.cancel"),
    ]

    def __init__(self, collection: str, columns: list[Column], *, help_text: str = "",
                 describe=None, id: str | None = None) -> None:
        super().__init__(id=id)
        self.describe = describe
        self.collection = collection
        self.columns = columns
        self.records: list = []
        self.help_text = help_text
        self._editing: tuple[int, int] | None = None

    def compose(self) -> ComposeResult:
        table = CellGrid(cursor_type="cell", zebra_stripes=True, id="table")
        yield table
        with Vertical(id="editor-row"):
            yield Static("", id="editor-label", markup=False)
            yield Input(id="editor", validate_on=["changed", "submitted"], compact=True)
        yield Static("", id="editor-error", markup=False)
        yield Static("", id="problems", markup=False)
        yield Static("", id="row-detail", markup=False)
        yield Static(self.help_text, id="row-help")

    def on_mount(self) -> None:
        table = self.query_one("#table", CellGrid)
        table.cursor_moved = lambda coordinate: self._detail(coordinate.row)
        self._add_columns(table)

    def _add_columns(self, table: CellGrid) -> None:
        """The grid's columns; the leading ones (up to the material, else the name and the
        next) stay in view, names and materials cut to make room (numbers never are)."""
        for col in self.columns:
            table.add_column(col.label, key=col.key, width=col.width,
                             shrink_to=SHRINK_TO.get(col.kind))
        kinds = [col.kind for col in self.columns]
        table.keep_in_view = kinds.index("material") + 1 if "material" in kinds \
            else min(2, len(kinds))

    # ---------------------------------------------------------------- downward
    def set_columns(self, columns: list[Column]) -> None:
        """Other columns (the room's units changed: other keys and headings). Before the table
        is mounted this only replaces the list it will be built from."""
        self.columns = columns
        if not self.is_mounted:
            return
        table = self.query_one("#table", CellGrid)
        table.clear(columns=True)
        self._add_columns(table)
        self.records = []

    def set_records(self, records: list, annotations: dict | None = None) -> None:
        """Show these records (keeps the cursor where it was when it can)."""
        self.records = records
        table = self.query_one("#table", CellGrid)
        coord = table.cursor_coordinate
        # Plain strings: the grid never reads them as markup.
        rows = [[col.show(rec) if col.show else fmt_value(getattr(rec, col.key, None), col.kind)
                 for col in self.columns] if not getattr(rec, "as_read", None) else
                [as_read_text(rec, col) for col in self.columns] for rec in records]
        # Only rows that differ are drawn again.
        table.set_rows(rows, labels=[str(i + 1) for i in range(len(rows))])
        if records:
            row = min(coord.row, len(records) - 1)
            table.move_cursor(row=row, column=coord.column, animate=False)
            self._detail(row)
        else:
            self.query_one("#row-detail", Static).update(
                "Nothing here yet: press a to add one.")

    def _say_error(self, text: str) -> None:
        """The reason a typed value cannot be used, under the editor line (hidden when none)."""
        err = self.query_one("#editor-error", Static)
        if str(err.content) != text:
            err.update(text)
            err.display = bool(text)

    def show_problems(self, lines: list[str]) -> None:
        text = "\n".join(lines)
        problems = self.query_one("#problems", Static)
        if str(problems.content) != text:
            problems.update(text)
            problems.display = bool(text)       # no blank line when all is well

    def select_row(self, index: int) -> None:
        table = self.query_one("#table", CellGrid)
        if 0 <= index < table.row_count:
            table.move_cursor(row=index, animate=False)
            self._detail(index)         # now, in this update, not after the table's message

    @property
    def current_row(self) -> int | None:
        table = self.query_one("#table", CellGrid)
        return table.cursor_row if table.row_count else None

    def on_cell_grid_cell_highlighted(self, event: CellGrid.CellHighlighted) -> None:
        event.stop()
        self._detail(event.coordinate.row)

    def _detail(self, row: int) -> None:
        text = ""
        if self.describe is not None and 0 <= row < len(self.records):
            text = self.describe(self.collection, self.records[row])
        detail = self.query_one("#row-detail", Static)
        if str(detail.content) != text:
            detail.update(text, layout=False)       # a fixed height: no layout needed

    # ---------------------------------------------------------------- editing
    def on_cell_grid_cell_selected(self, event: CellGrid.CellSelected) -> None:
        event.stop()
        self.start_edit(event.coordinate.row, event.coordinate.column)

    def start_edit(self, row: int, column: int) -> None:
        if not (0 <= row < len(self.records)):
            return
        col = self.columns[column]
        if col.kind == "material":
            self.post_message(MaterialWanted(self.collection, row))
            return
        rec = self.records[row]
        self._editing = (row, column)
        editor = self.query_one("#editor", Input)
        editor.validators = [_ParseValidator(col)]
        editor.value = fmt_value(getattr(rec, col.key, None), col.kind)
        hint = f" ({col.hint})" if col.hint else ""
        self.query_one("#editor-label", Static).update(
            f"Edit {getattr(rec, 'name', row + 1)} / {col.label}{hint}  (Enter applies, "
            "Escape cancels)")
        self._say_error("")
        self.add_class("editing")
        editor.focus()

    def on_input_changed(self, event: Input.Changed) -> None:
        if event.input.id != "editor":
            return
        event.stop()
        res = event.validation_result
        self._say_error(
            "" if res is None or res.is_valid else "; ".join(res.failure_descriptions))

    def on_input_submitted(self, event: Input.Submitted) -> None:
        if event.input.id != "editor" or self._editing is None:
            return
        event.stop()
        row, column = self._editing
        col = self.columns[column]
        try:
            value = parse_value(event.value, col)
        except ValueError as exc:
            self._say_error(str(exc))
            return
        self._finish_edit()
        self.post_message(FieldEdited(self.collection, row, col.key, value))

    def action_cancel_edit(self) -> None:
        self._finish_edit()

    def _finish_edit(self) -> None:
        self._editing = None
        self.remove_class("editing")
        self._say_error("")
        self.query_one("#table", CellGrid).focus()

    def action_row(self, action: str) -> None:
        if self._editing is not None:
            return
        self.post_message(RowAction(self.collection, action, self.current_row))
