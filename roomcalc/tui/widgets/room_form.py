"""The room's own settings: title, box size or volume, air, units and bands."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Grid, VerticalScroll
from textual.validation import ValidationResult, Validator
from textual.widgets import Checkbox, Input, Label, Select, Static

from roomcalc.engine.analysis import METHOD_TITLES, METHODS
from roomcalc.io.roomfile import RoomSpec
from roomcalc.study.typed import parse_number
from roomcalc.tui.messages import FieldEdited

#: The formula choice "none": the one roomcalc recommends for the room.
RECOMMENDED = "recommended"

#: (key, label, unit kind) of each numeric field. Unit kind picks the label from the room's units.
NUMBER_FIELDS = (
    ("shape.length", "Length", "length"),
    ("shape.width", "Width", "length"),
    ("shape.height", "Height", "length"),
    ("shape.volume", "Volume (free shape, or to override the box)", "volume"),
    ("air.temperature", "Air temperature", "temperature"),
    ("air.relative_humidity", "Relative humidity", "%"),
    ("air.pressure_kpa", "Air pressure", "kPa"),
)


class _Number(Validator):
    def validate(self, value: str) -> ValidationResult:
        if not value.strip():
            return self.success()
        try:
            parse_number(value)            # "9,5" or "9.5"
        except ValueError as exc:
            return self.failure(str(exc))
        return self.success()


class RoomForm(VerticalScroll, can_focus=False):
    """Fields of the room (the form itself takes no focus, its fields do: a focus stop must
    show where it is). Each valid change is sent up as FieldEdited("room", None, key, value)
    (None for a cleared field); a value that is not a number is shown as invalid, with the
    reason, and not sent."""

    DEFAULT_CSS = """
    RoomForm Grid { grid-size: 3; grid-columns: 16 1fr 8; grid-rows: auto; height: auto; }
    RoomForm Label { padding: 1 1 0 0; }
    RoomForm .unit { padding: 1 0 0 1; color: $text-muted; }
    RoomForm .field-error { color: $error; height: auto; }
    RoomForm #bands { height: auto; }
    """

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self._units = {}
        self._shown_units: str | None = None
        self._shown_method: str | None = None

    def compose(self) -> ComposeResult:
        with Grid():
            yield Label("Title")
            yield Input(id="f-title")
            yield Static("")
            yield Label("Units")
            yield Select([("metric (m, degC)", "metric"),
                          ("imperial (ft, degF)", "imperial")],
                         allow_blank=False, value="metric", id="f-units")
            yield Static("")
            yield Label("RT formula")
            yield Select([("recommended", RECOMMENDED)] +
                         [(METHOD_TITLES[k], k) for k in METHODS],
                         allow_blank=False, value=RECOMMENDED, id="f-method",
                         tooltip="The formula in force: every result, the target check, the "
                         "plan and before/after use it")
            yield Static("")
            for key, label, _ in NUMBER_FIELDS:
                yield Label(label.split(" (")[0])
                yield Input(id="f-" + key.replace(".", "-"), validators=[_Number()],
                            placeholder="(not set)" if "volume" in key or "air" in key else "",
                            tooltip=label)
                u = Static("", classes="unit", id="u-" + key.replace(".", "-"))
                yield u
        yield Static("", classes="field-error", id="form-error", markup=False)
        yield Label("Bands: 125 to 4000 Hz always; add")
        yield Checkbox("63 Hz", id="f-63")
        yield Checkbox("8000 Hz", id="f-8000")

    def show(self, spec: RoomSpec) -> None:
        """Put the spec's values in the fields without sending them back up."""
        u = spec.unit_system
        labels = {"length": u.length_label, "volume": u.volume_label,
                  "temperature": u.temperature_label, "%": "%", "kPa": "kPa"}
        self._shown_units = spec.units
        with self.prevent(Input.Changed, Select.Changed, Checkbox.Changed):
            self.query_one("#f-title", Input).value = spec.title
            self.query_one("#f-units", Select).value = spec.units
            self._shown_method = spec.method_in_force or RECOMMENDED
            self.query_one("#f-method", Select).value = self._shown_method
            for key, _, kind in NUMBER_FIELDS:
                group, name = key.split(".")
                v = getattr(getattr(spec, group), name)
                inp = self.query_one("#f-" + key.replace(".", "-"), Input)
                text = "" if v is None else f"{v:g}"
                if inp.value != text and not (inp.has_focus and _same(inp.value, v)):
                    inp.value = text
                self.query_one("#u-" + key.replace(".", "-"), Static).update(labels[kind])
            self.query_one("#f-63", Checkbox).value = 63 in spec.bands
            self.query_one("#f-8000", Checkbox).value = 8000 in spec.bands

    def on_input_changed(self, event: Input.Changed) -> None:
        event.stop()
        wid = event.input.id or ""
        if wid == "f-title":
            self.post_message(FieldEdited("room", None, "title", event.value))
            return
        key = wid[2:].replace("-", ".", 1)
        err = self.query_one("#form-error", Static)
        if event.validation_result is not None and not event.validation_result.is_valid:
            err.update(f"{key}: " + "; ".join(event.validation_result.failure_descriptions))
            self.post_message(FieldEdited("room", None, key, _Unparsed(event.value)))
            return
        err.update("")
        value = parse_number(event.value) if event.value.strip() else None
        self.post_message(FieldEdited("room", None, key, value))

    def on_select_changed(self, event: Select.Changed) -> None:
        event.stop()
        # The Select posts Changed with its default ("metric") when it is mounted, which can
        # arrive before or after show(): only a value that differs from the room shown is an
        # edit (else an imperial room would be converted to metric on opening).
        value = event.select.value
        if event.select.id == "f-method" and self._shown_method is not None and \
                value != self._shown_method and value in (RECOMMENDED, *METHODS):
            self._shown_method = value
            self.post_message(FieldEdited("room", None, "method",
                                          None if value == RECOMMENDED else value))
            return
        if event.select.id == "f-units" and value in ("metric", "imperial") and \
                self._shown_units is not None and value != self._shown_units:
            self.post_message(FieldEdited("room", None, "units", value))

    def on_checkbox_changed(self, event: Checkbox.Changed) -> None:
        event.stop()
        bands = [63] if self.query_one("#f-63", Checkbox).value else []
        bands += [125, 250, 500, 1000, 2000, 4000]
        bands += [8000] if self.query_one("#f-8000", Checkbox).value else []
        self.post_message(FieldEdited("room", None, "bands_hz", bands))


class _Unparsed(str):
    """Text typed in a number field that is not a number (kept to say so, never stored)."""


def _same(text: str, v) -> bool:
    try:
        return v is not None and parse_number(text) == v
    except ValueError:
        return False


Unparsed = _Unparsed
