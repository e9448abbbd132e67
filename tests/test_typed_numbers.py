"""Numbers as typed in the interface's fields (roomcalc.study.typed), without Pilot: the
decimal comma is read as a decimal point, and lists keep their separators.

Both decimal signs, the comma and the point on the line, are allowed by ISO 80000-1 (the
decimal sign; from memory) and are in everyday use (common practice)."""

from __future__ import annotations

import pytest

from roomcalc.study.edits import parse_rt60_limit
from roomcalc.study.typed import parse_number, parse_numbers, split_entries


@pytest.mark.parametrize("text, value", [
    ("9,5", 9.5), ("9.5", 9.5), (" 9,5 ", 9.5), ("-0,25", -0.25), (",5", 0.5), ("12,", 12.0),
    ("1,5e3", 1500.0), ("+3,0", 3.0), ("7", 7.0), ("2e-3", 0.002)])
def test_one_number_with_a_decimal_comma_or_point(text, value):
    assert parse_number(text) == value


@pytest.mark.parametrize("text", ["", "x", "9,5,1", "9.5,1", "9,5x", "1 2", ",", "9;5"])
def test_not_one_number_is_refused_with_the_text(text):
    with pytest.raises(ValueError, match="is not a number"):
        parse_number(text)


@pytest.mark.parametrize("text, values", [
    ("0,6", [0.6]),
    ("0,6 0,5 0,4", [0.6, 0.5, 0.4]),                 # spaces, decimal commas
    ("0,6;0,5; 0,4", [0.6, 0.5, 0.4]),                # semicolons
    ("0.6, 0.5", [0.6, 0.5]),                         # comma and a space: a list
    ("0,6, 0,5", [0.6, 0.5]),                         # both
    ("0.6,0.5", [0.6, 0.5]),                          # points: the comma separates
    ("1,2,3", [1.0, 2.0, 3.0]),                       # several commas: a list
    ("1.5 2 3", [1.5, 2.0, 3.0]),
    ("  ", []),
])
def test_lists_keep_their_separators(text, values):
    assert parse_numbers(text) == values


def test_a_list_names_the_part_that_is_not_a_number():
    with pytest.raises(ValueError, match="'abc' is not a number"):
        parse_numbers("0,6 abc 0,5")


def test_entries_split_on_semicolons_and_commas_not_before_a_digit():
    assert [e.strip() for e in split_entries("Amp=3,2, Guitar=4")] == ["Amp=3,2", "Guitar=4"]
    assert split_entries("Amp=3.2,Guitar=4;Bass=1,5") == ["Amp=3.2", "Guitar=4", "Bass=1,5"]


def test_own_rt60_limit_takes_decimal_commas():
    assert parse_rt60_limit("0,6", 6) == 0.6
    assert parse_rt60_limit("0,8 0,7 0,6 0,6 0,6 0,6", 6) == [0.8, 0.7, 0.6, 0.6, 0.6, 0.6]
    assert parse_rt60_limit("0,8; 0,7; 0,6; 0,6; 0,6; 0,6", 6) == [0.8, 0.7, 0.6, 0.6, 0.6, 0.6]
    assert parse_rt60_limit("0.8, 0.7, 0.6, 0.6, 0.6, 0.6", 6) == [0.8, 0.7, 0.6, 0.6, 0.6, 0.6]
    with pytest.raises(ValueError, match="2 values"):
        parse_rt60_limit("0.6, 0.5", 6)                # still a list of two
    with pytest.raises(ValueError, match="only numbers"):
        parse_rt60_limit("0,6 s", 6)


def test_the_cell_editor_reads_decimal_commas():
    from roomcalc.tui.widgets.record_table import Column, parse_value

    number = Column("area", "Area", "number")
    assert parse_value("9,5", number) == 9.5
    with pytest.raises(ValueError, match="'9,5,1' is not a number"):
        parse_value("9,5,1", number)
    position = Column("position", "Position", "position")
    assert parse_value("1,5 2 1,2", position) == [1.5, 2.0, 1.2]
    assert parse_value("1,2,3", position) == [1.0, 2.0, 3.0]
    assert parse_value("1.5, 2, 1.2", position) == [1.5, 2.0, 1.2]
    distances = Column("distances", "Distances", "distances", optional=True)
    assert parse_value("Amp=3,2, Guitar=4", distances) == {"Amp": 3.2, "Guitar": 4.0}
    assert parse_value("Amp=3.2,Guitar=4", distances) == {"Amp": 3.2, "Guitar": 4.0}
