"""The room as the engine sees it: frozen dataclasses, SI units, per-band numpy arrays.

The file layer (roomcalc.io) builds these from room files and catalogues; the engine never reads
files. Material ids are kept only so that a room can be written back and shown.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

#: Box faces and the axis each is normal to: x = length, y = width, z = height.
FACE_AXIS = {"front": 0, "back": 0, "left": 1, "right": 1, "floor": 2, "ceiling": 2}
FACES = tuple(FACE_AXIS)


def _array(x) -> np.ndarray:
    a = np.array(x, dtype=float)
    a.setflags(write=False)
    return a


@dataclass(frozen=True)
class Air:
    """Air in the room: temperature [degC], relative humidity [%], pressure [kPa]."""

    temperature_c: float = 20.0
    relative_humidity: float = 50.0
    pressure_kpa: float = 101.325


@dataclass(frozen=True, eq=False)
class Surface:
    """A boundary surface. ``area`` is per unit [m^2]; the surface counts ``count`` times."""

    name: str
    area: float
    alpha: np.ndarray
    count: int = 1
    face: str | None = None
    material: str | None = None

    def __post_init__(self):
        object.__setattr__(self, "alpha", _array(self.alpha))

    @property
    def total_area(self) -> float:
        return self.area * self.count


@dataclass(frozen=True, eq=False)
class RoomObject:
    """Something in the room that absorbs: absorption area per unit [m^2] per band."""

    name: str
    absorption: np.ndarray
    count: float = 1
    material: str | None = None

    def __post_init__(self):
        object.__setattr__(self, "absorption", _array(self.absorption))


@dataclass(frozen=True, eq=False)
class Source:
    """A sound source: sound power per band [dB re 1 pW], directivity Q, optional position [m]."""

    name: str
    sound_power_db: np.ndarray
    directivity: float = 1.0
    position: tuple[float, float, float] | None = None

    def __post_init__(self):
        object.__setattr__(self, "sound_power_db", _array(self.sound_power_db))


@dataclass(frozen=True)
class Receiver:
    """A listening position: a position [m] and/or distances [m] to named sources."""

    name: str
    position: tuple[float, float, float] | None = None
    distances: dict[str, float] = field(default_factory=dict)


@dataclass(frozen=True, eq=False)
class Room:
    """A room: volume [m^3], optional box dimensions (length, width, height) [m], and its contents."""

    bands_hz: tuple[int, ...]
    volume: float
    surfaces: tuple[Surface, ...]
    dimensions: tuple[float, float, float] | None = None
    air: Air = Air()
    objects: tuple[RoomObject, ...] = ()
    sources: tuple[Source, ...] = ()
    receivers: tuple[Receiver, ...] = ()
    title: str = ""

    @property
    def surface_area(self) -> float:
        return float(sum(s.total_area for s in self.surfaces))
