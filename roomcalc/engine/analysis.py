"""Evaluate a room: every reverberation formula, the room constant, levels, warnings and cautions.

:func:`evaluate` ties the formula modules together for one :class:`~roomcalc.engine.model.Room`
as a short sequence of named steps. The formulas live in their own modules (air, reverb, field,
bands) and the input checks in :mod:`roomcalc.engine.checks`; this module checks the room once,
in whole arrays, and then calls the formulas' unchecked entry points. It reads no files and
prints nothing.

The result classes are in :mod:`roomcalc.engine.result`, the comparison in
:mod:`roomcalc.engine.compare`, the batch functions in :mod:`roomcalc.engine.batch`; all are
exported from here as well.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from roomcalc.engine import air as air_mod
from roomcalc.engine import reverb
from roomcalc.engine.batch import batch_reverberation, batch_reverberation_by_material
from roomcalc.engine.bands import band_constants
from roomcalc.engine.checks import non_negative, positive
from roomcalc.engine.compare import Comparison, ReceiverChange, compare
from roomcalc.engine.field import mean_alpha_with_air_unchecked, room_constant_unchecked
from roomcalc.engine.model import FACE_AXIS, Room
from roomcalc.engine.receivers import (CAUTION_DBA, HEARING_CAUTION, MIN_DISTANCE_M,
                                       distance_curves, sources_and_receivers)
from roomcalc.engine.result import (METHOD_TITLES, METHODS, REVERBERANT_MODELS, Finding,
                                    ReceiverArrays, ReceiverResult, RoomResult, SourceResult)
from roomcalc.engine.reverb import ALPHA_LOG_MAX

__all__ = ["ALPHA_LOG_MAX", "MILLINGTON_CAPPED_SHARE_MAX", "CAUTION_DBA", "MIN_DISTANCE_M",
           "METHODS", "METHOD_TITLES", "REVERBERANT_MODELS", "HEARING_CAUTION", "Finding",
           "SourceResult", "ReceiverResult", "ReceiverArrays", "RoomResult", "evaluate",
           "distance_curves", "ReceiverChange", "Comparison", "compare", "batch_reverberation",
           "batch_reverberation_by_material"]

#: Millington-Sette is unreliable in a band where the capped surfaces' terms
#: -S_i ln(1 - ALPHA_LOG_MAX) make up more than this share of its absorption sum: the cap, a
#: choice, then sets more of the time than the room does (docs/methods.md, "Caps").
MILLINGTON_CAPPED_SHARE_MAX = 0.5

#: Mean alpha at 500-1000 Hz above which Eyring is recommended over Sabine (common practice:
#: Sabine runs long in dead rooms).
EYRING_MEAN_ALPHA = 0.2

#: Absorption is "concentrated on one face pair" when the largest per-axis mean alpha at
#: 500-1000 Hz is more than this many times the smallest and above CONCENTRATED_MIN_ALPHA
#: (our rule of thumb, docs/methods.md).
CONCENTRATED_RATIO = 3.0
CONCENTRATED_MIN_ALPHA = 0.1

_AXES = np.arange(3)
_AXIS_NAMES = ("front/back", "left/right", "floor/ceiling")


class _Absorption(NamedTuple):
    """The room's absorption as arrays, checked: surfaces (n,), (n, bands); totals (bands,)."""

    bands: tuple[int, ...]
    volume: float
    areas: np.ndarray
    alphas: np.ndarray
    surface_area: float
    a_surf: np.ndarray
    a_obj: np.ndarray
    a_tot: np.ndarray


class _LogAbsorption(NamedTuple):
    """What the logarithmic formulas are given: alpha capped at ALPHA_LOG_MAX."""

    alphas: np.ndarray
    a_log: np.ndarray
    mean_alpha: np.ndarray


class _Air(NamedTuple):
    c: float
    k: float
    attenuation_db_m: np.ndarray
    m: np.ndarray


def _names(items, limit=4):
    items = list(items)
    text = ", ".join(f"'{i}'" for i in items[:limit])
    return text + (f" and {len(items) - limit} more" if len(items) > limit else "")


def _bands_text(bands, mask):
    return ", ".join(f"{b:g} Hz" for b, on in zip(bands, mask) if on)


def _verb(n: int, one: str, many: str) -> str:
    return one if n == 1 else many


def evaluate(room: Room, reverberant_model: str = "classic", method: str | None = None) -> RoomResult:
    """Evaluate a room per octave band.

    Parameters
    ----------
    room : Room -- the room, SI units
    reverberant_model : "classic" (diffuse field, 4/R) or "barron-lee" (revised theory)
    method : one of :data:`METHODS` to put in force instead of the recommended one (for the
        Schroeder frequency, Barron & Lee's reverberant term and comparisons); None puts the
        recommendation in force

    Returns
    -------
    RoomResult

    Notes
    -----
    Reverberation time by Sabine, Eyring and Millington-Sette (always) and by Fitzroy and
    Arau-Puchades (when the room is a box and every surface names its face); air absorption by
    ISO 9613-1 at the exact mid-band frequencies; room constant with the air term; levels by
    the equations of :mod:`roomcalc.engine.field`. docs/methods.md gives every equation, the
    cap of alpha for the logarithmic formulas and the rule that marks a formula unreliable.

    The inputs are checked once here, in whole arrays; the formulas then run unchecked.
    """
    _check_options(reverberant_model, method)
    found: list[Finding] = []
    ab = _absorption(room)
    air = _air(room, ab.bands, found)
    log = _log_absorption(room, ab, found)
    rt, unavailable, axis_alpha = _reverberation(room, ab, log, air)
    r_const = _room_constant(ab, log, air, found)
    unreliable = _unreliable(room, ab)
    recommended, why, concentrated = _recommend(ab, axis_alpha, rt, unreliable)
    in_force, reason = _choose_method(method, recommended, why, rt, unavailable)
    found += _unreliable_findings(unreliable, chosen=method)
    f_s = reverb.schroeder_frequency_unchecked(rt[in_force], ab.volume)
    found += _warnings(room, ab, f_s, concentrated, unreliable)
    sources, arrays, cautions = sources_and_receivers(room, r_const, rt[in_force],
                                                      reverberant_model, found)
    return RoomResult(
        room=room, bands_hz=ab.bands, volume_m3=ab.volume, surface_area_m2=ab.surface_area,
        absorption_area_m2=ab.a_tot, surface_absorption_m2=ab.a_surf,
        object_absorption_m2=ab.a_obj, air_attenuation_db_per_m=air.attenuation_db_m,
        air_m_per_m=air.m, speed_of_sound_m_s=air.c, mean_alpha=ab.a_tot / ab.surface_area,
        rt60_s=rt, unavailable=unavailable, method=in_force, method_reason=reason,
        recommended=recommended, room_constant_m2=r_const, schroeder_hz=f_s,
        reverberant_model=reverberant_model, sources=sources, receiver_arrays=arrays,
        warnings=tuple(found), cautions=tuple(cautions), axis_alpha=axis_alpha,
        unreliable=unreliable)


def _check_options(reverberant_model, method) -> None:
    if reverberant_model not in REVERBERANT_MODELS:
        raise ValueError(f"reverberant_model: {reverberant_model!r} is not one of "
                         f"{list(REVERBERANT_MODELS)}")
    if method is not None and method not in METHODS:
        raise ValueError(f"method: {method!r} is not one of {list(METHODS)}")


def _absorption(room: Room) -> _Absorption:
    """Check the room's volume, surfaces and objects; their areas, alphas and absorption."""
    bands = tuple(int(b) for b in room.bands_hz)
    nb = len(bands)
    if not room.surfaces:
        raise ValueError("surfaces: a room needs at least one surface")
    v = float(positive("volume", room.volume, "m^3"))
    surfaces = room.surfaces
    if any(sf.alpha.shape != (nb,) for sf in surfaces):
        raise ValueError(f"surfaces: alpha must have {nb} values per surface")
    areas = positive("surface area",
                     np.fromiter((sf.area * sf.count for sf in surfaces), float, len(surfaces)),
                     "m^2")
    alphas = non_negative("surface alpha", np.concatenate([sf.alpha for sf in surfaces])
                          ).reshape(len(surfaces), nb)
    a_surf = areas @ alphas
    if room.objects:
        a_obj = np.sum([o.count * o.absorption for o in room.objects], axis=0)
        if a_obj.shape != (nb,):
            raise ValueError(f"objects: absorption must have {nb} values per object")
        non_negative("object absorption", a_obj, "m^2")
    else:
        a_obj = np.zeros(nb)
    return _Absorption(bands, v, areas, alphas, float(areas.sum()), a_surf, a_obj,
                       a_surf + a_obj)


def _air(room: Room, bands, found: list[Finding]) -> _Air:
    """Speed of sound, Sabine's constant, and the air's attenuation per band (ISO 9613-1)."""
    a = room.air
    t, hr, pa = (float(x) for x in air_mod.check_conditions(a.temperature_c,
                                                              a.relative_humidity,
                                                              a.pressure_kpa))
    c = float(air_mod.speed_of_sound_unchecked(t))
    att, h = air_mod.attenuation_unchecked(band_constants(bands)[0], t, hr, pa)
    if air_mod.outside_accuracy_range(t, h):
        found.append(Finding("air-range",
            f"Air at {t:.1f} degC and {hr:.0f} % RH is outside the range where ISO 9613-1 "
            "states its accuracy (253-323 K, 0.05-5 % molar water vapour): air absorption is "
            "approximate."))
    return _Air(c, reverb.sabine_constant_unchecked(c), att,
                air_mod.energy_coefficient_unchecked(att))


def _log_absorption(room: Room, ab: _Absorption, found: list[Finding]) -> _LogAbsorption:
    """Alpha capped at ALPHA_LOG_MAX for the logarithmic formulas, and the report of it."""
    alphas, bands = ab.alphas, ab.bands
    capped = alphas > ALPHA_LOG_MAX
    if capped.any():
        who = [room.surfaces[i].name for i in np.nonzero(capped.any(axis=1))[0]]
        found.append(Finding("alpha-capped",
            f"{_verb(len(who), 'Surface', 'Surfaces')} {_names(who)} "
            f"{_verb(len(who), 'has', 'have')} alpha above {ALPHA_LOG_MAX} (largest "
            f"{alphas.max():.2f}): used as given by Sabine, capped at {ALPHA_LOG_MAX} for Eyring, "
            "Millington-Sette, Fitzroy and Arau-Puchades, whose ln(1 - alpha) has no value at 1."))
        alphas = np.minimum(alphas, ALPHA_LOG_MAX)
        a_log = ab.areas @ alphas + ab.a_obj
    else:
        a_log = ab.a_tot
    abar = a_log / ab.surface_area
    if np.any(abar > ALPHA_LOG_MAX):
        found.append(Finding("mean-alpha-capped",
            f"Mean alpha with objects exceeds {ALPHA_LOG_MAX} at "
            f"{_bands_text(bands, abar > ALPHA_LOG_MAX)}: capped for the logarithmic formulas."))
        abar = np.minimum(abar, ALPHA_LOG_MAX)
    return _LogAbsorption(alphas, a_log, abar)


def _reverberation(room: Room, ab: _Absorption, log: _LogAbsorption, air: _Air):
    """RT60 by every formula the room allows; why the others are unavailable; per-axis alpha."""
    v, m, k = ab.volume, air.m, air.k
    if np.any(ab.a_tot + 4.0 * m * v <= 0):
        raise ValueError("surfaces: the room has no absorption at all; Sabine's formula needs "
                         "some")
    rt = {"sabine": reverb.sabine_unchecked(v, ab.a_tot, m, k),
          "eyring": reverb.eyring_unchecked(v, ab.surface_area, log.mean_alpha, m, k),
          "millington": reverb.millington_unchecked(v, ab.areas, log.alphas, m, k, ab.a_obj)}
    unavailable: dict[str, str] = {}
    axes = _axes(room, ab, log)
    if isinstance(axes, str):
        unavailable["fitzroy"] = unavailable["arau_puchades"] = axes
        return rt, unavailable, None
    s_axis, axis_alpha = axes
    tx, w = reverb.axis_times_unchecked(v, s_axis, axis_alpha, m, k)
    rt["fitzroy"] = reverb.fitzroy_unchecked(tx, w)
    rt["arau_puchades"] = reverb.arau_puchades_unchecked(tx, w)
    return rt, unavailable, axis_alpha


def _axes(room: Room, ab: _Absorption, log: _LogAbsorption):
    """(area per axis (3,), capped mean alpha per axis (3, bands)), or why there are none."""
    if room.dimensions is None:
        return "the room is given by volume, not as a box (length, width, height)"
    faces = [sf.face for sf in room.surfaces]
    no_face = [sf.name for sf, f in zip(room.surfaces, faces) if f is None]
    if no_face:
        return f"surfaces {_names(no_face)} do not say which box face they lie on"
    axis_of = np.array([FACE_AXIS[f] for f in faces])
    onehot = (axis_of[None, :] == _AXES[:, None]).astype(float)
    s_axis = onehot @ ab.areas
    if np.any(s_axis <= 0):
        missing = [_AXIS_NAMES[i] for i in np.nonzero(s_axis <= 0)[0]]
        return f"no surface lies on the {', '.join(missing)} faces"
    # Objects' absorption is spread over the axes in proportion to area (docs/methods.md).
    axis_alpha = np.minimum(onehot @ (ab.areas[:, None] * log.alphas) / s_axis[:, None]
                            + ab.a_obj / ab.surface_area, ALPHA_LOG_MAX)
    return s_axis, axis_alpha


def _room_constant(ab: _Absorption, log: _LogAbsorption, air: _Air, found) -> np.ndarray:
    """Room constant with the air term, mean alpha capped at ALPHA_LOG_MAX (and reported)."""
    abar_t = mean_alpha_with_air_unchecked(ab.surface_area, log.a_log, ab.volume, air.m)
    if np.any(abar_t > ALPHA_LOG_MAX):
        found.append(Finding("room-constant-capped",
            f"Mean alpha with air exceeds {ALPHA_LOG_MAX} at "
            f"{_bands_text(ab.bands, abar_t > ALPHA_LOG_MAX)}: the room constant is computed "
            "with it capped; such a room is close to free field."))
        abar_t = np.minimum(abar_t, ALPHA_LOG_MAX)
    return room_constant_unchecked(ab.surface_area, abar_t)


def _unreliable(room: Room, ab: _Absorption) -> dict[str, str]:
    """Formulas whose result is absurd for this room, with the reason in words.

    Millington-Sette, in any band where the capped surfaces' terms make up more than
    MILLINGTON_CAPPED_SHARE_MAX of its absorption sum (:func:`reverb.millington_capped_share`).
    """
    if not (ab.alphas > ALPHA_LOG_MAX).any():
        return {}
    share = reverb.millington_capped_share(ab.areas, ab.alphas, ab.a_obj)      # (n, bands)
    total = share.sum(axis=0)
    bad = total > MILLINGTON_CAPPED_SHARE_MAX
    if not bad.any():
        return {}
    who = [room.surfaces[i].name for i in np.nonzero((share[:, bad] > 0).any(axis=1))[0]]
    return {"millington": (
        f"capped {_verb(len(who), 'surface', 'surfaces')} {_names(who)} (alpha above "
        f"{ALPHA_LOG_MAX}) {_verb(len(who), 'makes', 'make')} up more than "
        f"{MILLINGTON_CAPPED_SHARE_MAX:.0%} of its absorption at {_bands_text(ab.bands, bad)} "
        f"(up to {float(total.max()):.0%}), so the cap, not the room, sets its time")}


def _recommend(ab: _Absorption, axis_alpha, rt, unreliable: dict[str, str]):
    """The engine's recommendation, why, and whether absorption is concentrated on one face
    pair. The first rule that holds and names a formula the room has and that is not
    unreliable wins; Sabine is the last rule."""
    bands = ab.bands
    mid = [i for i, b in enumerate(bands) if b in (500, 1000)] or list(range(len(bands)))
    abar_mid = float(np.mean((ab.a_tot / ab.surface_area)[mid]))
    concentrated, ax_mid = False, None
    if axis_alpha is not None:
        ax_mid = axis_alpha[:, mid].mean(axis=1)
        concentrated = bool(ax_mid.max() > CONCENTRATED_RATIO * max(ax_mid.min(), 1e-6)
                            and ax_mid.max() > CONCENTRATED_MIN_ALPHA)
    rules = (
        (concentrated, "arau_puchades", lambda: (
            "absorption is concentrated on one pair of faces (mean alpha per axis at "
            "500-1000 Hz: " + ", ".join(f"{n} {x:.2f}" for n, x in zip(_AXIS_NAMES, ax_mid))
            + "); Arau-Puchades weights each axis by its own absorption")),
        (abar_mid > EYRING_MEAN_ALPHA, "eyring", lambda: (
            f"mean alpha at 500-1000 Hz is {abar_mid:.2f}, above {EYRING_MEAN_ALPHA}, where "
            "Sabine runs long")),
        (True, "sabine", lambda: (
            f"mean alpha at 500-1000 Hz is {abar_mid:.2f}, a live room where Sabine and Eyring "
            "agree closely")),
    )
    name, why = next((k, text()) for ok, k, text in rules
                     if ok and k in rt and k not in unreliable)
    for k, because in unreliable.items():
        why += f"; {METHOD_TITLES[k]} is not recommended here: {because}"
    return name, why, concentrated


def _choose_method(method, recommended: str, why: str, rt, unavailable):
    """The formula in force and the reason: the caller's choice, else the recommendation."""
    if method is None:
        return recommended, why
    if method not in rt:
        raise ValueError(f"method: {METHOD_TITLES[method]} is unavailable for this room: "
                         f"{unavailable[method]}")
    if method == recommended:
        return method, why
    return method, ("chosen for this room (in its file or by the user); the recommendation "
                    f"was {METHOD_TITLES[recommended]} ({why})")


def _unreliable_findings(unreliable: dict[str, str], chosen) -> list[Finding]:
    out = []
    for k, because in unreliable.items():
        title = METHOD_TITLES[k]
        if k == chosen:
            out.append(Finding(f"{k}-unreliable",
                f"{title} was chosen, but it is unreliable for this room: {because}. Its "
                "times are shown and used as chosen; Sabine or Eyring is the safer choice "
                "here."))
        else:
            out.append(Finding(f"{k}-unreliable",
                f"{title} is shown but not recommended: {because}."))
    return out


def _warnings(room: Room, ab: _Absorption, f_s, concentrated: bool,
              unreliable: dict[str, str]) -> list[Finding]:
    """Where the diffuse-field figures are doubtful: modes, proportions, areas, absorption."""
    found, bands = [], ab.bands
    below = np.asarray(bands) < f_s
    if below.any():
        found.append(Finding("schroeder",
            f"{_bands_text(bands, below)} {_verb(int(below.sum()), 'lies', 'lie')} below the "
            f"Schroeder frequency (about {float(np.max(f_s[below])):.0f} Hz): room modes "
            "dominate there and the diffuse-field figures are rough."))
    if room.dimensions is not None:
        dims = sorted(room.dimensions)
        if dims[2] / dims[0] > 3.0:         # common practice: over 3:1 the field is not diffuse
            found.append(Finding("proportions",
                f"The box is {dims[2] / dims[0]:.1f} times longer than its smallest side (over "
                "3:1): the sound field is unlikely to be diffuse; prefer Fitzroy or "
                "Arau-Puchades (give each surface its face)."))
        L, W, H = room.dimensions
        box_s = 2.0 * (L * W + L * H + W * H)
        if abs(ab.surface_area - box_s) > 0.05 * box_s:
            found.append(Finding("area-mismatch",
                f"The surfaces add up to {ab.surface_area:.1f} m^2 but the box has "
                f"{box_s:.1f} m^2 ({100 * (ab.surface_area - box_s) / box_s:+.0f} %): check for "
                "missing or doubled surfaces."))
    if concentrated:
        found.append(Finding("concentrated",
            "Absorption is concentrated on one pair of faces: the diffuse-field assumption behind "
            "Sabine and Eyring is doubtful; Fitzroy and Arau-Puchades are shown for that reason."))
    high = np.asarray(bands)[(ab.a_tot / ab.surface_area) > 0.3]
    if high.size:
        better = "Eyring" if "millington" in unreliable else "Eyring or Millington-Sette"
        found.append(Finding("high-alpha",
            f"Mean alpha is above 0.3 at {', '.join(f'{b:g} Hz' for b in high)}: Sabine "
            f"overestimates the reverberation time there; use {better}."))
    return found
