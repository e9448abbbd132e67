"""Daily noise exposure at work: LAeq and LEX,8h (ISO 9612, EU 2003/10/EC), OSHA and NIOSH dose.

A working day is given as exposure periods: one A-weighted equivalent level [dB(A)] and one
duration [h] per period, on the last axis (leading axes broadcast, e.g. many workers). Durations
are kept in hours, the unit in which all three rules are written; the periods of one day may
total at most 24 h. Every result here is an estimate from predicted levels; see
:data:`EXPOSURE_CAUTION`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from roomcalc.engine.checks import as_floats, finite, non_negative

__all__ = ["REFERENCE_HOURS", "MAX_DAY_HOURS", "EU_LOWER_ACTION_DBA", "EU_UPPER_ACTION_DBA",
           "EU_LIMIT_DBA", "OSHA_PEL_DBA", "OSHA_ACTION_LEVEL_DBA", "OSHA_EXCHANGE_DB",
           "OSHA_THRESHOLD_DBA", "NIOSH_REL_DBA", "NIOSH_EXCHANGE_DB", "EU_BAND_LABELS",
           "EXPOSURE_CAUTION", "laeq_over_period", "lex_8h", "EUAction", "eu_action",
           "osha_allowed_hours", "osha_dose", "osha_twa", "niosh_allowed_hours", "niosh_dose",
           "niosh_twa", "ExposureSummary", "exposure_summary", "day_periods", "ExposureChange",
           "compare_exposure"]

#: Reference duration of the daily exposure level and of the doses [h].
REFERENCE_HOURS = 8.0

#: Most hours the periods of one day may add up to [h].
MAX_DAY_HOURS = 24.0

#: EU Directive 2003/10/EC, Art. 3(1): lower and upper exposure action values and exposure limit
#: value of LEX,8h [dB(A)].
EU_LOWER_ACTION_DBA = 80.0
EU_UPPER_ACTION_DBA = 85.0
EU_LIMIT_DBA = 87.0

#: OSHA 29 CFR 1910.95: permissible exposure limit (TWA, dose 100 %), action level of the
#: hearing conservation programme (TWA, dose 50 %) [dBA], exchange rate [dB], and the level below
#: which sound does not count toward the dose (Appendix A, Table G-16a starts at 80 dBA).
OSHA_PEL_DBA = 90.0
OSHA_ACTION_LEVEL_DBA = 85.0
OSHA_EXCHANGE_DB = 5.0
OSHA_THRESHOLD_DBA = 80.0

#: NIOSH recommended exposure limit (8 h TWA) [dBA] and exchange rate [dB] (NIOSH 1998).
NIOSH_REL_DBA = 85.0
NIOSH_EXCHANGE_DB = 3.0

#: The coefficient of the OSHA dose-to-TWA formula, 5 / lg 2 rounded as the regulation prints it.
_OSHA_TWA_SLOPE = 16.61

#: Plain words for the bands of :func:`eu_action`.
EU_BAND_LABELS = {
    "below": "below the lower action value (80 dB(A))",
    "lower": "at or above the lower action value (80 dB(A))",
    "upper": "at or above the upper action value (85 dB(A))",
    "limit": "at or above the exposure limit value (87 dB(A))",
}

#: The caution shown with every exposure estimate.
EXPOSURE_CAUTION = (
    "These exposure figures are estimates from predicted levels, not measurements. Noise at or "
    "above the action values (80 and 85 dB(A) over a working day in the EU, 85 dBA in the US) "
    "can damage hearing: wear hearing protection there. A worker's real exposure must be "
    "assessed by measurement by a competent person (for example to ISO 9612). The regulations "
    "that apply where you work, and licensed practice, govern; this tool does not."
)


# ----------------------------------------------------------------------------- input checks

def _periods(levels_dba, hours):
    """Check a day of exposure periods; return (levels, hours), at least 1-D, same shape."""
    lv = np.atleast_1d(finite("levels_dba", levels_dba, "dB(A)"))
    h = np.atleast_1d(as_floats("hours", hours))
    if lv.shape != h.shape:
        raise ValueError(f"hours: shape {h.shape} does not match levels_dba {lv.shape}; "
                         "give one duration per level")
    if lv.shape[-1] == 0:
        raise ValueError("levels_dba: at least one exposure period is needed")
    non_negative("hours", h, "h")
    total = h.sum(axis=-1)
    if np.any(total > MAX_DAY_HOURS * (1.0 + 1e-12)):
        raise ValueError(f"hours: the periods of one day must total <= {MAX_DAY_HOURS:g} h, "
                         f"got {np.max(total):g} h")
    return lv, h


def _total_hours(h):
    total = h.sum(axis=-1)
    if np.any(total <= 0.0):
        raise ValueError("hours: the total duration must be > 0 h (and <= 24 h) for a level")
    return total


def _energy_db(lv, h):
    """10 lg sum t_i 10^(L_i/10), [dB + 10 lg h], computed relative to the loudest period."""
    top = np.max(lv, axis=-1)
    s = np.sum(h * 10.0 ** ((lv - top[..., None]) / 10.0), axis=-1)
    with np.errstate(divide="ignore"):
        return top + 10.0 * np.log10(s)


# ----------------------------------------------------------------------------- levels

def laeq_over_period(levels_dba, hours):
    """Equivalent continuous A-weighted level over the exposure periods, LAeq,Te.

    Parameters
    ----------
    levels_dba : array_like, shape (..., periods) -- LAeq of each period L_i [dB(A)], finite
    hours : array_like, shape (..., periods) -- duration of each period t_i [h], >= 0,
        total > 0 and <= 24

    Returns
    -------
    float or ndarray, shape (...) -- LAeq,Te [dB(A)]

    Notes
    -----
    .. math:: L_{Aeq,T_e} = 10 \\lg \\left( \\frac{\\sum_i t_i \\, 10^{L_i/10}}
              {\\sum_i t_i} \\right), \\quad T_e = \\sum_i t_i

    References
    ----------
    .. [1] ISO 9612:2009, Acoustics - Determination of occupational noise exposure -
       Engineering method, task-based strategy (energy average of the task levels weighted
       by their durations).

    Examples
    --------
    Two equal periods 10 dB apart (hand value 10 lg 5.5 + 80 = 87.40):

    >>> round(float(laeq_over_period([80.0, 90.0], [4.0, 4.0])), 2)
    87.4
    """
    lv, h = _periods(levels_dba, hours)
    return _energy_db(lv, h) - 10.0 * np.log10(_total_hours(h))


def lex_8h(levels_dba, hours):
    """Daily noise exposure level LEX,8h, normalised to an 8 h working day.

    Parameters
    ----------
    levels_dba : array_like, shape (..., periods) -- LAeq of each period L_i [dB(A)], finite
    hours : array_like, shape (..., periods) -- duration of each period t_i [h], >= 0,
        total > 0 and <= 24

    Returns
    -------
    float or ndarray, shape (...) -- LEX,8h [dB(A)]

    Notes
    -----
    .. math:: L_{EX,8h} = L_{Aeq,T_e} + 10 \\lg \\frac{T_e}{T_0}
              = 10 \\lg \\left( \\frac{1}{T_0} \\sum_i t_i \\, 10^{L_i/10} \\right),
              \\quad T_0 = 8\\ \\mathrm{h}

    Halving the time at a level lowers LEX,8h by 3 dB (the equal-energy rule).

    References
    ----------
    .. [1] ISO 9612:2009, terms and definitions (daily noise exposure level; clause number not
       checked against a copy).
    .. [2] Directive 2003/10/EC of the European Parliament and of the Council (noise at work),
       Art. 2(b), which takes the definition from ISO 1999.

    Examples
    --------
    4 h at 88 dB(A) is the same daily exposure as 8 h at 85 dB(A) (88 - 3.01):

    >>> round(float(lex_8h([88.0], [4.0])), 2)
    84.99
    """
    lv, h = _periods(levels_dba, hours)
    _total_hours(h)
    return _energy_db(lv, h) - 10.0 * math.log10(REFERENCE_HOURS)


# ----------------------------------------------------------------------------- EU 2003/10/EC

@dataclass(frozen=True)
class EUAction:
    """Where LEX,8h stands against EU Directive 2003/10/EC.

    ``band`` is ``"below"``, ``"lower"``, ``"upper"`` or ``"limit"`` (the highest value reached).
    Each margin is the value minus LEX,8h [dB]: positive means below the value by that much, zero
    or negative means the value is reached. Arrays where :func:`eu_action` was given arrays.
    """

    lex_8h_dba: float | np.ndarray
    band: str | np.ndarray
    margin_lower_db: float | np.ndarray
    margin_upper_db: float | np.ndarray
    margin_limit_db: float | np.ndarray

    @property
    def label(self) -> str | list:
        """The band in plain words."""
        if isinstance(self.band, str):
            return EU_BAND_LABELS[self.band]
        return [EU_BAND_LABELS[b] for b in np.ravel(self.band)]


def eu_action(lex):
    """Classify a daily exposure LEX,8h against the values of EU Directive 2003/10/EC.

    Parameters
    ----------
    lex : float or array_like -- daily noise exposure level LEX,8h [dB(A)], finite

    Returns
    -------
    EUAction -- band reached and margin to each value [dB]

    Notes
    -----
    Lower exposure action value 80 dB(A), upper exposure action value 85 dB(A), exposure limit
    value 87 dB(A), all as LEX,8h. A level equal to a value counts as reaching it (the cautious
    reading; the Directive says "exceed" in some articles and "match or exceed" in others).

    The limit value applies to the exposure at the ear taking the attenuation of the hearing
    protectors worn into account; the action values apply without protectors (Art. 3(2)). Give
    this function the level that matches the value being checked. The peak sound pressure values
    (135, 137 and 140 dB(C)) are not computed here.

    .. math:: \\mathrm{margin}_k = L_k - L_{EX,8h}, \\quad L_k \\in \\{80, 85, 87\\}\\ \\mathrm{dB(A)}

    References
    ----------
    .. [1] Directive 2003/10/EC of the European Parliament and of the Council of 6 February 2003
       (noise), Art. 3(1) (values) and 3(2) (hearing protectors).

    Examples
    --------
    >>> r = eu_action(86.0)
    >>> r.band, round(r.margin_upper_db, 1), round(r.margin_limit_db, 1)
    ('upper', -1.0, 1.0)
    """
    x = finite("lex", lex, "dB(A)")
    band = np.select([x >= EU_LIMIT_DBA, x >= EU_UPPER_ACTION_DBA, x >= EU_LOWER_ACTION_DBA],
                     ["limit", "upper", "lower"], default="below")
    margins = (EU_LOWER_ACTION_DBA - x, EU_UPPER_ACTION_DBA - x, EU_LIMIT_DBA - x)
    if x.ndim == 0:
        return EUAction(float(x), str(band), *(float(m) for m in margins))
    return EUAction(x, band, *margins)


# ----------------------------------------------------------------------------- OSHA, NIOSH

def _allowed_hours(name, level_dba, criterion, exchange, threshold_dba):
    lv = finite(name, level_dba, "dBA")
    with np.errstate(over="ignore", divide="ignore"):
        t = REFERENCE_HOURS / 2.0 ** ((lv - criterion) / exchange)
    if threshold_dba is None:
        return t
    thr = finite("threshold_dba", threshold_dba, "dBA")
    return np.where(lv >= thr, t, np.inf)


def osha_allowed_hours(level_dba, *, threshold_dba=OSHA_THRESHOLD_DBA):
    """OSHA reference duration: the hours at a level that make a dose of 100 %.

    Parameters
    ----------
    level_dba : array_like -- A-weighted level L, slow response [dBA], finite
    threshold_dba : float or None -- levels below it do not count toward the dose and get an
        infinite duration [dBA]; default 80, None counts every level

    Returns
    -------
    ndarray -- reference duration T [h], elementwise

    Notes
    -----
    .. math:: T = \\frac{8}{2^{(L - 90)/5}}\\ \\mathrm{h}

    90 dBA for 8 h with a 5 dB exchange rate. Table G-16a lists levels from 80 to 130 dBA;
    the dose for the hearing conservation programme integrates levels from 80 dBA
    (1910.95(d)(2)(i)). For checking the PEL alone the regulation counts from 90 dBA
    (from memory; not checked against a copy): pass ``threshold_dba=90``. Table G-16 stops at
    115 dBA (0.25 h or less); this function enforces no ceiling.

    References
    ----------
    .. [1] 29 CFR 1910.95, Occupational noise exposure, Table G-16 and Appendix A, Table G-16a
       and its footnote formula.

    Examples
    --------
    >>> osha_allowed_hours([79.0, 80.0, 90.0, 95.0, 100.0]).tolist()
    [inf, 32.0, 8.0, 4.0, 2.0]
    """
    return _allowed_hours("level_dba", level_dba, OSHA_PEL_DBA, OSHA_EXCHANGE_DB, threshold_dba)


def osha_dose(levels_dba, hours, *, threshold_dba=OSHA_THRESHOLD_DBA):
    """OSHA daily noise dose of a day of exposure periods [%].

    Parameters
    ----------
    levels_dba : array_like, shape (..., periods) -- level of each period L_i [dBA], finite
    hours : array_like, shape (..., periods) -- time at each level C_i [h], >= 0, total <= 24
    threshold_dba : float or None -- see :func:`osha_allowed_hours`

    Returns
    -------
    float or ndarray, shape (...) -- dose D [%]; 100 % is the PEL, 50 % the action level

    Notes
    -----
    .. math:: D = 100 \\sum_i \\frac{C_i}{T_i}, \\quad T_i = \\frac{8}{2^{(L_i - 90)/5}}\\ \\mathrm{h}

    References
    ----------
    .. [1] 29 CFR 1910.95, Appendix A, I(1)(ii).

    Examples
    --------
    4 h at 90 dBA and 4 h at 95 dBA: 4/8 + 4/4 = 1.5:

    >>> round(float(osha_dose([90.0, 95.0], [4.0, 4.0])), 6)
    150.0
    """
    lv, h = _periods(levels_dba, hours)
    return 100.0 * np.sum(h / osha_allowed_hours(lv, threshold_dba=threshold_dba), axis=-1)


def osha_twa(dose_percent):
    """OSHA eight-hour time-weighted average level from the dose.

    Parameters
    ----------
    dose_percent : array_like -- noise dose D [%], finite and >= 0

    Returns
    -------
    ndarray -- TWA [dBA]; a dose of 0 (nothing counted) gives -inf

    Notes
    -----
    .. math:: \\mathrm{TWA} = 16.61 \\lg \\frac{D}{100} + 90

    The action level is TWA 85 dBA (D = 50 %), the PEL TWA 90 dBA (D = 100 %).

    References
    ----------
    .. [1] 29 CFR 1910.95, Appendix A, I(2), and the dose-to-TWA table of its section II.

    Examples
    --------
    >>> [round(float(x), 1) for x in osha_twa([50.0, 100.0, 200.0])]
    [85.0, 90.0, 95.0]
    """
    d = non_negative("dose_percent", dose_percent, "%")
    with np.errstate(divide="ignore"):
        return _OSHA_TWA_SLOPE * np.log10(d / 100.0) + OSHA_PEL_DBA


def niosh_allowed_hours(level_dba, *, threshold_dba=None):
    """NIOSH recommended duration: the hours at a level that make a dose of 100 %.

    Parameters
    ----------
    level_dba : array_like -- A-weighted level L [dBA], finite
    threshold_dba : float or None -- levels below it do not count and get an infinite duration
        [dBA]; default None, every level counts (the larger, cautious dose)

    Returns
    -------
    ndarray -- recommended duration T [h], elementwise

    Notes
    -----
    .. math:: T = \\frac{8}{2^{(L - 85)/3}}\\ \\mathrm{h}

    85 dBA for 8 h with a 3 dB exchange rate. Whether the recommendation leaves out levels
    below some threshold is not settled here (dosimeters are often set to 80 dBA; from memory):
    pass ``threshold_dba=80`` for that. The REL also has a ceiling of 140 dBA (from memory),
    not enforced here.

    References
    ----------
    .. [1] NIOSH, Criteria for a Recommended Standard: Occupational Noise Exposure, Revised
       Criteria 1998, DHHS (NIOSH) Publication No. 98-126, ch. 1 (REL and exchange rate).

    Examples
    --------
    >>> niosh_allowed_hours([85.0, 88.0, 94.0, 100.0]).tolist()
    [8.0, 4.0, 1.0, 0.25]
    """
    return _allowed_hours("level_dba", level_dba, NIOSH_REL_DBA, NIOSH_EXCHANGE_DB,
                          threshold_dba)


def niosh_dose(levels_dba, hours, *, threshold_dba=None):
    """NIOSH daily noise dose of a day of exposure periods [%].

    Parameters
    ----------
    levels_dba : array_like, shape (..., periods) -- level of each period L_i [dBA], finite
    hours : array_like, shape (..., periods) -- time at each level C_i [h], >= 0, total <= 24
    threshold_dba : float or None -- see :func:`niosh_allowed_hours`

    Returns
    -------
    float or ndarray, shape (...) -- dose D [%]; 100 % is the REL

    Notes
    -----
    .. math:: D = 100 \\sum_i \\frac{C_i}{T_i}, \\quad T_i = \\frac{8}{2^{(L_i - 85)/3}}\\ \\mathrm{h}

    With every level counted, :math:`D \\approx 100 \\cdot 10^{(L_{EX,8h} - 85)/10}`; it would be
    exact if the exchange rate were :math:`10 \\lg 2 = 3.0103` dB instead of 3 dB.

    References
    ----------
    .. [1] NIOSH, Criteria for a Recommended Standard: Occupational Noise Exposure (1998),
       DHHS (NIOSH) Publication No. 98-126, ch. 1.

    Examples
    --------
    2 h at 91 dBA is one REL's worth (2 / 2 h):

    >>> round(float(niosh_dose([91.0], [2.0])), 6)
    100.0
    """
    lv, h = _periods(levels_dba, hours)
    return 100.0 * np.sum(h / niosh_allowed_hours(lv, threshold_dba=threshold_dba), axis=-1)


def niosh_twa(dose_percent):
    """NIOSH eight-hour time-weighted average level from the dose.

    Parameters
    ----------
    dose_percent : array_like -- noise dose D [%], finite and >= 0

    Returns
    -------
    ndarray -- TWA [dBA]; a dose of 0 gives -inf

    Notes
    -----
    .. math:: \\mathrm{TWA} = 10 \\lg \\frac{D}{100} + 85

    References
    ----------
    .. [1] NIOSH, Criteria for a Recommended Standard: Occupational Noise Exposure (1998),
       DHHS (NIOSH) Publication No. 98-126 (footnote to the dose tables).

    Examples
    --------
    >>> [round(float(x), 2) for x in niosh_twa([100.0, 200.0])]
    [85.0, 88.01]
    """
    d = non_negative("dose_percent", dose_percent, "%")
    with np.errstate(divide="ignore"):
        return 10.0 * np.log10(d / 100.0) + NIOSH_REL_DBA


# ----------------------------------------------------------------------------- summary

@dataclass(frozen=True)
class ExposureSummary:
    """One working day by every rule here: levels [dB(A)], doses [%], flags, the caution."""

    total_hours: float
    laeq_dba: float
    lex_8h_dba: float
    eu: EUAction
    osha_dose_percent: float
    osha_twa_dba: float
    osha_action_level_reached: bool
    osha_pel_exceeded: bool
    niosh_dose_percent: float
    niosh_twa_dba: float
    niosh_rel_exceeded: bool
    caution: str = EXPOSURE_CAUTION


def exposure_summary(levels_dba, hours) -> ExposureSummary:
    """Daily exposure of one worker by ISO 9612 / EU 2003/10/EC, OSHA and NIOSH.

    Parameters
    ----------
    levels_dba : array_like, shape (periods,) -- level of each period [dB(A)], finite
    hours : array_like, shape (periods,) -- duration of each period [h], >= 0,
        total > 0 and <= 24

    Returns
    -------
    ExposureSummary

    Notes
    -----
    LAeq,Te and LEX,8h by :func:`laeq_over_period` and :func:`lex_8h`, the EU band by
    :func:`eu_action`, the OSHA dose with the 80 dBA threshold (the hearing-conservation dose,
    which is never smaller than the dose for the PEL alone) and its TWA, the NIOSH dose with
    every level counted and its TWA. The OSHA action level is reached at a dose of 50 % or more
    (TWA 85 dBA); the PEL and the REL are exceeded above 100 %.

    References
    ----------
    .. [1] ISO 9612:2009; Directive 2003/10/EC, Art. 3; 29 CFR 1910.95, Appendix A;
       NIOSH Publication No. 98-126 (1998).

    Examples
    --------
    >>> s = exposure_summary([90.0, 95.0], [4.0, 4.0])
    >>> round(s.lex_8h_dba, 1), s.eu.band, round(s.osha_dose_percent), round(s.osha_twa_dba, 1)
    (93.2, 'limit', 150, 92.9)
    """
    lv, h = _periods(levels_dba, hours)
    if lv.ndim != 1:
        raise ValueError(f"levels_dba: one worker's day is a 1-D list of periods, got shape "
                         f"{lv.shape}")
    lex = float(lex_8h(lv, h))
    d_osha = float(osha_dose(lv, h))
    d_niosh = float(niosh_dose(lv, h))
    return ExposureSummary(
        total_hours=float(h.sum()), laeq_dba=float(laeq_over_period(lv, h)), lex_8h_dba=lex,
        eu=eu_action(lex), osha_dose_percent=d_osha, osha_twa_dba=float(osha_twa(d_osha)),
        osha_action_level_reached=d_osha >= 50.0, osha_pel_exceeded=d_osha > 100.0,
        niosh_dose_percent=d_niosh, niosh_twa_dba=float(niosh_twa(d_niosh)),
        niosh_rel_exceeded=d_niosh > 100.0)


def day_periods(source_dba: dict[str, float], hours: float,
                source_hours: dict[str, float] | None = None) -> tuple[np.ndarray, np.ndarray]:
    """The periods of a working day at one position, from each source's level there and the
    hours each source runs.

    Parameters
    ----------
    source_dba : {source: level [dB(A)]} -- each source's own level at the position
    hours : float -- hours per day at the position, 0 < hours <= 24
    source_hours : {source: hours} -- hours each source runs meanwhile (0 <= h <= hours);
        a source not named runs all ``hours``

    Returns
    -------
    (levels_dba, hours) -- the periods, loudest first, for :func:`exposure_summary`

    Notes
    -----
    The file gives each source's running hours, not when it runs. The sources are taken to run
    together as far as their hours allow (all of them for the shortest running time, then all
    but that one, and so on), and the position to be quiet for the rest of its hours (0 dB(A),
    which adds nothing). For LAeq and LEX,8h (equal energy, 3 dB exchange) the order makes no
    difference; for the OSHA dose (5 dB exchange) running together is the larger dose, the
    cautious choice. Levels of sources running together add as energies:
    :math:`L = 10 \\lg \\sum 10^{L_s/10}`.

    References
    ----------
    .. [1] ISO 9612:2009, task-based measurement (the day as a sum of tasks).

    Examples
    --------
    >>> lv, h = day_periods({"Saw": 90.0, "Fan": 80.0}, 8.0, {"Saw": 2.0})
    >>> [round(float(x), 1) for x in lv], h.tolist()
    ([90.4, 80.0], [2.0, 6.0])
    """
    if not (math.isfinite(hours) and 0.0 < hours <= MAX_DAY_HOURS):
        raise ValueError(f"hours: {hours} is outside 0 to {MAX_DAY_HOURS:g} h per day")
    source_hours = dict(source_hours or {})
    unknown = sorted(set(source_hours) - set(source_dba))
    if unknown:
        raise ValueError(f"source_hours: {unknown} are not among the sources "
                         f"{sorted(source_dba)}")
    run = {}
    for name, level in source_dba.items():
        if not math.isfinite(level):
            raise ValueError(f"source_dba: {name!r} has a level of {level}; a finite dB(A) "
                             "is needed")
        h = float(source_hours.get(name, hours))
        if not (0.0 <= h <= hours):
            raise ValueError(f"source_hours: {name!r} runs {h:g} h; 0 to {hours:g} h (the "
                             "hours at the position) is allowed")
        run[name] = h
    levels, spans, t = [], [], 0.0
    for end in sorted(set(run.values()) | {hours}):
        if end <= t:
            continue
        on = [n for n, h in run.items() if h >= end]
        energy = sum(10.0 ** (source_dba[n] / 10.0) for n in on)
        levels.append(10.0 * math.log10(energy) if energy > 0 else 0.0)
        spans.append(end - t)
        t = end
    return np.array(levels), np.array(spans)


@dataclass(frozen=True)
class ExposureChange:
    """Before and after a treatment: changes are after minus before (negative = quieter), dose
    ratios after / before (below 1 = less dose; nan where both doses are 0, inf where only the
    before dose is 0)."""

    before: ExposureSummary
    after: ExposureSummary
    laeq_change_db: float
    lex_8h_change_db: float
    osha_dose_ratio: float
    osha_twa_change_db: float
    niosh_dose_ratio: float
    eu_band_before: str
    eu_band_after: str


def _ratio(after, before):
    if before > 0.0:
        return after / before
    return math.nan if after == 0.0 else math.inf


def compare_exposure(before: ExposureSummary, after: ExposureSummary) -> ExposureChange:
    """Change of the daily exposure brought by a treatment (or any other change of the day).

    Parameters
    ----------
    before, after : ExposureSummary -- from :func:`exposure_summary`

    Returns
    -------
    ExposureChange

    Notes
    -----
    .. math:: \\Delta L_{EX,8h} = L_{EX,8h,after} - L_{EX,8h,before}, \\quad
              r_D = D_{after} / D_{before}

    With NIOSH's 3 dB exchange rate and every level counted,
    :math:`r_D \\approx 10^{\\Delta L_{EX,8h}/10}`: a 3 dB cut of every level halves the dose.
    OSHA's 5 dB rate and its 80 dBA threshold break that link.

    References
    ----------
    .. [1] ISO 9612:2009 (LEX,8h); 29 CFR 1910.95, Appendix A; NIOSH Publication No. 98-126.

    Examples
    --------
    A treatment that takes 3 dB off an 8 h day at 88 dB(A):

    >>> c = compare_exposure(exposure_summary([88.0], [8.0]), exposure_summary([85.0], [8.0]))
    >>> round(c.lex_8h_change_db, 2), round(c.niosh_dose_ratio, 3), c.eu_band_after
    (-3.0, 0.5, 'upper')
    """
    for name, s in (("before", before), ("after", after)):
        if not isinstance(s, ExposureSummary):
            raise TypeError(f"{name}: must be an ExposureSummary from exposure_summary(), "
                            f"got {type(s).__name__}")
    return ExposureChange(
        before=before, after=after,
        laeq_change_db=after.laeq_dba - before.laeq_dba,
        lex_8h_change_db=after.lex_8h_dba - before.lex_8h_dba,
        osha_dose_ratio=_ratio(after.osha_dose_percent, before.osha_dose_percent),
        osha_twa_change_db=after.osha_twa_dba - before.osha_twa_dba,
        niosh_dose_ratio=_ratio(after.niosh_dose_percent, before.niosh_dose_percent),
        eu_band_before=before.eu.band, eu_band_after=after.eu.band)
