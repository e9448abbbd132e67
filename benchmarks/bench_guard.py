"""What the size and nesting guard of data files costs, and what it saves.

Run from the project root:

    python benchmarks/bench_guard.py

Cases (files made here, our own scenarios):

- (a) a room of 2,000 surfaces (about 200 kB): the guard (roomcalc.io.limits.guard_text)
  against parsing the same text with tomllib, median of 7 runs each. The ratio is the share
  the guard adds to reading a large room. No target; a few tenths is expected.
- (b) the hostile file of the reliability run: one dotted key of 40,000 parts (80 kB). The
  guard's refusal is timed, and tomllib on the same key shortened to 1,000, 2,000 and 4,000
  parts (the full key takes tens of seconds and gigabytes), to show the square law it avoids.
- (c) the worst files inside the limits: 4 MB of keys of 8 parts, and of arrays nested 8
  deep, guard then tomllib, timed once each, to show how long an accepted file can take.

Nothing here asserts a time: this is a measurement, not a test.
"""

from __future__ import annotations

import statistics
import sys
import time
import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from roomcalc.io import limits  # noqa: E402
from roomcalc.io.errors import RoomFileError  # noqa: E402


def median_time(fn, n=7) -> float:
    times = []
    for _ in range(n):
        t = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t)
    return statistics.median(times)


def fill(make, size: int) -> str:
    parts, total, i = [], 0, 0
    while True:
        x = make(i)
        if total + len(x) > size:
            return "".join(parts)
        parts.append(x)
        total += len(x)
        i += 1


def main() -> None:
    room = (ROOT / "example_rooms" / "workshop.toml").read_text(encoding="utf-8") + "".join(
        f'\n[[surfaces]]\nname = "Panel {i}"\narea = 0.5\nface = "left"\n'
        "alpha = [0.10, 0.25, 0.55, 0.80, 0.90, 0.85]\n" for i in range(2000))
    g = median_time(lambda: limits.guard_text(room, "big.toml"))
    p = median_time(lambda: tomllib.loads(room))
    print(f"(a) 2,000 surfaces, {len(room.encode()) / 1e3:.0f} kB: guard {g * 1e3:.1f} ms, "
          f"tomllib {p * 1e3:.1f} ms, guard / parse {g / p:.2f}")

    hostile = "a" + ".a" * 39999 + " = 1\n"
    t = time.perf_counter()
    try:
        limits.guard_text(hostile, "hostile.toml")
        print("(b) the hostile file was NOT refused")
    except RoomFileError as exc:
        dt = time.perf_counter() - t
        print(f"(b) hostile 80 kB key refused in {dt * 1e3:.2f} ms: {exc}")
    for n in (1000, 2000, 4000):
        key = "a" + ".a" * (n - 1) + " = 1\n"
        t = time.perf_counter()
        tomllib.loads(key)
        print(f"    tomllib on a key of {n:,} parts: {time.perf_counter() - t:.3f} s")

    size = limits.MAX_FILE_BYTES - 100
    k, d = limits.MAX_KEY_PARTS, limits.MAX_NESTING
    for name, text in (
            (f"keys of {k} parts", fill(lambda i: f"k{i}" + ".a" * (k - 1) + " = 1\n", size)),
            (f"arrays {d} deep", fill(lambda i: f"x{i} = " + "[" * d + "1" + "]" * d + "\n",
                                      size))):
        t = time.perf_counter()
        limits.guard_text(text, "worst.toml")
        g = time.perf_counter() - t
        t = time.perf_counter()
        tomllib.loads(text)
        p = time.perf_counter() - t
        print(f"(c) {len(text) / 2 ** 20:.1f} MB of {name}: guard {g:.2f} s, tomllib {p:.2f} s")


if __name__ == "__main__":
    main()
