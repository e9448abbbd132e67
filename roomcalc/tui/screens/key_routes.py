"""Where the main screen's keys go: the tabs (1-6, F5-F9), a field left with Escape, a tab
bar entered with Down, r for the plan while the Plan tab is shown; and which half of a
one-column screen gets more height. Typing in a field types: the one-key shortcuts work only
outside fields.

A part of ``MainScreen`` (a mixin): it needs the screen's ``_opt`` (a widget or None while its
tab is not mounted yet) and its widgets #edit, #view, #body, #right and the Plan view."""

from __future__ import annotations

from textual.widgets import Input, Select, TabbedContent

__all__ = ["KeyRoutes", "toggle_class"]


def toggle_class(widget, state: bool, name: str) -> None:
    """Add or remove a class only when it changes (a change restyles the whole subtree)."""
    if widget.has_class(name) != state:
        widget.set_class(state, name)


class KeyRoutes:
    """MainScreen's key actions and focus rules."""

    def on_descendant_focus(self, event) -> None:
        # On a small screen (one column) the half the user works in gets more of the height:
        # the Plan tab's controls and list do not fit a quarter of 80x24.
        right = self._opt("#right")
        if right is not None:
            toggle_class(self.query_one("#body"), right in event.widget.ancestors_with_self,
                    "right-focus")

    def action_edit_tab(self, tab: str) -> None:
        edit = self.query_one("#edit", TabbedContent)
        edit.active = tab
        if tab != "room":   # the table of the new tab takes the keys (the old one is hidden)
            self.call_after_refresh(self.query_one(f"#t-{tab} #table").focus)
        else:               # its tab bar: a digit typed next switches tabs, not into a field
            self.call_after_refresh(edit.query_one("ContentTabs").focus)

    def _field_focused(self):
        """The focused text field or drop-down of this screen (None when the focus is on a
        table, a tab bar or a button)."""
        focused = self.focused
        return focused if isinstance(focused, (Input, Select)) else None

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "leave_field":
            return self._field_focused() is not None
        if action == "plan_run":
            view = self._opt("#view")           # (checked before the screen is composed too)
            return view is not None and view.active == "v-plan" \
                and self._opt("#plan-view") is not None
        if action == "enter_tab":
            return self.focused is not None and type(self.focused).__name__ == "ContentTabs"
        return True

    def action_leave_field(self) -> None:
        """Escape in a field: the focus goes to the bar of the tabs the field is in."""
        field = self._field_focused()
        tabs = next((a for a in field.ancestors if isinstance(a, TabbedContent)), None) \
            if field is not None else None
        if tabs is not None:
            tabs.query_one("ContentTabs").focus()

    def action_plan_run(self) -> None:
        self.query_one("#plan-view").action_run()

    def action_enter_tab(self) -> None:
        """Down on a tab bar: the focus goes to the first thing in the tab shown."""
        self.focus_next()

    def action_view_tab(self, tab: str) -> None:
        view = self.query_one("#view", TabbedContent)
        focused = self.focused
        if tab != view.active and focused is not None and view in focused.ancestors:
            # The focus is in the tab being left (the Plan tab's list): a TabbedContent shows
            # the tab that holds the focus, so it would stay. The keys go to the room's table.
            edit = self.query_one("#edit", TabbedContent).active
            table = self._opt(f"#t-{edit} #table") if edit != "room" else None
            self.set_focus(table)
        view.active = tab
        if tab == "v-plan":         # its keys (r, Space) work where the focus is

            def focus():
                grid = self._opt("#plan-candidates")
                if grid is not None:
                    grid.focus()
            self.call_after_refresh(focus)
