"""The material catalogue listing (roomcalc materials) as text, markdown, JSON or CSV."""

from __future__ import annotations

import csv
import io

from roomcalc.io.catalog import Material
from roomcalc.present.numbers import fmt, json_text, wrap

__all__ = ["material_dict", "materials_text", "no_match_text"]


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


def no_match_text(words: str, categories: list[str], category: str | None = None) -> str:
    """What a search that found nothing says, with the categories to try instead."""
    asked = f"'{words.strip()}'" if words.strip() else "that"
    within = f" in '{category}'" if category else ""
    return (f"No material matches {asked}{within}. Fewer words, or a category: "
            f"{', '.join(categories)}.")
