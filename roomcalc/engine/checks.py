"""Input checks of the engine: the one home of every "finite, in range, right shape" test.

Each function converts its input to a float array, checks it and returns it, or raises
``ValueError`` whose message starts with the argument's name and states the allowed range, e.g.
``volume: must be finite and above 0 [m^3]; got -2``. Formulas call these in their public
functions; the unchecked kernels they guard do the arithmetic.
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["as_floats", "finite", "in_range", "positive", "non_negative", "per_band",
           "positive_or_nan", "range_text", "band_values"]


def _unit(unit: str) -> str:
    return f" [{unit}]" if unit else ""


def _got(x: np.ndarray) -> str:
    if x.size == 1:
        return f"; got {float(x.reshape(-1)[0]):.6g}"
    bad = x[~np.isfinite(x)] if not np.isfinite(x).all() else x
    return f"; got values from {np.nanmin(bad):.6g} to {np.nanmax(bad):.6g}" \
        if np.isfinite(bad).any() else "; got a value that is not finite"


def as_floats(name: str, x) -> np.ndarray:
    """``x`` as a float array; ``ValueError`` naming ``name`` when it is not numbers."""
    try:
        return np.asarray(x, dtype=float)
    except (TypeError, ValueError):
        raise ValueError(f"{name}: must be numbers, got {x!r}") from None


def range_text(low=None, high=None, *, low_inclusive=True, high_inclusive=True,
               unit: str = "") -> str:
    """The allowed range in words: "above 0", "0 or more", "from 0 to 1", "0 or more and
    below 1"."""
    if low is not None and high is not None:
        if low_inclusive and high_inclusive:
            text = f"from {low:g} to {high:g}"
        else:
            lo = f"{low:g} or more" if low_inclusive else f"above {low:g}"
            hi = f"at most {high:g}" if high_inclusive else f"below {high:g}"
            text = f"{lo} and {hi}"
    elif low is not None:
        text = f"{low:g} or more" if low_inclusive else f"above {low:g}"
    elif high is not None:
        text = f"{high:g} or less" if high_inclusive else f"below {high:g}"
    else:
        text = "any value"
    return text + _unit(unit)


def finite(name: str, x, unit: str = "") -> np.ndarray:
    """Every value finite (no NaN, no infinity)."""
    a = as_floats(name, x)
    if not np.isfinite(a).all():
        raise ValueError(f"{name}: every value must be a finite number{_unit(unit)}")
    return a


def in_range(name: str, x, low=None, high=None, *, low_inclusive=True, high_inclusive=True,
             unit: str = "", why: str = "") -> np.ndarray:
    """Every value finite and within [low, high] (each end open or closed, or absent).

    ``why``, when given, is added to the message in brackets (e.g. why a formula needs the
    range)."""
    if type(x) is float or type(x) is int:     # one number, as a room's scalars: no arrays
        f = float(x)
        if (math.isfinite(f) and (low is None or (f >= low if low_inclusive else f > low))
                and (high is None or (f <= high if high_inclusive else f < high))):
            return np.float64(f)
    a = as_floats(name, x)
    ok = np.isfinite(a)
    if low is not None:
        ok &= (a >= low) if low_inclusive else (a > low)
    if high is not None:
        ok &= (a <= high) if high_inclusive else (a < high)
    if not ok.all():
        rng = range_text(low, high, low_inclusive=low_inclusive, high_inclusive=high_inclusive,
                         unit=unit)
        note = f" ({why})" if why else ""
        raise ValueError(f"{name}: must be finite and {rng}{note}{_got(a[~ok])}")
    return a


def positive(name: str, x, unit: str = "") -> np.ndarray:
    """Every value finite and above 0."""
    return in_range(name, x, 0.0, low_inclusive=False, unit=unit)


def non_negative(name: str, x, unit: str = "") -> np.ndarray:
    """Every value finite and 0 or more."""
    return in_range(name, x, 0.0, unit=unit)


def per_band(name: str, x, n_bands: int) -> np.ndarray:
    """``x`` with ``n_bands`` values on its last axis (a scalar is not accepted)."""
    a = as_floats(name, x)
    if a.ndim == 0 or a.shape[-1] != n_bands:
        n = 1 if a.ndim == 0 else a.shape[-1]
        raise ValueError(f"{name}: needs {n_bands} values, one per band; got {n}")
    return a


def band_values(name: str, x, bands_hz, low=None, high=None, *, low_inclusive=True,
                nan_ok: bool = False, unit: str = "") -> np.ndarray:
    """One value per band (a 1-d array of ``len(bands_hz)``), each finite and within
    [low, high] (low open when ``low_inclusive`` is False), or NaN where ``nan_ok`` (no
    limit in that band). The message names the first bad value by index and band, e.g.
    ``alpha[2]: 1.3 at 500 Hz must be from 0 to 1.2``."""
    a = as_floats(name, x)
    nb = len(bands_hz)
    if a.shape != (nb,):
        raise ValueError(f"{name}: must have {nb} values, one per band "
                         f"({', '.join(f'{b:g}' for b in bands_hz)} Hz); got shape {a.shape}")
    ok = np.isfinite(a)
    if low is not None:
        ok &= (a >= low) if low_inclusive else (a > low)
    if high is not None:
        ok &= a <= high
    if nan_ok:
        ok |= np.isnan(a)
    if not ok.all():
        i = int(np.argmin(ok))
        rng = range_text(low, high, low_inclusive=low_inclusive, unit=unit)
        if low is None and high is None:
            rng = "finite" + _unit(unit)
        raise ValueError(f"{name}[{i}]: {a[i]:g} at {bands_hz[i]:g} Hz must be {rng}"
                         + (" (NaN for no limit)" if nan_ok else ""))
    return a


def positive_or_nan(name: str, x, unit: str = "") -> np.ndarray:
    """Every value above 0 and finite, or NaN (no value: e.g. no limit on that side)."""
    a = as_floats(name, x)
    given = ~np.isnan(a)
    ok = ~given | (np.isfinite(a) & (a > 0))
    if not np.all(ok):
        raise ValueError(f"{name}: must be above 0{_unit(unit)}, or NaN for none"
                         f"{_got(a[~ok])}")
    return a
