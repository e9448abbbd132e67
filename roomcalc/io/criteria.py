"""The criteria library: reverberation criteria read from ``<materials>/criteria/*.toml``.

The shipped folder is found like the material catalogue (:func:`roomcalc.io.paths.materials_dir`,
in a source tree ``materials/criteria``, in a wheel ``roomcalc/_data/materials/criteria``); the
catalogue reads only the top of ``materials/`` and never these files. Every problem in every
file is collected and reported at once as ``FILE: field.path: message`` naming what is allowed.

File format (``version = 1``; the same text heads the shipped file)::

    version = 1
    [[criteria]]
    id          text, required   lowercase words joined by hyphens (dots allowed inside a word,
                                 as in "s12.60"), unique across all files
    title, edition, source       text, required
    provenance  text, required   marked "[source]" / "[memory]" as the reference notes mark it
    confidence  text, required   the weakest mark a verdict rests on: "source", "memory", "user"
    governs     text, required   the reminder that the local code governs
    kind        text, required   "fixed" | "by-volume-steps" | "formula-log-volume" |
                                 "formula-cube-root"
    assess      text             "each-band" (default) | "mean-of-bands"
    bands       list, required   octave bands assessed [Hz], rising: 63 ... 8000
    volume_min, volume_max       [m^3], the range covered (volume_max not with by-volume-steps)
    not_applicable_note          text added to the reason outside the range
    background_noise             [{ volume_max = m^3, dba = dB(A) }, ..., { dba = dB(A) }]
    information, notes           text

    fixed               rt60_max and/or rt60_min [s]: a number, or { band = s, ... } for every
                        band (a number only with mean-of-bands)
    by-volume-steps     steps = [{ volume_max = m^3, rt60_max = s, rt60_min = s }, ...]
    formula-log-volume  slope [s], intercept [s], volume_min and volume_max required,
                        above_max_target [s] optional: T = slope lg(V / 1 m^3) + intercept
    formula-cube-root   coefficient [s], reference_volume [m^3]: T = coefficient (V / V0)^(1/3)
    formula kinds       exactly one of tolerance_factors = [low, high] (0 < low <= 1 <= high) or
                        tolerance_seconds = [below, above] [s]; either may instead be a table
                        { band = [low, high], ... } for every band (not with mean-of-bands)

The semantics (windows, margins, verdicts) are in :mod:`roomcalc.engine.criteria`.
"""

from __future__ import annotations

import functools
import math
import re
from pathlib import Path

from roomcalc.engine.bands import ALLOWED_BANDS_HZ
from roomcalc.engine.criteria import (ASSESS_MODES, CONFIDENCE, KINDS, OCCUPANCIES, Criterion,
                                      NoiseStep,
                                      Tolerance, VolumeStep)
from roomcalc.io import paths
from roomcalc.io.checks import Checker, nearest, read_toml_file, toml_files
from roomcalc.io.errors import Problem, RoomFileError
from roomcalc.io.limits import RANGES

ID_PATTERN = re.compile(r"^[a-z0-9]+(\.[a-z0-9]+)*(-[a-z0-9]+(\.[a-z0-9]+)*)*$")
FORMAT_VERSION = 1
#: Largest reverberation time accepted as a limit or target [s] (as in room files).
RT60_LIMIT_MAX_S = RANGES["rt60_limit"].high
#: Largest volume accepted [m^3] (as in room files).
VOLUME_MAX_M3 = RANGES["volume"].high
#: Largest tolerance in seconds [s] and largest upper tolerance factor.
TOLERANCE_SECONDS_MAX = 5.0
TOLERANCE_FACTOR_MAX = 5.0

COMMON_KEYS = ("id", "title", "edition", "source", "provenance", "confidence", "governs", "kind",
               "assess", "bands", "volume_min", "volume_max", "not_applicable_note",
               "background_noise", "information", "notes", "occupancy", "occupied_share",
               "occupancy_source")
KIND_KEYS = {
    "fixed": ("rt60_max", "rt60_min"),
    "by-volume-steps": ("steps",),
    "formula-log-volume": ("slope", "intercept", "above_max_target", "tolerance_factors",
                           "tolerance_seconds"),
    "formula-cube-root": ("coefficient", "reference_volume", "tolerance_factors",
                          "tolerance_seconds"),
}
ALL_KEYS = COMMON_KEYS + tuple(dict.fromkeys(k for ks in KIND_KEYS.values() for k in ks))
STEP_KEYS = ("volume_max", "rt60_max", "rt60_min")
NOISE_KEYS = ("volume_max", "dba")
_MARKS = ("[source", "[memory", "[user")


def criteria_dir() -> Path:
    """The shipped criteria folder: ``<materials dir>/criteria``."""
    return paths.materials_dir() / "criteria"


def load_criteria(extra=()) -> dict[str, Criterion]:
    """Every shipped criterion, plus those of extra files or folders, by id.

    Every problem in every file is collected; a duplicate id names both files.
    """
    files = toml_files([criteria_dir()], extra, "criteria file")
    problems: list[Problem] = []
    out: dict[str, Criterion] = {}
    for f in files:
        try:
            found = load_criteria_file(f)
        except RoomFileError as exc:
            problems.extend(exc.problems)
            continue
        for c in found:
            if c.id in out:
                problems.append(Problem(c.file, f"criteria id '{c.id}'",
                                        f"is already defined in {out[c.id].file}"))
            else:
                out[c.id] = c
    if problems:
        raise RoomFileError(problems)
    return out


def shipped_criteria() -> dict[str, Criterion]:
    """The shipped criteria library (:func:`load_criteria` without extra files), by id.

    Read once (the shipped files do not change while roomcalc runs, and the interface checks
    the room after every edit); each call returns a new dict of the same criteria.
    """
    return dict(_shipped_criteria())


@functools.lru_cache(maxsize=1)
def _shipped_criteria() -> dict[str, Criterion]:
    return load_criteria()


def check_criterion_id(cid: str, chk: Checker, criteria=None) -> bool:
    """Whether the criteria library (None: the shipped one) has ``cid``; if not, report
    ``target.criterion`` to chk with the nearest and the known ids."""
    known = criteria if criteria is not None else shipped_criteria()
    if cid not in known:
        near = nearest(cid, list(known))
        chk.add("target.criterion", f"unknown criterion '{cid}'"
                + (f"; did you mean '{near}'?" if near else "")
                + f" (known: {', '.join(known) or 'none'})")
        return False
    return True


def load_criteria_file(path) -> list[Criterion]:
    """Read one criteria file; raises RoomFileError with every problem in it."""
    path = Path(path)
    return parse_criteria(read_toml_file(path), str(path))


def parse_criteria(data: dict, filename: str) -> list[Criterion]:
    """Check the parsed TOML of a criteria file and build its criteria."""
    chk = Checker(filename)
    chk.keys(data, "", ("version", "criteria"))
    if "version" not in data:
        chk.add("version", f"is required: version = {FORMAT_VERSION}")
    else:
        chk.number(data, "version", "", low=FORMAT_VERSION, high=FORMAT_VERSION, integer=True)
    if "criteria" not in data:
        chk.add("criteria", "is required: one [[criteria]] table per criterion")
    out: list[Criterion] = []
    seen: dict[str, str] = {}
    for i, e in enumerate(chk.array_of_tables(data, "criteria")):
        w = f"criteria[{i}]"
        before = len(chk.problems)
        c = _entry(e, w, chk)
        if c is not None and len(chk.problems) == before:
            if c.id in seen:
                chk.add(f"{w}.id", f"'{c.id}' is already defined in this file at {seen[c.id]}")
            else:
                seen[c.id] = w
                out.append(c)
    if chk.problems:
        raise RoomFileError(chk.problems)
    return out


def _entry(e: dict, w: str, chk: Checker) -> Criterion | None:
    before = len(chk.problems)
    chk.keys(e, w, ALL_KEYS)
    cid = chk.text(e, "id", w, required=True, nonempty=True)
    if cid is not None and not ID_PATTERN.match(cid):
        chk.add(f"{w}.id", f"'{cid}' must be lowercase words joined by hyphens (letters a-z, "
                "digits, dots inside a word), e.g. 'din-18041-2016-a3'")
    text = {k: chk.text(e, k, w, required=True, nonempty=True)
            for k in ("title", "edition", "source", "provenance", "governs")}
    confidence = chk.text(e, "confidence", w, required=True, choices=CONFIDENCE)
    prov = text["provenance"]
    if prov is not None:
        if not any(m in prov for m in _MARKS):
            chk.add(f"{w}.provenance", "must mark what rests on what with '[source]' or "
                    "'[memory]' (or '[user]' for a user's own window)")
        elif confidence == "source" and "[memory" in prov:
            chk.add(f"{w}.confidence", "is 'source', but provenance marks part of the "
                    "criterion '[memory]'; the confidence is the weakest mark")
        elif confidence == "memory" and "[memory" not in prov:
            chk.add(f"{w}.confidence", "is 'memory', but provenance marks nothing '[memory]'")
    kind = chk.text(e, "kind", w, required=True, choices=KINDS)
    assess = chk.text(e, "assess", w, default="each-band", choices=ASSESS_MODES)
    if kind is not None:
        for k in e:
            if k in ALL_KEYS and k not in COMMON_KEYS and k not in KIND_KEYS[kind]:
                users = [kd for kd, ks in KIND_KEYS.items() if k in ks]
                chk.add(f"{w}.{k}", f"is not used with kind '{kind}' (it belongs to kind "
                        f"{' / '.join(repr(u) for u in users)})")
    bands = _bands(e, w, chk)
    info = {k: chk.text(e, k, w, default="") for k in ("not_applicable_note", "information",
                                                       "notes")}
    vmin = chk.number(e, "volume_min", w, low=0.0, high=VOLUME_MAX_M3, default=0.0, unit="m^3")
    vmax = chk.number(e, "volume_max", w, low=0.0, high=VOLUME_MAX_M3, low_open=True,
                      default=math.inf, unit="m^3")
    if kind == "formula-log-volume":
        for k in ("volume_min", "volume_max"):
            if k not in e:
                chk.add(f"{w}.{k}", "is required with kind 'formula-log-volume' (the volume "
                        "range of the formula, m^3)")
        if "volume_min" in e and vmin == 0.0:
            chk.add(f"{w}.volume_min", "must be above 0 m^3 for a formula in lg V")
    if "volume_min" in e and "volume_max" in e and vmin is not None and vmax is not None \
            and vmin >= vmax:
        chk.add(f"{w}.volume_max", f"volume range inverted: volume_max ({vmax:g} m^3) must be "
                f"above volume_min ({vmin:g} m^3)")
    background = _noise_steps(e, w, chk)
    occupancy = chk.text(e, "occupancy", w, default="as-described", choices=OCCUPANCIES)
    share = chk.number(e, "occupied_share", w, low=0.0, high=1.0, low_open=True, default=1.0,
                       unit="share of the people present")
    if "occupied_share" in e and occupancy != "occupied":
        chk.add(f"{w}.occupied_share", "is used only with occupancy = \"occupied\"")
    occ_source = chk.text(e, "occupancy_source", w, default="")
    if occupancy in ("unoccupied", "occupied") and not occ_source:
        chk.add(f"{w}.occupancy_source", "is required with occupancy = "
                f"\"{occupancy}\": where the publication states it, marked [source] or "
                "[memory]")
    if kind is None or bands is None or assess is None or vmin is None or vmax is None:
        return None
    mean = assess == "mean-of-bands"
    params: dict = {}
    if kind == "fixed":
        if "rt60_max" not in e and "rt60_min" not in e:
            chk.add(f"{w}.rt60_max", "is required with kind 'fixed' (or rt60_min, or both): "
                    "a number of seconds, or a table { band = s } for every band")
        lims = {k: _per_band(e, k, w, bands, chk, _seconds, mean)
                for k in ("rt60_min", "rt60_max") if k in e}
        if any(v is None for v in lims.values()):
            return None
        lo, hi = lims.get("rt60_min"), lims.get("rt60_max")
        if lo is not None and hi is not None:
            bad = [(b, x, y) for b, x, y in zip(bands, lo, hi) if x > y]
            if bad and not isinstance(e["rt60_min"], dict) and \
                    not isinstance(e["rt60_max"], dict):
                bad = bad[:1]
                chk.add(f"{w}.rt60_min", f"{bad[0][1]:g} s is above rt60_max ({bad[0][2]:g} s); "
                        "the window would be empty")
            else:
                for b, x, y in bad:
                    chk.add(f"{w}.rt60_min", f"{x:g} s at {b} Hz is above rt60_max ({y:g} s); "
                            "the window would be empty")
        params = dict(rt60_min=tuple(lo) if lo else (), rt60_max=tuple(hi) if hi else ())
    elif kind == "by-volume-steps":
        if "volume_max" in e:
            chk.add(f"{w}.volume_max", "is not used with kind 'by-volume-steps': the last "
                    "step's volume_max ends the range")
        steps = _steps(e, w, chk, vmin)
        if steps is None:
            return None
        params = dict(steps=steps)
        vmax = steps[-1].volume_max
    else:
        if kind == "formula-log-volume":
            slope = chk.number(e, "slope", w, required=True, low=0.0, high=10.0,
                               low_open=True, unit="s per decade of volume")
            icpt = chk.number(e, "intercept", w, required=True, low=-10.0, high=10.0, unit="s")
            above = chk.number(e, "above_max_target", w, low=0.0, low_open=True,
                               high=RT60_LIMIT_MAX_S, default=math.nan, unit="s")
            if slope is not None and icpt is not None and vmin and vmax is not None \
                    and vmin < vmax and math.isfinite(vmax):
                t = slope * math.log10(vmin) + icpt
                if t <= 0:
                    chk.add(f"{w}.intercept", f"the formula gives T = {t:.3g} s at volume_min "
                            f"({vmin:g} m^3); it must give a time above 0 s over its whole "
                            "volume range")
            params = dict(slope=slope, intercept=icpt, above_max_target=above)
        else:
            coef = chk.number(e, "coefficient", w, required=True, low=0.0, low_open=True,
                              high=RT60_LIMIT_MAX_S, unit="s")
            vref = chk.number(e, "reference_volume", w, required=True, low=0.0, low_open=True,
                              high=VOLUME_MAX_M3, unit="m^3")
            params = dict(coefficient=coef, reference_volume=vref)
        params["tolerance"] = _tolerance(e, w, bands, chk, mean)
        if any(v is None for v in params.values()):
            return None
    if len(chk.problems) > before or cid is None or confidence is None or \
            any(v is None for v in text.values()):
        return None
    try:
        return Criterion(id=cid, confidence=confidence, kind=kind, assess=assess,
                         bands_hz=tuple(float(b) for b in bands), volume_min=float(vmin),
                         volume_max=float(vmax), background=background, file=chk.filename,
                         occupancy=occupancy or "as-described",
                         occupied_share=1.0 if share is None else float(share),
                         occupancy_source=occ_source or "",
                         **text, **info, **params)
    except ValueError as exc:                   # a combination the checks above missed
        chk.add(w, str(exc))
        return None


def _bands(e, w, chk) -> list[int] | None:
    path = f"{w}.bands"
    allowed = ", ".join(map(str, ALLOWED_BANDS_HZ))
    v = e.get("bands")
    if v is None:
        chk.add(path, f"is required: the octave bands assessed, a list from {allowed} Hz")
        return None
    if not isinstance(v, list) or not v:
        chk.add(path, f"must be a list of one or more octave bands from {allowed} Hz")
        return None
    out = []
    for i, b in enumerate(v):
        x = chk.value(b, f"{path}[{i}]", integer=True, unit="Hz")
        if x is None:
            return None
        if x not in ALLOWED_BANDS_HZ:
            chk.add(f"{path}[{i}]", f"{x} Hz is not an octave band centre; allowed: {allowed} Hz")
            return None
        out.append(int(x))
    if out != sorted(set(out)):
        chk.add(path, f"{out} must rise without repeats")
        return None
    return out


def _seconds(x, where, chk):
    return chk.value(x, where, low=0.0, low_open=True, high=RT60_LIMIT_MAX_S, unit="s")


def _per_band(e, key, w, bands, chk, parse, mean):
    """A value for every band: one for all, or a table band -> value naming every band."""
    path = f"{w}.{key}"
    v = e[key]
    if isinstance(v, dict):
        if mean:
            chk.add(path, "must be one value for all bands: assess = 'mean-of-bands' checks the "
                    "mean against one window")
            return None
        out = chk.band_table(v, path, bands, lambda x, p: parse(x, p, chk),
                             "this criterion")
        missing = [f"{b:g}" for b in bands if str(b) not in v]
        if missing:
            chk.add(path, f"missing band {', '.join(missing)} Hz: give a value for every band "
                    f"of bands ({', '.join(str(b) for b in bands)} Hz)")
            return None
        return None if out is None else [out[int(b)] for b in bands]
    y = parse(v, path, chk)
    if y is None:
        return None
    return [y] * len(bands)


def _steps(e, w, chk, vmin) -> tuple[VolumeStep, ...] | None:
    path = f"{w}.steps"
    if "steps" not in e:
        chk.add(path, "is required with kind 'by-volume-steps': "
                "[{ volume_max = m^3, rt60_max = s }, ...] by rising volume")
        return None
    raw = e["steps"]
    if not isinstance(raw, list) or not raw or not all(isinstance(s, dict) for s in raw):
        chk.add(path, "must be a list of one or more tables { volume_max = m^3, rt60_max = s }")
        return None
    out, ok, prev = [], True, None
    for i, s in enumerate(raw):
        sw = f"{path}[{i}]"
        chk.keys(s, sw, STEP_KEYS)
        vm = chk.number(s, "volume_max", sw, required=True, low=0.0, low_open=True,
                        high=VOLUME_MAX_M3, unit="m^3")
        hi = chk.number(s, "rt60_max", sw, required=True, low=0.0, low_open=True,
                        high=RT60_LIMIT_MAX_S, unit="s")
        lo = chk.number(s, "rt60_min", sw, low=0.0, low_open=True, high=RT60_LIMIT_MAX_S,
                        default=math.nan, unit="s")
        if vm is None or hi is None or lo is None:
            ok = False
            continue
        if prev is not None and vm <= prev[1]:
            chk.add(f"{sw}.volume_max", f"volume range inverted: {vm:g} m^3 must be above "
                    f"{prev[0]}.volume_max ({prev[1]:g} m^3); list steps by rising volume")
            ok = False
        elif prev is None and vm <= vmin:
            chk.add(f"{sw}.volume_max", f"volume range inverted: {vm:g} m^3 must be above "
                    f"volume_min ({vmin:g} m^3)")
            ok = False
        if lo > hi:
            chk.add(f"{sw}.rt60_min", f"{lo:g} s is above rt60_max ({hi:g} s); the window "
                    "would be empty")
            ok = False
        prev = (sw, vm)
        out.append(VolumeStep(float(vm), float(hi), float(lo)))
    return tuple(out) if ok else None


def _pair(x, where, chk, kind):
    name = "[low, high] factors" if kind == "factor" else "[below, above] in seconds"
    if not isinstance(x, list) or len(x) != 2:
        chk.add(where, f"must be a pair {name}")
        return None
    if kind == "factor":
        lo = chk.value(x[0], f"{where}[0]", low=0.0, low_open=True, high=1.0, unit="(x target)")
        hi = chk.value(x[1], f"{where}[1]", low=1.0, high=TOLERANCE_FACTOR_MAX,
                       unit="(x target)")
    else:
        lo = chk.value(x[0], f"{where}[0]", low=0.0, high=TOLERANCE_SECONDS_MAX, unit="s")
        hi = chk.value(x[1], f"{where}[1]", low=0.0, high=TOLERANCE_SECONDS_MAX, unit="s")
    return None if lo is None or hi is None else (float(lo), float(hi))


def _tolerance(e, w, bands, chk, mean) -> Tolerance | None:
    given = [k for k in ("tolerance_factors", "tolerance_seconds") if k in e]
    if len(given) != 1:
        chk.add(f"{w}.tolerance_factors", "a formula criterion needs exactly one of "
                "tolerance_factors = [low, high] or tolerance_seconds = [below, above]"
                + ("; both are given" if len(given) == 2 else ""))
        return None
    key = given[0]
    kind = "factor" if key == "tolerance_factors" else "seconds"
    pairs = _per_band(e, key, w, bands, chk, lambda x, where, c: _pair(x, where, c, kind),
                      mean)
    if pairs is None:
        return None
    return Tolerance(kind, tuple(p[0] for p in pairs), tuple(p[1] for p in pairs))


def _noise_steps(e, w, chk) -> tuple[NoiseStep, ...]:
    path = f"{w}.background_noise"
    if "background_noise" not in e:
        return ()
    raw = e["background_noise"]
    if not isinstance(raw, list) or not raw or not all(isinstance(s, dict) for s in raw):
        chk.add(path, "must be a list of tables { volume_max = m^3, dba = dB(A) }, the last "
                "without volume_max")
        return ()
    out, prev = [], 0.0
    for i, s in enumerate(raw):
        sw = f"{path}[{i}]"
        chk.keys(s, sw, NOISE_KEYS)
        last = i == len(raw) - 1
        vm = chk.number(s, "volume_max", sw, low=0.0, low_open=True, high=VOLUME_MAX_M3,
                        default=math.inf, unit="m^3")
        if not last and "volume_max" not in s:
            chk.add(f"{sw}.volume_max", "is required on every step but the last")
        dba = chk.number(s, "dba", sw, required=True, low=0.0, high=140.0, unit="dB(A)")
        if vm is None or dba is None:
            continue
        if vm <= prev:
            chk.add(f"{sw}.volume_max", f"volume range inverted: {vm:g} m^3 must be above the "
                    f"step before ({prev:g} m^3)")
        prev = vm
        out.append(NoiseStep(float(vm), float(dba)))
    return tuple(out)
