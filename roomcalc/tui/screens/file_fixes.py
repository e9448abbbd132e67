"""Opening a room file with problems: what the user is told, and the questions that fix what
the tables cannot (keys the file misspelled, a version left out). The rules are the core's
(:mod:`roomcalc.study.fixes`); this module asks and routes them through the main screen, so
every fix is one undoable edit."""

from __future__ import annotations

from roomcalc.io.roomfile import toml_value
from roomcalc.present.places import place_on_screen
from roomcalc.study.fixes import add_version, remove_key, unknown_keys, use_key, version_missing
from roomcalc.tui.screens.dialogs import Ask

#: The command palette's name for the questions (the opening notice names it too).
FIX_KEYS_COMMAND = "Fix unknown keys"
SHOWN_VALUE = 40        # characters of a value shown in a question


def opening_notice(main) -> str | None:
    """What to tell the user on opening a room that has problems (None: it has none)."""
    n = len(main.problems)
    if not n:
        return None
    doc = main.document
    said = (f"{doc.name} has {n} problem{'s' if n != 1 else ''}, listed at the bottom and "
            "under their tables. Fix them here; saving writes the room as you fixed it.")
    keys = unknown_keys(doc.spec)
    if keys or version_missing(doc.spec):
        what = []
        if keys:
            what.append(f"{len(keys)} key{'s' if len(keys) != 1 else ''} roomcalc does not "
                        f"know (such as '{keys[0].key}')")
        if version_missing(doc.spec):
            what.append("no version")
        said += (f" It has {' and '.join(what)}: Ctrl+P, '{FIX_KEYS_COMMAND}' asks about each "
                 "one.")
    return said


def ask_key_fixes(main, skipped: frozenset = frozenset()) -> None:
    """Ask about each unknown key (read it as the key it probably meant, remove it, or leave
    it) and a missing version, one question at a time; Escape stops."""
    spec = main.document.spec
    if version_missing(spec) and "version" not in skipped:
        def version(ans):
            if ans == "add":
                main.apply(add_version, "add version = 1", form=True)
            if ans is not None:
                ask_key_fixes(main, skipped | {"version"})
        main.app.push_screen(Ask("The file does not say which version of room file it is "
                                 "(version, required). Add version = 1, the version roomcalc "
                                 "reads and writes?",
                                 [("add", "Add version = 1", "primary"),
                                  ("leave", "Leave it", "default")]), version)
        return
    todo = [u for u in unknown_keys(spec) if (u.table, u.key) not in skipped]
    if not todo:
        if not skipped:
            main.notify("The room has no unknown keys.", markup=False)
        return
    u = todo[0]
    value = toml_value(u.value)
    if len(value) > SHOWN_VALUE:
        value = value[:SHOWN_VALUE - 3] + "..."
    place = (place_on_screen(u.table, spec) if "[" in u.table else f"[{u.table}]") \
        if u.table else "The room file"
    question = f"{place}: '{u.key} = {value}' is a key roomcalc does not know" + (
        f". Did you mean '{u.meant}'?" if u.meant else "; it is kept in the file until you "
        "remove it.")
    buttons = ([("use", f"Read it as '{u.meant}'", "primary")] if u.meant else []) + \
        [("remove", "Remove it", "warning"), ("leave", "Leave it", "default")]

    def done(ans):
        if ans is None:
            return
        if ans == "use":
            try:
                main.apply(lambda s: use_key(s, u.table, u.key, u.meant),
                           f"read '{u.key}' as '{u.meant}'", form=True)
            except ValueError as exc:
                main.notify(str(exc), severity="warning", markup=False)
        elif ans == "remove":
            main.apply(lambda s: remove_key(s, u.table, u.key), f"remove '{u.key}'", form=True)
        ask_key_fixes(main, skipped | {(u.table, u.key)})
    main.app.push_screen(Ask(question, buttons), done)
