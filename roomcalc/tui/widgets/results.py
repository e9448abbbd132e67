"""Widgets that show results: per-band tables, receiver levels, before/after, and the strip of
warnings and cautions. They are told what to show; they never compute."""

from __future__ import annotations

from rich.text import Text
from textual.widgets import Static

from roomcalc.tui.widgets.grid import CellGrid

from roomcalc.engine.analysis import METHOD_TITLES, METHODS, Comparison, RoomResult
from roomcalc.io.units import METRIC, Units
from roomcalc.present.glossary import SYMBOLS, named
from roomcalc.present.numbers import fmt


class BandTable(CellGrid):
    """A table with one row per quantity and one column per octave band."""

    DEFAULT_CSS = "BandTable { height: auto; max-height: 100%; }"

    def __init__(self, *, extra: str | None = None, id: str | None = None) -> None:
        super().__init__(cursor_type="row", zebra_stripes=True, show_row_labels=False, id=id)
        self.headings = True
        self.extra = extra
        self._bands: tuple = ()

    def _columns(self, bands, first: str) -> None:
        self._pending: list[list[str]] = []
        self._pending_styles: list[str] = []
        if bands == self._bands and self.columns and self.columns["label"].label == first:
            return
        self.clear(columns=True)
        # The labels may be cut (with an ellipsis) so that every band fits the pane; the
        # numbers are packed one blank apart.
        self.add_column(first, key="label", shrink_to=12)
        for b in bands:
            self.add_column(f"{b:g}" if b < 1000 else f"{b / 1000:g}k", key=str(b),
                            justify="right", pad=(1, 0))
        if self.extra:
            self.add_column(self.extra, key="extra", justify="right", pad=(2, 1))
        self.keep_in_view = len(self.columns)
        self._bands = bands

    def _row(self, label, values, nd=2, extra=None, style: str = "") -> None:
        cells = [label] + [fmt(float(v), nd) for v in values]
        if self.extra:
            cells.append("" if extra is None else fmt(extra, 1))
        self._pending.append(cells)
        self._pending_styles.append(style)

    def _heading(self, label: str) -> None:
        """A row with a label and no numbers, heading the rows under it (its label runs on
        over the empty cells when it is longer than the label column)."""
        self._pending.append([label] + [""] * (len(self.columns) - 1))
        self._pending_styles.append("bold")

    def _flush(self) -> None:
        """Show the rows collected since _columns; only rows that differ are drawn again."""
        self.set_rows(self._pending, styles=self._pending_styles)


class ReverbTable(BandTable):
    """RT by every method (the one in force marked), room constant, critical distance,
    Schroeder frequency."""

    def show(self, res: RoomResult, units: Units = METRIC, worded: bool = False) -> None:
        """``worded``: each label names its symbol in words ("room constant R [m^2]"), for a
        pane wide enough that no legend line is needed under the table."""
        self._columns(res.bands_hz, "reverberation time RT60 [s]" if worded else "RT60 [s]")
        for k in METHODS:
            if k in res.rt60_s:
                rec = k == res.method
                self._row(("> " if rec else "  ") + METHOD_TITLES[k], res.rt60_s[k],
                          style="bold" if rec else "")
        area, length = units.area_label, units.length_label
        self._row(f"{named('R')} [{area}]" if worded else f"R [{area}]",
                  res.room_constant_m2 / units.area, 1)
        self._row(f"{SYMBOLS['mean alpha']} (mean alpha)" if worded else "mean alpha",
                  res.mean_alpha, 3)
        for s in res.sources:
            name = s.name if len(s.name) <= 12 else s.name[:11] + "\u2026"
            self._row(f"{named('r_c') if worded else 'r_c'} {name} [{length}]",
                      s.critical_distance_m / units.length)
        self._row(f"{named('f_S')} [Hz]" if worded else "f_S [Hz]", res.schroeder_hz, 0)
        self._row(f"{SYMBOLS['air']} [dB/km]" if worded else "air [dB/km]",
                  res.air_attenuation_db_per_m * 1000.0, 1)
        self._flush()


class ReceiverTable(BandTable):
    """Level at each receiver per band and in dB(A), with the direct and reverberant parts."""

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(extra="dB(A)", id=id)

    def show(self, res: RoomResult) -> None:
        self._columns(res.bands_hz, "Lp [dB]")
        for r in res.receivers:
            self._row(r.name, r.level_db, 1, r.level_dba, style="bold")
            self._row("  direct", r.direct_db, 1, r.direct_dba)
            self._row("  reverberant", r.reverberant_db, 1, r.reverberant_dba)
        self._flush()


class CompareTable(BandTable):
    """Before and after: RT by one method, reverberant-field change, receivers' levels."""

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(extra="dB(A)", id=id)

    def show(self, cmp: Comparison, method: str) -> None:
        b, a = cmp.before, cmp.after
        self._columns(b.bands_hz, "before / after")
        # Short labels under a heading row each (the method is named in the line above the
        # table), so that every band and dB(A) fit a half-screen pane.
        self._heading(f"RT60 {METHOD_TITLES[method]} [s]")
        self._row("  before", b.rt60_s[method])
        self._row("  after", a.rt60_s[method], style="bold")
        self._row("  change", a.rt60_s[method] - b.rt60_s[method])
        # A change like the rows around it (negative = quieter), not the reduction (+0.0 so
        # that no change shows as 0.0, not -0.0).
        self._heading("Reverberant level [dB]")
        self._row("  change", -cmp.reverberant_reduction_db + 0.0, 1)
        before = {r.name: r for r in b.receivers}
        after = {r.name: r for r in a.receivers}
        for c in cmp.receivers:
            self._heading(f"{c.name} [dB]")
            self._row("  before", before[c.name].level_db, 1, before[c.name].level_dba)
            self._row("  after", after[c.name].level_db, 1, after[c.name].level_dba,
                      style="bold")
            self._row("  change", c.level_change_db, 1, c.level_change_dba)
        self._flush()


SHORT_CAUTION = (
    "80 dB(A) or more can damage hearing over a working day (EU 2003/10/EC action values 80 and "
    "85 dB(A), limit 87; OSHA 29 CFR 1910.95 limit 90 dBA, action level 85). Wear hearing "
    "protection. These estimates do not replace a measurement by a competent person; local "
    "regulations govern.")


def count_text(n: int, word: str) -> str:
    """ "1 error", "2 errors"."""
    return f"{n} {word}{'' if n == 1 else 's'}"


class FindingsStrip(Static):
    """Errors, warnings and cautions about the room, in words, where they cannot be missed.

    Errors come first, then warnings, then cautions; the first line counts each kind. Folded
    (the default) the strip keeps its height and gives every kind present at least one line
    (an item cut short ends in "..."), so that no caution hides an error; unfolded (a click,
    or :meth:`toggle`) it shows every item in full and scrolls.
    """

    DEFAULT_CSS = """
    FindingsStrip { height: auto; max-height: 7; padding: 0 1; border-top: solid $warning;
                    overflow-y: auto; }
    FindingsStrip.has-caution { border-top: heavy $error; }
    FindingsStrip.has-problems { border-top: heavy $error; }
    """
    #: Most of the screen the unfolded strip takes.
    UNFOLDED_MAX_HEIGHT = "60%"
    #: How the strip says that it can be unfolded, and folded again.
    UNFOLD_HINT = "Ctrl+E or click: all"
    FOLD_HINT = "Ctrl+E or click: fold"

    expanded = False
    _args: tuple | None = None

    def show(self, res: RoomResult | None, problems: list[str], stale: bool) -> None:
        self._args = (res, list(problems), stale)
        self._draw()

    def toggle(self) -> None:
        """Unfold (every item in full, scrolling) or fold back."""
        self.expanded = not self.expanded
        self.styles.max_height = self.UNFOLDED_MAX_HEIGHT if self.expanded else None
        self.set_class(self.expanded, "expanded")
        self._last_plain = None
        self._draw()

    def on_click(self) -> None:
        self.toggle()

    def on_resize(self) -> None:
        self._last_plain = None
        self._draw()

    def kinds(self) -> list[tuple[str, list[tuple[str, str]]]]:
        """The findings shown, by kind in the order shown: (word, [(text, style)])."""
        if self._args is None:
            return []
        res, problems, _stale = self._args
        errors = [(f"Error: {p}", "bold") for p in problems]
        warnings, cautions = [], []
        if res is not None:
            warnings = [(f"Warning: {w.message}", "") for w in res.warnings]
            loud = [c for c in res.cautions if c.startswith("'")]
            if loud:
                cautions = [("CAUTION " + " ".join(c.rstrip(".") + ";" for c in loud)
                             .rstrip(";") + ": " + SHORT_CAUTION, "bold")]
        return [("error", errors), ("warning", warnings), ("caution", cautions)]

    def counts(self) -> dict[str, int]:
        """How many of each kind: errors, warnings, cautions (one per loud receiver)."""
        out = {}
        for word, items in self.kinds():
            if word == "caution" and self._args and self._args[0] is not None:
                out[word] = sum(c.startswith("'") for c in self._args[0].cautions)
            else:
                out[word] = len(items)
        return out

    def _lines_budget(self) -> int | None:
        """Lines of text the folded strip shows (its most height less the border)."""
        mh = self.styles.max_height
        try:
            if mh is not None and mh.unit.name == "CELLS":
                return max(1, int(mh.value) - 1)
        except AttributeError:
            pass
        return None

    def _draw(self) -> None:
        if self._args is None:
            return
        res, problems, stale = self._args
        kinds = [(w, items) for w, items in self.kinds() if items]
        counts = self.counts()
        width = self.size.width
        console = self.app.console
        head = ", ".join(count_text(counts[w], w) for w, _ in kinds)
        body: list[Text] = []
        hidden = False
        budget = None if self.expanded or not width else self._lines_budget()
        if budget is not None:
            budget -= 1                                 # the line of counts
            spare = budget - len(kinds)                 # past one line for each kind
            for word, items in kinds:
                for n, (item, style) in enumerate(items):
                    lines = Text(item, style=style).wrap(console, width)
                    room = (1 if n == 0 else 0) + max(spare, 0)
                    if room <= 0:
                        hidden = True
                        break
                    take = min(len(lines), room)
                    spare -= take - (1 if n == 0 else 0)
                    kept = list(lines[:take])
                    if take < len(lines):
                        hidden = True
                        last = kept[-1].copy()
                        last.rstrip()
                        last.truncate(max(1, min(len(last), width - 4)))
                        last.append(" ...")
                        kept[-1] = last
                    body.append(Text("\n").join(kept))
        else:
            body = [Text(item, style=style) for _, items in kinds for item, style in items]
        text = Text()
        if head:
            text.append(head, style="bold")
            if hidden or self.expanded:
                text.append(f" ({self.UNFOLD_HINT if hidden else self.FOLD_HINT})")
            if problems:
                # (short: the line is cut at the screen's width)
                text.append(" - not computed: fix the errors"
                            + ("; shown: the last valid room" if stale else ""))
        else:
            text.append("No errors, warnings or cautions.")
        if budget is not None:
            text.truncate(width * 1, overflow="ellipsis")     # the counts stay one line
        for part in body:
            text.append("\n")
            text.append_text(part)
        for on, name in ((bool(problems), "has-problems"),
                         (bool(res is not None and res.cautions), "has-caution")):
            if self.has_class(name) != on:
                self.set_class(on, name)
        if text.plain != getattr(self, "_last_plain", None):
            self._last_plain = text.plain
            # A layout of the screen only when the strip's height changes.
            lines = len(text.wrap(console, width)) if width else None
            same = lines is not None and lines == getattr(self, "_last_lines", None)
            self._last_lines = lines
            self.update(text, layout=not same)
