"""The main screen's edits from its tables and the room form: a typed value, a row added,
copied, deleted or moved, a material chosen; and undo and redo. Each becomes one change of the
document (so it
can be undone) by way of the core's edit rules (``roomcalc.study.edits``).

A part of ``MainScreen`` (a mixin): the screen applies the change and shows the result."""

from __future__ import annotations

from textual.widgets import TabbedContent

from roomcalc.present.materials import preferred_categories
from roomcalc.present.places import TABLE_TITLES, place_on_screen
from roomcalc.study.edits import change_bands, convert_units, set_item_fields, set_method
from roomcalc.tui.messages import FieldEdited, MaterialWanted, RowAction
from roomcalc.tui.widgets.record_table import RecordTable
from roomcalc.tui.widgets.room_form import Unparsed


#: The tables whose rows have a material (``m`` opens the chooser for them).
MATERIAL_TABLES = ("surfaces", "objects", "candidates")


class EditRoutes:
    """MainScreen's handlers of the edit messages, and undo and redo (it needs the screen's
    document, catalogue, ``apply``, ``after_change`` and ``recompute``)."""

    def on_field_edited(self, msg: FieldEdited) -> None:
        msg.stop()
        if msg.collection == "room":
            self._edit_room(msg.key, msg.value)
            return
        coll, i = msg.collection, msg.index
        name = self.document.items(coll)[i].name
        verb = "rename" if msg.key == "name" else f"{coll[:-1]} '{name}': {msg.key}"
        self.apply(lambda spec: set_item_fields(spec, coll, i, {msg.key: msg.value}), verb
                   if msg.key != "name" else f"rename {coll[:-1]} '{name}'")

    def _edit_room(self, key: str, value) -> None:
        unparsed = self._unparsed
        if isinstance(value, Unparsed):
            unparsed[key] = str(value)
            self.recompute()
            return
        unparsed.pop(key, None)
        if key == "title":
            self.apply(lambda spec: setattr(spec, "title", value), "title", merge="title")
            return
        if key == "units":
            if value != self.document.spec.units:
                self._needs_form_refresh = True
                self.apply(lambda spec: convert_units(spec, value), f"units: {value}")
            return
        if key == "method":
            self.apply(lambda spec: set_method(spec, value), f"formula: {value or 'recommended'}")
            return
        if key == "bands_hz":
            notes: list[str] = []
            self.apply(lambda spec: notes.extend(change_bands(spec, value, self.catalog)),
                       "bands")
            if notes:
                self.notify("\n".join(notes), title="Bands changed", markup=False,
                            timeout=12)
            return
        group, name = key.split(".")
        if getattr(getattr(self.document.spec, group), name) == value:
            self.recompute()
            return
        self.apply(lambda spec: setattr(getattr(spec, group), name, value), f"{key}",
                   merge=key)

    def on_row_action(self, msg: RowAction) -> None:
        msg.stop()
        coll, act, i = msg.collection, msg.action, msg.index
        doc = self.document
        table = self.query_one(f"#t-{coll}", RecordTable)
        if act == "add":
            at = doc.add(coll, i)
        elif i is None:
            return
        elif act == "duplicate":
            at = doc.duplicate(coll, i)
        elif act == "delete":
            doc.delete(coll, i)
            at = max(0, i - 1)
        elif act in ("up", "down"):
            at = doc.move(coll, i, -1 if act == "up" else 1)
        else:
            return
        self.after_change()
        table.select_row(at)

    def on_material_wanted(self, msg: MaterialWanted) -> None:
        msg.stop()
        self._choose_material(msg.collection, msg.index)

    def action_material(self) -> None:
        """``m``: choose the material of the highlighted row of the table shown on the left
        (Surfaces, Objects or Treatments), or a typical source (Sources); the chooser names
        the row it will change."""
        tab = self.query_one("#edit", TabbedContent).active
        if tab == "sources":
            i = self.query_one("#t-sources", RecordTable).current_row
            if i is None:
                self.notify("Sources has no rows yet: a adds one.", timeout=6)
            else:
                self._choose_source(i)
            return
        if tab not in MATERIAL_TABLES:
            self.notify("m chooses the material of a row of Surfaces, Objects or Treatments, "
                        "or a typical source on Sources: show one of those tables first.",
                        timeout=6)
            return
        i = self.query_one(f"#t-{tab}", RecordTable).current_row
        if i is None:
            self.notify(f"{TABLE_TITLES[tab]} has no rows yet: a adds one.", timeout=6)
            return
        self._choose_material(tab, i)

    def _choose_source(self, i: int) -> None:
        """The typical sources, for row ``i`` of the Sources table."""
        from roomcalc.io.sources import typical_sources
        from roomcalc.present.places import place_on_screen
        from roomcalc.study.edits import use_typical_source
        from roomcalc.tui.screens.sources import SourceChooser

        known = typical_sources()
        rec = self.document.items("sources")[i]

        def done(choice) -> None:
            if choice is not None:
                self.apply(lambda spec: use_typical_source(spec, i, known[choice]),
                           f"source '{rec.name}': {known[choice].name}")
        self.app.push_screen(SourceChooser(list(known.values()), self.document.spec.bands,
                                           place_on_screen(f"sources[{i}]",
                                                           self.document.spec)), done)

    def _choose_material(self, coll: str, i: int) -> None:
        from roomcalc.tui.screens.materials import MaterialChooser

        rec = self.document.items(coll)[i]
        surface_like = coll == "surfaces" or (coll == "candidates" and rec.covers)
        kind = "surface" if surface_like else "object"
        own = rec.alpha if surface_like else rec.absorption
        cat = self.catalog.with_materials(self.document.spec.materials) \
            if self.document.spec.materials else self.catalog

        def done(choice) -> None:
            if choice is None:
                return
            what, val = choice
            own_key = "alpha" if surface_like else "absorption"
            if what == "material":
                values = {"material": val, own_key: None}
            else:
                values = {"material": None, own_key: val}

            def fn(spec):
                item = getattr(spec, coll)[i]
                for k, v in values.items():
                    setattr(item, k, v)
            self.apply(fn, f"{coll[:-1]} '{rec.name}': material")
        row = place_on_screen(f"{coll}[{i}]", self.document.spec)
        self.app.push_screen(MaterialChooser(cat, kind, self.document.spec.bands, rec.material,
                                             own, changes=row,
                                             prefer=preferred_categories(self.document.spec,
                                                                         coll, rec)), done)

    # ------------------------------------------------------------------ undo and redo
    def action_undo(self) -> None:
        label = self.document.undo()
        self._say(f"Undone: {label}" if label else "Nothing to undo.")
        self._after_history()

    def action_redo(self) -> None:
        label = self.document.redo()
        self._say(f"Redone: {label}" if label else "Nothing to redo.")
        self._after_history()

    def _after_history(self) -> None:
        self._refresh_all()
        self.recompute()
        self.app.schedule_recovery()
