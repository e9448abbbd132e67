"""Speed of the roomcalc engine against plain-Python loops that compute the same numbers.

Run from the project root:

    python benchmarks/bench.py            # the four cases and the summary table
    python benchmarks/bench.py --profile  # also profile every case that misses its target

Every case first checks that the engine and the plain-Python reference give the same numbers
(np.allclose, rtol 1e-9, atol 0) and stops with an error if they do not; only then are both timed.
Times are medians of repeated runs measured in this process; the ratios compare two timings taken
in the same run. Nothing here asserts an absolute time: this is a measurement, not a test.

The reference loops use only Python floats and the math module. Their formulas are written out
again here, from the same published sources as the engine (ISO 9613-1:1993 eqs. (3)-(5) for air,
IEC 61260-1:2014 5.2 for exact band centres, IEC 61672-1:2013 Table 3 for A-weighting, Sabine,
Eyring, Millington-Sette, Fitzroy, Arau-Puchades, and Beranek's room constant and levels); they
do not call the engine.
"""

from __future__ import annotations

import argparse
import cProfile
import io
import math
import os
import platform
import pstats
import random
import statistics
import subprocess
import sys
import tempfile
import time
import timeit
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

import numpy as np  # noqa: E402

from roomcalc.engine.analysis import (batch_reverberation, batch_reverberation_by_material,  # noqa: E402
                                     distance_curves, evaluate)
from roomcalc.engine.model import Air, Receiver, Room, RoomObject, Source, Surface  # noqa: E402

RTOL = 1e-9
BANDS = (125, 250, 500, 1000, 2000, 4000)
SEED = 20240611

# ---------------------------------------------------------------------------------------------
# Timing
# ---------------------------------------------------------------------------------------------


def median_time(fn, *, repeat=7, number=None):
    """Median time of one call [s]: batches of ``number`` calls (by default timeit's autorange,
    the smallest 1, 2, 5, 10, ... calls that take at least 0.2 s), ``repeat`` batches, the median
    of the per-call batch means."""
    timer = timeit.Timer(fn, timer=time.perf_counter)
    if number is None:
        number, _ = timer.autorange()
    return statistics.median(timer.timeit(number) / number for _ in range(repeat))


def fmt_time(t):
    if t < 1e-3:
        return f"{t * 1e6:8.1f} us"
    if t < 1.0:
        return f"{t * 1e3:8.2f} ms"
    return f"{t:8.3f} s "


def check_same(label, ours, ref):
    """Stop unless both sides give the same numbers to rtol 1e-9 (atol 0)."""
    a = np.asarray(ours, dtype=float)
    b = np.asarray(ref, dtype=float)
    if a.shape != b.shape:
        raise SystemExit(f"{label}: shapes differ, ours {a.shape} vs reference {b.shape}")
    if not np.all(np.isfinite(a)) or not np.all(np.isfinite(b)):
        raise SystemExit(f"{label}: non-finite values in the comparison")
    if not np.allclose(a, b, rtol=RTOL, atol=0.0):
        rel = np.abs(a - b) / np.maximum(np.abs(b), 1e-300)
        i = int(np.argmax(rel))
        raise SystemExit(f"{label}: engine and reference differ: largest relative difference "
                         f"{rel.flat[i]:.3g} at flat index {i} (ours {a.flat[i]!r}, "
                         f"reference {b.flat[i]!r})")
    rel = np.max(np.abs(a - b) / np.maximum(np.abs(b), 1e-300))
    return a.size, float(rel)


# ---------------------------------------------------------------------------------------------
# Plain-Python reference formulas
# ---------------------------------------------------------------------------------------------

#: A-weighting at octave nominal centres [dB], IEC 61672-1:2013, Table 3.
A_WEIGHT_DB = {63: -26.2, 125: -16.1, 250: -8.6, 500: -3.2, 1000: 0.0, 2000: 1.2,
               4000: 1.0, 8000: -1.1}
#: Position of each nominal octave relative to 1 kHz (IEC 61260-1:2014, 5.2: f_m = 1000 G^x).
OCTAVE_INDEX = {63: -4, 125: -3, 250: -2, 500: -1, 1000: 0, 2000: 1, 4000: 2, 8000: 3}
ALPHA_CAP = 0.99  # the cap the engine applies before ln(1 - alpha); the reference does the same


def py_exact_centre(nominal):
    """Exact mid-band frequency, IEC 61260-1:2014, 5.2 (base ten, G = 10^0.3)."""
    return 1000.0 * (10.0 ** 0.3) ** OCTAVE_INDEX[nominal]


def py_air_db_per_m(f, t_c, hr, pa):
    """ISO 9613-1:1993 eqs. (3)-(5), pure-tone attenuation [dB/m]."""
    pr = 101.325
    t = t_c + 273.15
    c_exp = -6.8346 * (273.16 / t) ** 1.261 + 4.6151
    h = hr * 10.0 ** c_exp / (pa / pr)
    tr = t / 293.15
    fro = (pa / pr) * (24.0 + 4.04e4 * h * (0.02 + h) / (0.391 + h))
    frn = (pa / pr) * tr ** -0.5 * (9.0 + 280.0 * h * math.exp(-4.170 * (tr ** (-1.0 / 3.0) - 1.0)))
    return 8.686 * f * f * (1.84e-11 * (pr / pa) * tr ** 0.5
                            + tr ** -2.5 * (0.01275 * math.exp(-2239.1 / t) / (fro + f * f / fro)
                                            + 0.1068 * math.exp(-3352.0 / t) / (frn + f * f / frn)))


def py_db(x):
    return 10.0 * math.log10(x)


def py_dba(levels, bands):
    return py_db(sum(10.0 ** ((lv + A_WEIGHT_DB[b]) / 10.0) for lv, b in zip(levels, bands)))


def reference_room(spec):
    """Everything case (a) compares, by loops over bands, surfaces, sources and receivers."""
    bands = spec["bands"]
    v = spec["volume"]
    t_c, hr, pa = spec["air"]
    c = 331.3 * math.sqrt(1.0 + t_c / 273.15)
    k_sab = 24.0 * math.log(10.0) / c
    surfaces = spec["surfaces"]  # (area, count, [alpha per band], axis 0/1/2, face name)
    s_tot = 0.0
    s_axis = [0.0, 0.0, 0.0]
    for area, count, _, ax, _ in surfaces:
        s_tot += area * count
        s_axis[ax] += area * count
    out = {k: [] for k in ("att", "m", "mean_alpha", "sabine", "eyring", "millington",
                           "fitzroy", "arau_puchades", "room_constant")}
    for ib, band in enumerate(bands):
        att = py_air_db_per_m(py_exact_centre(band), t_c, hr, pa)
        m = att / (10.0 * math.log10(math.e))
        a_obj = 0.0
        for count, absorption in spec["objects"]:
            a_obj += count * absorption[ib]
        a_surf = 0.0
        a_log = 0.0
        mill = 0.0
        ax_abs = [0.0, 0.0, 0.0]
        for area, count, alpha, ax, _ in surfaces:
            s_i = area * count
            al = min(alpha[ib], ALPHA_CAP)
            a_surf += s_i * alpha[ib]
            a_log += s_i * al
            mill += -s_i * math.log1p(-al)
            ax_abs[ax] += s_i * al
        a_tot = a_surf + a_obj
        a_log += a_obj
        air = 4.0 * m * v
        abar = min(a_log / s_tot, ALPHA_CAP)
        fitz = 0.0
        log_arau = 0.0
        for x in range(3):
            ax_alpha = min(ax_abs[x] / s_axis[x] + a_obj / s_tot, ALPHA_CAP)
            t_x = k_sab * v / (-s_tot * math.log1p(-ax_alpha) + air)
            fitz += s_axis[x] / s_tot * t_x
            log_arau += s_axis[x] / s_tot * math.log(t_x)
        abar_t = min((a_log + air) / s_tot, ALPHA_CAP)
        out["att"].append(att)
        out["m"].append(m)
        out["mean_alpha"].append(a_tot / s_tot)
        out["sabine"].append(k_sab * v / (a_tot + air))
        out["eyring"].append(k_sab * v / (-s_tot * math.log1p(-abar) + air))
        out["millington"].append(k_sab * v / (mill + a_obj + air))
        out["fitzroy"].append(fitz)
        out["arau_puchades"].append(math.exp(log_arau))
        out["room_constant"].append(s_tot * abar_t / (1.0 - abar_t))
    r_const = out["room_constant"]
    out["critical_distance"] = [[math.sqrt(q * r / (16.0 * math.pi)) for r in r_const]
                                for _, q, _ in spec["sources"]]
    rec = {k: [] for k in ("total", "direct", "reverberant", "total_dba", "direct_dba",
                           "reverberant_dba", "per_source")}
    for r_pos in spec["receivers"]:
        e_dir = [0.0] * len(bands)
        e_rev = [0.0] * len(bands)
        per_source = []
        for lw, q, s_pos in spec["sources"]:
            dist = math.dist(r_pos, s_pos)
            direct = q / (4.0 * math.pi * dist * dist)
            row = []
            for ib in range(len(bands)):
                power = 10.0 ** (lw[ib] / 10.0)
                d = direct * power
                rv = 4.0 / r_const[ib] * power
                e_dir[ib] += d
                e_rev[ib] += rv
                row.append(py_db(d + rv))
            per_source.append(row)
        total = [py_db(d + rv) for d, rv in zip(e_dir, e_rev)]
        direct_db = [py_db(d) for d in e_dir]
        rev_db = [py_db(rv) for rv in e_rev]
        rec["total"].append(total)
        rec["direct"].append(direct_db)
        rec["reverberant"].append(rev_db)
        rec["total_dba"].append(py_dba(total, bands))
        rec["direct_dba"].append(py_dba(direct_db, bands))
        rec["reverberant_dba"].append(py_dba(rev_db, bands))
        rec["per_source"].append(per_source)
    out.update(rec)
    return out


def reference_batch(volumes, areas, alphas, a_obj, m, c=343.0):
    """Sabine, Eyring, Millington-Sette and room constant, per room and per band."""
    k_sab = 24.0 * math.log(10.0) / c
    sab, eyr, mil, rc = [], [], [], []
    for n in range(len(volumes)):
        v = volumes[n]
        s_i = areas[n]
        al = alphas[n]
        s = 0.0
        for x in s_i:
            s += x
        row_s, row_e, row_m, row_r = [], [], [], []
        for b in range(len(m)):
            a = a_obj[n][b]
            ln_sum = a_obj[n][b]
            for i in range(len(s_i)):
                a += s_i[i] * al[i][b]
                ln_sum += -s_i[i] * math.log1p(-al[i][b])
            air = 4.0 * m[b] * v
            row_s.append(k_sab * v / (a + air))
            row_e.append(k_sab * v / (-s * math.log1p(-a / s) + air))
            row_m.append(k_sab * v / (ln_sum + air))
            at = (a + air) / s
            row_r.append(s * at / (1.0 - at))
        sab.append(row_s)
        eyr.append(row_e)
        mil.append(row_m)
        rc.append(row_r)
    return {"sabine": sab, "eyring": eyr, "millington": mil, "room_constant": rc}


def reference_curves(spec, r_const, distances):
    """Direct, reverberant and total level against distance for every source and band."""
    bands = spec["bands"]
    out = []
    for lw, q, _ in spec["sources"]:
        tot, dr, rv = [], [], []
        for r in distances:
            d = q / (4.0 * math.pi * r * r)
            t_row, d_row, r_row = [], [], []
            for ib in range(len(bands)):
                rev = 4.0 / r_const[ib]
                t_row.append(lw[ib] + py_db(d + rev))
                d_row.append(lw[ib] + py_db(d))
                r_row.append(lw[ib] + py_db(rev))
            tot.append(t_row)
            dr.append(d_row)
            rv.append(r_row)
        out.append({
            "total_db": tot, "direct_db": dr, "reverberant_db": rv,
            "total_dba": [py_dba(x, bands) for x in tot],
            "direct_dba": [py_dba(x, bands) for x in dr],
            "reverberant_dba": [py_dba(x, bands) for x in rv],
            "critical_distance_m": [math.sqrt(q * r / (16.0 * math.pi)) for r in r_const],
        })
    return out


# ---------------------------------------------------------------------------------------------
# Inputs (a benchmark scenario of our own, random with a fixed seed; not a real room)
# ---------------------------------------------------------------------------------------------

FACE_NAMES = (("front", 0), ("back", 0), ("left", 1), ("right", 1), ("floor", 2), ("ceiling", 2))


def make_room_spec(n_surfaces=200, n_sources=20, n_receivers=50, seed=SEED):
    """A 14 x 9 x 4.5 m box whose six faces are split into ``n_surfaces`` patches that add up to
    the box area, with random coefficients, a few objects, sources and receivers."""
    rnd = random.Random(seed)
    L, W, H = 14.0, 9.0, 4.5
    face_area = {"front": W * H, "back": W * H, "left": L * H, "right": L * H,
                 "floor": L * W, "ceiling": L * W}
    per_face = [n_surfaces // 6 + (1 if i < n_surfaces % 6 else 0) for i in range(6)]
    surfaces = []
    for (face, ax), n in zip(FACE_NAMES, per_face):
        weights = [rnd.uniform(0.2, 1.0) for _ in range(n)]
        tot = sum(weights)
        for w in weights:
            patch = face_area[face] * w / tot
            count = rnd.choice((1, 1, 1, 2))
            alpha = [rnd.uniform(0.01, 0.45) for _ in BANDS]
            surfaces.append((patch / count, count, alpha, ax, face))
    objects = [(rnd.choice((1, 2, 6)), [rnd.uniform(0.05, 0.9) for _ in BANDS]) for _ in range(5)]

    def point():
        return (rnd.uniform(0.3, L - 0.3), rnd.uniform(0.3, W - 0.3), rnd.uniform(0.3, H - 0.3))

    sources = [([rnd.uniform(70.0, 95.0) for _ in BANDS], rnd.choice((1.0, 2.0, 4.0, 8.0)), point())
               for _ in range(n_sources)]
    receivers = []
    while len(receivers) < n_receivers:
        p = point()
        if all(math.dist(p, s[2]) >= 0.5 for s in sources):
            receivers.append(p)
    return {"bands": BANDS, "volume": L * W * H, "dimensions": (L, W, H),
            "air": (22.0, 40.0, 101.325), "surfaces": surfaces, "objects": objects,
            "sources": sources, "receivers": receivers}


def room_from_spec(spec):
    t, hr, pa = spec["air"]
    return Room(
        bands_hz=spec["bands"], volume=spec["volume"], dimensions=spec["dimensions"],
        air=Air(t, hr, pa),
        surfaces=tuple(Surface(f"patch {i}", area, alpha, count=count, face=face)
                       for i, (area, count, alpha, _, face) in enumerate(spec["surfaces"])),
        objects=tuple(RoomObject(f"object {i}", absorption, count=count)
                      for i, (count, absorption) in enumerate(spec["objects"])),
        sources=tuple(Source(f"source {i}", lw, directivity=q, position=pos)
                      for i, (lw, q, pos) in enumerate(spec["sources"])),
        receivers=tuple(Receiver(f"receiver {i}", position=pos)
                        for i, pos in enumerate(spec["receivers"])),
        title="benchmark box (random, fixed seed)")


def flatten_result(res):
    """The numbers of a RoomResult that case (a) compares, in the reference's layout."""
    methods = ("sabine", "eyring", "millington", "fitzroy", "arau_puchades")
    return {
        "att": res.air_attenuation_db_per_m, "m": res.air_m_per_m, "mean_alpha": res.mean_alpha,
        **{k: res.rt60_s[k] for k in methods},
        "room_constant": res.room_constant_m2,
        "critical_distance": [s.critical_distance_m for s in res.sources],
        "total": [r.level_db for r in res.receivers],
        "direct": [r.direct_db for r in res.receivers],
        "reverberant": [r.reverberant_db for r in res.receivers],
        "total_dba": [r.level_dba for r in res.receivers],
        "direct_dba": [r.direct_dba for r in res.receivers],
        "reverberant_dba": [r.reverberant_dba for r in res.receivers],
        "per_source": [[r.per_source_db[s.name] for s in res.sources] for r in res.receivers],
    }


# ---------------------------------------------------------------------------------------------
# Cases
# ---------------------------------------------------------------------------------------------


def case_a(spec, room):
    res = evaluate(room)
    if "fitzroy" not in res.rt60_s or "arau_puchades" not in res.rt60_s:
        raise SystemExit(f"case (a): Fitzroy/Arau-Puchades did not run: {res.unavailable}")
    ours, ref = flatten_result(res), reference_room(spec)
    n = worst = 0
    for key in ref:
        k, w = check_same(f"case (a) {key}", ours[key], ref[key])
        n, worst = n + k, max(worst, w)
    print(f"(a) checked {n} numbers equal (largest relative difference {worst:.1e})")
    t_ours = median_time(lambda: evaluate(room))
    t_ref = median_time(lambda: reference_room(spec))
    return t_ours, t_ref, res, ref


def make_batch(n_rooms=10_000, seed=SEED, n_materials=100):
    """10,000 box rooms of 12 surfaces each, every surface one of a table of materials (as
    a facilities office would describe its classrooms from one catalogue)."""
    rng = np.random.default_rng(seed)
    dims = rng.uniform([2.5, 2.0, 2.2], [30.0, 20.0, 8.0], size=(n_rooms, 3))
    L, W, H = dims.T
    volume = L * W * H
    faces = np.stack([W * H, W * H, L * H, L * H, L * W, L * W], axis=1)
    split = rng.uniform(0.2, 0.8, size=(n_rooms, 6))
    areas = np.concatenate([faces * split, faces * (1.0 - split)], axis=1)        # (N, 12)
    table = rng.uniform(0.01, 0.6, size=(n_materials, len(BANDS)))
    material = rng.integers(0, n_materials, size=(n_rooms, 12))
    s_tot = areas.sum(axis=1)
    a_obj = rng.uniform(0.0, 0.05, size=(n_rooms, len(BANDS))) * s_tot[:, None]
    m = np.array([py_air_db_per_m(py_exact_centre(b), 20.0, 50.0, 101.325) for b in BANDS])
    m = m / (10.0 * math.log10(math.e))
    return volume, areas, material, table, a_obj, m


def case_b():
    volume, areas, material, table, a_obj, m = make_batch()
    alphas = table[material]                                                       # (N, 12, B)
    # The reference loop looks each surface's alpha up in the same table, per band.
    py_alphas = [[table_row for table_row in (table.tolist()[j] for j in row)]
                 for row in material.tolist()]
    py_in = (volume.tolist(), areas.tolist(), py_alphas, a_obj.tolist(), m.tolist())
    ours = batch_reverberation_by_material(volume, areas, material, table,
                                           object_absorption=a_obj, m=m)
    generic = batch_reverberation(volume, areas, alphas, object_absorption=a_obj, m=m)
    ref = reference_batch(*py_in)
    n = worst = 0
    for key in ref:
        k, w = check_same(f"case (b) {key}", ours[key], ref[key])
        n, worst = n + k, max(worst, w)
        check_same(f"case (b') {key}", generic[key], ref[key])
    print(f"(b) checked {n} numbers equal (largest relative difference {worst:.1e}); "
          "the per-surface batch too")
    t_ours = median_time(lambda: batch_reverberation_by_material(
        volume, areas, material, table, object_absorption=a_obj, m=m))
    t_generic = median_time(lambda: batch_reverberation(volume, areas, alphas,
                                                        object_absorption=a_obj, m=m))
    t_ref = median_time(lambda: reference_batch(*py_in), repeat=5, number=1)
    return t_ours, t_ref, t_generic, (volume, areas, material, table, a_obj, m)


def case_c(spec, res, ref_a, points=500):
    L = max(spec["dimensions"]) * 1.2
    distances = [0.1 * (L / 0.1) ** (i / (points - 1)) for i in range(points)]
    names = [s.name for s in res.room.sources]

    def ours():
        return [distance_curves(res, name, distances) for name in names]

    r_const = ref_a["room_constant"]
    got, want = ours(), reference_curves(spec, r_const, distances)
    n = worst = 0
    for j, (g, w_) in enumerate(zip(got, want)):
        for key in w_:
            k, w = check_same(f"case (c) source {j} {key}", g[key], w_[key])
            n, worst = n + k, max(worst, w)
    print(f"(c) checked {n} numbers equal (largest relative difference {worst:.1e})")
    t_ours = median_time(ours)
    t_ref = median_time(lambda: reference_curves(spec, r_const, distances), repeat=5)
    return t_ours, t_ref, ours


REPORT_CMD = [sys.executable, "-m", "roomcalc", "report", "example_rooms/garage-studio.toml"]
BARE_CMD = [sys.executable, "-c", "import numpy, scipy"]


def _run(cmd, env=None):
    t0 = time.perf_counter()
    proc = subprocess.run(cmd, cwd=ROOT, env=env, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    t = time.perf_counter() - t0
    if proc.returncode != 0:
        raise SystemExit(f"case (d): {' '.join(cmd[1:])} exited {proc.returncode}:\n"
                         f"{proc.stderr.decode(errors='replace')}")
    return t


def case_d(runs=7):
    """Median wall time of the report command and of the bare interpreter, as this environment
    runs them; and the report again with bytecode caching allowed (as an installed program runs),
    its cache in a temporary folder so nothing is written into the source tree."""
    out = subprocess.run(REPORT_CMD, cwd=ROOT, capture_output=True, text=True)
    if out.returncode != 0 or "Sabine" not in out.stdout:
        raise SystemExit(f"case (d): the report did not run: {out.stderr}")
    print(f"(d) report runs ({len(out.stdout.splitlines())} lines of output); "
          f"PYTHONDONTWRITEBYTECODE is {'set' if os.environ.get('PYTHONDONTWRITEBYTECODE') else 'unset'}")
    with tempfile.TemporaryDirectory(prefix="roomcalc-bench-pyc-") as cache:
        cached_env = dict(os.environ, PYTHONPYCACHEPREFIX=cache)
        cached_env.pop("PYTHONDONTWRITEBYTECODE", None)
        _run(BARE_CMD)                       # warm the file cache
        _run(REPORT_CMD, cached_env)         # fill the bytecode cache
        ours, bare, cached = [], [], []
        for _ in range(runs):                # interleaved, so drift in the machine hits all alike
            ours.append(_run(REPORT_CMD))
            bare.append(_run(BARE_CMD))
            cached.append(_run(REPORT_CMD, cached_env))
    return statistics.median(ours), statistics.median(bare), statistics.median(cached)


# ---------------------------------------------------------------------------------------------
# Profiling (only with --profile, for cases that miss their target)
# ---------------------------------------------------------------------------------------------


def profile_call(label, fn, calls, top=14):
    prof = cProfile.Profile()
    prof.enable()
    for _ in range(calls):
        fn()
    prof.disable()
    stream = io.StringIO()
    stats = pstats.Stats(prof, stream=stream)
    total = stats.total_tt
    rows = []
    for (file, line, func), (cc, nc, tt, ct, _) in stats.stats.items():
        rows.append((tt, ct, nc, f"{Path(file).name}:{line}({func})"))
    rows.sort(reverse=True)
    print(f"\nprofile {label}: {calls} calls, {total / calls * 1e3:.2f} ms per call under cProfile")
    print(f"  {'own %':>6} {'cum %':>6} {'calls/run':>10}  function")
    for tt, ct, nc, name in rows[:top]:
        print(f"  {100 * tt / total:6.1f} {100 * ct / total:6.1f} {nc / calls:10.0f}  {name}")


def profile_imports(top=14):
    """Import times of the report command (python -X importtime), largest cumulative first."""
    proc = subprocess.run([sys.executable, "-X", "importtime"] + REPORT_CMD[1:], cwd=ROOT,
                          stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    rows = []
    for line in proc.stderr.splitlines():
        if not line.startswith("import time:") or "self [us]" in line:
            continue
        self_us, cum_us, name = line[len("import time:"):].split("|")
        name = name[1:]                                  # one space, then two per nesting level
        depth = (len(name) - len(name.lstrip())) // 2
        rows.append((int(cum_us), int(self_us), depth, name.strip()))
    top_level = sorted((r for r in rows if r[2] == 0), reverse=True)
    total = sum(r[0] for r in top_level)
    print(f"\nimports of the report command: {total / 1e3:.0f} ms in all (-X importtime, top level)")
    for cum, self_us, _, name in top_level[:top]:
        print(f"  {cum / 1e3:8.1f} ms cumulative {self_us / 1e3:7.1f} ms own  {name}")
    heavy = sorted(rows, key=lambda r: -r[1])[:top]
    print("  largest own import times, any depth:")
    for cum, self_us, depth, name in heavy:
        print(f"  {self_us / 1e3:8.1f} ms own  {name} (depth {depth})")
    scipy_loaded = any(r[3] == "scipy" for r in rows)
    print(f"  scipy imported by the report command: {'yes' if scipy_loaded else 'no'}")


# ---------------------------------------------------------------------------------------------


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--profile", action="store_true",
                   help="profile each case that misses its target (cProfile / -X importtime)")
    args = p.parse_args(argv)
    os.chdir(ROOT)
    t_start = time.perf_counter()
    print(f"roomcalc benchmark: Python {platform.python_version()}, numpy {np.__version__}, "
          f"{os.cpu_count()} CPUs, {platform.machine()}")

    spec = make_room_spec()
    room = room_from_spec(spec)
    print(f"(a) room: {len(room.surfaces)} surfaces, {len(room.objects)} objects, "
          f"{len(room.sources)} sources, {len(room.receivers)} receivers, {len(BANDS)} bands")
    ta, ta_ref, res, ref_a = case_a(spec, room)
    tb, tb_ref, tb_generic, batch_in = case_b()
    tc, tc_ref, curves = case_c(spec, res, ref_a)
    td, td_bare, td_cached = case_d()

    rows = [
        # case, ours, reference, ratio (reference / ours, or ours / bare for d), target, met
        ("(a) evaluate, 200 surf x 20 src x 50 rcv", ta, ta_ref, ta_ref / ta,
         "ours < 2 ms", ta < 2e-3),
        ("(b) batch by material, 10000 rooms", tb, tb_ref, tb_ref / tb,
         "ratio >= 50", tb_ref / tb >= 50.0),
        ("(b') batch per surface, 10000 rooms", tb_generic, tb_ref, tb_ref / tb_generic,
         "(info)", None),
        ("(c) distance_curves, 20 src x 500 pts", tc, tc_ref, tc_ref / tc, "(none)", None),
        # pip compiles bytecode when it installs roomcalc, so the installed command runs with
        # a bytecode cache: that is the case the target is for.
        ("(d) report (as installed) vs import numpy,scipy", td_cached, td_bare,
         td_cached / td_bare, "ratio <= 1.5", td_cached / td_bare <= 1.5),
        ("(d') the same, no bytecode cache", td, td_bare, td / td_bare, "(info)", None),
    ]
    print()
    print("ratio: reference loop / ours for (a)-(c) (higher is faster); "
          "report / bare interpreter for (d) (lower is better)")
    head = f"{'case':44} {'ours median':>12} {'ref median':>12} {'ratio':>8}  {'target':13} met"
    print(head)
    print("-" * len(head))
    for name, t_o, t_r, ratio, target, met in rows:
        met_s = "-" if met is None else ("yes" if met else "NO")
        print(f"{name:44} {fmt_time(t_o):>12} {fmt_time(t_r):>12} {ratio:7.2f}x  {target:13} {met_s}")
    print(f"\ntotal benchmark time {time.perf_counter() - t_start:.1f} s")

    missed = [r[0][:3] for r in rows if r[5] is False]
    if missed and not args.profile:
        print(f"targets missed: {', '.join(missed)}; run with --profile to see where the time goes")
    if args.profile:
        if "(a)" in missed:
            profile_call("(a) evaluate(room)", lambda: evaluate(room), 200)
        if "(b)" in missed:
            volume, areas, material, table, a_obj, m = batch_in
            profile_call("(b) batch_reverberation_by_material",
                         lambda: batch_reverberation_by_material(
                             volume, areas, material, table, object_absorption=a_obj, m=m), 20)
        if "(d)" in missed:
            profile_imports()
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
