"""The typical sources listing (``roomcalc sources``) as text, markdown, JSON or CSV, and the
lines the interface's source chooser shows of one of them."""

from __future__ import annotations

import csv
import io

from roomcalc.engine.bands import DEFAULT_BANDS_HZ
from roomcalc.engine.field import PLACEMENT_Q
from roomcalc.io.sources import TypicalSource, spectrum_description, typical_sources
from roomcalc.present.numbers import WIDTH, band_label, json_text, wrap

__all__ = ["source_dict", "source_details", "sources_text", "SOURCES_NOTE", "source_given",
           "source_given_dict"]

_OCTAVES = (63, 125, 250, 500, 1000, 2000, 4000, 8000)

#: What every listing of typical sources ends with.
SOURCES_NOTE = ("Typical values for planning, not a measurement of your source: a measurement "
                "of it supersedes them. Levels of 80 dB(A) or more can damage hearing; the "
                "local regulations and a competent person's measurement govern.")


def source_dict(t: TypicalSource) -> dict:
    return {"id": t.id, "name": t.name, "level_dba_1m": t.level_dba_1m(),
            "levels_1m_db": {str(k): v for k, v in sorted(t.levels_1m.items())},
            "placement": t.placement, "directivity": PLACEMENT_Q[t.placement],
            "provenance": t.provenance, "notes": t.notes}


def source_details(t: TypicalSource, bands=DEFAULT_BANDS_HZ, width: int | None = None) -> str:
    """What is shown of one typical source: its level in dB(A) at 1 m over ``bands``, its
    octave levels at 1 m, where it usually stands, and where the numbers come from."""
    b = sorted(t.levels_1m)
    lines = [t.name, f"{t.level_dba_1m(bands):.1f} dB(A) at 1 m "
                     f"({band_label(bands[0])}-{band_label(bands[-1])} Hz), stands "
                     f"{t.placement} (directivity Q {PLACEMENT_Q[t.placement]:g})",
             wrap("octave levels at 1 m [dB]: " + ", ".join(
                 f"{x:g} Hz {t.levels_1m[x]:.1f}" for x in b), "", "  ", width=width),
             wrap(f"numbers: {t.provenance}", "", "  ", width=width)]
    if t.notes:
        lines.append(wrap(t.notes, "", "  ", width=width))
    return "\n".join(lines)


def sources_text(items: list[TypicalSource], form: str = "text") -> str:
    if form == "json":
        return json_text([source_dict(t) for t in items])
    if form == "csv":
        buf = io.StringIO()
        w = csv.writer(buf, lineterminator="\n")
        w.writerow(["id", "name", "level_dba_1m", "placement", "directivity"] +
                   [f"{b}_hz_db_1m" for b in _OCTAVES] + ["provenance", "notes"])
        for t in items:
            w.writerow([t.id, t.name, t.level_dba_1m(), t.placement, PLACEMENT_Q[t.placement]]
                       + [t.levels_1m.get(b, "") for b in _OCTAVES] + [t.provenance, t.notes])
        return buf.getvalue()
    if form == "markdown":
        lines = ["| id | name | dB(A) at 1 m | placement | octave levels at 1 m [dB] | "
                 "where the numbers come from |", "|---|---|---|---|---|---|"]
        for t in items:
            levels = " ".join(f"{b}: {t.levels_1m[b]:g}" for b in sorted(t.levels_1m))
            lines.append(f"| {t.id} | {t.name} | {t.level_dba_1m():.1f} | {t.placement} | "
                         f"{levels} | {t.provenance} |")
        return "\n".join(lines + ["", SOURCES_NOTE]) + "\n"
    lines = []
    for t in items:
        lines += [f"{t.id}", "    " + source_details(t, width=WIDTH - 4).replace("\n", "\n    "),
                  ""]
    lines.append(wrap(f"{len(items)} typical source(s); in a room file: level_dba_1m = the dB(A) "
                      "at 1 m, spectrum = the id. " + SOURCES_NOTE, "", ""))
    return "\n".join(lines) + "\n"


def _spectrum_words(name: str) -> str:
    known = typical_sources()
    if name in known:
        return f"the spectrum of a typical source, {known[name].name} ({known[name].provenance})"
    return f"{name} spectrum ({spectrum_description(name)})"


def source_given(s) -> str:
    """How a room file's source (a ``SourceSpec``) gives its power, in words: its sound power
    per band, its A-weighted sound power, or its A-weighted level at 1 m; with its spectrum."""
    if s.sound_power is not None:
        return "sound power Lw per band, as given"
    if s.level_dba_1m is not None:
        lead = f"{s.level_dba_1m:g} dB(A) at 1 m where it stands"
    else:
        lead = f"A-weighted sound power LwA {s.sound_power_dba:g} dB(A)"
    return f"{lead}, {_spectrum_words(s.spectrum)}" if s.spectrum else lead


def source_given_dict(s) -> dict:
    """The same, for JSON: which key gives the power, its value, the spectrum and, for a
    typical source's spectrum, where its numbers come from."""
    key = next((k for k in ("sound_power", "sound_power_dba", "level_dba_1m")
                if getattr(s, k) is not None), None)
    d = {"given_as": key, "sound_power_dba": s.sound_power_dba, "level_dba_1m": s.level_dba_1m,
         "spectrum": s.spectrum}
    known = typical_sources()
    if s.spectrum in known:
        d["spectrum_provenance"] = known[s.spectrum].provenance
    return d
