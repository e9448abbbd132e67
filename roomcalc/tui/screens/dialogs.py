"""Small modal dialogs: a question with buttons, a line of text, a box size."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.validation import ValidationResult, Validator
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


class _Positive(Validator):
    def validate(self, value: str) -> ValidationResult:
        try:
            v = float(value)
        except ValueError:
            return self.failure(f"'{value}' is not a number")
        return self.success() if v > 0 else self.failure("must be above 0")


class AskBox(ModalScreen[tuple | None]):
    """A box size for a new room: length, width, height and units."""

    DEFAULT_CSS = "AskBox { align: center middle; } AskBox Input { width: 16; }" + DIALOG_CSS
    BINDINGS = [Binding("escape", "dismiss_none", "Cancel", id="dialog.cancel")]

    def __init__(self, question: str = "Size of the new room (a box):") -> None:
        super().__init__()
        self.question = question

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static(self.question, classes="question", markup=False)
            with Horizontal(classes="buttons"):
                for key, label, default in (("length", "Length", "6"), ("width", "Width", "4"),
                                            ("height", "Height", "2.7")):
                    yield Label(f"{label} ")
                    yield Input(default, id=key, validators=[_Positive()])
            yield Select([("metric (m)", "metric"), ("imperial (ft)", "imperial")],
                         value="metric", allow_blank=False, id="units")
            yield Static("", classes="error", id="error")
            with Horizontal(classes="buttons"):
                yield Button("Create", id="create", variant="primary")
                yield Button("Cancel", id="cancel")

    def _submit(self) -> None:
        vals = []
        for key in ("length", "width", "height"):
            inp = self.query_one(f"#{key}", Input)
            res = inp.validate(inp.value)
            if res is not None and not res.is_valid:
                self.query_one("#error", Static).update(
                    f"{key}: " + "; ".join(res.failure_descriptions))
                inp.focus()
                return
            vals.append(float(inp.value))
        self.dismiss((*vals, self.query_one("#units", Select).value))

    def on_input_submitted(self, event: Input.Submitted) -> None:
        self._submit()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        if event.button.id == "create":
            self._submit()
        else:
            self.dismiss(None)

    def action_dismiss_none(self) -> None:
        self.dismiss(None)
