"""Before and after, by the formula in force for the room before, as text, markdown, JSON or CSV."""

from __future__ import annotations

import csv
import io

from roomcalc.engine.analysis import METHOD_TITLES, Comparison
from roomcalc.present.numbers import csv_number, floats, json_text, wrap
from roomcalc.present.tables import BandRows

__all__ = ["comparison_dict", "compare_report"]


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
    rt = BandRows(f"RT60 [s], {METHOD_TITLES[k]}", b.bands_hz)
    rt.add("before", b.rt60_s[k])
    rt.add("after", a.rt60_s[k])
    rt.add("change", a.rt60_s[k] - b.rt60_s[k])
    # A change like the rows around it (negative = quieter): -10 lg(R2/R1); +0.0 avoids "-0.0".
    rt.add("reverb. field change [dB]", -cmp.reverberant_reduction_db + 0.0, 1)
    lv = None
    if cmp.receivers:
        before = {r.name: r for r in b.receivers}
        after = {r.name: r for r in a.receivers}
        lv = BandRows("Lp [dB]", b.bands_hz, extra="dB(A)")
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
            w.writerow(["rt60_change", k, "s"] + [csv_number(x) for x in v] + [""])
        w.writerow(["reverberant_reduction", "room", "dB"] +
                   [csv_number(x) for x in cmp.reverberant_reduction_db] + [""])
        for c in cmp.receivers:
            w.writerow(["level_change", c.name, "dB"] + [csv_number(x) for x in c.level_change_db] +
                       [csv_number(c.level_change_dba)])
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
