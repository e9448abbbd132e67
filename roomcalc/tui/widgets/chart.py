"""A line chart drawn in braille dots: series, a log or band axis, marker lines and points.

The chart is laid out once per change of data or size and kept as lines; drawing the screen
only hands those lines out. Colours come from the theme through component classes
(``chart--series-0`` ...), never from fixed values.

Layout, top to bottom: the title; the plot area with y tick labels on its left; the x axis;
the x tick labels with the x axis label; the legend.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import ClassVar

import numpy as np
from rich.segment import Segment
from rich.style import Style
from textual.strip import Strip
from textual.widget import Widget

N_SERIES_STYLES = 6
Y_LABEL_WIDTH = 7
# Braille dot bits: _DOT[row][column] for the 2 x 4 dots of one character cell.
_DOT = ((0x01, 0x08), (0x02, 0x10), (0x04, 0x20), (0x40, 0x80))


@dataclass
class Series:
    label: str
    x: list[float]
    y: list[float]
    heavy: bool = False          # drawn in bold (the method used, the total)


@dataclass
class ChartData:
    """What to draw. ``x_ticks`` are (value, label); on a log axis the x values are > 0."""

    title: str = ""
    series: list[Series] = field(default_factory=list)
    x_ticks: list[tuple[float, str]] = field(default_factory=list)
    x_label: str = ""
    y_label: str = ""
    x_log: bool = False
    x_range: tuple[float, float] | None = None
    y_range: tuple[float, float] | None = None
    vlines: list[tuple[float, str]] = field(default_factory=list)
    points: list[tuple[float, float, str]] = field(default_factory=list)
    message: str = ""            # shown instead of a plot when there is nothing to draw


def nice_ticks(lo: float, hi: float, most: int = 5) -> list[float]:
    """Round tick values (1, 2 or 5 times a power of ten) covering [lo, hi]."""
    if not (math.isfinite(lo) and math.isfinite(hi)) or hi <= lo:
        return [lo]
    raw = (hi - lo) / max(1, most - 1)
    mag = 10 ** math.floor(math.log10(raw))
    step = next(m * mag for m in (1, 2, 5, 10) if m * mag >= raw)
    first = math.ceil(lo / step - 1e-9) * step
    ticks = []
    t = first
    while t <= hi + 1e-9 * step:
        ticks.append(round(t, 10))
        t += step
    return ticks


def log_ticks(lo: float, hi: float) -> list[float]:
    """1-2-5 ticks per decade inside [lo, hi] (lo > 0)."""
    out = []
    for e in range(math.floor(math.log10(lo)), math.ceil(math.log10(hi)) + 1):
        for m in (1, 2, 5):
            v = m * 10.0 ** e
            if lo <= v <= hi:
                out.append(v)
    return out


class Chart(Widget):
    COMPONENT_CLASSES: ClassVar[set[str]] = {
        *(f"chart--series-{i}" for i in range(N_SERIES_STYLES)),
        "chart--axis", "chart--title", "chart--marker", "chart--point",
    }

    DEFAULT_CSS = """
    Chart {
        height: 1fr;
        min-height: 8;
        background: $surface;
        color: $foreground;
        & > .chart--series-0 { color: $primary; }
        & > .chart--series-1 { color: $secondary; }
        & > .chart--series-2 { color: $accent; }
        & > .chart--series-3 { color: $success; }
        & > .chart--series-4 { color: $warning; }
        & > .chart--series-5 { color: $error; }
        & > .chart--axis { color: $text-muted; }
        & > .chart--title { text-style: bold; }
        & > .chart--marker { color: $error; }
        & > .chart--point { color: $foreground; text-style: bold; }
    }
    """

    def __init__(self, *, id: str | None = None, classes: str | None = None) -> None:
        super().__init__(id=id, classes=classes)
        self.data = ChartData()
        self._lines: list[Strip] | None = None
        self._laid_out_for: tuple | None = None
        self._comp: dict[str, Style] | None = None

    def show_data(self, data: ChartData) -> None:
        self.data = data
        self._lines = None
        self.refresh()

    def notify_style_update(self) -> None:
        super().notify_style_update()
        self._lines = None
        self._comp = None

    def render_line(self, y: int) -> Strip:
        w, h = self.size
        if self._lines is None or self._laid_out_for != (w, h):
            self._lines = self._layout(w, h)
            self._laid_out_for = (w, h)
        return self._lines[y] if 0 <= y < len(self._lines) else Strip.blank(w, self.rich_style)

    # ------------------------------------------------------------------ layout
    def _layout(self, w: int, h: int) -> list[Strip]:
        if self._comp is None:          # the theme's styles, kept until they change
            base = self.rich_style
            self._comp = {name: base + self.get_component_rich_style(name, partial=True)
                          for name in self.COMPONENT_CLASSES}
            self._comp[""] = base
        comp = self._comp
        base = comp[""]
        grid = _Grid(w, h, base)
        d = self.data
        grid.text(max(0, (w - len(d.title)) // 2), 0, d.title[:w], comp["chart--title"])
        px0 = Y_LABEL_WIDTH + 1                 # first plot column
        legend = _wrap_legend([s.label for s in d.series], w, 2 if h >= 12 else 1)
        pw, ph = w - px0 - 1, h - 3 - len(legend)   # plot size in cells
        if d.message or not d.series or pw < 4 or ph < 2:
            msg = d.message or ("" if d.series else "Nothing to plot.")
            grid.text(max(0, (w - len(msg)) // 2), h // 2, msg[:w], base)
            return grid.strips()

        fx = (lambda v: math.log10(v)) if d.x_log else (lambda v: float(v))
        xs_all = [v for s in d.series for v in s.x]
        x_lo, x_hi = d.x_range or (min(xs_all), max(xs_all))
        ys_all = [v for s in d.series for v in s.y if math.isfinite(v)]
        y_lo, y_hi = d.y_range or (min(ys_all), max(ys_all))
        if y_hi <= y_lo:
            y_lo, y_hi = y_lo - 1.0, y_hi + 1.0
        X0, X1 = fx(x_lo), fx(x_hi)
        if X1 <= X0:
            X0, X1 = X0 - 0.5, X1 + 0.5
        dots_w, dots_h = 2 * pw, 4 * ph

        def to_dot(x, y):
            cx = (fx(x) - X0) / (X1 - X0) * (dots_w - 1)
            cy = (y_hi - y) / (y_hi - y_lo) * (dots_h - 1)
            return cx, cy

        # Axes and tick labels.
        axis = comp["chart--axis"]
        for row in range(ph):
            grid.text(px0 - 1, 1 + row, "│", axis)
        grid.text(px0 - 1, 1 + ph, "└" + "─" * pw, axis)
        for t in nice_ticks(y_lo, y_hi, max(2, min(5, ph // 2 + 1))):
            _, cy = to_dot(x_lo, t)
            row = 1 + int(round(cy)) // 4
            if 1 <= row <= ph:
                grid.text(0, row, f"{t:>{Y_LABEL_WIDTH - 1}.4g}"[:Y_LABEL_WIDTH - 1], axis)
                grid.text(px0 - 1, row, "┤", axis)
        ticks = d.x_ticks or [(v, f"{v:g}") for v in
                              (log_ticks(x_lo, x_hi) if d.x_log else nice_ticks(x_lo, x_hi))]
        last_end = -1
        for v, label in ticks:
            cx, _ = to_dot(v, y_lo)
            col = px0 + int(round(cx)) // 2
            if px0 <= col < px0 + pw:
                grid.text(col, 1 + ph, "┴", axis)
                start = max(px0, min(col - len(label) // 2, w - len(label)))
                if start > last_end:
                    grid.text(start, 2 + ph, label, axis)
                    last_end = start + len(label)
        if d.x_label and last_end + 2 + len(d.x_label) <= w:
            grid.text(w - len(d.x_label), 2 + ph, d.x_label, axis)
        if d.y_label:
            grid.text(0, 0, d.y_label[:max(0, (w - len(d.title)) // 2 - 1)], axis)

        # Marker lines (under the series), series, points.
        canvas = _Braille(pw, ph)
        for v, label in d.vlines:
            if not (x_lo <= v <= x_hi):
                continue
            cx, _ = to_dot(v, y_lo)
            canvas.vline(int(round(cx)), "chart--marker")
            col = px0 + int(round(cx)) // 2
            grid_label = label[:max(0, w - col - 1)]
            canvas.reserve_text(col - px0 + 1, 0, grid_label)
        for i, s in enumerate(d.series):
            pts = [to_dot(x, y) for x, y in zip(s.x, s.y) if math.isfinite(y)
                   and (not d.x_log or x > 0)]
            canvas.polyline(pts, f"chart--series-{i % N_SERIES_STYLES}", s.heavy)
        canvas.paint(grid, px0, 1, comp)
        for v, label in d.vlines:
            if x_lo <= v <= x_hi:
                cx, _ = to_dot(v, y_lo)
                col = px0 + int(round(cx)) // 2 + 1
                grid.text(col, 1, label[:max(0, w - col)], comp["chart--marker"])
        for x, y, label in d.points:
            if not (x_lo <= x <= x_hi and y_lo <= y <= y_hi) or (d.x_log and x <= 0):
                continue
            cx, cy = to_dot(x, y)
            col, row = px0 + int(round(cx)) // 2, 1 + int(round(cy)) // 4
            grid.text(col, row, "x", comp["chart--point"])
            grid.text(col + 1, row, label[:max(0, w - col - 1)], comp["chart--point"])

        # Legend.
        for row, items in enumerate(legend):
            col = 1
            for i in items:
                s = d.series[i]
                item = f"━ {s.label}"
                style = comp[f"chart--series-{i % N_SERIES_STYLES}"]
                grid.text(col, h - len(legend) + row, item,
                          style + Style(bold=True) if s.heavy else style)
                col += len(item) + 2
        return grid.strips()


def _wrap_legend(labels: list[str], width: int, most_rows: int) -> list[list[int]]:
    """Series indices per legend row (``"━ label"`` items two apart), at most ``most_rows``
    rows; what does not fit is left out."""
    rows: list[list[int]] = [[]]
    col = 1
    for i, label in enumerate(labels):
        n = len(label) + 2
        if col + n > width and rows[-1]:
            if len(rows) == most_rows:
                break
            rows.append([])
            col = 1
        if col + n <= width:
            rows[-1].append(i)
            col += n + 2
    return rows


class _Grid:
    """A character grid with a style per cell, turned into strips."""

    def __init__(self, w: int, h: int, base: Style) -> None:
        self.w, self.h, self.base = w, h, base
        self.chars = [[" "] * w for _ in range(h)]
        self.styles: list[list[Style]] = [[base] * w for _ in range(h)]

    def text(self, x: int, y: int, text: str, style: Style) -> None:
        if not (0 <= y < self.h):
            return
        for i, ch in enumerate(text):
            if 0 <= x + i < self.w:
                self.chars[y][x + i] = ch
                self.styles[y][x + i] = style

    def strips(self) -> list[Strip]:
        out = []
        for chars, styles in zip(self.chars, self.styles):
            segs, run, style = [], [], None
            for ch, st in zip(chars, styles):
                if st is not style and run:
                    segs.append(Segment("".join(run), style))
                    run = []
                style = st
                run.append(ch)
            if run:
                segs.append(Segment("".join(run), style))
            out.append(Strip(segs, self.w))
        return out


class _Braille:
    """Dots on a grid of 2 x 4 per character cell; each cell takes the style of the last series
    that drew in it."""

    _BITS = np.array(_DOT, dtype=np.int32)        # [row % 4, column % 2]

    def __init__(self, w: int, h: int) -> None:
        self.w, self.h = w, h
        self.bits = np.zeros((h, w), dtype=np.int32)
        self.owner = np.full((h, w), -1, dtype=np.int32)
        self.names: list[tuple[str, bool]] = []
        self.blocked: set[tuple[int, int]] = set()

    def _dots(self, xs: np.ndarray, ys: np.ndarray, name: str, heavy: bool) -> None:
        xi = np.rint(xs).astype(int)
        yi = np.rint(ys).astype(int)
        ok = (xi >= 0) & (xi < 2 * self.w) & (yi >= 0) & (yi < 4 * self.h)
        xi, yi = xi[ok], yi[ok]
        rows, cols = yi // 4, xi // 2
        np.bitwise_or.at(self.bits, (rows, cols), self._BITS[yi % 4, xi % 2])
        self.names.append((name, heavy))
        self.owner[rows, cols] = len(self.names) - 1

    def polyline(self, pts: list[tuple[float, float]], name: str, heavy: bool) -> None:
        if not pts:
            return
        xs, ys = [np.array([pts[0][0]])], [np.array([pts[0][1]])]
        for (x0, y0), (x1, y1) in zip(pts, pts[1:]):
            n = int(max(abs(x1 - x0), abs(y1 - y0))) + 2
            t = np.linspace(0.0, 1.0, n)
            xs.append(x0 + (x1 - x0) * t)
            ys.append(y0 + (y1 - y0) * t)
        self._dots(np.concatenate(xs), np.concatenate(ys), name, heavy)

    def vline(self, x: int, name: str) -> None:
        ys = np.arange(0, 4 * self.h, 2, dtype=float)       # dotted
        self._dots(np.full(ys.shape, float(x)), ys, name, False)

    def reserve_text(self, x: int, y: int, text: str) -> None:
        for i in range(len(text)):
            self.blocked.add((y, x + i))

    def paint(self, grid: _Grid, x0: int, y0: int, comp: dict[str, Style]) -> None:
        bold = Style(bold=True)
        styles = [comp[name] + bold if heavy else comp[name] for name, heavy in self.names]
        rows, cols = np.nonzero(self.owner >= 0)
        for row, col in zip(rows.tolist(), cols.tolist()):
            if (row, col) in self.blocked:
                continue
            grid.text(x0 + col, y0 + row, chr(0x2800 + int(self.bits[row, col])),
                      styles[self.owner[row, col]])
