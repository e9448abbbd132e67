"""Where the keys go: every focus stop shows itself, one-key shortcuts never fire or type in a
field the user meant to leave, and ``m`` opens the material chooser naming the row it changes
(traps a new user met, each of these failed before it was fixed)."""

from __future__ import annotations

from textual.widgets import Input, TabbedContent

from roomcalc.tui.app import AppConfig, make_app
from roomcalc.tui.document import Document
from roomcalc.tui.screens.materials import MaterialChooser

#: Widgets whose focus is drawn: a cursor (tables), a highlighted tab (tab bars), a focused
#: border or box (fields, drop-downs, buttons, check boxes). A scrolling container is not
#: among them: its focus changes nothing on the screen.
SHOWS_FOCUS = {"CellGrid", "ReverbTable", "ReceiverTable", "CompareTable", "ContentTabs",
               "Input", "Select", "Button", "Checkbox"}


def _app(path, catalog):
    return make_app(Document.open(path), catalog,
                    AppConfig(offer_recovery=False, theme="textual-dark"))


async def _settle(pilot, n: int = 6):
    for _ in range(n):
        await pilot.pause()


def _focus_stops(app) -> set[str]:
    """The kinds of widget Tab stops at on the screen as it is (Textual's focus chain: what
    Tab and Shift+Tab go through)."""
    return {type(w).__name__ for w in app.screen.focus_chain}


async def test_every_focus_stop_shows_itself(room_file, catalog):
    for size in ((120, 40), (80, 24)):
        app = _app(room_file("garage-studio.toml"), catalog)
        async with app.run_test(size=size) as pilot:
            await _settle(pilot, 20)
            for keys in ((), ("1",), ("3",), ("6",), ("f6",), ("f7",), ("f8",), ("f9",)):
                for k in keys:
                    await pilot.press(k)
                await _settle(pilot)
                stops = _focus_stops(app)
                assert "CellGrid" in stops or "Input" in stops, (size, keys, stops)
                assert stops <= SHOWS_FOCUS, (size, keys, stops - SHOWS_FOCUS)
            # Tab really goes through them: a few presses land on kinds from the chain only.
            for _ in range(6):
                await pilot.press("tab")
                await pilot.pause()
                assert type(app.screen.focused).__name__ in SHOWS_FOCUS


async def test_m_names_the_row_it_changes_wherever_the_focus_is(room_file, catalog):
    app = _app(room_file("workshop.toml"), catalog)
    async with app.run_test(size=(120, 40)) as pilot:
        await _settle(pilot, 20)
        screen = app.screen
        await pilot.press("tab", "tab")        # the results' table: a surface row is not focused
        await _settle(pilot)
        assert "reverb" in (screen.focused.id or "")
        await pilot.press("m")
        await _settle(pilot)
        chooser = app.screen
        assert isinstance(chooser, MaterialChooser)
        first = screen.document.spec.surfaces[0].name
        assert str(chooser.query_one("#title").content).endswith(f'for Surfaces row 1 "{first}"')
        await pilot.press("escape")
        await _settle(pilot)
        # The Treatments tab: m opens the chooser for its row (it did nothing), and the words
        # typed next go into the search, not to the shortcuts (a added rows, 1 jumped tabs).
        rows = len(screen.document.spec.candidates)
        await pilot.press("6")
        await _settle(pilot)
        await pilot.press("m")
        await _settle(pilot)
        chooser = app.screen
        assert isinstance(chooser, MaterialChooser)
        cand = screen.document.spec.candidates[0]
        assert str(chooser.query_one("#title").content).endswith(
            f'for Treatments row 1 "{cand.name}"')
        assert chooser.kind == ("surface" if cand.surface else "object")
        await pilot.press("a", "1")
        await _settle(pilot)
        assert chooser.query_one("#words", Input).value == "a1"
        await pilot.press("escape")
        await _settle(pilot)
        assert len(screen.document.spec.candidates) == rows
        assert screen.query_one("#edit", TabbedContent).active == "candidates"


async def test_a_digit_types_in_a_field_and_switches_tabs_once_the_field_is_left(room_file,
                                                                               catalog):
    app = _app(room_file("classroom.toml"), catalog)
    async with app.run_test(size=(120, 40)) as pilot:
        await _settle(pilot, 20)
        screen = app.screen
        edit = screen.query_one("#edit", TabbedContent)
        await pilot.press("1")                 # the Room tab: its tab bar has the focus
        await _settle(pilot)
        assert edit.active == "room"
        assert type(screen.focused).__name__ == "ContentTabs"
        await pilot.press("2")                 # so a digit switches tabs, typing nothing
        await _settle(pilot)
        assert edit.active == "surfaces"
        title = screen.document.spec.title
        assert screen.document.spec.title == title
        await pilot.press("1")
        await _settle(pilot)
        await pilot.press("down")              # Down goes into the tab: the Title field
        await _settle(pilot)
        assert screen.focused.id == "f-title"
        await pilot.press("end", "2")          # in a field a digit types
        await _settle(pilot)
        assert edit.active == "room"
        assert screen.query_one("#f-title", Input).value == title + "2"
        await pilot.press("escape")            # Escape leaves the field for the tab bar ...
        await _settle(pilot)
        assert type(screen.focused).__name__ == "ContentTabs"
        await pilot.press("2")                 # ... where the digit switches tabs
        await _settle(pilot)
        assert edit.active == "surfaces"
        assert screen.query_one("#f-title", Input).value == title + "2"


async def test_after_f9_a_digit_switches_tabs_and_types_nothing(room_file, catalog):
    app = _app(room_file("classroom.toml"), catalog)
    async with app.run_test(size=(120, 40)) as pilot:
        await _settle(pilot, 20)
        screen = app.screen
        await pilot.press("f9")
        await _settle(pilot, 10)
        own = screen.query_one("#plan-own", Input).value
        await pilot.press("2")
        await _settle(pilot)
        assert screen.query_one("#edit", TabbedContent).active == "surfaces"
        assert screen.query_one("#plan-own", Input).value == own
        # In the own-limit field a digit types, and Escape leaves it for the view's tab bar.
        screen.query_one("#plan-own", Input).focus()
        await _settle(pilot)
        await pilot.press("end", "3")
        await _settle(pilot)
        assert screen.query_one("#plan-own", Input).value == own + "3"
        await pilot.press("escape")
        await _settle(pilot)
        assert type(screen.focused).__name__ == "ContentTabs"
        assert screen.query_one("#view", TabbedContent).active == "v-plan"


async def test_the_plan_is_applied_with_the_key_a(room_file, catalog):
    """Apply could only be reached by clicking or many Tabs; a applies a plan that is shown,
    and does nothing before there is one (the key line offers it only then)."""
    app = _app(room_file("workshop.toml"), catalog)
    async with app.run_test(size=(120, 40)) as pilot:
        await _settle(pilot, 20)
        screen = app.screen
        doc = screen.document
        await pilot.press("f9")
        await _settle(pilot)
        await pilot.press("a")                 # no plan yet: nothing happens
        await _settle(pilot)
        assert not doc.undo_stack
        assert "Apply the plan" not in str(screen.query_one("#keys").content)
        await pilot.press("r")
        for _ in range(200):
            await pilot.pause()
            if not screen.query_one("#plan-apply").disabled:
                break
        await _settle(pilot)
        assert "Apply the plan" in str(screen.query_one("#keys").content)
        await pilot.press("a")
        await _settle(pilot)
        assert [s.label for s in doc.undo_stack] == ["apply the treatment plan"]


async def test_enter_in_the_own_limit_leaves_it_so_that_r_plans(room_file, catalog):
    """The own RT60 limit typed and Enter: r typed next went into the field ("1r") instead of
    making the plan. Enter now takes the focus to the list of treatments, and the key line
    offers Escape while the focus is in the field."""
    app = _app(room_file("workshop.toml"), catalog)
    async with app.run_test(size=(120, 40)) as pilot:
        await _settle(pilot, 20)
        screen = app.screen
        await pilot.press("f9")
        await _settle(pilot)
        own = screen.query_one("#plan-own", Input)
        own.focus()
        await _settle(pilot)
        assert "Leave the field" in str(screen.query_one("#keys").content)
        own.value = ""
        await pilot.press("1", "enter")
        await _settle(pilot)
        assert screen.focused.id == "plan-candidates"
        await pilot.press("r")
        for _ in range(200):
            await pilot.pause()
            if screen._plan_run is not None:
                break
        assert own.value == "1"
        assert screen._plan_run is not None
        assert screen.document.spec.target.rt60_max is not None


async def test_r_plans_while_the_plan_tab_is_shown_wherever_the_focus_is(room_file, catalog):
    """With the Plan tab shown and the focus on the room's table (Tab went there), r did
    nothing; it now makes the plan, and elsewhere (another view) it still does nothing."""
    app = _app(room_file("workshop.toml"), catalog)
    async with app.run_test(size=(80, 24)) as pilot:
        await _settle(pilot, 20)
        screen = app.screen
        await pilot.press("r")                 # the Reverberation tab: nothing to plan
        await _settle(pilot)
        assert screen._plan_run is None and screen._plan_job is None
        await pilot.press("f9")
        await _settle(pilot)
        screen.query_one("#t-surfaces #table").focus()
        await _settle(pilot)
        await pilot.press("r")
        for _ in range(200):
            await pilot.pause()
            if screen._plan_run is not None:
                break
        assert screen._plan_run is not None
