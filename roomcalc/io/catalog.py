"""The material catalogue: built-in TOML files, user files, and a room's inline materials."""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from roomcalc.engine.bands import ALLOWED_BANDS_HZ, DEFAULT_BANDS_HZ
from roomcalc.engine.ratings import WeightedAlpha, nrc, saa_octave_estimate, weighted_alpha
from roomcalc.io import paths
from roomcalc.io.checks import Checker, kind_of, nearest, read_toml_file, toml_files
from roomcalc.io.errors import Problem, RoomFileError
from roomcalc.io.limits import ALPHA_MAX, RANGES

ID_PATTERN = re.compile(r"^[a-z0-9]+(-[a-z0-9]+)*$")
KINDS = ("surface", "object")
CATEGORIES = ("hard surfaces", "floors", "ceilings", "glazing and doors", "porous panels",
              "foams", "curtains", "carpets", "seats and people", "low-frequency absorbers",
              "furniture", "user")
ENTRY_KEYS = ("id", "name", "category", "kind", "values", "source", "notes", "occupant",
              "unoccupied")


@dataclass(frozen=True)
class Material:
    """A catalogue entry. ``values`` maps band [Hz] to alpha (surface) or m^2 per unit (object).

    ``occupant``: the entry is, or includes, people; ``unoccupied``: the id of the entry of the
    same kind that remains when they leave (required for a surface; for an object None means
    the object leaves with its people).
    """

    id: str
    name: str
    category: str
    kind: str
    values: dict[int, float]
    source: str
    notes: str = ""
    file: str = ""
    occupant: bool = False
    unoccupied: str | None = None

    def values_for(self, bands_hz) -> np.ndarray:
        """Values at the given bands; KeyError lists the bands this entry lacks."""
        missing = [b for b in bands_hz if b not in self.values]
        if missing:
            raise KeyError(missing)
        return np.array([self.values[b] for b in bands_hz], dtype=float)

    @property
    def bands_text(self) -> str:
        b = sorted(self.values)
        return f"{b[0]}-{b[-1]} Hz"

    def ratings(self) -> tuple[float, float, WeightedAlpha] | None:
        """(NRC, SAA octave estimate, alpha_w) for a surface material; None for objects."""
        if self.kind != "surface":
            return None
        bands = list(DEFAULT_BANDS_HZ)
        a = self.values_for(bands)
        return float(nrc(bands, a)), float(saa_octave_estimate(bands, a)), \
            weighted_alpha(bands, a)


@dataclass
class Catalog:
    """Materials by id."""

    materials: dict[str, Material] = field(default_factory=dict)

    def __contains__(self, mid: str) -> bool:
        return mid in self.materials

    def __getitem__(self, mid: str) -> Material:
        return self.materials[mid]

    def __len__(self) -> int:
        return len(self.materials)

    def get(self, mid: str):
        return self.materials.get(mid)

    def ids(self, kind: str | None = None) -> list[str]:
        return [m.id for m in self.materials.values() if kind is None or m.kind == kind]

    def with_materials(self, extra: list[Material]) -> "Catalog":
        """A copy with more materials; an id already present is an error naming both files."""
        merged = dict(self.materials)
        problems = []
        for m in extra:
            if m.id in merged:
                problems.append(Problem(m.file, f"materials id '{m.id}'",
                                        f"is already defined in {merged[m.id].file}"))
            else:
                merged[m.id] = m
        if problems:
            raise RoomFileError(problems)
        return Catalog(merged)

    def search(self, words: str = "", category: str | None = None,
               kind: str | None = None, prefer: tuple = ()) -> list[Material]:
        """Materials whose id, name, category or notes contain every word (any case), a word
        people use for a thing the catalogue names otherwise also finding it
        (:data:`EVERYDAY_WORDS`: "drywall" finds gypsum board, "bass trap" the corner traps).
        Those named by the words come first; then, among equals, the ``prefer`` categories
        (a ceiling's chooser lists ceilings before carpets)."""
        terms = search_terms(words)
        out = []
        for m in self.materials.values():
            if category and category.lower() not in m.category.lower():
                continue
            if kind and m.kind != kind:
                continue
            hay = f"{m.id} {m.name} {m.category} {m.notes}".lower()
            if all(any(t in hay for t in alternatives) for alternatives in terms):
                out.append((self._rank(m, terms), m))
        # Those whose name holds the words first (Enter picks the first row: "wood" should
        # give a wood material, not a rug whose notes mention a wooden floor).
        return [m for _r, m in sorted(out, key=lambda rm: (rm[0], rm[1].category not in prefer,
                                                            rm[1].category, rm[1].name))]

    @staticmethod
    def _rank(m: Material, terms) -> int:
        """0: every word in the name; 1: in the name, id or category; 2: only in the notes."""
        for rank, hay in enumerate((m.name.lower(), f"{m.id} {m.name} {m.category}".lower())):
            if all(any(t in hay for t in alternatives) for alternatives in terms):
                return rank
        return 2

    def suggest_categories(self, words: str = "") -> list[str]:
        """Categories to try when a search finds nothing: those of the materials holding a
        word near one of the words (a misspelling: "woool" -> wool), or whose name is near
        one; else every category."""
        import difflib

        cats = self.categories()
        vocabulary: dict[str, set[str]] = {}
        for m in self.materials.values():
            for w in re.findall(r"[a-z]+", f"{m.id} {m.name} {m.category}".lower()):
                vocabulary.setdefault(w, set()).add(m.category)
        near: set[str] = set()
        for w in words.lower().split():
            for close in difflib.get_close_matches(w, list(vocabulary), n=3, cutoff=0.75):
                near |= vocabulary[close]
        return [c for c in cats if c in near] or cats

    def categories(self) -> list[str]:
        return sorted({m.category for m in self.materials.values()})


#: Words people use for things the catalogue calls otherwise: each finds the terms after it in
#: a material's id, name, category or notes. Our own list, from everyday and trade usage
#: (common practice; British and American spellings both).
EVERYDAY_WORDS: dict[str, tuple[str, ...]] = {
    "drywall": ("gypsum", "plasterboard"), "plasterboard": ("gypsum", "plasterboard"),
    "gypsum": ("gypsum", "plasterboard"), "sheetrock": ("gypsum", "plasterboard"),
    "wallboard": ("gypsum", "plasterboard"),
    "window": ("window", "glass", "glazing"), "glazing": ("window", "glass", "glazing"),
    "glass": ("window", "glass", "glazing"),
    "rockwool": ("mineral wool", "mineral-wool"), "stonewool": ("mineral wool", "mineral-wool"),
    "fiberglass": ("glass fibre", "glass-fibre"), "fibreglass": ("glass fibre", "glass-fibre"),
    "fiber": ("fibre",),
    "baffle": ("porous panel", "suspended"), "cloud": ("porous panel", "suspended"),
    "hanging panel": ("porous panel", "suspended", "hung"),
    "acoustic panel": ("porous panel",),
    "bass trap": ("corner trap", "corner-trap", "low-frequency"),
    "trap": ("corner trap", "corner-trap", "low-frequency"),
    "drape": ("curtain", "velour", "drape"), "drapes": ("curtain", "velour", "drape"),
    "rug": ("rug", "carpet"), "couch": ("sofa",), "settee": ("sofa",),
    "audience": ("audience", "person", "people"), "people": ("audience", "person", "people"),
    "chair": ("seat", "chair"), "chairs": ("seat", "chair"),
}


def search_terms(words: str) -> list[tuple[str, ...]]:
    """The words of a search, each with the terms that satisfy it (itself, and those of
    :data:`EVERYDAY_WORDS`; two-word entries such as "bass trap" are taken together)."""
    tokens = words.lower().split()
    out: list[tuple[str, ...]] = []
    i = 0
    while i < len(tokens):
        pair = " ".join(tokens[i:i + 2])
        if i + 1 < len(tokens) and pair in EVERYDAY_WORDS:
            out.append((pair,) + EVERYDAY_WORDS[pair])
            i += 2
            continue
        t = tokens[i]
        out.append((t,) + EVERYDAY_WORDS.get(t, ()))
        i += 1
    return out


def parse_entries(entries: list, chk: Checker, where: str = "materials",
                  allow_user_category=True) -> list[Material]:
    """Check catalogue-format entries (catalogue files and a room's inline [[materials]])."""
    out = []
    for i, e in enumerate(entries):
        w = f"{where}[{i}]"
        before = len(chk.problems)
        chk.keys(e, w, ENTRY_KEYS)
        mid = chk.text(e, "id", w, required=True, nonempty=True)
        if mid is not None and not ID_PATTERN.match(mid):
            chk.add(f"{w}.id", f"'{mid}' must be lowercase words joined by hyphens "
                    "(letters a-z, digits), e.g. 'mineral-wool-50mm'")
        name = chk.text(e, "name", w, required=True, nonempty=True)
        cats = CATEGORIES if allow_user_category else CATEGORIES[:-1]
        cat = chk.text(e, "category", w, default="user", choices=cats)
        kind = chk.text(e, "kind", w, required=True, choices=KINDS)
        source = chk.text(e, "source", w, required=True, nonempty=True)
        notes = chk.text(e, "notes", w, default="")
        vals = e.get("values")
        values: dict[int, float] = {}
        if vals is None:
            chk.add(f"{w}.values", "is required: a table of band (Hz) = value, 125 to 4000 Hz")
        elif not isinstance(vals, dict):
            chk.add(f"{w}.values", "must be a table such as { 125 = 0.10, 250 = 0.20, ... }")
        else:
            high = ALPHA_MAX if kind == "surface" else RANGES["absorption"].high
            for k, x in vals.items():
                try:
                    band = int(k)
                except ValueError:
                    band = None
                if band not in ALLOWED_BANDS_HZ:
                    chk.add(f"{w}.values.{k}", f"'{k}' is not a band; allowed: "
                            f"{', '.join(map(str, ALLOWED_BANDS_HZ))} Hz")
                    continue
                y = chk.value(x, f"{w}.values.{k}", low=0.0, high=high,
                              unit="(alpha)" if kind == "surface" else "m^2")
                if y is not None:
                    values[band] = float(y)
            missing = [b for b in DEFAULT_BANDS_HZ if str(b) not in vals]
            if missing:
                chk.add(f"{w}.values", f"missing bands {', '.join(map(str, missing))} Hz "
                        "(125 to 4000 Hz are required)")
        occupant, unoccupied = _occupancy(e, w, chk, mid, kind)
        if len(chk.problems) == before:
            out.append(Material(mid, name, cat, kind, values, source, notes, chk.filename,
                                occupant=occupant, unoccupied=unoccupied))
    return out


def _occupancy(e: dict, w: str, chk: Checker, mid: str | None, kind: str | None):
    """An entry's ``occupant`` and ``unoccupied`` as far as one entry can check them (the
    counterpart itself: :func:`counterpart_problems`)."""
    occupant = e.get("occupant", False)
    if not isinstance(occupant, bool):
        chk.add(f"{w}.occupant", f"must be true or false, not {kind_of(occupant)}")
        occupant = False
    unoccupied = chk.text(e, "unoccupied", w, nonempty=True)
    if unoccupied is not None and e.get("occupant") is not True:
        chk.add(f"{w}.unoccupied", "only goes with occupant = true (the entry is, or includes, "
                "people; unoccupied names what remains when they leave)")
    elif unoccupied is not None and unoccupied == mid:
        chk.add(f"{w}.unoccupied", f"'{unoccupied}' is this entry; name the entry that remains "
                "when the people leave")
    elif occupant and kind == "surface" and "unoccupied" not in e:
        chk.add(f"{w}.unoccupied", "is required with occupant = true for a surface (a surface "
                "stays when its people leave): the id of the surface entry that remains, such "
                "as the empty seating")
    return occupant, unoccupied


def counterpart_problems(materials: dict, entries) -> list[tuple[Material, str]]:
    """Problems of the ``unoccupied`` counterparts of ``entries``, looked up in ``materials``
    (id -> Material): unknown, of another kind, or people themselves (no chains). Returns
    (entry, message) pairs for the caller to place."""
    out = []
    for m in entries:
        if m.unoccupied is None:
            continue
        other = materials.get(m.unoccupied)
        if other is None:
            near = nearest(m.unoccupied, [k for k, x in materials.items() if x.kind == m.kind])
            out.append((m, f"unknown entry '{m.unoccupied}'"
                        + (f"; did you mean '{near}'?" if near else "")))
        elif other.kind != m.kind:
            out.append((m, f"'{other.id}' is of kind {other.kind}; the entry that remains when "
                        f"the people leave is of the same kind as this one ({m.kind})"))
        elif other.occupant:
            out.append((m, f"'{other.id}' is marked occupant itself; name an entry without "
                        "people (no chains)"))
    return out


def load_catalog_file(path) -> list[Material]:
    """Read one catalogue file; raises RoomFileError with every problem in it."""
    path = Path(path)
    data = read_toml_file(path)
    chk = Checker(str(path))
    chk.keys(data, "", ("materials",))
    mats = parse_entries(chk.array_of_tables(data, "materials"), chk)
    if chk.problems:
        raise RoomFileError(chk.problems)
    return mats


def load_catalog(extra=(), include_user: bool = True) -> Catalog:
    """The built-in catalogue, plus the user's folder and any extra files or folders.

    Every problem in every file is collected; a duplicate id is an error naming both files.
    """
    folders = [paths.materials_dir()] + ([paths.user_catalog_dir()] if include_user else [])
    files = toml_files(folders, extra, "catalogue file")
    problems: list[Problem] = []
    cat = Catalog()
    for f in files:
        try:
            mats = load_catalog_file(f)
        except RoomFileError as exc:
            problems.extend(exc.problems)
            continue
        try:
            cat = cat.with_materials(mats)
        except RoomFileError as exc:
            problems.extend(exc.problems)
    problems += [Problem(m.file, f"materials id '{m.id}': unoccupied", msg)
                 for m, msg in counterpart_problems(cat.materials, cat.materials.values())]
    if problems:
        raise RoomFileError(problems)
    return cat
