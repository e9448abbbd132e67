"""Saving survives a kill at any moment.

A child process saves a room file in a loop, alternating between two versions of the room, and
is killed (SIGKILL, as a crash or a power cut would stop it) at a random moment. After each
kill the file must be the old version or the new one, complete, never a mix or a part; and the
next save must leave no temporary file behind.

Two savers: the interface's own save (``Document.save``: the room's text made from the spec,
then written atomically) and the atomic writer alone with large texts (a 2,000-surface room),
whose writes last long enough for many kills to land inside them.

CI runs ``CRASH_TRIALS`` trials (60 by default); ``ROOMCALC_CRASH_TRIALS=1000`` is the long
version. See docs/validation.md, "Reliability".
"""

from __future__ import annotations

import os
import random
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from roomcalc.io.atomic import write_text_atomic
from roomcalc.io.roomfile import parse_spec, spec_to_toml
from roomcalc.tui.document import Document

from conftest import EXAMPLES

pytestmark = pytest.mark.skipif(not hasattr(signal, "SIGKILL"), reason="needs POSIX signals")

CRASH_TRIALS = int(os.environ.get("ROOMCALC_CRASH_TRIALS", "60"))
ROOT = Path(__file__).resolve().parent.parent

# The child: reads the two texts, says it is ready, then saves them in turn until killed.
ATOMIC_SAVER = """
import sys
from pathlib import Path
from roomcalc.io.atomic import write_text_atomic
target, a, b = Path(sys.argv[1]), Path(sys.argv[2]).read_text(), Path(sys.argv[3]).read_text()
print("ready", flush=True)
while True:
    write_text_atomic(target, b)
    write_text_atomic(target, a)
"""

DOCUMENT_SAVER = """
import sys
from pathlib import Path
from roomcalc.tui.document import Document
doc = Document.open(sys.argv[1])
first = doc.spec.title
print("ready", flush=True)
i = 0
while True:
    i += 1
    doc.change(lambda s: setattr(s, "title", first + " (edited)" if i % 2 else first), "title")
    doc.save()
"""


def _big_room_text(n: int) -> str:
    """A room of n surfaces (the large-room case of the reliability run)."""
    spec = parse_spec((EXAMPLES / "workshop.toml").read_text(encoding="utf-8"), "workshop")
    base = spec.surfaces[0]
    spec.surfaces = [type(base)(name=f"Panel {i}", area=0.5, material="plaster-on-masonry")
                     for i in range(n)]
    return spec_to_toml(spec)


def _leftovers(folder: Path, target: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir()
                  if p.name.startswith(f".{target.name}.") and p.name.endswith(".tmp"))


def _kill_at_random(script: str, args: list[str], rng: random.Random, max_delay_s: float):
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    child = subprocess.Popen([sys.executable, "-c", script, *args], stdout=subprocess.PIPE,
                             env=env, cwd=ROOT)
    try:
        assert child.stdout.readline().strip() == b"ready"
        time.sleep(rng.uniform(0.0, max_delay_s))
    finally:
        child.send_signal(signal.SIGKILL)
        child.wait()
        child.stdout.close()


def test_a_killed_save_leaves_the_old_or_the_new_file_whole(tmp_path):
    rng = random.Random(9)        # fixed seed: the same kill moments on every run
    a = _big_room_text(2000)
    b = a.replace("Panel", "Board")
    assert len(a) > 100_000 and a != b
    (tmp_path / "a.txt").write_text(a)
    (tmp_path / "b.txt").write_text(b)
    target = tmp_path / "room.toml"
    target.write_text(a)
    seen = {"a": 0, "b": 0}
    for _ in range(CRASH_TRIALS):
        _kill_at_random(ATOMIC_SAVER, [str(target), str(tmp_path / "a.txt"),
                                       str(tmp_path / "b.txt")], rng, 0.08)
        text = target.read_text()
        assert text in (a, b), f"a killed save left {len(text)} characters, neither version"
        seen["a" if text == a else "b"] += 1
        # The next save (here in this process) clears what the killed one left.
        write_text_atomic(target, text)
        assert _leftovers(tmp_path, target) == []
    # The kills landed at different moments: both versions were found (else the test proves
    # little).
    assert seen["a"] and seen["b"], seen


def test_a_killed_interface_save_leaves_a_readable_room(tmp_path):
    rng = random.Random(90)
    target = tmp_path / "classroom.toml"
    original = (EXAMPLES / "classroom.toml").read_text(encoding="utf-8")
    target.write_text(original, encoding="utf-8")
    title = parse_spec(original, "x").title
    titles = set()
    for _ in range(max(CRASH_TRIALS // 6, 10)):
        _kill_at_random(DOCUMENT_SAVER, [str(target)], rng, 0.05)
        doc = Document.open(target)          # complete and valid, whichever version it is
        assert doc.spec.title in (title, title + " (edited)")
        titles.add(doc.spec.title)
        doc.change(lambda s: setattr(s, "title", title), "title")
        doc.save()
        assert _leftovers(tmp_path, target) == []
    assert len(titles) == 2, titles
