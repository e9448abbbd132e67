"""Typical sound sources (``materials/sources/``) and the sound power of a source as a room
file gives it: band powers, a dB(A) sound power with a spectrum, or a dB(A) level at 1 m with a
spectrum. The one home of turning a ``[[sources]]`` entry into band powers.

A spectrum is a shape of relative octave levels: one of the engine's named shapes
(:data:`roomcalc.engine.spectra.SPECTRUM_SHAPES`) or the id of a typical source, whose levels
at 1 m give the shape.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from roomcalc.engine.bands import ALLOWED_BANDS_HZ, DEFAULT_BANDS_HZ, a_weighted_total
from roomcalc.engine.field import PLACEMENT_Q, sound_power_from_level
from roomcalc.engine.spectra import SPECTRUM_DESCRIPTIONS, SPECTRUM_SHAPES, band_power_from_dba
from roomcalc.io import paths
from roomcalc.io.catalog import ID_PATTERN
from roomcalc.io.checks import Checker, read_toml_file, toml_files
from roomcalc.io.errors import RoomFileError

__all__ = ["TypicalSource", "LEVEL_DISTANCE_M", "typical_sources", "load_typical_sources",
           "spectrum_names", "spectrum_shape", "spectrum_description", "source_band_power"]

ENTRY_KEYS = ("id", "name", "levels_1m", "placement", "provenance", "notes")
#: The distance of a source's ``level_dba_1m`` [m].
LEVEL_DISTANCE_M = 1.0


@dataclass(frozen=True)
class TypicalSource:
    """A typical source: its octave-band levels at 1 m in front of it [dB re 20 uPa], where it
    usually stands, and where the numbers come from."""

    id: str
    name: str
    levels_1m: dict[int, float]
    placement: str
    provenance: str
    notes: str = ""
    file: str = ""

    def level_dba_1m(self, bands_hz=DEFAULT_BANDS_HZ) -> float:
        """The A-weighted level at 1 m over ``bands_hz`` (those it has), to 0.1 dB."""
        b = [int(x) for x in bands_hz if int(x) in self.levels_1m]
        return round(float(a_weighted_total(np.array([self.levels_1m[x] for x in b]), b)), 1)

    @property
    def bands_text(self) -> str:
        b = sorted(self.levels_1m)
        return f"{b[0]}-{b[-1]} Hz"


def load_typical_sources_file(path) -> list[TypicalSource]:
    """Read one file of typical sources; raises RoomFileError with every problem in it."""
    path = Path(path)
    data = read_toml_file(path)
    chk = Checker(str(path))
    chk.keys(data, "", ("sources",))
    out = []
    for i, e in enumerate(chk.array_of_tables(data, "sources")):
        w = f"sources[{i}]"
        before = len(chk.problems)
        chk.keys(e, w, ENTRY_KEYS)
        sid = chk.text(e, "id", w, required=True, nonempty=True)
        if sid is not None and not ID_PATTERN.match(sid):
            chk.add(f"{w}.id", f"'{sid}' must be lowercase words joined by hyphens")
        if sid in SPECTRUM_SHAPES:
            chk.add(f"{w}.id", f"'{sid}' is the name of a spectrum shape; choose another id")
        name = chk.text(e, "name", w, required=True, nonempty=True)
        placement = chk.text(e, "placement", w, default="surface", choices=tuple(PLACEMENT_Q))
        provenance = chk.text(e, "provenance", w, required=True, nonempty=True)
        notes = chk.text(e, "notes", w, default="")
        levels: dict[int, float] = {}
        table = chk.table(e, "levels_1m", w, required=True) or {}
        for k, x in table.items():
            band = int(k) if str(k).isdigit() else None
            if band not in ALLOWED_BANDS_HZ:
                chk.add(f"{w}.levels_1m.{k}", f"'{k}' is not a band; allowed: "
                        f"{', '.join(map(str, ALLOWED_BANDS_HZ))} Hz")
                continue
            y = chk.value(x, f"{w}.levels_1m.{k}", low=0.0, high=200.0, unit="dB")
            if y is not None:
                levels[band] = float(y)
        missing = [b for b in DEFAULT_BANDS_HZ if str(b) not in table]
        if table and missing:
            chk.add(f"{w}.levels_1m", f"missing bands {', '.join(map(str, missing))} Hz "
                    "(125 to 4000 Hz are required)")
        if any(s.id == sid for s in out):
            chk.add(f"{w}.id", f"'{sid}' is used by another entry")
        if len(chk.problems) == before:
            out.append(TypicalSource(sid, name, levels, placement, provenance, notes, str(path)))
    if chk.problems:
        raise RoomFileError(chk.problems)
    return out


def load_typical_sources() -> dict[str, TypicalSource]:
    """The shipped typical sources by id (``materials/sources/*.toml``)."""
    files = toml_files([paths.materials_dir() / "sources"], (), "typical sources file")
    out: dict[str, TypicalSource] = {}
    for f in files:
        for s in load_typical_sources_file(f):
            out[s.id] = s
    return out


@functools.lru_cache(maxsize=1)
def _shipped() -> dict[str, TypicalSource]:
    return load_typical_sources()


def typical_sources() -> dict[str, TypicalSource]:
    """The shipped typical sources by id (read once)."""
    return dict(_shipped())


def spectrum_names() -> tuple[str, ...]:
    """Every name a source's ``spectrum`` may take: the named shapes, then the typical
    sources' ids."""
    return tuple(SPECTRUM_SHAPES) + tuple(_shipped())


def spectrum_shape(name: str) -> dict[int, float]:
    """The relative octave levels [dB] of a spectrum name (KeyError if unknown)."""
    if name in SPECTRUM_SHAPES:
        return SPECTRUM_SHAPES[name]
    return _shipped()[name].levels_1m


def spectrum_description(name: str) -> str:
    """A few words on a spectrum name."""
    if name in SPECTRUM_DESCRIPTIONS:
        return SPECTRUM_DESCRIPTIONS[name]
    return f"the shape of a typical source: {_shipped()[name].name}"


def source_band_power(sound_power, sound_power_dba, level_dba_1m, spectrum, directivity,
                      bands_hz) -> np.ndarray:
    """A source's sound power per band [dB re 1 pW], from whichever of its three forms the file
    gives: ``sound_power`` per band as it is; ``sound_power_dba`` (LwA) spread over the bands
    by ``spectrum``; or ``level_dba_1m`` (the A-weighted level of the direct sound at 1 m, with
    the source's directivity Q) turned into LwA and spread the same way.

    Notes
    -----
    .. math:: L_{wA} = L_{pA}(1\\,\\mathrm{m}) + 10 \\lg \\frac{4 \\pi (1\\,\\mathrm{m})^2}{Q}

    (:func:`roomcalc.engine.field.sound_power_from_level`, common practice, the form of ISO
    3744), then :func:`roomcalc.engine.spectra.band_power_from_dba`.

    Examples
    --------
    60 dB(A) at 1 m from a talker standing free (Q = 1) is an LwA of 60 + 10 lg(4 pi) =
    70.99 dB(A) (hand computation), whatever the spectrum:

    >>> lw = source_band_power(None, None, 60.0, "pink", 1.0, [125, 250, 500, 1000, 2000, 4000])
    >>> round(float(a_weighted_total(lw, [125, 250, 500, 1000, 2000, 4000])), 2)
    70.99
    """
    if sound_power is not None:
        return np.asarray(sound_power, dtype=float)
    if level_dba_1m is not None:
        lwa = float(sound_power_from_level(level_dba_1m, directivity, LEVEL_DISTANCE_M))
    else:
        lwa = float(sound_power_dba)
    return band_power_from_dba(lwa, spectrum_shape(spectrum), bands_hz)
