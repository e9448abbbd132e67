"""roomcalc: estimate what a room does to sound, per octave band, and what treatment changes.

Importing this package loads nothing heavy: no Textual, no Rich, no files read.
"""

__version__ = "0.1.0"

__all__ = ["__version__"]
