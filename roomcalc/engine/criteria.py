r"""Reverberation criteria: what a room must reach, and whether an estimate reaches it.

A :class:`Criterion` says, for a room of volume V, which octave bands are assessed and the window
``[rt60_min, rt60_max]`` the reverberation time must lie in; :func:`assess` compares a room's
estimated RT60 per band with that window and returns an :class:`Assessment`. The criteria
shipped with roomcalc are read from ``materials/criteria/*.toml`` by
:mod:`roomcalc.io.criteria` (which documents the file format); a user's own window is built
with :func:`user_window`. This module reads no files.

How a criterion gives its window (``kind``):

``"fixed"``
    ``rt60_min`` and/or ``rt60_max`` per assessed band [s] (NaN = no bound on that side).
``"by-volume-steps"``
    Steps of increasing ``volume_max`` [m^3], each with its own ``rt60_max`` (and optional
    ``rt60_min``); the first step whose ``volume_max`` is at least V applies. Above the last step
    the criterion is not applicable.
``"formula-log-volume"``
    A target :math:`T = a \lg(V / 1\,\mathrm{m^3}) + b` (:func:`log_volume_target`), valid for
    ``volume_min <= V <= volume_max``; above ``volume_max`` a constant ``above_max_target`` if one
    is given, otherwise not applicable. The window is the target times a tolerance factor per band.
``"formula-cube-root"``
    A target :math:`T = T_0 (V / V_0)^{1/3}` (:func:`cube_root_target`); the window is the target
    plus or minus a tolerance in seconds per band (or times a factor).

How it is assessed (``assess``): ``"each-band"``, every assessed band must lie in its window; or
``"mean-of-bands"``, the arithmetic mean of the assessed bands must lie in one window (the
per-band windows are then all the same, and each band is reported as not assessed on its own).

A value exactly at a limit passes (the criteria are written "at most" / "at least"); a margin is
counted as inside when it is above ``-1e-9`` s, so that rounding in the window's own arithmetic
(0.8 x 0.566 s) cannot turn an equal value into a failure. Estimates are compared as computed,
not rounded to the 0.1 s or 0.05 s a measurement report would give.

Every criterion carries its provenance (``[source]`` / ``[memory]`` as the project's reference
notes mark it) and a reminder that the local code governs; both travel into the result.
"""

from __future__ import annotations

import math

import numpy as np

from roomcalc.engine.checks import positive, positive_or_nan
from roomcalc.engine.criterion import (ASSESS_MODES, BAND_STATUSES, CONFIDENCE, KINDS,
                                       MARGIN_EPS_S, OCCUPANCIES, STATUSES, TOLERANCE_KINDS,
                                       USER_WINDOW_GOVERNS, Assessment, Criterion, NoiseStep,
                                       Tolerance, VolumeStep, cube_root_target,
                                       log_volume_target)

# The criterion's data model lives in roomcalc.engine.criterion; its names are offered here
# too, beside the functions that judge a room by it.
__all__ = ["KINDS", "ASSESS_MODES", "OCCUPANCIES", "TOLERANCE_KINDS", "CONFIDENCE",
           "BAND_STATUSES", "STATUSES", "MARGIN_EPS_S", "USER_WINDOW_GOVERNS", "VolumeStep",
           "Tolerance", "NoiseStep", "Criterion", "Assessment", "log_volume_target",
           "cube_root_target", "applicability", "target_window", "assess", "user_window"]


def applicability(criterion: Criterion, volume: float) -> tuple[bool, str]:
    """Whether a criterion covers a room of this volume, and if not, why.

    Parameters
    ----------
    criterion : Criterion
    volume : float -- room volume V [m^3]

    Returns
    -------
    (bool, str) -- applicable, and the reason when it is not ("" when it is)

    Notes
    -----
    A criterion covers ``volume_min <= V <= volume_max`` (for ``by-volume-steps`` the last step's
    ``volume_max``); a ``formula-log-volume`` criterion with ``above_max_target`` also covers every
    V above its ``volume_max``. The criterion's ``not_applicable_note`` is added to the reason.

    References
    ----------
    .. [1] The volume ranges are those of each criterion's source, named in the criterion.
    """
    v = float(positive("volume", volume, "m^3"))
    c = criterion
    note = f" {c.not_applicable_note}" if c.not_applicable_note else ""
    if v < c.volume_min:
        return False, (f"V = {v:g} m^3 is below {c.volume_min:g} m^3, the smallest volume "
                       f"{c.title} covers.{note}")
    if v > c.volume_max and not (c.kind == "formula-log-volume"
                                 and math.isfinite(c.above_max_target)):
        return False, (f"V = {v:g} m^3 is above {c.volume_max:g} m^3, the largest volume "
                       f"{c.title} covers.{note}")
    return True, ""


def target_window(criterion: Criterion, volume: float) -> tuple[float, np.ndarray, np.ndarray]:
    r"""The window a criterion sets at a volume, per assessed band.

    Parameters
    ----------
    criterion : Criterion -- it must cover the volume (see :func:`applicability`)
    volume : float -- room volume V [m^3]

    Returns
    -------
    (float, ndarray, ndarray) -- the nominal target [s] (NaN for fixed and stepped limits), and
    the lower and upper limits [s] per band of ``criterion.bands_hz`` (NaN = no limit that side)

    Notes
    -----
    Formula targets :math:`T` by :func:`log_volume_target` or :func:`cube_root_target`; with a
    tolerance of factors the window is :math:`[f_{lo} T, f_{hi} T]`, with one of seconds
    :math:`[T - \Delta_{lo}, T + \Delta_{hi}]`.

    References
    ----------
    .. [1] Each criterion's own source, named in its ``source`` field.
    """
    ok, reason = applicability(criterion, volume)
    if not ok:
        raise ValueError(f"volume: {reason}")
    return _window(criterion, float(volume))


def _window(c: Criterion, v: float):
    n = len(c.bands_hz)
    nan = np.full(n, np.nan)
    if c.kind == "fixed":
        lo = np.asarray(c.rt60_min, dtype=float) if c.rt60_min else nan
        hi = np.asarray(c.rt60_max, dtype=float) if c.rt60_max else nan
        return math.nan, lo, hi
    if c.kind == "by-volume-steps":
        step = next(s for s in c.steps if v <= s.volume_max)
        return math.nan, np.full(n, step.rt60_min), np.full(n, step.rt60_max)
    if c.kind == "formula-log-volume":
        t = c.above_max_target if v > c.volume_max else \
            float(log_volume_target(v, c.slope, c.intercept))
    else:
        t = float(cube_root_target(v, c.coefficient, c.reference_volume))
    low, high = np.asarray(c.tolerance.low), np.asarray(c.tolerance.high)
    if c.tolerance.kind == "factor":
        return t, low * t, high * t
    return t, t - low, t + high


def _margin(x, lo, hi):
    """Distance to the nearer limit, positive inside; a NaN limit is no limit on that side."""
    with np.errstate(invalid="ignore"):
        return np.fmin(x - lo, hi - x)


def assess(criterion: Criterion, volume, bands_hz, rt60) -> Assessment:
    r"""Compare a room's estimated reverberation time with a criterion.

    Parameters
    ----------
    criterion : Criterion
    volume : float -- room volume V [m^3]
    bands_hz : array_like, shape (bands,) -- the room's nominal octave centres [Hz]
    rt60 : array_like, shape (bands,) -- estimated reverberation time per band [s]

    Returns
    -------
    Assessment -- per band: window, estimate, margin and verdict; the mean for a mean-of-bands
    criterion; the overall status ``"pass"``, ``"fail"`` or ``"not-applicable"`` (with the
    reason); the criterion's provenance and the reminder that the local code governs.

    Notes
    -----
    Margin per band, positive inside the window [s]:

    .. math:: m_k = \min(T_k - T_{min,k},\; T_{max,k} - T_k)

    (one side only when the other limit is absent). Each-band criteria pass when every assessed
    band has :math:`m_k \ge 0`; mean-of-bands criteria when :math:`\bar T = \frac{1}{n}\sum_k T_k`
    over the assessed bands does, e.g. BB93's :math:`T_{mf} = (T_{500} + T_{1k} + T_{2k}) / 3`.
    A room whose results lack an assessed band is reported as not applicable, naming the band.

    References
    ----------
    .. [1] Building Bulletin 93, Acoustic design of schools: performance standards (2015),
       definition of T_mf (mean of the 500, 1000 and 2000 Hz octave bands).
    .. [2] Each criterion's own source, named in its ``source`` field.

    Examples
    --------
    A window of at most 0.6 s in each of 500, 1000 and 2000 Hz; 0.55 s passes by 0.05 s, 0.65 s
    fails by 0.05 s:

    >>> c = user_window([500, 1000, 2000], rt60_max=[0.6, 0.6, 0.6])
    >>> r = assess(c, 200.0, [125, 250, 500, 1000, 2000, 4000], [0.9, 0.7, 0.55, 0.6, 0.65, 0.5])
    >>> r.status, r.band_status
    ('fail', ('not-assessed', 'not-assessed', 'pass', 'pass', 'fail', 'not-assessed'))
    >>> [round(float(m), 3) for m in r.margin_s[2:5]]
    [0.05, 0.0, -0.05]
    """
    c = criterion
    v = float(positive("volume", volume, "m^3"))
    bands = np.asarray(bands_hz, dtype=float)
    est = positive("rt60", rt60, "s")
    if bands.ndim != 1 or est.shape != bands.shape:
        raise ValueError(f"rt60: shape {est.shape} does not match bands_hz {bands.shape} "
                         "(one value per band)")
    if np.any(bands <= 0) or np.unique(bands).size != bands.size:
        raise ValueError("bands_hz: must be distinct frequencies above 0 Hz")
    n = bands.size
    nan = np.full(n, np.nan)
    background = next((s.dba for s in c.background if v <= s.volume_max), math.nan)
    common = dict(criterion=c, volume_m3=v, bands_hz=bands, estimate_s=est,
                  background_dba=background, provenance=c.provenance,
                  confidence=c.confidence, governs=c.governs)

    ok, reason = applicability(c, v)
    crit_bands = np.asarray(c.bands_hz, dtype=float)
    match = np.isclose(bands[:, None], crit_bands[None, :], rtol=1e-6, atol=0.0)
    missing = crit_bands[~match.any(axis=0)]
    if ok and missing.size:
        ok, reason = False, (f"cannot be assessed: the room's results have no "
                             f"{', '.join(f'{b:g}' for b in missing)} Hz band, which "
                             f"{c.title} assesses; add it to the room's bands.")
    if not ok:
        return Assessment(applicable=False, reason=reason, target_min_s=nan, target_max_s=nan,
                          margin_s=nan, band_status=("not-assessed",) * n,
                          in_assessment=np.zeros(n, dtype=bool), nominal_s=math.nan,
                          mean_s=math.nan, mean_min_s=math.nan, mean_max_s=math.nan,
                          mean_margin_s=math.nan, mean_status="not-assessed",
                          status="not-applicable", **common)

    nominal, lo_c, hi_c = _window(c, v)
    idx = np.argmax(match, axis=0)             # room band index of each criterion band
    used = match.any(axis=1)
    if c.assess == "mean-of-bands":
        mean = float(np.mean(est[idx]))
        m_lo, m_hi = float(lo_c[0]), float(hi_c[0])
        m_margin = float(_margin(mean, m_lo, m_hi))
        m_status = "pass" if m_margin >= -MARGIN_EPS_S else "fail"
        return Assessment(applicable=True, reason="", target_min_s=nan, target_max_s=nan,
                          margin_s=nan, band_status=("not-assessed",) * n, in_assessment=used,
                          nominal_s=nominal, mean_s=mean, mean_min_s=m_lo, mean_max_s=m_hi,
                          mean_margin_s=m_margin, mean_status=m_status, status=m_status,
                          **common)

    t_min, t_max = nan.copy(), nan.copy()
    t_min[idx], t_max[idx] = lo_c, hi_c
    margin = np.where(used, _margin(est, t_min, t_max), np.nan)
    inside = margin >= -MARGIN_EPS_S
    status = np.where(~used, "not-assessed", np.where(inside, "pass", "fail"))
    overall = "pass" if bool(np.all(inside[used])) else "fail"
    return Assessment(applicable=True, reason="", target_min_s=t_min, target_max_s=t_max,
                      margin_s=margin, band_status=tuple(status.tolist()), in_assessment=used,
                      nominal_s=nominal, mean_s=math.nan, mean_min_s=math.nan,
                      mean_max_s=math.nan, mean_margin_s=math.nan, mean_status="not-assessed",
                      status=overall, **common)


def user_window(bands_hz, rt60_min=None, rt60_max=None, *, id="user-window",
                title="Your own target window", governs=USER_WINDOW_GOVERNS) -> Criterion:
    """A criterion from the user's own limits per band (given in the room file).

    Parameters
    ----------
    bands_hz : array_like, shape (bands,) -- nominal octave centres [Hz]
    rt60_min : array_like, shape (bands,), optional -- lowest RT60 per band [s]; NaN = none
    rt60_max : array_like, shape (bands,), optional -- highest RT60 per band [s]; NaN = none
    id, title, governs : str -- how the window is named, and the reminder it carries

    Returns
    -------
    Criterion -- kind ``"fixed"``, assessed in each band that has a limit

    Notes
    -----
    Bands where both limits are NaN are not assessed. The window is
    :math:`T_{min,k} \\le T_k \\le T_{max,k}` with the user's own numbers; it has no published
    source, and the result says so.

    References
    ----------
    .. [1] None: the user's own target.

    Examples
    --------
    >>> c = user_window([125, 250, 500], rt60_max=[0.8, 0.6, float("nan")])
    >>> c.bands_hz, c.rt60_max
    ((125.0, 250.0), (0.8, 0.6))
    """
    bands = np.asarray(bands_hz, dtype=float)
    if bands.ndim != 1 or bands.size == 0:
        raise ValueError("bands_hz: a list of one or more nominal octave centres [Hz]")
    if rt60_min is None and rt60_max is None:
        raise ValueError("rt60_min, rt60_max: give at least one of them")
    lo = _limit("rt60_min", rt60_min, bands)
    hi = _limit("rt60_max", rt60_max, bands)
    with np.errstate(invalid="ignore"):
        if np.any(lo > hi):
            k = int(np.argmax(lo > hi))
            raise ValueError(f"rt60_min: {lo[k]:g} s at {bands[k]:g} Hz is above rt60_max "
                             f"{hi[k]:g} s")
    keep = ~(np.isnan(lo) & np.isnan(hi))
    if not keep.any():
        raise ValueError("rt60_min, rt60_max: every band is NaN, so nothing would be assessed")
    order = np.argsort(bands[keep])

    def sel(x):
        return tuple(float(y) for y in x[keep][order])

    return Criterion(
        id=id, title=title, edition="", source="the user's own window",
        provenance="[user] the user's own limits; no published source", confidence="user",
        governs=governs, kind="fixed", assess="each-band", bands_hz=sel(bands),
        rt60_min=sel(lo) if rt60_min is not None else (),
        rt60_max=sel(hi) if rt60_max is not None else ())


def _limit(name, x, bands):
    """A user's limit per band, NaN where there is none."""
    if x is None:
        return np.full(bands.shape, np.nan)
    a = positive_or_nan(name, x, "s")
    if a.shape != bands.shape:
        raise ValueError(f"{name}: {a.size} values for {bands.size} bands (one per band)")
    return a
