"""No "-0.0" in any output, and no "falls by" note when nothing changed: the workshop example
compared with itself, in every format of ``roomcalc compare``; the one number formatter."""

from __future__ import annotations

import json
import re

import pytest

from roomcalc.cli import main
from roomcalc.present.numbers import csv_number, fmt, value_or_note

from conftest import EXAMPLES

#: A negative zero as text: "-0", "-0.0", "-0.00" ... not followed by another digit
#: ("-0.05" is a real value).
NEG_ZERO = re.compile(r"-0(\.0+)?(?![\d.])")


@pytest.mark.parametrize("form", ["text", "markdown", "json", "csv"])
def test_a_room_compared_with_itself_shows_no_negative_zero_and_no_note(capsys, form):
    room = str(EXAMPLES / "workshop.toml")
    assert main(["compare", room, room, "--format", form]) == 0
    out = capsys.readouterr().out
    assert out.strip()
    assert not NEG_ZERO.search(out), NEG_ZERO.search(out)
    assert "falls by" not in out
    if form == "json":
        d = json.loads(out)
        assert d["notes"] == []
        # Every change is exactly zero and written unsigned.
        for r in d["receivers"]:
            assert r["level_change_dba"] == 0.0 and str(r["level_change_dba"]) == "0.0"
            assert all(str(x) == "0.0" for x in r["level_change_db"])
        assert all(str(x) == "0.0" for x in d["reverberant_reduction_db"])


def test_a_real_change_keeps_the_note(capsys):
    """The note stays where the reverberant field really falls (the treated workshop)."""
    assert main(["compare", str(EXAMPLES / "workshop.toml"),
                 str(EXAMPLES / "workshop-treated.toml"), "--format", "json"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert any("falls by" in n for n in d["notes"])
    assert not any(NEG_ZERO.search(n) for n in d["notes"])


@pytest.mark.parametrize("x, nd, text", [
    (-0.004, 2, "0.00"), (-0.04, 1, "0.0"), (-0.0, 1, "0.0"), (-0.4, 0, "0"), (0.0, 2, "0.00"),
    (-0.005001, 2, "-0.01"), (-0.06, 1, "-0.1"), (-12.34, 1, "-12.3"), (-100.0, 0, "-100"),
    (float("nan"), 1, "-"), (None, 1, "-")])
def test_fmt_never_writes_a_negative_zero(x, nd, text):
    assert fmt(x, nd) == text


def test_value_or_note_and_csv_cells_never_write_a_negative_zero():
    assert value_or_note(-0.01, 1, "dB") == "0.0 dB"
    assert csv_number(-0.0) == "0" and csv_number(-1.5) == "-1.5"
    assert csv_number(float("inf")) == "" and csv_number(None) == ""


@pytest.mark.parametrize("x, nd, text", [
    (0.26, 1, "+0.3"), (-0.01, 1, "0.0"), (0.04, 1, "0.0"), (-2.0, 1, "-2.0"), (0.0, 2, "0.00"),
    (-0.004, 2, "0.00"), (1.5, 0, "+2")])
def test_signed_changes_and_margins_write_zero_unsigned(x, nd, text):
    """A change or a margin is written with its sign ("+0.3", "-2.0"), zero without one."""
    assert fmt(x, nd, signed=True) == text
