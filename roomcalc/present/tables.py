"""Rows of a label and per-band numbers, laid out as text (80 columns) or markdown."""

from __future__ import annotations

from roomcalc.present.numbers import WIDTH, fit, fmt

__all__ = ["BandRows"]


class BandRows:
    """Rows of a label and per-band numbers, laid out for text or markdown."""

    def __init__(self, title, bands, extra=None):
        self.title, self.bands, self.extra, self.rows = title, list(bands), extra, []

    def add(self, label, values, nd=2, extra=None):
        self.rows.append((label, [fmt(float(v), nd) for v in values],
                          None if extra is None else fmt(extra, 1)))

    @property
    def width(self) -> int:
        """Characters per band column in text (a value fits in one less)."""
        return 7 if len(self.bands) <= 6 else 6

    def text(self) -> str:
        w = self.width
        lw = WIDTH - 1 - w * len(self.bands) - (7 if self.extra else 0)
        lw = min(lw, 26)
        head = self.title.ljust(lw) + "".join(f"{b:>{w}}" for b in self.bands) + \
            (f"{self.extra:>7}" if self.extra else "")
        lines = [head]
        for label, vals, ex in self.rows:
            label = label if len(label) <= lw - 1 else label[:lw - 2] + "~"
            lines.append(label.ljust(lw) + "".join(f"{fit(v, w - 1):>{w}}" for v in vals) +
                         (f"{fit(ex or '', 6):>7}" if self.extra else ""))
        return "\n".join(lines)

    def markdown(self) -> str:
        cols = [self.title] + [f"{b} Hz" for b in self.bands] + ([self.extra] if self.extra else [])
        lines = ["| " + " | ".join(cols) + " |", "|" + "---|" * len(cols)]
        for label, vals, ex in self.rows:
            cells = [label] + vals + ([ex or ""] if self.extra else [])
            lines.append("| " + " | ".join(cells) + " |")
        return "\n".join(lines)
