"""The main screen: the room's tables on the left, what it does on the right, the warnings
strip at the bottom. It owns the document; every edit goes through it and is recomputed.

This module lays the screen out and routes: what a table's cells say is in
``roomcalc.tui.columns``, each result tab is a view widget (``widgets/views.py``) told what to
show, the edits from the tables and the Plan tab's messages are handled in ``edit_routes`` and
``plan_routes``, where the keys go in ``key_routes``, and the files (save, open, new) and
help are the app's actions."""

from __future__ import annotations

import time

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.reactive import reactive
from textual.css.query import NoMatches
from textual.screen import Screen
from textual.widgets import Static, TabbedContent, TabPane

from roomcalc.engine.analysis import RoomResult
from roomcalc.io.catalog import Catalog
from roomcalc.io.errors import RoomFileError
from roomcalc.present import sections
from roomcalc.present.places import TABLE_TITLES, problem_on_screen
from roomcalc.study import Answer, Study
from roomcalc.study.distance import distance_picture
from roomcalc.tui.columns import RecordColumns
from roomcalc.tui.document import Document
from roomcalc.tui.screens.edit_routes import EditRoutes
from roomcalc.tui.screens.key_routes import KeyRoutes, toggle_class
from roomcalc.tui.screens.plan_routes import PlanRoutes
from roomcalc.tui.widgets.deferred import Deferred
from roomcalc.tui.widgets.keystrip import KeyStrip
from roomcalc.tui.widgets.plan_view import PlanView
from roomcalc.tui.widgets.record_table import RecordTable
from roomcalc.tui.widgets.results import FindingsStrip
from roomcalc.tui.widgets.room_form import RoomForm
from roomcalc.tui.widgets.views import (CompareView, DistanceView, ReceiversView, ResultView,
                                        ReverbView)

EDIT_TABS = ("room", "surfaces", "objects", "sources", "receivers", "candidates")
TAB_TITLES = {"candidates": "Treatments"}
ROW_HELP = ("Enter: edit cell   a: add   c: copy   x: delete   m: material (or typical source)   "
            "Ctrl+Up/Down: move   Escape in a field: leave it")
# The result tabs, their titles and the widget each shows its result in.
VIEW_TITLES = {"v-reverb": "Reverberation", "v-distance": "Level vs distance",
               "v-receivers": "Receivers", "v-compare": "Before/after"}
VIEW_IDS = {"v-reverb": "#reverb-view", "v-distance": "#distance-view",
            "v-receivers": "#receivers-view", "v-compare": "#compare-view",
            "v-plan": "#plan-view"}


class MainScreen(EditRoutes, PlanRoutes, KeyRoutes, Screen):
    """Edit a room and watch what it does. ``document`` is the one piece of state; every
    change to it goes through :meth:`apply` (with undo) and then :meth:`recompute`."""

    BINDINGS = [
        Binding("ctrl+z", "undo", "Undo", id="main.undo"),
        Binding("ctrl+y", "redo", "Redo", id="main.redo"),
        Binding("ctrl+s", "app.save", "Save", id="main.save"),
        Binding("f2", "app.save_as", "Save as", show=False, id="main.save_as"),
        Binding("ctrl+o", "app.open", "Open", show=False, id="main.open"),
        Binding("ctrl+n", "app.new", "New", show=False, id="main.new"),
        Binding("p", "pin", "Pin before", id="main.pin"),
        Binding("m", "material", "Material", show=False, id="main.material"),
        Binding("b", "toggle_model", "Reverb model", show=False, id="main.model"),
        Binding("f1,question_mark", "app.help", "Help", id="main.help"),
        Binding("ctrl+e", "findings", "All findings", show=False, id="main.findings"),
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
        # Typing in a field types; Escape leaves the field for its tab bar, where the one-key
        # shortcuts work again, and Down goes from a tab bar into its tab.
        Binding("escape", "leave_field", "Leave the field", id="main.leave_field"),
        Binding("down", "enter_tab", "Into the tab", show=False, id="main.enter_tab"),
        # r plans while the Plan tab is shown, wherever the focus is (but in a field).
        Binding("r", "plan_run", "Plan", show=False, id="main.plan_run"),
    ]

    # repaint=False: a reactive on the screen would otherwise repaint the whole screen on each
    # change; the widgets that show the result refresh themselves.
    result: reactive[RoomResult | None] = reactive(None, init=False, repaint=False)

    def __init__(self, document: Document, catalog: Catalog) -> None:
        super().__init__()
        self.document = document
        self.catalog = catalog
        self.columns = RecordColumns(catalog, lambda: self.document.spec)
        self.problems: list[str] = []
        self.stale = False
        self.pinned: RoomResult | None = None
        self.answer: Answer | None = None      # the last valid answer (with self.result)
        self.reverberant_model = "classic"
        self.last_update_s = 0.0       # engine + check time of the last recompute [s]
        self._unparsed: dict[str, str] = {}    # room-form fields holding text, not a number
        self._needs_form_refresh = False       # the next change rewrites the room form too
        self._record_tables: dict[str, RecordTable] = {}     # by collection, mounted or not
        self._columns_units = document.spec.units  # the units the tables' columns are for
        self._form_dirty = False               # the room form waits for its tab to be shown
        self._tables_dirty: set[str] = set()   # tables waiting for their tab to be shown
        self._views_dirty: set[str] = set()    # result tabs waiting to be shown
        self._tables_drawn = False
        self._criteria = None                  # the criteria library, read when first needed
        self._plan_run = None                  # the plan last made (roomcalc.study.PlanRun)
        self._plan_version = -1                # the room version it was made for
        self._plan_job = None                  # the plan being made (plan_routes.PlanJob)
        self._plan_applied_at = None           # the room state the "plan applied" line is for
        self.room_version = 0                  # counted up by every recompute

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
                            table = RecordTable(coll, self.columns.of(coll),
                                                help_text=ROW_HELP,
                                                describe=self.columns.describe, id=f"t-{coll}")
                            self._record_tables[coll] = table
                            yield table if coll == "surfaces" else Deferred(table)
            with Vertical(id="right"):
                with TabbedContent(id="view"):
                    with TabPane(VIEW_TITLES["v-reverb"], id="v-reverb"):
                        yield ReverbView(id="reverb-view")
                    with TabPane(VIEW_TITLES["v-distance"], id="v-distance"):
                        yield Deferred(DistanceView(id="distance-view"))
                    with TabPane(VIEW_TITLES["v-receivers"], id="v-receivers"):
                        yield Deferred(ReceiversView(id="receivers-view"))
                    with TabPane(VIEW_TITLES["v-compare"], id="v-compare"):
                        yield Deferred(CompareView(id="compare-view"))
                    with TabPane("Plan", id="v-plan"):
                        yield Deferred(Vertical(PlanView(id="plan-view"), classes="pane-body"))
        yield FindingsStrip(id="findings")
        yield KeyStrip(id="keys")


    def on_mount(self) -> None:
        self._refresh_all()
        self.recompute()
        self.query_one("#t-surfaces #table").focus()
        self._layout_for(self.app.size.width)

    def on_resize(self, event) -> None:
        self._layout_for(event.size.width)

    def on_unmount(self) -> None:
        self.stop_plan(None, notify=False)    # closing: the planner stops at its next step

    def _layout_for(self, width: int) -> None:
        narrow = width < 110
        toggle_class(self, narrow, "narrow")
        # The room's six tabs with their digits need about 70 columns: side by side, a
        # narrower left half shows the titles alone (1-6 still switch; the help says so), so
        # that the sixth, Treatments, is not hidden off the edge.
        digits = narrow or width * 0.45 >= 70
        if digits != getattr(self, "_tab_digits", None) and self._opt("#edit") is not None:
            self._tab_digits = digits
            edit = self.query_one("#edit", TabbedContent)
            edit.set_class(not digits, "short-tabs")
            for n, coll in enumerate(EDIT_TABS, 1):
                title = TAB_TITLES.get(coll, coll.capitalize())
                edit.get_tab(coll).label = f"{n} {title}" if digits else title


    # ------------------------------------------------------------------ tables and title
    def _refresh_tables(self, every: bool = False) -> None:
        """Redraw the table of the visible tab (the others when they are shown)."""
        nb = len(self.document.spec.bands)
        if self.document.spec.units != self._columns_units:
            # Other units: other headings and keys (a cost per m^2 or per ft^2), in every
            # table, shown or not yet mounted.
            self._columns_units = self.document.spec.units
            for coll, table in self._record_tables.items():
                table.set_columns(self.columns.of(coll))
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
                self.columns.index_surfaces(items)
            t.set_records(items)
        self._tables_drawn = True

    def _refresh_all(self) -> None:
        form = self._opt("#room-form", RoomForm)
        self._form_dirty = form is None
        if form is not None:
            form.show(self.document.spec)
        self._refresh_tables()
        self.show_title()

    def show_title(self) -> None:
        """The title line (file name, "(modified)"); called after every change and save, so
        the Plan tab's status line is checked against the room here too."""
        self.forget_stale_plan_status()
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
        self.room_version += 1          # a plan made before this is not this room's
        unparsed = self._unparsed
        try:
            study = self.study
            room = study.check()
            result = study.evaluate(room)
            self.problems = [f"{k}: '{v}' is not a number" for k, v in unparsed.items()]
        except RoomFileError as exc:
            self.problems = [problem_on_screen(p, self.document.spec) for p in exc.problems]
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

    def action_findings(self) -> None:
        """Unfold the strip of errors, warnings and cautions (every item in full), or fold it."""
        self.query_one(FindingsStrip).toggle()

    def watch_result(self, result: RoomResult | None) -> None:
        self._show(result)

    def _show(self, res: RoomResult | None) -> None:
        self.columns.result, self.columns.stale = res, self.stale   # what cells are made of
        self.query_one(FindingsStrip).show(res, self.problems, self.stale and res is not None)
        self._show_table_problems()
        toggle_class(self.query_one("#right"), self.stale, "stale")   # a small subtree to restyle
        tabs = self.query_one("#view", TabbedContent)
        for pane_id, title in VIEW_TITLES.items():
            tab = tabs.get_tab(pane_id)
            label = title + (" (stale)" if self.stale and res is not None else "")
            if str(tab.label) != label:
                tab.label = label
        self._views_dirty = set(VIEW_IDS)
        if res is None:
            return
        self._show_view(tabs.active)
        self._refresh_tables()        # areas that fill the rest of a face come from the result
        self.show_title()

    def _view(self, pane: str):
        """The widget that shows a result tab, or None while it is not mounted yet."""
        view = self._opt(VIEW_IDS[pane]) if pane in VIEW_IDS else None
        return view if view is not None and view.is_mounted else None

    def _show_view(self, pane: str) -> None:
        """Draw one result tab (only the visible one is drawn after an edit)."""
        res = self.result
        if res is None or pane not in self._views_dirty:
            return
        view = self._view(pane)
        if view is None:
            return          # not mounted yet: drawn when it is
        self._views_dirty.discard(pane)
        if pane == "v-reverb":
            view.show(res, self.document.spec.unit_system, self.stale)
        elif pane == "v-distance":
            view.offer([s.name for s in res.sources], res.bands_hz)
            self._show_distance(view)
        elif pane == "v-receivers":
            try:
                days = self.current_answer().exposures if not self.stale else {}
            except (RoomFileError, ValueError):
                days = {}
            # Receivers with working hours: the daily exposure, with the caution.
            view.show(res, sections.exposure_text(days, width=0) if days else "")
        elif pane == "v-compare":
            self._show_compare()
        elif pane == "v-plan":
            self._show_plan_setup()

    @on(TabbedContent.TabActivated, "#view")
    def _view_shown(self, event: TabbedContent.TabActivated) -> None:
        if event.pane is not None:
            self._show_view(event.pane.id)

    @on(ResultView.Ready)
    def _view_ready(self, msg: ResultView.Ready) -> None:
        """A hidden result tab got mounted: drawn now if its tab is already shown."""
        msg.stop()
        active = self.query_one("#view", TabbedContent).active
        if VIEW_IDS.get(active) == f"#{msg.view.id}":
            self._show_view(active)

    @on(TabbedContent.TabActivated, "#edit")
    def _edit_tab_shown(self, event: TabbedContent.TabActivated) -> None:
        pane = event.pane.id if event.pane is not None else None
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
            mine = [p for p in self.problems if p.startswith(TABLE_TITLES[coll] + " row ")]
            t = self._opt(f"#t-{coll}", RecordTable)
            if t is not None:
                t.show_problems(mine)


    # ------------------------------------------------------------------ level vs distance
    def _show_distance(self, view: DistanceView) -> None:
        """The curves of the source and band picked in the view, with the receivers' levels
        from that source as points."""
        res = self.result
        src, band = view.choice
        if res is None or src not in [s.name for s in res.sources]:
            view.show_message("Add a source (Sources tab) to see level against distance")
            return
        pic = distance_picture(res, src, band)
        u = self.document.spec.unit_system
        view.show(pic.curves, pic.band_index, res.bands_hz, list(pic.points), u.length_label,
                  u.length, self.stale, src)

    @on(DistanceView.Chosen)
    def _distance_chosen(self, msg: DistanceView.Chosen) -> None:
        msg.stop()
        self._show_distance(msg.view)

    # ------------------------------------------------------------------ before / after
    def _show_compare(self) -> None:
        view = self._view("v-compare")
        if view is None:
            return
        if self.pinned is None or self.result is None:
            view.show_message()
            return
        if self.pinned.bands_hz != self.result.bands_hz:
            view.show_message("The bands changed since the pin; press p to pin again.")
            return
        try:
            after = self.result if self.result.method == self.pinned.method else \
                self._study.evaluate(self.result.room, method=self.pinned.method)
            cmp = Study.compare(self.pinned, after)
        except ValueError as exc:
            view.show_message(f"Cannot compare: {exc}")
            return
        view.show(cmp, self.stale)

    def action_pin(self) -> None:
        if self.result is None or self.stale:
            self.notify("Fix the room's problems first; only a valid room can be pinned.",
                        severity="warning")
            return
        self.pinned = self.result
        self._show_compare()
        self.notify("Pinned as 'before'. Edit the room and see the Before/after tab (F8).")


    # ------------------------------------------------------------------ edits
    def apply(self, fn, label: str, merge: str | None = None, *, form: bool = False) -> None:
        """Change the room (one undo step) and show it; ``form``: the room form too."""
        self.document.change(fn, label, merge)
        self._needs_form_refresh |= form
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
        self.show_title()
        self.app.schedule_recovery()

    # ------------------------------------------------------------------ actions
    def _say(self, text: str) -> None:
        """A short note that replaces the previous one (a pile of notes slows every redraw)."""
        self.app.clear_notifications()
        self.notify(text, markup=False, timeout=2)

    def action_toggle_model(self) -> None:
        self.reverberant_model = "barron-lee" if self.reverberant_model == "classic" \
            else "classic"
        self.notify("Reverberant level: " + ("Barron & Lee's revised theory"
                    if self.reverberant_model == "barron-lee" else "diffuse field, 4/R"))
        self.recompute()

    def replace_document(self, doc: Document) -> None:
        self.stop_plan("Plan stopped: another room was opened.", notify=False)
        self.document = doc
        self.pinned = None
        self._unparsed = {}
        self._refresh_all()
        self.recompute()

