"""The main screen's Plan tab: what the room must reach (a target the user picks), the plan
the core makes for it, and applying that plan to the room (one edit, undone with Ctrl+Z).

A part of ``MainScreen`` (a mixin): it routes the messages of ``PlanView`` to the core
(``Study.plan``, ``Study.treated_spec``) and the document (``MainScreen.apply``) and tells the
view what came of them.

A plan is made in a worker thread, on a copy of the room, so the screen keeps answering keys:
the view shows what the planner is doing and for how long; Escape or Stop cancels it (the
planner stops between two of its steps); a new plan cancels the one running. Each plan carries
the room version it was made for (``MainScreen.room_version``, counted up by every recompute):
a plan that arrives after the room changed is not shown as the room's, and Apply refuses a plan
made for another version."""

from __future__ import annotations

import threading
import time
from dataclasses import dataclass, field

from textual.worker import Worker, WorkerState, get_current_worker

from roomcalc.io.errors import RoomFileError
from roomcalc.present import sections
from roomcalc.present.places import problem_on_screen
from roomcalc.study import PlanCancelled
from roomcalc.study.edits import (parse_rt60_limit, set_criterion, set_method, set_objective,
                                  set_own_rt60_limit)
from roomcalc.tui.widgets.plan_view import PlanView
from roomcalc.tui.widgets.room_form import RECOMMENDED


#: How often the view's progress line (step and elapsed time) is redrawn while planning [s].
PROGRESS_EVERY_S = 0.2
#: How often the waiting worker looks whether it was cancelled [s].
POLL_S = 0.02
#: The Plan tab's line just after a plan was applied, and the one that replaces it when the room
#: changes or is saved.
APPLIED = "The plan is applied to the room (Ctrl+Z takes it back); press r to check it."
AFTER_APPLIED = "Press r to make a plan for the room as it is now."
#: The name of the thread a plan is made in (the command line looks for it when the
#: interface has closed: see roomcalc.cli).
PLAN_THREAD_NAME = "roomcalc-plan"


@dataclass(eq=False)
class PlanJob:
    """One plan being made: the room version it is for, the cancel flag the planner checks
    between its steps, when it started, and the last step it reported (written by the
    planning thread, read by the screen's timer)."""

    version: int
    cancel: threading.Event = field(default_factory=threading.Event)
    started: float = field(default_factory=time.perf_counter)
    progress: object = None
    worker: Worker | None = None
    timer: object = None

    def report(self, p) -> None:
        self.progress = p

    def text(self) -> str:
        step = self.progress.text if self.progress is not None else "starting"
        return (f"Planning: {step}; {time.perf_counter() - self.started:.1f} s so far. "
                "Escape or Stop cancels; the other tabs work meanwhile.")


def plan_in_thread(job: PlanJob, study, enabled, result):
    """The worker's work: the core's plan in a daemon thread of its own, waited for here
    while looking at the cancel flag, so that a cancelled or abandoned plan (the app quitting)
    never holds the worker, or the app's exit, until the solver call under way returns."""
    box: dict = {}
    done = threading.Event()

    def work() -> None:
        try:
            box["run"] = study.plan(enabled=enabled, result=result, progress=job.report,
                                    cancel=job.cancel)
        except BaseException as exc:            # handed to the waiting worker
            box["error"] = exc
        finally:
            done.set()

    threading.Thread(target=work, name=PLAN_THREAD_NAME, daemon=True).start()
    worker = get_current_worker()
    while not done.wait(POLL_S):
        if worker.is_cancelled:
            job.cancel.set()
        if job.cancel.is_set():
            raise PlanCancelled()
    if "error" in box:
        raise box["error"]
    return box["run"]


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
        self.forget_stale_plan_status()
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
        if self._plan_job is not None:
            view.show_running(self._plan_job.text())
        elif self._plan_run is not None and self._plan_version != self.room_version:
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
        self.stop_plan(None, notify=False)       # a new plan replaces the one running
        view = self.query_one("#plan-view", PlanView)
        spec = self.document.spec
        if self.stale or self.result is None:
            view.show_message("Fix the room's problems first (see the strip below).")
            return
        if spec.target is None:
            view.show_message("Pick what the room must reach first (the first list above), or "
                              "give a [target] in the room file.")
            return
        self._plan_run = None
        job = PlanJob(self.room_version)
        study = self._study.snapshot()          # the planner's own copy of the room
        result, enabled = self.result, msg.enabled
        job.worker = self.run_worker(lambda: plan_in_thread(job, study, enabled, result),
                                     thread=True, group="plan", exit_on_error=False)
        job.timer = self.set_interval(PROGRESS_EVERY_S, self._show_plan_progress)
        self._plan_job = job
        view.show_running(job.text())

    def _show_plan_progress(self) -> None:
        view = self._opt("#plan-view", PlanView)
        if self._plan_job is not None and view is not None:
            view.show_running(self._plan_job.text())

    @property
    def planning(self) -> bool:
        """A plan is being made."""
        return self._plan_job is not None

    def stop_plan(self, message: str | None = "Plan stopped.", notify: bool = True) -> None:
        """Cancel the plan being made (the planner stops at its next step); the view says
        ``message`` (None: leaves its text), and a note says it too if ``notify``."""
        job = self._plan_job
        if job is None:
            return
        self._plan_job = None
        job.cancel.set()
        if job.timer is not None:
            job.timer.stop()
        if job.worker is not None:
            job.worker.cancel()
        view = self._opt("#plan-view", PlanView)
        if view is not None:
            view.show_idle()
            if message is not None:
                view.show_message(message)
        if notify and message:
            self._say(message)

    def on_plan_view_stop(self, msg: PlanView.Stop) -> None:
        msg.stop()
        self.stop_plan()

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        job = self._plan_job
        if job is None or event.worker is not job.worker:
            return                             # another worker, or a plan stopped or replaced
        if event.state not in (WorkerState.SUCCESS, WorkerState.ERROR, WorkerState.CANCELLED):
            return
        self._plan_job = None
        if job.timer is not None:
            job.timer.stop()
        view = self._opt("#plan-view", PlanView)
        if view is None:
            return
        view.show_idle()
        error = event.worker.error
        if event.state == WorkerState.CANCELLED or isinstance(error, PlanCancelled):
            view.show_message("Plan stopped.")
        elif isinstance(error, RoomFileError):
            spec = self.document.spec
            view.show_message("Cannot plan: " + "; ".join(problem_on_screen(p, spec)
                                                          for p in error.problems))
        elif isinstance(error, ValueError):
            view.show_message(f"Cannot plan: {error}")
        elif error is not None:
            view.show_message(f"Cannot plan: the planner failed ({type(error).__name__}: "
                              f"{error}). The room is unchanged.")
        elif job.version != self.room_version:
            # Made for a room that has changed since: never shown (or applied) as this room's.
            view.show_message("The room changed while planning; press r to plan again.")
        else:
            run = event.worker.result
            self._plan_run, self._plan_version = run, job.version
            u = self.document.spec.unit_system
            view.show_run(run, sections.plan_totals_text(run, u), u.area, u.area_label, u)
            if self.query_one("#view").active != "v-plan":
                self._say("The plan is ready: F9 shows it.")

    def on_plan_view_apply(self, msg: PlanView.Apply) -> None:
        msg.stop()
        from dataclasses import fields

        run = self._plan_run
        if run is None:
            return
        if self._plan_version != self.room_version:
            # Made for the room as it was: applying it would undo the edits made since.
            self._plan_run = None
            self.query_one("#plan-view", PlanView).show_message(
                "The room changed since this plan was made; press r to plan again.")
            self._say("Not applied: the plan was made for the room before its last change.")
            return
        treated = self._study.treated_spec(run)

        def fn(spec):
            for f in fields(spec):
                setattr(spec, f.name, getattr(treated, f.name))
        self._plan_run = None
        self.apply(fn, "apply the treatment plan")
        self.query_one("#plan-view", PlanView).show_message(APPLIED)
        # The line describes the room just after the plan went in: it goes as soon as the room
        # changes (undo, redo, any edit) or is saved.
        self._plan_applied_at = self._plan_state()
        self._say("Plan applied to the room; Ctrl+Z takes it back.")

    def _plan_state(self) -> tuple:
        """What a status line of the Plan tab describes: the room version and whether it has
        unsaved changes."""
        return self.room_version, self.document.modified

    def forget_stale_plan_status(self) -> None:
        """Replace the "plan is applied" line once the room has changed or been saved since
        (called after every edit, undo, redo and save)."""
        at = self._plan_applied_at
        if at is None or at == self._plan_state():
            return
        self._plan_applied_at = None
        view = self._opt("#plan-view", PlanView)
        if view is not None and view.showing(APPLIED):
            view.show_message(AFTER_APPLIED)


