"""The report of a room in four formats: text (80 columns), markdown, JSON (SI) and CSV (SI),
each with the same content: reverberation by every formula (the one in force marked), the room,
critical distances, levels at receivers, the target check and the daily exposure, warnings and
cautions. Also before/after and the material catalogue listing.

Text and markdown show lengths, areas and volumes in the room file's units; JSON and CSV are SI
whatever the file's units.
"""

from __future__ import annotations

import csv
import io

from roomcalc.engine.analysis import METHOD_TITLES, METHODS, Comparison, RoomResult
from roomcalc.io.catalog import Material
from roomcalc.io.units import METRIC, Units
from roomcalc.present.numbers import WIDTH, floats, fmt, json_text, plural, wrap
from roomcalc.present.sections import (exposure_dict, exposure_text, target_dict,
                                       target_text)
from roomcalc.study.study import Answer

__all__ = ["FORMATS", "report", "report_text", "report_markdown", "report_json",
           "report_csv", "result_dict", "answer_dict", "check_text", "check_dict", "problems_dict", "compare_report",
           "comparison_dict", "material_dict", "materials_text"]

FORMATS = ("text", "markdown", "json", "csv")


class _Table:
    """Rows of a label and per-band numbers, laid out for text or markdown."""

    def __init__(self, title, bands, extra=None):
        self.title, self.bands, self.extra, self.rows = title, list(bands), extra, []

    def add(self, label, values, nd=2, extra=None):
        self.rows.append((label, [fmt(float(v), nd) for v in values],
                          None if extra is None else fmt(extra, 1)))

    def text(self) -> str:
        w = 7 if len(self.bands) <= 6 else 6
        lw = WIDTH - 1 - w * len(self.bands) - (7 if self.extra else 0)
        lw = min(lw, 26)
        head = self.title.ljust(lw) + "".join(f"{b:>{w}}" for b in self.bands) + \
            (f"{self.extra:>7}" if self.extra else "")
        lines = [head]
        for label, vals, ex in self.rows:
            label = label if len(label) <= lw - 1 else label[:lw - 2] + "~"
            lines.append(label.ljust(lw) + "".join(f"{v:>{w}}" for v in vals) +
                         (f"{ex or '':>7}" if self.extra else ""))
        return "\n".join(lines)

    def markdown(self) -> str:
        cols = [self.title] + [f"{b} Hz" for b in self.bands] + ([self.extra] if self.extra else [])
        lines = ["| " + " | ".join(cols) + " |", "|" + "---|" * len(cols)]
        for label, vals, ex in self.rows:
            cells = [label] + vals + ([ex or ""] if self.extra else [])
            lines.append("| " + " | ".join(cells) + " |")
        return "\n".join(lines)


def _tables(res: RoomResult, u: Units):
    bands = res.bands_hz
    rt = _Table("RT60 [s]", bands)
    for k in METHODS:
        if k in res.rt60_s:
            mark = " *" if k == res.method else ""
            rt.add(METHOD_TITLES[k] + mark, res.rt60_s[k])
    room = _Table("Room", bands)
    room.add(f"Absorption A [{u.area_label}]", res.absorption_area_m2 / u.area, 1)
    room.add("Mean alpha", res.mean_alpha, 3)
    room.add("Air [dB/km]", res.air_attenuation_db_per_m * 1000.0, 2)
    room.add(f"Air 4mV [{u.area_label}]", 4 * res.air_m_per_m * res.volume_m3 / u.area, 2)
    room.add(f"Room constant R [{u.area_label}]", res.room_constant_m2 / u.area, 1)
    room.add("Schroeder f_S [Hz]", res.schroeder_hz, 0)
    rc = None
    if res.sources:
        rc = _Table(f"Critical dist. [{u.length_label}]", bands)
        for s in res.sources:
            rc.add(f"{s.name} (Q={s.directivity:g})", s.critical_distance_m / u.length)
    lv = None
    if res.receivers:
        lv = _Table("Lp [dB]", bands, extra="dB(A)")
        for r in res.receivers:
            lv.add(f"{r.name}", r.level_db, 1, r.level_dba)
            lv.add("  direct", r.direct_db, 1, r.direct_dba)
            lv.add("  reverberant", r.reverberant_db, 1, r.reverberant_dba)
    return rt, room, rc, lv


def _header(res: RoomResult, u: Units, source_name: str) -> list[str]:
    room = res.room
    if room.dimensions:
        L, W, H = (d / u.length for d in room.dimensions)
        shape = f"Box {L:.2f} x {W:.2f} x {H:.2f} {u.length_label}, "
    else:
        shape = "Free shape, "
    a = room.air
    return [
        f"{room.title or 'Room'}",
        f"  file: {source_name}",
        f"  {shape}V = {res.volume_m3 / u.volume:.1f} {u.volume_label}, "
        f"S = {res.surface_area_m2 / u.area:.1f} {u.area_label}",
        f"  air {u.temperature_from_c(a.temperature_c):.1f} {u.temperature_label}, "
        f"{a.relative_humidity:.0f} % RH, {a.pressure_kpa:.1f} kPa; "
        f"c = {res.speed_of_sound_m_s:.1f} m/s",
    ]


def method_sentence(res: RoomResult) -> str:
    """Which formula is in force and why, in one sentence."""
    return f"{METHOD_TITLES[res.method]} is the formula in force: {res.method_reason}."


def _method_lines(res: RoomResult) -> list[str]:
    lines = [wrap("* " + method_sentence(res), "  ", "    ")]
    for k, why in res.unavailable.items():
        lines.append(wrap(f"{METHOD_TITLES[k]} not available: {why}.", "  ", "    "))
    return lines


def _extras_text(ans: Answer, width=None) -> list[str]:
    """The target check and the daily exposure, when the room file asks for them."""
    out = []
    if ans.target is not None:
        out += ["", target_text(ans.target, width=width, described=ans.result).rstrip("\n")]
    if ans.exposures:
        out += ["", exposure_text(ans.exposures, width=width).rstrip("\n")]
    return out


def report_text(ans: Answer, source_name: str, u: Units = METRIC) -> str:
    """The full report as text, 80 columns."""
    res = ans.result
    rt, room, rc, lv = _tables(res, u)
    out = _header(res, u, source_name)
    out += ["", rt.text()] + _method_lines(res) + ["", room.text()]
    if rc:
        out += ["", rc.text()]
    if lv:
        out += ["", lv.text(), wrap(_levels_note(res), "  ", "  ")]
    out += _extras_text(ans)
    if res.warnings:
        out += ["", "Warnings"] + [wrap(w.message) for w in res.warnings]
    if res.cautions:
        out += ["", "CAUTION: HEARING"] + [wrap(c, "  ! ", "    ") for c in res.cautions]
    return "\n".join(out) + "\n"


def _levels_note(res: RoomResult) -> str:
    model = "Barron & Lee revised theory" if res.reverberant_model == "barron-lee" \
        else "diffuse field, 4/R"
    return (f"Levels re 20 uPa, sources summed; reverberant part by {model}; no rho-c "
            "correction.")


def report_markdown(ans: Answer, source_name: str, u: Units = METRIC) -> str:
    """The full report as markdown (the target and exposure sections as preformatted text)."""
    res = ans.result
    rt, room, rc, lv = _tables(res, u)
    head = _header(res, u, source_name)
    out = [f"# {head[0]}", ""] + [f"- {h.strip()}" for h in head[1:]] + ["", "## Reverberation",
                                                                          "", rt.markdown(), ""]
    out += ["\\* " + method_sentence(res)]
    for k, why in res.unavailable.items():
        out += ["", f"{METHOD_TITLES[k]} not available: {why}."]
    out += ["", "## Room", "", room.markdown()]
    if rc:
        out += ["", "## Critical distance", "", rc.markdown()]
    if lv:
        out += ["", "## Levels at receivers", "", lv.markdown(), "", _levels_note(res)]
    if ans.target is not None:
        out += ["", "## Target", "", "```", target_text(ans.target, described=res).rstrip(),
                "```"]
    if ans.exposures:
        out += ["", "## Daily noise exposure", "", "```",
                exposure_text(ans.exposures).rstrip(), "```"]
    if res.warnings:
        out += ["", "## Warnings", ""] + [f"- {w.message}" for w in res.warnings]
    if res.cautions:
        out += ["", "## Caution: hearing", ""] + [f"- **{c}**" for c in res.cautions]
    return "\n".join(out) + "\n"


def result_dict(res: RoomResult) -> dict:
    """The JSON document of a result, SI units."""
    return {
        "title": res.room.title,
        "bands_hz": list(res.bands_hz),
        "volume_m3": res.volume_m3,
        "surface_area_m2": res.surface_area_m2,
        "absorption_area_m2": floats(res.absorption_area_m2),
        "air_attenuation_db_per_m": floats(res.air_attenuation_db_per_m),
        "speed_of_sound_m_s": res.speed_of_sound_m_s,
        "rt60_s": {k: floats(v) for k, v in res.rt60_s.items()},
        "rt60_unavailable": dict(res.unavailable),
        "method": res.method,
        "method_reason": res.method_reason,
        "recommended": res.recommended,
        "rt60_unreliable": dict(res.unreliable),
        "room_constant_m2": floats(res.room_constant_m2),
        "schroeder_frequency_hz": floats(res.schroeder_hz),
        "reverberant_model": res.reverberant_model,
        "sources": [{"name": s.name, "directivity": s.directivity,
                     "sound_power_db": floats(s.sound_power_db),
                     "critical_distance_m": floats(s.critical_distance_m)} for s in res.sources],
        "receivers": [{"name": r.name, "distances_m": r.distances_m,
                       "level_db": floats(r.level_db), "level_dba": r.level_dba,
                       "direct_db": floats(r.direct_db), "direct_dba": r.direct_dba,
                       "reverberant_db": floats(r.reverberant_db),
                       "reverberant_dba": r.reverberant_dba} for r in res.receivers],
        "warnings": [{"code": w.code, "message": w.message} for w in res.warnings],
        "cautions": list(res.cautions),
    }


def answer_dict(ans: Answer) -> dict:
    """The JSON document of a room's answer: the result, with ``target`` and ``exposure``
    when the file asks for them."""
    data = result_dict(ans.result)
    if ans.target is not None:
        data["target"] = target_dict(ans.target)
    if ans.exposures:
        data["exposure"] = exposure_dict(ans.exposures)
    return data


def report_json(ans: Answer, source_name: str = "", u: Units = METRIC) -> str:
    return json_text(answer_dict(ans))


def report_csv(ans: Answer, source_name: str = "", u: Units = METRIC) -> str:
    """One row per quantity: quantity, item, unit, then one column per band, then dB(A). The
    target check and the daily exposure follow as rows of their own."""
    res = ans.result
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["quantity", "item", "unit"] + [str(b) for b in res.bands_hz] + ["dBA"])
    nb = len(res.bands_hz)

    def row(q, item, unit, vals, extra=""):
        w.writerow([q, item, unit] + [_cell(v) for v in vals] +
                   [_cell(extra) if extra != "" else ""])

    for k, v in res.rt60_s.items():
        row("rt60", k + (" (in force)" if k == res.method else ""), "s", v)
    row("absorption_area", "surfaces+objects", "m2", res.absorption_area_m2)
    row("air_attenuation", "air", "dB/m", res.air_attenuation_db_per_m)
    row("room_constant", "room", "m2", res.room_constant_m2)
    row("schroeder_frequency", "room", "Hz", res.schroeder_hz)
    for s in res.sources:
        row("critical_distance", s.name, "m", s.critical_distance_m)
    for r in res.receivers:
        row("level", r.name, "dB", r.level_db, r.level_dba)
        row("direct", r.name, "dB", r.direct_db, r.direct_dba)
        row("reverberant", r.name, "dB", r.reverberant_db, r.reverberant_dba)
    t = ans.target
    if t is not None and t.assessment is not None and t.assessment.applicable:
        a = t.assessment
        by_band = {int(b): i for i, b in enumerate(a.bands_hz)}
        idx = [by_band.get(int(b)) for b in res.bands_hz]

        def per_band(x):
            return ["" if i is None else x[i] for i in idx]
        item = f"{a.criterion.id} ({t.method}, {t.occupancy.label})"
        row("target_rt60_estimate", item, "s", per_band(a.estimate_s))
        row("target_rt60_min", item, "s", per_band(a.target_min_s))
        row("target_rt60_max", item, "s", per_band(a.target_max_s))
        w.writerow(["target_status", item, ""] + [""] * nb + [a.status])
    for lc in (t.levels if t is not None else ()):
        w.writerow(["target_level", lc.receiver, "dBA"] + [""] * nb +
                   [f"{lc.level_dba:.6g} <= {lc.max_dba:.6g}: {'pass' if lc.passed else 'fail'}"])
    for name, d in ans.exposures.items():
        w.writerow(["lex_8h", name, "dBA"] + [""] * nb + [f"{d.lex_8h_dba:.6g}"])
        w.writerow(["osha_dose", name, "%"] + [""] * nb + [f"{d.osha_dose_percent:.6g}"])
    return buf.getvalue()


def _cell(v) -> str:
    """A CSV cell: 6 significant digits, empty where there is no finite value."""
    if v == "" or v is None:
        return ""
    x = float(v)
    return f"{x:.6g}" if x == x and abs(x) != float("inf") else ""


REPORTERS = {"text": report_text, "markdown": report_markdown, "json": report_json,
             "csv": report_csv}


def report(ans: Answer, form: str, source_name: str, u: Units = METRIC) -> str:
    """The report of a room's answer in one of :data:`FORMATS`."""
    return REPORTERS[form](ans, source_name, u)


def check_dict(ans: Answer, shown: str) -> dict:
    """What ``roomcalc check --format json`` says of a room that passed its checks (SI)."""
    room, res = ans.room, ans.result
    data = {"file": shown, "ok": True,
            "counts": {"surfaces": len(room.surfaces), "objects": len(room.objects),
                       "sources": len(room.sources), "receivers": len(room.receivers)},
            "method": res.method, "method_reason": res.method_reason,
            "recommended": res.recommended,
            "warnings": [{"code": w.code, "message": w.message} for w in res.warnings],
            "cautions": list(res.cautions)}
    if ans.target is not None:
        data["target"] = target_dict(ans.target)
    if ans.exposures:
        data["exposure"] = exposure_dict(ans.exposures)
    return data


def problems_dict(problems, shown: str) -> dict:
    """Every problem of a refused file, for ``check --format json``."""
    return {"file": shown, "ok": False,
            "problems": [{"file": p.file, "field": p.where, "message": p.message}
                         for p in problems]}


def check_text(ans: Answer, shown: str) -> str:
    """What ``roomcalc check`` says of a room that passed its checks."""
    room = ans.room
    counts = ", ".join(plural(n, w) for n, w in (
        (len(room.surfaces), "surface"), (len(room.objects), "object"),
        (len(room.sources), "source"), (len(room.receivers), "receiver")))
    out = [f"{shown}: ok ({counts})",
           wrap(f"RT60 by {METHOD_TITLES[ans.method]}, the formula in force: "
                f"{ans.result.method_reason}.", "  ", "    ")]
    out += [wrap(w.message, "  warning: ", "    ") for w in ans.result.warnings]
    text = "\n".join(out) + "\n"
    if ans.target is not None:
        text += target_text(ans.target, described=ans.result)
    if ans.exposures:
        text += exposure_text(ans.exposures)
    return text


# ----------------------------------------------------------------------------- compare

def comparison_dict(cmp: Comparison) -> dict:
    b, a = cmp.before, cmp.after
    return {
        "bands_hz": list(b.bands_hz),
        "before": b.room.title, "after": a.room.title,
        "method": cmp.method,
        "method_reason": f"the formula in force for the room before: {b.method_reason}",
        "rt60_before_s": {k: floats(v) for k, v in b.rt60_s.items()},
        "rt60_after_s": {k: floats(v) for k, v in a.rt60_s.items()},
        "rt60_change_s": {k: floats(v) for k, v in cmp.rt60_change_s.items()},
        "room_constant_before_m2": floats(b.room_constant_m2),
        "room_constant_after_m2": floats(a.room_constant_m2),
        "reverberant_reduction_db": floats(cmp.reverberant_reduction_db),
        "receivers": [{"name": c.name, "level_change_db": floats(c.level_change_db),
                       "level_change_dba": c.level_change_dba,
                       "reverberant_change_dba": c.reverberant_change_dba,
                       "inside_critical_distance_of": c.inside_critical_distance}
                      for c in cmp.receivers],
        "notes": list(cmp.notes),
        "warnings_after": [w.message for w in a.warnings],
        "cautions_after": list(a.cautions),
    }


def _compare_tables(cmp: Comparison):
    b, a = cmp.before, cmp.after
    k = cmp.method
    rt = _Table(f"RT60 [s], {METHOD_TITLES[k]}", b.bands_hz)
    rt.add("before", b.rt60_s[k])
    rt.add("after", a.rt60_s[k])
    rt.add("change", a.rt60_s[k] - b.rt60_s[k])
    # A change like the rows around it (negative = quieter): -10 lg(R2/R1); +0.0 avoids "-0.0".
    rt.add("reverb. field change [dB]", -cmp.reverberant_reduction_db + 0.0, 1)
    lv = None
    if cmp.receivers:
        before = {r.name: r for r in b.receivers}
        after = {r.name: r for r in a.receivers}
        lv = _Table("Lp [dB]", b.bands_hz, extra="dB(A)")
        for c in cmp.receivers:
            lv.add(f"{c.name}", before[c.name].level_db, 1, before[c.name].level_dba)
            lv.add("  after", after[c.name].level_db, 1, after[c.name].level_dba)
            lv.add("  change", c.level_change_db, 1, c.level_change_dba)
    return rt, lv


def compare_report(cmp: Comparison, names: tuple[str, str], form: str = "text") -> str:
    """Before and after in one of :data:`FORMATS`, by the before room's formula in force."""
    if form == "json":
        return json_text(comparison_dict(cmp))
    if form == "csv":
        buf = io.StringIO()
        w = csv.writer(buf, lineterminator="\n")
        w.writerow(["quantity", "item", "unit"] + [str(x) for x in cmp.before.bands_hz] + ["dBA"])
        for k, v in cmp.rt60_change_s.items():
            w.writerow(["rt60_change", k, "s"] + [f"{x:.6g}" for x in v] + [""])
        w.writerow(["reverberant_reduction", "room", "dB"] +
                   [f"{x:.6g}" for x in cmp.reverberant_reduction_db] + [""])
        for c in cmp.receivers:
            w.writerow(["level_change", c.name, "dB"] + [f"{x:.6g}" for x in c.level_change_db] +
                       [f"{c.level_change_dba:.6g}"])
        return buf.getvalue()
    rt, lv = _compare_tables(cmp)
    md = form == "markdown"
    out = [("# " if md else "") + f"Before: {cmp.before.room.title or names[0]}",
           ("# " if md else "") + f"After:  {cmp.after.room.title or names[1]}",
           "" if md else f"  ({names[0]} -> {names[1]}; negative = shorter or quieter)", "",
           rt.markdown() if md else rt.text()]
    if lv:
        out += ["", lv.markdown() if md else lv.text()]
    if cmp.notes:
        out += ["", "Notes"] + [(f"- {n}" if md else wrap(n)) for n in cmp.notes]
    if cmp.after.warnings:
        out += ["", "Warnings (after)"] + [(f"- {w.message}" if md else wrap(w.message))
                                          for w in cmp.after.warnings]
    if cmp.after.cautions:
        out += ["", "CAUTION: HEARING (after)"] + [(f"- **{c}**" if md else wrap(c, "  ! ", "    "))
                                                  for c in cmp.after.cautions]
    return "\n".join(out) + "\n"


# ----------------------------------------------------------------------------- materials

def material_dict(m: Material) -> dict:
    d = {"id": m.id, "name": m.name, "category": m.category, "kind": m.kind,
         "values": {str(k): v for k, v in sorted(m.values.items())}, "source": m.source,
         "notes": m.notes}
    r = m.ratings()
    if r:
        d.update({"nrc": r[0], "saa_octave_estimate": r[1], "alpha_w": r[2].alpha_w,
                  "alpha_w_shape": r[2].shape, "absorption_class": r[2].absorption_class})
    return d


def materials_text(mats: list[Material], form: str = "text") -> str:
    if form == "json":
        return json_text([material_dict(m) for m in mats])
    if form == "csv":
        buf = io.StringIO()
        w = csv.writer(buf, lineterminator="\n")
        bands = [63, 125, 250, 500, 1000, 2000, 4000, 8000]
        w.writerow(["id", "name", "category", "kind"] + [str(b) for b in bands] +
                   ["nrc", "saa_octave_estimate", "alpha_w", "absorption_class", "source"])
        for m in mats:
            r = m.ratings()
            w.writerow([m.id, m.name, m.category, m.kind] +
                       [m.values.get(b, "") for b in bands] +
                       ([r[0], r[1], r[2].label(), r[2].absorption_class] if r else
                        ["", "", "", ""]) + [m.source])
        return buf.getvalue()
    md = form == "markdown"
    if md:
        lines = ["| id | name | kind | 125-4000 Hz | NRC | alpha_w (class) | source |",
                 "|---|---|---|---|---|---|---|"]
    else:
        lines = []
    for m in mats:
        vals = " ".join(f"{m.values[b]:.2f}" for b in sorted(m.values))
        r = m.ratings()
        rating = (f"NRC {r[0]:.2f}  SAA~{r[1]:.2f}  alpha_w {r[2].label()} class "
                  f"{r[2].absorption_class}") if r else "absorption per unit [m^2]"
        if md:
            lines.append(f"| {m.id} | {m.name} | {m.kind} | {vals} | "
                         f"{fmt(r[0]) if r else ''} | "
                         f"{f'{r[2].label()} ({r[2].absorption_class})' if r else ''} | "
                         f"{m.source} |")
        else:
            lines += [f"{m.id}  [{m.category}]", f"    {m.name}",
                      f"    {m.bands_text}: {vals}", f"    {rating}",
                      wrap(f"source: {m.source}", "    ", "      "), ""]
    if not md:
        lines.append(f"{len(mats)} material(s). SAA~ is an estimate from octave data; a "
                     "product's test report\nto ISO 354 / ASTM C423 supersedes these values.")
    return "\n".join(lines) + "\n"
