"""Keeping the recovery file up to date from the app: after each edit (in the background,
once the screen shows it), at once before a save or a quit question, and the writer's reports
(where the file is written, or that it cannot be) shown as notices.

A part of ``RoomApp`` (a mixin): it needs the app's ``main`` screen, ``document``, its
``recovery`` writer (``roomcalc.tui.recovery.RecoveryWriter``), ``_recovery_asks`` and
``_loop_for_reports``."""

from __future__ import annotations

from textual.app import ScreenStackError

from roomcalc.tui.recovery import Status

__all__ = ["RecoveryRoutes", "RECOVERY_FAILED_NOTICE_S"]

RECOVERY_FAILED_NOTICE_S = 60.0


class RecoveryRoutes:
    """RoomApp's side of the recovery writer."""

    def schedule_recovery(self) -> None:
        """After an edit: keep the room's text in the recovery file, in the background, as
        soon as the screen shows the edit (so that the writer's thread does not compete with
        drawing it). Coalesced: only the newest request is handed over, and the writer
        always writes the newest text it has."""
        self._discard_approved = None
        doc = self.main.document
        if doc.demo:
            return
        self._recovery_asks += 1
        ask, room = self._recovery_asks, doc.path
        text = doc.text_later() if doc.modified else None      # the snapshot: taken now

        def hand_over():
            if ask != self._recovery_asks:       # a newer request (or a direct write) came
                return
            if text is None:
                self.recovery.discard(room)
            else:
                self.recovery.keep(room, text)
        self.call_after_refresh(hand_over)

    def keep_recovery_now(self) -> bool:
        """Bring the recovery file up to date now, waiting for the writer: the room's text if
        it has unsaved changes, else no file. False when it could not be written anywhere
        (the user has been told)."""
        try:
            doc = self.main.document
        except ScreenStackError:                  # closing: the screens are gone
            doc = self.document
        self._recovery_asks += 1                  # an edit's hand-over still queued: void
        if doc.demo:
            return True
        if doc.modified:
            self.recovery.keep(doc.path, doc.text)
        else:
            self.recovery.discard(doc.path)
        self.recovery.flush()
        return self.recovery.status.kind != "failed"

    def _recovery_report(self, status: Status) -> None:
        """From the writer's thread: show a change in where (or whether) the recovery file
        is written, at once."""
        loop = self._loop_for_reports
        if loop is None or loop.is_closed():
            return
        loop.call_soon_threadsafe(self._show_recovery_status, status)

    def _show_recovery_status(self, status: Status) -> None:
        if not self.is_running:
            return
        if status.kind == "failed":
            self.notify(status.message, severity="error", timeout=RECOVERY_FAILED_NOTICE_S,
                        markup=False)
        elif status.kind == "fallback":
            self.notify(status.message, severity="warning", timeout=12, markup=False)
        else:
            self.notify(status.message, markup=False)
