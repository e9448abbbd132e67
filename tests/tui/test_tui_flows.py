"""Flow tests: open an example room, edit it with the keyboard as a user would, and check the
numbers the screen shows against the engine run on the same room written as a file.

Every expected number comes from ``read_room`` + ``evaluate`` on the edited room (see
conftest.py), never from a constant in this file.
"""

from __future__ import annotations

import os

from roomcalc.io.roomfile import parse_spec, spec_to_toml
from roomcalc.tui.app import AppConfig, make_app
from roomcalc.study.edits import convert_units
from roomcalc.tui.document import Document
from roomcalc.tui.recovery import find_recovery, recovery_path
from roomcalc.tui.screens.dialogs import Ask
from roomcalc.tui.screens.main import MainScreen
from roomcalc.tui.screens.materials import MaterialChooser

SIZE = (120, 40)
MATERIAL_COL, AREA_COL = 4, 2          # columns of the surfaces table


def _app(path, catalog, **config):
    config.setdefault("offer_recovery", False)
    config.setdefault("theme", "textual-dark")
    return make_app(Document.open(path), catalog, AppConfig(**config))


async def _ready(pilot, tries: int = 100):
    """Wait until the first result is on screen (a loaded machine can take more than one
    pause to get there)."""
    from roomcalc.tui.screens.main import MainScreen

    for _ in range(tries):
        await pilot.pause()
        screen = pilot.app.screen
        if not isinstance(screen, MainScreen):
            return              # a question is asked first (recovery, box size)
        table = screen.query("#reverb-table")
        if screen.result is not None and table and table.first().row_count:
            return
    raise AssertionError("the first result never reached the screen")


def _surfaces(app):
    return app.screen.query_one("#t-surfaces")


def _assert_reverb_matches(reverb, res, engine):
    """The row in force and every band of it, and each method's 500 Hz value."""
    title, by_band = reverb["in_force"]
    assert title == engine.titles[res.method]
    for b in res.bands_hz:
        assert by_band[b] == engine.rt_text(res, b), b
    for k in res.rt60_s:
        assert reverb["rows"][engine.titles[k]][500] == engine.rt_text(res, 500, k), k


def _index(doc, name):
    return [s.name for s in doc.spec.surfaces].index(name)


async def test_material_change_through_chooser(room_file, catalog, engine, screen_tables,
                                               pilot_keys):
    path = room_file("classroom.toml")
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        doc = app.screen.document

        # As opened: the numbers of the file itself.
        res = engine.result(parse_spec(path.read_text(encoding="utf-8")))
        reverb = screen_tables.reverb(app)
        _assert_reverb_matches(reverb, res, engine)
        before = reverb["in_force"][1][500]
        # Headings keep their units (a "[s]" must not be eaten as markup).
        assert reverb["headings"][0] == "RT60 [s]"
        assert reverb["headings"][1:] == [f"{b:g}" if b < 1000 else f"{b / 1000:g}k"
                                          for b in res.bands_hz]
        # Critical distance of the one source at 500 Hz [m].
        rc = [v for k, v in reverb["rows"].items() if k.startswith("r_c ")]
        assert len(rc) == len(res.sources) == 1
        assert rc[0][500] == f"{res.sources[0].critical_distance_m[2]:.2f}"
        assert not app.screen.query_one("#right").has_class("stale")
        # A surface that fills the rest of its face shows the area the engine gives it [m^2].
        floor = _index(doc, "Floor")
        assert doc.spec.surfaces[floor].area is None
        assert screen_tables.records(app, "surfaces")[floor][AREA_COL] == \
            f"({res.room.surfaces[floor].area:.2f})"

        # Enter on the Material cell of the ceiling opens the chooser; words filter the list.
        ceiling = _index(doc, "Ceiling")
        await pilot_keys.edit_cell(pilot, _surfaces(app), ceiling, MATERIAL_COL, None)
        assert isinstance(app.screen, MaterialChooser)
        lst = app.screen.query_one("#list", screen_tables.CellGrid)
        assert lst.row_count == len(catalog.ids("surface"))
        words = "cork"
        await pilot_keys.type_words(pilot, words)
        expected = [m.id for m in catalog.search(words, None, "surface")]
        assert lst.row_count == len(expected) == 1
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, MainScreen)
        assert doc.spec.surfaces[ceiling].material == expected[0]
        assert doc.modified and "(modified)" in screen_tables.title(app)
        assert screen_tables.records(app, "surfaces")[ceiling][MATERIAL_COL] == expected[0]
        res = engine.result(doc.spec)
        reverb = screen_tables.reverb(app)
        _assert_reverb_matches(reverb, res, engine)
        assert reverb["in_force"][1][500] != before   # the change did reach the table

        # Key m on another row; the first of several matches is taken.
        back = _index(doc, "Back wall")
        _surfaces(app).select_row(back)
        await pilot.press("m")
        await pilot.pause()
        assert isinstance(app.screen, MaterialChooser)
        words = "vel"
        await pilot_keys.type_words(pilot, words)
        expected = [m.id for m in catalog.search(words, None, "surface")]
        lst = app.screen.query_one("#list", screen_tables.CellGrid)
        assert [lst.row_key(i) for i in range(lst.row_count)] == expected
        assert len(expected) > 1
        await pilot.press("enter")
        await pilot.pause()
        assert doc.spec.surfaces[back].material == expected[0]
        _assert_reverb_matches(screen_tables.reverb(app), engine.result(doc.spec), engine)


async def test_add_undo_redo(room_file, catalog, engine, screen_tables, pilot_keys):
    path = room_file("classroom.toml")
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        doc = app.screen.document
        original = spec_to_toml(doc.spec)
        n = len(doc.spec.surfaces)
        shown = screen_tables.reverb(app)

        await pilot.press("a")
        await pilot.pause()
        assert len(doc.spec.surfaces) == n + 1
        rows = screen_tables.records(app, "surfaces")
        assert len(rows) == n + 1
        added = doc.spec.surfaces[1]         # added after the highlighted (first) row
        assert rows[1][0] == added.name and rows[1][MATERIAL_COL] == added.material
        assert _surfaces(app).current_row == 1
        res_added = engine.result(doc.spec)
        _assert_reverb_matches(screen_tables.reverb(app), res_added, engine)

        await pilot.press("ctrl+z")
        await pilot.pause()
        assert spec_to_toml(doc.spec) == original
        assert len(screen_tables.records(app, "surfaces")) == n
        assert screen_tables.reverb(app) == shown
        assert not doc.modified and "(modified)" not in screen_tables.title(app)

        await pilot.press("ctrl+y")
        await pilot.pause()
        assert len(screen_tables.records(app, "surfaces")) == n + 1
        assert doc.spec.surfaces[1].name == added.name and doc.modified
        _assert_reverb_matches(screen_tables.reverb(app), res_added, engine)

        # The tab keys hand the keys to that tab's table. A name like "[/x]" is text, not
        # markup: shown as typed in the table, under it and in the distance view's source
        # list, and nothing crashes.
        m = len(doc.spec.sources)
        await pilot.press("4")
        await pilot.pause()
        assert app.screen.query_one("#edit").active == "sources"
        name = "[/x]"
        await pilot_keys.edit_cell(pilot, app.screen.query_one("#t-sources"), 0, 0, name)
        assert app.is_running and doc.spec.sources[0].name == name
        assert screen_tables.records(app, "sources")[0][0] == name
        assert screen_tables.text(app, "#t-sources #row-detail").startswith(name + ":")
        await pilot.press("f6")
        await pilot.pause()
        assert app.screen.query_one("#dist-source").value == name
        _assert_reverb_matches(screen_tables.reverb(app), engine.result(doc.spec), engine)

        # a adds a source that is valid as it stands (it has a position in the box, and a
        # receiver placed by distances gets one to it): the room is still computed, and the
        # screen shows the engine's numbers for it (a new source used to stop the results).
        app.screen.query_one("#t-sources #table").focus()
        await pilot.press("a")
        await pilot.pause()
        assert len(doc.spec.sources) == m + 1
        assert len(screen_tables.records(app, "sources")) == m + 1
        for _ in range(10):
            await pilot.pause()
        assert not app.screen.stale
        _assert_reverb_matches(screen_tables.reverb(app), engine.result(doc.spec), engine)


async def test_bad_values(room_file, catalog, engine, screen_tables, pilot_keys):
    """An area out of range is taken, refused by the room check and shown, the old results
    stay (stale); text in a number field is refused where it is typed and changes nothing."""
    path = room_file("classroom.toml")
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        screen, doc = app.screen, app.screen.document
        text = spec_to_toml(doc.spec)
        good = engine.result(doc.spec)
        shown = screen_tables.reverb(app)
        windows = _index(doc, "Windows")

        await pilot_keys.edit_cell(pilot, _surfaces(app), windows, AREA_COL, "-5")
        assert doc.spec.surfaces[windows].area == -5.0
        want = engine.problems(doc.spec)
        assert want and all(p.where.startswith(f"surfaces[{windows}].area") for p in want)
        findings = screen_tables.text(app, "#findings")
        under = screen_tables.text(app, "#t-surfaces #problems")
        assert "not computed" in findings
        # The place as the screen shows it: row numbers from 1, and the row's name.
        place = f'Surfaces row {windows + 1} "Windows", area'
        for p in want:
            assert p.message in findings and place in findings
            assert p.message in under and place in under
            assert p.where not in findings          # not the file's count from 0
        # The last valid results stay, marked stale.
        assert screen_tables.reverb(app) == shown
        _assert_reverb_matches(shown, good, engine)
        assert screen.stale and screen.query_one("#right").has_class("stale")
        tabs = screen.query_one("#view")
        for pane in ("v-reverb", "v-distance", "v-receivers", "v-compare"):
            assert str(tabs.get_tab(pane).label).endswith("(stale)"), pane
        # Undo clears the problem and the marks.
        await pilot.press("ctrl+z")
        await pilot.pause()
        assert spec_to_toml(doc.spec) == text
        assert not screen.stale and not screen.query_one("#right").has_class("stale")
        assert "(stale)" not in str(tabs.get_tab("v-reverb").label)
        assert screen_tables.text(app, "#t-surfaces #problems").strip() == ""
        assert screen_tables.reverb(app) == shown

        # Text in a number cell: the reason under the editor line, nothing sent.
        doc.undo_stack.clear()
        doc.redo_stack.clear()
        door = _index(doc, "Door")
        await pilot_keys.edit_cell(pilot, _surfaces(app), door, AREA_COL, "abc")
        table = _surfaces(app)
        assert table.has_class("editing")               # the editor line stays open
        assert "'abc' is not a number" in screen_tables.text(app, "#t-surfaces #editor-error")
        assert spec_to_toml(doc.spec) == text and not doc.undo_stack and not doc.modified
        assert screen_tables.reverb(app) == shown and not screen.stale
        await pilot.press("escape")
        await pilot.pause()
        assert not table.has_class("editing")
        assert spec_to_toml(doc.spec) == text and not doc.undo_stack


async def test_save_reopen_and_quit(room_file, catalog, engine, screen_tables):
    path = room_file("garage-studio.toml")
    original_bytes = path.read_bytes()
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        doc = app.screen.document
        # An unmodified opened file saves byte for byte as it was.
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert path.read_bytes() == original_bytes
        # Edit (a new surface, then a copy of it) and save.
        await pilot.press("a", "c")
        await pilot.pause()
        assert doc.spec.surfaces[2].name == doc.spec.surfaces[1].name + " (2)"
        assert doc.modified and "(modified)" in screen_tables.title(app)
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert not doc.modified and "(modified)" not in screen_tables.title(app)
        assert spec_to_toml(Document.open(path).spec) == spec_to_toml(doc.spec)
        # One more edit; quitting asks, and "Save" saves it and quits.
        await pilot.press("x")
        await pilot.pause()
        edited = spec_to_toml(doc.spec)
        shown = screen_tables.reverb(app)
        await pilot.press("ctrl+q")
        for _ in range(50):             # the question is up and laid out
            await pilot.pause()
            if isinstance(app.screen, Ask) and app.screen.query("#save") and \
                    app.screen.query_one("#save").region:
                break
        assert isinstance(app.screen, Ask)
        await pilot.click("#save")
        await pilot.pause()
    assert app.return_code == 0
    reopened = Document.open(path)
    assert spec_to_toml(reopened.spec) == edited
    # The comment lines at the top of the file are kept.
    head = [ln for ln in original_bytes.decode().splitlines() if ln.startswith("#")]
    assert path.read_text(encoding="utf-8").splitlines()[:len(head)] == head
    assert find_recovery(path) is None

    # Reopened: the same room, the same numbers; with nothing changed, quit does not ask.
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        assert screen_tables.reverb(app) == shown
        _assert_reverb_matches(shown, engine.result(reopened.spec), engine)
        await pilot.press("ctrl+q")
        await pilot.pause()
        assert not isinstance(app.screen, Ask)
    assert app.return_code == 0


async def test_recovery_offered_after_crash(room_file, catalog, engine, screen_tables):
    path = room_file("classroom.toml")
    # What a crashed session left: the ceiling changed, in a recovery file newer than the room.
    crashed = Document.open(path)
    crashed.spec.surfaces[_index(crashed, "Ceiling")].material = "mineral-wool-50mm-48kg"
    rec = crashed.write_recovery()
    assert rec == recovery_path(path)
    old = rec.stat().st_mtime - 60
    os.utime(path, (old, old))
    assert find_recovery(path) == rec
    as_file = spec_to_toml(Document.open(path).spec)

    app = _app(path, catalog, offer_recovery=True)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        assert isinstance(app.screen, Ask)
        assert str(path) in screen_tables.text(app, ".question")
        assert {str(b.label) for b in app.screen.query("Button")} == \
            {"Restore", "Discard them", "Not now"}
        await pilot.click("#restore")
        await pilot.pause()
        assert isinstance(app.screen, MainScreen)
        doc = app.screen.document
        assert spec_to_toml(doc.spec) == spec_to_toml(crashed.spec) != as_file
        assert doc.modified
        _assert_reverb_matches(screen_tables.reverb(app), engine.result(crashed.spec), engine)
        await pilot.press("ctrl+z")              # one undo step takes it back
        await pilot.pause()
        assert spec_to_toml(doc.spec) == as_file


async def test_imperial_room_opens_unchanged(room_file, catalog, engine, screen_tables,
                                             tmp_path):
    """An imperial room stays imperial and unmodified when opened (it used to be converted
    to metric by the units field's first Changed message), and shows feet."""
    spec = parse_spec(room_file("classroom.toml").read_text(encoding="utf-8"))
    convert_units(spec, "imperial")
    path = tmp_path / "imperial.toml"
    path.write_text(spec_to_toml(spec), encoding="utf-8")
    original = path.read_bytes()
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        doc = app.screen.document
        assert doc.spec.units == "imperial" and not doc.modified and not doc.undo_stack
        res = engine.result(doc.spec)
        reverb = screen_tables.reverb(app)
        _assert_reverb_matches(reverb, res, engine)
        # The room constant in ft^2. Source: international yard and pound agreement (1959),
        # 1 ft = 0.3048 m exactly.
        assert reverb["rows"]["R [ft^2]"][500] == f"{res.room_constant_m2[2] / 0.3048 ** 2:.1f}"
        await pilot.press("ctrl+q")
        await pilot.pause()
        assert not isinstance(app.screen, Ask)
    assert app.return_code == 0 and path.read_bytes() == original


async def test_quit_with_unsaved_changes_asks(room_file, catalog):
    """An edit: the app keeps it in a recovery file (newer than the room) a moment later;
    Ctrl+Q asks; Cancel keeps the app; "Don't save" quits, leaves the file as it was and
    removes the recovery file."""
    path = room_file("classroom.toml")
    original = path.read_bytes()
    old = path.stat().st_mtime - 60
    os.utime(path, (old, old))
    app = _app(path, catalog, recovery_delay_s=0.05)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        await pilot.press("a")
        await pilot.pause()
        edited = spec_to_toml(app.screen.document.spec)
        for _ in range(100):                 # written a moment later, by a worker thread
            await pilot.pause(0.05)
            await app.workers.wait_for_complete()
            if recovery_path(path).exists():
                break
        assert find_recovery(path) == recovery_path(path)
        assert spec_to_toml(Document.open(recovery_path(path)).spec) == edited

        await pilot.press("ctrl+q")
        await pilot.pause()
        assert isinstance(app.screen, Ask)
        labels = {str(b.id): str(b.label) for b in app.screen.query("Button")}
        assert labels == {"save": "Save", "discard": "Don't save", "cancel": "Cancel"}
        await pilot.click("#cancel")
        await pilot.pause()
        assert isinstance(app.screen, MainScreen) and app.is_running
        assert app.return_code is None and app.screen.document.modified

        # Another edit just before quitting, while the writer waits half a second.
        app.recovery.delay_s = 0.5
        await pilot.press("a", "ctrl+q")
        await pilot.pause()
        assert isinstance(app.screen, Ask)
        await pilot.click("#discard")
        await pilot.pause()
    assert app.return_code == 0
    assert path.read_bytes() == original             # "Don't save" wrote nothing
    assert app.recovery.flush()          # nothing left for the writer to do after the close
    assert not recovery_path(path).exists() and find_recovery(path) is None



async def test_file_and_help_keys_are_the_apps_actions(room_file, catalog):
    """The main screen's file and help keys name the app's actions (app.save, ...), keep
    their ids (a keymap moves them) and the command palette offers the same actions."""
    from roomcalc.tui.screens.dialogs import AskBox, AskText
    from roomcalc.tui.screens.help import HelpScreen

    actions = {b.id: b.action for b in MainScreen.BINDINGS}
    assert {k: actions[k] for k in ("main.save", "main.save_as", "main.open", "main.new",
                                    "main.help")} == {
        "main.save": "app.save", "main.save_as": "app.save_as", "main.open": "app.open",
        "main.new": "app.new", "main.help": "app.help"}
    app = _app(room_file("garage-studio.toml"), catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        for key, screen_type in (("f1", HelpScreen), ("f2", AskText), ("ctrl+o", AskText),
                                 ("ctrl+n", AskBox)):
            await pilot.press(key)
            await pilot.pause()
            assert isinstance(app.screen, screen_type), key
            await pilot.press("escape")
            await pilot.pause()
            assert isinstance(app.screen, MainScreen), key
        # A keymap moves the help key by its id.
        app.set_keymap({"main.help": "f3"})
        await pilot.pause()
        await pilot.press("f3")
        await pilot.pause()
        assert isinstance(app.screen, HelpScreen)
        await pilot.press("escape")
        await pilot.pause()
        palette = {c.title: c.callback for c in app.get_system_commands(app.screen)}
        assert palette["Save"] == app.action_save and palette["Help"] == app.action_help
        assert palette["Open room file"] == app.action_open
        assert palette["New room"] == app.action_new
        assert palette["Save as"] == app.action_save_as


async def test_formula_choice_is_used_everywhere_and_before_after_keeps_its_own(
        room_file, catalog, engine, screen_tables):
    """The room form's formula choice puts that formula in force (the table's marker, the
    file), and Before/after compares by the pinned room's formula, not the one chosen later."""
    from textual.widgets import Select

    from roomcalc.engine.analysis import compare

    path = room_file("garage-studio.toml")
    app = _app(path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        screen = app.screen
        pinned = screen.result
        await pilot.press("p")
        await pilot.press("1")
        await pilot.pause()
        assert screen.query_one("#f-method", Select).value == "recommended"
        screen.query_one("#f-method", Select).value = "arau_puchades"
        await pilot.pause()
        assert screen.document.spec.method == "arau_puchades"
        assert screen.result.method == "arau_puchades"
        reverb = screen_tables.reverb(app)
        assert reverb["in_force"][0] == engine.titles["arau_puchades"]
        # The file would say so.
        assert 'method = "arau_puchades"' in screen.document.text
        await pilot.press("f8")
        await pilot.pause()
        await pilot.pause()
        head = screen_tables.text(app, "#compare-head")
        assert f"RT60 by {engine.titles[pinned.method]}" in head
        cmp = compare(pinned, engine.result(screen.document.spec))
        assert cmp.method == pinned.method
        # Back to the recommendation: the file names no formula.
        await pilot.press("1")
        screen.query_one("#f-method", Select).value = "recommended"
        await pilot.pause()
        assert screen.document.spec.method is None and screen.result.method == pinned.method


async def test_units_switch_gives_the_treatments_table_its_new_keys(room_file, catalog,
                                                                    screen_tables):
    """After switching a metric room to imperial, the Treatments table asks for a cost per ft^2
    and a typed cost lands in that key (the room stays valid), whether the table was shown
    before the switch or not."""
    from textual.widgets import Select

    from roomcalc.tui.widgets.record_table import RecordTable

    app = _app(room_file("workshop.toml"), catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        screen = app.screen
        await pilot.press("1")
        await pilot.pause()
        screen.query_one("#f-units", Select).value = "imperial"
        await pilot.pause()
        assert screen.document.spec.units == "imperial" and not screen.stale
        await pilot.press("6")
        await pilot.pause()
        await pilot.pause()
        table = screen.query_one("#t-candidates", RecordTable)
        keys = [c.key for c in table.columns]
        assert "cost_per_ft2" in keys and "cost_per_m2" not in keys
        heads = [str(c.label) for c in
                 screen.query_one("#t-candidates #table", screen_tables.CellGrid).columns.values()]
        assert any("ft^2" in h for h in heads) and not any("m^2" in h for h in heads), heads
        # The cover candidates' costs were converted to the same money per ft^2.
        cover = screen.document.spec.candidates[0]
        assert cover.cost_per_ft2 is not None and cover.cost_per_m2 is None
        # Back to metric (undo): the columns follow again.
        await pilot.press("ctrl+z")
        await pilot.pause()
        await pilot.pause()
        assert screen.document.spec.units == "metric"
        assert "cost_per_m2" in [c.key for c in table.columns]
        assert not screen.stale


async def test_adding_63_hz_keeps_the_workshop_valid(room_file, catalog):
    """Adding the 63 Hz band in the Room tab extends every per-band list (sources, candidates,
    target limits) and turns catalogue materials without a 63 Hz value into own values, so the
    room is not left invalid; the user is told which."""
    from textual.widgets import Checkbox

    app = _app(room_file("workshop.toml"), catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        screen = app.screen
        await pilot.press("1")
        await pilot.pause()
        screen.query_one("#f-63", Checkbox).value = True
        await pilot.pause()
        spec = screen.document.spec
        assert spec.bands[0] == 63
        assert not screen.stale, screen.problems
        assert screen.result.bands_hz[0] == 63
        assert all(len(s.sound_power) == 7 for s in spec.sources if s.sound_power)
        assert all(len(c.absorption) == 7 for c in spec.candidates if c.absorption)
        notes = [n.message for n in app._notifications]
        assert any("63 Hz" in m and "nearest band" in m for m in notes), notes
        await pilot.press("ctrl+z")
        await pilot.pause()
        assert screen.document.spec.bands[0] == 125 and not screen.stale


async def test_help_scrolls_with_the_keys_and_shows_its_last_section(room_file, catalog):
    """F1 at 80x24: the scrolling container has the focus; End reaches the bottom (the last
    section's heading is drawn), Home goes back to the top, PageDown / Space / Down move down,
    PageUp / Up move up, and the mouse wheel scrolls too."""
    from textual import events
    from textual.containers import VerticalScroll
    from textual.widgets import Markdown

    from roomcalc.tui.screens.help import HelpScreen

    app = _app(room_file("workshop.toml"), catalog)
    async with app.run_test(size=(80, 24)) as pilot:
        await _ready(pilot)
        await pilot.press("f1")
        await pilot.pause()
        assert isinstance(app.screen, HelpScreen)
        box = app.screen.query_one(VerticalScroll)
        assert app.screen.focused is box
        assert box.max_scroll_y > 0                     # longer than the screen
        assert box.scroll_y == 0
        await pilot.press("end")
        await pilot.pause(0.3)
        assert box.scroll_y == box.max_scroll_y
        last = list(app.screen.query_one(Markdown).query("MarkdownH2"))[-1]
        assert "Hearing and safety" in str(last.render())
        top, bottom = box.scroll_y, box.scroll_y + box.scrollable_content_region.height
        y = last.virtual_region.y - box.virtual_region.y
        assert top <= y < bottom, (top, y, bottom)       # the last heading is in view
        await pilot.press("home")
        await pilot.pause(0.3)
        assert box.scroll_y == 0
        for key in ("pagedown", "space", "down"):
            before = box.scroll_y
            await pilot.press(key)
            await pilot.pause(0.3)
            assert box.scroll_y > before, key
        for key in ("pageup", "up"):
            before = box.scroll_y
            await pilot.press(key)
            await pilot.pause(0.3)
            assert box.scroll_y < before, key
        before = box.scroll_y
        md = app.screen.query_one(Markdown)             # the wheel over the text
        md.post_message(events.MouseScrollDown(md, 2, 2, 0, 1, 0, False, False, False))
        await pilot.pause(0.3)
        assert box.scroll_y > before                     # the mouse wheel
        await pilot.press("escape")
        await pilot.pause()
        assert isinstance(app.screen, MainScreen)


async def test_decimal_commas_are_taken_where_numbers_are_typed(room_file, catalog, engine,
                                                                 screen_tables, pilot_keys):
    """A decimal comma ("2,5" is 2.5) in the cell editor, the room form and the own RT60
    limit ("0,6 0,5 ..." per band); the screen then shows the engine's numbers for the room
    with that value."""
    from roomcalc.tui.widgets.plan_view import PlanView

    app = _app(room_file("classroom.toml"), catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        screen, doc = app.screen, app.screen.document
        windows = _index(doc, "Windows")
        await pilot_keys.edit_cell(pilot, _surfaces(app), windows, AREA_COL, "2,5")
        assert doc.spec.surfaces[windows].area == 2.5
        assert not screen.stale, screen.problems
        _assert_reverb_matches(screen_tables.reverb(app), engine.result(doc.spec), engine)

        # The room form: the length typed with a decimal comma.
        screen.action_edit_tab("room")
        await pilot.pause()
        length = screen.query_one("#f-shape-length")
        length.focus()
        await pilot.press("end", "ctrl+u", *"9,5")
        await pilot.pause()
        assert doc.spec.shape.length == 9.5
        assert str(screen.query_one("#form-error").render()) == ""
        assert not screen.stale

        # The own RT60 limit: one per band, decimal commas, spaces between.
        await pilot.press("f9")
        for _ in range(20):
            await pilot.pause()
            if screen.query("#plan-view"):
                break
        n = len(doc.spec.bands)
        own = screen.query_one("#plan-own")
        own.focus()
        own.value = " ".join(["0,6"] * (n - 1) + ["0,5"])
        await pilot.press("enter")
        await pilot.pause()
        assert doc.spec.target.rt60_max == [0.6] * (n - 1) + [0.5]
        assert str(screen.query_one("#plan-own-error").render()) == ""
        assert isinstance(screen.query_one("#plan-view"), PlanView)
