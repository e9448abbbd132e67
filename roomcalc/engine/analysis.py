"""Evaluate a room: every reverberation formula, the room constant, levels, warnings and cautions.

This module ties the formula modules together for one :class:`~roomcalc.engine.model.Room`, and
for batches of rooms given as arrays. It reads no files and prints nothing.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass, field

import numpy as np

from roomcalc.engine import air as air_mod
from roomcalc.engine import field as field_mod
from roomcalc.engine import reverb
from roomcalc.engine.bands import a_weighted_total, db_from_ratio, energetic_sum, exact_centre
from roomcalc.engine.model import FACE_AXIS, Room

#: Largest alpha the logarithmic formulas are given; larger values are capped (and reported).
ALPHA_LOG_MAX = 0.99

#: Level at a receiver from which the hearing caution is shown [dB(A)] (EU 2003/10/EC lower
#: exposure action value).
CAUTION_DBA = 80.0

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
    per_source_db: dict[str, np.ndarray]


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
    recommended: str
    recommended_reason: str
    room_constant_m2: np.ndarray
    schroeder_hz: np.ndarray
    reverberant_model: str
    sources: tuple[SourceResult, ...]
    receivers: tuple[ReceiverResult, ...]
    warnings: tuple[Finding, ...] = ()
    cautions: tuple[str, ...] = ()
    axis_alpha: np.ndarray | None = field(default=None)

    @property
    def rt60_recommended(self) -> np.ndarray:
        return self.rt60_s[self.recommended]


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
    """
    if reverberant_model not in REVERBERANT_MODELS:
        raise ValueError(f"reverberant_model: {reverberant_model!r} is not one of "
                         f"{list(REVERBERANT_MODELS)}")
    bands = tuple(int(b) for b in room.bands_hz)
    nb = len(bands)
    if not room.surfaces:
        raise ValueError("surfaces: a room needs at least one surface")
    v = float(room.volume)
    found: list[Finding] = []

    areas = np.array([s.total_area for s in room.surfaces])
    alphas = np.stack([s.alpha for s in room.surfaces])
    if alphas.shape != (len(areas), nb):
        raise ValueError(f"surfaces: alpha must have {nb} values per surface")
    s_tot = float(areas.sum())
    a_surf = areas @ alphas
    if room.objects:
        a_obj = np.sum([o.count * o.absorption for o in room.objects], axis=0)
    else:
        a_obj = np.zeros(nb)
    a_tot = a_surf + a_obj

    air = room.air
    c = float(air_mod.speed_of_sound(air.temperature_c))
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", air_mod.AirRangeWarning)
        att = air_mod.attenuation_db_per_m(exact_centre(bands), air.temperature_c,
                                           air.relative_humidity, air.pressure_kpa)
    if any(issubclass(w.category, air_mod.AirRangeWarning) for w in caught):
        found.append(Finding("air-range",
            f"Air at {air.temperature_c:.1f} degC and {air.relative_humidity:.0f} % RH is outside "
            "the range where ISO 9613-1 states its accuracy (253-323 K, 0.05-5 % molar water "
            "vapour): air absorption is approximate."))
    m = air_mod.energy_coefficient(att)

    # Logarithmic formulas take alpha below 1: cap and say so.
    capped = alphas > ALPHA_LOG_MAX
    if np.any(capped):
        who = [room.surfaces[i].name for i in np.nonzero(capped.any(axis=1))[0]]
        found.append(Finding("alpha-capped",
            f"{_verb(len(who), 'Surface', 'Surfaces')} {_names(who)} "
            f"{_verb(len(who), 'has', 'have')} alpha above {ALPHA_LOG_MAX} (largest "
            f"{alphas.max():.2f}): used as given by Sabine, capped at {ALPHA_LOG_MAX} for Eyring, "
            "Millington-Sette, Fitzroy and Arau-Puchades, whose ln(1 - alpha) has no value at 1."))
    alphas_log = np.minimum(alphas, ALPHA_LOG_MAX)
    a_log = areas @ alphas_log + a_obj
    abar = a_log / s_tot
    if np.any(abar > ALPHA_LOG_MAX):
        found.append(Finding("mean-alpha-capped",
            f"Mean alpha with objects exceeds {ALPHA_LOG_MAX} at "
            f"{_bands_text(bands, abar > ALPHA_LOG_MAX)}: capped for the logarithmic formulas."))
        abar = np.minimum(abar, ALPHA_LOG_MAX)

    rt: dict[str, np.ndarray] = {}
    unavailable: dict[str, str] = {}
    rt["sabine"] = reverb.sabine(v, a_tot, m, c)
    rt["eyring"] = reverb.eyring(v, s_tot, abar * s_tot, m, c)
    rt["millington"] = reverb.millington(v, areas, alphas_log, m, c, extra_absorption=a_obj)

    axis_alpha = None
    no_face = [s.name for s in room.surfaces if s.face is None]
    if room.dimensions is None:
        reason = "the room is given by volume, not as a box (length, width, height)"
        unavailable["fitzroy"] = unavailable["arau_puchades"] = reason
    elif no_face:
        reason = f"surfaces {_names(no_face)} do not say which box face they lie on"
        unavailable["fitzroy"] = unavailable["arau_puchades"] = reason
    else:
        axis_of = np.array([FACE_AXIS[s.face] for s in room.surfaces])
        onehot = (axis_of[None, :] == np.arange(3)[:, None]).astype(float)
        s_axis = onehot @ areas
        if np.any(s_axis <= 0):
            missing = [("front/back", "left/right", "floor/ceiling")[i]
                       for i in np.nonzero(s_axis <= 0)[0]]
            reason = f"no surface lies on the {', '.join(missing)} faces"
            unavailable["fitzroy"] = unavailable["arau_puchades"] = reason
        else:
            axis_alpha = np.minimum((onehot @ (areas[:, None] * alphas_log)) / s_axis[:, None]
                                    + a_obj / s_tot, ALPHA_LOG_MAX)
            rt["fitzroy"] = reverb.fitzroy(v, s_axis, axis_alpha, m, c)
            rt["arau_puchades"] = reverb.arau_puchades(v, s_axis, axis_alpha, m, c)

    # Room constant, with air.
    abar_t = field_mod.mean_alpha_with_air(s_tot, a_log, v, m)
    if np.any(abar_t > ALPHA_LOG_MAX):
        found.append(Finding("room-constant-capped",
            f"Mean alpha with air exceeds {ALPHA_LOG_MAX} at {_bands_text(bands, abar_t > ALPHA_LOG_MAX)}: "
            "the room constant is computed with it capped; such a room is close to free field."))
        abar_t = np.minimum(abar_t, ALPHA_LOG_MAX)
    r_const = field_mod.room_constant(s_tot, abar_t)

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
    if method is not None:
        if method not in METHODS:
            raise ValueError(f"method: {method!r} is not one of {list(METHODS)}")
        if method not in rt:
            raise ValueError(f"method: {METHOD_TITLES[method]} is unavailable for this room: "
                             f"{unavailable[method]}")
        if method != recommended:
            reason = (f"chosen by the user; the recommendation was {METHOD_TITLES[recommended]} "
                      f"({reason})")
        recommended = method
    t_rec = rt[recommended]

    # Validity warnings.
    f_s = reverb.schroeder_frequency(t_rec, v)
    below = np.asarray(bands) < f_s
    if np.any(below):
        found.append(Finding("schroeder",
            f"{_bands_text(bands, below)} {_verb(int(below.sum()), 'lies', 'lie')} below the "
            "Schroeder frequency "
            f"(about {float(np.max(f_s[below])):.0f} Hz): room modes dominate there and the "
            "diffuse-field figures are rough."))
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

    # Sources and receivers.
    src_results = []
    for s in room.sources:
        if s.sound_power_db.shape != (nb,):
            raise ValueError(f"source {s.name!r}: sound power needs {nb} values")
        src_results.append(SourceResult(s.name, float(s.directivity), s.sound_power_db,
                                        field_mod.critical_distance(s.directivity, r_const)))
    rec_results = []
    cautions: list[str] = []
    if room.sources and room.receivers:
        lw = np.stack([s.sound_power_db for s in room.sources])          # (S, B)
        q = np.array([s.directivity for s in room.sources])              # (S,)
        dist = np.array([[room.distance(r, s) for s in room.sources] for r in room.receivers])
        if np.any(dist <= 0):
            raise ValueError("receivers: a receiver is at the same point as a source")
        direct = q[None, :, None] / (4.0 * np.pi * dist[:, :, None] ** 2)  # (R, S, 1)
        if reverberant_model == "classic":
            rev = np.broadcast_to(4.0 / r_const, direct.shape[:2] + (nb,))
        else:
            rev = field_mod.barron_lee_reverberant_term(t_rec[None, None, :], v,
                                                        dist[:, :, None])
        e_dir = direct * 10.0 ** (lw[None] / 10.0)                         # (R, S, B)
        e_rev = rev * 10.0 ** (lw[None] / 10.0)
        tot = db_from_ratio(e_dir.sum(axis=1) + e_rev.sum(axis=1))
        d_db = db_from_ratio(e_dir.sum(axis=1))
        r_db = db_from_ratio(e_rev.sum(axis=1))
        per = db_from_ratio(e_dir + e_rev)
        la = a_weighted_total(tot, bands)
        la_d = a_weighted_total(d_db, bands)
        la_r = a_weighted_total(r_db, bands)
        close = []
        for i, r in enumerate(room.receivers):
            rec_results.append(ReceiverResult(
                r.name, {s.name: float(dist[i, j]) for j, s in enumerate(room.sources)},
                tot[i], d_db[i], r_db[i], float(la[i]), float(la_d[i]), float(la_r[i]),
                {s.name: per[i, j] for j, s in enumerate(room.sources)}))
            for j, s in enumerate(room.sources):
                if dist[i, j] < 0.5:
                    close.append(f"'{r.name}' is {dist[i, j]:.2f} m from '{s.name}'")
            if la[i] >= CAUTION_DBA:
                cautions.append(f"'{r.name}': estimated {la[i]:.1f} dB(A).")
        if close:
            found.append(Finding("receiver-close",
                "; ".join(close) + ": closer than 0.5 m, where a real source is not a point and "
                "the inverse-square estimate is rough."))
        if cautions:
            cautions.append(HEARING_CAUTION)

    return RoomResult(
        room=room, bands_hz=bands, volume_m3=v, surface_area_m2=s_tot,
        absorption_area_m2=a_tot, surface_absorption_m2=a_surf, object_absorption_m2=a_obj,
        air_attenuation_db_per_m=att, air_m_per_m=m, speed_of_sound_m_s=c,
        mean_alpha=a_tot / s_tot, rt60_s=rt, unavailable=unavailable,
        recommended=recommended, recommended_reason=reason, room_constant_m2=r_const,
        schroeder_hz=f_s, reverberant_model=reverberant_model,
        sources=tuple(src_results), receivers=tuple(rec_results),
        warnings=tuple(found), cautions=tuple(cautions), axis_alpha=axis_alpha)


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
                                           result.room_constant_m2, rt60=result.rt60_recommended,
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
    return Comparison(before, after, rt_change, red, tuple(changes), tuple(notes))


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
