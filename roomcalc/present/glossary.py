"""The symbols on the results, in words: one home for what each stands for, shown beside the
symbol wherever it appears (the interface's legends and column heads, the help).

The symbols are the trade's (RT60, R, r_c, f_S, Lp, Lw, LwA, Q, dB(A)); the words are ours.
"""

from __future__ import annotations

__all__ = ["SYMBOLS", "named", "legend"]

#: Each symbol and what it stands for, in a few plain words (the help, F1, says more).
SYMBOLS: dict[str, str] = {
    "RT60": "reverberation time", "T": "reverberation time", "R": "room constant",
    "mean alpha": "mean absorption", "alpha": "absorption", "r_c": "critical distance",
    "f_S": "Schroeder frequency", "air": "air absorption", "Lp": "sound level",
    "Lw": "sound power", "LwA": "sound power", "Q": "directivity",
    "dB(A)": "A-weighted level"}


def named(symbol: str) -> str:
    """The symbol with its short name before it: "critical distance r_c".

    >>> named("r_c"), named("Q")
    ('critical distance r_c', 'directivity Q')
    """
    return f"{SYMBOLS[symbol]} {symbol}"


def legend(symbols, sep: str = "; ") -> str:
    """One legend line: each symbol with what it stands for.

    >>> legend(["R", "f_S"])
    'R: room constant; f_S: Schroeder frequency'
    """
    return sep.join(f"{s}: {SYMBOLS[s]}" for s in symbols)
