"""What :func:`roomcalc.engine.analysis.evaluate` returns: the results of one room, per band.

Frozen dataclasses, SI units, per-band numpy arrays on the last axis. Nothing here computes a
formula; the numbers are filled in by the analysis.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from roomcalc.engine.model import Room

__all__ = ["METHODS", "METHOD_TITLES", "REVERBERANT_MODELS", "Finding", "SourceResult",
           "ReceiverResult", "ReceiverArrays", "RoomResult"]

#: Reverberation formulas, in the order they are reported.
METHODS = ("sabine", "eyring", "millington", "fitzroy", "arau_puchades")
METHOD_TITLES = {"sabine": "Sabine", "eyring": "Eyring", "millington": "Millington-Sette",
                 "fitzroy": "Fitzroy", "arau_puchades": "Arau-Puchades"}
#: Models of the reverberant field at a receiver.
REVERBERANT_MODELS = ("classic", "barron-lee")


@dataclass(frozen=True)
class Finding:
    """A warning: a short code, the message in words, and the reason it matters."""

    code: str
    message: str

    def __str__(self) -> str:
        return self.message


@dataclass(frozen=True, eq=False)
class SourceResult:
    name: str
    directivity: float
    sound_power_db: np.ndarray
    critical_distance_m: np.ndarray


@dataclass(frozen=True, eq=False)
class ReceiverResult:
    """Levels at a receiver [dB re 20 uPa], per band, from all sources summed energetically."""

    name: str
    distances_m: dict[str, float]
    level_db: np.ndarray
    direct_db: np.ndarray
    reverberant_db: np.ndarray
    level_dba: float
    direct_dba: float
    reverberant_dba: float
    source_energy: np.ndarray           # (sources, bands): each source's 10^(Lp/10) here

    @property
    def per_source_db(self) -> dict[str, np.ndarray]:
        """Each source's level at this receiver, per band [dB], by source name."""
        return dict(zip(self.distances_m, 10.0 * np.log10(self.source_energy)))


@dataclass(frozen=True, eq=False)
class ReceiverArrays:
    """Levels at all receivers at once: (receivers, bands) arrays [dB], dB(A) (3, receivers)
    for total, direct and reverberant, distances (receivers, sources) [m], and each source's
    energy 10^(Lp/10) at each receiver (receivers, sources, bands)."""

    names: tuple[str, ...]
    source_names: tuple[str, ...]
    distances_m: np.ndarray
    level_db: np.ndarray
    direct_db: np.ndarray
    reverberant_db: np.ndarray
    dba: np.ndarray
    source_energy: np.ndarray


@dataclass(frozen=True, eq=False)
class RoomResult:
    """Everything computed for one room. Arrays are per band, SI units.

    ``method`` is the formula in force: the one the caller chose (``evaluate(..., method=)``,
    e.g. from a room file or ``--method``), else the engine's recommendation; its time sets the
    Schroeder frequency and Barron & Lee's reverberant term, and a comparison uses it.
    ``method_reason`` says why it is in force. ``recommended`` is always the engine's own
    recommendation (equal to ``method`` when none was chosen). ``unreliable`` names each formula
    that gives an absurd result for this room, with the reason: such a formula is never
    recommended, and a warning says so when it was chosen.
    """

    room: Room
    bands_hz: tuple[int, ...]
    volume_m3: float
    surface_area_m2: float
    absorption_area_m2: np.ndarray
    surface_absorption_m2: np.ndarray
    object_absorption_m2: np.ndarray
    air_attenuation_db_per_m: np.ndarray
    air_m_per_m: np.ndarray
    speed_of_sound_m_s: float
    mean_alpha: np.ndarray
    rt60_s: dict[str, np.ndarray]
    unavailable: dict[str, str]
    method: str
    method_reason: str
    recommended: str
    room_constant_m2: np.ndarray
    schroeder_hz: np.ndarray
    reverberant_model: str
    sources: tuple[SourceResult, ...]
    receiver_arrays: ReceiverArrays | None
    warnings: tuple[Finding, ...] = ()
    cautions: tuple[str, ...] = ()
    axis_alpha: np.ndarray | None = field(default=None)
    unreliable: dict[str, str] = field(default_factory=dict)

    @property
    def rt60_in_force(self) -> np.ndarray:
        """The reverberation time per band by the formula in force [s]."""
        return self.rt60_s[self.method]

    @cached_property
    def receivers(self) -> tuple[ReceiverResult, ...]:
        """One result per receiver, built from :attr:`receiver_arrays` when first asked for."""
        ra = self.receiver_arrays
        if ra is None:
            return ()
        dists = ra.distances_m.tolist()
        dba = ra.dba.tolist()
        return tuple(
            ReceiverResult(name, dict(zip(ra.source_names, dists[i])), ra.level_db[i],
                           ra.direct_db[i], ra.reverberant_db[i], dba[0][i], dba[1][i],
                           dba[2][i], ra.source_energy[i])
            for i, name in enumerate(ra.names))
