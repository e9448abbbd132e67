"""The report of a room in four formats: text (80 columns), markdown, JSON (SI) and CSV (SI),
each with the same content: reverberation by every formula (the one in force marked), the room,
critical distances, levels at receivers, the target check and the daily exposure, warnings and
cautions; and what ``check`` says. Before/after is in :mod:`roomcalc.present.compare`, the
catalogue listing in :mod:`roomcalc.present.materials`.

Text and markdown show lengths, areas and volumes in the room file's units; JSON and CSV are SI
whatever the file's units.
"""

from __future__ import annotations

import csv
import io

from roomcalc.engine.analysis import METHOD_TITLES, METHODS, RoomResult
from roomcalc.engine.bands import a_weighted_total
from roomcalc.io.units import METRIC, Units
from roomcalc.present.numbers import NO_VALUE, csv_number, floats, fmt, json_text, plural, wrap
from roomcalc.present.sections import (exposure_dict, exposure_text, target_dict,
                                       target_text)
from roomcalc.present.tables import BandRows
from roomcalc.study.study import Answer

__all__ = ["FORMATS", "report", "report_text", "report_markdown", "report_json",
           "report_csv", "result_dict", "answer_dict", "method_sentence", "check_text",
           "check_dict", "problems_dict"]

FORMATS = ("text", "markdown", "json", "csv")


def _tables(res: RoomResult, u: Units):
    bands = res.bands_hz
    rt = BandRows("RT60 [s]", bands)
    for k in METHODS:
        if k in res.rt60_s:
            mark = " *" if k == res.method else ""
            rt.add(METHOD_TITLES[k] + mark, res.rt60_s[k])
    room = BandRows("Room", bands)
    room.add(f"Absorption A [{u.area_label}]", res.absorption_area_m2 / u.area, 1)
    room.add("Mean alpha", res.mean_alpha, 3)
    room.add("Air [dB/km]", res.air_attenuation_db_per_m * 1000.0, 2)
    room.add(f"Air 4mV [{u.area_label}]", 4 * res.air_m_per_m * res.volume_m3 / u.area, 2)
    room.add(f"Room constant R [{u.area_label}]", res.room_constant_m2 / u.area, 1)
    room.add("Schroeder f_S [Hz]", res.schroeder_hz, 0)
    rc = None
    if res.sources:
        rc = BandRows(f"Critical dist. [{u.length_label}]", bands)
        for s in res.sources:
            rc.add(f"{s.name} (Q={s.directivity:g})", s.critical_distance_m / u.length)
    lv = None
    if res.receivers:
        lv = BandRows("Lp [dB]", bands, extra="dB(A)")
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
    out += _sources_lines(ans, wrap)
    out += _extras_text(ans)
    if res.warnings:
        out += ["", "Warnings"] + [wrap(w.message) for w in res.warnings]
    if res.cautions:
        out += ["", "CAUTION: HEARING"] + [wrap(c, "  ! ", "    ") for c in res.cautions]
    return "\n".join(out) + "\n"


def _sources_lines(ans: Answer, line) -> list[str]:
    """How each source's power is given and what sound power that is (text: ``line`` wraps;
    markdown: a list item)."""
    from roomcalc.present.sources import source_given

    given = {s.name: s for s in ans.spec.sources}
    out = []
    for s in ans.result.sources:
        spec = given.get(s.name)
        if spec is None:
            continue
        lwa = float(a_weighted_total(s.sound_power_db, ans.result.bands_hz))
        out.append(line(f"{s.name}: {source_given(spec)}; sound power LwA {fmt(lwa, 1)} "
                        f"dB(A), directivity Q {s.directivity:g}"))
    return (["", "Sources"] + out) if out else []


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
    src = _sources_lines(ans, lambda t: f"- {t}")
    if src:
        out += ["", "## Sources", ""] + src[2:]
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
    from roomcalc.present.sources import source_given_dict

    data = result_dict(ans.result)
    given = {s.name: s for s in ans.spec.sources}
    for d in data["sources"]:
        if d["name"] in given:
            d.update(source_given_dict(given[d["name"]]))
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
    for s in res.sources:
        row("sound_power", s.name, "dB", s.sound_power_db,
            float(a_weighted_total(s.sound_power_db, res.bands_hz)))
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
        w.writerow(["osha_twa", name, "dBA"] + [""] * nb + [_cell(d.osha_twa_dba) or NO_VALUE])
    return buf.getvalue()


def _cell(v) -> str:
    """A CSV cell: 6 significant digits, empty where there is no finite value."""
    return csv_number(v)


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
            "problems": [{"file": p.file, "field": p.where, "message": p.message,
                          **({"excerpt": p.excerpt} if p.excerpt else {})}
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
