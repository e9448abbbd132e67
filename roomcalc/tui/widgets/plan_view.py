"""The treatment plan view: pick what the room must reach, tick the candidates to use, plan,
see the result before and after, and apply it to the room.

The view is told what to show (:meth:`PlanView.show_setup`, :meth:`PlanView.show_run`) and
reports upward with messages; the screen makes the plan and changes the room.
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, VerticalScroll
from textual.message import Message
from textual.widgets import Button, Input, Select, Static

from roomcalc.engine.analysis import METHOD_TITLES, METHODS
from roomcalc.io.units import METRIC
from roomcalc.present.sections import amount_text, applied_text, plan_levels
from roomcalc.tui.widgets.grid import CellGrid
from roomcalc.tui.widgets.results import BandTable
from roomcalc.tui.widgets.room_form import RECOMMENDED

OWN = "own"            # the criterion option for the room file's own limits
NONE = "none"          # no RT target
#: The formulas offered, Eyring first (the one a plan uses when the room file names none).
METHOD_ORDER = METHODS


class PlanRtTable(BandTable):
    """RT60 before and after the plan, and the window it aims at."""

    def show(self, bands, before, after, lo, hi) -> None:
        self._columns(tuple(bands), "RT60 [s]")
        self._row("before", before)
        self._row("after the plan", after, style="bold")
        if hi is not None:
            self._row("at most", hi)
        if lo is not None:
            self._row("at least", lo)
        self._flush()


class PlanView(VerticalScroll, can_focus=False):
    """Criterion, method and objective; the candidates with a tick each; the plan. The view
    itself takes no focus (its fields, list and buttons do: a focus stop must show where it
    is); its keys work wherever the focus is inside it."""

    DEFAULT_CSS = """
    PlanView { height: 1fr; }
    PlanView #plan-controls, PlanView #plan-controls-2 { height: auto; }
    PlanView #plan-controls Select { width: 1fr; }
    PlanView #plan-controls-2 Select { width: 1fr; }
    PlanView #plan-controls-2 Button { width: auto; min-width: 8; margin: 0 1; }
    PlanView #plan-head, PlanView #plan-result { height: auto; padding: 0 1; }
    PlanView #plan-own-row { height: 1; margin: 0 1; }
    PlanView #plan-own-label { width: auto; color: $text-muted; }
    PlanView #plan-own { width: 1fr; background: $boost; }
    PlanView #plan-own-error { height: auto; color: $error; padding: 0 1; display: none; }
    PlanView #plan-check { height: auto; max-height: 12; padding: 0 1; color: $text-muted; }
    PlanView #plan-candidates { height: auto; max-height: 8; }
    PlanView #plan-items { height: auto; max-height: 8; }
    PlanView #plan-reasons { height: auto; padding: 0 1; color: $warning; }
    """

    BINDINGS = [
        Binding("space", "toggle", "Use or not", id="plan.toggle"),
        Binding("r", "run", "Plan", id="plan.run"),
        Binding("escape", "stop", "Stop the plan", id="plan.stop"),
        Binding("a", "apply", "Apply the plan", id="plan.apply"),
    ]

    class Run(Message):
        """Make a plan with these candidates (names)."""

        def __init__(self, enabled: set[str]) -> None:
            super().__init__()
            self.enabled = enabled

    class Apply(Message):
        """Apply the plan last shown to the room."""

    class Stop(Message):
        """Stop the plan being made."""

    class TargetChanged(Message):
        """The user picked another criterion, method or objective."""

        def __init__(self, key: str, value: str) -> None:
            super().__init__()
            self.key, self.value = key, value

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self.disabled_names: set[str] = set()
        self._names: list[str] = []
        self._crit_options: list = []
        self._shown: dict | None = None     # what the controls show, as the room file has it

    def compose(self) -> ComposeResult:
        yield Static("", id="plan-head", markup=False)
        with Horizontal(id="plan-controls"):
            yield Select([("No RT target", NONE)], id="plan-criterion", allow_blank=False)
        # A field that looks like one (a compact field alone read as a line of text).
        with Horizontal(id="plan-own-row"):
            yield Static("or your own RT60 limit [s] ", id="plan-own-label", markup=False)
            yield Input(placeholder="one value, or one per band; Enter", id="plan-own",
                        compact=True)
        yield Static("", id="plan-own-error", markup=False)
        with Horizontal(id="plan-controls-2"):
            yield Select([("recommended formula", RECOMMENDED)] +
                         [(METHOD_TITLES[m], m) for m in METHOD_ORDER], id="plan-method",
                         allow_blank=False, tooltip="The formula in force for the whole room "
                         "(also in the Room tab)")
            yield Select([("least cost", "cost"), ("least area", "area")],
                         id="plan-objective", allow_blank=False)
            yield Button("Plan (r)", id="plan-run", variant="primary")
            yield Button("Stop (Esc)", id="plan-stop", variant="warning", disabled=True)
            yield Button("Apply (a)", id="plan-apply", disabled=True)
        yield CellGrid(cursor_type="row", zebra_stripes=True, show_row_labels=False,
                       id="plan-candidates")
        yield Static("", id="plan-result", markup=False)
        yield CellGrid(cursor_type="row", zebra_stripes=True, show_row_labels=False,
                       id="plan-items")
        yield PlanRtTable(id="plan-rt")
        yield Static("", id="plan-reasons", markup=False)
        yield Static("", id="plan-check", markup=False)

    def on_mount(self) -> None:
        g = self.query_one("#plan-candidates", CellGrid)
        for key, label, just in (("use", "use", "left"), ("name", "candidate", "left"),
                                 ("where", "where", "left"), ("max", "up to", "right"),
                                 ("cost", "cost", "right")):
            g.add_column(label, key=key, justify=just,
                         shrink_to=10 if key in ("name", "where") else None)
        g.keep_in_view = len(g.columns)        # names are cut so that the cost shows
        items = self.query_one("#plan-items", CellGrid)
        for key, label, just in (("what", "plan", "left"), ("where", "where", "left"),
                                 ("amount", "how much", "right"), ("cost", "cost", "right")):
            items.add_column(label, key=key, justify=just,
                             shrink_to=10 if key in ("what", "where") else None)
        items.keep_in_view = len(items.columns)
        items.display = False
        self.query_one("#plan-rt").display = False
        self.query_one("#plan-stop").display = False     # shown while a plan is being made

    # ------------------------------------------------------------------ downward
    def show_setup(self, spec, criteria: dict, units, area_label: str) -> None:
        """The target and candidates as the room file has them now."""
        t = spec.target
        # Set programmatically: no Changed messages (they would read as the user's edits).
        crit = self.query_one("#plan-criterion", Select)
        options = [("No RT target", NONE)]
        if t is not None and (t.rt60_max is not None or t.rt60_min is not None):
            options.append(("the room file's own limits", OWN))
        options += [(f"{c.title} [{cid}]", cid) for cid, c in sorted(criteria.items())]
        value = NONE
        if t is not None and t.criterion:
            value = t.criterion
        elif t is not None and (t.rt60_max is not None or t.rt60_min is not None):
            value = OWN
        method = spec.method_in_force or RECOMMENDED      # the formula the plan is made by
        self._shown = {"criterion": value, "method": method,
                       "objective": t.plan_objective if t else "cost"}
        with crit.prevent(Select.Changed):
            if options != self._crit_options:
                crit.set_options(options)
                self._crit_options = options
            if crit.value != value:
                crit.value = value
        own = self.query_one("#plan-own", Input)
        text = "" if t is None or t.rt60_max is None else (
            " ".join(f"{x:g}" for x in t.rt60_max) if isinstance(t.rt60_max, list)
            else f"{t.rt60_max:g}" if not isinstance(t.rt60_max, dict)
            else " ".join(f"{b}={x:g}" for b, x in t.rt60_max.items()))
        if own.value != text and not own.has_focus:
            with own.prevent(Input.Changed):
                own.value = text
        for sel_id, val in (("#plan-method", method),
                            ("#plan-objective", t.plan_objective if t else "cost")):
            sel = self.query_one(sel_id, Select)
            if sel.value != val:
                with sel.prevent(Select.Changed):
                    sel.value = val
        levels = ", ".join(f"{k} <= {v:g} dB(A)" for k, v in (t.max_level_dba if t else {}).items())
        self.query_one("#plan-head", Static).update(
            "What the room must reach, and the cheapest treatment to get there. The "
            "treatments are edited in the Treatments tab (key 6); Space ticks one in or out, r plans, "
            "Escape stops a plan being made."
            + (f"\nLevel goals: {levels}" if levels else ""))
        rows, self._names = [], []
        cur = f" {t.currency}" if t is not None and t.currency else ""
        for c in spec.candidates:
            self._names.append(c.name)
            if c.covers:
                where = "every wall" if c.walls else ", ".join(c.surface_names(spec))
                whole = "whole surface" if len(c.surface_names(spec)) == 1 else "all of them"
                most = whole if c.max_area is None else f"{c.max_area:g} {area_label}"
                cost = "-" if c.area_cost is None else f"{c.area_cost:g}{cur}/{area_label}"
            else:
                where = "added units"
                most = "any number" if c.max_count is None else f"{c.max_count:g}"
                cost = "-" if c.cost_each is None else f"{c.cost_each:g}{cur} each"
            use = ("applied" if c.applied else
                   "[ ]" if c.name in self.disabled_names else "[x]")
            rows.append([use, c.name, where, most, cost])
        self.query_one("#plan-candidates", CellGrid).set_rows(rows, keys=self._names)

    def show_check(self, text: str) -> None:
        """The room as it is now against its target (the report's target section)."""
        self.query_one("#plan-check", Static).update(text.rstrip())

    def show_run(self, run, totals: str, area, area_label: str, units=METRIC) -> None:
        """A plan (a PlanRun of roomcalc.study) with its totals in words ("48.62 m^2 and 40
        units"); ``units``: the room file's (amounts and panel sizes are shown in them)."""
        p = run.plan
        cur = f" {run.currency}" if run.currency else ""
        head = ("The plan meets the target." if p.feasible
                else "No plan meets the target; the best partial plan is shown.")
        head += f"  Total {p.total_cost:.2f}{cur} for {totals}."
        if run.occupancy.share is not None:
            head += (f" Times are for the room {run.occupancy.label}, as the criterion "
                     "assesses it.")
        if not p.items:
            head = ("The room already meets its target: nothing to add." if p.feasible
                    else "No candidate helps.")
        self.query_one("#plan-result", Static).update(head)
        items = self.query_one("#plan-items", CellGrid)
        items.set_rows([[it.candidate, it.surface or "added", amount_text(run, it, units),
                         f"{it.cost:.2f}"] for it in p.items])
        items.display = bool(p.items)
        rt = self.query_one("#plan-rt", PlanRtTable)
        lo, hi = run.goals.rt60_min, run.goals.rt60_max
        rt.show(run.before.bands_hz, p.rt60_before, p.rt60_after, lo, hi)
        rt.display = True
        lines = [f"{name}: {b:.1f} -> {a:.1f} dB(A)" for name, b, a in plan_levels(run)]
        lines += [f"! {r}" for r in p.reasons]
        if run.applied:
            lines.append(applied_text(run))
        self.query_one("#plan-reasons", Static).update("\n".join(lines))
        self._can_apply(bool(p.items))
        self.call_after_refresh(self.query_one("#plan-result").scroll_visible, animate=False)

    def show_message(self, text: str) -> None:
        self.query_one("#plan-result", Static).update(text)
        self.query_one("#plan-items").display = False
        self.query_one("#plan-rt").display = False
        self.query_one("#plan-reasons", Static).update("")
        self._can_apply(False)

    def showing(self, text: str) -> bool:
        """The result line says ``text`` now."""
        return str(self.query_one("#plan-result", Static).content) == text

    def show_running(self, text: str) -> None:
        """A plan is being made: what it is doing now (the Stop button is shown)."""
        stop = self.query_one("#plan-stop", Button)
        if stop.disabled:
            self.show_message(text)
            stop.disabled = False
            stop.display = True
            self.refresh_bindings()         # Escape: shown in the key strip while planning
            return
        res = self.query_one("#plan-result", Static)
        if str(res.content) != text:
            res.update(text)

    def show_idle(self) -> None:
        """No plan is being made (the Stop button is hidden)."""
        stop = self.query_one("#plan-stop", Button)
        stop.disabled = True
        stop.display = False
        self.refresh_bindings()

    def mark_stale(self) -> None:
        res = self.query_one("#plan-result", Static)
        text = str(res.content)
        if text and not text.startswith("(The room changed"):
            res.update("(The room changed since this plan: press r to plan again.)\n" + text)
            self._can_apply(False)

    # ------------------------------------------------------------------ upward
    def action_toggle(self) -> None:
        g = self.query_one("#plan-candidates", CellGrid)
        if not g.row_count:
            return
        name = self._names[g.cursor_row]
        row = g.get_row_at(g.cursor_row)
        if row[0] == "applied":
            # Built into the room already: the plan leaves it out whatever its tick.
            self.notify(f"'{name}' is applied to the room already; set Applied to no in "
                        "tab 6 to plan it again.")
            return
        if name in self.disabled_names:
            self.disabled_names.discard(name)
        else:
            self.disabled_names.add(name)
        row[0] = "[ ]" if name in self.disabled_names else "[x]"
        rows = [g.get_row_at(i) for i in range(g.row_count)]
        rows[g.cursor_row] = row
        g.set_rows(rows, keys=self._names)

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "apply":           # a applies a plan that is shown and can be applied
            apply = self.query("#plan-apply")
            return bool(apply) and not apply.first().disabled
        if action == "stop":            # Escape stops a plan; with none running it is left free
            stop = self.query("#plan-stop")
            # False, not None: a disabled binding would still hide the screen's Escape
            # (leave the field) from the key line.
            return bool(stop) and bool(stop.first().display)
        return True

    def _can_apply(self, can: bool) -> None:
        """Enable Apply (its button and the key a) or not."""
        self.query_one("#plan-apply", Button).disabled = not can
        self.refresh_bindings()

    def action_apply(self) -> None:
        self.post_message(self.Apply())

    def action_stop(self) -> None:
        self.post_message(self.Stop())

    def action_run(self) -> None:
        self.post_message(self.Run({n for n in self._names if n not in self.disabled_names}))

    def on_input_submitted(self, event: Input.Submitted) -> None:
        if event.input.id != "plan-own":
            return
        event.stop()
        # The text goes up as typed; the core's rule checks it (roomcalc.study.edits) and
        # the screen shows its message here (show_own_error).
        self.show_own_error("")
        self.post_message(self.TargetChanged("rt60_max", event.value))
        # Enter leaves the field for the list of treatments (or the Plan button), where r
        # plans: r typed next went into the field. A limit refused brings the focus back.
        grid = self.query_one("#plan-candidates", CellGrid)
        (grid if grid.row_count else self.query_one("#plan-run", Button)).focus()

    def show_own_error(self, text: str) -> None:
        err = self.query_one("#plan-own-error", Static)
        err.update(text)
        err.display = bool(text)
        if text:
            self.query_one("#plan-own", Input).focus()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        if event.button.id == "plan-run":
            self.action_run()
        elif event.button.id == "plan-apply":
            self.post_message(self.Apply())
        elif event.button.id == "plan-stop":
            self.action_stop()

    def on_select_changed(self, event: Select.Changed) -> None:
        event.stop()
        key = {"plan-criterion": "criterion", "plan-method": "method",
               "plan-objective": "objective"}.get(event.select.id)
        # Only the user's own choices are edits: a Select also reports the value it starts
        # with, and values set from the room file.
        if key is None or event.value is Select.NULL or self._shown is None \
                or self._shown.get(key) == str(event.value):
            return
        self._shown[key] = str(event.value)
        self.post_message(self.TargetChanged(key, str(event.value)))
