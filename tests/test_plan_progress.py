"""A plan's progress and cancellation, in the core (no interface): the planner reports its
steps in order, stops between two steps when asked (PlanCancelled) without another solver call,
and a stopped plan leaves the room, its file and the next plan as they were. The command line
ends a plan cleanly on Ctrl+C (exit 130, a message, no traceback, nothing written)."""

from __future__ import annotations

import threading

import numpy as np
import pytest

import roomcalc.engine.planner.solve as solve_mod
from roomcalc import cli
from roomcalc.cli import main
from roomcalc.engine.planner import MAX_CUT_ROUNDS, MAX_SURROGATE_ROUNDS
from roomcalc.io.roomfile import spec_to_toml
from roomcalc.study import PlanCancelled, PlanProgress, Study

# An invented test room: a workshop whose dB(A) limit at the bench binds, so that the plan needs
# cutting planes, with whole units (a mixed-integer programme) and covers.
WORKSHOP = """\
# An invented test room.
version = 1
title = "Progress test workshop"
units = "metric"

[shape]
length = 12.0
width = 8.0
height = 4.5

[[surfaces]]
name = "Floor"
face = "floor"
material = "concrete-floor-painted"

[[surfaces]]
name = "Roof"
face = "ceiling"
material = "steel-sheet-on-frame"

[[surfaces]]
name = "Walls"
area = 180.0
material = "concrete-block-unpainted"

[[sources]]
name = "Saw"
sound_power = [95.0, 98.0, 101.0, 102.0, 100.0, 96.0]
placement = "surface"
position = [4.0, 3.0, 0.9]

[[receivers]]
name = "Bench"
position = [10.0, 6.0, 1.6]

[target]
method = "eyring"
rt60_max = 1.0
max_level_dba = { "Bench" = 88.0 }

[[candidates]]
name = "Roof panels"
surface = "Roof"
material = "mineral-wool-50mm-48kg"
step = 0.72
cost_per_m2 = 30.0

[[candidates]]
name = "Wall panels"
surface = "Walls"
alpha = [0.2, 0.5, 0.9, 1.0, 0.95, 0.9]
cost_per_m2 = 55.0

[[candidates]]
name = "Baffles"
absorption = [0.3, 0.6, 1.1, 1.4, 1.4, 1.3]
max_count = 40
cost_each = 55.0
"""


@pytest.fixture
def room_file(tmp_path):
    p = tmp_path / "workshop.toml"
    p.write_text(WORKSHOP, encoding="utf-8")
    return p


@pytest.fixture
def solver_calls(monkeypatch):
    """Counts the calls of the LP / MILP solver (HiGHS) while the planner runs."""
    calls = []
    real = solve_mod.lp

    def counted(*args, **kwargs):
        calls.append(1)
        return real(*args, **kwargs)
    monkeypatch.setattr(solve_mod, "lp", counted)
    return calls


def test_progress_steps_count_up_and_name_what_is_done(room_file, catalog, solver_calls):
    steps: list[PlanProgress] = []
    run = Study.from_file(room_file, catalog).plan(progress=steps.append)
    assert run.plan.feasible and "level cut" in run.plan.status   # the cuts were needed
    assert [p.step for p in steps] == list(range(1, len(steps) + 1))
    times = [p.elapsed_s for p in steps]
    assert times == sorted(times) and times[0] >= 0.0
    assert steps[0].stage == "building" and "3 candidates" in steps[0].text
    # One step before every solver call: a first solve, then each round of cutting planes.
    solver_steps = [p for p in steps if p.stage in ("solving", "cutting")]
    assert len(solver_steps) == len(solver_calls)
    cuts = [p for p in steps if p.stage == "cutting"]
    assert cuts and all(p.max_cuts == MAX_CUT_ROUNDS - 1 for p in cuts)
    assert f"cutting plane 1 of at most {MAX_CUT_ROUNDS - 1}" in cuts[0].text
    assert any(p.integral for p in solver_steps)              # whole units and panels: MILP
    # The treated room is checked by the engine, and the core's last step checks it as
    # described.
    assert any(p.stage == "checking" for p in steps[1:-1])
    assert steps[-1].stage == "checking" and "as described" in steps[-1].text
    # Watching changes nothing: the same plan without a callback.
    again = Study.from_file(room_file, catalog).plan()
    assert np.array_equal(again.plan.amounts, run.plan.amounts)
    assert again.plan.total_cost == run.plan.total_cost


def test_a_plan_through_tightened_bounds_numbers_its_attempts(room_file, catalog):
    # Fitzroy is planned through Eyring's bound, tightened until the engine agrees: each
    # attempt after the first says which it is.
    text = WORKSHOP.replace('method = "eyring"', 'method = "fitzroy"').replace(
        'area = 180.0\n', 'area = 96.0\nface = "left"\n').replace("rt60_max = 1.0",
                                                               "rt60_max = 0.6")
    text = text.replace('[[sources]]', '[[surfaces]]\nname = "Right"\nface = "right"\n'
                        'material = "concrete-block-unpainted"\n\n[[surfaces]]\nname = "Front"\n'
                        'face = "front"\nmaterial = "concrete-block-unpainted"\n\n'
                        '[[surfaces]]\nname = "Back"\nface = "back"\n'
                        'material = "concrete-block-unpainted"\n\n[[sources]]', 1)
    room_file.write_text(text, encoding="utf-8")
    steps: list[PlanProgress] = []
    run = Study.from_file(room_file, catalog).plan(progress=steps.append)
    attempts = [p.attempt for p in steps]
    assert attempts == sorted(attempts)
    assert "plans to meet Fitzroy" in run.plan.status           # more than one was needed
    later = [p for p in steps if p.attempt > 1]
    assert later and later[0].text.startswith(f"plan 2 of at most {MAX_SURROGATE_ROUNDS}: ")
    assert all(p.max_attempts == MAX_SURROGATE_ROUNDS for p in later)


def test_cancel_stops_between_steps_without_another_solver_call(room_file, catalog,
                                                                 solver_calls):
    steps: list[PlanProgress] = []
    Study.from_file(room_file, catalog).plan(progress=steps.append)
    n = len(steps)
    assert n >= 5
    for k in range(n):            # stop after k steps were reported: at the start of step k+1
        solver_calls.clear()
        seen: list[PlanProgress] = []
        study = Study.from_file(room_file, catalog)
        with pytest.raises(PlanCancelled):
            study.plan(progress=seen.append, cancel=lambda: len(seen) >= k)
        assert len(seen) == k
        # Every solver call made had its step reported first; none after the stop.
        assert len(solver_calls) == sum(p.stage in ("solving", "cutting") for p in seen)


def test_cancel_takes_a_threading_event(room_file, catalog, solver_calls):
    stop = threading.Event()
    stop.set()
    with pytest.raises(PlanCancelled):
        Study.from_file(room_file, catalog).plan(cancel=stop)
    assert solver_calls == []
    with pytest.raises(TypeError):
        Study.from_file(room_file, catalog).plan(cancel=42)


def test_a_stopped_plan_leaves_nothing_behind(room_file, catalog):
    folder = room_file.parent
    before_files = sorted(p.name for p in folder.iterdir())
    before_bytes = room_file.read_bytes()
    study = Study.from_file(room_file, catalog)
    spec_text = spec_to_toml(study.spec)
    room = study.room
    seen: list[PlanProgress] = []
    with pytest.raises(PlanCancelled):
        study.plan(progress=seen.append, cancel=lambda: len(seen) >= 3)
    assert spec_to_toml(study.spec) == spec_text and study.room is room
    assert sorted(p.name for p in folder.iterdir()) == before_files
    assert room_file.read_bytes() == before_bytes
    # The next plan of the same study is the plan of a fresh one.
    after = study.plan()
    fresh = Study.from_file(room_file, catalog).plan()
    assert np.array_equal(after.plan.amounts, fresh.plan.amounts)


def test_snapshot_is_a_copy_the_planner_may_use_while_the_room_is_edited(room_file, catalog):
    study = Study.from_file(room_file, catalog)
    copy = study.snapshot()
    assert copy.spec is not study.spec and spec_to_toml(copy.spec) == spec_to_toml(study.spec)
    study.spec.candidates.clear()                  # an edit of the original
    assert len(copy.spec.candidates) == 3
    assert copy.plan().plan.feasible


def test_cli_plan_ctrl_c_ends_cleanly(room_file, tmp_path, capsys, monkeypatch):
    out = tmp_path / "treated.toml"

    def interrupted(self, **kwargs):
        raise KeyboardInterrupt
    monkeypatch.setattr(Study, "plan", interrupted)
    code = main(["plan", str(room_file), "--write", str(out)])
    captured = capsys.readouterr()
    assert code == 130
    assert "stopped (Ctrl+C)" in captured.err and "nothing was written" in captured.err
    assert "Traceback" not in captured.err + captured.out
    assert not out.exists()


def test_cli_progress_line_only_after_a_second(capsys):
    progress = cli._StderrProgress()
    progress(PlanProgress(step=1, stage="building", elapsed_s=0.2))
    assert capsys.readouterr().err == ""                 # a quick plan prints nothing
    progress(PlanProgress(step=5, stage="cutting", cut=2, max_cuts=49, elapsed_s=1.7))
    err = capsys.readouterr().err
    assert "cutting plane 2 of at most 49" in err and "1.7 s" in err and "Ctrl+C" in err
    progress.clear()
    assert capsys.readouterr().err == "\r\033[K"
