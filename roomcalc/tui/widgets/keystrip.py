"""The line of keys at the bottom of the screen: the keys that work where the focus is.

One line of text, rebuilt only when the screen's bindings change (the focus moved) and only
redrawn when its text differs. Each key can be clicked, which presses it.
"""

from __future__ import annotations

from textual.content import Content
from textual.widgets import Static


class KeyStrip(Static):
    DEFAULT_CSS = """
    KeyStrip {
        dock: bottom;
        height: 1;
        width: 1fr;
        background: $panel;
        color: $foreground;
        padding: 0 1;
        text-wrap: nowrap;
        text-overflow: ellipsis;
    }
    """

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__("", id=id)
        self._markup = ""

    def on_mount(self) -> None:
        self.screen.bindings_updated_signal.subscribe(self, self._bindings_changed)
        self._bindings_changed(self.screen)

    def on_unmount(self) -> None:
        self.screen.bindings_updated_signal.unsubscribe(self)

    def _bindings_changed(self, screen) -> None:
        if not self.is_attached or screen is not self.screen:
            return
        seen: set[str] = set()
        parts = []
        for _node, binding, enabled, _tooltip in screen.active_bindings.values():
            if not binding.show or not enabled or binding.action in seen:
                continue
            seen.add(binding.action)
            key = Content(self.app.get_key_display(binding)).markup
            text = Content(binding.description).markup
            parts.append(f"[@click=app.simulate_key({binding.key.split(',')[0]!r})]"
                         f"[b]{key}[/b] {text}[/]")
        palette = screen.active_bindings.get(self.app.COMMAND_PALETTE_BINDING)
        if self.app.ENABLE_COMMAND_PALETTE and palette is not None:
            key = Content(self.app.get_key_display(palette.binding)).markup
            parts.append(f"[@click=app.command_palette][b]{key}[/b] Commands[/]")
        markup = "  ".join(parts)
        if markup != self._markup:
            self._markup = markup
            self.update(Content.from_markup(markup), layout=False)
