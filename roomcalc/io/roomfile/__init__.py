"""Room files, version 1 (TOML): read, check, resolve against the catalogue, write back.

A room file is read into a :class:`RoomSpec`, which keeps what the user wrote (file units,
material ids). :func:`resolve` turns a spec into the engine's SI
:class:`~roomcalc.engine.model.Room`.
docs/room-files.md describes every key.

The modules, by job: :mod:`.spec` (the dataclasses and the keys of each table), :mod:`.faces`
(box faces and the area of a surface that fills the rest of one), :mod:`.parse` and
:mod:`.parse_target` (TOML data to a checked spec), :mod:`.resolve` (spec to the engine's room,
catalogue lookup), :mod:`.write` (spec to TOML text, atomic saving), :mod:`.keep` (spec to TOML
text written over the text it was read from, keeping the user's comments and layout, as
:mod:`.layout` reads it), :mod:`.asread` (a file with problems read as far as it goes, to be
fixed in the interface). The
planning tables are read here with the rest of the file; :mod:`roomcalc.io.planning` turns them
into the planner's SI goals and candidates.
"""

from roomcalc.io.roomfile.asread import (KNOWN_KEYS, as_read_objects, parse_spec_as_read,
                                         read_spec_as_read, settle_as_read, spec_as_read)
from roomcalc.io.roomfile.faces import (AREA_OR_FACE, box_dimensions_m, face_areas,
                                        missing_area, surface_area_m2)
from roomcalc.io.roomfile.parse import (SpecProblems, box_size_problems, parse_data, parse_spec,
                                        read_spec)
from roomcalc.io.roomfile.parse_target import band_limit, parse_candidates, parse_target
from roomcalc.io.roomfile.resolve import (candidate_material, check_room, material_problems,
                                          material_values, read_room, resolve, room_catalog,
                                          unoccupied_values)
from roomcalc.io.roomfile.spec import (AIR_KEYS, AREA_COST_KEY, CANDIDATE_ALPHA_MAX,
                                       CANDIDATE_KEYS, COVER_KEYS, DEFAULT_OBJECTIVE,
                                       WALL_FACES,
                                       DEFAULT_PLACEMENT, FORMAT_VERSION, METHODS,
                                       LEVEL_LIMIT_MAX_DB, OBJECT_KEYS, OBJECTIVES,
                                       RECEIVER_KEYS, SHAPE_KEYS, SOURCE_KEYS, SURFACE_KEYS,
                                       TARGET_KEYS, TOP_KEYS, UNIT_KEYS, AirSpec, BandLimit,
                                       CandidateSpec, ObjectSpec, ReceiverSpec, RoomSpec,
                                       ShapeSpec, SourceSpec, SurfaceSpec, TargetSpec, band_text,
                                       limit_values)
from roomcalc.io.roomfile.write import (save_spec, spec_fields_dict, spec_to_dict, spec_to_toml,
                                        toml_key, toml_value, with_as_read)

__all__ = [
    # spec
    "FORMAT_VERSION", "TOP_KEYS", "AIR_KEYS", "SHAPE_KEYS", "SURFACE_KEYS", "OBJECT_KEYS",
    "SOURCE_KEYS", "RECEIVER_KEYS", "TARGET_KEYS", "COVER_KEYS", "UNIT_KEYS", "CANDIDATE_KEYS",
    "WALL_FACES",
    "CANDIDATE_ALPHA_MAX", "AREA_COST_KEY", "DEFAULT_PLACEMENT", "METHODS", "OBJECTIVES",
    "DEFAULT_OBJECTIVE", "LEVEL_LIMIT_MAX_DB",
    "AirSpec", "ShapeSpec", "SurfaceSpec", "ObjectSpec", "SourceSpec", "ReceiverSpec",
    "BandLimit", "TargetSpec", "CandidateSpec", "RoomSpec", "band_text", "limit_values",
    # asread
    "read_spec_as_read", "parse_spec_as_read", "spec_as_read", "settle_as_read",
    "as_read_objects", "KNOWN_KEYS",
    # faces
    "AREA_OR_FACE", "missing_area", "face_areas", "box_dimensions_m", "surface_area_m2",
    # parse
    "SpecProblems", "read_spec", "parse_spec", "parse_data", "parse_target", "parse_candidates",
    "band_limit", "box_size_problems",
    # resolve
    "read_room", "check_room", "resolve", "room_catalog", "material_values",
    "candidate_material", "material_problems", "unoccupied_values",
    # write
    "spec_to_dict", "spec_fields_dict", "with_as_read", "spec_to_toml", "save_spec", "toml_key",
    "toml_value",
    # keep
    "spec_to_toml_keeping", "comments_lost",
]


def __getattr__(name: str):
    """The keeping writer is imported when first asked for: the command line's reports never
    write a file, and its regular expressions and tables cost their start-up 5 ms."""
    if name in ("spec_to_toml_keeping", "comments_lost"):
        from roomcalc.io.roomfile import keep

        return getattr(keep, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
