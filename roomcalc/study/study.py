"""One room being studied: the core that both front ends call.

A :class:`Study` holds a room spec as written (file units, material ids), the catalogue and
criteria it is read against, and the user's choices (formula, reverberant model). It answers
the questions every output asks, the same way for the command line, the terminal interface and
every report format:

- :meth:`Study.check` -- the spec checked exactly as a file is (same messages), resolved to SI;
- :meth:`Study.answer` -- the evaluated room by the formula in force, its target check at the
  criterion's occupancy, and the workers' daily exposure;
- :meth:`Study.plan` -- the treatment plan, by the same formula, and the treated room;
- :meth:`Study.compare` -- before and after, both by the before room's formula in force.

The formula in force is the one the user chose (``method`` here, e.g. ``report --method``),
else the one the file names (top-level ``method`` or ``[target] method``), else the engine's
recommendation for the room as described. Everything else uses it.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from roomcalc.engine.analysis import Comparison, RoomResult, compare, evaluate
from roomcalc.engine.model import Room
from roomcalc.io.catalog import Catalog
from roomcalc.io.errors import Problem, RoomFileError
from roomcalc.io.roomfile import RoomSpec, check_room, read_room
from roomcalc.study.assessment import (PlanRun, TargetCheck, exposures, make_plan,
                                       target_check)

if TYPE_CHECKING:
    from roomcalc.engine.exposure import ExposureSummary

__all__ = ["Answer", "Study"]


@dataclass(frozen=True, eq=False)
class Answer:
    """What one room does, as every output shows it."""

    spec: RoomSpec
    room: Room
    result: RoomResult
    target: TargetCheck | None
    exposures: dict[str, ExposureSummary]

    @property
    def method(self) -> str:
        """The formula in force."""
        return self.result.method


class Study:
    """One room being studied (see the module's description)."""

    def __init__(self, spec: RoomSpec, catalog: Catalog, *, criteria: dict | None = None,
                 filename: str = "<room>", method: str | None = None,
                 reverberant_model: str = "classic") -> None:
        self.spec = spec
        self.catalog = catalog
        self.filename = filename
        self.method = method
        self.reverberant_model = reverberant_model
        self._criteria = criteria
        self._room: Room | None = None          # the room of the spec as last checked

    @classmethod
    def from_file(cls, path, catalog: Catalog, **kwargs) -> "Study":
        """Read and check a room file (RoomFileError with every problem found)."""
        spec, room = read_room(path, catalog, kwargs.get("criteria"))
        study = cls(spec, catalog, filename=str(path), **kwargs)
        study._room = room
        return study

    # ------------------------------------------------------------------ inputs
    @property
    def criteria(self) -> dict:
        """The criteria library (read when first needed; RoomFileError if it is broken)."""
        if self._criteria is None:
            from roomcalc.io.criteria import load_criteria

            self._criteria = load_criteria()
        return self._criteria

    @property
    def method_choice(self) -> str | None:
        """The formula chosen by the user or the file; None: the recommendation."""
        return self.method or self.spec.method_in_force

    def check(self) -> Room:
        """The spec checked as a file would be, resolved to SI (RoomFileError otherwise)."""
        self._room = check_room(self.spec, self.catalog, self.filename,
                                self._criteria if self.spec.target else None)
        return self._room

    @property
    def room(self) -> Room:
        return self._room if self._room is not None else self.check()

    # ------------------------------------------------------------------ answers
    def evaluate(self, room: Room | None = None, *, method: str | None = None) -> RoomResult:
        """The room (default: this study's) by every formula, the one in force marked
        (``method``: another formula to put in force, e.g. the one of a "before" room)."""
        room = self.room if room is None else room
        chosen = method or self.method_choice
        try:
            return evaluate(room, reverberant_model=self.reverberant_model, method=chosen)
        except ValueError:
            if chosen is None or method or self.method:
                raise
            # The file names a formula this room cannot use: a problem of that field.
            why = evaluate(room, reverberant_model=self.reverberant_model).unavailable.get(chosen)
            if why is None:
                raise
            field = "method" if self.spec.method else "target.method"
            raise RoomFileError([Problem(self.filename, field, (
                f"'{chosen}' cannot be used for this room: {why}; give the room as a box "
                "(shape) with a face on every surface, or choose another formula"))]) from None

    def answer(self, room: Room | None = None, *, result: RoomResult | None = None) -> Answer:
        """The evaluated room (``result``: already evaluated, by this study), its target check
        and daily exposure. Raises RoomFileError or ValueError when the room or its target
        cannot be evaluated."""
        if result is not None:
            room = result.room
        else:
            room = self.room if room is None else room
            result = self.evaluate(room)
        check = None
        if self.spec.target is not None:
            check = target_check(self.spec, room, result, self.criteria, self.filename)
        return Answer(self.spec, room, result, check, exposures(self.spec, result))

    def plan(self, *, objective: str | None = None, enabled=None,
             result: RoomResult | None = None, progress=None, cancel=None) -> PlanRun:
        """The cheapest (or smallest) treatment that meets the target, by the formula in
        force (``result``: the evaluated room, if the caller has it).

        ``progress``: called with each step (a PlanProgress: what is being done, elapsed time);
        ``cancel``: a callable returning True, or a ``threading.Event`` set, to stop between
        steps, which raises PlanCancelled (the study is left as it was)."""
        if self.spec.target is None:
            raise ValueError("the room has no [target]: say what it must reach (criterion = "
                             "\"<id>\", or rt60_max = [...], or max_level_dba = {...})")
        room = self.room
        result = result if result is not None else self.evaluate(room)
        return make_plan(self.spec, room, result, self.catalog, self.criteria,
                         objective=objective, enabled=enabled, filename=self.filename,
                         progress=progress, cancel=cancel)

    def snapshot(self) -> "Study":
        """A copy that another thread may plan with while this one's spec is edited: its own
        deep copy of the spec, the same catalogue and criteria, the room as last checked."""
        import copy

        other = Study(copy.deepcopy(self.spec), self.catalog, criteria=self._criteria,
                      filename=self.filename, method=self.method,
                      reverberant_model=self.reverberant_model)
        other._room = self._room
        return other

    def treated_spec(self, run: PlanRun) -> RoomSpec:
        """A copy of the spec with the plan's treatment added (for saving or applying)."""
        from roomcalc.io.planning import apply_plan

        return apply_plan(self.spec, run.plan, list(run.candidates))

    @staticmethod
    def compare(before: RoomResult, after: RoomResult) -> Comparison:
        """Before and after, both by the before room's formula in force."""
        return compare(before, after)

    def write_treated(self, run: PlanRun, path) -> RoomSpec:
        """Write the treated room as a new room file (atomic), with the comments of the file it
        was read from where they still belong; returns its spec."""
        from roomcalc.io.atomic import write_text_atomic
        from roomcalc.io.roomfile import spec_to_toml_keeping

        treated = self.treated_spec(run)
        try:
            original = Path(self.filename).read_text(encoding="utf-8")
        except (OSError, UnicodeDecodeError):
            original = None
        write_text_atomic(Path(path), spec_to_toml_keeping(treated, original))
        return treated

