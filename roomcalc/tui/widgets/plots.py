"""Plots: RT per band, and level against distance with the critical distance and receivers."""

from __future__ import annotations

import numpy as np
from textual_plotext import PlotextPlot

from roomcalc.engine.analysis import METHOD_TITLES, METHODS, RoomResult


class RtPlot(PlotextPlot):
    """RT60 against band for every method; the recommended one drawn heavier."""

    DEFAULT_CSS = "RtPlot { height: 1fr; min-height: 8; }"

    def show(self, res: RoomResult, stale: bool = False) -> None:
        plt = self.plt
        plt.clear_figure()
        x = list(range(len(res.bands_hz)))
        for k in METHODS:
            if k in res.rt60_s:
                rec = k == res.recommended
                plt.plot(x, [float(v) for v in res.rt60_s[k]],
                         label=METHOD_TITLES[k] + (" (used)" if rec else ""),
                         marker="braille" if not rec else "hd")
        plt.xticks(x, [f"{b:g}" for b in res.bands_hz])
        plt.xlabel("band [Hz]")
        plt.ylabel("RT60 [s]")
        plt.title("Reverberation time" + ("  (stale)" if stale else ""))
        plt.ylim(0, max(float(np.max(v)) for v in res.rt60_s.values()) * 1.15)
        self.refresh()


class DistancePlot(PlotextPlot):
    """Direct, reverberant and total level against distance for one source and one band (or
    dB(A)); the critical distance as a vertical line and each receiver as a point."""

    DEFAULT_CSS = "DistancePlot { height: 1fr; min-height: 8; }"

    def show(self, curves: dict, band_index: int | None, bands, receivers: list,
             length_label: str = "m", length_factor: float = 1.0, stale: bool = False,
             source: str = "") -> None:
        plt = self.plt
        plt.clear_figure()
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
        plt.xscale("log")
        plt.plot(r.tolist(), tot.tolist(), label="total")
        plt.plot(r.tolist(), dr.tolist(), label="direct")
        plt.plot(r.tolist(), rv.tolist(), label="reverberant")
        lo, hi = float(np.min(rv)) - 15.0, float(np.max(tot[r >= r[0]])) + 3.0
        plt.ylim(lo, hi)
        plt.vline(rc)
        plt.text(f"r_c {rc:.2f} {length_label}", rc, hi - 1.0)
        for name, dist, level in receivers:
            plt.scatter([dist / length_factor], [level], marker="x")
            plt.text(name, dist / length_factor, level + 1.0)
        plt.xlabel(f"distance from {source} [{length_label}]")
        plt.ylabel(f"Lp [{unit}]")
        plt.title(f"Level against distance, {what}" + ("  (stale)" if stale else ""))
        self.refresh()
