"""The main screen's Plan tab: what the room must reach (a target the user picks), the plan
the core makes for it, and applying that plan to the room (one edit, undone with Ctrl+Z).

A part of ``MainScreen`` (a mixin): it routes the messages of ``PlanView`` to the core
(``Study.plan``, ``Study.treated_spec``) and the document (``MainScreen.apply``) and tells the
view what came of them."""

from __future__ import annotations

from roomcalc.io.errors import RoomFileError
from roomcalc.present import sections
from roomcalc.study.edits import (parse_rt60_limit, set_criterion, set_method, set_objective,
                                  set_own_rt60_limit)
from roomcalc.tui.widgets.plan_view import PlanView
from roomcalc.tui.widgets.room_form import RECOMMENDED


class PlanRoutes:
    """MainScreen's handlers of the Plan tab (it needs the screen's document, ``apply``,
    ``result``, ``stale`` and the study of the last valid room)."""

    @property
    def criteria(self) -> dict:
        if self._criteria is None:
            from roomcalc.io.criteria import load_criteria

            try:
                self._criteria = load_criteria()
            except RoomFileError as exc:
                self.notify("Criteria library: " + "; ".join(str(p) for p in exc.problems[:3]),
                            severity="error", markup=False)
                self._criteria = {}
        return self._criteria

    def _show_plan_setup(self) -> None:
        view = self._opt("#plan-view", PlanView)
        if view is None:
            return
        u = self.document.spec.unit_system
        view.show_setup(self.document.spec, self.criteria, u, u.area_label)
        check_text = ""
        if self.result is not None and not self.stale and self.document.spec.target is not None:
            try:
                check = self.current_answer().target
            except (RoomFileError, ValueError) as exc:
                check_text = f"Target: {getattr(exc, 'problems', [exc])[0]}"
            else:
                if check is not None:
                    check_text = "The room now:\n" + sections.target_text(
                        check, width=0, described=self.result)
        view.show_check(check_text)
        if self._plan_run is not None:
            view.mark_stale()

    def on_plan_view_target_changed(self, msg: PlanView.TargetChanged) -> None:
        msg.stop()
        key, value = msg.key, msg.value
        spec = self.document.spec
        if key == "rt60_max":
            try:
                limit = parse_rt60_limit(value, len(spec.bands))
            except ValueError as exc:
                self.query_one("#plan-view", PlanView).show_own_error(f"{exc}.")
                return
            self.apply(lambda s: set_own_rt60_limit(s, limit), "target: own RT60 limit")
            return
        t = spec.target
        current = {
            "criterion": "none" if t is None else (t.criterion or (
                "own" if (t.rt60_max is not None or t.rt60_min is not None) else "none")),
            "method": spec.method_in_force or RECOMMENDED,
            "objective": "cost" if t is None else t.plan_objective}[key]
        if value == current or (key == "criterion" and value == "own"):
            return
        if key == "criterion":
            self.apply(lambda s: set_criterion(s, None if value == "none" else value),
                       f"target: {value}")
        elif key == "method":
            self.apply(lambda s: set_method(s, None if value == RECOMMENDED else value),
                       f"formula: {value}")
        else:
            self.apply(lambda s: set_objective(s, value), f"target: least {value}")

    def on_plan_view_run(self, msg: PlanView.Run) -> None:
        msg.stop()
        view = self.query_one("#plan-view", PlanView)
        spec = self.document.spec
        if self.stale or self.result is None:
            view.show_message("Fix the room's problems first (see the strip below).")
            return
        if spec.target is None:
            view.show_message("Pick what the room must reach first (the first list above), or "
                              "give a [target] in the room file.")
            return
        try:
            run = self._study.plan(enabled=msg.enabled, result=self.result)
        except RoomFileError as exc:
            view.show_message("Cannot plan: " + "; ".join(p.located for p in exc.problems))
            return
        except ValueError as exc:
            view.show_message(f"Cannot plan: {exc}")
            return
        self._plan_run = run
        u = spec.unit_system
        view.show_run(run, sections.plan_totals_text(run, u), u.area, u.area_label)

    def on_plan_view_apply(self, msg: PlanView.Apply) -> None:
        msg.stop()
        from dataclasses import fields

        run = self._plan_run
        if run is None:
            return
        treated = self._study.treated_spec(run)

        def fn(spec):
            for f in fields(spec):
                setattr(spec, f.name, getattr(treated, f.name))
        self._plan_run = None
        self.apply(fn, "apply the treatment plan")
        self.query_one("#plan-view", PlanView).show_message(
            "The plan is applied to the room (Ctrl+Z takes it back); press r to check it.")
        self._say("Plan applied to the room; Ctrl+Z takes it back.")


