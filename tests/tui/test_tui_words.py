"""Words a non-expert understands, in the interface: the strip of findings at 80 x 24 (errors
before warnings before cautions, each kind counted and visible)."""

from __future__ import annotations

import re

import pytest

from roomcalc.tui.app import AppConfig, make_app
from roomcalc.tui.document import Document
from roomcalc.tui.widgets.results import FindingsStrip

SMALL = (80, 24)


def _app(path, catalog):
    return make_app(Document.open(path), catalog,
                    AppConfig(offer_recovery=False, theme="textual-dark"))


async def _ready(pilot):
    for _ in range(100):
        await pilot.pause()
        if getattr(pilot.app.screen, "result", None) is not None:
            return
    raise AssertionError("no result on screen")


def _visible(strip: FindingsStrip) -> list[str]:
    """The strip's lines as the terminal shows them (drawn, past its border and padding)."""
    from textual.geometry import Region

    assert strip.scroll_y == 0
    drawn = strip.render_lines(Region(0, 0, strip.outer_size.width, strip.outer_size.height))
    lines = ["".join(seg.text for seg in line).strip() for line in drawn]
    return [line for line in lines[1:] if line.strip("━─ ")]      # past the top border


async def test_findings_strip_counts_and_shows_every_kind_at_80x24(room_file, catalog):
    """The workshop is loud (a hearing caution for each worker) and has warnings; a negative
    area adds errors. Folded, the strip shows the counts and a line of each kind, errors
    first; unfolded (Ctrl+E) it holds every item in full."""
    app = _app(room_file("workshop.toml"), catalog)
    async with app.run_test(size=SMALL) as pilot:
        await _ready(pilot)
        screen = app.screen
        strip = screen.query_one(FindingsStrip)
        res = screen.result
        loud = [c for c in res.cautions if c.startswith("'")]
        assert loud and res.warnings                      # the room as shipped has both
        shown = _visible(strip)                          # no errors: warnings, cautions
        assert shown[0].startswith(f"{len(res.warnings)} warning"), shown
        assert any(line.startswith("Warning:") for line in shown), shown
        assert any(line.startswith("CAUTION") for line in shown), shown

        def bad(spec):
            spec.surfaces[0].area = -5.0
            spec.surfaces[1].area = -6.0
        screen.apply(bad, "two bad areas")
        await pilot.pause()
        await pilot.pause()
        assert len(screen.problems) >= 2
        counts = strip.counts()
        assert counts == {"error": len(screen.problems), "warning": len(res.warnings),
                          "caution": len(loud)}
        shown = _visible(strip)
        want = (f"{len(screen.problems)} errors, "
                f"{len(res.warnings)} warning{'s' if len(res.warnings) != 1 else ''}, "
                f"{len(loud)} caution{'s' if len(loud) != 1 else ''}")
        assert shown[0].startswith(want), shown
        first = {k: next((i for i, line in enumerate(shown) if line.startswith(k)), None)
                 for k in ("Error:", "Warning:", "CAUTION")}
        assert None not in first.values(), shown          # one line of each kind is visible
        assert first["Error:"] < first["Warning:"] < first["CAUTION"], shown
        assert strip.region.bottom <= SMALL[1] and strip.size.height == len(shown)
        assert "Ctrl+E or click: all" in shown[0]

        await pilot.press("ctrl+e")
        await pilot.pause()
        full = " ".join(str(strip.render()).split())
        for p in screen.problems:
            assert " ".join(p.split()) in full
        for w in res.warnings:
            assert " ".join(w.message.split()) in full
        assert "hearing protection" in full
        assert strip.size.height > len(shown)
        await pilot.press("ctrl+e")
        await pilot.pause()
        assert _visible(strip) == shown


def _on_screen(widget, size) -> bool:
    r = widget.region
    return widget.display and r.height > 0 and r.bottom <= size[1] and r.right <= size[0]


async def _symbols_named(room_file, catalog, size):
    from roomcalc.present.glossary import SYMBOLS
    from roomcalc.tui.widgets.grid import CellGrid

    app = _app(room_file("garage-studio.toml"), catalog)
    async with app.run_test(size=size) as pilot:
        await _ready(pilot)
        screen = app.screen
        table = screen.query_one("#reverb-table", CellGrid)
        labels = [str(table.get_row_at(i)[0]).removeprefix("> ").strip()
                  for i in range(table.row_count)]
        # Every symbol on the rows is named in words on the tab: in a legend line under the
        # table (a half-screen pane), or in the row's own label (one column at 80x24, where
        # the legend's rows are the table's).
        legend = screen.query_one("#reverb-legend")
        shown = " ".join(str(legend.render()).split()) if _on_screen(legend, size) else ""
        found = set()
        for label in labels:
            rest = label
            for sym in sorted(SYMBOLS, key=len, reverse=True):    # "mean alpha" before "alpha"
                pattern = rf"(^|[ (]){re.escape(sym)}($|[ )])"
                if re.search(pattern, rest):
                    found.add(sym)
                    assert f"{sym}: {SYMBOLS[sym]}" in shown or SYMBOLS[sym] in label, \
                        (label, shown)
                    rest = re.sub(pattern, " ", rest)
        assert {"R", "mean alpha", "r_c", "f_S", "air"} <= found
        if not shown:
            assert size[0] < 100 and "critical distance" in " ".join(labels)

        await pilot.press("f7")                          # receivers: Lp and dB(A)
        await pilot.pause()
        legend = screen.query_one("#receiver-legend")
        assert _on_screen(legend, size), legend.region
        shown = str(legend.render())
        assert "Lp: sound level" in shown and "dB(A): A-weighted level" in shown

        await pilot.press("4")                           # sources: Lw, LwA, Q in their heads
        await pilot.pause()
        heads = [str(c.label) for c in
                 screen.query_one("#t-sources #table", CellGrid).columns.values()]
        assert any(h.startswith("sound power Lw ") for h in heads), heads
        assert any(h.startswith("sound power LwA [dB(A)]") for h in heads), heads
        assert "directivity Q" in heads, heads


async def test_symbols_named_in_words_120x40(room_file, catalog):
    await _symbols_named(room_file, catalog, (120, 40))


async def test_symbols_named_in_words_80x24(room_file, catalog):
    await _symbols_named(room_file, catalog, SMALL)


def test_help_explains_the_numbers():
    from roomcalc.tui.screens.help import HELP

    numbers = HELP.split("## The numbers", 1)[1]
    for words in ("room constant", "critical distance", "Schroeder", "directivity",
                  "sound power", "mean absorption"):
        assert words in numbers, words


async def test_typical_source_chosen_on_the_sources_tab(room_file, catalog, engine):
    """m on the Sources tab opens the typical sources for the highlighted row; Enter on one
    gives the row its level at 1 m, spectrum and placement, and the results follow (checked
    against the engine run on the room written as a file)."""
    from roomcalc.io.sources import typical_sources
    from roomcalc.tui.screens.sources import SourceChooser

    app = _app(room_file("classroom.toml"), catalog)
    async with app.run_test(size=(120, 40)) as pilot:
        await _ready(pilot)
        screen = app.screen
        await pilot.press("4")
        await pilot.pause()
        await pilot.press("m")
        await pilot.pause()
        chooser = app.screen
        assert isinstance(chooser, SourceChooser)
        title = str(chooser.query_one("#title").render())
        assert 'Sources row 1 "Teacher\'s voice"' in title
        details = str(chooser.query_one("#details").render())
        first = list(typical_sources().values())[0]
        assert first.name in details and "from memory" in details
        await pilot.press("down")                       # the raised voice
        await pilot.pause()
        assert "raised" in str(chooser.query_one("#details").render())
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen is screen
        s = screen.document.spec.sources[0]
        assert (s.level_dba_1m, s.spectrum, s.placement) == (66.5, "voice-raised", "free")
        res = engine.result(screen.document.spec)
        assert [r.level_dba for r in screen.result.receivers] == \
            [r.level_dba for r in res.receivers]
        detail = str(screen.query_one("#t-sources #row-detail").render())
        assert "66.5 dB(A) at 1 m, voice-raised spectrum" in detail
        await pilot.press("ctrl+z")                     # one undoable edit
        await pilot.pause()
        assert screen.document.spec.sources[0].level_dba_1m is None


async def test_level_at_1m_typed_in_the_sources_table(room_file, catalog, engine, pilot_keys):
    """The Sources table's "level at 1 m" cell takes a dB(A) figure (a decimal comma too); it
    replaces the sound power in dB(A), keeps the spectrum, and the results are the engine's
    for the room written as a file."""
    import math

    app = _app(room_file("classroom.toml"), catalog)
    async with app.run_test(size=(120, 40)) as pilot:
        await _ready(pilot)
        screen = app.screen
        await pilot.press("4")
        await pilot.pause()
        table = screen.query_one("#t-sources")
        col = [str(c.label) for c in table.query_one("#table").columns.values()] \
            .index("level at 1 m [dB(A)]")
        await pilot_keys.edit_cell(pilot, table, 0, col, "62,5")
        s = screen.document.spec.sources[0]
        assert (s.level_dba_1m, s.sound_power_dba, s.spectrum) == (62.5, None, "speech-male")
        res = engine.result(screen.document.spec)
        assert [r.level_dba for r in screen.result.receivers] == \
            [r.level_dba for r in res.receivers]
        # placement "free" (Q 1): LwA = 62.5 + 10 lg(4 pi) = 73.49 dB(A), hand computation.
        from roomcalc.engine.bands import a_weighted_total
        lw = screen.result.sources[0].sound_power_db
        assert float(a_weighted_total(lw, screen.result.bands_hz)) == \
            pytest.approx(62.5 + 10 * math.log10(4 * math.pi), abs=1e-9)
