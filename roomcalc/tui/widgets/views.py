"""The result views, one per tab on the right of the main screen: reverberation, level against
distance, receivers, before/after. Each is told what to show through ``show`` (what the core
computed, and the text the screen chose); a choice the user makes in a view goes up as a
message. They never compute acoustics and never import a screen or the app."""

from __future__ import annotations

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.widgets import Select, Static

from roomcalc.engine.analysis import METHOD_TITLES, Comparison, RoomResult
from roomcalc.io.units import METRIC, Units
from roomcalc.present.glossary import legend
from roomcalc.tui.widgets.plots import DistancePlot, RtPlot
from roomcalc.tui.widgets.results import CompareTable, ReceiverTable, ReverbTable

NO_RECEIVERS = "No receivers with sources yet: add them in the Sources and Receivers tabs."
#: What the symbols of each view stand for, shown under its table (F1 says more).
REVERB_LEGEND = legend(["RT60", "R", "mean alpha", "r_c", "f_S", "air"]) + " (F1: more)"
RECEIVERS_LEGEND = (legend(["Lp", "dB(A)"]) + "; direct: straight from the sources; "
                    "reverberant: from the room's reflections")
NO_PIN = ("Press p to pin the room as it is now as \"before\"; then edit it and compare "
          "here.")


class ResultView(Vertical):
    """A result tab's widget. It says when it is mounted (``Ready``): a hidden tab is mounted
    after the first screen, and its tab may be shown before that."""

    class Ready(Message):
        def __init__(self, view: "ResultView") -> None:
            super().__init__()
            self.view = view

        @property
        def control(self) -> "ResultView":
            return self.view

    def on_mount(self) -> None:
        self.post_message(self.Ready(self))


class ResultLegend(Static):
    """A legend line under a result table: each symbol in words."""

    DEFAULT_CSS = "ResultLegend { padding: 0 1; color: $text-muted; height: auto; }"


class ReverbView(ResultView):
    """RT by every method and the room's figures (a table), and RT against band (a plot)."""

    def compose(self) -> ComposeResult:
        yield ReverbTable(id="reverb-table")
        yield ResultLegend(REVERB_LEGEND, id="reverb-legend", markup=False)
        yield RtPlot(id="rt-plot")

    #: From this width on (one column, a small screen) the table's labels name their symbols
    #: in words and the legend line goes: the rows it took are the table's.
    WORDED_FROM = 76

    def __init__(self, *, id: str | None = None, classes: str | None = None) -> None:
        super().__init__(id=id, classes=classes)
        self._last = None
        self._worded = False

    def show(self, res: RoomResult, units: Units = METRIC, stale: bool = False) -> None:
        self._last = (res, units)
        self.query_one(ReverbTable).show(res, units, worded=self._worded)
        self.query_one(RtPlot).show(res, stale)

    def on_resize(self) -> None:
        worded = self.size.width >= self.WORDED_FROM
        if worded != self._worded:
            self._worded = worded
            self.query_one("#reverb-legend").display = not worded
            if self._last is not None:
                self.query_one(ReverbTable).show(*self._last, worded=worded)


class DistanceView(ResultView):
    """Level against distance for the source and band picked in its two lists."""

    class Chosen(Message):
        """The user picked another source or band: ``source`` (a name or None) and ``band``
        (a band centre [Hz], or None for dB(A))."""

        def __init__(self, view: "DistanceView", source: str | None, band: int | None) -> None:
            super().__init__()
            self.view, self.source, self.band = view, source, band

        @property
        def control(self) -> "DistanceView":
            return self.view

    def __init__(self, *, id: str | None = None, classes: str | None = None) -> None:
        super().__init__(id=id, classes=classes)
        self._offered = None            # the sources and bands the lists hold

    def compose(self) -> ComposeResult:
        with Horizontal(id="distance-controls"):
            yield Select([], prompt="source", id="dist-source", allow_blank=True)
            yield Select([], prompt="band", id="dist-band", allow_blank=True)
        yield DistancePlot(id="distance-plot")

    def offer(self, sources: list[str], bands) -> None:
        """Fill the two lists (only when the sources or bands changed), keeping the picked
        source and band where they are still there (else the first source and dB(A))."""
        key = (tuple(sources), tuple(bands))
        if self._offered == key:
            return
        self._offered = key
        src = self.query_one("#dist-source", Select)
        band = self.query_one("#dist-band", Select)
        with self.prevent(Select.Changed):
            old = src.value
            src.set_options([(Text(n), n) for n in sources])     # a name is not markup
            if sources:
                src.value = old if old in sources else sources[0]
            oldb = band.value
            opts = [("dB(A)", "dBA")] + [(f"{b:g} Hz", str(b)) for b in bands]
            band.set_options(opts)
            band.value = oldb if oldb in [o[1] for o in opts] else "dBA"

    @property
    def choice(self) -> tuple[str | None, int | None]:
        """The picked source's name (None: none) and band centre [Hz] (None: dB(A))."""
        src = self.query_one("#dist-source", Select).value
        band = self.query_one("#dist-band", Select).value
        return (src if isinstance(src, str) else None,
                None if band in ("dBA", Select.NULL) else int(band))

    @on(Select.Changed, "#dist-source, #dist-band")
    def _chosen(self, event: Select.Changed) -> None:
        event.stop()
        self.post_message(self.Chosen(self, *self.choice))

    def show(self, curves: dict, band_index: int | None, bands, receivers: list,
             length_label: str = "m", length_factor: float = 1.0, stale: bool = False,
             source: str = "") -> None:
        """Draw the curves of one source (see ``DistancePlot.show``)."""
        self.query_one(DistancePlot).show(curves, band_index, bands, receivers, length_label,
                                          length_factor, stale, source)

    def show_message(self, text: str) -> None:
        self.query_one(DistancePlot).show_message(text)


class ReceiversView(ResultView):
    """The level at each receiver, and under it a note: the daily exposure, when given."""

    def compose(self) -> ComposeResult:
        yield ReceiverTable(id="receiver-table")
        yield ResultLegend(RECEIVERS_LEGEND, id="receiver-legend", markup=False)
        yield Static("", id="receiver-note")

    def show(self, res: RoomResult, exposure_text: str = "") -> None:
        self.query_one(ReceiverTable).show(res)
        note = "" if res.receivers else NO_RECEIVERS
        if exposure_text:
            note = (note + "\n" if note else "") + exposure_text
        self.query_one("#receiver-note", Static).update(note)


class CompareView(ResultView):
    """Before and after: a heading, the table, and the comparison's notes."""

    def compose(self) -> ComposeResult:
        yield Static("", id="compare-head")
        yield CompareTable(id="compare-table")
        yield Static("", id="compare-notes", markup=False)

    def show(self, cmp: Comparison, stale: bool = False) -> None:
        """Show a comparison (the RT rows by the method in force before)."""
        table = self.query_one(CompareTable)
        table.display = True
        table.show(cmp, cmp.method)
        self.query_one("#compare-head", Static).update(
            f"Before: pinned room   After: the room now{'  (stale)' if stale else ''}   "
            f"negative = shorter or quieter   RT60 by {METHOD_TITLES[cmp.method]} "
            f"(in force before); RT60 = reverberation time")
        self.query_one("#compare-notes", Static).update("\n".join(f"- {n}" for n in cmp.notes))

    def show_message(self, text: str = NO_PIN) -> None:
        """No comparison: say why (by default: nothing is pinned yet)."""
        self.query_one("#compare-head", Static).update(text)
        self.query_one(CompareTable).display = False
        self.query_one("#compare-notes", Static).update("")
