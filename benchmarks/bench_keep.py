"""Saving an edited room over the text it was read from, keeping the user's comments: our writer
(roomcalc.io.roomfile.keep) against a round-trip TOML library (tomlkit), both against the plain
writer (spec_to_toml, which writes no comments) in the same run.

Run from the project root:

    python benchmarks/bench_keep.py          # about 20 s; tomlkit rows need `pip install tomlkit`

Rooms: the demo room (example_rooms/classroom.toml, with its comments) and an invented room of
2,000 surfaces (fixed seed) with a comment above every 10th surface and at the end of every 10th
material line. The edit: one surface's area changed.

Times (median of repeated runs, ms):
- plain: ``spec_to_toml(spec)``, the reference;
- ours, per edit: ``spec_to_toml_keeping(spec, original)`` with the original's reading kept
  (what the interface pays on every edit: it writes the room for the recovery file);
- ours, first: the same on a text not read before (reading the original included);
- tomlkit, first: ``tomlkit.parse(original)``, the value set, ``tomlkit.dumps`` (the least a
  tomlkit writer does on a text not read before);
- tomlkit, per edit: the value set in a kept document and ``tomlkit.dumps`` (the least it does
  per edit when the document is kept; a real writer would also have to find what changed).

Checks (yes/no), for both: the unchanged room written byte for byte; the changed room written
over its own output gives the same bytes; values read back exactly by ``tomllib`` (0.1, 1e-5,
1/3, whole numbers stay whole, a string with quotes, a backslash and letters beyond ASCII); the
comment above ``[target]`` kept when the receiver before it is deleted.

Target: ours, per edit, within tens of ms for the 2,000-surface room. Printed, never asserted.
"""

from __future__ import annotations

import random
import statistics
import sys
import time
import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from roomcalc.io.roomfile import (ShapeSpec, SurfaceSpec, parse_spec,  # noqa: E402
                                  spec_to_toml, spec_to_toml_keeping)

try:
    import tomlkit
except ImportError:             # the comparison rows are then left out
    tomlkit = None

EXAMPLES = ROOT / "example_rooms"


def median_ms(fn, repeat: int) -> float:
    times = []
    for i in range(repeat):
        t = time.perf_counter()
        fn(i)
        times.append(time.perf_counter() - t)
    return statistics.median(times) * 1e3


def big_room_text() -> str:
    """2,000 surfaces in a 40 x 30 x 8 m hall (an invented room), with comments."""
    rng = random.Random(7)
    spec = parse_spec((EXAMPLES / "workshop.toml").read_text(encoding="utf-8"))
    spec.title, spec.shape = "Benchmark hall, 2,000 surfaces (invented)", ShapeSpec(40, 30, 8)
    spec.candidates, spec.target = [], None
    mats = ["plaster-on-masonry", "concrete-block-unpainted", "window-glass-ordinary",
            "mineral-wool-50mm-48kg", "door-solid-wood"]
    spec.surfaces = [SurfaceSpec(name="Rest", face="floor", material=mats[0])] + [
        SurfaceSpec(name=f"Patch {i}", area=round(rng.uniform(0.1, 0.4), 3),
                    face=rng.choice(["front", "back", "left", "right"]),
                    material=rng.choice(mats)) for i in range(1999)]
    lines = []
    n = 0
    for line in spec_to_toml(spec).splitlines():
        if line == "[[surfaces]]":
            n += 1
            if n % 10 == 0:
                lines.append(f"# patch group {n // 10}: measured on site (invented)")
        if line.startswith("material =") and n % 10 == 0:
            line += "  # as built"
        lines.append(line)
    return "# An invented hall for timing.\n" + "\n".join(lines) + "\n"


def edit(spec):
    i = next(k for k, s in enumerate(spec.surfaces) if s.area is not None)
    spec.surfaces[i].area = round(spec.surfaces[i].area + 0.5, 3)
    return i


def tomlkit_edit(doc, i, area):
    doc["surfaces"][i]["area"] = area


def times(name: str, text: str, repeat: int) -> None:
    spec = parse_spec(text)
    i = edit(spec)
    area = spec.surfaces[i].area
    spec_to_toml_keeping(spec, text)        # the original read once, as on opening a file
    plain = median_ms(lambda _: spec_to_toml(spec), repeat)
    ours = median_ms(lambda _: spec_to_toml_keeping(spec, text), repeat)
    ours_first = median_ms(lambda k: spec_to_toml_keeping(spec, text + f"# run {k}\n"), repeat)
    rows = [("plain writer (reference)", plain), ("ours, per edit", ours),
            ("ours, first (text read)", ours_first)]
    if tomlkit is not None:
        def tk_first(_):
            doc = tomlkit.parse(text)
            tomlkit_edit(doc, i, area)
            return tomlkit.dumps(doc)
        kept = tomlkit.parse(text)
        tk_edit = median_ms(lambda _: (tomlkit_edit(kept, i, area), tomlkit.dumps(kept)),
                            repeat)
        rows += [("tomlkit, first (parse + dump)", median_ms(tk_first, max(3, repeat // 5))),
                 ("tomlkit, per edit (dump)", tk_edit)]
    print(f"\n{name}: {len(text.splitlines())} lines, {len(spec.surfaces)} surfaces")
    print(f"  {'writer':32} {'median ms':>10} {'x plain':>8}")
    for label, ms in rows:
        print(f"  {label:32} {ms:10.2f} {ms / plain:8.2f}")
    if tomlkit is not None:
        print(f"  tomlkit per edit / ours per edit: {rows[4][1] / ours:.1f}; "
              f"first: {rows[3][1] / ours_first:.1f}")


def checks() -> None:
    text = (EXAMPLES / "classroom.toml").read_text(encoding="utf-8")
    spec = parse_spec(text)
    value_spec = parse_spec(text)
    value_spec.surfaces[0].material = None
    value_spec.surfaces[0].alpha = [0.1, 1e-5, 1 / 3, 0.5, 0.7, 0.9]
    value_spec.title = 'A "quoted" title \\ with Zoë and – dashes'
    want = {"alpha": [0.1, 1e-5, 1 / 3, 0.5, 0.7, 0.9], "title": value_spec.title}

    def exact(out: str) -> bool:
        data = tomllib.loads(out)
        return data["surfaces"][0]["alpha"] == want["alpha"] and \
            data["title"] == want["title"] and type(data["objects"][0]["count"]) is int

    deleted = parse_spec(text)
    deleted.receivers.pop()
    ours_out = spec_to_toml_keeping(value_spec, text)
    result = {"ours": [
        spec_to_toml_keeping(spec, text) == text,
        spec_to_toml_keeping(value_spec, ours_out) == ours_out,
        exact(ours_out) and parse_spec(ours_out) == value_spec,
        "# What the room must reach" in spec_to_toml_keeping(deleted, text)]}
    if tomlkit is not None:
        doc = tomlkit.parse(text)
        del doc["surfaces"][0]["material"]
        doc["surfaces"][0]["alpha"] = want["alpha"]
        doc["title"] = want["title"]
        out = tomlkit.dumps(doc)
        gone = tomlkit.parse(text)
        del gone["receivers"][-1]
        result["tomlkit"] = [tomlkit.dumps(tomlkit.parse(text)) == text,
                             tomlkit.dumps(tomlkit.parse(out)) == out,
                             exact(out),
                             "# What the room must reach" in tomlkit.dumps(gone)]
    names = ["unchanged room byte for byte", "changed room stable on a second write",
             "values exact (0.1, 1e-5, 1/3, int, quotes, unicode)",
             "comment above [target] kept when the receiver before it is deleted"]
    print(f"\n  {'check':70} " + " ".join(f"{k:>8}" for k in result))
    for j, label in enumerate(names):
        print(f"  {label:70} " + " ".join(f"{'yes' if v[j] else 'NO':>8}"
                                          for v in result.values()))


def main() -> None:
    print("Saving with the user's comments kept: our writer and tomlkit against the plain "
          "writer")
    if tomlkit is None:
        print("(tomlkit is not installed: `pip install tomlkit` for its rows)")
    else:
        print(f"tomlkit {tomlkit.__version__}")
    times("demo room (classroom.toml)", (EXAMPLES / "classroom.toml").read_text("utf-8"), 200)
    times("2,000-surface room", big_room_text(), 15)
    checks()
    print("\nTarget: ours, per edit, within tens of ms for the 2,000-surface room.")


if __name__ == "__main__":
    main()
