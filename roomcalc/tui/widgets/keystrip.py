"""The line of keys at the bottom of the screen: the keys that work where the focus is.

One line of text, rebuilt only when the screen's bindings change (the focus moved) or its width
does, and only redrawn when its text differs. Each key can be clicked, which presses it. When
the line is too long for the terminal, the keys a new user needs least are left out (help and
quit always stay), rather than cutting the end of the line.
"""

from __future__ import annotations

from textual.content import Content
from textual.widgets import Static

#: Which keys stay when the line is too long: a lower number stays longer; the rest, 5.
KEEP_ORDER = {"app.help": 0, "quit": 0, "leave_field": 1, "app.save": 2, "undo": 2,
              "command_palette": 6, "redo": 7, "pin": 8}


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

    def on_resize(self) -> None:
        self._bindings_changed(self.screen)

    def on_unmount(self) -> None:
        self.screen.bindings_updated_signal.unsubscribe(self)

    def _bindings_changed(self, screen) -> None:
        if not self.is_attached or screen is not self.screen:
            return
        seen: set[str] = set()
        parts = []          # (action, text length, markup)
        for _node, binding, enabled, _tooltip in screen.active_bindings.values():
            if not binding.show or not enabled or binding.action in seen:
                continue
            seen.add(binding.action)
            key = self.app.get_key_display(binding)
            parts.append((binding.action, len(key) + 1 + len(binding.description),
                          f"[@click=app.simulate_key({binding.key.split(',')[0]!r})]"
                          f"[b]{Content(key).markup}[/b] {Content(binding.description).markup}[/]"))
        palette = screen.active_bindings.get(self.app.COMMAND_PALETTE_BINDING)
        if self.app.ENABLE_COMMAND_PALETTE and palette is not None:
            key = self.app.get_key_display(palette.binding)
            parts.append(("command_palette", len(key) + 9,
                          f"[@click=app.command_palette][b]{Content(key).markup}[/b] Commands[/]"))
        room = self.size.width - 2 if self.size.width else 10_000
        while len(parts) > 1 and sum(n for _a, n, _m in parts) + 2 * (len(parts) - 1) > room:
            drop = max(range(len(parts)), key=lambda i: (KEEP_ORDER.get(parts[i][0], 5), i))
            del parts[drop]
        markup = "  ".join(m for _a, _n, m in parts)
        if markup != self._markup:
            self._markup = markup
            self.update(Content.from_markup(markup), layout=False)
