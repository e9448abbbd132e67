"""The plan view: opening it changes nothing, a plan is made and shown, its 'after' RT is what
the engine gives for the treated room, applying it is one undoable edit."""

from __future__ import annotations

import numpy as np
from textual.widgets import Select

from roomcalc.engine.analysis import evaluate
from roomcalc.io.planning import apply_plan
from roomcalc.io.roomfile import check_room, parse_spec, spec_to_toml
from roomcalc.study import Study
from roomcalc.tui.app import AppConfig, make_app
from roomcalc.tui.document import Document
from roomcalc.tui.widgets.grid import CellGrid

SIZE = (120, 40)

ROOM = """\
# An invented test room.
version = 1
title = "Plan test room"
units = "metric"

[shape]
length = 9.0
width = 7.0
height = 3.0

[[surfaces]]
name = "Floor"
face = "floor"
material = "linoleum-vinyl-on-concrete"

[[surfaces]]
name = "Ceiling"
face = "ceiling"
material = "plaster-on-masonry"

[[surfaces]]
name = "Walls"
area = 96.0
material = "plaster-on-masonry"

[target]
method = "sabine"
rt60_max = 1.2

[[candidates]]
name = "Ceiling tiles"
surface = "Ceiling"
material = "mineral-wool-25mm-high-density"
cost_per_m2 = 40.0

[[candidates]]
name = "Wall panels"
surface = "Walls"
material = "mineral-wool-50mm-48kg"
cost_per_m2 = 65.0
"""


async def _ready(pilot):
    for _ in range(100):
        await pilot.pause()
        if pilot.app.screen.result is not None:
            return


async def _planned(pilot, timeout_s: float = 30.0):
    """Wait until the plan being made (in its worker thread) is shown."""
    screen = pilot.app.screen
    for _ in range(int(timeout_s / 0.02)):
        await pilot.pause(0.02)
        if not screen.planning:
            await pilot.pause()
            return
    raise AssertionError("the plan did not finish")


def _plan_room_app(tmp_path, catalog):
    """The planning room written to a file, and an app on it (no recovery writes)."""
    path = tmp_path / "plan-room.toml"
    path.write_text(ROOM, encoding="utf-8")
    return path, make_app(Document.open(path), catalog,
                          AppConfig(offer_recovery=False, recovery_delay_s=3600))


async def _open_plan_view(pilot) -> None:
    """F9, and wait until the Plan tab is mounted."""
    await pilot.press("f9")
    for _ in range(20):
        await pilot.pause()
        if pilot.app.screen.query("#plan-view"):
            return


async def test_plan_view_plans_applies_and_undoes(tmp_path, catalog):
    path, app = _plan_room_app(tmp_path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        screen = app.screen
        doc = screen.document
        await _open_plan_view(pilot)
        # Opening the view is not an edit, and it shows the file's target.
        assert not doc.modified and not doc.undo_stack
        assert screen.query_one("#plan-criterion", Select).value == "own"
        assert screen.query_one("#plan-method", Select).value == "sabine"
        grid = screen.query_one("#plan-candidates", CellGrid)
        assert [grid.get_row_at(i)[1] for i in range(grid.row_count)] == ["Ceiling tiles",
                                                                         "Wall panels"]
        grid.focus()
        await pilot.press("r")
        await _planned(pilot)
        run = screen._plan_run
        assert run is not None and run.plan.feasible
        # Independent of the view: the engine on the treated room file the plan makes.
        spec = parse_spec(ROOM, str(path))
        treated = apply_plan(spec, run.plan, list(run.candidates))
        after = evaluate(check_room(treated, catalog)).rt60_s["sabine"]
        assert np.all(after <= 1.2 + 1e-6)
        rt = screen.query_one("#plan-rt", CellGrid)
        shown_after = [float(x) for x in rt.get_row_at(1)[1:]]
        assert shown_after == [round(float(x), 2) for x in after]
        # The same plan as the command line's (same file, same catalogue).
        cli = Study(spec, catalog).plan()
        assert cli.plan.total_cost == run.plan.total_cost
        # Untick the wall panels: the plan uses only the ceiling.
        grid.move_cursor(row=1)
        await pilot.press("space", "r")
        await _planned(pilot)
        assert {it.candidate for it in screen._plan_run.plan.items} <= {"Ceiling tiles"}
        await pilot.press("space", "r")          # both again
        await _planned(pilot)
        last = screen._plan_run
        await pilot.click("#plan-apply")
        await pilot.pause()
        assert doc.modified and [s.label for s in doc.undo_stack] == ["apply the treatment plan"]
        assert spec_to_toml(doc.spec) == spec_to_toml(apply_plan(
            spec, last.plan, list(last.candidates)))
        res = evaluate(check_room(doc.spec, catalog))
        assert np.all(res.rt60_s["sabine"] <= 1.2 + 1e-6)
        # The treatments stay, those the plan used marked applied, and the view says so.
        used = {it.candidate for it in last.plan.items}
        assert [c.name for c in doc.spec.candidates] == ["Ceiling tiles", "Wall panels"]
        assert {c.name for c in doc.spec.candidates if c.applied} == used
        await pilot.pause()
        rows = [grid.get_row_at(i) for i in range(grid.row_count)]
        assert {r[1] for r in rows if r[0] == "applied"} == used
        # Space on an applied row leaves it so (the plan leaves it out whatever its tick).
        k = next(i for i, r in enumerate(rows) if r[0] == "applied")
        grid.focus()
        grid.move_cursor(row=k)
        await pilot.press("space")
        await pilot.pause()
        assert grid.get_row_at(k)[0] == "applied"
        await pilot.press("ctrl+z")
        await pilot.pause()
        assert not doc.modified and spec_to_toml(doc.spec) == spec_to_toml(spec)
        # The user's own limit, typed in the view: a wrong count is refused with the reason,
        # one number sets every band (one undoable edit).
        own = screen.query_one("#plan-own")
        own.focus()
        own.value = "1 2"
        await pilot.press("enter")
        await pilot.pause()
        assert "give one (every band) or 6" in str(screen.query_one("#plan-own-error").render())
        assert not doc.modified
        own.value = "1.0"
        await pilot.press("enter")
        await pilot.pause()
        assert doc.spec.target.rt60_max == 1.0 and doc.spec.target.criterion is None
        assert [s.label for s in doc.undo_stack] == ["target: own RT60 limit"]


async def test_the_applied_line_goes_when_the_room_changes_or_is_saved(tmp_path, catalog):
    """"The plan is applied ... (Ctrl+Z takes it back)" describes the room just after Apply:
    Ctrl+Z, Ctrl+Y, an edit and a save each replace it."""
    from roomcalc.tui.screens.plan_routes import AFTER_APPLIED, APPLIED

    path, app = _plan_room_app(tmp_path, catalog)
    async with app.run_test(size=SIZE) as pilot:
        await _ready(pilot)
        screen = app.screen
        doc = screen.document
        await _open_plan_view(pilot)

        def line() -> str:
            return str(screen.query_one("#plan-result").content)

        async def plan_and_apply():
            screen.query_one("#plan-candidates", CellGrid).focus()
            await pilot.press("r")
            await _planned(pilot)
            await pilot.click("#plan-apply")
            await pilot.pause()
            assert line() == APPLIED

        async def changed_by(*keys):
            await plan_and_apply()
            screen.query_one("#plan-candidates", CellGrid).focus()
            await pilot.press(*keys)
            await pilot.pause()
            assert line() == AFTER_APPLIED, keys
            assert "Ctrl+Z" not in line()

        await changed_by("ctrl+z")                # undo
        await pilot.press("ctrl+y")               # redo: the plan is in again ...
        await pilot.pause()
        assert line() == AFTER_APPLIED            # ... but the line does not come back
        await pilot.press("ctrl+z")
        await pilot.pause()
        await changed_by("ctrl+s")                # save
        assert not doc.modified
        await pilot.press("ctrl+z")               # the candidates are back to plan with
        await pilot.pause()
        # An edit: the room's title, changed as the form would.
        await plan_and_apply()
        screen.apply(lambda s: setattr(s, "title", "Renamed"), "title")
        await pilot.pause()
        assert line() == AFTER_APPLIED
        # Redo after undo of an apply: also replaces it.
        await pilot.press("ctrl+z", "ctrl+z")     # the title, the plan
        await pilot.pause()
        await plan_and_apply()
        await pilot.press("ctrl+z", "ctrl+y")
        await pilot.pause()
        assert line() == AFTER_APPLIED
