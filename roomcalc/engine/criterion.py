"""What a reverberation criterion is: its data (:class:`Criterion` and its parts, checked when
built), the result of judging a room by it (:class:`Assessment`), and the target formulas a
criterion's window grows from (:func:`log_volume_target`, :func:`cube_root_target`).
:mod:`roomcalc.engine.criteria` judges a room by a criterion; its module notes say how each
``kind`` gives its window. This module reads no files.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

import numpy as np

from roomcalc.engine.bands import NOMINAL_OCTAVES_HZ
from roomcalc.engine.checks import finite, positive, positive_or_nan

__all__ = ["KINDS", "ASSESS_MODES", "OCCUPANCIES", "TOLERANCE_KINDS", "CONFIDENCE",
           "BAND_STATUSES", "STATUSES", "MARGIN_EPS_S", "USER_WINDOW_GOVERNS", "VolumeStep",
           "Tolerance", "NoiseStep", "Criterion", "Assessment", "log_volume_target",
           "cube_root_target"]

KINDS = ("fixed", "by-volume-steps", "formula-log-volume", "formula-cube-root")
ASSESS_MODES = ("each-band", "mean-of-bands")
OCCUPANCIES = ("unoccupied", "occupied", "as-described")
TOLERANCE_KINDS = ("factor", "seconds")
#: Weakest provenance a verdict rests on: a published value, a recalled one, or the user's own.
CONFIDENCE = ("source", "memory", "user")
#: Band verdicts, in :attr:`Assessment.band_status`.
BAND_STATUSES = ("pass", "fail", "not-assessed")
#: Overall verdicts, in :attr:`Assessment.status`.
STATUSES = ("pass", "fail", "not-applicable")
#: A margin above this counts as inside the window [s] (see the module notes).
MARGIN_EPS_S = 1e-9

#: The reminder a user's own window carries.
USER_WINDOW_GOVERNS = ("Your own target window, not a published criterion. Where a building code, "
                       "a school or workplace rule or a contract sets a reverberation requirement, "
                       "that requirement governs.")


@dataclass(frozen=True)
class VolumeStep:
    """One step of a ``by-volume-steps`` criterion: up to ``volume_max`` [m^3] (inclusive), the
    limits ``rt60_max`` and ``rt60_min`` [s] (NaN = no lower limit)."""

    volume_max: float
    rt60_max: float
    rt60_min: float = math.nan


@dataclass(frozen=True)
class Tolerance:
    """The window around a formula target, per assessed band.

    ``kind = "factor"``: the window is ``[low * T, high * T]``.
    ``kind = "seconds"``: the window is ``[T - low, T + high]``.
    """

    kind: str
    low: tuple[float, ...]
    high: tuple[float, ...]


@dataclass(frozen=True)
class NoiseStep:
    """Background-noise information: up to ``volume_max`` [m^3] (inclusive; inf for the last
    step), a level of at most ``dba`` [dB(A)]. Shown, not checked: roomcalc does not estimate
    background noise."""

    volume_max: float
    dba: float


@dataclass(frozen=True, eq=False)
class Criterion:
    """A reverberation criterion. Built by :mod:`roomcalc.io.criteria` or :func:`user_window`.

    Per-band tuples (``rt60_min``, ``rt60_max``, the tolerance) follow ``bands_hz``. Volumes [m^3],
    times [s]. The parameters of kinds other than ``kind`` are left at their defaults.
    """

    id: str
    title: str
    edition: str
    source: str
    provenance: str
    confidence: str
    governs: str
    kind: str
    assess: str
    bands_hz: tuple[float, ...]
    volume_min: float = 0.0
    volume_max: float = math.inf
    not_applicable_note: str = ""
    rt60_min: tuple[float, ...] = ()
    rt60_max: tuple[float, ...] = ()
    steps: tuple[VolumeStep, ...] = ()
    slope: float = math.nan
    intercept: float = math.nan
    above_max_target: float = math.nan
    coefficient: float = math.nan
    reference_volume: float = math.nan
    tolerance: Tolerance | None = None
    background: tuple[NoiseStep, ...] = ()
    information: str = ""
    notes: str = ""
    file: str = ""
    #: the occupancy the criterion is assessed at: "unoccupied" (furnished, people removed),
    #: "occupied" (``occupied_share`` of the people present) or "as-described" (the room as
    #: its file gives it)
    occupancy: str = "as-described"
    occupied_share: float = 1.0
    occupancy_source: str = ""

    def __post_init__(self):
        _check_criterion(self)

    @property
    def assessed_share(self) -> float | None:
        """Share of the room's people present when it is assessed (0: unoccupied); None: the
        room as described."""
        if self.occupancy == "unoccupied":
            return 0.0
        if self.occupancy == "occupied":
            return float(self.occupied_share)
        return None


def _check_criterion(c: Criterion) -> None:
    """Consistency of a criterion built in code; the file loader reports the same in words."""
    def bad(msg):
        raise ValueError(f"criterion '{c.id}': {msg}")

    if c.kind not in KINDS:
        bad(f"kind '{c.kind}' is not one of {', '.join(KINDS)}")
    if c.assess not in ASSESS_MODES:
        bad(f"assess '{c.assess}' is not one of {', '.join(ASSESS_MODES)}")
    if c.confidence not in CONFIDENCE:
        bad(f"confidence '{c.confidence}' is not one of {', '.join(CONFIDENCE)}")
    n = len(c.bands_hz)
    if n == 0:
        bad("bands_hz is empty")
    if any(not np.isclose(NOMINAL_OCTAVES_HZ, b).any() for b in c.bands_hz):
        bad(f"bands_hz {list(c.bands_hz)} are not all octave nominal centres "
            f"{list(NOMINAL_OCTAVES_HZ)}")
    if len(set(c.bands_hz)) != n or list(c.bands_hz) != sorted(c.bands_hz):
        bad("bands_hz must rise without repeats")
    if not (0.0 <= c.volume_min < c.volume_max):
        bad(f"volume range {c.volume_min:g} to {c.volume_max:g} m^3 is empty or inverted")
    if c.kind == "fixed":
        lo = np.asarray(c.rt60_min if c.rt60_min else (math.nan,) * n, dtype=float)
        hi = np.asarray(c.rt60_max if c.rt60_max else (math.nan,) * n, dtype=float)
        if lo.shape != (n,) or hi.shape != (n,):
            bad(f"rt60_min and rt60_max need one value per band ({n})")
        if np.any(np.isnan(lo) & np.isnan(hi)):
            bad("every assessed band needs rt60_min or rt60_max")
        for name, x in (("rt60_min", lo), ("rt60_max", hi)):
            try:
                positive_or_nan(name, x, "s")
            except ValueError as exc:
                bad(str(exc))
        if np.any(lo > hi):
            bad("rt60_min is above rt60_max")
        if c.assess == "mean-of-bands" and (np.unique(lo).size > 1 or np.unique(hi).size > 1):
            bad("a mean-of-bands criterion has one window for all bands")
    elif c.kind == "by-volume-steps":
        if not c.steps:
            bad("by-volume-steps needs at least one step")
        vmax = [s.volume_max for s in c.steps]
        if any(b <= a for a, b in itertools.pairwise(vmax)) or vmax[0] <= c.volume_min:
            bad("steps must rise in volume_max, from above volume_min")
        if c.volume_max != vmax[-1]:
            bad("volume_max must be the last step's volume_max")
        for s in c.steps:
            if not (s.rt60_max > 0) or (s.rt60_min <= 0) or (s.rt60_min > s.rt60_max):
                bad(f"step up to {s.volume_max:g} m^3 has an empty or negative window")
    elif c.kind == "formula-log-volume":
        if not (math.isfinite(c.slope) and math.isfinite(c.intercept)):
            bad("slope and intercept are needed")
        if not (c.volume_min > 0 and math.isfinite(c.volume_max)):
            bad("formula-log-volume needs volume_min above 0 and a finite volume_max")
        if _log_target(c.volume_min, c.slope, c.intercept) <= 0 or \
                _log_target(c.volume_max, c.slope, c.intercept) <= 0:
            bad("the formula gives a time of 0 s or less inside its volume range")
        if not (math.isnan(c.above_max_target) or c.above_max_target > 0):
            bad("above_max_target must be above 0 s")
    else:
        if not (c.coefficient > 0 and c.reference_volume > 0):
            bad("coefficient and reference_volume must be above 0")
    if c.kind.startswith("formula"):
        t = c.tolerance
        if t is None or t.kind not in TOLERANCE_KINDS or len(t.low) != n or len(t.high) != n:
            bad(f"a formula criterion needs a tolerance of kind {' or '.join(TOLERANCE_KINDS)} "
                f"with one value per band ({n})")
        low, high = np.asarray(t.low, dtype=float), np.asarray(t.high, dtype=float)
        if not (np.all(np.isfinite(low)) and np.all(np.isfinite(high))):
            bad("tolerance values must be finite")
        if t.kind == "factor" and (np.any(low <= 0) or np.any(low > 1) or np.any(high < 1)):
            bad("tolerance factors need 0 < low <= 1 <= high")
        if t.kind == "seconds" and (np.any(low < 0) or np.any(high < 0)):
            bad("tolerance seconds must be 0 or more")
        if c.assess == "mean-of-bands" and (np.unique(low).size > 1 or np.unique(high).size > 1):
            bad("a mean-of-bands criterion has one tolerance for all bands")
    elif c.tolerance is not None:
        bad(f"kind '{c.kind}' takes its limits directly, not a tolerance")


@dataclass(frozen=True, eq=False)
class Assessment:
    """The result of :func:`assess`. Arrays follow the room's bands ``bands_hz``.

    ``target_min``, ``target_max`` [s] are NaN where a band is not assessed on its own (and on
    the open side of a one-sided window); ``margin`` [s] is the distance to the nearer limit,
    positive inside the window, NaN where the band is not assessed. For a mean-of-bands
    criterion ``mean_*`` hold the mean [s], its window, margin and verdict; ``in_assessment``
    marks the bands that enter the verdict (on their own or through the mean).
    """

    criterion: Criterion
    volume_m3: float
    applicable: bool
    reason: str
    bands_hz: np.ndarray
    estimate_s: np.ndarray
    target_min_s: np.ndarray
    target_max_s: np.ndarray
    margin_s: np.ndarray
    band_status: tuple[str, ...]
    in_assessment: np.ndarray
    nominal_s: float
    mean_s: float
    mean_min_s: float
    mean_max_s: float
    mean_margin_s: float
    mean_status: str
    status: str
    background_dba: float
    provenance: str
    confidence: str
    governs: str

    @property
    def passed(self) -> bool:
        """True only when the criterion applies and is met."""
        return self.status == "pass"


def log_volume_target(volume, slope, intercept) -> np.ndarray:
    r"""Target reverberation time growing with the logarithm of the volume.

    Parameters
    ----------
    volume : array_like -- room volume V [m^3], above 0
    slope : float -- a [s per decade of volume]
    intercept : float -- b [s]

    Returns
    -------
    ndarray -- target T [s]

    Notes
    -----
    .. math:: T = a \lg\left(\frac{V}{1\,\mathrm{m^3}}\right) + b

    DIN 18041:2016 gives T_soll in this form for its room groups [1]_: A1 (music)
    a = 0.45, b = 0.07 (30-1000 m^3); A2 (speech, presentation) 0.37, -0.14 (50-5000 m^3);
    A3 (teaching, communication) 0.32, -0.17 (30-5000 m^3); A4 (inclusive teaching) 0.26, -0.14
    (30-500 m^3); A5 (sport) 0.75, -1.00 (200-10,000 m^3; 2.0 s above).

    References
    ----------
    .. [1] DIN 18041:2016-03, Hoersamkeit in Raeumen - Anforderungen, Empfehlungen und Hinweise
       fuer die Planung, T_soll of room groups A1-A5 (as quoted in a secondary copy).

    Examples
    --------
    DIN 18041 group A3 at V = 200 m^3: 0.32 lg 200 - 0.17 = 0.32 x 2.30103 - 0.17 = 0.566 s.

    >>> round(float(log_volume_target(200.0, 0.32, -0.17)), 3)
    0.566
    """
    v = positive("volume", volume, "m^3")
    a = finite("slope", slope, "s")
    b = finite("intercept", intercept, "s")
    return _log_target(v, a, b)


def _log_target(v, a, b):
    return a * np.log10(v) + b


def cube_root_target(volume, coefficient=0.25, reference_volume=100.0) -> np.ndarray:
    r"""Target reverberation time growing with the cube root of the volume.

    Parameters
    ----------
    volume : array_like -- room volume V [m^3], above 0
    coefficient : float -- T_0, the target at the reference volume [s]
    reference_volume : float -- V_0 [m^3]

    Returns
    -------
    ndarray -- target T [s]

    Notes
    -----
    .. math:: T_m = T_0 \left(\frac{V}{V_0}\right)^{1/3}

    For listening and control rooms, EBU Tech 3276 gives T_0 = 0.25 s, V_0 = 100 m^3, with a
    tolerance of about +-0.05 s from 200 Hz to 4 kHz [1]_ (from memory, medium confidence).

    References
    ----------
    .. [1] EBU Tech 3276, Listening conditions for the assessment of sound programme material
       (from memory; not checked against a copy).

    Examples
    --------
    At 200 m^3: 0.25 x 2^(1/3) = 0.25 x 1.25992 = 0.315 s.

    >>> round(float(cube_root_target(200.0)), 3)
    0.315
    """
    v = positive("volume", volume, "m^3")
    t0 = positive("coefficient", coefficient, "s")
    v0 = positive("reference_volume", reference_volume, "m^3")
    return t0 * np.cbrt(v / v0)
