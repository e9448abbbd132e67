"""A room as written in its file: the dataclasses of a room spec (file units, material ids) and
the keys each table of a room file may hold.

docs/room-files.md describes every key.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from roomcalc.engine.analysis import METHODS
from roomcalc.engine.bands import DEFAULT_BANDS_HZ
from roomcalc.engine.field import PLACEMENT_Q
from roomcalc.io.catalog import ALPHA_MAX, Material
from roomcalc.io.limits import RANGES
from roomcalc.io.units import UNITS, Units

FORMAT_VERSION = 1
TOP_KEYS = ("version", "title", "units", "bands_hz", "method", "air", "shape", "surfaces",
            "objects", "sources", "receivers", "target", "candidates", "materials")
AIR_KEYS = ("temperature", "relative_humidity", "pressure_kpa")
SHAPE_KEYS = ("length", "width", "height", "volume")
SURFACE_KEYS = ("name", "area", "count", "face", "material", "alpha")
OBJECT_KEYS = ("name", "count", "material", "absorption", "occupant")
SOURCE_KEYS = ("name", "sound_power", "sound_power_dba", "level_dba_1m", "spectrum",
               "directivity", "placement", "position")
RECEIVER_KEYS = ("name", "position", "distances", "hours", "source_hours")
TARGET_KEYS = ("method", "objective", "currency", "criterion", "rt60_max", "rt60_min",
               "max_level_dba", "max_level_db")
#: Keys of a candidate that covers part of a surface, of one added as units, and of both.
COVER_KEYS = ("surface", "walls", "alpha", "max_area", "step", "panel", "cost_per_m2",
              "cost_per_ft2")
UNIT_KEYS = ("absorption", "max_count", "whole", "cost_each", "area_each")
CANDIDATE_KEYS = ("name", "surface", "walls", "material", "alpha", "absorption", "max_area", "step",
                  "panel", "cost_per_m2", "cost_per_ft2", "max_count", "whole", "cost_each",
                  "area_each", "applied")
#: The faces of a box that a candidate with ``walls = true`` covers.
WALL_FACES = ("front", "back", "left", "right")
#: Largest alpha of a cover candidate: as for a surface, the catalogue's largest (test reports to
#: ISO 354 give values a little above 1; the logarithmic formulas cap alpha at 0.99).
CANDIDATE_ALPHA_MAX = ALPHA_MAX
#: The key of a cover candidate's cost per unit area, by the file's units.
AREA_COST_KEY = {"metric": "cost_per_m2", "imperial": "cost_per_ft2"}
DEFAULT_PLACEMENT = "surface"
#: The formulas a room file may name (top-level ``method``, ``[target] method``): the engine's
#: reverberation methods (roomcalc.engine.analysis.METHODS). Not given: the engine recommends.
#: The planner's objectives (roomcalc.engine.planner.OBJECTIVES, repeated so that reading a
#: room file never loads the solver; a test keeps them equal).
OBJECTIVES = ("cost", "area")
DEFAULT_OBJECTIVE = "cost"
#: Largest level accepted as a limit at a receiver [dB], as for sound power (roomcalc.io.limits).
LEVEL_LIMIT_MAX_DB = RANGES["level_limit"].high


@dataclass
class AsRead:
    """What a table of a file held that its spec cannot hold, kept so that a file with problems
    can be opened, shown and fixed, and saved without losing what the user wrote
    (:mod:`roomcalc.io.roomfile.asread`):

    - ``unknown_keys``: keys the table does not know (a typo), key -> the value as read;
    - ``as_read``: known keys whose value the spec could not hold (text where a number goes,
      a choice not offered), key -> (the value as read, the field's value when it was read).

    :func:`roomcalc.io.roomfile.write.spec_to_dict` writes them back, so the room's check
    reports them until they are fixed; a value as read gives way once its field is edited.
    Both are empty for a room read without problems."""

    unknown_keys: dict = field(default_factory=dict, kw_only=True)
    as_read: dict = field(default_factory=dict, kw_only=True)


@dataclass
class AirSpec(AsRead):
    temperature: float | None = None        # file units (degC or degF); None = default
    relative_humidity: float | None = None  # %
    pressure_kpa: float | None = None


@dataclass
class ShapeSpec(AsRead):
    length: float | None = None
    width: float | None = None
    height: float | None = None
    volume: float | None = None

    @property
    def is_box(self) -> bool:
        return None not in (self.length, self.width, self.height)


@dataclass
class SurfaceSpec(AsRead):
    name: str
    material: str | None = None
    alpha: list[float] | None = None
    area: float | None = None
    count: int = 1
    face: str | None = None


@dataclass
class ObjectSpec(AsRead):
    name: str
    count: float = 1
    material: str | None = None
    absorption: list[float] | None = None
    occupant: bool | None = None            # is, or includes, people; None: as the catalogue


@dataclass
class SourceSpec(AsRead):
    name: str
    sound_power: list[float] | None = None
    sound_power_dba: float | None = None
    spectrum: str | None = None
    level_dba_1m: float | None = None       # A-weighted level at 1 m (with spectrum)
    directivity: float | None = None
    placement: str | None = None
    position: list[float] | None = None

    @property
    def q(self) -> float:
        if self.directivity is not None:
            return float(self.directivity)
        return PLACEMENT_Q[self.placement or DEFAULT_PLACEMENT]


@dataclass
class ReceiverSpec(AsRead):
    name: str
    position: list[float] | None = None
    distances: dict[str, float] = field(default_factory=dict)
    hours: float | None = None              # working pattern: hours per day here; None = none
    source_hours: dict[str, float] = field(default_factory=dict)  # hours each source runs


def band_text(bands) -> str:
    """How a list of one value per band is described in problems."""
    return f"one per band: {', '.join(map(str, bands))} Hz"


#: A limit per band as written: one number (every band), a list (one per band) or a table
#: band [Hz] -> value (only the bands it names).
BandLimit = float | list[float] | dict[int, float]


def limit_values(limit: BandLimit | None, bands) -> list[float]:
    """A band limit as one value per band, NaN where it sets none (None: NaN everywhere)."""
    if limit is None:
        return [math.nan] * len(bands)
    if isinstance(limit, dict):
        return [float(limit[b]) if b in limit else math.nan for b in bands]
    if isinstance(limit, list):
        return [float(x) for x in limit]
    return [float(limit)] * len(bands)


@dataclass
class TargetSpec(AsRead):
    """The [target] table as written. None = not given (the defaults apply)."""

    method: str | None = None
    objective: str | None = None
    currency: str | None = None
    criterion: str | None = None
    rt60_max: BandLimit | None = None       # s
    rt60_min: BandLimit | None = None       # s
    max_level_dba: dict[str, float] = field(default_factory=dict)      # receiver -> dB(A)
    max_level_db: dict[str, BandLimit] = field(default_factory=dict)   # receiver -> dB per band

    @property
    def plan_method(self) -> str | None:
        """The formula this table names; None: not given (see RoomSpec.method_in_force)."""
        return self.method

    @property
    def plan_objective(self) -> str:
        return self.objective or DEFAULT_OBJECTIVE


@dataclass
class CandidateSpec(AsRead):
    """One [[candidates]] entry as written (file units). With ``surface`` (one name or a list)
    or ``walls`` it covers part of those surfaces; without, it is added as units. ``applied``:
    built into the room already (a plan applied it), so a plan leaves it out."""

    name: str
    surface: str | list[str] | None = None  # cover: one surface's name, or a list of names
    walls: bool | None = None               # cover: True = every surface on a wall face
    material: str | None = None
    alpha: list[float] | None = None        # cover
    absorption: list[float] | None = None   # units: area per unit per band (m^2 or ft^2)
    max_area: float | None = None           # cover, m^2 or ft^2; None = the whole surface
    step: float | None = None               # cover, m^2 or ft^2 per panel
    panel: list[float] | None = None        # cover, one panel's [width, height], m or ft
    cost_per_m2: float | None = None        # cover, metric files
    cost_per_ft2: float | None = None       # cover, imperial files
    max_count: float | None = None          # units; None = no limit
    whole: bool | None = None               # units; None = whole units
    cost_each: float | None = None          # units
    area_each: float | None = None          # units, m^2 or ft^2 each
    applied: bool | None = None             # True: already built into the room (not planned)

    @property
    def covers(self) -> bool:
        return self.surface is not None or bool(self.walls)

    @property
    def panel_area(self) -> float | None:
        """The area of one panel (file units): ``step``, else ``panel`` width x height;
        None: any area."""
        if self.step is not None:
            return self.step
        return self.panel[0] * self.panel[1] if self.panel else None

    def surface_names(self, spec: "RoomSpec") -> list[str]:
        """The names of the surfaces this candidate covers (empty for units): ``surface`` as a
        list, or with ``walls`` every surface whose face is a wall (front, back, left, right),
        in the room's order."""
        if self.walls:
            return [s.name for s in spec.surfaces if s.face in WALL_FACES]
        if self.surface is None:
            return []
        return [self.surface] if isinstance(self.surface, str) else list(self.surface)

    @property
    def area_cost(self) -> float | None:
        """The cost per unit area of the file's units, whichever key holds it."""
        return self.cost_per_m2 if self.cost_per_m2 is not None else self.cost_per_ft2


@dataclass
class RoomSpec(AsRead):
    """A room as written in its file (file units, material ids)."""

    title: str = ""
    units: str = "metric"
    bands_hz: list[int] | None = None
    method: str | None = None               # one of METHODS; None: the recommended one
    air: AirSpec = field(default_factory=AirSpec)
    shape: ShapeSpec = field(default_factory=ShapeSpec)
    surfaces: list[SurfaceSpec] = field(default_factory=list)
    objects: list[ObjectSpec] = field(default_factory=list)
    sources: list[SourceSpec] = field(default_factory=list)
    receivers: list[ReceiverSpec] = field(default_factory=list)
    materials: list[Material] = field(default_factory=list)
    version: int | None = FORMAT_VERSION   # None: a file with problems left it out
    target: TargetSpec | None = None
    candidates: list[CandidateSpec] = field(default_factory=list)

    @property
    def bands(self) -> tuple[int, ...]:
        return tuple(self.bands_hz) if self.bands_hz else DEFAULT_BANDS_HZ

    @property
    def unit_system(self) -> Units:
        return UNITS[self.units]

    @property
    def method_in_force(self) -> str | None:
        """The formula the file asks for: top-level ``method``, else ``[target] method``;
        None: the file names none (the engine's recommendation applies)."""
        return self.method or (self.target.method if self.target is not None else None)
