"""The plan is made in a worker thread: the screen answers keys while the planner runs, Escape
(or Stop) cancels it in the core, a new plan replaces the running one, a plan that arrives
after the room was edited is not shown as the room's and Apply refuses it, and Ctrl+Q quits
during a plan without waiting for it.

The planner is made slow here on purpose: the core's ``Study.plan`` is wrapped so that the
real planner, after reporting its first step, waits on a gate the test opens. The wait sits
inside the planner (in its progress callback), so a cancel is seen by the planner's own check
at its next step."""

from __future__ import annotations

import threading
import time

import pytest

from roomcalc.io.roomfile import spec_to_toml
from roomcalc.study import PlanCancelled, Study
from roomcalc.tui.app import AppConfig, make_app
from roomcalc.tui.document import Document
from roomcalc.tui.widgets.plan_view import PlanView

from test_tui_plan import ROOM    # the Plan tab tests' invented room

SIZE = (120, 40)
GATE_TIMEOUT_S = 20.0


class SlowPlanner:
    """Study.plan made slow: the first ``blocked`` calls wait after the planner's first step
    until ``gate`` is set. Records each call's outcome ("done", "cancelled", ...)."""

    def __init__(self, monkeypatch, blocked: int = 1) -> None:
        self.gate = threading.Event()
        self.outcomes: list[str] = []
        self.calls = 0
        self.blocked = blocked
        real = Study.plan

        def slow(study, **kwargs):
            self.calls += 1
            wait = self.calls <= self.blocked
            report = kwargs.get("progress")

            def progress(p):
                if report is not None:
                    report(p)
                if wait and p.step == 1:
                    self.gate.wait(GATE_TIMEOUT_S)
            kwargs["progress"] = progress
            try:
                run = real(study, **kwargs)
            except PlanCancelled:
                self.outcomes.append("cancelled")
                raise
            except BaseException as exc:
                self.outcomes.append(type(exc).__name__)
                raise
            self.outcomes.append("done")
            return run
        monkeypatch.setattr(Study, "plan", slow)

    def wait_outcomes(self, n: int) -> None:
        t0 = time.perf_counter()
        while len(self.outcomes) < n and time.perf_counter() - t0 < GATE_TIMEOUT_S:
            time.sleep(0.01)


@pytest.fixture
def app_on_room(tmp_path, catalog):
    path = tmp_path / "worker-room.toml"
    path.write_text(ROOM, encoding="utf-8")
    return make_app(Document.open(path), catalog,
                    AppConfig(offer_recovery=False, recovery_delay_s=3600))


async def _on_plan_tab(pilot):
    screen = pilot.app.screen
    for _ in range(100):
        await pilot.pause()
        if screen.result is not None:
            break
    await pilot.press("f9")
    for _ in range(50):
        await pilot.pause()
        if screen.query("#plan-candidates"):
            break
    screen.query_one("#plan-candidates").focus()
    await pilot.pause()
    return screen


async def _until(pilot, cond, timeout_s: float = GATE_TIMEOUT_S) -> None:
    t0 = time.perf_counter()
    while not cond():
        if time.perf_counter() - t0 > timeout_s:
            raise AssertionError("timed out")
        await pilot.pause(0.02)


def _result_text(screen) -> str:
    return str(screen.query_one("#plan-result").content)


async def test_keys_are_handled_while_the_planner_runs(app_on_room, monkeypatch):
    slow = SlowPlanner(monkeypatch)
    async with app_on_room.run_test(size=SIZE) as pilot:
        screen = await _on_plan_tab(pilot)
        await pilot.press("r")
        await _until(pilot, lambda: "Planning:" in _result_text(screen))
        assert screen.planning and screen.query_one("#plan-stop").display
        assert screen.query_one("#plan-apply").disabled            # nothing to apply yet
        # While the planner waits: a tab switch and an edit are handled at once.
        await pilot.press("1")
        await pilot.pause()
        assert screen.query_one("#edit").active == "room"
        await pilot.press("f5")
        await pilot.pause()
        assert screen.query_one("#view").active == "v-reverb"
        assert screen.planning and not slow.gate.is_set() and slow.outcomes == []
        # The progress line names the step and counts the time.
        await pilot.pause(0.5)
        text = _result_text(screen)
        assert "building the programme (2 candidates)" in text and " s so far" in text
        slow.gate.set()
        await _until(pilot, lambda: not screen.planning)
        assert slow.outcomes == ["done"]
        run = screen._plan_run
        assert run is not None and run.plan.feasible
        # It finished while another tab was shown: a note says where it is.
        assert any("The plan is ready" in str(n.message) for n in app_on_room._notifications)
        await pilot.press("f9")
        await pilot.pause()
        assert "The plan meets the target." in _result_text(screen)
        assert not screen.query_one("#plan-apply").disabled
        assert not screen.query_one("#plan-stop").display


async def test_escape_stops_the_plan_in_the_core(app_on_room, monkeypatch):
    slow = SlowPlanner(monkeypatch)
    async with app_on_room.run_test(size=SIZE) as pilot:
        screen = await _on_plan_tab(pilot)
        doc_text = spec_to_toml(screen.document.spec)
        await pilot.press("r")
        await _until(pilot, lambda: screen.planning and "Planning:" in _result_text(screen))
        await pilot.press("escape")
        await pilot.pause()
        assert not screen.planning
        assert _result_text(screen) == "Plan stopped."
        assert screen.query_one("#plan-apply").disabled and screen._plan_run is None
        slow.gate.set()                 # the planner goes on to its next step, and stops there
        slow.wait_outcomes(1)
        assert slow.outcomes == ["cancelled"]
        await pilot.pause(0.1)
        assert _result_text(screen) == "Plan stopped."          # nothing arrives late
        assert spec_to_toml(screen.document.spec) == doc_text and not screen.document.modified


async def test_the_stop_button_stops_it_too(app_on_room, monkeypatch):
    slow = SlowPlanner(monkeypatch)
    async with app_on_room.run_test(size=SIZE) as pilot:
        screen = await _on_plan_tab(pilot)
        await pilot.click("#plan-run")
        await _until(pilot, lambda: screen.query_one("#plan-stop").display)
        await pilot.click("#plan-stop")
        await pilot.pause()
        assert not screen.planning and _result_text(screen) == "Plan stopped."
        slow.gate.set()
        slow.wait_outcomes(1)
        assert slow.outcomes == ["cancelled"]


async def test_a_new_plan_replaces_the_running_one(app_on_room, monkeypatch):
    slow = SlowPlanner(monkeypatch, blocked=1)          # the first waits, the second does not
    async with app_on_room.run_test(size=SIZE) as pilot:
        screen = await _on_plan_tab(pilot)
        await pilot.press("r")
        await _until(pilot, lambda: screen.planning)
        first = screen._plan_job
        await pilot.press("r")
        await _until(pilot, lambda: not screen.planning)
        assert first.cancel.is_set()
        assert screen._plan_run is not None and "meets the target" in _result_text(screen)
        slow.gate.set()
        slow.wait_outcomes(2)
        assert sorted(slow.outcomes) == ["cancelled", "done"]
        await pilot.pause(0.1)
        assert "meets the target" in _result_text(screen)       # the first never shows


async def test_an_edit_during_the_plan_makes_it_stale_and_apply_refuses(app_on_room,
                                                                         monkeypatch):
    slow = SlowPlanner(monkeypatch)
    async with app_on_room.run_test(size=SIZE) as pilot:
        screen = await _on_plan_tab(pilot)
        doc = screen.document
        await pilot.press("r")
        await _until(pilot, lambda: screen.planning)
        # An edit while the planner runs: the wall area (through the core's edit path, as the
        # table's cell editor does).
        screen.apply(lambda s: setattr(s.surfaces[2], "area", 90.0), "surfaces: area")
        await pilot.pause()
        assert screen.planning
        edited = spec_to_toml(doc.spec)
        slow.gate.set()
        await _until(pilot, lambda: not screen.planning)
        assert slow.outcomes == ["done"]        # it finished, but for the room before the edit
        assert "The room changed while planning" in _result_text(screen)
        assert screen._plan_run is None and screen.query_one("#plan-apply").disabled
        # Apply asked for anyway (the message, not the disabled button): nothing changes.
        screen.query_one("#plan-view", PlanView).post_message(PlanView.Apply())
        await pilot.pause()
        assert spec_to_toml(doc.spec) == edited
        assert [s.label for s in doc.undo_stack] == ["surfaces: area"]


async def test_apply_refuses_a_plan_made_before_the_last_edit(app_on_room, monkeypatch):
    slow = SlowPlanner(monkeypatch, blocked=0)
    async with app_on_room.run_test(size=SIZE) as pilot:
        screen = await _on_plan_tab(pilot)
        doc = screen.document
        await pilot.press("r")
        await _until(pilot, lambda: not screen.planning and screen._plan_run is not None)
        assert slow.outcomes == ["done"]
        screen.apply(lambda s: setattr(s, "title", "Renamed"), "title")
        await pilot.pause()
        edited = spec_to_toml(doc.spec)
        screen.query_one("#plan-view", PlanView).post_message(PlanView.Apply())
        await pilot.pause()
        assert spec_to_toml(doc.spec) == edited and len(doc.undo_stack) == 1
        assert "The room changed since this plan was made" in _result_text(screen)


async def test_ctrl_q_during_a_plan_quits_at_once(app_on_room, monkeypatch):
    slow = SlowPlanner(monkeypatch)
    async with app_on_room.run_test(size=SIZE) as pilot:
        screen = await _on_plan_tab(pilot)
        await pilot.press("r")
        await _until(pilot, lambda: screen.planning)
        job = screen._plan_job
        await pilot.press("ctrl+q")             # the room is unchanged: no question asked
        await _until(pilot, lambda: not app_on_room.is_running)
    # The app has ended while the planner still waits: quitting did not wait for it.
    assert not slow.gate.is_set() and slow.outcomes == []
    assert job.cancel.is_set()
    slow.gate.set()
    slow.wait_outcomes(1)
    assert slow.outcomes == ["cancelled"]


def test_the_command_line_ends_at_once_when_a_stopped_plan_is_still_solving(monkeypatch):
    # After the interface closed, a planner thread still inside a solver call: the process
    # ends with the exit code after a short wait (the interpreter's shutdown around the
    # solver's threads would abort); with no such thread, nothing happens.
    from roomcalc import cli
    from roomcalc.tui.screens.plan_routes import PLAN_THREAD_NAME

    ended: list[int] = []
    monkeypatch.setattr("os._exit", ended.append)
    cli._end_with_a_plan_under_way(0)
    assert ended == []
    release = threading.Event()
    th = threading.Thread(target=release.wait, args=(GATE_TIMEOUT_S,), name=PLAN_THREAD_NAME,
                          daemon=True)
    th.start()
    try:
        monkeypatch.setattr(cli, "PLAN_STOP_WAIT_S", 0.01)
        cli._end_with_a_plan_under_way(0)
        assert ended == [0]
    finally:
        release.set()
        th.join()
    cli._end_with_a_plan_under_way(0)             # it has ended: nothing more
    assert ended == [0]
