"""Where a problem is, in the words of the screen it is shown on.

Files name an entry by its place in its array, counted from 0 (``candidates[1].cost_per_m2``),
as TOML tools do; the interface numbers its table rows from 1 and shows their names, and its
tabs have their own titles (the candidates are "Treatments"). :func:`place_on_screen` turns
the one into the other: ``Treatments row 2 "Wall panel", cost_per_m2``.
"""

from __future__ import annotations

import re

__all__ = ["TABLE_TITLES", "place_on_screen", "problem_on_screen"]

#: The title of each array of tables where the interface shows it.
TABLE_TITLES = {"surfaces": "Surfaces", "objects": "Objects", "sources": "Sources",
                "receivers": "Receivers", "candidates": "Treatments", "materials": "Materials"}
_ROW = re.compile(r"(%s)\[(\d+)\](?:\.(.+))?\Z" % "|".join(TABLE_TITLES))


def place_on_screen(where: str, spec) -> str:
    """``surfaces[4].area`` -> ``Surfaces row 5 "Window", area`` (the row's name from
    ``spec`` when it has one); any other place is returned as it is."""
    m = _ROW.match(where)
    if m is None:
        return where
    table, i, rest = m.group(1), int(m.group(2)), m.group(3)
    items = getattr(spec, table, None) or []
    name = ""
    if i < len(items):
        name = getattr(items[i], "name", "") or getattr(items[i], "id", "") or ""
    label = f"{TABLE_TITLES[table]} row {i + 1}" + (f' "{name}"' if name else "")
    return f"{label}, {rest}" if rest else label


def problem_on_screen(problem, spec) -> str:
    """A problem's place and message, the place as :func:`place_on_screen` gives it."""
    if not problem.where:
        return problem.message
    return f"{place_on_screen(problem.where, spec)}: {problem.message}"
