"""The estimating engine: pure computation over octave bands.

Modules here import only the standard library, numpy, scipy and each other. They never read or
write files and never import the interface (a test enforces both).
"""

__all__: list[str] = []
