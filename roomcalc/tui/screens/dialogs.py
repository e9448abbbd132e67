"""Small modal dialogs: a question with buttons, a line of text, a box size."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Label, Select, Static

DIALOG_CSS = """
.dialog { width: 72; max-width: 95%; height: auto; padding: 1 2; border: thick $primary;
          background: $surface; }
.dialog .question { margin-bottom: 1; }
.dialog .buttons { height: auto; margin-top: 1; }
.dialog Button { margin-right: 1; }
.dialog .error { color: $error; height: auto; }
"""


class Ask(ModalScreen[str | None]):
    """A question and buttons; dismisses with the chosen button's id (None on Escape)."""

    DEFAULT_CSS = "Ask { align: center middle; }" + DIALOG_CSS
    BINDINGS = [Binding("escape", "dismiss_none", "Cancel", id="dialog.cancel")]

    def __init__(self, question: str, buttons: list[tuple[str, str, str]]) -> None:
        super().__init__()
        self.question, self.buttons = question, buttons

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static(self.question, classes="question", markup=False)
            with Horizontal(classes="buttons"):
                for bid, label, variant in self.buttons:
                    yield Button(label, id=bid, variant=variant)

    def on_mount(self) -> None:
        self.query(Button).first().focus()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        self.dismiss(event.button.id)

    def action_dismiss_none(self) -> None:
        self.dismiss(None)


class AskText(ModalScreen[str | None]):
    """One line of text (a file name); dismisses with it, or None on Escape."""

    DEFAULT_CSS = "AskText { align: center middle; }" + DIALOG_CSS
    BINDINGS = [Binding("escape", "dismiss_none", "Cancel", id="dialog.cancel")]

    def __init__(self, question: str, value: str = "", placeholder: str = "") -> None:
        super().__init__()
        self.question, self.value, self.placeholder = question, value, placeholder

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static(self.question, classes="question", markup=False)
            yield Input(self.value, placeholder=self.placeholder, id="text")
            yield Static("Enter to confirm, Escape to cancel.", classes="hint")

    def on_input_submitted(self, event: Input.Submitted) -> None:
        if event.value.strip():
            self.dismiss(event.value.strip())

    def action_dismiss_none(self) -> None:
        self.dismiss(None)


#: The sides of the new-room dialog: (key, label, default in the chosen units).
BOX_SIDES = (("length", "Length", "6"), ("width", "Width", "4"), ("height", "Height", "2.7"))


class AskBox(ModalScreen[tuple | None]):
    """A box size for a new room: length, width, height and units. The sizes are checked as
    the room file's ``[shape]`` is (roomcalc.io.roomfile.box_size_problems: the file's ranges
    and messages, in the chosen units); each problem shows under its field, and the dialog
    stays open until the size is good."""

    DEFAULT_CSS = ("AskBox { align: center middle; } AskBox Input { width: 16; } "
                   "AskBox .dialog { max-height: 100%; overflow-y: auto; } "
                   "AskBox .field { height: auto; } AskBox .field Label { width: 8; "
                   "padding-top: 1; } AskBox .unit { padding-top: 1; padding-left: 1; }"
                   + DIALOG_CSS)
    BINDINGS = [Binding("escape", "dismiss_none", "Cancel", id="dialog.cancel")]

    def __init__(self, question: str = "Size of the new room (a box):") -> None:
        super().__init__()
        self.question = question

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static(self.question, classes="question", markup=False)
            for key, label, default in BOX_SIDES:
                with Horizontal(classes="field"):
                    yield Label(label)
                    yield Input(default, id=key)
                    yield Static("m", classes="unit")
                yield Static("", classes="error", id=f"{key}-error", markup=False)
            yield Select([("metric (m)", "metric"), ("imperial (ft)", "imperial")],
                         value="metric", allow_blank=False, id="units")
            yield Static("", classes="error", id="error", markup=False)
            with Horizontal(classes="buttons"):
                yield Button("Create", id="create", variant="primary")
                yield Button("Cancel", id="cancel")

    def on_mount(self) -> None:
        self._show({})

    def problems(self) -> tuple[dict[str, str], list[float] | None]:
        """The message of each field with a problem ("" for the box's volume), and the
        size when there is none."""
        from roomcalc.io.roomfile import box_size_problems
        from roomcalc.study.typed import parse_number

        units = self.query_one("#units", Select).value
        raw, vals, out = {}, {}, {}
        for key, _, _ in BOX_SIDES:
            raw[key] = self.query_one(f"#{key}", Input).value.strip()
            try:
                vals[key] = parse_number(raw[key])         # "3,5" too
            except ValueError:
                out[key] = f"'{raw[key]}' is not a number" if raw[key] else "give a number"
                vals[key] = raw[key]
        if not out:
            for p in box_size_problems(vals["length"], vals["width"], vals["height"], units):
                key = p.where.removeprefix("shape").lstrip(".")
                out[key] = p.message
        return out, None if out else [vals[k] for k, _, _ in BOX_SIDES]

    def _show(self, problems: dict[str, str]) -> None:
        """Each message under its field (a field without one takes no line)."""
        for key in [k for k, _, _ in BOX_SIDES] + [""]:
            self._say(key, problems.get(key, ""))

    def _say(self, key: str, message: str) -> None:
        w = self.query_one(f"#{key}-error" if key else "#error", Static)
        w.update(message)
        w.display = bool(message)

    def _submit(self) -> None:
        problems, size = self.problems()
        self._show(problems)
        if size is None:
            first = next((k for k, _, _ in BOX_SIDES if k in problems), None)
            if first is not None:
                self.query_one(f"#{first}", Input).focus()
            return
        self.dismiss((*size, self.query_one("#units", Select).value))

    def on_select_changed(self, event: Select.Changed) -> None:
        label = "ft" if event.value == "imperial" else "m"
        for unit in self.query(".unit").results(Static):
            unit.update(label)
        if any(w.display for w in self.query(".error").results(Static)):
            self._show(self.problems()[0])

    def on_input_changed(self, event: Input.Changed) -> None:
        # A message goes as soon as its field is edited; the next Create checks again.
        if event.input.id:
            self._say(event.input.id, "")
            self._say("", "")

    def on_input_submitted(self, event: Input.Submitted) -> None:
        self._submit()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        if event.button.id == "create":
            self._submit()
        else:
            self.dismiss(None)

    def action_dismiss_none(self) -> None:
        self.dismiss(None)
