"""The engine's one home of input checks: each message names the argument and the allowed
range, and the checks pass exactly the values in range."""

from __future__ import annotations

import math

import numpy as np
import pytest

from roomcalc.engine import checks


@pytest.mark.parametrize("x", [0.0, -1.0, math.nan, math.inf, [1.0, -2.0], [1.0, math.nan]])
def test_positive_rejects_and_names(x):
    with pytest.raises(ValueError, match=r"^volume: must be finite and above 0 \[m\^3\]"):
        checks.positive("volume", x, "m^3")


@pytest.mark.parametrize("x", [1e-9, 3.0, [0.5, 2.0]])
def test_positive_passes(x):
    np.testing.assert_array_equal(checks.positive("volume", x), np.asarray(x, dtype=float))


def test_in_range_open_and_closed_ends_and_reason():
    assert float(checks.in_range("a", 0.0, 0.0, 1.0, high_inclusive=False)) == 0.0
    with pytest.raises(ValueError, match=r"^a: must be finite and 0 or more and below 1 "
                                         r"\(ln\(1 - alpha\) has no value at 1\); got 1$"):
        checks.in_range("a", 1.0, 0.0, 1.0, high_inclusive=False,
                        why="ln(1 - alpha) has no value at 1")
    with pytest.raises(ValueError, match="got values from 1 to 2"):
        checks.in_range("a", [0.5, 1.0, 2.0], 0.0, 1.0, high_inclusive=False)


def test_positive_or_nan():
    out = checks.positive_or_nan("rt60_max", [0.5, math.nan], "s")
    assert out[0] == 0.5 and math.isnan(out[1])
    for bad in ([0.5, 0.0], [math.inf], [-1.0]):
        with pytest.raises(ValueError, match=r"^rt60_max: must be above 0 \[s\], or NaN"):
            checks.positive_or_nan("rt60_max", bad, "s")


def test_not_numbers():
    with pytest.raises(ValueError, match="^hours: must be numbers"):
        checks.finite("hours", ["long"])
