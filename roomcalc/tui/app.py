"""The roomcalc terminal application. Only this module knows every screen.

``make_app(document, catalog)`` builds the app; settings come in, none are module globals.
"""

from __future__ import annotations

import gc
from dataclasses import dataclass
from pathlib import Path

from textual.app import App, ScreenStackError, SystemCommand
from textual.binding import Binding

from roomcalc.io.catalog import Catalog
from roomcalc.io.errors import RoomFileError
from roomcalc.tui.document import Document, discard_recovery, find_recovery
from roomcalc.tui.screens.dialogs import Ask, AskBox, AskText
from roomcalc.tui.screens.main import MainScreen

RECOVERY_DELAY_S = 1.0
SETTLE_DELAY_S = 1.0      # after start-up, the objects made so far leave the garbage collector


@dataclass
class AppConfig:
    """Settings of one run: recovery timing, whether to offer recovery at start."""

    recovery_delay_s: float = RECOVERY_DELAY_S
    offer_recovery: bool = True
    theme: str | None = None
    ask_box_size: bool = False      # start by asking the size of the (new) room


class RoomApp(App):
    """Edit a room and watch its sound field change."""

    TITLE = "roomcalc"
    CSS_PATH = "app.tcss"
    BINDINGS = [Binding("ctrl+q", "quit", "Quit", priority=True, id="app.quit")]

    def __init__(self, document: Document, catalog: Catalog, config: AppConfig | None = None):
        super().__init__()
        self.document = document
        self.catalog = catalog
        self.config = config or AppConfig()
        self._recovery_timer = None
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
        self.set_timer(SETTLE_DELAY_S, self._settle)
        if self.config.offer_recovery:
            self._offer_recovery(self.document)
        if self.config.ask_box_size:
            self._ask_size()

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
        self._write(doc, doc.path)

    def action_save_as(self) -> None:
        doc = self.main.document
        default = str(doc.path) if doc.path and not doc.demo else "my-room.toml"

        def done(name):
            if name:
                path = Path(name).expanduser()
                if path.suffix != ".toml":
                    path = path.with_suffix(".toml")
                if path.exists() and path != doc.path:
                    def confirm(ans):
                        if ans == "replace":
                            self._write(doc, path)
                    self.push_screen(Ask(f"{path} exists. Replace it?",
                                         [("replace", "Replace", "warning"),
                                          ("cancel", "Cancel", "default")]), confirm)
                else:
                    self._write(doc, path)
        self.push_screen(AskText("Save the room as (a .toml file):", default), done)

    def _write(self, doc: Document, path: Path) -> None:
        try:
            doc.save(path)
        except OSError as exc:
            self.notify(f"Not saved: {path}: {exc.strerror or exc}", severity="error",
                        timeout=8, markup=False)
            return
        self.main.show_title()
        self.notify(f"Saved {path}", markup=False)

    def _guard(self, then) -> None:
        """Run ``then`` now, or after asking what to do with unsaved changes."""
        doc = self.main.document
        if not doc.modified:
            then()
            return

        def done(ans):
            if ans == "save":
                if doc.path is None or doc.demo:
                    self.notify("Save it first (F2), then try again.", severity="warning")
                    self.action_save_as()
                    return
                self._write(doc, doc.path)
                then()
            elif ans == "discard":
                discard_recovery(doc.path)
                then()
        self.push_screen(Ask(f"The room '{doc.spec.title or doc.name}' has unsaved changes.",
                             [("save", "Save", "primary"), ("discard", "Don't save", "error"),
                              ("cancel", "Cancel", "default")]), done)

    async def action_quit(self) -> None:
        self._guard(self._quit_now)

    def _quit_now(self) -> None:
        if self._recovery_timer is not None:     # else it may write the file after all
            self._recovery_timer.stop()
        if not self.main.document.modified:
            discard_recovery(self.main.document.path)
        self.exit()

    def action_open(self) -> None:
        def ask():
            self.push_screen(AskText("Open a room file:", "", "example_rooms/classroom.toml"),
                             self.open_path)
        self._guard(ask)

    def open_path(self, name) -> None:
        if not name:
            return
        path = Path(name).expanduser()
        if not path.exists():
            def create(size):
                if size:
                    L, W, H, units = size
                    self._set_document(Document.new_box(L, W, H, units, path=path))
            self.push_screen(AskBox(f"{path} does not exist. Make a new room there, of this "
                                    "size:"), create)
            return
        try:
            doc = Document.open(path)
        except RoomFileError as exc:
            lines = [str(p) for p in exc.problems[:8]]
            self.notify("Cannot open it:\n" + "\n".join(lines), severity="error", timeout=12,
                        markup=False)
            return
        except (OSError, UnicodeDecodeError) as exc:
            self.notify(f"Cannot open {path}: {exc}", severity="error", timeout=8, markup=False)
            return
        self._set_document(doc)
        self._offer_recovery(doc)

    def action_new(self) -> None:
        def ask():
            def create(size):
                if size:
                    L, W, H, units = size
                    self._set_document(Document.new_box(L, W, H, units))
            self.push_screen(AskBox(), create)
        self._guard(ask)

    def _set_document(self, doc: Document) -> None:
        self.document = doc
        self.main.replace_document(doc)

    # ------------------------------------------------------------------ recovery
    def _offer_recovery(self, doc: Document) -> None:
        if doc.demo:
            return
        rec = find_recovery(doc.path)
        if rec is None:
            return

        def done(ans):
            if ans == "restore":
                try:
                    restored = Document.open(rec)
                except (RoomFileError, OSError):
                    self.notify("The recovery file could not be read.", severity="error")
                    return
                spec = restored.spec
                doc.change(lambda s: s.__dict__.update(spec.__dict__), "restore unsaved changes")
                self.main.replace_document(doc)
                self.notify("Unsaved changes restored. Save to keep them.")
            elif ans == "discard":
                discard_recovery(doc.path)
        self.push_screen(Ask(f"roomcalc was closed without saving changes to "
                             f"{doc.path or 'an untitled room'}. Restore them?",
                             [("restore", "Restore", "primary"),
                              ("discard", "Discard them", "error"),
                              ("later", "Not now", "default")]), done)

    def schedule_recovery(self) -> None:
        """After an edit: write the recovery file a moment later, in the background."""
        if self._recovery_timer is not None:
            self._recovery_timer.stop()
        self._recovery_timer = self.set_timer(self.config.recovery_delay_s,
                                              self._write_recovery)

    def _write_recovery(self) -> None:
        try:
            doc = self.main.document
        except ScreenStackError:                  # closing: the screens are gone
            return
        if doc.demo:
            return
        if not doc.modified:
            discard_recovery(doc.path)
            return
        text = doc.text          # made here, so the thread only writes it
        self.run_worker(lambda: doc.write_recovery(text), thread=True, exclusive=True,
                        group="recovery", exit_on_error=False)


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
