"""Evaluate a room: every reverberation formula, the room constant, levels, warnings and cautions.

This module ties the formula modules together for one :class:`~roomcalc.engine.model.Room`, and
for batches of rooms given as arrays. It reads no files and prints nothing.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from roomcalc.engine import air as air_mod
from roomcalc.engine import field as field_mod
from roomcalc.engine import reverb
from roomcalc.engine.reverb import LN10
from roomcalc.engine.bands import (a_weighted_total, band_constants, db_from_ratio,
                                   energetic_sum)
from roomcalc.engine.model import FACE_AXIS, Room

#: Largest alpha the logarithmic formulas are given; larger values are capped (and reported).
ALPHA_LOG_MAX = 0.99

#: Level at a receiver from which the hearing caution is shown [dB(A)] (EU 2003/10/EC lower
#: exposure action value).
CAUTION_DBA = 80.0

#: Closest a receiver may be to a source [m]; nearer, the point-source level has no meaning.
MIN_DISTANCE_M = 1e-3

#: Methods, in the order they are reported.
METHODS = ("sabine", "eyring", "millington", "fitzroy", "arau_puchades")
METHOD_TITLES = {"sabine": "Sabine", "eyring": "Eyring", "millington": "Millington-Sette",
                 "fitzroy": "Fitzroy", "arau_puchades": "Arau-Puchades"}
REVERBERANT_MODELS = ("classic", "barron-lee")

HEARING_CAUTION = (
    "Levels of 80 dB(A) or more can damage hearing over a working day. As examples of the rules: "
    "EU Directive 2003/10/EC sets exposure action values of 80 and 85 dB(A) and a limit of "
    "87 dB(A) (LEX,8h); OSHA 29 CFR 1910.95 sets a permissible limit of 90 dBA over 8 h (5 dB "
    "exchange rate) with a hearing-conservation action level of 85 dBA. Wear hearing protection "
    "where such levels occur. These are estimates: they do not replace a measurement by a "
    "competent person, and the regulations and codes that apply where you are govern."
)


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
class RoomResult:
    """Everything computed for one room. Arrays are per band, SI units."""

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
    receiver_arrays: "ReceiverArrays | None"
    warnings: tuple[Finding, ...] = ()
    cautions: tuple[str, ...] = ()
    axis_alpha: np.ndarray | None = field(default=None)

    @property
    def rt60_in_force(self) -> np.ndarray:
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
    method : one of :data:`METHODS` to use instead of the recommended one (for the Schroeder
        frequency and Barron & Lee's reverberant term); None takes the recommendation

    Returns
    -------
    RoomResult

    Notes
    -----
    Reverberation time by Sabine, Eyring and Millington-Sette (always) and by Fitzroy and
    Arau-Puchades (when the room is a box and every surface names its face); air absorption by
    ISO 9613-1 at the exact mid-band frequencies; room constant with the air term; levels by
    :func:`roomcalc.engine.field.levels`. docs/methods.md gives every equation.

    The inputs are checked once here, in whole arrays; the formulas then run unchecked.
    """
    if reverberant_model not in REVERBERANT_MODELS:
        raise ValueError(f"reverberant_model: {reverberant_model!r} is not one of "
                         f"{list(REVERBERANT_MODELS)}")
    if method is not None and method not in METHODS:
        raise ValueError(f"method: {method!r} is not one of {list(METHODS)}")
    bands = tuple(int(b) for b in room.bands_hz)
    nb = len(bands)
    if not room.surfaces:
        raise ValueError("surfaces: a room needs at least one surface")
    v = float(room.volume)
    if not (math.isfinite(v) and v > 0):
        raise ValueError(f"volume: {v} must be finite and above 0 m^3")
    found: list[Finding] = []
    fm, aw = band_constants(bands)

    surfaces = room.surfaces
    areas = np.fromiter((sf.area * sf.count for sf in surfaces), float, len(surfaces))
    if any(sf.alpha.shape != (nb,) for sf in surfaces):
        raise ValueError(f"surfaces: alpha must have {nb} values per surface")
    alphas = np.concatenate([sf.alpha for sf in surfaces]).reshape(len(surfaces), nb)
    if not (np.isfinite(areas).all() and (areas > 0).all()):
        raise ValueError("surfaces: every area must be finite and above 0 m^2")
    if not (np.isfinite(alphas).all() and (alphas >= 0).all()):
        raise ValueError("surfaces: every alpha must be finite and 0 or more")
    s_tot = float(areas.sum())
    a_surf = areas @ alphas
    if room.objects:
        a_obj = np.sum([o.count * o.absorption for o in room.objects], axis=0)
        if a_obj.shape != (nb,) or not np.all(np.isfinite(a_obj)) or np.any(a_obj < 0):
            raise ValueError(f"objects: absorption must be {nb} finite values of 0 or more")
    else:
        a_obj = np.zeros(nb)
    a_tot = a_surf + a_obj

    air = room.air
    if not (-273.15 < air.temperature_c < 1000 and 0 <= air.relative_humidity <= 100
            and air.pressure_kpa > 0):
        raise ValueError("air: temperature above -273.15 degC, humidity 0 to 100 %, "
                         "pressure above 0 kPa")
    c = 331.3 * math.sqrt(1.0 + air.temperature_c / 273.15)   # air.speed_of_sound
    k = 24.0 * LN10 / c                                       # reverb.sabine_constant
    att, h = air_mod._iso9613_1(fm, air.temperature_c + 273.15, air.relative_humidity,
                                air.pressure_kpa)
    t_k = air.temperature_c + 273.15
    if t_k < 253.0 or t_k > 323.0 or np.any(h < 0.05) or np.any(h > 5.0):
        found.append(Finding("air-range",
            f"Air at {air.temperature_c:.1f} degC and {air.relative_humidity:.0f} % RH is outside "
            "the range where ISO 9613-1 states its accuracy (253-323 K, 0.05-5 % molar water "
            "vapour): air absorption is approximate."))
    m = att / air_mod.DB_PER_NEPER_ENERGY

    # Logarithmic formulas take alpha below 1: cap and say so.
    capped = alphas > ALPHA_LOG_MAX
    if capped.any():
        who = [surfaces[i].name for i in np.nonzero(capped.any(axis=1))[0]]
        found.append(Finding("alpha-capped",
            f"{_verb(len(who), 'Surface', 'Surfaces')} {_names(who)} "
            f"{_verb(len(who), 'has', 'have')} alpha above {ALPHA_LOG_MAX} (largest "
            f"{alphas.max():.2f}): used as given by Sabine, capped at {ALPHA_LOG_MAX} for Eyring, "
            "Millington-Sette, Fitzroy and Arau-Puchades, whose ln(1 - alpha) has no value at 1."))
        alphas_log = np.minimum(alphas, ALPHA_LOG_MAX)
        a_log = areas @ alphas_log + a_obj
    else:
        alphas_log = alphas
        a_log = a_tot
    abar = a_log / s_tot
    if np.any(abar > ALPHA_LOG_MAX):
        found.append(Finding("mean-alpha-capped",
            f"Mean alpha with objects exceeds {ALPHA_LOG_MAX} at "
            f"{_bands_text(bands, abar > ALPHA_LOG_MAX)}: capped for the logarithmic formulas."))
        abar = np.minimum(abar, ALPHA_LOG_MAX)

    rt: dict[str, np.ndarray] = {}
    unavailable: dict[str, str] = {}
    if np.any(a_tot + 4.0 * m * v <= 0):
        raise ValueError("surfaces: the room has no absorption at all; Sabine's formula needs "
                         "some")
    rt["sabine"] = reverb._sabine(v, a_tot, m, k)
    rt["eyring"] = reverb._eyring(v, s_tot, abar, m, k)
    rt["millington"] = reverb._millington(v, areas, alphas_log, m, k, a_obj)

    axis_alpha = None
    if room.dimensions is None:
        reason = "the room is given by volume, not as a box (length, width, height)"
        unavailable["fitzroy"] = unavailable["arau_puchades"] = reason
    else:
        faces = [sf.face for sf in surfaces]
        no_face = [sf.name for sf, f in zip(surfaces, faces) if f is None]
        if no_face:
            reason = f"surfaces {_names(no_face)} do not say which box face they lie on"
            unavailable["fitzroy"] = unavailable["arau_puchades"] = reason
        else:
            axis_of = np.array([FACE_AXIS[f] for f in faces])
            onehot = (axis_of[None, :] == _AXES[:, None]).astype(float)
            s_axis = onehot @ areas
            if np.any(s_axis <= 0):
                missing = [("front/back", "left/right", "floor/ceiling")[i]
                           for i in np.nonzero(s_axis <= 0)[0]]
                reason = f"no surface lies on the {', '.join(missing)} faces"
                unavailable["fitzroy"] = unavailable["arau_puchades"] = reason
            else:
                axis_alpha = np.minimum(onehot @ (areas[:, None] * alphas_log) / s_axis[:, None]
                                        + a_obj / s_tot, ALPHA_LOG_MAX)
                tx, w = reverb._axis_times_impl(v, s_axis, axis_alpha, m, k)
                rt["fitzroy"] = reverb._fitzroy(tx, w)
                rt["arau_puchades"] = reverb._arau_puchades(tx, w)

    # Room constant, with air.
    abar_t = (a_log + 4.0 * m * v) / s_tot
    if np.any(abar_t > ALPHA_LOG_MAX):
        found.append(Finding("room-constant-capped",
            f"Mean alpha with air exceeds {ALPHA_LOG_MAX} at "
            f"{_bands_text(bands, abar_t > ALPHA_LOG_MAX)}: the room constant is computed with it "
            "capped; such a room is close to free field."))
        abar_t = np.minimum(abar_t, ALPHA_LOG_MAX)
    r_const = s_tot * abar_t / (1.0 - abar_t)                 # field.room_constant

    # Which method to trust.
    mid = [i for i, b in enumerate(bands) if b in (500, 1000)] or list(range(nb))
    abar_mid = float(np.mean((a_tot / s_tot)[mid]))
    concentrated = False
    if axis_alpha is not None:
        ax_mid = axis_alpha[:, mid].mean(axis=1)
        concentrated = bool(ax_mid.max() > 3.0 * max(ax_mid.min(), 1e-6) and ax_mid.max() > 0.1)
    if concentrated:
        recommended = "arau_puchades"
        reason = ("absorption is concentrated on one pair of faces (mean alpha per axis at "
                  "500-1000 Hz: " + ", ".join(f"{n} {x:.2f}" for n, x in
                  zip(("front/back", "left/right", "floor/ceiling"), ax_mid)) +
                  "); Arau-Puchades weights each axis by its own absorption")
    elif abar_mid > 0.2:
        recommended = "eyring"
        reason = f"mean alpha at 500-1000 Hz is {abar_mid:.2f}, above 0.2, where Sabine runs long"
    else:
        recommended = "sabine"
        reason = (f"mean alpha at 500-1000 Hz is {abar_mid:.2f}, a live room where Sabine "
                  "and Eyring agree closely")
    engine_choice = recommended
    if method is not None:
        if method not in rt:
            raise ValueError(f"method: {METHOD_TITLES[method]} is unavailable for this room: "
                             f"{unavailable[method]}")
        if method != recommended:
            reason = (f"chosen by the user; the recommendation was {METHOD_TITLES[recommended]} "
                      f"({reason})")
        recommended = method
    t_rec = rt[recommended]

    # Validity warnings.
    f_s = 2000.0 * np.sqrt(t_rec / v)                         # reverb.schroeder_frequency
    below = np.asarray(bands) < f_s
    if below.any():
        found.append(Finding("schroeder",
            f"{_bands_text(bands, below)} {_verb(int(below.sum()), 'lies', 'lie')} below the "
            f"Schroeder frequency (about {float(np.max(f_s[below])):.0f} Hz): room modes "
            "dominate there and the diffuse-field figures are rough."))
    if room.dimensions is not None:
        dims = sorted(room.dimensions)
        if dims[2] / dims[0] > 3.0:
            found.append(Finding("proportions",
                f"The box is {dims[2] / dims[0]:.1f} times longer than its smallest side (over "
                "3:1): the sound field is unlikely to be diffuse; prefer Fitzroy or "
                "Arau-Puchades (give each surface its face)."))
        L, W, H = room.dimensions
        box_s = 2.0 * (L * W + L * H + W * H)
        if abs(s_tot - box_s) > 0.05 * box_s:
            found.append(Finding("area-mismatch",
                f"The surfaces add up to {s_tot:.1f} m^2 but the box has {box_s:.1f} m^2 "
                f"({100 * (s_tot - box_s) / box_s:+.0f} %): check for missing or doubled surfaces."))
    if concentrated:
        found.append(Finding("concentrated",
            "Absorption is concentrated on one pair of faces: the diffuse-field assumption behind "
            "Sabine and Eyring is doubtful; Fitzroy and Arau-Puchades are shown for that reason."))
    high = np.asarray(bands)[(a_tot / s_tot) > 0.3]
    if high.size:
        found.append(Finding("high-alpha",
            f"Mean alpha is above 0.3 at {', '.join(f'{b:g} Hz' for b in high)}: Sabine "
            "overestimates the reverberation time there; use Eyring or Millington-Sette."))

    src_results, rec_arrays, cautions = _field(room, bands, aw, r_const, t_rec, v,
                                                reverberant_model, found)
    return RoomResult(
        room=room, bands_hz=bands, volume_m3=v, surface_area_m2=s_tot,
        absorption_area_m2=a_tot, surface_absorption_m2=a_surf, object_absorption_m2=a_obj,
        air_attenuation_db_per_m=att, air_m_per_m=m, speed_of_sound_m_s=c,
        mean_alpha=a_tot / s_tot, rt60_s=rt, unavailable=unavailable,
        method=recommended, method_reason=reason, recommended=engine_choice,
        room_constant_m2=r_const,
        schroeder_hz=f_s, reverberant_model=reverberant_model,
        sources=src_results, receiver_arrays=rec_arrays,
        warnings=tuple(found), cautions=tuple(cautions), axis_alpha=axis_alpha)


_AXES = np.arange(3)


def _distances(room: Room) -> np.ndarray:
    """Distances [m] receiver x source: given ones, else from the positions, in one array."""
    srcs, recs = room.sources, room.receivers
    dist = np.full((len(recs), len(srcs)), np.nan)
    sp = np.array([s.position if s.position is not None else (np.nan,) * 3 for s in srcs],
                  dtype=float).reshape(len(srcs), 3)
    rp = np.array([r.position if r.position is not None else (np.nan,) * 3 for r in recs],
                  dtype=float).reshape(len(recs), 3)
    diff = rp[:, None, :] - sp[None, :, :]
    dist = np.sqrt(np.einsum("rsk,rsk->rs", diff, diff))
    index = {s.name: j for j, s in enumerate(srcs)}
    for i, r in enumerate(recs):
        for name, d in r.distances.items():
            j = index.get(name)
            if j is not None:
                dist[i, j] = d
    if np.isnan(dist).any():
        i, j = (int(x[0]) for x in np.nonzero(np.isnan(dist)))
        raise ValueError(f"receiver {recs[i].name!r}: no distance to source {srcs[j].name!r} "
                         "and no positions to compute it from")
    if not np.isfinite(dist).all() or (dist < MIN_DISTANCE_M).any():
        raise ValueError(f"receivers: every distance to a source must be finite and at least "
                         f"{MIN_DISTANCE_M * 1000:g} mm (a receiver is at a source's position)")
    return dist


def _field(room, bands, aw, r_const, t_rec, v, reverberant_model, found):
    """Critical distances per source and levels per receiver, all pairs at once."""
    nb = len(bands)
    srcs = room.sources
    src_results: list[SourceResult] = []
    if srcs:
        if any(s.sound_power_db.shape != (nb,) for s in srcs):
            raise ValueError(f"sources: sound power needs {nb} values per source")
        lw = np.concatenate([s.sound_power_db for s in srcs]).reshape(len(srcs), nb)  # (S, B)
        if not np.isfinite(lw).all():
            raise ValueError(f"sources: sound power needs {nb} finite values per source")
        q = np.array([s.directivity for s in srcs], dtype=float)            # (S,)
        if not (np.all(np.isfinite(q)) and np.all(q > 0)):
            raise ValueError("sources: directivity Q must be finite and above 0")
        rc = np.sqrt(q[:, None] * r_const[None, :] / (16.0 * np.pi))     # field.critical_distance
        src_results = [SourceResult(s.name, float(q[j]), s.sound_power_db, rc[j])
                       for j, s in enumerate(srcs)]
    cautions: list[str] = []
    if not (srcs and room.receivers):
        return tuple(src_results), None, cautions
    dist = _distances(room)                                                # (R, S)
    power = 10.0 ** (lw / 10.0)                                            # (S, B)
    direct = q[None, :, None] / (4.0 * np.pi * dist[:, :, None] ** 2)      # (R, S, 1)
    e_dir = direct * power[None]                                           # (R, S, B)
    if reverberant_model == "classic":
        e_rev = (4.0 / r_const)[None, None, :] * power[None]               # (1, S, B)
    else:
        e_rev = field_mod.barron_lee_reverberant_term(t_rec[None, None, :], v,
                                                      dist[:, :, None]) * power[None]
    per = e_dir + e_rev                                                    # (R, S, B)
    d_sum = e_dir.sum(axis=1)
    r_sum = np.broadcast_to(e_rev.sum(axis=1), d_sum.shape)
    levels = 10.0 * np.log10(np.stack([d_sum + r_sum, d_sum, r_sum]))      # (3, R, B)
    la = 10.0 * np.log10(np.sum(10.0 ** ((levels + aw) / 10.0), axis=-1))  # (3, R)
    names = tuple(s.name for s in srcs)
    arrays = ReceiverArrays(tuple(r.name for r in room.receivers), names, dist, levels[0],
                            levels[1], levels[2], la, per)
    for i in np.nonzero(la[0] >= CAUTION_DBA)[0]:
        cautions.append(f"'{room.receivers[i].name}': estimated {la[0, i]:.1f} dB(A).")
    close = np.argwhere(dist < 0.5)
    if close.size:
        found.append(Finding("receiver-close",
            "; ".join(f"'{room.receivers[i].name}' is {dist[i, j]:.2f} m from '{names[j]}'"
                      for i, j in close[:6]) +
            (f" (and {len(close) - 6} more)" if len(close) > 6 else "") +
            ": closer than 0.5 m, where a real source is not a point and the inverse-square "
            "estimate is rough."))
    if cautions:
        cautions.append(HEARING_CAUTION)
    return tuple(src_results), arrays, cautions


def distance_curves(result: RoomResult, source: str, distances_m=None, points: int = 200):
    """Level against distance for one source of an evaluated room, per band and A-weighted.

    Parameters
    ----------
    result : RoomResult -- an evaluated room
    source : str -- the source's name
    distances_m : array_like, optional -- distances [m]; default ``points`` values spaced
        logarithmically from 0.1 m to the room's largest dimension (or the cube root of V x 2)
    points : int -- number of points when distances are not given

    Returns
    -------
    dict with ``distance_m`` (points,), ``total_db``, ``direct_db``, ``reverberant_db``
    (points, bands), the same A-weighted (``*_dba``, (points,)), and ``critical_distance_m``
    (bands,).
    """
    room = result.room
    src = next((s for s in room.sources if s.name == source), None)
    if src is None:
        raise ValueError(f"source: {source!r} is not a source of this room")
    if distances_m is None:
        far = max(room.dimensions) * 1.2 if room.dimensions else 2.0 * room.volume ** (1 / 3)
        distances_m = np.geomspace(0.1, max(far, 0.2), points)
    d = np.asarray(distances_m, dtype=float)
    tot, dr, rv = field_mod.distance_curve(src.sound_power_db, src.directivity, d,
                                           result.room_constant_m2, rt60=result.rt60_in_force,
                                           volume=result.volume_m3,
                                           model=result.reverberant_model)
    bands = result.bands_hz
    return {"distance_m": d, "total_db": tot, "direct_db": dr, "reverberant_db": rv,
            "total_dba": a_weighted_total(tot, bands), "direct_dba": a_weighted_total(dr, bands),
            "reverberant_dba": a_weighted_total(rv, bands),
            "critical_distance_m": field_mod.critical_distance(src.directivity,
                                                               result.room_constant_m2)}


@dataclass(frozen=True, eq=False)
class ReceiverChange:
    name: str
    level_change_db: np.ndarray
    level_change_dba: float
    reverberant_change_dba: float
    inside_critical_distance: str | None


@dataclass(frozen=True, eq=False)
class Comparison:
    """Before and after: changes are after minus before (negative = shorter or quieter)."""

    before: RoomResult
    after: RoomResult
    method: str
    rt60_change_s: dict[str, np.ndarray]
    reverberant_reduction_db: np.ndarray
    receivers: tuple[ReceiverChange, ...]
    notes: tuple[str, ...]


def compare(before: RoomResult, after: RoomResult) -> Comparison:
    """Compare two evaluated rooms, e.g. a room and its treated copy.

    Notes
    -----
    The reverberant-field reduction is

    .. math:: \\Delta L_{rev} = 10 \\lg(R_2 / R_1)

    and at a receiver at distance r the total change is
    :math:`10 \\lg[(Q/4\\pi r^2 + 4/R_1) / (Q/4\\pi r^2 + 4/R_2)]`, much smaller than the
    reverberant reduction inside the critical distance, where direct sound dominates.

    References
    ----------
    .. [1] Bies, Hansen & Howard, Engineering Noise Control, 5th ed. (2017), sec. 6.4
       (common practice).
    """
    if before.bands_hz != after.bands_hz:
        raise ValueError(f"bands: before has {list(before.bands_hz)} Hz, after has "
                         f"{list(after.bands_hz)} Hz; compare needs the same bands")
    rt_change = {k: after.rt60_s[k] - before.rt60_s[k] for k in METHODS
                 if k in before.rt60_s and k in after.rt60_s}
    red = db_from_ratio(after.room_constant_m2 / before.room_constant_m2)
    b_rec = {r.name: r for r in before.receivers}
    b_src = {s.name: s for s in before.sources}
    bands = before.bands_hz
    i_mid = bands.index(1000) if 1000 in bands else len(bands) // 2
    changes, notes = [], []
    for ra in after.receivers:
        rb = b_rec.get(ra.name)
        if rb is None:
            continue
        d_band = ra.level_db - rb.level_db
        d_a = ra.level_dba - rb.level_dba
        d_rev = ra.reverberant_dba - rb.reverberant_dba
        inside = None
        if rb.per_source_db:
            loudest = max(rb.per_source_db, key=lambda n: energetic_sum(rb.per_source_db[n]))
            src = b_src.get(loudest)
            if src is not None:
                rc = float(src.critical_distance_m[i_mid])
                dist = rb.distances_m[loudest]
                if dist < rc:
                    inside = loudest
                    notes.append(
                        f"'{ra.name}' is {dist:.1f} m from '{loudest}', inside its critical "
                        f"distance ({rc:.1f} m at {bands[i_mid]} Hz): direct sound dominates "
                        f"there, so the level falls by {-d_a:.1f} dB(A) although the "
                        f"reverberant field falls by {-d_rev:.1f} dB(A). Absorption cannot "
                        "reduce direct sound; a screen, an enclosure or distance can.")
        changes.append(ReceiverChange(ra.name, d_band, float(d_a), float(d_rev), inside))
    method = before.method
    if method not in after.rt60_s:
        raise ValueError(f"method: {METHOD_TITLES[method]}, the formula in force for the room "
                         f"before, is unavailable for the room after: {after.unavailable[method]}")
    return Comparison(before, after, method, rt_change, red, tuple(changes), tuple(notes))


def batch_reverberation(volume, areas, alphas, object_absorption=0.0, m=0.0, c=343.0):
    """Sabine, Eyring, Millington-Sette and room constant for many rooms at once.

    Parameters
    ----------
    volume : array_like, shape (N,) -- volumes [m^3]
    areas : array_like, shape (N, n) -- surface areas [m^2] (pad with zero-area surfaces)
    alphas : array_like, shape (N, n, bands) -- coefficients, below 1
    object_absorption : array_like, shape (N, bands) or broadcastable -- objects [m^2]
    m : array_like, shape (bands,) or (N, bands) -- air coefficient [1/m]
    c : float -- speed of sound [m/s]

    Returns
    -------
    dict of (N, bands) arrays: ``sabine``, ``eyring``, ``millington``, ``room_constant``
    """
    v = np.asarray(volume, dtype=float)[:, None]
    s_i = np.asarray(areas, dtype=float)
    a_i = np.asarray(alphas, dtype=float)
    a_obj = np.broadcast_to(np.asarray(object_absorption, dtype=float), (v.shape[0], a_i.shape[-1]))
    s = s_i.sum(axis=1)[:, None]
    a = np.einsum("nk,nkb->nb", s_i, a_i) + a_obj
    return {
        "sabine": reverb.sabine(v, a, m, c),
        "eyring": reverb.eyring(v, s, a, m, c),
        "millington": reverb.millington(v, s_i, a_i, m, c, extra_absorption=a_obj),
        "room_constant": field_mod.room_constant(s, (a + 4.0 * np.asarray(m) * v) / s),
    }


def batch_reverberation_by_material(volume, areas, material, material_alpha,
                                    object_absorption=0.0, m=0.0, c=343.0):
    """Sabine, Eyring, Millington-Sette and room constant for many rooms built from one table
    of materials, e.g. a facilities office surveying all its classrooms.

    Parameters
    ----------
    volume : array_like, shape (N,) -- volumes [m^3]
    areas : array_like, shape (N, n) -- surface areas [m^2] (pad with zero areas)
    material : array_like of int, shape (N, n) -- row of ``material_alpha`` each surface uses
    material_alpha : array_like, shape (M, bands) -- coefficients of the M materials, below 1
    object_absorption : array_like, shape (N, bands) or broadcastable -- objects [m^2]
    m : array_like, shape (bands,) -- air coefficient [1/m]
    c : float -- speed of sound [m/s]

    Returns
    -------
    dict of (N, bands) arrays: ``sabine``, ``eyring``, ``millington``, ``room_constant``

    Notes
    -----
    The equations of :func:`batch_reverberation`. Because every surface takes its alpha from the
    table, each room's area per material W (N, M, sparse) is formed once, and then
    :math:`A = W \\alpha` and :math:`\\sum_i S_i \\ln(1 - \\alpha_i) = W \\ln(1 - \\alpha)`: the
    logarithm is taken M times, not N n times.
    """
    v = np.asarray(volume, dtype=float)
    s_i = np.asarray(areas, dtype=float)
    idx = np.asarray(material)
    alpha = np.asarray(material_alpha, dtype=float)
    n_rooms, n_mat = v.shape[0], alpha.shape[0]
    if s_i.shape != idx.shape or s_i.shape[0] != n_rooms:
        raise ValueError("areas and material must both have shape (rooms, surfaces)")
    if not np.issubdtype(idx.dtype, np.integer) or idx.min() < 0 or idx.max() >= n_mat:
        raise ValueError(f"material: whole numbers from 0 to {n_mat - 1} (rows of material_alpha)")
    if not (np.isfinite(v).all() and (v > 0).all()):
        raise ValueError("volume: must be finite and above 0")
    if not (np.isfinite(s_i).all() and (s_i >= 0).all()):
        raise ValueError("areas: must be finite and 0 or more")
    if not ((alpha >= 0).all() and (alpha < 1).all()):
        raise ValueError("material_alpha: must be 0 or more and below 1")
    from scipy import sparse  # imported here: scipy.sparse is slow to import for one room

    n_surf = s_i.shape[1]
    w = sparse.csr_matrix((s_i.ravel(), idx.ravel(), np.arange(0, n_rooms * n_surf + 1, n_surf)),
                          shape=(n_rooms, n_mat))          # area of each material in each room
    nb = alpha.shape[1]
    both = w @ np.hstack([alpha, np.log1p(-alpha)])        # (N, 2 bands): A and sum S ln(1-a)
    a_obj = np.broadcast_to(np.asarray(object_absorption, dtype=float), (n_rooms, nb))
    s = s_i.sum(axis=1)[:, None]
    # Each whole-array operation costs about as much as the next here, so shared terms are
    # formed once.
    air4 = (4.0 * np.asarray(m, dtype=float)) * v[:, None]
    a = both[:, :nb]
    a += a_obj
    abar = a / s
    if (abar >= 1).any():
        raise ValueError("objects: mean alpha with objects reaches 1 in some room")
    kv = (24.0 * LN10 / float(c)) * v[:, None]
    a_air = a + air4
    abar_t = a_air / s
    eyr = np.log(1.0 - abar)              # log(1 - x): vectorised log, faster than log1p here
    eyr *= -s
    eyr += air4
    mil = air4 - both[:, nb:]
    mil += a_obj
    return {
        "sabine": kv / a_air,
        "eyring": kv / eyr,
        "millington": kv / mil,
        "room_constant": abar_t * s / (1.0 - abar_t),
    }
