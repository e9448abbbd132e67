"""Tests in a real terminal: ``roomcalc open`` inside a detached tmux session (its own socket,
120x40), read back with capture-pane: the workshop example's numbers and Ctrl+Q; a save that
fails on quitting keeps roomcalc running with the reason; an edit survives a kill and "Not
now" keeps it.

Skipped only when tmux is not installed.
"""

from __future__ import annotations

import os
import re
import shlex
import shutil
import subprocess
import sys
import time
import uuid
from pathlib import Path

import pytest

from roomcalc.engine.analysis import METHOD_TITLES, evaluate
from roomcalc.io.roomfile import read_room

EXAMPLES = Path(__file__).resolve().parents[2] / "example_rooms"
TMUX = shutil.which("tmux")
NUMBER = re.compile(r"-?\d+\.\d+")


def _command() -> list[str]:
    exe = Path(sys.executable).with_name("roomcalc")
    if exe.exists():
        return [str(exe)]
    found = shutil.which("roomcalc")
    return [found] if found else [sys.executable, "-m", "roomcalc"]


def _row(screen: str, label: str) -> list[str]:
    """The numbers on the line of the reverberation table that starts with ``label``."""
    for line in screen.splitlines():
        right = line.split("│")[-1] if "│" in line else line
        if right.strip().lstrip("> ").startswith(label):
            return NUMBER.findall(right[right.index(label) + len(label):])
    return []


@pytest.mark.skipif(TMUX is None, reason="tmux is not installed")
def test_roomcalc_open_in_a_real_terminal(tmp_path, catalog):
    room = tmp_path / "workshop.toml"
    shutil.copyfile(EXAMPLES / "workshop.toml", room)
    data = tmp_path / "data"
    exit_file = tmp_path / "exit.txt"
    _, r = read_room(room, catalog)
    res = evaluate(r)

    sock = f"roomcalc-test-{uuid.uuid4().hex[:12]}"
    tmux = [TMUX, "-L", sock, "-f", os.devnull]
    # COLUMNS and LINES can reach the pane from tmux (80x24 when it was started without a
    # terminal); they would override the pane's real size.
    inner = (f"env -u COLUMNS -u LINES ROOMCALC_DATA_DIR={shlex.quote(str(data))} "
             f"{' '.join(shlex.quote(c) for c in _command())} open {shlex.quote(str(room))}; "
             f"echo EXIT=$? > {shlex.quote(str(exit_file))}")

    def capture() -> str:
        return subprocess.run(tmux + ["capture-pane", "-p", "-t", "rc"], capture_output=True,
                              text=True, timeout=10).stdout

    # remain-on-exit: the pane stays after the program ends, to look for a traceback.
    subprocess.run(tmux + ["new-session", "-d", "-s", "rc", "-x", "120", "-y", "40",
                           "sh", "-c", inner, ";", "set-option", "-t", "rc",
                           "remain-on-exit", "on"], check=True, timeout=10, cwd=tmp_path,
                   stdin=subprocess.DEVNULL)
    try:
        screen, deadline = "", time.monotonic() + 15
        last = res.sources[-1].name
        while time.monotonic() < deadline:
            screen = capture()
            if f"r_c {last}" in screen and "Sabine" in screen:
                break
            time.sleep(0.3)
        assert f"r_c {last}" in screen, screen

        # RT by Sabine at every band, and the critical distance of each source, as the engine
        # computes them from the same file.
        want = [f"{float(x):.2f}" for x in res.rt60_s["sabine"]]
        assert _row(screen, METHOD_TITLES["sabine"]) == want, screen
        for s in res.sources:
            label = f"r_c {s.name if len(s.name) <= 12 else s.name[:11] + '~'} [m]"
            assert _row(screen, label) == [f"{float(x):.2f}" for x in s.critical_distance_m], \
                screen
        # A loud workshop: the hearing caution is on the screen.
        assert "CAUTION" in screen and "hearing" in screen

        subprocess.run(tmux + ["send-keys", "-t", "rc", "C-q"], check=True, timeout=10)
        deadline = time.monotonic() + 10
        while time.monotonic() < deadline and not exit_file.exists():
            time.sleep(0.2)
        assert exit_file.exists(), capture()
        assert exit_file.read_text().strip() == "EXIT=0"
        after = capture()
        assert "Traceback" not in after and "Error" not in after, after
        assert not (data / "recovery").exists() or not any((data / "recovery").iterdir())
    finally:
        subprocess.run(tmux + ["kill-server"], capture_output=True, timeout=10)


def _wait(capture, test, seconds: float = 15.0) -> str:
    screen, deadline = "", time.monotonic() + seconds
    while time.monotonic() < deadline:
        screen = capture()
        if test(screen):
            return screen
        time.sleep(0.2)
    return screen


@pytest.mark.skipif(TMUX is None, reason="tmux is not installed")
def test_a_failed_save_on_quit_keeps_roomcalc_running(tmp_path, monkeypatch):
    """In a real terminal: the room's folder stops taking writes, an edit, Ctrl+Q at once,
    Enter on "Save": roomcalc keeps running with the reason on screen, and the edit is in the
    recovery file. Then Ctrl+Q, "Don't save" quits (exit 0) and removes it.

    As a regular user the folder is made read-only (chmod); as root, which writes into
    read-only folders anyway, the folder is replaced by a regular file (ENOTDIR for everyone).
    """
    from roomcalc.tui.document import Document
    from roomcalc.tui.recovery import find_recovery

    folder = tmp_path / "rooms"
    folder.mkdir()
    room = folder / "classroom.toml"
    shutil.copyfile(EXAMPLES / "classroom.toml", room)
    surfaces = len(Document.open(room).spec.surfaces)
    data = tmp_path / "data"
    monkeypatch.setenv("ROOMCALC_DATA_DIR", str(data))      # where this test looks, too
    exit_file = tmp_path / "exit.txt"
    sock = f"roomcalc-test-{uuid.uuid4().hex[:12]}"
    tmux = [TMUX, "-L", sock, "-f", os.devnull]
    inner = (f"env -u COLUMNS -u LINES ROOMCALC_DATA_DIR={shlex.quote(str(data))} "
             f"{' '.join(shlex.quote(c) for c in _command())} open {shlex.quote(str(room))}; "
             f"echo EXIT=$? > {shlex.quote(str(exit_file))}")

    def capture() -> str:
        return subprocess.run(tmux + ["capture-pane", "-p", "-t", "rc"], capture_output=True,
                              text=True, timeout=10).stdout

    def keys(*k):
        subprocess.run(tmux + ["send-keys", "-t", "rc", *k], check=True, timeout=10)

    subprocess.run(tmux + ["new-session", "-d", "-s", "rc", "-x", "120", "-y", "40",
                           "sh", "-c", inner, ";", "set-option", "-t", "rc",
                           "remain-on-exit", "on"], check=True, timeout=10, cwd=tmp_path,
                   stdin=subprocess.DEVNULL)
    as_root = hasattr(os, "geteuid") and os.geteuid() == 0
    try:
        screen = _wait(capture, lambda s: "Sabine" in s and "Reverberation" in s)
        assert "Sabine" in screen, screen
        if as_root:
            shutil.rmtree(folder)
            folder.write_text("in the way\n")          # the room's folder is now a file
            reason = "is not a folder"
        else:
            os.chmod(folder, 0o555)
            reason = "Permission denied"
        new_row = f"Surface {surfaces + 1}"
        for _ in range(3):           # the first key may come before the table has the focus
            keys("a")
            if new_row in _wait(capture, lambda s: new_row in s, 3):
                break
        keys("C-q")
        screen = _wait(capture, lambda s: "unsaved changes" in s)
        assert "unsaved changes" in screen, screen
        keys("Enter")                                    # "Save", the first button
        screen = _wait(capture, lambda s: "Not saved" in s)
        assert "Not saved" in screen and reason in " ".join(screen.split()), screen
        time.sleep(1.0)
        assert not exit_file.exists(), capture()         # still running
        rec = find_recovery(room)
        assert len(Document.open(rec).spec.surfaces) > surfaces       # the edit is kept

        keys("C-q")
        screen = _wait(capture, lambda s: "Don't save" in s)
        keys("Tab", "Enter")                             # "Don't save"
        deadline = time.monotonic() + 10
        while time.monotonic() < deadline and not exit_file.exists():
            time.sleep(0.2)
        assert exit_file.exists(), capture()
        assert exit_file.read_text().strip() == "EXIT=0"
        assert "Traceback" not in capture()
        assert not any((data / "recovery").glob("*.toml"))
    finally:
        subprocess.run(tmux + ["kill-server"], capture_output=True, timeout=10)
        if folder.is_dir():
            os.chmod(folder, 0o755)


@pytest.mark.skipif(TMUX is None, reason="tmux is not installed")
def test_an_edit_survives_a_kill_and_not_now_keeps_it(tmp_path, monkeypatch):
    """In a real terminal: an edit, then the process is killed (SIGKILL: no clean-up at all)
    0.3 s after the edit is on screen. The edit is in the recovery file. Opened again, roomcalc
    offers it; Escape (the same answer as "Not now") and Ctrl+Q leave it on disk, kept under
    its time."""
    import signal

    from roomcalc.tui.document import Document
    from roomcalc.tui.recovery import find_recoveries

    room = tmp_path / "classroom.toml"
    shutil.copyfile(EXAMPLES / "classroom.toml", room)
    surfaces = len(Document.open(room).spec.surfaces)
    data = tmp_path / "data"
    monkeypatch.setenv("ROOMCALC_DATA_DIR", str(data))      # where this test looks, too
    sock = f"roomcalc-test-{uuid.uuid4().hex[:12]}"
    tmux = [TMUX, "-L", sock, "-f", os.devnull]

    def start(name):
        inner = (f"exec env -u COLUMNS -u LINES ROOMCALC_DATA_DIR={shlex.quote(str(data))} "
                 f"{' '.join(shlex.quote(c) for c in _command())} open {shlex.quote(str(room))}")
        subprocess.run(tmux + ["new-session", "-d", "-s", name, "-x", "120", "-y", "40",
                               "sh", "-c", inner, ";", "set-option", "-t", name,
                               "remain-on-exit", "on"], check=True, timeout=10, cwd=tmp_path,
                       stdin=subprocess.DEVNULL)

    def capture(name) -> str:
        return subprocess.run(tmux + ["capture-pane", "-p", "-t", name], capture_output=True,
                              text=True, timeout=10).stdout

    def keys(name, *k):
        subprocess.run(tmux + ["send-keys", "-t", name, *k], check=True, timeout=10)

    try:
        start("one")
        assert "Sabine" in _wait(lambda: capture("one"), lambda s: "Sabine" in s)
        new_row = f"Surface {surfaces + 1}"
        for _ in range(3):           # the first key may come before the table has the focus
            keys("one", "a")
            if new_row in _wait(lambda: capture("one"), lambda s: new_row in s, 3):
                break
        assert new_row in capture("one")
        time.sleep(0.3)
        pid = int(subprocess.run(tmux + ["display-message", "-p", "-t", "one",
                                         "#{pane_pid}"], capture_output=True, text=True,
                                 timeout=10).stdout)
        os.kill(pid, signal.SIGKILL)
        found = find_recoveries(room)
        assert len(found) == 1, (found, list(data.rglob("*")))
        assert len(Document.open(found[0].path).spec.surfaces) > surfaces

        start("two")
        screen = _wait(lambda: capture("two"), lambda s: "Not now" in s)
        assert "closed without saving" in " ".join(screen.split()), screen
        keys("two", "Escape")                 # the same answer as "Not now"
        screen = _wait(lambda: capture("two"), lambda s: "Not now" not in s and "Sabine" in s)
        assert "Not now" not in screen and "Sabine" in screen, screen
        def dead() -> bool:
            out = subprocess.run(tmux + ["display-message", "-p", "-t", "two",
                                         "#{pane_dead}"], capture_output=True, text=True,
                                 timeout=10).stdout
            return out.strip() == "1"

        for _ in range(3):      # on a busy machine a key may come before the screen takes it
            keys("two", "C-q")
            # Ended, or at least left its screen (a loaded machine can take a while to exit).
            screen = _wait(lambda: capture("two"), lambda s: "Sabine" not in s, 8)
            if "Sabine" not in screen:
                break
        deadline = time.monotonic() + 30
        while not dead() and time.monotonic() < deadline:
            time.sleep(0.2)
        assert dead(), capture("two")
        found = find_recoveries(room)
        assert len(found) == 1 and found[0].kept, found
        assert len(Document.open(found[0].path).spec.surfaces) > surfaces
    finally:
        subprocess.run(tmux + ["kill-server"], capture_output=True, timeout=10)


class _Terminal:
    """A detached tmux session (its own socket, session "rc") running one shell command, kept
    on screen when it ends; read with capture-pane, driven with send-keys."""

    def __init__(self, cwd, inner: str, size=(120, 40)) -> None:
        self.tmux = [TMUX, "-L", f"roomcalc-test-{uuid.uuid4().hex[:12]}", "-f", os.devnull]
        subprocess.run(self.tmux + ["new-session", "-d", "-s", "rc", "-x", str(size[0]),
                                    "-y", str(size[1]), "sh", "-c", inner, ";", "set-option",
                                    "-t", "rc", "remain-on-exit", "on"],
                       check=True, timeout=10, cwd=cwd, stdin=subprocess.DEVNULL)

    def capture(self, history: bool = False) -> str:
        # With the history (-S -): a program that ends at once may print before the pane
        # has its final size, and its first lines scroll off the visible part.
        extra = ["-J", "-S", "-"] if history else []
        return subprocess.run(self.tmux + ["capture-pane", "-p", *extra, "-t", "rc"],
                              capture_output=True, text=True, timeout=10).stdout

    def keys(self, *k) -> None:
        subprocess.run(self.tmux + ["send-keys", "-t", "rc", *k], check=True, timeout=10)

    def press(self, key, until, tries: int = 3, seconds: float = 4.0) -> str:
        """A key, pressed again if the screen has not shown its effect: a key that arrives
        while the screen is busy can be missed by a real terminal's reader."""
        screen = ""
        for _ in range(tries):
            self.keys(key)
            screen = _wait(self.capture, until, seconds)
            if until(screen):
                break
        return screen

    def close(self) -> None:
        subprocess.run(self.tmux + ["kill-server"], capture_output=True, timeout=10)


def _roomcalc(data, *args) -> str:
    """The shell command that runs roomcalc with its data folder (and the terminal's own
    size, not the test runner's)."""
    return (f"env -u COLUMNS -u LINES ROOMCALC_DATA_DIR={shlex.quote(str(data))} "
            f"{' '.join(shlex.quote(c) for c in [*_command(), *map(str, args)])}")


@pytest.mark.skipif(TMUX is None, reason="tmux is not installed")
def test_roomcalc_open_a_folder_in_a_real_terminal(tmp_path):
    """`roomcalc open FOLDER` in a real terminal: the message names the folder, exit 2, no
    traceback on the screen."""
    folder = tmp_path / "rooms"
    folder.mkdir()
    exit_file = tmp_path / "exit.txt"
    term = _Terminal(tmp_path, f"{_roomcalc(tmp_path / 'data', 'open', folder)}; "
                               f"echo EXIT=$? > {shlex.quote(str(exit_file))}")
    try:
        deadline = time.monotonic() + 15
        while time.monotonic() < deadline and not exit_file.exists():
            time.sleep(0.2)
        assert exit_file.exists(), term.capture(history=True)
        assert exit_file.read_text().strip() == "EXIT=2"
        screen = term.capture(history=True)
        assert f"{folder}: cannot read it: it is a folder" in screen, screen
        assert "Traceback" not in screen and "Error" not in screen, screen
    finally:
        term.close()


@pytest.mark.skipif(TMUX is None, reason="tmux is not installed")
def test_help_scrolls_to_its_last_section_at_80x24(tmp_path):
    """In a real 80x24 terminal: F1 opens the help, whose text is longer than the screen; End
    brings its last section's heading and closing line into view, Home its first lines back,
    PageDown the section explaining the numbers; Escape closes it."""
    room = tmp_path / "workshop.toml"
    shutil.copyfile(EXAMPLES / "workshop.toml", room)
    term = _Terminal(tmp_path, _roomcalc(tmp_path / "data", "open", room), size=(80, 24))
    try:
        screen = _wait(term.capture, lambda s: "Reverberation" in s or "Sabine" in s)
        assert "Reverberation" in screen or "Sabine" in screen, screen
        screen = term.press("F1", lambda s: "keys and numbers" in s)
        assert "keys and numbers" in screen, screen
        assert "Hearing and safety" not in screen         # below the fold at first
        # (the scroll is animated: wait for its end, the closing line, not just the heading)
        screen = term.press("End", lambda s: "Hearing and safety" in s
                            and "Press Escape to close" in s)
        assert "Hearing and safety" in screen and "Press Escape to close" in screen, screen
        assert "keys and numbers" not in screen
        screen = term.press("Home", lambda s: "keys and numbers" in s
                            and "Hearing and safety" not in s)
        assert "keys and numbers" in screen and "Hearing and safety" not in screen, screen
        screen = term.press("PageDown", lambda s: "The numbers" in s, tries=4, seconds=2.0)
        assert "The numbers" in screen, screen
        term.keys("Escape")
        screen = _wait(term.capture, lambda s: "keys and numbers" not in s)
        assert "keys and numbers" not in screen and "Traceback" not in screen, screen
    finally:
        term.close()


@pytest.mark.skipif(TMUX is None, reason="tmux is not installed")
def test_view_keys_after_the_plan_and_a_digit_in_a_field_in_a_real_terminal(tmp_path):
    """In a real 120x40 terminal: F9 shows the plan and F5 brings the reverberation back (F5
    did nothing after F9); 1 and Down go into the Title field, where 2 types a "2" (and does not
    switch tabs); Escape leaves the field, and then 2 shows the Surfaces table."""
    room = tmp_path / "workshop.toml"
    shutil.copyfile(EXAMPLES / "workshop.toml", room)
    term = _Terminal(tmp_path, _roomcalc(tmp_path / "data", "open", room))
    press = term.press

    def right(screen):
        return "\n".join(line.split("\u2502", 1)[1] for line in screen.splitlines()
                         if "\u2502" in line)

    try:
        screen = _wait(term.capture, lambda s: "Sabine" in s)
        assert "Sabine" in screen, screen
        # (the plan view's own keys on the key line tell it is shown, whatever it scrolled to)
        screen = press("F9", lambda s: "Use or not" in s)
        assert "Use or not" in screen, screen
        screen = press("F5", lambda s: "Sabine" in right(s) and "Use or not" not in s)
        assert "Sabine" in right(screen) and "Use or not" not in screen, screen
        screen = press("1", lambda s: "Temperature" in s or "Title" in s)
        assert "Title" in screen, screen
        screen = press("Down", lambda s: "Leave the field" in s)
        assert "Leave the field" in screen, screen              # the key line says how out
        # A digit in the field types (into the title, or over it when the field selected its
        # text on entry): the first line shows the room's title ending in "2".
        def titled(s):
            return re.match(r" roomcalc - .*2  -  ", s.splitlines()[0]) is not None

        screen = press("2", titled, tries=1, seconds=6.0)
        assert titled(screen), screen
        assert "Title" in screen                                 # still the Room tab
        screen = press("Escape", lambda s: "Leave the field" not in s, tries=1, seconds=3.0)
        screen = press("2", lambda s: "Material" in s and "Title" not in s)
        assert "Material" in screen and "Title" not in screen, screen
        # The title took one "2", not two.
        assert titled(screen) and not re.match(r" roomcalc - .*22  -  ", screen.splitlines()[0])
    finally:
        term.close()
