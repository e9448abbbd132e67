"""The columns of the five record tables (surfaces, objects, sources, treatments, receivers)
and the text of their computed cells and of the line under each table.

``RecordColumns`` holds what that text needs: the catalogue, a getter of the room as it is
now, and the last result shown (the areas that fill the rest of a face, the receivers'
levels). The screen keeps ``result`` and ``stale`` up to date and hands ``of(collection)``
and ``describe`` to its tables; nothing here draws or computes acoustics.
"""

from __future__ import annotations

from typing import Callable

from roomcalc.engine.analysis import RoomResult
from roomcalc.engine.field import PLACEMENT_Q
from roomcalc.engine.model import FACES
from roomcalc.io.catalog import Catalog
from roomcalc.io.roomfile import RoomSpec
from roomcalc.io.sources import spectrum_names
from roomcalc.present.glossary import named
from roomcalc.tui.widgets.record_table import Column


class RecordColumns:
    """Column schemas and cell text for the record tables of one room being edited."""

    def __init__(self, catalog: Catalog, spec: Callable[[], RoomSpec]) -> None:
        self.catalog = catalog
        self.spec = spec                        # the room as it is now (the document's spec)
        self.result: RoomResult | None = None   # the last valid result shown
        self.stale = False                      # the room has problems: result is older
        self._surface_index: dict[int, int] = {}     # id(surface spec) -> its row
        self._catalog_values: dict[tuple, str] = {}  # (material id, bands) -> its alphas

    def index_surfaces(self, items: list) -> None:
        """Remember each surface's row, to find its computed area in the result."""
        self._surface_index = {id(rec): i for i, rec in enumerate(items)}

    # ------------------------------------------------------------------ schemas
    def of(self, coll: str) -> list[Column]:
        """The columns of one collection's table."""
        spec = self.spec()
        nb = len(spec.bands)
        if coll == "surfaces":
            return [Column("name", "Name", optional=False),
                    Column("face", "Face", "choice", choices=FACES, hint=", ".join(FACES)),
                    Column("area", "Area", "number", show=self.show_area, width=8,
                           hint="empty: the rest of its face"),
                    Column("count", "n", "int", optional=False, hint="identical surfaces"),
                    Column("material", "Material", "material", show=self.show_material),
                    Column("alpha", "alpha per band", "numbers", length=nb,
                           show=self.show_alpha, hint="one per band; typing here drops the "
                           "material")]
        if coll == "objects":
            return [Column("name", "Name", optional=False),
                    Column("count", "Count", "number", optional=False),
                    Column("material", "Kind", "material", show=self.show_material),
                    Column("absorption", "m^2 per unit, per band", "numbers", length=nb,
                           show=self.show_absorption)]
        if coll == "sources":
            # The level a user knows first (at 1 m, or the sound power in dB(A)), the band
            # powers last: they are the longest and most often empty.
            return [Column("name", "Name", optional=False),
                    Column("level_dba_1m", "level at 1 m [dB(A)]", "number",
                           hint="A-weighted level of the direct sound 1 m in front, where it "
                           "stands (its Q counts); m: a typical source"),
                    Column("sound_power_dba", f"{named('LwA')} [dB(A)]", "number"),
                    Column("spectrum", "Spectrum", "choice", choices=spectrum_names(),
                           hint=", ".join(spectrum_names())),
                    Column("directivity", named("Q"), "number", show=self.show_q,
                           hint="1 free, 2 on a surface, 4 at an edge, 8 in a corner"),
                    Column("placement", "Placement", "choice", choices=tuple(PLACEMENT_Q),
                           hint="free, surface, edge, corner"),
                    Column("position", "Position x y z", "position"),
                    Column("sound_power", f"{named('Lw')} per band [dB]", "numbers", length=nb)]
        if coll == "candidates":
            return self._candidates(spec, nb)
        return [Column("name", "Name", optional=False),
                Column("position", "Position x y z", "position"),
                Column("distances", "Distances to sources", "distances",
                       hint="Source=3.2, Other=5"),
                Column("hours", "Hours/day", "number",
                       hint="working pattern: hours per day here (for daily exposure)"),
                Column("source_hours", "Source hours", "distances",
                       hint="hours each source runs meanwhile: Saw=2, Planer=1")]

    def _candidates(self, spec: RoomSpec, nb: int) -> list[Column]:
        u = spec.unit_system
        area = u.area_label
        # What, where, of what, and its price first (they stay in view); the limits, panel
        # size, the yes/no columns and the values per band after them.
        return [Column("name", "Name", optional=False),
                Column("surface", "Covers surface", "names",
                       hint="a surface's name, or several separated by ;  empty: added as "
                       "units"),
                Column("material", "Material", "material", show=self.show_material),
                Column("cost_per_m2" if spec.units == "metric" else "cost_per_ft2",
                       f"Cost per {area}", "number"),
                Column("cost_each", "Cost each", "number"),
                Column("max_area", f"Up to [{area}]", "number",
                       hint="cover: empty = the whole surface (all of them)"),
                Column("max_count", "Up to [units]", "number", hint="units"),
                Column("panel", f"Panel w h [{u.length_label}]", "numbers", length=2,
                       hint="cover: one panel's width and height, e.g. 1.2 0.6"),
                Column("step", f"Panel [{area}]", "number",
                       hint="cover: whole panels of this area, e.g. 0.72"),
                Column("walls", "All walls", "flag",
                       hint="yes: covers every surface on a wall face (instead of a surface)"),
                Column("applied", "Applied", "flag",
                       hint="yes: built into the room already, the plan leaves it out; "
                       "no: plan it again"),
                Column("alpha", "alpha (cover)", "numbers", length=nb,
                       show=lambda r: self.show_alpha(r) if r.covers else "",
                       hint="one per band; typing here drops the material"),
                Column("absorption", f"{area} per unit", "numbers", length=nb,
                       show=lambda r: "" if r.covers else self.show_absorption(r),
                       hint="units: absorption area per unit")]

    # ------------------------------------------------------------------ cells
    def show_material(self, rec) -> str:
        if rec.material:
            return rec.material
        return "(own values)" if (getattr(rec, "alpha", None) or
                                  getattr(rec, "absorption", None)) else ""

    def values_of(self, rec, own) -> str:
        """The per-band values of a row: its material's (from the catalogue or the room's own
        materials), else its own."""
        spec = self.spec()
        bands = spec.bands
        if rec.material:
            key = (rec.material, bands)
            text = self._catalog_values.get(key)
            if text is not None:
                return text
            m = self.catalog.get(rec.material)
            if m is None:
                m = next((x for x in spec.materials if x.id == rec.material), None)
            if m is None:
                return "unknown material"
            text = " ".join(f"{m.values[b]:.2f}" if b in m.values else "?" for b in bands)
            if self.catalog.get(rec.material) is m:       # the catalogue does not change
                self._catalog_values[key] = text
            return text
        return " ".join(f"{x:.2f}" for x in own) if own else ""

    def show_alpha(self, rec) -> str:
        return self.values_of(rec, rec.alpha)

    def show_absorption(self, rec) -> str:
        return self.values_of(rec, rec.absorption)

    def show_q(self, rec) -> str:
        if rec.directivity is not None:
            return f"{rec.directivity:g}"
        return f"({PLACEMENT_Q[rec.placement or 'surface']:g})"

    def show_area(self, rec) -> str:
        if rec.area is not None:
            return f"{rec.area:g}"
        res = self.result
        i = self._surface_index.get(id(rec))
        if res is not None and not self.stale and i is not None and i < len(res.room.surfaces):
            return f"({res.room.surfaces[i].area / self.spec().unit_system.area:.2f})"
        return "(rest)"

    # ------------------------------------------------------------------ the line under a table
    def describe(self, coll: str, rec) -> str:
        """One line about the highlighted row, under its table."""
        u = self.spec().unit_system
        if coll in ("surfaces", "objects"):
            own = rec.alpha if coll == "surfaces" else rec.absorption
            what = "alpha" if coll == "surfaces" else f"{u.area_label} per unit"
            if rec.material:
                m = self.catalog.get(rec.material)
                name = m.name if m else "not in the catalogue"
                return f"{rec.name}: {name}; {what} {self.values_of(rec, own)}"
            return f"{rec.name}: own values; {what} {self.values_of(rec, own)}"
        if coll == "candidates":
            if rec.covers:
                names = rec.surface_names(self.spec())
                where = ("every wall" if rec.walls else
                         ", ".join(f"'{n}'" for n in names))
                what = (f"covers up to {rec.max_area:g} {u.area_label} of {where}"
                        if rec.max_area is not None else f"may cover all of {where}")
                if len(names) > 1:
                    what += " (spread in proportion to their areas)"
                values = f"alpha {self.values_of(rec, rec.alpha)}"
            else:
                what = ("added as units" + (f", up to {rec.max_count:g}"
                                            if rec.max_count is not None else ""))
                values = f"{u.area_label} per unit {self.values_of(rec, rec.absorption)}"
            applied = "; applied to the room already (the plan leaves it out)" \
                if rec.applied else ""
            return f"{rec.name}: {what}; {values}{applied}"
        if coll == "sources":
            if rec.sound_power:
                lw = named("Lw") + " " + " ".join(f"{x:g}" for x in rec.sound_power)
            elif rec.level_dba_1m is not None:
                lw = f"{rec.level_dba_1m:g} dB(A) at 1 m, {rec.spectrum} spectrum"
            else:
                lw = f"{named('LwA')} {rec.sound_power_dba} dB(A), {rec.spectrum} spectrum"
            return (f"{rec.name}: {lw}; "
                    f"{named('Q')} {self.show_q(rec).strip('()')}")
        res = self.result
        if res is not None:
            r = next((x for x in res.receivers if x.name == rec.name), None)
            if r is not None:
                return f"{rec.name}: {r.level_dba:.1f} dB(A) (direct {r.direct_dba:.1f}, " \
                       f"reverberant {r.reverberant_dba:.1f})"
        return rec.name
