"""Property tests of the room-file reader: whatever a file holds, reading it either gives a room
or raises RoomFileError (never another exception), and a room it accepts is evaluated by the
engine, which never refuses it.

Two kinds of input: TOML documents built from the keys of room files (a valid room with up to
three corruptions: junk of any type in place of a value, a key dropped, a key added, an entry
doubled), and random text and byte mutations of the example rooms.

What the engine refused during development: a receiver at exactly a source's position, and
one a hair from it; the file layer now enforces every limit of the engine itself (the ranges
of roomcalc.io.limits), and a ValueError of evaluate() fails these tests. Run with
``--hypothesis-show-statistics`` to see the share of accepted, refused and evaluated files.
"""

from __future__ import annotations

import datetime as dt
import math
import re

import numpy as np
import pytest
import tomli_w
from hypothesis import HealthCheck, event, given, settings
from hypothesis import strategies as st

from roomcalc.engine.analysis import evaluate
from roomcalc.engine.air import AirRangeWarning
from roomcalc.engine.bands import DEFAULT_BANDS_HZ
from roomcalc.engine.field import PLACEMENT_Q
from roomcalc.engine.model import FACES
from roomcalc.io.catalog import ALPHA_MAX, ENTRY_KEYS
from roomcalc.io.errors import RoomFileError
from roomcalc.io.roomfile import (AIR_KEYS, OBJECT_KEYS, RECEIVER_KEYS, SHAPE_KEYS, SOURCE_KEYS,
                                  SURFACE_KEYS, TOP_KEYS, parse_spec, read_room, resolve)

from conftest import EXAMPLES

# Cold, dry or thin air outside ISO 9613-1's accuracy range is accepted with this warning.
pytestmark = pytest.mark.filterwarnings("ignore", category=AirRangeWarning)

FUZZ = settings(max_examples=200, deadline=None, derandomize=True, database=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
EXAMPLE_FILES = sorted(EXAMPLES.glob("*.toml"))
EXAMPLE_TEXTS = {p.name: p.read_text(encoding="utf-8") for p in EXAMPLE_FILES}
NAME = "fuzzed.toml"

# A few real catalogue ids of each kind (and a misspelt one), so that some documents resolve.
SURFACE_IDS = ["plaster-on-masonry", "concrete-floor-painted", "window-glass-ordinary",
               "mineral-wool-50mm-48kg", "linoleum-vinyl-on-concrete", "plaster-on-masonr"]
OBJECT_IDS = ["person-seated", "sofa-three-seat", "school-desk-with-pupil", "person-standing"]
SOURCE_NAMES = ["Saw", "Voice", "Fan"]

# ----------------------------------------------------------------------------- strategies

finite = st.floats(min_value=-1e6, max_value=1e6, allow_nan=False)
wild_float = st.floats(allow_nan=True, allow_infinity=True)
wild_int = st.one_of(st.integers(-10, 10), st.integers(-2 ** 63, 2 ** 63 - 1),
                     st.integers(10 ** 300, 10 ** 320))
junk = st.one_of(
    wild_float, wild_int, st.booleans(), st.text(max_size=8),
    st.sampled_from(["metric", "floor", "pink", "free", "plaster-on-masonry", "person-seated",
                     "Saw", "63", ""]),
    st.datetimes(min_value=dt.datetime(1900, 1, 1), max_value=dt.datetime(2100, 1, 1)),
    st.lists(st.one_of(finite, st.text(max_size=3), st.booleans()), max_size=9),
    st.dictionaries(st.sampled_from(["a", "Saw", "125", "name"]), finite, max_size=2),
)
# Keys a corruption may add: the known keys (in the wrong table, mostly) and near misses.
ALL_KEYS = sorted(set(TOP_KEYS + AIR_KEYS + SHAPE_KEYS + SURFACE_KEYS + OBJECT_KEYS
                      + SOURCE_KEYS + RECEIVER_KEYS + ENTRY_KEYS)) + ["lenght", "alpah", "x"]


def _box_point(draw, dims):
    if dims is None:
        return [draw(st.floats(0.0, 5.0)) for _ in range(3)]
    return [draw(st.floats(0.0, d)) for d in dims]


@st.composite
def valid_rooms(draw):
    """A room file document that is meant to be accepted, in metric or imperial units."""
    extra = draw(st.sets(st.sampled_from([63, 8000]), max_size=2))
    bands = sorted(set(DEFAULT_BANDS_HZ) | extra)
    nb = len(bands)
    doc = {"version": 1, "units": draw(st.sampled_from(["metric", "imperial"]))}
    if extra or draw(st.booleans()):
        doc["bands_hz"] = bands
    if draw(st.booleans()):
        doc["title"] = draw(st.text(max_size=12))
    if draw(st.booleans()):
        doc["air"] = {"temperature": draw(st.floats(-10.0, 40.0)),
                      "relative_humidity": draw(st.floats(0.0, 100.0)),
                      "pressure_kpa": draw(st.floats(80.0, 110.0))}
    box = draw(st.booleans())
    dims = None
    if box:
        dims = [draw(st.floats(1.0, 20.0)) for _ in range(3)]
        doc["shape"] = dict(zip(("length", "width", "height"), dims))
    else:
        doc["shape"] = {"volume": draw(st.floats(5.0, 5000.0))}
    alpha = st.lists(st.floats(0.0, ALPHA_MAX), min_size=nb, max_size=nb)
    surfaces = []
    for i in range(draw(st.integers(1, 5))):
        s = {"name": f"S{i}"}
        face = draw(st.sampled_from(FACES)) if box and draw(st.booleans()) else None
        if face is not None:
            s["face"] = face
        if face is None or draw(st.booleans()):
            s["area"] = draw(st.floats(0.1, 40.0))
        if not extra and draw(st.booleans()):
            s["material"] = draw(st.sampled_from(SURFACE_IDS[:-1]))
        else:
            s["alpha"] = draw(alpha)
        if draw(st.integers(0, 3)) == 0:
            s["count"] = draw(st.integers(1, 4))
        surfaces.append(s)
    # Only one surface per face without an area, so the face area can be inferred.
    for f in FACES:
        open_ = [s for s in surfaces if s.get("face") == f and "area" not in s]
        for s in open_[1:]:
            s["area"] = 1.0
    doc["surfaces"] = surfaces
    objects = []
    for i in range(draw(st.integers(0, 2))):
        o = {"name": f"O{i}", "count": draw(st.floats(0.0, 30.0))}
        if not extra and draw(st.booleans()):
            o["material"] = draw(st.sampled_from(OBJECT_IDS))
        else:
            o["absorption"] = draw(st.lists(st.floats(0.0, 5.0), min_size=nb, max_size=nb))
        objects.append(o)
    if objects:
        doc["objects"] = objects
    sources = []
    for name in SOURCE_NAMES[:draw(st.integers(0, 2))]:
        s = {"name": name}
        if draw(st.booleans()):
            s["sound_power"] = draw(st.lists(st.floats(40.0, 120.0), min_size=nb, max_size=nb))
        else:
            s["sound_power_dba"] = draw(st.floats(40.0, 120.0))
            s["spectrum"] = draw(st.sampled_from(["pink", "white", "brown"]))
        if draw(st.booleans()):
            s["placement"] = draw(st.sampled_from(tuple(PLACEMENT_Q)))
        elif draw(st.booleans()):
            s["directivity"] = draw(st.floats(0.5, 10.0))
        if box and draw(st.booleans()):
            s["position"] = _box_point(draw, dims)
        sources.append(s)
    if sources:
        doc["sources"] = sources
    receivers = []
    for i in range(draw(st.integers(0, 2))):
        r = {"name": f"R{i}"}
        if box and draw(st.booleans()):
            r["position"] = _box_point(draw, dims)
        need = [s["name"] for s in sources if "position" not in s or "position" not in r]
        if need or draw(st.booleans()):
            r["distances"] = {n: draw(st.floats(0.1, 30.0)) for n in need}
        receivers.append(r)
    if receivers:
        doc["receivers"] = receivers
    if draw(st.integers(0, 4)) == 0:
        doc["materials"] = [{"id": "my-panel", "name": "My panel", "kind": "surface",
                             "source": "invented for a test",
                             "values": {str(b): draw(st.floats(0.0, 1.0)) for b in bands}}]
        doc["surfaces"].append({"name": "Panel", "area": 2.0, "material": "my-panel"})
    return doc


def _containers(doc, path=()):
    """Every (path, table-or-list) inside a document."""
    yield path, doc
    items = doc.items() if isinstance(doc, dict) else enumerate(doc)
    for k, v in items:
        if isinstance(v, (dict, list)):
            yield from _containers(v, path + (k,))


@st.composite
def documents(draw):
    """A valid room with 0 to 3 corruptions: a value replaced by junk, a key removed, a key
    added (known elsewhere, misspelt, or unknown), or a list entry doubled."""
    doc = draw(valid_rooms())
    for _ in range(draw(st.integers(0, 3))):
        spots = list(_containers(doc))
        _, box = draw(st.sampled_from(spots))
        keys = list(box) if isinstance(box, dict) else list(range(len(box)))
        action = draw(st.sampled_from(["junk", "junk", "drop", "add", "double"]))
        if action == "add" and isinstance(box, dict):
            box[draw(st.sampled_from(ALL_KEYS))] = draw(junk)
        elif not keys:
            continue
        elif action == "junk":
            box[draw(st.sampled_from(keys))] = draw(junk)
        elif action == "drop":
            del box[draw(st.sampled_from(keys))]
        elif action == "double" and isinstance(box, list):
            box.append(box[draw(st.sampled_from(keys))])
    return doc


# ----------------------------------------------------------------------------- the property

def _read(text: str, catalog, folder=None):
    """parse_spec + resolve; None when the file is refused (after checking the report).

    With a folder, a refused text is also read by read_room from a file, which adds the
    catalogue's problems to parse_spec's; its report must start with parse_spec's.
    """
    try:
        spec = parse_spec(text, NAME)
    except RoomFileError as exc:
        _check_report(exc, NAME)
        event("refused by parse_spec")
        if folder is not None:
            path = folder / NAME
            path.write_text(text, encoding="utf-8")
            with pytest.raises(RoomFileError) as again:
                read_room(path, catalog)
            _check_report(again.value, str(path))
            assert [(p.where, p.message) for p in again.value.problems][:len(exc.problems)] \
                == [(p.where, p.message) for p in exc.problems]
        return None
    try:
        return spec, resolve(spec, catalog, NAME)
    except RoomFileError as exc:
        _check_report(exc, NAME)
        event("refused by resolve")
        return None


def _check_report(exc: RoomFileError, name: str):
    assert exc.problems, "a RoomFileError must carry at least one problem"
    for p in exc.problems:
        assert p.file == name
        assert p.message.strip()
        assert "Traceback" not in str(p)
        assert str(p).startswith(f"{name}: ")
    # One line per problem, and the two lines of a broken TOML line shown with its caret.
    excerpts = sum(p.excerpt.count("\n") + 1 for p in exc.problems if p.excerpt)
    assert str(exc).count("\n") == len(exc.problems) - 1 + excerpts


def _check_accepted(spec, room):
    """What an accepted room must satisfy, and that the engine takes it or says ValueError."""
    bands = room.bands_hz
    assert set(DEFAULT_BANDS_HZ) <= set(bands)
    assert list(bands) == sorted(set(bands))
    assert math.isfinite(room.volume) and room.volume > 0
    assert room.surfaces
    for s in room.surfaces:
        assert s.alpha.shape == (len(bands),)
        assert np.all((s.alpha >= 0) & (s.alpha <= ALPHA_MAX))
        assert s.area > 0 and s.count >= 1
    for o in room.objects:
        assert o.absorption.shape == (len(bands),) and np.all(o.absorption >= 0)
    for s in room.sources:
        assert s.sound_power_db.shape == (len(bands),)
        assert np.all(np.isfinite(s.sound_power_db)) and s.directivity > 0
    names = [s.name for s in room.sources]
    assert len(names) == len(set(names))
    for r in room.receivers:
        for s in room.sources:
            assert s.name in r.distances or (r.position is not None and s.position is not None)
    assert 0 <= room.air.relative_humidity <= 100
    event("accepted")
    # The file layer enforces every limit of the engine first (roomcalc.io.limits): a room it
    # accepts is one the engine evaluates, so a ValueError here is a defect of the loader.
    result = evaluate(room)
    event("evaluated")
    assert result.bands_hz == tuple(bands)
    rt = result.rt60_s["sabine"]
    assert not np.any(np.isnan(rt)) and np.all(rt > 0)
    assert len(result.receivers) == (len(room.receivers) if room.sources else 0)


@FUZZ
@given(doc=documents())
def test_random_documents_raise_only_room_file_errors(doc, catalog, tmp_path_factory):
    text = tomli_w.dumps(doc)
    got = _read(text, catalog, tmp_path_factory.getbasetemp())
    if got is not None:
        _check_accepted(*got)


# ----------------------------------------------------------------------------- mutations

TOML_BITS = list("[]{}=\".,'#-+_\n \t0123456789eEinaf") + ["nan", "inf", "true", "[[", "]]",
                                                          "\"\"\"", "\\", "\x00", "\u00e9"]
NUMBER = re.compile(r"(?<![\w.])-?\d+(\.\d+)?(e-?\d+)?(?![\w.])")


@st.composite
def text_mutations(draw):
    name = draw(st.sampled_from(sorted(EXAMPLE_TEXTS)))
    text = EXAMPLE_TEXTS[name]
    for _ in range(draw(st.integers(1, 4))):
        kind = draw(st.sampled_from(["insert", "delete", "number", "line", "dup", "swap"]))
        n = len(text)
        if kind == "insert":
            i = draw(st.integers(0, n))
            text = text[:i] + draw(st.one_of(st.sampled_from(TOML_BITS), st.text(max_size=3))) \
                + text[i:]
        elif kind == "delete" and n:
            i = draw(st.integers(0, n - 1))
            text = text[:i] + text[i + draw(st.integers(1, 12)):]
        elif kind == "number":
            spots = list(NUMBER.finditer(text))
            if spots:
                m = draw(st.sampled_from(spots))
                new = draw(st.one_of(finite, wild_float, st.integers(-5, 5),
                                     st.integers(10 ** 300, 10 ** 301), st.just(0)))
                rep = repr(new) if not isinstance(new, float) or math.isfinite(new) else \
                    ("nan" if math.isnan(new) else ("-inf" if new < 0 else "inf"))
                text = text[:m.start()] + rep + text[m.end():]
        else:
            lines = text.split("\n")
            i, j = draw(st.integers(0, len(lines) - 1)), draw(st.integers(0, len(lines) - 1))
            if kind == "line":
                del lines[i]
            elif kind == "dup":
                lines.insert(j, lines[i])
            else:
                lines[i], lines[j] = lines[j], lines[i]
            text = "\n".join(lines)
    return text


@FUZZ
@given(text=text_mutations())
def test_mutated_examples_raise_only_room_file_errors(text, catalog, tmp_path_factory):
    got = _read(text, catalog, tmp_path_factory.getbasetemp())
    if got is not None:
        _check_accepted(*got)


@FUZZ
@given(name=st.sampled_from(sorted(EXAMPLE_TEXTS)),
       edits=st.lists(st.tuples(st.integers(0, 10 ** 6), st.binary(min_size=0, max_size=3),
                                st.integers(0, 3)), min_size=1, max_size=4))
def test_byte_mutations_raise_only_room_file_errors(name, edits, catalog, tmp_path_factory):
    data = bytearray(EXAMPLE_TEXTS[name].encode("utf-8"))
    for pos, new, cut in edits:
        i = pos % (len(data) + 1)
        data[i:i + cut] = new
    path = tmp_path_factory.getbasetemp() / "bytes.toml"
    path.write_bytes(bytes(data))
    try:
        spec, room = read_room(path, catalog)
    except RoomFileError as exc:
        _check_report(exc, str(path))
        event("refused")
        return
    _check_accepted(spec, room)


@pytest.mark.parametrize("name", sorted(EXAMPLE_TEXTS))
def test_unmutated_examples_are_accepted_and_evaluate(name, catalog):
    # The property tests above are only meaningful if the files they start from are good.
    got = _read(EXAMPLE_TEXTS[name], catalog)
    assert got is not None
    spec, room = got
    result = evaluate(room)
    assert np.all(result.rt60_s["sabine"] > 0)
