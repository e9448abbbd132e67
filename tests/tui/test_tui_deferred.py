"""Deferred widgets: mounted after the first screen, and no error when the app closes first
(quitting a moment after start-up used to end in a MountError traceback)."""

from __future__ import annotations

from textual.app import App
from textual.containers import Vertical
from textual.widgets import Static

from roomcalc.tui.widgets.deferred import Deferred


class LaterApp(App):
    def __init__(self, quit_at_once: bool):
        super().__init__()
        self.quit_at_once = quit_at_once

    def compose(self):
        with Vertical(id="box"):
            yield Deferred(Static("later", id="later"))

    def on_mount(self):
        if self.quit_at_once:
            self.exit(return_code=3)


async def test_deferred_widget_is_mounted_after_the_first_screen():
    app = LaterApp(quit_at_once=False)
    async with app.run_test() as pilot:
        for _ in range(20):
            await pilot.pause()
            if app.query("#later"):
                break
        assert str(app.query_one("#later", Static).content) == "later"
        assert not app.query(Deferred)          # the placeholder is gone


async def test_quitting_before_it_mounts_is_clean():
    app = LaterApp(quit_at_once=True)
    async with app.run_test() as pilot:
        await pilot.pause()
    assert app.return_code == 3                 # no exception raised by run_test
