"""The result views (widgets/views.py), each mounted alone in a throwaway app: told what to
show through ``show``, checked on what they draw and on the messages they send up.

The results shown are the engine's own (``read_room`` + ``evaluate`` on the example rooms);
what is checked is that the view puts those numbers, and the texts it is given, on the
screen. No value here comes from outside the program."""

from __future__ import annotations

from pathlib import Path

from textual.app import App
from textual.widgets import Select

from roomcalc.engine.analysis import METHOD_TITLES, compare, evaluate
from roomcalc.io.roomfile import read_room
from roomcalc.tui.widgets.grid import CellGrid
from roomcalc.tui.widgets.views import (NO_PIN, NO_RECEIVERS, CompareView, DistanceView,
                                        ReceiversView, ReverbView)

EXAMPLES = Path(__file__).resolve().parents[2] / "example_rooms"
SIZE = (120, 40)


class ViewApp(App):
    def __init__(self, view) -> None:
        super().__init__()
        self.view = view

    def compose(self):
        yield self.view


def _result(catalog, name: str):
    spec, room = read_room(EXAMPLES / name, catalog)
    return evaluate(room)


def _rows(grid: CellGrid) -> list[list[str]]:
    return [[str(c) for c in grid.get_row_at(i)] for i in range(grid.row_count)]


async def test_distance_view_offers_sources_and_reports_a_choice():
    got = []

    def hook(msg):
        if isinstance(msg, DistanceView.Chosen) and not any(m is msg for m in got):
            got.append(msg)

    app = ViewApp(DistanceView(id="dv"))
    async with app.run_test(size=SIZE, message_hook=hook) as pilot:
        view = app.query_one(DistanceView)
        view.offer(["Saw", "[/x]"], (125, 250, 500))
        await pilot.pause()
        # The first source and dB(A) to start with; filling the lists is not a choice.
        assert view.choice == ("Saw", None)
        assert app.query_one("#dist-band", Select).value == "dBA"
        assert got == []

        # The user picks the 500 Hz band with the keyboard: one message, with both choices.
        band = app.query_one("#dist-band", Select)
        band.focus()
        await pilot.press("enter")
        await pilot.pause()
        await pilot.press("down", "down", "down", "enter")   # dB(A), 125, 250, 500
        await pilot.pause()
        assert band.value == "500"
        assert [(m.source, m.band, m.view) for m in got] == [("Saw", 500, view)]

        # Fewer sources: the one picked is gone, the first remaining one is taken; the band
        # stays; again no message (the screen asked for it).
        view.offer(["[/x]"], (125, 250, 500))
        await pilot.pause()
        assert view.choice == ("[/x]", 500)
        assert len(got) == 1

        # Bands changed: 500 Hz is gone, back to dB(A).
        view.offer(["[/x]"], (1000, 2000))
        await pilot.pause()
        assert view.choice == ("[/x]", None)


async def test_distance_view_without_sources_says_so():
    app = ViewApp(DistanceView())
    async with app.run_test(size=SIZE) as pilot:
        view = app.query_one(DistanceView)
        view.offer([], (125, 250))
        view.show_message("Add a source first")
        await pilot.pause()
        assert view.choice == (None, None)
        plot = app.query_one("#distance-plot")
        assert "Add a source first" in "\n".join(plot.render_line(y).text
                                                 for y in range(plot.size.height))


async def test_receivers_view_shows_levels_and_the_note(catalog):
    res = _result(catalog, "workshop.toml")
    assert res.receivers, "the workshop example has receivers"
    app = ViewApp(ReceiversView())
    async with app.run_test(size=SIZE) as pilot:
        view = app.query_one(ReceiversView)
        view.show(res, "Daily exposure: a text the screen chose")
        await pilot.pause()
        rows = _rows(app.query_one("#receiver-table", CellGrid))
        first = res.receivers[0]
        # Three rows per receiver (total, direct, reverberant); the total in dB(A) last.
        assert len(rows) == 3 * len(res.receivers)
        assert rows[0][0] == first.name
        assert rows[0][-1] == f"{first.level_dba:.1f}"
        assert rows[1][-1] == f"{first.direct_dba:.1f}"
        note = str(app.query_one("#receiver-note").content)
        assert note == "Daily exposure: a text the screen chose"

        view.show(res)             # no exposure text: no note (the room has receivers)
        await pilot.pause()
        assert str(app.query_one("#receiver-note").content) == ""


async def test_receivers_view_without_receivers(catalog):
    res = _result(catalog, "garage-studio.toml")
    app = ViewApp(ReceiversView())
    async with app.run_test(size=SIZE) as pilot:
        view = app.query_one(ReceiversView)
        empty = type("R", (), {"receivers": (), "bands_hz": res.bands_hz})()
        view.show(empty, "exposure")
        await pilot.pause()
        assert str(app.query_one("#receiver-note").content) == NO_RECEIVERS + "\nexposure"


async def test_compare_view_shows_a_comparison_and_messages(catalog):
    before = _result(catalog, "classroom.toml")
    after = _result(catalog, "classroom-treated.toml")
    cmp = compare(before, after)
    app = ViewApp(CompareView())
    async with app.run_test(size=SIZE) as pilot:
        view = app.query_one(CompareView)
        table = app.query_one("#compare-table", CellGrid)
        view.show_message()
        await pilot.pause()
        assert str(app.query_one("#compare-head").content) == NO_PIN
        assert not table.display

        view.show(cmp, stale=True)
        await pilot.pause()
        assert table.display
        head = str(app.query_one("#compare-head").content)
        assert f"RT60 by {METHOD_TITLES[cmp.method]} (in force before)" in head
        assert "(stale)" in head
        rows = _rows(table)
        col = 1 + list(before.bands_hz).index(500)
        i = list(before.bands_hz).index(500)
        assert rows[0][0] == f"RT60 {METHOD_TITLES[cmp.method]} [s]"
        assert rows[1][0].strip() == "before"
        assert rows[1][col] == f"{float(before.rt60_s[cmp.method][i]):.2f}"
        assert rows[2][0].strip() == "after"
        assert rows[2][col] == f"{float(after.rt60_s[cmp.method][i]):.2f}"
        notes = str(app.query_one("#compare-notes").content)
        assert notes == "\n".join(f"- {n}" for n in cmp.notes)

        # A message hides the table and clears the old comparison's notes.
        view.show_message("The bands changed since the pin; press p to pin again.")
        await pilot.pause()
        assert not table.display
        assert str(app.query_one("#compare-notes").content) == ""
        assert str(app.query_one("#compare-head").content).startswith("The bands changed")


async def test_reverb_view_marks_the_method_in_force(catalog):
    res = _result(catalog, "classroom.toml")
    app = ViewApp(ReverbView())
    async with app.run_test(size=SIZE) as pilot:
        app.query_one(ReverbView).show(res)
        await pilot.pause()
        rows = _rows(app.query_one("#reverb-table", CellGrid))
        marked = [r for r in rows if r[0].startswith("> ")]
        assert [r[0] for r in marked] == ["> " + METHOD_TITLES[res.method]]
        i = list(res.bands_hz).index(500)
        assert marked[0][1 + i] == f"{float(res.rt60_s[res.method][i]):.2f}"


async def test_each_view_says_when_it_is_mounted():
    """A hidden tab's view is mounted after the first screen; it says so, once, so that the
    screen can draw it if its tab is already shown."""
    from roomcalc.tui.widgets.views import ResultView

    for view_type in (ReverbView, DistanceView, ReceiversView, CompareView):
        got = []

        def hook(msg):
            if isinstance(msg, ResultView.Ready) and not any(m is msg for m in got):
                got.append(msg)

        app = ViewApp(view_type(id="the-view"))
        async with app.run_test(size=SIZE, message_hook=hook) as pilot:
            await pilot.pause()
            assert [m.view.id for m in got] == ["the-view"], view_type.__name__


async def test_compare_view_of_an_unchanged_room_has_no_negative_zero_and_no_note(catalog):
    """The workshop example compared with itself: every change cell reads 0.0 or 0.00 (never
    "-0.0") and no "falls by" note is shown for a change below display resolution."""
    import re

    res = _result(catalog, "workshop.toml")
    cmp = compare(res, _result(catalog, "workshop.toml"))
    app = ViewApp(CompareView())
    async with app.run_test(size=SIZE) as pilot:
        view = app.query_one(CompareView)
        view.show(cmp)
        await pilot.pause()
        rows = _rows(app.query_one("#compare-table", CellGrid))
        cells = [c for r in rows for c in r[1:]]
        assert cells and not any(re.fullmatch(r"-0(\.0+)?", c) for c in cells), cells
        changes = [r for r in rows if "change" in r[0]]
        assert changes and all(c in ("0.0", "0.00", "") for r in changes for c in r[1:]), changes
        notes = str(app.query_one("#compare-notes").content)
        assert "falls by" not in notes and "-0.0" not in notes
