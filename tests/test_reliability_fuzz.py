"""The reliability run as a test: mutated example rooms through every output.

Each case takes one of the example rooms, mutates it (values replaced by hostile ones -- empty
strings, zeros, negatives, subnormal and huge numbers, NaN and infinities, wrong types --, keys
dropped or added, array items doubled or removed, or the text itself cut, spliced or garbled),
writes it to a file and reads it as the command line does. It asserts:

- only our own error type (RoomFileError) escapes;
- every problem names the file and a field or a line;
- every accepted file gives finite numbers in every output format: the report in text,
  markdown, JSON and CSV, ``check`` in text and JSON, and before/after of the room with itself
  (no ``nan`` or ``inf`` anywhere; JSON parses with a reader that refuses NaN and Infinity);
- a save round trip reproduces the room (the written text reads back to the same spec and is
  the same text when written again).

CI runs ``FUZZ_CASES`` cases (2,000 by default); ``ROOMCALC_FUZZ_CASES=20000`` runs the long
version of the run, with new random cases each time (CI's are the same on every run).
See docs/validation.md, "Reliability".
"""

from __future__ import annotations

import json
import math
import os
import re
import tempfile
import tomllib
import warnings
from pathlib import Path

import pytest
import tomli_w
from hypothesis import HealthCheck, event, given, settings
from hypothesis import strategies as st

from roomcalc.engine.air import AirRangeWarning
from roomcalc.io.catalog import load_catalog
from roomcalc.io.errors import RoomFileError
from roomcalc.io.roomfile import (AIR_KEYS, OBJECT_KEYS, RECEIVER_KEYS, SHAPE_KEYS, SOURCE_KEYS,
                                  SURFACE_KEYS, TOP_KEYS, parse_spec, spec_to_toml)
from roomcalc.present import compare as present_compare
from roomcalc.present import report
from roomcalc.present.numbers import json_text
from roomcalc.study import Study

from conftest import EXAMPLES

FUZZ_CASES = int(os.environ.get("ROOMCALC_FUZZ_CASES", "2000"))
# CI runs the same cases every time (a red run can be repeated); the long run draws new ones.
RUN = settings(max_examples=FUZZ_CASES, deadline=None, database=None,
               derandomize="ROOMCALC_FUZZ_CASES" not in os.environ,
               suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                                      HealthCheck.filter_too_much])

EXAMPLE_TEXTS = {p.name: p.read_text(encoding="utf-8") for p in sorted(EXAMPLES.glob("*.toml"))}
EXAMPLE_DATA = {name: tomllib.loads(text) for name, text in EXAMPLE_TEXTS.items()}
CATALOG = load_catalog()
WORK = Path(tempfile.mkdtemp(prefix="roomcalc-fuzz-"))
FILE = WORK / "fuzzed.toml"

# A bare nan or inf anywhere in an output (not inside a word such as "info" or "infinite").
NON_FINITE = re.compile(r"(?<![A-Za-z])(?:[-+]?inf(?:inity)?|nan)(?![A-Za-z])", re.IGNORECASE)

# ----------------------------------------------------------------------------- strategies

HOSTILE = st.one_of(
    st.sampled_from(["", " ", "\u00a0", "x", "person-seated", "plaster-on-masonry", "pink",
                     "surface", "floor", "sabine", "eyring", "?", "\x00", "a" * 300]),
    st.sampled_from([0, -1, 1, 2, 10 ** 6, -(2 ** 63), 2 ** 63 - 1]),
    st.sampled_from([0.0, -0.0, -1.0, 5e-324, 1e-12, 1e-3, 0.999, 1.0, 1.01, 1e12, 1e308,
                     math.nan, math.inf, -math.inf]),
    st.floats(allow_nan=True, allow_infinity=True),
    st.booleans(),
    st.lists(st.floats(-1e3, 1e3), max_size=9),
    st.builds(dict), st.builds(list), st.builds(lambda: {"x": 1}),   # new each time
)


# Keys a mutation may add: every key a room file knows, one unknown and the empty key.
ADDED_KEYS = sorted(set(TOP_KEYS + AIR_KEYS + SHAPE_KEYS + SURFACE_KEYS + OBJECT_KEYS
                        + SOURCE_KEYS + RECEIVER_KEYS) | {"extra", ""})


def _paths(node, prefix=()):
    """Every key path of a TOML document, tables and arrays included."""
    if isinstance(node, dict):
        for k, v in node.items():
            yield prefix + (k,)
            yield from _paths(v, prefix + (k,))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            yield prefix + (i,)
            yield from _paths(v, prefix + (i,))


def _parent(doc, path):
    node = doc
    for k in path[:-1]:
        node = node[k]
    return node


@st.composite
def mutated_data(draw):
    """An example room's document with one to three structural mutations."""
    name = draw(st.sampled_from(sorted(EXAMPLE_DATA)))
    doc = json.loads(json.dumps(EXAMPLE_DATA[name]))     # a deep copy (the examples are JSON-safe)
    for _ in range(draw(st.integers(1, 3))):
        paths = list(_paths(doc))
        if not paths:
            break
        path = draw(st.sampled_from(paths))
        parent, key = _parent(doc, path), path[-1]
        kind = draw(st.sampled_from(["value", "value", "value", "drop", "add", "double",
                                     "scale"]))
        event(f"mutation: {kind}")
        if kind == "value":
            parent[key] = draw(HOSTILE)
        elif kind == "drop":
            del parent[key]
        elif kind == "add" and isinstance(parent, dict):
            parent[draw(st.sampled_from(ADDED_KEYS))] = draw(HOSTILE)
        elif kind == "double" and isinstance(parent, list):
            parent.insert(key, json.loads(json.dumps(parent[key], allow_nan=True)))
        elif kind == "scale" and isinstance(parent[key], (int, float)) \
                and not isinstance(parent[key], bool):
            parent[key] = parent[key] * draw(st.sampled_from([0, -1, 1e-9, 1e-3, 1e3, 1e9]))
    try:
        return tomli_w.dumps(doc)
    except (TypeError, ValueError):
        return EXAMPLE_TEXTS[name]


@st.composite
def mutated_text(draw):
    """An example room's text cut, spliced or garbled."""
    text = EXAMPLE_TEXTS[draw(st.sampled_from(sorted(EXAMPLE_TEXTS)))]
    for _ in range(draw(st.integers(1, 3))):
        at = draw(st.integers(0, len(text)))
        kind = draw(st.sampled_from(["cut", "insert", "delete", "repeat-line", "swap-digit"]))
        event(f"text mutation: {kind}")
        if kind == "cut":
            text = text[:at]
        elif kind == "insert":
            text = text[:at] + draw(st.sampled_from(
                ["=", "[", "]", "\"", "#", "\n", "[[surfaces]]\n", "0", "-", ".", "e999",
                 "nan", "inf", "\x00", "\ufeff", "é", "[x]\n", "a.b.c = 1\n"])) + text[at:]
        elif kind == "delete":
            text = text[:at] + text[at + draw(st.integers(1, 20)):]
        elif kind == "repeat-line":
            lines = text.splitlines(keepends=True)
            if lines:
                i = draw(st.integers(0, len(lines) - 1))
                lines.insert(i, lines[i])
                text = "".join(lines)
        else:
            digits = [m.start() for m in re.finditer(r"\d", text)]
            if digits:
                i = draw(st.sampled_from(digits))
                text = text[:i] + draw(st.sampled_from("0123456789")) + text[i + 1:]
    return text


# ----------------------------------------------------------------------------- the checks

def _strict_json(text: str, what: str):
    def refuse(token):
        raise AssertionError(f"{what}: JSON holds {token}")
    return json.loads(text, parse_constant=refuse)


def _finite_text(text: str, what: str, words=()) -> None:
    """No nan or inf in ``text``, once the file's own words (a title may say "nan") are out."""
    for w in words:
        text = text.replace(w, "")
    m = NON_FINITE.search(text)
    assert m is None, f"{what}: '{m.group(0)}' in ...{text[max(0, m.start() - 80):m.end() + 40]}..."


def _user_words(spec) -> list[str]:
    """Every text the file gave (titles, names, ids), longest first."""
    from dataclasses import fields, is_dataclass

    found = set()

    def walk(x):
        if isinstance(x, str):
            found.add(x)
        elif is_dataclass(x):
            for f in fields(x):
                walk(getattr(x, f.name))
        elif isinstance(x, dict):
            for k, v in x.items():
                walk(k)
                walk(v)
        elif isinstance(x, (list, tuple)):
            for v in x:
                walk(v)
    walk(spec)
    return sorted((w for w in found if w), key=len, reverse=True)


def _outputs(study: Study):
    """Every output of an accepted room, as the command line prints it."""
    ans = study.answer()
    u = study.spec.unit_system
    for form in ("text", "markdown", "json", "csv"):
        yield f"report --format {form}", form, report.report(ans, form, FILE.name, u)
    yield "check", "text", report.check_text(ans, FILE.name)
    yield "check --format json", "json", json_text(report.check_dict(ans, FILE.name))
    cmp = Study.compare(ans.result, ans.result)
    for form in ("text", "markdown", "json", "csv"):
        yield f"compare --format {form}", form, present_compare.compare_report(
            cmp, (FILE.name, FILE.name), form)


def check_one(text: str) -> str:
    """Run one mutated file through the reader and every output; the outcome for statistics."""
    FILE.write_text(text, encoding="utf-8")
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", AirRangeWarning)
            study = Study.from_file(FILE, CATALOG)
            outputs = list(_outputs(study))
    except RoomFileError as exc:
        assert exc.problems, "a RoomFileError without problems"
        for p in exc.problems:
            assert p.file == str(FILE), f"problem names {p.file!r}, not the file: {p}"
            assert p.where.strip(), f"problem names no field or line: {p}"
            assert p.message.strip(), f"problem without a message: {p}"
        return "refused"
    # Nothing the file describes is silently left out of the room computed.
    spec, room = study.spec, study.room
    assert (len(room.surfaces), len(room.objects), len(room.sources), len(room.receivers)) == \
        (len(spec.surfaces), len(spec.objects), len(spec.sources), len(spec.receivers)), \
        "an item of the file is missing from the room computed"
    words = _user_words(spec)
    for what, form, out in outputs:
        if form == "json":
            _strict_json(out, what)
        else:
            _finite_text(out, what, words)
    # A save round trip reproduces the room, and is stable.
    saved = spec_to_toml(study.spec)
    again = parse_spec(saved, str(FILE))
    assert again == study.spec, "the saved room reads back differently"
    assert spec_to_toml(again) == saved, "a second save writes other bytes"
    return "accepted"


@RUN
@given(mutated_data())
def test_mutated_rooms_are_refused_clearly_or_give_finite_outputs(text):
    event(check_one(text))


@settings(RUN, max_examples=max(FUZZ_CASES // 4, 50))
@given(mutated_text())
def test_garbled_room_texts_are_refused_clearly_or_give_finite_outputs(text):
    event(check_one(text))


@pytest.mark.parametrize("name", sorted(EXAMPLE_TEXTS))
def test_the_examples_pass_every_check(name):
    """The unmutated examples are accepted (so the run above reaches the outputs at all)."""
    assert check_one(EXAMPLE_TEXTS[name]) == "accepted"


@pytest.mark.parametrize("text,field", [
    ('title = "x"\nunits = "metric"\n[shape]\nlength = nan\nwidth = 3\nheight = 2.5\n', "length"),
    (EXAMPLE_TEXTS["classroom.toml"].replace('material = "linoleum-vinyl-on-concrete"',
                                             'material = ""'), "material"),
], ids=["nan length", "empty material"])
def test_the_checks_can_fail(text, field):
    """Known bad files are refused with the field named (the run's assertions are live)."""
    with pytest.raises(RoomFileError) as err:
        Study.from_file(_write(text), CATALOG)
    assert any(field in p.where or field in p.message for p in err.value.problems)


def _write(text: str) -> Path:
    FILE.write_text(text, encoding="utf-8")
    return FILE


# ----------------------------------------------------------------------------- the commands

COMMANDS = [["report", "--format", f] for f in ("text", "markdown", "json", "csv")] + \
    [["check"], ["check", "--format", "json"], ["plan"], ["plan", "--format", "json"]]


def run_commands(text: str) -> None:
    """Every command on one mutated file, in-process as ``roomcalc`` runs it: exit 0 with
    finite output, or exit 2 with every message naming the file; never an exception."""
    import contextlib
    import io

    from roomcalc import cli

    FILE.write_text(text, encoding="utf-8")
    try:
        words = _user_words(parse_spec(text, str(FILE)))
    except RoomFileError:
        words = []
    for command in COMMANDS:
        argv = command[:1] + [str(FILE)] + command[1:]
        out, err = io.StringIO(), io.StringIO()
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err), \
                warnings.catch_warnings():
            warnings.simplefilter("ignore", AirRangeWarning)
            code = cli.main(argv)
        what = "roomcalc " + " ".join(command)
        assert code in (0, 2), f"{what}: exit {code}"
        if "json" in command:
            if code == 0 or out.getvalue():
                _strict_json(out.getvalue(), what)    # (plan's problems go to stderr only)
        else:
            _finite_text(out.getvalue(), what, words)
        if code == 2:
            lines = [x for x in err.getvalue().splitlines() if x.strip()]
            assert lines or (command[0] == "check" and "json" in command), \
                f"{what}: exit 2 without a message"
            assert all(x.startswith((str(FILE), "roomcalc", "  ")) for x in lines), \
                f"{what}: a message names neither the file nor roomcalc: {lines}"


@settings(RUN, max_examples=max(FUZZ_CASES // 40, 20))   # 8 commands a case
@given(st.one_of(mutated_data(), mutated_text()))
def test_the_commands_on_mutated_rooms_exit_cleanly(text):
    run_commands(text)
