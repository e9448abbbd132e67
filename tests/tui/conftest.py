"""Fixtures for the interface tests: copies of the example rooms, the engine's own numbers for a
room (computed from its file text, not from what the screen shows), and readers of the tables
on the screen.

The numbers the interface shows are checked against ``read_room`` + ``evaluate`` run on the room
written out as a file: the file path the command line uses, independent of the screen's code.
"""

from __future__ import annotations

import asyncio
import inspect
import shutil
from pathlib import Path
from types import SimpleNamespace

import pytest

from roomcalc.engine.analysis import METHOD_TITLES, evaluate
from roomcalc.io.errors import RoomFileError
from roomcalc.io.roomfile import check_room, read_room, spec_to_toml

EXAMPLES = Path(__file__).resolve().parents[2] / "example_rooms"


@pytest.hookimpl(tryfirst=True)
def pytest_pyfunc_call(pyfuncitem):
    """Run ``async def`` tests in a fresh event loop (no async plugin is needed for the few
    Pilot tests here)."""
    if inspect.iscoroutinefunction(pyfuncitem.obj):
        names = pyfuncitem._fixtureinfo.argnames
        asyncio.run(pyfuncitem.obj(**{n: pyfuncitem.funcargs[n] for n in names}))
        return True
    return None


@pytest.fixture
def room_file(tmp_path):
    """``room_file("classroom.toml")``: a copy of an example room in a temporary folder."""
    def copy(name: str = "classroom.toml") -> Path:
        dst = tmp_path / "rooms" / name
        dst.parent.mkdir(exist_ok=True)
        shutil.copyfile(EXAMPLES / name, dst)
        return dst
    return copy


@pytest.fixture
def engine(tmp_path, catalog):
    """The engine's result for a spec, by way of a file: the spec is written as TOML, read back
    with ``read_room`` and evaluated (what ``roomcalc report`` does)."""
    counter = iter(range(10_000))

    def result(spec):
        path = tmp_path / "engine" / f"room-{next(counter)}.toml"
        path.parent.mkdir(exist_ok=True)
        path.write_text(spec_to_toml(spec), encoding="utf-8")
        spec, room = read_room(path, catalog)
        return evaluate(room, method=spec.method_in_force)     # the formula the file chooses

    def rt_text(res, band: int = 500, method: str | None = None) -> str:
        """The RT of ``method`` (default: the one in force) at ``band``, as the table shows
        it (2 decimals)."""
        k = method or res.method
        return f"{float(res.rt60_s[k][list(res.bands_hz).index(band)]):.2f}"

    def problems(spec) -> list:
        """The room check's problems (``where``, ``message``) for a spec that does not pass it,
        the same check a file gets."""
        with pytest.raises(RoomFileError) as info:
            check_room(spec, catalog, "x")
        return list(info.value.problems)

    return SimpleNamespace(result=result, rt_text=rt_text, problems=problems,
                           titles=METHOD_TITLES)


def _cells(table, row: int) -> list[str]:
    return [str(c) for c in table.get_row_at(row)]


@pytest.fixture
def screen_tables():
    """Readers of what the screen shows."""
    from roomcalc.tui.widgets.grid import CellGrid

    def reverb(app) -> dict:
        """The reverberation table: {"in_force": (title, {band: text}), "rows": {label:
        {band: text}}, "headings": [...]}."""
        t = app.screen.query_one("#reverb-table", CellGrid)
        keys = list(t.columns)
        rows, rec = {}, None
        for i in range(t.row_count):
            cells = _cells(t, i)
            label = cells[0]
            by_band = {int(k): v for k, v in zip(keys[1:], cells[1:]) if k.isdigit()}
            rows[label.removeprefix("> ").strip()] = by_band
            if label.startswith("> "):
                assert rec is None, "two rows are marked as in force"
                rec = (label[2:].strip(), by_band)
        return {"in_force": rec, "rows": rows,
                "headings": [str(c.label) for c in t.columns.values()]}

    def records(app, coll: str) -> list[list[str]]:
        t = app.screen.query_one(f"#t-{coll} #table", CellGrid)
        return [_cells(t, i) for i in range(t.row_count)]

    def text(app, selector: str) -> str:
        return str(app.screen.query_one(selector).render())

    return SimpleNamespace(reverb=reverb, records=records, text=text, CellGrid=CellGrid,
                           title=lambda app: str(app.screen.query_one("#titlebar").content))


@pytest.fixture
def pilot_keys():
    """Helpers that drive the keyboard."""
    async def edit_cell(pilot, coll_table, row: int, column: int, text: str | None,
                        submit: bool = True):
        """Move the cursor of a record table to (row, column), press Enter, clear the editor
        line, type ``text`` and press Enter."""
        table = coll_table.query_one("#table")
        table.focus()
        await pilot.pause()
        table.move_cursor(row=row, column=column, animate=False)
        await pilot.pause()
        await pilot.press("enter")
        await pilot.pause()
        if text is None:
            return
        await pilot.press("end", "ctrl+u")
        if text:
            await pilot.press(*text)
        await pilot.pause()
        if submit:
            await pilot.press("enter")
            await pilot.pause()

    async def type_words(pilot, words: str):
        await pilot.press(*words)
        await pilot.pause()

    return SimpleNamespace(edit_cell=edit_cell, type_words=type_words)


@pytest.fixture
def record_notes():
    """``notes = record_notes(app)``: every notice the app shows from then on, as (text,
    severity), in a list that fills as the test runs."""
    def record(app) -> list[tuple[str, str]]:
        seen = []
        original = app.notify

        def notify(message, *args, **kw):
            seen.append((str(message), kw.get("severity", "information")))
            return original(message, *args, **kw)
        app.notify = notify
        return seen
    return record
