"""Snapshot tests: the screen as a picture (SVG), at a fixed size and theme, on the built-in
demo room (no file path in the header, no clock, nothing random).

Baselines live in __snapshots__/ next to this file. After a deliberate change of the layout,
run ``python -m pytest tests/tui/test_tui_snapshots.py --snapshot-update`` and look at every
changed picture (snapshot_report.html) before keeping it.
"""

from __future__ import annotations

import math

from textual.widgets import Input

from roomcalc.engine.analysis import compare
from roomcalc.tui.app import AppConfig, make_app
from roomcalc.tui.screens.materials import MaterialChooser
from roomcalc.tui.widgets.grid import CellGrid

SIZE = (120, 40)


def _demo_app(catalog):
    return make_app(None, catalog, AppConfig(theme="textual-dark", offer_recovery=False))


async def _settle(pilot):
    """No blinking cursor, no toast left from a key, the footer's keys and the tab underline
    done updating: the same picture every run."""
    await pilot.pause(0.2)
    for inp in pilot.app.screen.query(Input):
        inp.cursor_blink = False
    # A table that re-measured its columns (a cell got shorter) can still be drawn with the
    # old widths until something else repaints it: repaint them all now.
    for table in pilot.app.screen.query(CellGrid):
        table.refresh(layout=True)
    await pilot.pause()
    pilot.app.clear_notifications()
    await pilot.wait_for_scheduled_animations()
    await pilot.pause()


def test_main_screen_demo_room(snap_compare, catalog):
    """The demo room as it opens: surfaces table, reverberation table and plot, findings."""
    app = _demo_app(catalog)
    assert snap_compare(app, terminal_size=SIZE, run_before=_settle)


def test_material_chooser_open(snap_compare, catalog):
    """The chooser over the main screen, filtered by the word 'wool', for the first surface."""
    app = _demo_app(catalog)

    async def run_before(pilot):
        await pilot.pause()
        await pilot.press("m")
        await pilot.pause()
        await pilot.press(*"wool")
        await pilot.pause()
        assert isinstance(pilot.app.screen, MaterialChooser)
        await _settle(pilot)
    assert snap_compare(app, terminal_size=SIZE, run_before=run_before)


def test_error_state_invalid_area(snap_compare, catalog):
    """The window's area set to -5: the problem in the findings strip and under the table,
    the old results dimmed and the result tabs marked (stale)."""
    app = _demo_app(catalog)

    async def run_before(pilot):
        await pilot.pause()
        screen = pilot.app.screen
        window = [s.name for s in screen.document.spec.surfaces].index("Window")
        table = screen.query_one("#t-surfaces #table")
        table.move_cursor(row=window, column=2, animate=False)
        await pilot.press("enter")
        await pilot.pause()
        await pilot.press("ctrl+u", "-", "5", "enter")
        await pilot.pause()
        assert screen.stale
        # Whether the table is left scrolled to the edited cell depends on timing: scroll it
        # back to its left edge, so that the picture does not.
        await pilot.pause(0.2)
        table.scroll_to(x=0, y=0, animate=False)
        await _settle(pilot)
    assert snap_compare(app, terminal_size=SIZE, run_before=run_before)


def test_compare_view(snap_compare, catalog, engine):
    """Pinned with p, the first surface's material changed through the chooser, F8: the
    before/after table (its RT rows checked against the engine on both rooms)."""
    app = _demo_app(catalog)

    async def run_before(pilot):
        await pilot.pause()
        screen = pilot.app.screen
        before = engine.result(screen.document.spec)
        await pilot.press("p")
        await pilot.pause()
        assert screen.pinned is not None
        await pilot.press("m")
        await pilot.pause()
        await pilot.press(*"cork", "enter")
        await pilot.pause()
        assert screen.document.spec.surfaces[0].material == "cork-tiles-on-concrete"
        after = engine.result(screen.document.spec)
        await pilot.press("f8")
        await pilot.pause()
        assert screen.query_one("#view").active == "v-compare"
        table = screen.query_one("#compare-table", CellGrid)
        rows = [[str(c) for c in table.get_row_at(i)] for i in range(table.row_count)]
        # Every column of numbers is as wide as its longest cell: no number is cut off ("-0.0"
        # for -0.02); only the labels may be cut to fit the pane.
        for key, column in table.columns.items():
            if key == "label":
                continue
            longest = max(len(str(c)) for c in [column.label, *table.get_column(key)])
            assert column.content_width >= longest, (str(column.label), column.content_width)
        method = compare(before, after).method   # the formula in force before
        col = 1 + list(before.bands_hz).index(500)
        assert rows[0][0] == f"RT60 {engine.titles[method]} [s]" and rows[0][col] == ""
        assert rows[1][0].strip() == "before"
        assert rows[1][col] == engine.rt_text(before, 500, method)
        assert rows[2][0].strip() == "after"
        assert rows[2][col] == engine.rt_text(after, 500, method)
        change = float(engine.rt_text(after, 500, method)) - float(
            engine.rt_text(before, 500, method))
        assert rows[3][0].strip() == "change"
        assert abs(float(rows[3][col]) - change) <= 0.011     # each shown to 2 decimals
        # Reverberant-field change 10 lg(R1/R2), negative = quieter like the other changes.
        # Common practice: the level of a diffuse field goes with 10 lg(4/R).
        i = list(before.bands_hz).index(500)
        d_rev = 10 * math.log10(before.room_constant_m2[i] / after.room_constant_m2[i])
        assert rows[4][0] == "Reverberant level [dB]" and rows[5][0].strip() == "change"
        assert rows[5][col] == f"{d_rev:.1f}" and d_rev < 0
        await _settle(pilot)
    assert snap_compare(app, terminal_size=SIZE, run_before=run_before)


def test_main_screen_demo_room_80x24(snap_compare, catalog):
    """The demo room on a small terminal: one column, the six tabs with their digits, the
    reverberation labels in words, the findings strip folded with its counts, the key line
    keeping help and quit."""
    app = _demo_app(catalog)
    assert snap_compare(app, terminal_size=(80, 24), run_before=_settle)
