"""The main screen: the room's tables on the left, what it does on the right, the warnings
strip at the bottom. It owns the document; every edit goes through it and is recomputed."""

from __future__ import annotations

import time

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.reactive import reactive
from textual.css.query import NoMatches
from textual.screen import Screen
from textual.widgets import Select, Static, TabbedContent, TabPane

from roomcalc.engine.analysis import METHOD_TITLES, RoomResult, distance_curves
from roomcalc.engine.bands import a_weighted_total
from roomcalc.engine.field import PLACEMENT_Q
from roomcalc.engine.model import FACES
from roomcalc.engine.spectra import SPECTRUM_SHAPES
from roomcalc.io.catalog import Catalog
from roomcalc.io.errors import RoomFileError
from roomcalc.present import sections
from roomcalc.study import Answer, Study
from roomcalc.study.edits import change_bands, convert_units, set_item_fields, set_method
from roomcalc.tui.document import Document
from roomcalc.tui.messages import FieldEdited, MaterialWanted, RowAction
from roomcalc.tui.widgets.deferred import Deferred
from roomcalc.tui.widgets.keystrip import KeyStrip
from roomcalc.tui.widgets.plan_view import PlanView
from roomcalc.tui.widgets.plots import DistancePlot, RtPlot
from roomcalc.tui.widgets.record_table import Column, RecordTable
from roomcalc.tui.widgets.results import CompareTable, FindingsStrip, ReceiverTable, ReverbTable
from roomcalc.tui.widgets.room_form import RECOMMENDED, RoomForm, Unparsed

EDIT_TABS = ("room", "surfaces", "objects", "sources", "receivers", "candidates")
TAB_TITLES = {"candidates": "Treatments"}
ROW_HELP = "Enter: edit cell   a: add   c: copy   x: delete   Ctrl+Up/Down: move   m: material"


class MainScreen(Screen):
    """Edit a room and watch what it does. ``document`` is the one piece of state; every
    change to it goes through :meth:`apply` (with undo) and then :meth:`recompute`."""

    BINDINGS = [
        Binding("ctrl+z", "undo", "Undo", id="main.undo"),
        Binding("ctrl+y", "redo", "Redo", id="main.redo"),
        Binding("ctrl+s", "save", "Save", id="main.save"),
        Binding("f2", "save_as", "Save as", show=False, id="main.save_as"),
        Binding("ctrl+o", "open", "Open", show=False, id="main.open"),
        Binding("ctrl+n", "new", "New", show=False, id="main.new"),
        Binding("p", "pin", "Pin before", id="main.pin"),
        Binding("m", "material", "Material", show=False, id="main.material"),
        Binding("b", "toggle_model", "Reverb model", show=False, id="main.model"),
        Binding("f1,question_mark", "help", "Help", id="main.help"),
        Binding("1", "edit_tab('room')", "Room", show=False, id="main.tab.room"),
        Binding("2", "edit_tab('surfaces')", "Surfaces", show=False, id="main.tab.surfaces"),
        Binding("3", "edit_tab('objects')", "Objects", show=False, id="main.tab.objects"),
        Binding("4", "edit_tab('sources')", "Sources", show=False, id="main.tab.sources"),
        Binding("5", "edit_tab('receivers')", "Receivers", show=False, id="main.tab.receivers"),
        Binding("6", "edit_tab('candidates')", "Treatments", show=False,
                id="main.tab.candidates"),
        Binding("f5", "view_tab('v-reverb')", "Reverb", show=False, id="main.view.reverb"),
        Binding("f6", "view_tab('v-distance')", "Distance", show=False, id="main.view.distance"),
        Binding("f7", "view_tab('v-receivers')", "Levels", show=False, id="main.view.levels"),
        Binding("f8", "view_tab('v-compare')", "Before/after", show=False,
                id="main.view.compare"),
        Binding("f9", "view_tab('v-plan')", "Plan", show=False, id="main.view.plan"),
    ]

    # repaint=False: a reactive on the screen would otherwise repaint the whole screen on each
    # change; the widgets that show the result refresh themselves.
    result: reactive[RoomResult | None] = reactive(None, init=False, repaint=False)

    def __init__(self, document: Document, catalog: Catalog) -> None:
        super().__init__()
        self.document = document
        self.catalog = catalog
        self.problems: list[str] = []
        self.stale = False
        self.pinned: RoomResult | None = None
        self.answer: Answer | None = None      # the last valid answer (with self.result)
        self.reverberant_model = "classic"
        self.last_update_s = 0.0       # engine + check time of the last recompute [s]
        self._unparsed: dict[str, str] = {}    # room-form fields holding text, not a number
        self._needs_form_refresh = False       # the next change rewrites the room form too
        self._form_dirty = False               # the room form waits for its tab to be shown
        self._tables_dirty: set[str] = set()   # tables waiting for their tab to be shown
        self._views_dirty: set[str] = set()    # result tabs waiting to be shown
        self._surface_index: dict[int, int] = {}   # id(surface spec) -> its row
        self._tables_drawn = False
        self._catalog_values: dict[tuple, str] = {}   # (material id, bands) -> its alphas
        self._criteria = None                  # the criteria library, read when first needed
        self._plan_run = None                  # the plan last made (roomcalc.study.PlanRun)
        self._controls_key = None              # sources and bands the distance selects show

    # ------------------------------------------------------------------ layout
    def compose(self) -> ComposeResult:
        yield Static("", id="titlebar", markup=False)
        with Horizontal(id="body"):
            with Vertical(id="left"):
                with TabbedContent(id="edit", initial="surfaces"):
                    # Hidden tabs are mounted just after the first screen is drawn (Deferred), so
                    # the room appears sooner; each is filled when it is first shown.
                    with TabPane("1 Room", id="room"):
                        yield Deferred(RoomForm(id="room-form"))
                    for coll in EDIT_TABS[1:]:
                        with TabPane(f"{EDIT_TABS.index(coll) + 1} "
                                     f"{TAB_TITLES.get(coll, coll.capitalize())}",
                                     id=coll):
                            table = RecordTable(coll, self._columns(coll), help_text=ROW_HELP,
                                                describe=self._describe, id=f"t-{coll}")
                            yield table if coll == "surfaces" else Deferred(table)
            with Vertical(id="right"):
                with TabbedContent(id="view"):
                    with TabPane("Reverberation", id="v-reverb"):
                        yield ReverbTable(id="reverb-table")
                        yield RtPlot(id="rt-plot")
                    with TabPane("Level vs distance", id="v-distance"):
                        yield Deferred(Vertical(
                            Horizontal(Select([], prompt="source", id="dist-source",
                                              allow_blank=True),
                                       Select([], prompt="band", id="dist-band",
                                              allow_blank=True),
                                       id="distance-controls"),
                            DistancePlot(id="distance-plot"), classes="pane-body"))
                    with TabPane("Receivers", id="v-receivers"):
                        yield Deferred(Vertical(ReceiverTable(id="receiver-table"),
                                            Static("", id="receiver-note"),
                                            classes="pane-body"))
                    with TabPane("Before/after", id="v-compare"):
                        yield Deferred(Vertical(Static("", id="compare-head"),
                                            CompareTable(id="compare-table"),
                                            Static("", id="compare-notes", markup=False),
                                            classes="pane-body"))
                    with TabPane("Plan", id="v-plan"):
                        yield Deferred(Vertical(PlanView(id="plan-view"), classes="pane-body"))
        yield FindingsStrip(id="findings")
        yield KeyStrip(id="keys")

    def _columns(self, coll: str) -> list[Column]:
        nb = len(self.document.spec.bands)
        if coll == "surfaces":
            return [Column("name", "Name", optional=False),
                    Column("face", "Face", "choice", choices=FACES, hint=", ".join(FACES)),
                    Column("area", "Area", "number", show=self._show_area, width=8,
                           hint="empty: the rest of its face"),
                    Column("count", "n", "int", optional=False, hint="identical surfaces"),
                    Column("material", "Material", "material", show=self._show_material),
                    Column("alpha", "alpha per band", "numbers", length=nb,
                           show=self._show_alpha, hint="one per band; typing here drops the "
                           "material")]
        if coll == "objects":
            return [Column("name", "Name", optional=False),
                    Column("count", "Count", "number", optional=False),
                    Column("material", "Kind", "material", show=self._show_material),
                    Column("absorption", "m^2 per unit, per band", "numbers", length=nb,
                           show=self._show_absorption)]
        if coll == "sources":
            return [Column("name", "Name", optional=False),
                    Column("sound_power", "Lw per band [dB]", "numbers", length=nb),
                    Column("sound_power_dba", "LwA [dB(A)]", "number"),
                    Column("spectrum", "Spectrum", "choice", choices=tuple(SPECTRUM_SHAPES),
                           hint=", ".join(SPECTRUM_SHAPES)),
                    Column("directivity", "Q", "number", show=self._show_q),
                    Column("placement", "Placement", "choice", choices=tuple(PLACEMENT_Q),
                           hint="free, surface, edge, corner"),
                    Column("position", "Position x y z", "position")]
        if coll == "candidates":
            area = self.document.spec.unit_system.area_label
            return [Column("name", "Name", optional=False),
                    Column("surface", "Covers surface", "text",
                           hint="a surface's name; empty: added as units"),
                    Column("material", "Material", "material", show=self._show_material),
                    Column("alpha", "alpha (cover)", "numbers", length=nb,
                           show=lambda r: self._show_alpha(r) if r.surface else "",
                           hint="one per band; typing here drops the material"),
                    Column("absorption", f"{area} per unit", "numbers", length=nb,
                           show=lambda r: "" if r.surface else self._show_absorption(r),
                           hint="units: absorption area per unit"),
                    Column("max_area", f"Up to [{area}]", "number",
                           hint="cover: empty = the whole surface"),
                    Column("max_count", "Up to [units]", "number", hint="units"),
                    Column("cost_per_m2" if self.document.spec.units == "metric"
                           else "cost_per_ft2", f"Cost per {area}", "number"),
                    Column("cost_each", "Cost each", "number"),
                    Column("step", f"Panel [{area}]", "number",
                           hint="cover: whole panels of this area, e.g. 0.72")]
        return [Column("name", "Name", optional=False),
                Column("position", "Position x y z", "position"),
                Column("distances", "Distances to sources", "distances",
                       hint="Source=3.2, Other=5"),
                Column("hours", "Hours/day", "number",
                       hint="working pattern: hours per day here (for daily exposure)"),
                Column("source_hours", "Source hours", "distances",
                       hint="hours each source runs meanwhile: Saw=2, Planer=1")]

    def on_mount(self) -> None:
        self._refresh_all()
        self.recompute()
        self.query_one("#t-surfaces #table").focus()
        self._layout_for(self.app.size.width)

    def on_resize(self, event) -> None:
        self._layout_for(event.size.width)

    def _layout_for(self, width: int) -> None:
        _toggle(self, width < 110, "narrow")

    # ------------------------------------------------------------------ showing the spec
    def _show_material(self, rec) -> str:
        if rec.material:
            return rec.material
        return "(own values)" if (getattr(rec, "alpha", None) or
                                  getattr(rec, "absorption", None)) else ""

    def _values_of(self, rec, own):
        bands = self.document.spec.bands
        if rec.material:
            key = (rec.material, bands)
            text = self._catalog_values.get(key)
            if text is not None:
                return text
            m = self.catalog.get(rec.material)
            if m is None:
                m = next((x for x in self.document.spec.materials if x.id == rec.material), None)
            if m is None:
                return "unknown material"
            text = " ".join(f"{m.values[b]:.2f}" if b in m.values else "?" for b in bands)
            if self.catalog.get(rec.material) is m:       # the catalogue does not change
                self._catalog_values[key] = text
            return text
        return " ".join(f"{x:.2f}" for x in own) if own else ""

    def _describe(self, coll: str, rec) -> str:
        """One line about the highlighted row, under its table."""
        u = self.document.spec.unit_system
        if coll in ("surfaces", "objects"):
            own = rec.alpha if coll == "surfaces" else rec.absorption
            what = "alpha" if coll == "surfaces" else f"{u.area_label} per unit"
            if rec.material:
                m = self.catalog.get(rec.material)
                name = m.name if m else "not in the catalogue"
                return f"{rec.name}: {name}; {what} {self._values_of(rec, own)}"
            return f"{rec.name}: own values; {what} {self._values_of(rec, own)}"
        if coll == "candidates":
            if rec.surface:
                what = (f"covers up to {rec.max_area:g} {u.area_label} of '{rec.surface}'"
                        if rec.max_area is not None else f"may cover all of '{rec.surface}'")
                values = f"alpha {self._values_of(rec, rec.alpha)}"
            else:
                what = ("added as units" + (f", up to {rec.max_count:g}"
                                            if rec.max_count is not None else ""))
                values = f"{u.area_label} per unit {self._values_of(rec, rec.absorption)}"
            return f"{rec.name}: {what}; {values}"
        if coll == "sources":
            lw = " ".join(f"{x:g}" for x in rec.sound_power) if rec.sound_power else \
                f"{rec.sound_power_dba} dB(A), {rec.spectrum} spectrum"
            return f"{rec.name}: Lw {lw}; Q {self._show_q(rec).strip('()')}"
        res = self.result
        if res is not None:
            r = next((x for x in res.receivers if x.name == rec.name), None)
            if r is not None:
                return f"{rec.name}: {r.level_dba:.1f} dB(A) (direct {r.direct_dba:.1f}, " \
                       f"reverberant {r.reverberant_dba:.1f})"
        return rec.name

    def _show_alpha(self, rec) -> str:
        return self._values_of(rec, rec.alpha)

    def _show_absorption(self, rec) -> str:
        return self._values_of(rec, rec.absorption)

    def _show_q(self, rec) -> str:
        if rec.directivity is not None:
            return f"{rec.directivity:g}"
        return f"({PLACEMENT_Q[rec.placement or 'surface']:g})"

    def _show_area(self, rec) -> str:
        if rec.area is not None:
            return f"{rec.area:g}"
        res = self.result
        i = self._surface_index.get(id(rec))
        if res is not None and not self.stale and i is not None and i < len(res.room.surfaces):
            return f"({res.room.surfaces[i].area / self.document.spec.unit_system.area:.2f})"
        return "(rest)"

    def _refresh_tables(self, every: bool = False) -> None:
        """Redraw the table of the visible tab (the others when they are shown)."""
        nb = len(self.document.spec.bands)
        active = self.query_one("#edit", TabbedContent).active
        self._tables_dirty = set(EDIT_TABS[1:])
        for coll in EDIT_TABS[1:]:
            if not every and coll != active:
                continue
            t = self._opt(f"#t-{coll}", RecordTable)
            if t is None:
                continue
            self._tables_dirty.discard(coll)
            for c in t.columns:
                if c.kind == "numbers":
                    c.length = nb
            items = self.document.items(coll)
            if coll == "surfaces":
                self._surface_index = {id(rec): i for i, rec in enumerate(items)}
            t.set_records(items)
        self._tables_drawn = True

    def _refresh_all(self) -> None:
        form = self._opt("#room-form", RoomForm)
        self._form_dirty = form is None
        if form is not None:
            form.show(self.document.spec)
        self._refresh_tables()
        self._title()

    def _title(self) -> None:
        doc = self.document
        title = f"roomcalc - {doc.spec.title or 'untitled room'}"
        sub = f"{doc.path if doc.path else doc.name}" + ("  (modified)" if doc.modified else "")
        # Our own title line: App.title and App.sub_title are reactives that repaint the whole
        # screen, which an edit that only flips "(modified)" should not cost.
        if self.app.title != title:
            self.app.title = title          # the terminal window's title
        line = f"{title}  -  {sub}"
        bar = self.query_one("#titlebar", Static)
        if str(bar.content) != line:
            bar.update(line, layout=False)

    # ------------------------------------------------------------------ computing
    @property
    def study(self) -> Study:
        """The core's view of the room being edited (the document's spec as it is now)."""
        doc = self.document
        return Study(doc.spec, self.catalog,
                     criteria=self.criteria if doc.spec.target is not None else None,
                     filename=doc.name, reverberant_model=self.reverberant_model)

    def recompute(self) -> None:
        """Check the room as a file would be checked, evaluate it, and show the result. On a
        problem the last valid result stays, marked stale."""
        t0 = time.perf_counter()
        unparsed = self._unparsed
        try:
            study = self.study
            room = study.check()
            result = study.evaluate(room)
            self.problems = [f"{k}: '{v}' is not a number" for k, v in unparsed.items()]
        except RoomFileError as exc:
            self.problems = [f"{p.where}: {p.message}" if p.where else p.message
                             for p in exc.problems]
            self.problems += [f"{k}: '{v}' is not a number" for k, v in unparsed.items()]
            result = None
        except ValueError as exc:
            self.problems = [str(exc)]
            result = None
        self.last_update_s = time.perf_counter() - t0
        self.stale = bool(self.problems)
        if result is not None:
            self.answer = None          # the target and exposure are made when shown
            self._study = study
            self.result = result          # the watch method shows it
        else:
            self._show(self.result)

    def current_answer(self) -> Answer:
        """The answer of the last valid room: its target check and daily exposure, made when
        first asked for after an edit. Raises RoomFileError or ValueError when the target
        cannot be judged (an unknown criterion, one that does not apply)."""
        if self.answer is None or self.answer.result is not self.result:
            self.answer = self._study.answer(result=self.result)
        return self.answer

    def watch_result(self, result: RoomResult | None) -> None:
        self._show(result)

    def _show(self, res: RoomResult | None) -> None:
        self.query_one(FindingsStrip).show(res, self.problems, self.stale and res is not None)
        self._show_table_problems()
        _toggle(self.query_one("#right"), self.stale, "stale")   # a small subtree to restyle
        for pane_id, title in (("v-reverb", "Reverberation"), ("v-distance", "Level vs distance"),
                               ("v-receivers", "Receivers"), ("v-compare", "Before/after")):
            tab = self.query_one("#view", TabbedContent).get_tab(pane_id)
            label = title + (" (stale)" if self.stale and res is not None else "")
            if str(tab.label) != label:
                tab.label = label
        self._views_dirty = {"v-reverb", "v-distance", "v-receivers", "v-compare", "v-plan"}
        if res is None:
            return
        self._show_view(self.query_one("#view", TabbedContent).active)
        self._refresh_tables()        # areas that fill the rest of a face come from the result
        self._title()

    def _show_view(self, pane: str) -> None:
        """Draw one result tab (only the visible one is drawn after an edit)."""
        res = self.result
        if res is None or pane not in self._views_dirty:
            return
        if pane != "v-reverb" and self._opt(f"#{pane} .pane-body") is None:
            return          # not mounted yet: drawn when it is
        self._views_dirty.discard(pane)
        if pane == "v-reverb":
            self.query_one(ReverbTable).show(res, self.document.spec.unit_system)
            self.query_one(RtPlot).show(res, self.stale)
        elif pane == "v-distance":
            self._fill_distance_controls(res)
            self._show_distance()
        elif pane == "v-receivers":
            self.query_one(ReceiverTable).show(res)
            note = "" if res.receivers else ("No receivers with sources yet: add them in the "
                                             "Sources and Receivers tabs.")
            try:
                days = self._study.answer(result=res).exposures if not self.stale else {}
            except (RoomFileError, ValueError):
                days = {}
            if days:        # receivers with working hours: the daily exposure, with the caution
                note = (note + "\n" if note else "") + sections.exposure_text(days, width=0)
            self.query_one("#receiver-note", Static).update(note)
        elif pane == "v-compare":
            self._show_compare()
        elif pane == "v-plan":
            self._show_plan_setup()

    def on_tabbed_content_tab_activated(self, event: TabbedContent.TabActivated) -> None:
        pane = event.pane.id if event.pane is not None else None
        if event.tabbed_content.id == "view":
            self._show_view(pane)
        elif event.tabbed_content.id == "edit":
            if pane in self._tables_dirty:
                self._refresh_tables()
                self._show_table_problems()
            if pane == "room" and self._form_dirty:
                self._refresh_all()

    def _opt(self, selector: str, kind=None):
        """The widget, or None while its tab is not mounted yet."""
        try:
            return self.query_one(selector, kind) if kind else self.query_one(selector)
        except NoMatches:
            return None

    def _show_table_problems(self) -> None:
        for coll in EDIT_TABS[1:]:
            mine = [p for p in self.problems if p.startswith(coll + "[")]
            t = self._opt(f"#t-{coll}", RecordTable)
            if t is not None:
                t.show_problems(mine)

    # ------------------------------------------------------------------ level vs distance
    def _fill_distance_controls(self, res: RoomResult) -> None:
        src = self.query_one("#dist-source", Select)
        band = self.query_one("#dist-band", Select)
        names = [s.name for s in res.sources]
        key = (tuple(names), res.bands_hz)
        if self._controls_key == key:
            return
        self._controls_key = key
        with self.prevent(Select.Changed):
            old = src.value
            src.set_options([(Text(n), n) for n in names])     # a name is not markup
            if names:
                src.value = old if old in names else names[0]
            oldb = band.value
            opts = [("dB(A)", "dBA")] + [(f"{b:g} Hz", str(b)) for b in res.bands_hz]
            band.set_options(opts)
            band.value = oldb if oldb in [o[1] for o in opts] else "dBA"

    def on_select_changed(self, event: Select.Changed) -> None:
        if event.select.id in ("dist-source", "dist-band"):
            self._show_distance()

    def _show_distance(self) -> None:
        res = self.result
        plot = self.query_one(DistancePlot)
        src = self.query_one("#dist-source", Select).value
        if res is None or not isinstance(src, str) or src not in [s.name for s in res.sources]:
            plot.show_message("Add a source (Sources tab) to see level against distance")
            return
        bval = self.query_one("#dist-band", Select).value
        bi = None if bval in ("dBA", Select.NULL) else list(res.bands_hz).index(int(bval))
        curves = distance_curves(res, src, points=120)
        pts = []
        for r in res.receivers:
            lev = r.per_source_db[src]
            level = float(a_weighted_total(lev, res.bands_hz)) if bi is None else float(lev[bi])
            pts.append((r.name, r.distances_m[src], level))
        u = self.document.spec.unit_system
        plot.show(curves, bi, res.bands_hz, pts, u.length_label, u.length, self.stale, src)

    # ------------------------------------------------------------------ treatment plan
    @property
    def criteria(self) -> dict:
        if self._criteria is None:
            from roomcalc.io.criteria import load_criteria

            try:
                self._criteria = load_criteria()
            except RoomFileError as exc:
                self.notify("Criteria library: " + "; ".join(str(p) for p in exc.problems[:3]),
                            severity="error", markup=False)
                self._criteria = {}
        return self._criteria

    def _show_plan_setup(self) -> None:
        view = self._opt("#plan-view", PlanView)
        if view is None:
            return
        u = self.document.spec.unit_system
        view.show_setup(self.document.spec, self.criteria, u, u.area_label)
        check_text = ""
        if self.result is not None and not self.stale and self.document.spec.target is not None:
            try:
                check = self.current_answer().target
            except (RoomFileError, ValueError) as exc:
                check_text = f"Target: {getattr(exc, 'problems', [exc])[0]}"
            else:
                if check is not None:
                    check_text = "The room now:\n" + sections.target_text(
                        check, width=0, described=self.result)
        view.show_check(check_text)
        if self._plan_run is not None:
            view.mark_stale()

    def on_plan_view_target_changed(self, msg: PlanView.TargetChanged) -> None:
        msg.stop()
        from roomcalc.io.roomfile import TargetSpec

        key, value = msg.key, msg.value
        if key == "rt60_max":
            vals = [float(x) for x in value.split()]
            nb = len(self.document.spec.bands)
            if len(vals) not in (1, nb):
                self.query_one("#plan-view", PlanView).show_own_error(
                    f"{len(vals)} values: give one (every band) or {nb}, one per band.")
                return
            limit = vals[0] if len(vals) == 1 else vals

            def own(spec):
                if spec.target is None:
                    spec.target = TargetSpec()
                spec.target.criterion = None            # one or the other
                spec.target.rt60_max = limit
            self.apply(own, "target: own RT60 limit")
            return
        t = self.document.spec.target
        current = None if t is None else {
            "criterion": t.criterion or ("own" if (t.rt60_max is not None or
                                                   t.rt60_min is not None) else "none"),
            "method": self.document.spec.method_in_force or RECOMMENDED,
            "objective": t.plan_objective}[key]
        if value == current or (key == "criterion" and value == "own"):
            return

        def fn(spec):
            if spec.target is None:
                spec.target = TargetSpec()
            if key == "criterion":
                spec.target.criterion = None if value == "none" else value
                spec.target.rt60_max = spec.target.rt60_min = None   # one or the other
            elif key == "method":
                set_method(spec, None if value == RECOMMENDED else value)
            else:
                setattr(spec.target, key, value)
        self.apply(fn, f"target: {key} {value}")

    def on_plan_view_run(self, msg: PlanView.Run) -> None:
        msg.stop()
        view = self.query_one("#plan-view", PlanView)
        spec = self.document.spec
        if self.stale or self.result is None:
            view.show_message("Fix the room's problems first (see the strip below).")
            return
        if spec.target is None:
            view.show_message("Pick what the room must reach first (the first list above), or "
                              "give a [target] in the room file.")
            return
        try:
            run = self._study.plan(enabled=msg.enabled, result=self.result)
        except RoomFileError as exc:
            view.show_message("Cannot plan: " + "; ".join(
                f"{p.where}: {p.message}" if p.where else p.message for p in exc.problems))
            return
        except ValueError as exc:
            view.show_message(f"Cannot plan: {exc}")
            return
        self._plan_run = run
        u = spec.unit_system
        view.show_run(run, sections.plan_totals_text(run, u), u.area, u.area_label)

    def on_plan_view_apply(self, msg: PlanView.Apply) -> None:
        msg.stop()
        from dataclasses import fields

        run = self._plan_run
        if run is None:
            return
        treated = self._study.treated_spec(run)

        def fn(spec):
            for f in fields(spec):
                setattr(spec, f.name, getattr(treated, f.name))
        self._plan_run = None
        self.apply(fn, "apply the treatment plan")
        self.query_one("#plan-view", PlanView).show_message(
            "The plan is applied to the room (Ctrl+Z takes it back); press r to check it.")
        self._say("Plan applied to the room; Ctrl+Z takes it back.")

    # ------------------------------------------------------------------ before / after
    def _show_compare(self) -> None:
        head = self.query_one("#compare-head", Static)
        table = self.query_one(CompareTable)
        notes = self.query_one("#compare-notes", Static)
        if self.pinned is None or self.result is None:
            head.update("Press p to pin the room as it is now as \"before\"; then edit it "
                        "and compare here.")
            table.display = False
            notes.update("")
            return
        if self.pinned.bands_hz != self.result.bands_hz:
            head.update("The bands changed since the pin; press p to pin again.")
            table.display = False
            return
        try:
            after = self.result if self.result.method == self.pinned.method else \
                self._study.evaluate(self.result.room, method=self.pinned.method)
            cmp = Study.compare(self.pinned, after)
        except ValueError as exc:
            head.update(f"Cannot compare: {exc}")
            table.display = False
            return
        table.display = True
        table.show(cmp, cmp.method)
        head.update(f"Before: pinned room   After: the room now"
                    f"{'  (stale)' if self.stale else ''}   negative = shorter or quieter   "
                    f"RT60 by {METHOD_TITLES[cmp.method]} (in force before)")
        notes.update("\n".join(f"- {n}" for n in cmp.notes))

    def action_pin(self) -> None:
        if self.result is None or self.stale:
            self.notify("Fix the room's problems first; only a valid room can be pinned.",
                        severity="warning")
            return
        self.pinned = self.result
        self._show_compare()
        self.notify("Pinned as 'before'. Edit the room and see the Before/after tab (F8).")

    # ------------------------------------------------------------------ edits
    def apply(self, fn, label: str, merge: str | None = None) -> None:
        self.document.change(fn, label, merge)
        self.after_change()

    def after_change(self) -> None:
        if self._needs_form_refresh:
            form = self._opt("#room-form", RoomForm)
            self._form_dirty = form is None
            if form is not None:
                form.show(self.document.spec)
        self._needs_form_refresh = False
        self._tables_drawn = False
        self.recompute()                # a new result redraws the tables (areas come from it)
        if not self._tables_drawn:
            self._refresh_tables()
        self._title()
        self.app.schedule_recovery()

    def on_field_edited(self, msg: FieldEdited) -> None:
        msg.stop()
        if msg.collection == "room":
            self._edit_room(msg.key, msg.value)
            return
        coll, i = msg.collection, msg.index
        name = self.document.items(coll)[i].name
        verb = "rename" if msg.key == "name" else f"{coll[:-1]} '{name}': {msg.key}"
        self.apply(lambda spec: set_item_fields(spec, coll, i, {msg.key: msg.value}), verb
                   if msg.key != "name" else f"rename {coll[:-1]} '{name}'")

    def _edit_room(self, key: str, value) -> None:
        unparsed = self._unparsed
        if isinstance(value, Unparsed):
            unparsed[key] = str(value)
            self.recompute()
            return
        unparsed.pop(key, None)
        if key == "title":
            self.apply(lambda spec: setattr(spec, "title", value), "title", merge="title")
            return
        if key == "units":
            if value != self.document.spec.units:
                self._needs_form_refresh = True
                self.apply(lambda spec: convert_units(spec, value), f"units: {value}")
            return
        if key == "method":
            self.apply(lambda spec: set_method(spec, value), f"formula: {value or 'recommended'}")
            return
        if key == "bands_hz":
            notes: list[str] = []
            self.apply(lambda spec: notes.extend(change_bands(spec, value, self.catalog)),
                       "bands")
            if notes:
                self.notify("\n".join(notes), title="Bands changed", markup=False,
                            timeout=12)
            return
        group, name = key.split(".")
        if getattr(getattr(self.document.spec, group), name) == value:
            self.recompute()
            return
        self.apply(lambda spec: setattr(getattr(spec, group), name, value), f"{key}",
                   merge=key)

    def on_row_action(self, msg: RowAction) -> None:
        msg.stop()
        coll, act, i = msg.collection, msg.action, msg.index
        doc = self.document
        table = self.query_one(f"#t-{coll}", RecordTable)
        if act == "add":
            at = doc.add(coll, i)
        elif i is None:
            return
        elif act == "duplicate":
            at = doc.duplicate(coll, i)
        elif act == "delete":
            doc.delete(coll, i)
            at = max(0, i - 1)
        elif act in ("up", "down"):
            at = doc.move(coll, i, -1 if act == "up" else 1)
        else:
            return
        self.after_change()
        table.select_row(at)

    def on_material_wanted(self, msg: MaterialWanted) -> None:
        msg.stop()
        self._choose_material(msg.collection, msg.index)

    def action_material(self) -> None:
        tab = self.query_one("#edit", TabbedContent).active
        if tab in ("surfaces", "objects"):
            i = self.query_one(f"#t-{tab}", RecordTable).current_row
            if i is not None:
                self._choose_material(tab, i)

    def _choose_material(self, coll: str, i: int) -> None:
        from roomcalc.tui.screens.materials import MaterialChooser

        rec = self.document.items(coll)[i]
        surface_like = coll == "surfaces" or (coll == "candidates" and rec.surface)
        kind = "surface" if surface_like else "object"
        own = rec.alpha if surface_like else rec.absorption
        cat = self.catalog.with_materials(self.document.spec.materials) \
            if self.document.spec.materials else self.catalog

        def done(choice) -> None:
            if choice is None:
                return
            what, val = choice
            own_key = "alpha" if surface_like else "absorption"
            if what == "material":
                values = {"material": val, own_key: None}
            else:
                values = {"material": None, own_key: val}

            def fn(spec):
                item = getattr(spec, coll)[i]
                for k, v in values.items():
                    setattr(item, k, v)
            self.apply(fn, f"{coll[:-1]} '{rec.name}': material")
        self.app.push_screen(MaterialChooser(cat, kind, self.document.spec.bands, rec.material,
                                             own), done)

    # ------------------------------------------------------------------ actions
    def action_undo(self) -> None:
        label = self.document.undo()
        self._say(f"Undone: {label}" if label else "Nothing to undo.")
        self._after_history()

    def action_redo(self) -> None:
        label = self.document.redo()
        self._say(f"Redone: {label}" if label else "Nothing to redo.")
        self._after_history()

    def _say(self, text: str) -> None:
        """A short note that replaces the previous one (a pile of notes slows every redraw)."""
        self.app.clear_notifications()
        self.notify(text, markup=False, timeout=2)

    def _after_history(self) -> None:
        self._refresh_all()
        self.recompute()
        self.app.schedule_recovery()

    def action_toggle_model(self) -> None:
        self.reverberant_model = "barron-lee" if self.reverberant_model == "classic" \
            else "classic"
        self.notify("Reverberant level: " + ("Barron & Lee's revised theory"
                    if self.reverberant_model == "barron-lee" else "diffuse field, 4/R"))
        self.recompute()

    def action_edit_tab(self, tab: str) -> None:
        self.query_one("#edit", TabbedContent).active = tab
        if tab != "room":   # the table of the new tab takes the keys (the old one is hidden)
            self.call_after_refresh(self.query_one(f"#t-{tab} #table").focus)

    def action_view_tab(self, tab: str) -> None:
        self.query_one("#view", TabbedContent).active = tab
        if tab == "v-plan":         # its keys (r, Space) work where the focus is

            def focus():
                grid = self._opt("#plan-candidates")
                if grid is not None:
                    grid.focus()
            self.call_after_refresh(focus)

    def action_help(self) -> None:
        self.app.action_show_help_screen()

    def action_save(self) -> None:
        self.app.save_document()

    def action_save_as(self) -> None:
        self.app.save_document_as()

    def action_open(self) -> None:
        self.app.ask_open()

    def action_new(self) -> None:
        self.app.ask_new()

    def replace_document(self, doc: Document) -> None:
        self.document = doc
        self.pinned = None
        self._unparsed = {}
        self._refresh_all()
        self.recompute()


def _toggle(widget, on: bool, name: str) -> None:
    """Add or remove a class only when it changes (a change restyles the whole subtree)."""
    if widget.has_class(name) != on:
        widget.set_class(on, name)
