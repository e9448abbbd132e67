"""``Deferred``: a widget mounted just after the first screen is drawn, like Textual's ``Lazy``,
but safe when the app closes first (quitting a moment after start-up): then it is simply not
mounted, instead of raising a MountError on the way out."""

from __future__ import annotations

from textual.lazy import Lazy
from textual.widget import MountError, Widget

TRIES = 50


class Deferred(Lazy):
    async def mount_composed_widgets(self, widgets: list[Widget]) -> None:
        parent = self.parent
        if parent is None:
            return
        tries = [0]

        async def mount() -> None:
            if not self.is_attached:
                return                  # removed, or the app is closing
            if not parent.is_mounted:
                tries[0] += 1
                if tries[0] < TRIES:
                    self.call_after_refresh(mount)
                return
            try:
                await parent.mount(self._replace_widget, after=self)
            except MountError:
                return                  # the app closed meanwhile
            await self.remove()

        self.call_after_refresh(mount)
