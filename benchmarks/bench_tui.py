"""Speed of the terminal interface: edit to updated screen, and start-up to the first screen.

Run from the project root:

    python benchmarks/bench_tui.py

(1) Edit latency: in a headless Pilot session (120 x 40) a key that edits the room (``c``
copies the highlighted surface, ``x`` deletes the copy again), timed from the moment the app
takes the key event until the screen's last repaint caused by it has been composed (the
compositor's update, what a terminal is sent), median over 50 edits; for the demo room and for
a room of 100 surfaces and 10 sources. Beside it: the same for a key that edits nothing
(cursor down/up), and the share of the edit spent in the room check and the engine (the
screen's ``last_update_s``). The clock starts at the app, not at Pilot's ``press``: Pilot
itself waits for the process to go idle (sleeps of 20 ms at a time), which a real terminal
does not.
The app runs undisturbed meanwhile (a plain sleep, not Pilot's ``pause``, which would queue a
callback on every widget), and the screen updates are turned into the escape codes a terminal
would receive, so that their cost counts too.
(2) Start-up: ``roomcalc open FILE`` in a real terminal (tmux, 120 x 40), with a bytecode cache as
an installed program has, from the command's start until the reverberation table is on the
screen (capture-pane polled every 10 ms), median of 5. Beside it, the floor of the same harness:
a ``python -c`` that prints the same words.

(3) Edit to recovery file: for the same edits, the time from the app taking the key until the
recovery writer's thread has the room's text on disk (fsynced and renamed into place); and
the edit latency again with the writer idle, as the reference the writer must not slow down.

Targets: the screen is updated within 50 ms of an edit for the 100-surface room; start-up under
1 s; an edit's recovery file on disk within 200 ms. Printed, never asserted: this is a measurement, not a test.
"""

from __future__ import annotations

import asyncio
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from roomcalc.io.catalog import load_catalog  # noqa: E402
from roomcalc.io.roomfile import (ReceiverSpec, RoomSpec, ShapeSpec, SourceSpec,  # noqa: E402
                                  SurfaceSpec, face_areas, save_spec)
from roomcalc.tui.app import AppConfig, make_app  # noqa: E402
from roomcalc.tui.document import Document  # noqa: E402

FACES = ("floor", "ceiling", "front", "back", "left", "right")


def big_room(path: Path) -> Path:
    """100 surfaces, 10 sources, 10 receivers in a 20 x 15 x 6 m box (an invented test room)."""
    cat = load_catalog(include_user=False)
    mats = cat.ids("surface")[:25]
    L, W, H = 20.0, 15.0, 6.0
    face_area = face_areas((L, W, H))
    spec = RoomSpec(title="Benchmark hall, 100 surfaces", shape=ShapeSpec(L, W, H))
    for i in range(100):
        face = FACES[i % 6]
        n_on_face = len([j for j in range(100) if j % 6 == i % 6])
        spec.surfaces.append(SurfaceSpec(name=f"S{i}", face=face, material=mats[i % 25],
                                         area=round(face_area[face] / n_on_face, 4)))
    for k in range(10):
        spec.sources.append(SourceSpec(name=f"Src{k}", sound_power_dba=85.0 + k,
                                       spectrum="pink", placement="surface",
                                       position=[1.0 + k * 1.8, 2.0 + k, 1.0]))
        spec.receivers.append(ReceiverSpec(name=f"Rec{k}", position=[2.0 + k * 1.7, 12.0 - k, 1.2]))
    save_spec(spec, path)
    return path


async def edit_latency(doc: Document, edits: int = 50, row: int = 0, recovery: bool = True):
    """Median time from an edit key (or a key that edits nothing: cursor down/up) reaching the
    app to the last screen update it causes, and the median check+engine time, on surface
    ``row`` (one with its own area, so that its copy is a valid room); and the times from the
    edit key to its recovery file on disk (written, fsynced, renamed into place). With
    ``recovery=False`` the recovery writer waits an hour (the reference: no disk work at all
    during the edits)."""
    from textual import events

    app = make_app(doc, load_catalog(), AppConfig(recovery_delay_s=0.0 if recovery else 3600))
    times, engine, idle, to_disk = [], [], [], []
    async with app.run_test(size=(120, 40)) as pilot:
        while not app.settled:                  # start-up finished (see RoomApp._settle)
            await pilot.pause(0.1)
        screen = app.screen
        for _ in range(row):
            await pilot.press("down")
        await pilot.pause()
        key_at: list[float] = []
        frames: list[float] = []
        on_event = app.on_event

        async def timed_event(event):
            if isinstance(event, events.Key):
                key_at.append(time.perf_counter())
            return await on_event(event)

        display = app._display

        def timed_display(screen_, update):
            # Headless, Textual skips writing the update; a terminal gets it as escape codes:
            # make those here too, so that their cost is counted.
            display(screen_, update)
            if update is not None and hasattr(update, "render_segments"):
                update.render_segments(app.console)
            frames.append(time.perf_counter())

        app.on_event = timed_event
        app._display = timed_display

        async def one(key: str) -> float:
            key_at.clear()
            frames.clear()
            app.post_message(events.Key(key, key if len(key) == 1 else None))
            # A plain sleep: Pilot's pause() would queue a callback on every widget and
            # slow the very thing measured.
            await asyncio.sleep(0.25)
            return frames[-1] - key_at[0]

        for i in range(20):
            idle.append(await one("down" if i % 2 == 0 else "up"))
        for i in range(edits):
            times.append(await one("c" if i % 2 == 0 else "x"))   # copy the row, delete it
            engine.append(screen.last_update_s)
            # The copy leaves the room modified: its recovery file is written. (The delete
            # brings it back to the file as opened: the recovery file is removed.)
            written = app.recovery.last_write
            if recovery and i % 2 == 0:
                assert written is not None and written[0] >= key_at[0], "not written"
                to_disk.append(written[1] - key_at[0])
        assert not screen.stale, screen.problems
    return (statistics.median(times), statistics.median(engine), statistics.median(idle),
            to_disk)


def startup(path: Path, runs: int = 5):
    if shutil.which("tmux") is None:
        return None
    out = []
    env = dict(os.environ)
    with tempfile.TemporaryDirectory() as data, tempfile.TemporaryDirectory() as pyc:
        env["ROOMCALC_DATA_DIR"] = data
        # As an installed program runs: with a bytecode cache (pip compiles one on install);
        # the cache goes in a temporary folder, filled by a first, untimed run.
        env["PYTHONPYCACHEPREFIX"] = pyc
        env.pop("PYTHONDONTWRITEBYTECODE", None)
        subprocess.run([sys.executable, "-c", "import roomcalc.tui.app, roomcalc.cli"],
                       env=env, check=True, cwd=ROOT)
        for k in range(runs):
            sock = f"rcbench{os.getpid()}{k}"
            cmd = f"{sys.executable} -m roomcalc open {path}"
            t0 = time.perf_counter()
            subprocess.run(["tmux", "-L", sock, "new-session", "-d", "-x", "120", "-y", "40",
                            cmd], env=env, check=True, cwd=ROOT)
            seen = None
            while time.perf_counter() - t0 < 20:
                screen = subprocess.run(["tmux", "-L", sock, "capture-pane", "-p"],
                                        capture_output=True, text=True).stdout
                if "Sabine" in screen and "f_S [Hz]" in screen:
                    seen = time.perf_counter() - t0
                    break
                time.sleep(0.01)
            subprocess.run(["tmux", "-L", sock, "kill-server"], capture_output=True)
            if seen is not None:
                out.append(seen)
    return statistics.median(out) if out else None


def harness_floor(runs: int = 5):
    """The same tmux harness on a program that prints the awaited words at once: what the
    measurement itself costs."""
    if shutil.which("tmux") is None:
        return None
    out = []
    cmd = f"{sys.executable} -c \"print('Sabine f_S [Hz]'); import time; time.sleep(5)\""
    for k in range(runs):
        sock = f"rcfloor{os.getpid()}{k}"
        t0 = time.perf_counter()
        subprocess.run(["tmux", "-L", sock, "new-session", "-d", "-x", "120", "-y", "40", cmd],
                       check=True)
        while time.perf_counter() - t0 < 10:
            screen = subprocess.run(["tmux", "-L", sock, "capture-pane", "-p"],
                                    capture_output=True, text=True).stdout
            if "f_S [Hz]" in screen:
                out.append(time.perf_counter() - t0)
                break
            time.sleep(0.01)
        subprocess.run(["tmux", "-L", sock, "kill-server"], capture_output=True)
    return statistics.median(out) if out else None


def bare_textual(runs: int = 5) -> float:
    """Median wall time of ``python -c "import textual.app"`` (with a bytecode cache): the floor
    under any start-up."""
    out = []
    with tempfile.TemporaryDirectory() as pyc:
        env = dict(os.environ, PYTHONPYCACHEPREFIX=pyc)
        env.pop("PYTHONDONTWRITEBYTECODE", None)
        subprocess.run([sys.executable, "-c", "import textual.app"], check=True, env=env)
        for _ in range(runs):
            t0 = time.perf_counter()
            subprocess.run([sys.executable, "-c", "import textual.app"], check=True, env=env)
            out.append(time.perf_counter() - t0)
    return statistics.median(out)


def main() -> int:
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        os.environ.setdefault("ROOMCALC_DATA_DIR", str(tmp / "data"))
        demo = tmp / "garage-studio.toml"
        shutil.copy(ROOT / "example_rooms" / "garage-studio.toml", demo)
        big = big_room(tmp / "big.toml")
        rows, disk, plain = [], [], []
        for label, path, row in (("demo room (7 surfaces, 2 sources)", demo, 4),
                                 ("100 surfaces, 10 sources", big, 0)):
            t, e, idle, to_disk = asyncio.run(edit_latency(Document.open(path), row=row))
            t0, _, _, _ = asyncio.run(edit_latency(Document.open(path), row=row,
                                                   recovery=False))
            rows.append((label, t, e, idle))
            disk.append((label, to_disk))
            plain.append(t0)
        t_start = startup(demo)
        t_floor = harness_floor()
        t_bare = bare_textual()
        print("edit -> screen updated (median of 50 edits, headless 120 x 40; from the app "
              "taking the key to the last repaint it causes)")
        print(f"{'room':36} {'edit':>9} {'no-edit key':>12} {'check+engine':>13} {'share':>6}"
              "  target")
        for label, t, e, idle in rows:
            target = "< 50 ms" if "100" in label else ""
            met = "" if not target else ("  met" if t < 0.05 else "  NOT met")
            print(f"{label:36} {t * 1e3:6.1f} ms {idle * 1e3:9.1f} ms {e * 1e3:10.2f} ms "
                  f"{100 * e / t:5.1f} %  {target}{met}")
        print("  no-edit key: cursor down/up, a key and the redraw of the moved cursor")
        print("  the same edits with the recovery writer idle (reference, no disk work): "
              + ", ".join(f"{t0 * 1e3:.1f} ms (ratio {t / t0:.2f})"
                          for t0, (_, t, _, _) in zip(plain, rows)))
        print("edit -> its recovery file on disk (written, fsynced, renamed; every copy edit, "
              "25 per room)")
        for label, to_disk in disk:
            print(f"{label:36} median {statistics.median(to_disk) * 1e3:6.1f} ms   "
                  f"max {max(to_disk) * 1e3:6.1f} ms  target < 200 ms  "
                  f"{'met' if max(to_disk) < 0.2 else 'NOT met'}")
        if t_start is None:
            print("start-up: tmux not available")
        else:
            print(f"start-up of 'roomcalc open' to the first full screen (median of 5): "
                  f"{t_start * 1e3:.0f} ms  target < 1000 ms  "
                  f"{'met' if t_start < 1.0 else 'NOT met'}")
            if t_floor is not None:
                print(f"  the harness alone (tmux, capture-pane) on a program that prints at "
                      f"once: {t_floor * 1e3:.0f} ms")
            print(f"  for scale: python -c 'import textual.app' alone takes {t_bare * 1e3:.0f} ms "
                  f"(ratio {t_start / t_bare:.2f})")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
