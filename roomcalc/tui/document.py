"""The room being edited: its spec, where it is kept, undo and redo. No Textual here.

Every change goes through :meth:`Document.change`, which snapshots the spec first, so every edit
can be undone. Consecutive changes with the same ``merge`` key (typing in one field) make one
undo step.
"""

from __future__ import annotations

import copy
from dataclasses import dataclass, field, fields, is_dataclass
from pathlib import Path

from roomcalc.io.atomic import remove_stale_temporaries, write_text_atomic
from roomcalc.io.checks import read_text_file
from roomcalc.io.roomfile import (RoomSpec, ShapeSpec, SurfaceSpec, comments_lost,
                                  parse_spec_as_read, settle_as_read, spec_to_toml_keeping)
from roomcalc.study.edits import add_item
from roomcalc.tui.recovery import discard_recovery, write_recovery

COLLECTIONS = ("surfaces", "objects", "sources", "receivers", "candidates")
HISTORY_LIMIT = 500


@dataclass
class _Step:
    before: RoomSpec
    label: str
    merge: str | None


@dataclass
class Document:
    """A room spec, its file (or none), and its history."""

    spec: RoomSpec
    path: Path | None = None
    saved_text: str | None = None      # the text last read from or written to ``path``
    original_text: str | None = None   # the file's text as opened, kept while nothing changes
    undo_stack: list[_Step] = field(default_factory=list)
    redo_stack: list[_Step] = field(default_factory=list)
    demo: bool = False
    clean_text: str | None = None      # the generated text when last opened or saved
    _clean_spec: RoomSpec | None = field(default=None, repr=False, compare=False)

    def __post_init__(self):
        if self.saved_text is not None or self.demo:
            self.mark_clean()

    # ------------------------------------------------------------------ state
    @property
    def text(self) -> str:
        """The room file's text, made from the spec now, written over the file as opened so
        that the user's comments and layout stay (see roomcalc.io.roomfile.keep)."""
        return spec_to_toml_keeping(self.spec, self.original_text)

    def comments_lost(self) -> list[str]:
        """The comments of the file as opened that saving now would drop (those of deleted
        entries), for a confirmation before saving."""
        return comments_lost(self.spec, self.original_text)

    @property
    def modified(self) -> bool:
        """Changed since opened or last saved (undoing back to that state clears it)."""
        if self.clean_text is None:
            return bool(self.undo_stack) or self.path is None and not self.demo
        # The same data gives the same text; comparing the data is much quicker than writing it.
        return self.spec != self._clean_spec

    def mark_clean(self) -> None:
        self.clean_text = self.text
        self._clean_spec = clone(self.spec)

    @property
    def name(self) -> str:
        if self.demo:
            return "demo room"
        return self.path.name if self.path else "untitled"

    # ------------------------------------------------------------------ changes
    def change(self, fn, label: str, merge: str | None = None) -> None:
        """Apply ``fn(spec)`` with an undo step (merged with the last one if ``merge`` matches)."""
        before = clone(self.spec)
        fn(self.spec)
        settle_as_read(self.spec)       # an edited field's value stands, not the file's text
        if merge is not None and self.undo_stack and self.undo_stack[-1].merge == merge \
                and not self.redo_stack:
            pass  # the earlier snapshot already holds the state before this run of edits
        else:
            self.undo_stack.append(_Step(before, label, merge))
            del self.undo_stack[:-HISTORY_LIMIT]
        self.redo_stack.clear()

    def undo(self) -> str | None:
        if not self.undo_stack:
            return None
        step = self.undo_stack.pop()
        self.redo_stack.append(_Step(clone(self.spec), step.label, None))
        self.spec = step.before
        return step.label

    def redo(self) -> str | None:
        if not self.redo_stack:
            return None
        step = self.redo_stack.pop()
        self.undo_stack.append(_Step(clone(self.spec), step.label, None))
        self.spec = step.before
        return step.label

    def end_merge(self) -> None:
        """The next change starts a new undo step even if its merge key is the same."""
        if self.undo_stack:
            self.undo_stack[-1].merge = None

    # ------------------------------------------------------------------ collection edits
    def items(self, collection: str) -> list:
        return getattr(self.spec, collection)

    def add(self, collection: str, index: int | None = None) -> int:
        items = self.items(collection)
        at = len(items) if index is None else min(index + 1, len(items))
        # The core's rule: a row valid as it stands (and receivers placed by distances get
        # one to a new source).
        self.change(lambda spec: add_item(spec, collection, at), f"add {collection[:-1]}")
        return at

    def duplicate(self, collection: str, index: int) -> int:
        items = self.items(collection)
        item = copy.deepcopy(items[index])
        names = {x.name for x in items}
        base, k = item.name, 2
        while f"{base} ({k})" in names:
            k += 1
        item.name = f"{base} ({k})"
        self.change(lambda spec: getattr(spec, collection).insert(index + 1, item),
                    f"duplicate {collection[:-1]} '{base}'")
        return index + 1

    def delete(self, collection: str, index: int) -> None:
        name = self.items(collection)[index].name
        self.change(lambda spec: getattr(spec, collection).pop(index),
                    f"delete {collection[:-1]} '{name}'")

    def move(self, collection: str, index: int, delta: int) -> int:
        items = self.items(collection)
        to = index + delta
        if not (0 <= to < len(items)):
            return index

        def fn(spec):
            lst = getattr(spec, collection)
            lst.insert(to, lst.pop(index))
        self.change(fn, f"move {collection[:-1]} '{items[index].name}'")
        return to

    # ------------------------------------------------------------------ files
    def save(self, path: Path | None = None) -> Path:
        """Write atomically. Saving an opened file with no change writes its text unchanged."""
        target = Path(path) if path is not None else self.path
        if target is None:
            raise ValueError("no file name yet: use save as")
        if self.original_text is not None and not self.modified and target == self.path:
            text = self.original_text
        else:
            text = self.text
        write_text_atomic(target, text)
        if self.demo or target != self.path:
            discard_recovery(self.path)
        self.path, self.saved_text, self.demo = target, text, False
        self.mark_clean()
        discard_recovery(self.path)
        return target

    @classmethod
    def open(cls, path) -> "Document":
        """Read a room file, problems and all, to be fixed in the interface: what the spec
        cannot hold is kept as read (roomcalc.io.roomfile.asread) and the room's check
        reports it. Raises RoomFileError only for a file that cannot be read
        (roomcalc.io.checks.read_text_file) or is not TOML (roomcalc.io.checks.toml_error)."""
        path = Path(path)
        text = read_text_file(path)
        remove_stale_temporaries(path)       # left by a save that was killed half-way
        spec = parse_spec_as_read(text, str(path))
        return cls(spec=spec, path=path, saved_text=text, original_text=text)

    @classmethod
    def new_box(cls, length: float, width: float, height: float, units: str = "metric",
                path=None, title: str = "") -> "Document":
        """A new box room: six faces, plastered walls and ceiling, a concrete floor."""
        spec = RoomSpec(title=title or "New room", units=units,
                        shape=ShapeSpec(length=length, width=width, height=height))
        for face, mat in (("floor", "concrete-floor-painted"), ("ceiling", "plaster-on-masonry"),
                          ("front", "plaster-on-masonry"), ("back", "plaster-on-masonry"),
                          ("left", "plaster-on-masonry"), ("right", "plaster-on-masonry")):
            spec.surfaces.append(SurfaceSpec(name=face.capitalize(), face=face, material=mat))
        return cls(spec=spec, path=Path(path) if path else None)

    # ------------------------------------------------------------------ recovery
    def write_recovery(self, text: str | None = None) -> Path:
        """Keep unsaved changes beside the user's data, or in a fallback place (see
        roomcalc.tui.recovery); ``text``: the room's text, if already made. Returns where it
        went; raises OSError when no place takes it."""
        return write_recovery(self.path, self.text if text is None else text).path

    def text_later(self):
        """A callable that makes the room's text as it is now, safe to run on another thread
        while editing goes on: it reads a snapshot (a copy of the spec), not the live one."""
        snap = copy.copy(self)
        snap.spec = clone(self.spec)
        snap.undo_stack, snap.redo_stack = [], []
        return lambda: snap.text


def clone(obj):
    """A deep copy of a room spec (dataclasses, lists, dicts, numbers and strings), several
    times quicker than ``copy.deepcopy``: every edit keeps one for undo."""
    names = _FIELDS.get(type(obj))
    if names is None and is_dataclass(obj) and not isinstance(obj, type):
        if obj.__dataclass_params__.frozen:
            return obj          # never changed (a room's own material): shared, not copied
        names = _FIELDS[type(obj)] = tuple(f.name for f in fields(obj))
    if names is not None:
        new = object.__new__(type(obj))
        new.__dict__.update(obj.__dict__)
        for name in names:
            v = getattr(obj, name)
            if isinstance(v, (list, dict)) or type(v) in _FIELDS or is_dataclass(v):
                setattr(new, name, clone(v))
        return new
    if isinstance(obj, list):
        return [x if isinstance(x, (str, int, float)) else clone(x) for x in obj]
    if isinstance(obj, dict):
        return {k: v if isinstance(v, (str, int, float)) else clone(v) for k, v in obj.items()}
    return obj


_FIELDS: dict[type, tuple[str, ...]] = {}
