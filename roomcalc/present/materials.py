"""The material catalogue listing (roomcalc materials) as text, markdown, JSON or CSV."""

from __future__ import annotations

import csv
import io

from pathlib import Path

from roomcalc.io import paths
from roomcalc.io.catalog import Material
from roomcalc.present.numbers import fmt, json_text, wrap

__all__ = ["MEMORY_SOURCE", "FACE_CATEGORIES", "material_dict", "materials_text",
           "no_match_text", "preferred_categories", "source_sentence"]

#: The ``source`` of a catalogue entry whose values are remembered typical values, not taken
#: from a publication (materials/README.md, "Sources").
MEMORY_SOURCE = ("typical value, from memory; verify against a test report to ISO 354 / "
                 "ASTM C423")
#: What every catalogue value is not, and what to check it against.
_NOT_A_TEST = ("a typical value, not a test of this product; check a test report to ISO 354 "
               "or ASTM C423")


def source_sentence(m: Material) -> str:
    """Where a material's values come from, as a plain sentence (the one wording, for the
    chooser, ``roomcalc materials`` and the reports).

    A remembered value says so; a handbook value names the book, edition and table; a value
    from the user's own catalogue or room file is quoted as they gave it.

    >>> m = Material("x", "X", "user", "surface", {}, MEMORY_SOURCE)
    >>> source_sentence(m).startswith("typical value from handbooks, remembered")
    True
    """
    src = m.source.strip()
    if src == MEMORY_SOURCE:
        return ("typical value from handbooks, remembered (from memory, not checked against a "
                "copy), not a test of this product; check a test report to ISO 354 or ASTM "
                "C423")
    if not _built_in(m):
        return f"your own value, from: {src}"
    src = src.replace("(secondary quotation)", "(quoted at second hand)")
    return f"from {src}, {_NOT_A_TEST}"


def _built_in(m: Material) -> bool:
    """The entry is from the shipped catalogue (not the user's files or a room's own)."""
    if not m.file:
        return True
    try:
        return Path(m.file).resolve().parent == paths.materials_dir().resolve()
    except OSError:
        return False


def material_dict(m: Material) -> dict:
    d = {"id": m.id, "name": m.name, "category": m.category, "kind": m.kind,
         "values": {str(k): v for k, v in sorted(m.values.items())}, "source": m.source,
         "source_sentence": source_sentence(m), "notes": m.notes}
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
                   ["nrc", "saa_octave_estimate", "alpha_w", "absorption_class", "source",
                    "source_sentence"])
        for m in mats:
            r = m.ratings()
            w.writerow([m.id, m.name, m.category, m.kind] +
                       [m.values.get(b, "") for b in bands] +
                       ([r[0], r[1], r[2].label(), r[2].absorption_class] if r else
                        ["", "", "", ""]) + [m.source, source_sentence(m)])
        return buf.getvalue()
    md = form == "markdown"
    if md:
        lines = ["| id | name | kind | 125-4000 Hz | NRC | alpha_w (class) | where the values come from |",
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
                         f"{source_sentence(m)} |")
        else:
            lines += [f"{m.id}  [{m.category}]", f"    {m.name}",
                      f"    {m.bands_text}: {vals}", f"    {rating}",
                      wrap(f"values: {source_sentence(m)}", "    ", "      "), ""]
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


#: Catalogue categories listed first in the chooser for a surface on each face (our own
#: grouping of the catalogue's categories).
FACE_CATEGORIES = {"floor": ("floors", "carpets"), "ceiling": ("ceilings",)}


def preferred_categories(spec, coll: str, rec) -> tuple:
    """The categories to list first when choosing for ``rec``: by the face of the surface
    (or of the first surface a treatment covers); porous panels for a treatment on a wall."""
    if coll == "surfaces":
        return FACE_CATEGORIES.get(rec.face or "", ())
    if coll == "candidates" and rec.covers:
        names = rec.surface_names(spec)
        face = next((s.face for s in spec.surfaces if names and s.name == names[0]), None)
        return FACE_CATEGORIES.get(face or "", ("porous panels",))
    return ()
