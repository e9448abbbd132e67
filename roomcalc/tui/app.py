"""The roomcalc terminal application. Only this module knows every screen (keeping the recovery
file up to date is its part in ``recovery_routes``).

``make_app(document, catalog)`` builds the app; settings come in, none are module globals.
"""

from __future__ import annotations

import asyncio
import gc
from dataclasses import dataclass
from pathlib import Path

from textual.app import App, SystemCommand
from textual.binding import Binding

from roomcalc.io.catalog import Catalog
from roomcalc.io.errors import RoomFileError
from roomcalc.study import Study
from roomcalc.tui.document import Document
from roomcalc.tui.recovery import RecoveryWriter, discard_file, find_recoveries, take_over
from roomcalc.tui.recovery_routes import RecoveryRoutes
from roomcalc.tui.screens.dialogs import Ask, AskBox, AskText
from roomcalc.tui.screens.file_fixes import FIX_KEYS_COMMAND, ask_key_fixes, opening_notice
from roomcalc.tui.screens.main import MainScreen

RECOVERY_DELAY_S = 0.0    # the recovery file is written at once after an edit (off the main
                          # thread): a crash loses at most what was typed in the last moment
NOT_SAVED_NOTICE_S = 30.0
RESTORE_COMMAND = "Restore changes kept from before"
SETTLE_DELAY_S = 1.0      # after start-up, the objects made so far leave the garbage collector


LOST_COMMENTS_SHOWN = 6     # comments a save would drop, listed in its question


@dataclass
class AppConfig:
    """Settings of one run: recovery timing, whether to offer recovery at start."""

    recovery_delay_s: float = RECOVERY_DELAY_S     # wait this long after an edit (coalesce)
    offer_recovery: bool = True
    theme: str | None = None
    ask_box_size: bool = False      # start by asking the size of the (new) room


class RoomApp(RecoveryRoutes, App):
    """Edit a room and watch its sound field change."""

    TITLE = "roomcalc"
    CSS_PATH = "app.tcss"
    BINDINGS = [Binding("ctrl+q", "quit", "Quit", priority=True, id="app.quit")]

    def __init__(self, document: Document, catalog: Catalog, config: AppConfig | None = None):
        super().__init__()
        self.document = document
        self.catalog = catalog
        self.config = config or AppConfig()
        self.recovery = RecoveryWriter(self._recovery_report, self.config.recovery_delay_s)
        self._loop_for_reports: asyncio.AbstractEventLoop | None = None
        self._discard_approved: Document | None = None     # "Don't save" was chosen for it
        self._recovery_asks = 0         # counts requests; a queued hand-over checks it
        self.settled = False
        if self.config.theme:
            self.theme = self.config.theme

    @property
    def main(self) -> MainScreen:
        return self._main

    def get_default_screen(self) -> MainScreen:
        # The editor is the bottom screen itself: no blank screen is drawn before it.
        self._main = MainScreen(self.document, self.catalog)
        return self._main

    def on_mount(self) -> None:
        self._loop_for_reports = asyncio.get_running_loop()
        self.set_timer(SETTLE_DELAY_S, self._settle)
        if self.config.offer_recovery:
            self._offer_recovery(self.document)
        else:
            self._take_over_recovery(self.document)
        if self.config.ask_box_size:
            self._ask_size()
        else:
            self.call_after_refresh(self._say_problems)

    def _settle(self) -> None:
        """Move everything made at start-up (widgets, styles, the catalogue) out of the
        collector's view. Those objects live as long as the app, yet Python's full collections
        walk them all: about 100,000 objects, some 100 ms, every few edits, which is a
        pause a user sees. New objects (results, edits) are collected as usual."""
        gc.enable()             # the command line switches it off for the start-up
        gc.collect()
        gc.freeze()
        self.settled = True

    def on_unmount(self) -> None:
        self._last_recovery()
        if self.settled:
            gc.unfreeze()        # an app run inside another program (the tests) gives them back

    def _ask_size(self) -> None:
        doc = self.document
        where = f" (to be saved as {doc.path})" if doc.path else ""
        question = (f"{doc.path} does not exist yet. " if doc.path else "") + \
            f"Size of the new room{where}, a box:"

        def done(size):
            if size:
                L, W, H, units = size
                self._set_document(Document.new_box(L, W, H, units, path=doc.path))
        self.push_screen(AskBox(question), done)

    # ------------------------------------------------------------------ command palette
    def get_system_commands(self, screen):
        yield from super().get_system_commands(screen)
        main = self.main
        for title, help_, cb in (
            ("Save", "Write the room to its file", self.action_save),
            ("Save as", "Write the room to another file", self.action_save_as),
            ("Open room file", "Open another room file", self.action_open),
            ("New room", "Start a room from a box size", self.action_new),
            ("Undo", "Take back the last edit", main.action_undo),
            ("Redo", "Do the undone edit again", main.action_redo),
            ("Pin as before", "Keep the room as it is now to compare with", main.action_pin),
            ("Switch reverberant model", "Diffuse field (4/R) or Barron & Lee",
             main.action_toggle_model),
            ("Choose material", "For the highlighted surface or object", main.action_material),
            (FIX_KEYS_COMMAND, "Keys of the room file roomcalc does not know (a typo) and a "
             "missing version: read each as the key it meant, or remove it",
             lambda: ask_key_fixes(self.main)),
            (RESTORE_COMMAND, "Unsaved changes of this room from a session that ended "
             "without saving: restore or discard them", self.action_offer_recovery),
            ("Help", "Every key, and what each number means", self.action_help),
        ):
            yield SystemCommand(title, help_, cb)

    # ------------------------------------------------------------------ actions (the main
    # screen's bindings name them as app.save, app.save_as, app.open, app.new, app.help)
    def action_help(self) -> None:
        from roomcalc.tui.screens.help import HelpScreen   # Markdown is slow to import

        self.push_screen(HelpScreen())

    # ------------------------------------------------------------------ files
    def action_save(self) -> None:
        doc = self.main.document
        if doc.path is None or doc.demo:
            self.action_save_as()
            return
        self._save(doc, doc.path)

    def action_save_as(self, then=None) -> None:
        """Ask a file name and save there; ``then`` runs after a save that worked (the quit
        guard's "Save" for a room without a file)."""
        doc = self.main.document
        default = str(doc.path) if doc.path and not doc.demo else "my-room.toml"

        def write(path):
            self._save(doc, path, then)

        def done(name):
            if not name:
                if then is not None:
                    self.notify("Not saved: nothing was closed, the changes are still here.",
                                markup=False)
                return
            path = Path(name).expanduser()
            if path.suffix != ".toml":
                path = path.with_suffix(".toml")
            if path.exists() and path != doc.path:
                def confirm(ans):
                    if ans == "replace":
                        write(path)
                self.push_screen(Ask(f"{path} exists. Replace it?",
                                     [("replace", "Replace", "warning"),
                                      ("cancel", "Cancel", "default")]), confirm)
            else:
                write(path)
        self.push_screen(AskText("Save the room as (a .toml file):", default), done)

    def _save(self, doc: Document, path: Path, then=None) -> None:
        """Save, then run ``then`` if it worked. A save that would drop comments the user
        wrote (those in entries deleted since) asks first, naming them."""
        lost = doc.comments_lost() if doc.modified else []

        def go():
            if self._write(doc, path) and then is not None:
                then()
        if not lost:
            go()
            return
        shown = "\n".join(f"  {c}" for c in lost[:LOST_COMMENTS_SHOWN])
        if len(lost) > LOST_COMMENTS_SHOWN:
            shown += f"\n  (and {len(lost) - LOST_COMMENTS_SHOWN} more)"

        def done(ans):
            if ans == "save":
                go()
            else:
                self.notify("Not saved: the changes and the comments are still here.",
                            markup=False)
        n = len(lost)
        self.push_screen(Ask(f"Saving drops {n} comment{'s' if n != 1 else ''} written in "
                             f"entries you deleted:\n{shown}",
                             [("save", "Save without them", "warning"),
                              ("cancel", "Cancel", "default")]), done)

    def _write(self, doc: Document, path: Path) -> bool:
        """Save; on failure say why (and that nothing is lost) and return False."""
        # The recovery file first: it holds everything if the save fails, and no older text
        # of it (an edit's hand-over still queued) can land after a save that works.
        self.keep_recovery_now()
        try:
            doc.save(path)
        except OSError as exc:
            reason = exc.strerror or str(exc)
            if isinstance(exc, (FileNotFoundError, NotADirectoryError)):
                if path.parent.exists() and not path.parent.is_dir():
                    reason = f"{path.parent} is not a folder"
                elif not path.parent.exists():
                    reason = f"the folder {path.parent} does not exist"
            kept = " and in the recovery file" if self.recovery.status.kind != "failed" else ""
            self.notify(f"Not saved: {path}: {reason}. The changes are still here{kept}; "
                        "F2 saves them in another folder.", severity="error",
                        timeout=NOT_SAVED_NOTICE_S, markup=False)
            return False
        self.main.show_title()
        problems = self._problems_of(doc)
        if problems:
            # Saved all the same (the user's work is never lost), but not as a good room.
            n = len(problems)
            if n == 1:
                said = f"Saved {path}, but the room has 1 problem: {problems[0]}"
            else:
                said = (f"Saved {path}, but the room has {n} problems:\n" +
                        "\n".join(problems[:6]) + (f"\n... and {n - 6} more" if n > 6 else ""))
            self.notify(said, severity="warning", timeout=NOT_SAVED_NOTICE_S, markup=False)
        else:
            self.notify(f"Saved {path}", markup=False)
        return True

    def _problems_of(self, doc: Document) -> list[str]:
        """What the core's check finds wrong with ``doc`` as saved ("field: message"; none when
        it is a valid room)."""
        main = self.main
        study = main.study if doc is main.document else \
            Study(doc.spec, main.catalog, filename=doc.name)
        try:
            study.check()
        except RoomFileError as exc:
            return [p.located for p in exc.problems]
        except ValueError as exc:
            return [str(exc)]
        return []

    def _guard(self, then) -> None:
        """Run ``then`` now, or after asking what to do with unsaved changes. The recovery
        file is on disk before the question is asked."""
        doc = self.main.document
        if not doc.modified:
            then()
            return
        self.keep_recovery_now()

        def done(ans):
            if ans == "save":
                if doc.path is None or doc.demo:
                    self.action_save_as(then=then)
                    return
                self._save(doc, doc.path, then)
            elif ans == "discard":
                self._discard_approved = doc       # its recovery goes when it is closed
                then()
        self.push_screen(Ask(f"The room '{doc.spec.title or doc.name}' has unsaved changes.",
                             [("save", "Save", "primary"), ("discard", "Don't save", "error"),
                              ("cancel", "Cancel", "default")]), done)

    async def action_quit(self) -> None:
        self._guard(self._quit_now)

    def _quit_now(self) -> None:
        self._last_recovery()
        self.exit()

    def _last_recovery(self) -> None:
        """Closing: unsaved changes are in the recovery file before the app ends, unless the
        user chose "Don't save" for them (then it goes, as does one of a saved room)."""
        doc = self.main.document
        if not doc.demo:
            if doc.modified and self._discard_approved is not doc:
                self.keep_recovery_now()
            else:
                self._recovery_asks += 1
                self.recovery.discard(doc.path)
        self.recovery.close()

    def action_open(self) -> None:
        def ask():
            self.push_screen(AskText("Open a room file:", "", "example_rooms/classroom.toml"),
                             self.open_path)
        self._guard(ask)

    def open_path(self, name) -> None:
        if not name:
            self._discard_approved = None        # nothing closed: its recovery stays
            return
        path = Path(name).expanduser()
        if not path.exists():
            def create(size):
                if size:
                    L, W, H, units = size
                    self._set_document(Document.new_box(L, W, H, units, path=path))
                else:
                    self._discard_approved = None
            self.push_screen(AskBox(f"{path} does not exist. Make a new room there, of this "
                                    "size:"), create)
            return
        try:
            doc = Document.open(path)
        except RoomFileError as exc:
            # A folder, a file that may not be read or is not UTF-8 text is named here too,
            # in the words of `roomcalc check` (roomcalc.io.checks.read_text_file).
            lines = [str(p) for p in exc.problems[:8]]
            self.notify("Cannot open it:\n" + "\n".join(lines), severity="error", timeout=12,
                        markup=False)
            self._discard_approved = None
            return
        self._set_document(doc)
        self._say_problems()
        self._offer_recovery(doc)

    def _say_problems(self) -> None:
        """A room opened with problems: say so, and how to fix them."""
        said = opening_notice(self.main)
        if said:
            self.notify(said, severity="warning", timeout=NOT_SAVED_NOTICE_S, markup=False)

    def action_new(self) -> None:
        def ask():
            def create(size):
                if size:
                    L, W, H, units = size
                    self._set_document(Document.new_box(L, W, H, units))
                else:
                    self._discard_approved = None
            self.push_screen(AskBox(), create)
        self._guard(ask)

    def _set_document(self, doc: Document) -> None:
        old = self.main.document
        if old is not doc and not old.demo:
            if old.modified and self._discard_approved is not old:
                self.keep_recovery_now()             # not asked: keep it, never drop it
            else:
                self._recovery_asks += 1
                self.recovery.discard(old.path)
                self.recovery.flush()     # gone before the new room looks for its own
        self._discard_approved = None
        self.document = doc
        self.main.replace_document(doc)

    # ------------------------------------------------------------------ recovery
    def _take_over_recovery(self, doc: Document) -> None:
        """A live recovery file of this room left by a session that ended without saving is
        set aside (kept under its time) before this session writes its own."""
        if not doc.demo:
            take_over(doc.path, doc.saved_text)

    def _offer_recovery(self, doc: Document, asked: bool = False) -> None:
        """Offer the newest changes kept from an earlier session: restore, discard (then the
        next one is offered), or not now (they stay, offered again on the next open and from
        the command palette)."""
        if doc.demo:
            return
        if not asked:
            self._take_over_recovery(doc)
        # Mid-session (asked), this session's own live file is not "from an earlier session".
        kept = [r for r in find_recoveries(doc.path) if r.kept or not asked]
        if not kept:
            if asked:
                self.notify("No unsaved changes from an earlier session are kept for "
                            f"{doc.path or 'an untitled room'}.", markup=False)
            return
        rec = kept[0]
        more = f" ({len(kept) - 1} older set{'s' if len(kept) > 2 else ''} kept too.)" \
            if len(kept) > 1 else ""
        older = " The room file was changed after them." if rec.older_than_room else ""

        def done(ans):
            if ans == "restore":
                self._restore(doc, rec.path)
            elif ans == "discard":
                discard_file(rec.path)
                self.notify(f"Discarded the changes kept from {rec.when}.", markup=False)
                if len(kept) > 1:
                    self._offer_recovery(doc, asked=True)
            else:
                self.notify("The earlier changes are kept. They are offered again when this "
                            "room is opened, or now from the command palette (Ctrl+P, "
                            f"'{RESTORE_COMMAND}').", timeout=8, markup=False)
        self.push_screen(Ask(f"roomcalc was closed without saving changes to "
                             f"{doc.path or 'an untitled room'} (kept from {rec.when}).{older}"
                             f"{more} Restore them?",
                             [("restore", "Restore", "primary"),
                              ("discard", "Discard them", "error"),
                              ("later", "Not now", "default")]), done)

    def action_offer_recovery(self) -> None:
        self._offer_recovery(self.main.document, asked=True)

    def _restore(self, doc: Document, rec: Path) -> None:
        try:
            restored = Document.open(rec)
        except RoomFileError as exc:
            lines = [str(p) for p in exc.problems[:8]]
            self.notify("The recovery file could not be restored; it is left as it is:\n" +
                        "\n".join(lines), severity="error", timeout=12, markup=False)
            return
        spec = restored.spec
        doc.change(lambda s: s.__dict__.update(spec.__dict__), "restore unsaved changes")
        self.main.replace_document(doc)
        # The restored changes are now this session's: once its own recovery file holds
        # them, the kept one can go.
        if self.keep_recovery_now():
            discard_file(rec)
        self.notify("Unsaved changes restored. Save to keep them.")
        self._say_problems()


def make_app(document: Document | None = None, catalog: Catalog | None = None,
             config: AppConfig | None = None) -> RoomApp:
    """Build the app on a document (default: the built-in demo room)."""
    from roomcalc.io import paths
    from roomcalc.io.catalog import load_catalog

    if catalog is None:
        catalog = load_catalog()
    if document is None:
        document = Document.open(paths.demo_room_path())
        document.demo = True
        document.path = None
        document.mark_clean()
    return RoomApp(document, catalog, config)
