"""Writing an edited room spec over the text it was read from, keeping the user's comments and
layout.

:func:`spec_to_toml_keeping` reads the original text line by line into tables (the top level,
``[air]``, ``[shape]``, ``[target]`` and each ``[[...]]`` entry) and each table into its
``key = value`` entries, each with the comment and blank lines above it, its comment at the end
of the line and any comments inside a value written over several lines. It then writes the
edited spec table by table:

- a value that did not change is written exactly as the user wrote it (``1e-5`` stays
  ``1e-5``, a list over several lines stays so, with its comments); a changed value is written
  as :func:`roomcalc.io.roomfile.write.toml_value` writes it, with the end-of-line comment
  kept; a key the edit removed leaves its comments where it was; a new key goes after the key
  before it in the documented order;
- the entries of an array of tables are matched to the original's (the same content, else
  the same name or id, else one left over between the same neighbours, or anywhere, with most
  of its values the same), so that moving, renaming, duplicating, adding and deleting carry
  each entry's comments with it; new entries and tables are written as
  :func:`roomcalc.io.roomfile.write.spec_to_toml` writes them, where the documented order puts
  them;
- comments between tables stay with the table below them (those right under a table's last
  line, before a blank line, with that table), comments at the end of the file at the end; the
  file's line ends (LF or CRLF) are kept.

What can be lost: the comments of an entry the edit deleted (above its header if not
separated from it by a blank line, on its lines, inside it), and of ``[target]`` if the spec
has none. An entry renamed *and* with half its values or more changed is taken for a deleted
one and a new one. A comment block separated from a deleted entry's header by a blank line
moves to the next table that stays; an ``[air]`` whose keys are all removed stays, empty, for
its comments. :func:`comments_lost` lists what goes, before saving. A file laid out in a way
this reader does not follow line by line (dotted keys, sub-tables such as
``[target.max_level_dba]``, a table written inline at the top level) is written as
:func:`spec_to_toml` writes it, keeping the comments at its top, and :func:`comments_lost`
lists the others.

The result always reads back to the spec (``parse_spec(text) == spec``), and writing the same
spec over the result gives the result again (tests/test_roomfile_keep.py checks both).
"""

from __future__ import annotations

import re
import tomllib

from roomcalc.io.roomfile.layout import (ARRAY_TABLES, SINGLE_TABLES, TABLE_ORDER, Entry,
                                         Layout, Table, Unsupported, comment_lines, content_key,
                                         read_layout, same_data, trail_comment)
from roomcalc.io.roomfile.spec import RoomSpec
from roomcalc.io.roomfile.write import spec_to_dict, spec_to_toml, toml_key, toml_value

__all__ = ["spec_to_toml_keeping", "comments_lost"]

def spec_to_toml_keeping(spec: RoomSpec, original_text: str | None) -> str:
    """The room-file text of ``spec``, written over ``original_text`` (the text it was read
    from) so that the user's comments and layout stay where they were. Without an original,
    :func:`spec_to_toml`'s text."""
    return _merge(spec, original_text)[0]


def comments_lost(spec: RoomSpec, original_text: str | None) -> list[str]:
    """The comments of ``original_text`` that :func:`spec_to_toml_keeping` cannot keep for
    this spec (those of deleted entries; the module's notes say which), each as written
    (``# ...``), in file order; empty when every comment is kept. For a confirmation before
    saving."""
    return _merge(spec, original_text)[1]


def _merge(spec: RoomSpec, original: str | None) -> tuple[str, list[str]]:
    if not original:
        return spec_to_toml(spec), []
    try:
        layout = read_layout(original)
    except (Unsupported, tomllib.TOMLDecodeError, KeyError, IndexError, TypeError):
        return _fallback(spec, original)
    d = spec_to_dict(spec)
    nl = layout.newline
    root_new = {k: v for k, v in d.items() if k not in SINGLE_TABLES + ARRAY_TABLES}
    old = {k: [t for t in layout.tables[1:] if t.kind == k] for k in TABLE_ORDER}

    # Which original table each new table is written over (None: a new one).
    pairs: dict[str, list[tuple[Table | None, dict]]] = {}
    lost: list[str] = []
    carried: dict[int, list[str]] = {}       # id(table) -> comment block moved above it
    end_extra: list[str] = []
    deleted: set[int] = set()
    for kind in TABLE_ORDER:
        olds = old[kind]
        if kind in SINGLE_TABLES:
            new = d.get(kind)
            if new is None and kind == "air" and olds and olds[0].comments():
                new = {}        # an emptied [air] stays for its comments (it reads the same)
            pairs[kind] = [(olds[0] if olds else None, new)] if new is not None else []
            deleted.update(id(t) for t in olds if new is None)
        else:
            news = d.get(kind) or []
            match = _match([t.data for t in olds], news, "id" if kind == "materials" else "name",
                           [t.content for t in olds])
            pairs[kind] = [(olds[m] if m is not None else None, x) for m, x in zip(match, news)]
            used = {m for m in match if m is not None}
            deleted.update(id(t) for j, t in enumerate(olds) if j not in used)

    # The comments of deleted tables: a block separated from the header by a blank line moves
    # to the next table that stays; the rest goes with the table.
    tables = layout.tables
    for j, t in enumerate(tables):
        if id(t) not in deleted:
            continue
        cut = _last_blank(t.lead)
        block = t.lead[:cut] if comment_lines(t.lead[:cut]) else []
        lost += t.comments(skip=len(block))
        if block:
            nxt = next((u for u in tables[j + 1:] if id(u) not in deleted), None)
            if nxt is None:
                end_extra += block
            else:
                carried[id(nxt)] = block + carried.get(id(nxt), [])

    out: list[str] = []
    _write_table(tables[0], root_new, out, carried)
    for kind in _kinds_in_order(layout):
        for t, new in pairs.get(kind, ()):
            if t is None:
                out.append("")
                out.append(f"[[{toml_key(kind)}]]" if kind in ARRAY_TABLES
                           else f"[{toml_key(kind)}]")
                out += [f"{toml_key(k)} = {toml_value(v)}" for k, v in new.items()]
            else:
                _write_table(t, new, out, carried)
    out += end_extra + layout.end
    return nl.join(out) + nl, lost


def _fallback(spec: RoomSpec, original: str) -> tuple[str, list[str]]:
    """A layout not followed line by line: the plain text, with the comments at the top kept."""
    lines = original.replace("\r\n", "\n").split("\n")
    head = []
    for line in lines:
        if line.startswith("#") or (not line.strip() and head):
            head.append(line)
        else:
            break
    while head and not head[-1].strip():
        head.pop()
    text = spec_to_toml(spec)
    lost = _all_comments(lines[len(head):])
    return ("\n".join(head) + "\n" + text) if head else text, lost


def _all_comments(lines: list[str]) -> list[str]:
    """Every comment in lines of TOML (outside strings), as written."""
    out = []
    for line in lines:
        if "#" not in line:
            continue
        s = line.lstrip()
        if s.startswith("#"):
            out.append(s.strip())
            continue
        k, q = 0, None
        while k < len(line):
            c = line[k]
            if q is None and c == "#":
                out.append(line[k:].strip())
                break
            if c in "\"'" and q is None:
                q = c
            elif c == q:
                q = None
            elif c == "\\" and q == '"':
                k += 1
            k += 1
    return out


def _last_blank(lines: list[str]) -> int:
    for j in range(len(lines) - 1, -1, -1):
        if not lines[j].strip():
            return j
    return 0


def _kinds_in_order(layout: Layout) -> list[str]:
    """The kinds of table in the order the original first has them, the others where the
    documented order puts them."""
    order: list[str] = []
    for t in layout.tables[1:]:
        if t.kind not in order:
            order.append(t.kind)
    for kind in TABLE_ORDER:
        if kind in order:
            continue
        rank = TABLE_ORDER.index(kind)
        at = 0
        for j, k in enumerate(order):
            if TABLE_ORDER.index(k) < rank:
                at = j + 1
        order.insert(at, kind)
    return order


def _write_table(t: Table, new: dict, out: list[str], carried: dict) -> None:
    out += carried.get(id(t), ())
    out += t.lead
    if t.header is not None:
        out.append(t.header)
    present = {e.key for e in t.entries}
    after: dict[str | None, list[str]] = {}
    anchor = None
    for k in new:
        if k in present:
            anchor = k
        else:
            after.setdefault(anchor, []).append(k)
    for k in after.get(None, ()):
        out.append(f"{toml_key(k)} = {toml_value(new[k])}")
    for e in t.entries:
        out += e.lead
        if e.key in new:
            v = new[e.key]
            if same_data(v, e.value):
                out += e.lines
            elif len(e.lines) > 1 and (kept := _numbers_in_place(e, v)) is not None:
                out += kept
            else:
                indent = e.prefix[:len(e.prefix) - len(e.prefix.lstrip())]
                out += [indent + c for c in e.inner]
                out.append(e.prefix + toml_value(v) + e.trail)
        else:                                   # removed: its comments stay
            indent = e.prefix[:len(e.prefix) - len(e.prefix.lstrip())]
            out += [indent + c for c in e.inner + trail_comment(e.trail)]
        for k in after.get(e.key, ()):
            out.append(f"{toml_key(k)} = {toml_value(new[k])}")
    out += t.tail


_NUMBER_OR_COMMENT = re.compile(r"#[^\n]*|[-+]?\d[\d_]*(?:\.\d[\d_]*)?(?:[eE][-+]?\d[\d_]*)?")


def _numbers_in_place(e: Entry, new) -> list[str] | None:
    """A list of numbers written over several lines, changed but as long as it was: the lines
    with only the changed numbers rewritten, so its comments stay beside the numbers they were
    beside. None if it is not such a list."""
    old = e.value
    if not (isinstance(new, list) and isinstance(old, list) and len(new) == len(old)) or \
            not all(isinstance(x, (int, float)) and not isinstance(x, bool)
                    for x in new + old):
        return None
    whole = "\n".join(e.lines)
    start, end = len(e.prefix), len(whole) - len(e.trail)
    body = whole[start:end]
    pieces, at, k = [], 0, 0
    for m in _NUMBER_OR_COMMENT.finditer(body):
        if m.group(0).startswith("#"):
            continue
        if k >= len(old) or float(m.group(0).replace("_", "")) != old[k]:
            return None
        if not same_data(new[k], old[k]):
            pieces += [body[at:m.start()], toml_value(new[k])]
            at = m.end()
        k += 1
    if k != len(old):
        return None
    return (whole[:start] + "".join(pieces) + body[at:] + whole[end:]).split("\n")



def _match(old: list[dict], new: list[dict], name: str,
           old_content: list | None = None) -> list[int | None]:
    """For each new entry of an array of tables, the original entry it continues (None: a new
    one). In turn: the same content; the same name; an entry left over between the same
    neighbours with most of its values the same (renamed, perhaps changed); such an entry
    left over anywhere (renamed and moved). A renamed entry with half its values or more
    changed counts as deleted and new (its comments are listed by :func:`comments_lost`)."""
    m: list[int | None] = [None] * len(new)
    used: set[int] = set()
    by_content: dict = {}
    for i, o in enumerate(old_content or [content_key(o) for o in old]):
        by_content.setdefault(o, []).append(i)
    for j, x in enumerate(new):
        free = by_content.get(content_key(x))
        if free:
            m[j] = free.pop(0)
            used.add(m[j])
    if len(used) == len(old):
        return m
    by_name: dict = {}
    for i, o in enumerate(old):
        if i not in used:
            by_name.setdefault(o.get(name), []).append(i)
    for j, x in enumerate(new):
        if m[j] is None and by_name.get(x.get(name)):
            m[j] = by_name[x.get(name)].pop(0)
            used.add(m[j])
    left = [i for i in range(len(old)) if i not in used]
    if not left or all(v is not None for v in m):
        return m

    def alike(x: dict, o: dict) -> bool:
        """Most values the same (renamed, perhaps with one of three values changed)."""
        keys = (x.keys() | o.keys()) - {name}
        same = sum(1 for k in keys if k in x and k in o and same_data(x[k], o[k]))
        return bool(keys) and 2 * same > len(keys)

    after = [len(old)] * (len(new) + 1)     # the original index of the next matched entry
    for j in range(len(new) - 1, -1, -1):
        after[j] = m[j] if m[j] is not None else after[j + 1]
    gaps: dict[tuple[int, int], list[int]] = {}
    lo = -1
    for j in range(len(new)):
        if m[j] is not None:
            lo = m[j]
        else:
            gaps.setdefault((lo, after[j + 1]), []).append(j)
    for (lo, hi), js in gaps.items():
        there = [i for i in left if lo < i < hi]
        for j in js:
            i = next((i for i in there if alike(new[j], old[i])), None)
            if i is not None:
                m[j] = i
                there.remove(i)
                left.remove(i)
    for j, x in enumerate(new):
        if m[j] is None and left:
            i = next((i for i in left if alike(x, old[i])), None)
            if i is not None:
                m[j] = i
                left.remove(i)
    return m
