"""Box faces and their areas: the one home of the rule that a surface without ``area`` takes the
rest of its box face.

The parser (which key must be given), the resolver (the area of each surface) and the planning
layer (the area a treatment may cover) all ask here.
"""

from __future__ import annotations

import math

from roomcalc.engine.model import FACE_AXIS
from roomcalc.io.limits import RANGES
from roomcalc.io.roomfile.spec import RoomSpec

#: The problem of a surface that gives neither area nor face (reported at ``surfaces[i].area``).
AREA_OR_FACE = "is required unless face names a box face"


def missing_area(area_given: bool, face_given: bool) -> str | None:
    """The problem of a surface that leaves out its area without naming a face, else None."""
    return None if area_given or face_given else AREA_OR_FACE


def face_areas(dims) -> dict[str, float]:
    """The area of each box face (the product of the two sides it spans), in the units of
    ``dims`` squared. ``dims``: (length, width, height); front and back are normal to the
    length, left and right to the width, floor and ceiling to the height."""
    return {face: math.prod(d for k, d in enumerate(dims) if k != axis)
            for face, axis in FACE_AXIS.items()}


def box_dimensions_m(spec: RoomSpec) -> tuple[float, float, float] | None:
    """The box's length, width and height [m], or None for a free shape."""
    if not spec.shape.is_box:
        return None
    u = spec.unit_system
    return tuple(float(x) * u.length for x in (spec.shape.length, spec.shape.width,
                                               spec.shape.height))


def surface_area_m2(spec: RoomSpec, i: int) -> tuple[float | None, str | None]:
    """The area of one unit of surface ``i`` [m^2]: its own ``area``, or the rest of its box
    face after the other surfaces on that face.

    Returns (area, None), or (None, the problem to report at ``surfaces[i].area``).
    """
    u = spec.unit_system
    s = spec.surfaces[i]
    if s.area is not None:
        return float(s.area) * u.area, None
    problem = missing_area(False, s.face is not None)
    if problem:
        return None, problem
    dims = box_dimensions_m(spec)
    if dims is None:
        return None, (f"is required: face '{s.face}' has no size because the shape is a "
                      "volume, not a box")
    sharing = [o for j, o in enumerate(spec.surfaces) if j != i and o.face == s.face]
    if any(o.area is None for o in sharing):
        return None, f"is required: another surface on face '{s.face}' has no area either"
    face = face_areas(dims)[s.face]
    taken = sum(float(o.area) * u.area * o.count for o in sharing)
    area = (face - taken) / s.count
    if area <= 0:
        return None, (f"the other surfaces on face '{s.face}' take {taken / u.area:.2f} "
                      f"{u.area_label} of its {face / u.area:.2f}; nothing is left for this one")
    low = RANGES["area"].bounds(u)[0]
    if area / u.area < low:
        return None, (f"the other surfaces on face '{s.face}' leave {area / u.area:.3g} "
                      f"{u.area_label} of it, less than the smallest area a surface may have "
                      f"({low:g} {u.area_label})")
    return area, None
