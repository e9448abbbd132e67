"""File layer: room files, the material catalogue, report formats and atomic saving.

Modules here may import the engine; they never import the interface (a test enforces it).
"""
