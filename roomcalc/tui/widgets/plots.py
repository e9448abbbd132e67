"""Plots: RT per band, and level against distance with the critical distance and receivers."""

from __future__ import annotations

import numpy as np

from roomcalc.engine.analysis import METHOD_TITLES, METHODS, RoomResult
from roomcalc.tui.widgets.chart import Chart, ChartData, Series


def band_label(b: float) -> str:
    return f"{b:g}" if b < 1000 else f"{b / 1000:g}k"


class RtPlot(Chart):
    """RT60 against band for every method; the method used drawn heavier."""

    def show(self, res: RoomResult, stale: bool = False) -> None:
        x = list(range(len(res.bands_hz)))
        series = [Series(METHOD_TITLES[k] + (" (in force)" if k == res.method else ""), x,
                         [float(v) for v in res.rt60_s[k]], heavy=k == res.method)
                  for k in METHODS if k in res.rt60_s]
        top = max(float(np.max(v)) for v in res.rt60_s.values()) * 1.15
        self.show_data(ChartData(
            title="Reverberation time" + ("  (stale)" if stale else ""),
            series=series, x_ticks=[(i, band_label(b)) for i, b in zip(x, res.bands_hz)],
            x_label="band [Hz]", y_label="RT60 [s]",
            x_range=(-0.3, len(x) - 0.7), y_range=(0.0, top if top > 0 else 1.0)))


class DistancePlot(Chart):
    """Direct, reverberant and total level against distance for one source and one band (or
    dB(A)); the critical distance as a vertical line and each receiver as a point."""

    def show(self, curves: dict, band_index: int | None, bands, receivers: list,
             length_label: str = "m", length_factor: float = 1.0, stale: bool = False,
             source: str = "") -> None:
        r = curves["distance_m"] / length_factor
        if band_index is None:
            tot, dr, rv = curves["total_dba"], curves["direct_dba"], curves["reverberant_dba"]
            what, unit = "dB(A)", "dB(A)"
            rc = float(curves["critical_distance_m"][list(bands).index(1000)]
                       if 1000 in bands else curves["critical_distance_m"].mean())
        else:
            tot = curves["total_db"][:, band_index]
            dr = curves["direct_db"][:, band_index]
            rv = curves["reverberant_db"][:, band_index]
            what, unit = f"{bands[band_index]:g} Hz", "dB"
            rc = float(curves["critical_distance_m"][band_index])
        rc /= length_factor
        lo, hi = float(np.min(rv)) - 15.0, float(np.max(tot)) + 3.0
        xs = r.tolist()
        self.show_data(ChartData(
            title=f"Level against distance, {what}; r_c critical distance"
                  + ("  (stale)" if stale else ""),
            series=[Series("total", xs, tot.tolist(), heavy=True),
                    Series("direct", xs, dr.tolist()),
                    Series("reverberant", xs, rv.tolist())],
            x_log=True, x_range=(float(r[0]), float(r[-1])), y_range=(lo, hi),
            x_label=f"distance from {source} [{length_label}]", y_label=f"Lp [{unit}]",
            vlines=[(rc, f"r_c {rc:.2f} {length_label}")],
            points=[(dist / length_factor, level, name) for name, dist, level in receivers]))

    def show_message(self, text: str) -> None:
        self.show_data(ChartData(message=text))
