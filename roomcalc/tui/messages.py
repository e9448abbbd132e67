"""Messages the widgets send up to the screen that owns them."""

from __future__ import annotations

from textual.message import Message


class FieldEdited(Message):
    """A value typed into a table cell or a form field, already parsed (not yet range-checked:
    the room check does that, with the same messages as for a file)."""

    def __init__(self, collection: str, index: int | None, key: str, value) -> None:
        super().__init__()
        self.collection, self.index, self.key, self.value = collection, index, key, value


class RowAction(Message):
    """add, duplicate, delete, up or down on a table's row."""

    def __init__(self, collection: str, action: str, index: int | None) -> None:
        super().__init__()
        self.collection, self.action, self.index = collection, action, index


class MaterialWanted(Message):
    """The user asked to choose a material (or inline values) for a row."""

    def __init__(self, collection: str, index: int) -> None:
        super().__init__()
        self.collection, self.index = collection, index
