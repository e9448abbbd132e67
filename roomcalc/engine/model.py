"""The room as the engine sees it: frozen dataclasses, SI units, per-band numpy arrays.

The file layer (roomcalc.io) builds these from room files and catalogues; the engine never reads
files. Material ids are kept only so that a room can be written back and shown.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np

__all__ = ["FACE_AXIS", "FACES", "Air", "Surface", "RoomObject", "Source", "Receiver", "Room",
           "at_occupancy"]

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
    #: alpha with the people on it gone (an occupied audience area); None: not people
    unoccupied_alpha: np.ndarray | None = None

    def __post_init__(self):
        object.__setattr__(self, "alpha", _array(self.alpha))
        if self.unoccupied_alpha is not None:
            object.__setattr__(self, "unoccupied_alpha", _array(self.unoccupied_alpha))

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
    #: the object is, or includes, people (a pupil at a desk, a person standing)
    occupant: bool = False
    #: absorption per unit with its people gone (the empty desk); None with ``occupant``: the
    #: object leaves with them
    unoccupied_absorption: np.ndarray | None = None

    def __post_init__(self):
        object.__setattr__(self, "absorption", _array(self.absorption))
        if self.unoccupied_absorption is not None:
            object.__setattr__(self, "unoccupied_absorption",
                               _array(self.unoccupied_absorption))


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

    @property
    def has_occupants(self) -> bool:
        """Whether any surface or object is marked as people."""
        return (any(s.unoccupied_alpha is not None for s in self.surfaces)
                or any(o.occupant for o in self.objects))


def at_occupancy(room: Room, share: float) -> Room:
    """The room with ``share`` of its people present (1: as described, 0: unoccupied).

    Parameters
    ----------
    room : Room -- the room as described (its people all present)
    share : float -- share of the people present, 0 to 1

    Returns
    -------
    Room -- the same room with each people-marked item scaled

    Notes
    -----
    A surface with an unoccupied counterpart takes
    :math:`\alpha = \alpha_u + s(\alpha_o - \alpha_u)`; an object that is people with an
    unoccupied counterpart likewise takes :math:`A = A_u + s(A_o - A_u)` per unit; one without a
    counterpart (people alone) keeps its absorption per unit and counts :math:`s N` units.
    Absorption is additive (Sabine), so a share of people adds that share of their absorption
    (common practice).

    Examples
    --------
    >>> r = Room((500,), 100.0, (Surface("w", 10.0, [0.1]),),
    ...          objects=(RoomObject("pupils", [0.4], count=20, occupant=True),))
    >>> at_occupancy(r, 0.5).objects[0].count
    10.0
    """
    s = float(share)
    if not (0.0 <= s <= 1.0):
        raise ValueError(f"share: {share} must be from 0 to 1")
    if s == 1.0 or not room.has_occupants:
        return room
    surfaces = tuple(
        sf if sf.unoccupied_alpha is None else replace(
            sf, alpha=sf.unoccupied_alpha + s * (sf.alpha - sf.unoccupied_alpha))
        for sf in room.surfaces)
    objects = []
    for o in room.objects:
        if not o.occupant:
            objects.append(o)
        elif o.unoccupied_absorption is not None:
            objects.append(replace(o, absorption=o.unoccupied_absorption
                                   + s * (o.absorption - o.unoccupied_absorption)))
        elif s > 0:
            objects.append(replace(o, count=o.count * s))
    return replace(room, surfaces=surfaces, objects=tuple(objects))
