"""Speed of the treatment planner, and the planner against an exhaustive search.

Run from the project root:

    python benchmarks/bench_plan.py

Cases (a benchmark scenario of our own, random with a fixed seed; not a real room or real
products):

- (a) 50 candidates (30 covers on 8 surfaces, 20 kinds of units), 8 bands (63-8000 Hz), an RT
  window by Eyring and a dB(A) limit 6 dB below the untreated level at each of 3 receivers
  (3 sources; the limits bind, so the cutting planes work), all amounts
  continuous: linprog plus cutting planes. Target: median under 100 ms.
- (b) the same with whole units and covers in whole panels of 0.72 m^2: milp plus cutting
  planes. Target: median under 1 s.
- (c) a small case, 3 candidates on a grid of 1,100 or so whole amounts, RT window and a
  dB(A) limit: the planner against trying every combination, each evaluated by the engine on
  a room built here by hand (not by the planner's apply_to_room). Before timing, both must
  find the same least cost; the search is timed once (it is slow), the planner by the median.
- (d), (e) case (a) with the window judged by Millington-Sette (linear, planned exactly) and
  by Fitzroy (planned through Eyring's bound, tightened until the engine confirms). No
  target: they show what the other formulas cost against (a).

Every plan is checked before it is timed: the engine must find every goal met. Times are
medians of repeated calls in this process; ratios compare two timings taken in the same run.
Nothing here asserts a time: this is a measurement, not a test.
"""

from __future__ import annotations

import itertools
import os
import platform
import random
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

import numpy as np  # noqa: E402

from benchmarks.bench import fmt_time, median_time  # noqa: E402
from roomcalc.engine.analysis import evaluate  # noqa: E402
from roomcalc.engine.model import Air, Receiver, Room, RoomObject, Source, Surface  # noqa: E402
from roomcalc.engine.planner import Candidate, Goals, LevelGoal, plan  # noqa: E402

SEED = 20240611
BANDS8 = (63, 125, 250, 500, 1000, 2000, 4000, 8000)
BANDS6 = (125, 250, 500, 1000, 2000, 4000)


# ---------------------------------------------------------------------------------------------
# Scenario (a)/(b): a hall of 24 x 15 x 6 m with three machines
# ---------------------------------------------------------------------------------------------


def make_hall():
    L, W, H = 24.0, 15.0, 6.0
    hard = [0.01, 0.01, 0.015, 0.02, 0.02, 0.03, 0.04, 0.05]       # scenario values
    deck = [0.10, 0.08, 0.06, 0.05, 0.05, 0.05, 0.05, 0.05]
    glass = [0.30, 0.25, 0.18, 0.12, 0.08, 0.05, 0.04, 0.03]
    surfaces = (
        Surface("Floor", L * W, hard, face="floor"),
        Surface("Roof deck", L * W, deck, face="ceiling"),
        Surface("North wall", L * H - 30.0, hard, face="left"),
        Surface("North windows", 30.0, glass, face="left"),
        Surface("South wall", L * H, hard, face="right"),
        Surface("East wall", W * H - 16.0, hard, face="front"),
        Surface("Doors", 16.0, deck, face="front"),
        Surface("West wall", W * H, hard, face="back"),
    )
    sources = (
        Source("Press", [88, 92, 95, 96, 94, 91, 87, 80], directivity=2.0, position=(5, 4, 0.5)),
        Source("Saw", [80, 84, 88, 92, 95, 96, 94, 90], directivity=2.0, position=(16, 10, 0.5)),
        Source("Fan", [90, 91, 89, 86, 82, 78, 72, 66], directivity=4.0, position=(23.5, 1, 3)),
    )
    receivers = (Receiver("Press operator", (6.5, 4.5, 1.6)),
                 Receiver("Bench", (12.0, 8.0, 1.2)),
                 Receiver("Office door", (20.0, 13.0, 1.6)))
    return Room(bands_hz=BANDS8, volume=L * W * H, surfaces=surfaces, dimensions=(L, W, H),
                air=Air(20.0, 50.0), sources=sources, receivers=receivers, title="bench hall")


def make_candidates(room, whole, seed=SEED):
    """30 covers (porous: alpha rising with frequency) on the roof and walls, 20 kinds of
    units (low-frequency traps and baffles), random within plausible ranges."""
    rnd = random.Random(seed)
    covers_on = [1, 2, 4, 5, 7]                       # roof deck and the four solid walls
    cands = []
    for i in range(30):
        low = rnd.uniform(0.05, 0.5)
        top = rnd.uniform(0.6, 1.0)
        knee = rnd.uniform(1.0, 4.0)                  # octave index where it reaches the top
        alpha = [min(top, low + (top - low) * max(k - 1, 0) / knee) for k in range(8)]
        s = rnd.choice(covers_on)
        area = room.surfaces[s].total_area
        cands.append(Candidate(f"cover {i}", "cover", cost=rnd.uniform(15.0, 90.0),
                               max_amount=rnd.choice((float("inf"), area * rnd.uniform(0.3, 1))),
                               surface=s, alpha=alpha, step=0.72 if whole else None))
    for i in range(20):
        if i % 2:
            absorption = [rnd.uniform(0.8, 2.0), rnd.uniform(0.8, 1.8), rnd.uniform(0.5, 1.2),
                          0.4, 0.3, 0.25, 0.2, 0.2]     # a low-frequency trap
        else:
            base = rnd.uniform(0.8, 2.0)
            absorption = [0.1 * base, 0.3 * base, 0.6 * base, base, base, base, 0.9 * base,
                          0.8 * base]                   # a baffle
        cands.append(Candidate(f"units {i}", "units", cost=rnd.uniform(40.0, 400.0),
                               max_amount=rnd.choice((20, 40, 80)), absorption=absorption,
                               integer=whole, area_each=rnd.uniform(0.5, 2.0)))
    return cands


def hall_goals(room, method="eyring"):
    before = evaluate(room)
    rt_max = np.array([1.6, 1.4, 1.2, 1.1, 1.1, 1.1, 1.1, 1.1])
    rt_min = np.array([np.nan, np.nan, 0.5, 0.5, 0.5, 0.5, 0.5, np.nan])
    levels = tuple(LevelGoal(r.name, max_dba=round(r.level_dba - 6.0, 1))
                   for r in before.receivers)
    return Goals(method=method, rt60_max=rt_max, rt60_min=rt_min, levels=levels)


def check_plan(label, room, goals, p):
    """Stop unless the engine finds every goal met by the plan."""
    if not p.feasible:
        raise SystemExit(f"{label}: the plan is not feasible: {p.reasons}")
    t = p.rt60_after
    ok = np.all(np.isnan(goals.rt60_max) | (t <= goals.rt60_max + 1e-6))
    ok &= np.all(np.isnan(goals.rt60_min) | (t >= goals.rt60_min - 1e-6))
    for g in goals.levels:
        ok &= p.levels_after[g.receiver] <= g.max_dba + 0.05
    if not ok:
        raise SystemExit(f"{label}: the engine finds a goal missed")


# ---------------------------------------------------------------------------------------------
# Case (c): small enough to try every combination
# ---------------------------------------------------------------------------------------------


def make_classroom():
    L, W, H = 10.0, 7.0, 3.0
    hard = [0.02, 0.02, 0.03, 0.03, 0.04, 0.05]                    # scenario values
    return Room(bands_hz=BANDS6, volume=L * W * H, dimensions=(L, W, H), surfaces=(
        Surface("Floor", L * W, hard, face="floor"),
        Surface("Ceiling", L * W, hard, face="ceiling"),
        Surface("Front", W * H, hard, face="front"), Surface("Back", W * H, hard, face="back"),
        Surface("Left", L * H, hard, face="left"), Surface("Right", L * H, hard, face="right")),
        sources=(Source("Teacher", [68, 72, 76, 78, 75, 70], directivity=2.0,
                        position=(1.0, 3.5, 1.6)),),
        receivers=(Receiver("Back row", (9.0, 3.5, 1.2)),), title="bench classroom")


SMALL = [  # (candidate, grid of amounts the search tries)
    (Candidate("ceiling tile", "cover", cost=38.0, surface=1, step=2.88, max_amount=70.0,
               alpha=[0.35, 0.55, 0.75, 0.85, 0.9, 0.85]), None),
    (Candidate("wall panel", "cover", cost=95.0, surface=5, step=1.44, max_amount=30.0,
               alpha=[0.25, 0.7, 1.0, 1.0, 1.0, 0.95]), None),
    (Candidate("corner trap", "units", cost=160.0, max_amount=8,
               absorption=[1.2, 1.0, 0.6, 0.4, 0.3, 0.3]), None),
]


def small_case():
    room = make_classroom()
    cands = [c for c, _ in SMALL]
    before = evaluate(room)
    goals = Goals(method="eyring", rt60_max=[0.9, 0.7, 0.6, 0.6, 0.6, 0.6],
                  rt60_min=[np.nan, np.nan, 0.3, 0.3, 0.3, 0.3],
                  levels=(LevelGoal("Back row", max_dba=round(before.receivers[0].level_dba
                                                              - 6.0, 1)),))
    return room, cands, goals


def treated(room, amounts, cands):
    """The treated room built here, by hand: each cover splits its surface in two."""
    surfaces = list(room.surfaces)
    objects = list(room.objects)
    for c, x in zip(cands, amounts):
        if x <= 0:
            continue
        if c.kind == "cover":
            old = surfaces[c.surface]
            rest = old.area - x
            parts = [Surface(old.name + " +", x, c.alpha, face=old.face)]
            if rest > 1e-9:
                parts.insert(0, Surface(old.name, rest, old.alpha, face=old.face))
            surfaces[c.surface] = parts
        else:
            objects.append(RoomObject(c.name, c.absorption, count=x))
    flat = []
    for s in surfaces:
        flat.extend(s if isinstance(s, list) else [s])
    return Room(bands_hz=room.bands_hz, volume=room.volume, surfaces=tuple(flat),
                dimensions=room.dimensions, air=room.air, objects=tuple(objects),
                sources=room.sources, receivers=room.receivers)


def exhaustive(room, cands, goals):
    """Least cost over every combination of whole amounts, each checked by evaluate()."""
    grids = []
    for c in cands:
        if c.kind == "cover":
            top = min(c.max_amount, room.surfaces[c.surface].total_area)
            grids.append([c.step * k for k in range(int(top / c.step + 1e-9) + 1)])
        else:
            grids.append(list(range(int(c.max_amount) + 1)))
    best, best_x, tried = None, None, 0
    lim = goals.levels[0].max_dba
    for amounts in itertools.product(*grids):
        tried += 1
        cost = sum(c.cost * x for c, x in zip(cands, amounts))
        if best is not None and cost >= best:
            continue                                  # cannot improve: skip the evaluation
        res = evaluate(treated(room, amounts, cands))
        t = res.rt60_s[goals.method]
        if np.any(t > goals.rt60_max) or np.any(t < np.nan_to_num(goals.rt60_min)):
            continue
        if res.receivers[0].level_dba > lim:
            continue
        best, best_x = cost, amounts
    return best, best_x, tried


# ---------------------------------------------------------------------------------------------


def main():
    os.chdir(ROOT)
    t_start = time.perf_counter()
    print(f"roomcalc planner benchmark: Python {platform.python_version()}, numpy "
          f"{np.__version__}, {os.cpu_count()} CPUs, {platform.machine()}")
    hall = make_hall()
    goals = hall_goals(hall)
    rows = []
    for label, whole, target, target_s in (
            ("(a) 50 candidates, continuous", False, 0.1, "ours < 100 ms"),
            ("(b) 50 candidates, whole units/panels", True, 1.0, "ours < 1 s")):
        cands = make_candidates(hall, whole)
        p = plan(hall, cands, goals)                  # also the first call: scipy's import
        check_plan(label, hall, goals, p)
        print(f"{label[:3]} plan: {len(p.items)} items, cost {p.total_cost:.0f}, "
              f"{p.total_area:.1f} m^2 and {p.total_units:g} units, {p.solver}, {p.status}")
        t = median_time(lambda cands=cands: plan(hall, cands, goals), repeat=5,
                        number=1 if whole else None)
        rows.append((label, t, None, None, target_s, t < target))
    cands = make_candidates(hall, False)
    for label, method in (("(d) as (a), by Millington-Sette", "millington"),
                          ("(e) as (a), by Fitzroy", "fitzroy")):
        mgoals = hall_goals(hall, method)
        p = plan(hall, cands, mgoals)
        check_plan(label, hall, mgoals, p)
        print(f"{label[:3]} plan: {len(p.items)} items, cost {p.total_cost:.0f}, "
              f"{p.total_area:.1f} m^2 and {p.total_units:g} units, {p.solver}, {p.status}")
        t = median_time(lambda g=mgoals: plan(hall, cands, g), repeat=5)
        rows.append((label, t, None, None, "(none)", None))

    room, cands, sgoals = small_case()
    p = plan(room, cands, sgoals)
    check_plan("(c)", room, sgoals, p)
    t0 = time.perf_counter()
    best, best_x, tried = exhaustive(room, cands, sgoals)
    t_search = time.perf_counter() - t0
    if best is None or not np.isclose(p.total_cost, best, rtol=1e-9, atol=1e-9):
        raise SystemExit(f"(c): planner cost {p.total_cost} differs from the exhaustive search "
                         f"{best} (amounts {best_x})")
    print(f"(c) same least cost {best:.2f} from both ({tried} combinations; amounts {best_x})")
    t_plan = median_time(lambda: plan(room, cands, sgoals), repeat=5)
    rows.append((f"(c) 3 candidates vs all {tried} combinations", t_plan, t_search,
                 t_search / t_plan, "(none)", None))

    print()
    print("ratio: exhaustive search / planner (higher is faster)")
    head = f"{'case':44} {'ours median':>12} {'ref':>12} {'ratio':>9}  {'target':13} met"
    print(head)
    print("-" * len(head))
    for name, t_o, t_r, ratio, target, met in rows:
        met_s = "-" if met is None else ("yes" if met else "NO")
        ref_s = fmt_time(t_r) if t_r is not None else "-"
        ratio_s = f"{ratio:8.1f}x" if ratio is not None else "-"
        print(f"{name:44} {fmt_time(t_o):>12} {ref_s:>12} {ratio_s:>9}  {target:13} {met_s}")
    print(f"\ntotal benchmark time {time.perf_counter() - t_start:.1f} s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
