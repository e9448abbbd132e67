"""The recovery writer (roomcalc/tui/recovery.py), without the interface: one write at a time,
the newest text wins, requests for different rooms are all done, a snapshot does not follow
later edits."""

from __future__ import annotations

import threading
import time

from roomcalc.tui import recovery
from roomcalc.tui.document import Document
from roomcalc.tui.recovery import RecoveryWriter, find_recovery, find_recoveries


def test_writes_never_overlap_and_the_newest_text_wins(room_file):
    room = room_file("classroom.toml")
    state = {"now": 0, "most": 0, "made": 0}
    lock = threading.Lock()

    def slow(i):
        def make():
            with lock:
                state["now"] += 1
                state["most"] = max(state["most"], state["now"])
                state["made"] += 1
            time.sleep(0.01)            # a slow disk
            with lock:
                state["now"] -= 1
            return f"title = 'edit {i}'\n"
        return make

    writer = RecoveryWriter()
    for i in range(100):
        writer.keep(room, slow(i))
    assert writer.flush(timeout=10)
    rec = find_recovery(room)
    assert rec is not None and rec.read_text() == "title = 'edit 99'\n"
    assert state["most"] == 1                 # never two at once
    assert state["made"] < 100                # older requests were dropped, not written
    writer.close()


def test_requests_keep_their_order_per_room_and_every_room_is_done(room_file, tmp_path):
    a = room_file("classroom.toml")
    b = room_file("workshop.toml")
    writer = RecoveryWriter(delay_s=0.2)      # both wait in the queue together
    writer.keep(a, "title = 'a'\n")
    writer.keep(b, "title = 'b'\n")
    writer.discard(a)                         # the newer request for a: nothing to keep
    assert writer.flush()
    assert find_recoveries(a) == [] and find_recovery(b).read_text() == "title = 'b'\n"
    writer.close()
    writer.keep(a, "title = 'after close'\n")     # closed: done on the caller's thread
    assert writer.flush() and find_recovery(a).read_text() == "title = 'after close'\n"


def test_status_is_reported_when_it_changes(room_file, monkeypatch):
    room = room_file("classroom.toml")
    seen = []
    writer = RecoveryWriter(seen.append)
    real = recovery.write_text_atomic
    monkeypatch.setattr(recovery, "write_text_atomic",
                        lambda p, t: (_ for _ in ()).throw(OSError(28, "No space left")))
    writer.keep(room, "x = 1\n")
    writer.flush()
    writer.keep(room, "x = 2\n")              # still failing: not told twice
    writer.flush()
    monkeypatch.setattr(recovery, "write_text_atomic", real)
    writer.keep(room, "x = 3\n")
    writer.flush()
    assert [s.kind for s in seen] == ["failed", "ok"]
    assert "No space left" in seen[0].message and "lost" in seen[0].message
    writer.close()


def test_text_later_reads_a_snapshot(room_file):
    doc = Document.open(room_file("classroom.toml"))
    doc.change(lambda s: setattr(s, "title", "first"), "title")
    make = doc.text_later()
    want = doc.text
    doc.change(lambda s: setattr(s, "title", "second"), "title")
    doc.spec.surfaces[0].area = 123.0
    assert make() == want and "second" not in make()
    assert doc.text != want


def test_steady_requests_do_not_put_the_write_off(room_file):
    """With a delay, the write comes at most that long after the first request not yet done,
    even while newer requests keep coming (a user typing without a pause)."""
    room = room_file("classroom.toml")
    writer = RecoveryWriter(delay_s=0.1)
    end = time.monotonic() + 5.0
    i = 0
    while writer.last_write is None and time.monotonic() < end:
        writer.keep(room, f"n = {i}\n")
        i += 1
        time.sleep(0.01)
    assert writer.last_write is not None and time.monotonic() < end
    writer.close()
