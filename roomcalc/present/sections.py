"""Report sections of the study's answers: the target check, the daily exposure and the
treatment plan, as text (80 columns, or unwrapped for a screen) and as JSON dictionaries (SI).
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from roomcalc.engine.analysis import METHOD_TITLES
from roomcalc.io.units import METRIC, Units
from roomcalc.present.numbers import (band_label, finite_or_none, floats, fmt, value_or_note,
                                      wrap)
from roomcalc.study.assessment import Occupancy, PlanRun, TargetCheck

if TYPE_CHECKING:
    from roomcalc.engine.exposure import ExposureSummary

__all__ = ["window_text", "occupancy_text", "target_text", "target_dict", "exposure_text",
           "exposure_dict", "plan_levels", "plan_totals_text", "plan_text", "plan_dict",
           "occupancy_dict", "amount_text", "panels_of", "applied_text", "plan_markdown",
           "plan_csv"]


def window_text(lo: float, hi: float) -> str:
    """A window of seconds in words: "0.40-0.60 s", "at most 0.60 s", "at least 0.30 s"."""
    if math.isfinite(lo) and math.isfinite(hi):
        return f"{lo:.2f}-{hi:.2f} s"
    if math.isfinite(hi):
        return f"at most {hi:.2f} s"
    if math.isfinite(lo):
        return f"at least {lo:.2f} s"
    return "no limit"


def occupancy_text(occ: Occupancy) -> str:
    return f"assessed {occ.label}." + (f" {occ.source}" if occ.source else "")


def occupancy_dict(occ: Occupancy) -> dict:
    return {"share": occ.share, "label": occ.label, "source": occ.source,
            "differs_from_described": occ.differs}


def target_text(check: TargetCheck, width=None, described=None) -> str:
    """The target section of the text report (``width`` 0: lines unwrapped). ``described``:
    the room as described (a RoomResult), shown beside the assessed one when they differ."""
    lines = [f"Target (RT60 by {METHOD_TITLES.get(check.method, check.method)}, the formula "
             "in force)"]
    a = check.assessment
    occ = check.occupancy
    if a is not None:
        c = a.criterion
        lines.append(f"  {c.title}" + (f" ({c.edition})" if c.edition else ""))
        if occ.share is not None:
            lines.append(wrap(occupancy_text(occ), "  ", "    ", width=width))
        if not a.applicable:
            lines.append(wrap(f"not applicable: {a.reason}", "  ", "    ", width=width))
        else:
            lines += _assessment_lines(check, described, width)
        if c.source:
            lines.append(wrap(f"source: {c.source}", "  ", "    ", width=width))
        if a.provenance:
            lines.append(wrap(f"values: {a.provenance}", "  ", "    ", width=width))
        if math.isfinite(a.background_dba):
            lines.append(f"  background noise limit (not checked here): {a.background_dba:g} "
                         "dB(A)")
        lines.append(wrap(a.governs, "  ", "  ", width=width))
    for lc in check.levels:
        lines.append(f"  {lc.receiver}: {lc.level_dba:.1f} dB(A) against at most "
                     f"{lc.max_dba:.1f} dB(A), margin {fmt(lc.margin_db, 1, signed=True)} dB: "
                     f"{'pass' if lc.passed else 'fail'}")
    return "\n".join(lines) + "\n"


def _assessment_lines(check: TargetCheck, described, width) -> list[str]:
    a = check.assessment
    mean = math.isfinite(a.mean_s)
    show_described = described is not None and check.occupancy.differs
    lines = []
    if math.isfinite(a.nominal_s):
        lines.append(f"  nominal target {a.nominal_s:.2f} s")
    head = f"  {'band':>5} {'min [s]':>7} {'max [s]':>7} {'estimate':>8}"
    if show_described:
        head += f" {'as given':>8}"
    lines.append(head + f" {'margin':>6}  verdict")
    rt_described = described.rt60_s[check.method] if show_described else None
    for i, b in enumerate(a.bands_hz):
        if not a.in_assessment[i]:
            continue
        verdict = "in the mean" if mean and a.band_status[i] == "not-assessed" \
            else a.band_status[i]
        row = (f"  {band_label(b):>5} {fmt(a.target_min_s[i]):>7} {fmt(a.target_max_s[i]):>7} "
               f"{fmt(a.estimate_s[i]):>8}")
        if show_described:
            row += f" {fmt(rt_described[i]):>8}"
        lines.append(row + f" {fmt(a.margin_s[i]):>6}  {verdict}")
    if mean:
        lines.append(f"  mean of the assessed bands {a.mean_s:.2f} s against "
                     f"{window_text(a.mean_min_s, a.mean_max_s)}, margin "
                     f"{fmt(a.mean_margin_s, 2, signed=True)} s: {a.mean_status}")
    if show_described:
        lines.append(wrap(f"(estimate: {check.occupancy.label}; as given: the room as its "
                          "file gives it; the verdict is for the estimate)", "  ", "   ",
                          width=width))
    lines.append(f"  overall: {a.status}")
    return lines


def target_dict(check: TargetCheck) -> dict:
    a = check.assessment
    out = {"method": check.method, "status": check.status,
           "occupancy": occupancy_dict(check.occupancy),
           "levels": [{"receiver": lc.receiver, "level_dba": lc.level_dba, "max_dba": lc.max_dba,
                       "margin_db": lc.margin_db, "pass": lc.passed} for lc in check.levels]}
    if a is not None:
        out["rt60"] = {
            "criterion": a.criterion.id, "title": a.criterion.title,
            "applicable": a.applicable, "reason": a.reason, "status": a.status,
            "assess": a.criterion.assess,
            "bands_hz": [int(b) for b in a.bands_hz], "estimate_s": finite_or_none(a.estimate_s),
            "min_s": finite_or_none(a.target_min_s), "max_s": finite_or_none(a.target_max_s),
            "margin_s": finite_or_none(a.margin_s), "verdict": list(a.band_status),
            "in_assessment": [bool(x) for x in a.in_assessment],
            "provenance": a.provenance, "governs": a.governs}
        if math.isfinite(a.mean_s):
            out["rt60"]["mean"] = {
                "estimate_s": a.mean_s, "min_s": finite_or_none([a.mean_min_s])[0],
                "max_s": finite_or_none([a.mean_max_s])[0],
                "margin_s": finite_or_none([a.mean_margin_s])[0], "verdict": a.mean_status}
    return out


# ----------------------------------------------------------------------------- exposure

def exposure_text(days: dict[str, ExposureSummary], after: dict | None = None,
                  width=None) -> str:
    """The daily-exposure section of the text report (``width`` 0: lines unwrapped)."""
    if not days:
        return ""
    from roomcalc.engine.exposure import EXPOSURE_CAUTION, compare_exposure

    lines = ["Daily noise exposure (receivers with a working pattern)"]
    for name, d in days.items():
        lines.append(f"  {name}: {d.total_hours:g} h; LAeq {d.laeq_dba:.1f} dB(A), "
                     f"LEX,8h {d.lex_8h_dba:.1f} dB(A)")
        lines.append(wrap(f"EU 2003/10/EC: {d.eu.label}", "    ", "    ", width=width))
        twa = value_or_note(d.osha_twa_dba, 1, "dBA")
        lines.append(wrap(f"OSHA dose {d.osha_dose_percent:.0f} % (TWA {twa}"
                          f"{', action level reached' if d.osha_action_level_reached else ''}"
                          f"{', PEL exceeded' if d.osha_pel_exceeded else ''}); NIOSH dose "
                          f"{d.niosh_dose_percent:.0f} %"
                          f"{' (REL exceeded)' if d.niosh_rel_exceeded else ''}",
                          "    ", "    ", width=width))
        if after and name in after:
            ch = compare_exposure(d, after[name])
            lines.append(f"    after the plan: LEX,8h {after[name].lex_8h_dba:.1f} dB(A) "
                         f"({fmt(ch.lex_8h_change_db, 1, signed=True)} dB), OSHA dose "
                         f"{after[name].osha_dose_percent:.0f} %")
    lines.append(wrap(EXPOSURE_CAUTION, "  ! ", "    ", width=width))
    return "\n".join(lines) + "\n"


def exposure_dict(days: dict[str, ExposureSummary]) -> dict:
    return {name: {"hours": d.total_hours, "laeq_dba": d.laeq_dba, "lex_8h_dba": d.lex_8h_dba,
                   "eu_band": d.eu.band, "osha_dose_percent": d.osha_dose_percent,
                   "osha_twa_dba": d.osha_twa_dba, "niosh_dose_percent": d.niosh_dose_percent,
                   "caution": d.caution} for name, d in days.items()}


# ----------------------------------------------------------------------------- plan

def _totals(run: PlanRun) -> tuple[float, float]:
    """Area covered [m^2] and units added: kept apart, never summed."""
    area = sum(it.amount for it in run.plan.items if it.kind == "cover")
    units = sum(it.amount for it in run.plan.items if it.kind != "cover")
    return float(area), float(units)


def panels_of(run: PlanRun, item) -> tuple[int, float, tuple | None] | None:
    """A covered item bought as panels of a stated size: (count, area of one [m^2], (width,
    height) [m] or None); None for an item that is not (units, or a cover of any area)."""
    if item.kind != "cover":
        return None
    cand = next((c for c in run.candidates if c.name == item.candidate), None)
    if cand is None or cand.step is None:
        return None
    return int(round(item.amount / cand.step)), float(cand.step), cand.panel


def _surfaces_of(run: PlanRun, item) -> list[str]:
    """The names of the surfaces a covered item lies on (empty for units)."""
    from roomcalc.engine.planner import cover_surfaces

    cand = next((c for c in run.candidates if c.name == item.candidate), None)
    if item.kind != "cover" or cand is None:
        return []
    room = run.occupancy.room
    return [room.surfaces[i].name for i in cover_surfaces(cand)]


def amount_text(run: PlanRun, item, u: Units = METRIC) -> str:
    """How much of one item, in the file's units: "4 units", "5.04 m^2", or for panels of a
    stated size "7 panels of 1.2 x 0.6 m = 5.04 m^2" ("7 panels of 0.72 m^2 = 5.04 m^2" where
    only their area is known)."""
    if item.kind != "cover":
        return f"{item.amount:g} unit{'s' if item.amount != 1 else ''}"
    area = f"{item.amount / u.area:.2f} {u.area_label}"
    panels = panels_of(run, item)
    if panels is None:
        return area
    n, each, size = panels
    of = (f"{size[0] / u.length:g} x {size[1] / u.length:g} {u.length_label}" if size
          else f"{each / u.area:.4g} {u.area_label}")
    return f"{n} panel{'s' if n != 1 else ''} of {of} = {area}"


def applied_text(run: PlanRun) -> str:
    """The candidates the plan left out because they are applied to the room already, in a
    sentence ("" when there are none)."""
    if not run.applied:
        return ""
    names = ", ".join(f"'{n}'" for n in run.applied)
    one = len(run.applied) == 1
    it = "it" if one else "them"
    return (f"Left out, already applied to the room: {names} (the room has {it} built in; "
            f"un-mark applied to plan {it} again).")


def plan_totals_text(run: PlanRun, u: Units = METRIC) -> str:
    """"48.62 m^2 and 40 units" (only the parts there are)."""
    area, units = _totals(run)
    parts = []
    if area > 0:
        parts.append(f"{area / u.area:.2f} {u.area_label}")
    if units > 0:
        parts.append(f"{units:g} unit{'s' if units != 1 else ''}")
    return " and ".join(parts) or "nothing"


def plan_dict(run: PlanRun, u: Units = METRIC) -> dict:
    """The plan as JSON (SI): ``feasible``, ``items`` (``candidate``, ``surface`` or null
    (several: "A, B"), ``surfaces`` (their names, a list; empty for units), ``area_m2`` or
    ``count``, ``cost``, ``panels`` for panels of a stated size (``count``, ``area_each_m2``,
    ``width_m``, ``height_m``), ``how_much`` in words in the file's units),
    ``applied_left_out`` (candidates applied to the room already), ``total_cost``,
    ``total_area_m2`` (covers only), ``total_units``, ``rt60_after_s`` by ``method`` (the
    formula in force), and more."""
    p = run.plan
    items = []
    for it in p.items:
        d = {"candidate": it.candidate, "surface": it.surface,
             "surfaces": _surfaces_of(run, it)}
        d["area_m2" if it.kind == "cover" else "count"] = it.amount
        d["cost"] = it.cost
        panels = panels_of(run, it)
        if panels is not None:
            n, each, size = panels
            d["panels"] = {"count": n, "area_each_m2": each,
                           "width_m": size[0] if size else None,
                           "height_m": size[1] if size else None}
        d["how_much"] = amount_text(run, it, u)
        items.append(d)
    area, units = _totals(run)
    lo, hi = run.goals.rt60_min, run.goals.rt60_max
    return {"feasible": p.feasible, "method": p.method,
            "method_reason": run.described_before.method_reason, "objective": p.objective,
            "currency": run.currency, "items": items, "total_cost": p.total_cost,
            "total_area_m2": area, "total_units": units,
            "occupancy": occupancy_dict(run.occupancy),
            "bands_hz": [int(b) for b in run.before.bands_hz],
            "rt60_before_s": floats(p.rt60_before),
            "rt60_after_s": floats(p.rt60_after),
            "rt60_max_s": None if hi is None else finite_or_none(hi),
            "rt60_min_s": None if lo is None else finite_or_none(lo),
            "levels_before_dba": {n: b for n, b, _ in plan_levels(run)},
            "levels_after_dba": {n: a for n, _, a in plan_levels(run)},
            "reasons": list(p.reasons), "solver": p.solver,
            "applied_left_out": list(run.applied)}


def plan_levels(run: PlanRun) -> list[tuple[str, float, float]]:
    """(receiver, dB(A) before, dB(A) after) for the room as described (all its people)."""
    after = {r.name: r.level_dba for r in run.described_after.receivers}
    return [(r.name, float(r.level_dba), float(after[r.name]))
            for r in run.described_before.receivers if r.name in after]


def plan_text(run: PlanRun, u: Units = METRIC, width=None) -> str:
    p = run.plan
    status = "meets the target" if p.feasible else "CANNOT meet the target"
    lines = [wrap(f"Treatment plan: {status}; least {p.objective}; RT60 by "
                  f"{METHOD_TITLES.get(p.method, p.method)} (in force)", "", "  ",
                  width=width)]
    if run.occupancy.share is not None:
        lines.append(wrap(f"made for the room as the criterion assesses it: "
                          f"{run.occupancy.label}", "  ", "    ", width=width))
    if p.items:
        cost_head = f"cost{' ' + run.currency if run.currency else ''}"
        lines.append(f"  {'what':34} {'where':18} {'how much':>12} {cost_head[:10]:>10}")
        for it in p.items:
            amount = (f"{it.amount / u.area:.2f} {u.area_label}" if it.kind == "cover"
                      else f"{it.amount:g} units")
            where = it.surface or "added"
            several = it.surface is not None and len(it.surface) > 18
            if several:
                where = f"{it.surface.count(', ') + 1} surfaces" if ", " in it.surface \
                    else it.surface[:17] + "~"
            lines.append(f"  {it.candidate[:34]:34} {where:18} {amount:>12} {it.cost:>10.2f}")
            if several:
                lines.append(wrap(f"on {it.surface}", "    ", "      ", width=width))
            if panels_of(run, it) is not None:
                lines.append(f"    {amount_text(run, it, u)}")
        lines.append(f"  {'total: ' + plan_totals_text(run, u):53} {p.total_cost:>10.2f}")
    else:
        lines.append("  nothing to add: the room already meets its target" if p.feasible
                     else "  no candidate helps")
    if run.applied:
        lines.append(wrap(applied_text(run), "  ", "    ", width=width))
    bands = run.before.bands_hz
    lines.append("  " + f"{'RT60 [s]':16}" + "".join(f"{band_label(b):>7}" for b in bands))
    lines.append("  " + f"{'before':16}" + "".join(f"{fmt(x):>7}" for x in p.rt60_before))
    lines.append("  " + f"{'after':16}" + "".join(f"{fmt(x):>7}" for x in p.rt60_after))
    lo, hi = run.goals.rt60_min, run.goals.rt60_max
    if hi is not None:
        lines.append("  " + f"{'at most':16}" + "".join(f"{fmt(x):>7}" for x in hi))
    if lo is not None:
        lines.append("  " + f"{'at least':16}" + "".join(f"{fmt(x):>7}" for x in lo))
    for name, before, after in plan_levels(run):
        change = fmt(after - before, 1, signed=True)
        lines.append(f"  {name}: {before:.1f} -> {after:.1f} dB(A) ({change} dB)")
    for r in p.reasons:
        lines.append(wrap(r, "  ! ", "    ", width=width))
    return "\n".join(lines) + "\n"


def plan_markdown(run: PlanRun, u: Units = METRIC) -> str:
    """The plan as markdown: a table of what to buy (panels counted), then the text section."""
    p = run.plan
    out = ["# Treatment plan", ""]
    if p.items:
        cur = f" [{run.currency}]" if run.currency else ""
        out += [f"| what | where | how much | cost{cur} |", "|---|---|---|---:|"]
        out += [f"| {it.candidate} | {it.surface or 'added'} | {amount_text(run, it, u)} | "
                f"{it.cost:.2f} |" for it in p.items]
        out.append("")
    if run.applied:
        out += [applied_text(run), ""]
    out += ["```", plan_text(run, u).rstrip(), "```"]
    return "\n".join(out) + "\n"


def plan_csv(run: PlanRun, u: Units = METRIC) -> str:
    """The plan as CSV, one row per item (SI: ``amount`` in m2 or units), with the panels of a
    stated size counted, then the total, then each candidate left out as applied."""
    import csv
    import io

    from roomcalc.present.numbers import csv_number

    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["row", "candidate", "where", "amount", "unit", "panels", "panel_area_m2",
                "panel_width_m", "panel_height_m", "cost", "how_much"])
    for it in run.plan.items:
        panels = panels_of(run, it)
        n, each, size = panels if panels is not None else ("", "", None)
        w.writerow(["item", it.candidate, it.surface or "added", csv_number(it.amount),
                    "m2" if it.kind == "cover" else "units", n, csv_number(each),
                    csv_number(size[0]) if size else "", csv_number(size[1]) if size else "",
                    csv_number(it.cost), amount_text(run, it, u)])
    area, units = _totals(run)
    w.writerow(["total", "", "", csv_number(area), "m2", "", "", "", "",
                csv_number(run.plan.total_cost), plan_totals_text(run, u)])
    for name in run.applied:
        w.writerow(["applied, left out", name, "", "", "", "", "", "", "", "", ""])
    return buf.getvalue()
